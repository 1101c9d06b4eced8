"""The schedule as a list: one row per breaker, sorted by slot, the name taking the spare width."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, ClassVar

from rich.text import Text
from textual.binding import Binding, BindingType
from textual.message import Message
from textual.widgets import DataTable

from tri.schedule.model import Circuit, Schedule
from tri.tui import fmt
from tri.tui.wiring_words import short_wiring, uses_wiring

HELP = """\
The list: one row per breaker, in slot order (new circuits, not yet placed,
at the end). Slot: first slot of the breaker; Ph: phases it takes ('3ph' for
a 3-pole breaker); Load: as the schedule gives it; PF: power factor ('ld'
leading); Amps: the engine's true-RMS line current of the circuit; Brkr: the
breaker rating; Flags: 'cont' a continuous load (counted at 125 % for
sizing), 'lock' the rebalancer will not move it ('c+lk' both). Wiring (on
panels that use it): 'spare' nothing connected, '+N legs' a breaker with
a neutral and one load per leg, 'Δ legs' one load per pair of poles,
'N:N23' a breaker on shared neutral N23, 'RCD R1' behind an RCD; the status
line says the rest (each leg, the group's other breakers, handle ties, the
high leg). Wider
terminals show poles, both flags in words and the note. The name takes the
width left over; names that would read alike are cut in the middle so what
tells them apart stays, and the status line gives the selected circuit in
full."""

WIDE_AT = 110
SCROLLBAR = 2


@dataclass(frozen=True)
class Column:
    """One column: key, header, width [cells], right-justified."""

    key: str
    label: str
    width: int
    right: bool = False


def columns_for(
    width: int,
    slots: bool,
    long_labels: bool,
    profile_w: int,
    leading: bool = False,
    longest_name: int = 40,
    wiring: bool = False,
) -> list[Column]:
    """The columns at a terminal ``width`` [cells]; the name (and note) take what is left.

    On a wide terminal the name gets what its longest needs (the note keeps at
    least 12 cells), and the note the rest. ``wiring`` adds the *Wiring*
    column (a panel with a high leg, neutrals, legs, shared neutrals, spares
    or RCDs).
    """
    wide = width >= WIDE_AT
    ph = 5 if long_labels else 3
    cols = [Column("slot", "Slot" if slots else "No.", 4, True), Column("name", "Circuit", 0)]
    if wide:
        cols.append(Column("poles", "P", 1))
    cols += [
        Column("phases", "Ph", ph),
        Column("load", "Load", 8, True),
        Column("pf", "PF", 6 if leading else 4, True),
        Column("profile", "Profile", profile_w),
        Column("amps", "Amps", 6, True),
        Column("breaker", "Brkr", 4, True),
    ]
    if wiring:
        cols.append(Column("wiring", "Wiring", 14 if wide else 7))
    if wide:
        cols += [Column("cont", "Cont", 4), Column("lock", "Lock", 4), Column("note", "Note", 0)]
    else:
        cols.append(Column("flags", "Flag", 4))
    fixed = sum(c.width + 1 for c in cols) + 1 + SCROLLBAR
    spare = max(width - fixed, 0)
    if wide:
        name_w = max(min(longest_name, spare - 13), 16)
        note_w = max(spare - name_w - 1, 8)
    else:
        name_w, note_w = max(spare, 12), 0
    out = []
    for c in cols:
        if c.key == "name":
            c = Column("name", c.label, name_w)
        elif c.key == "note":
            c = Column("note", c.label, note_w)
        out.append(c)
    return out


def display_order(schedule: Schedule) -> list[int]:
    """Circuit indices in the order a panel directory lists them."""

    def key(i: int) -> tuple[int, int, int]:
        c = schedule.circuits[i]
        if c.slot is not None:
            return (0, c.slot, i)
        if c.phases is not None:
            return (1, min(c.phases) * 10 + len(c.phases), i)
        return (2, 0, i)

    return sorted(range(len(schedule.circuits)), key=key)


def _padded(col: Column, value: str, first: bool) -> str:
    """A cell's text padded by hand (one space after it, one before the first column)."""
    value = fmt.shorten(value, col.width)
    padded = value.rjust(col.width) if col.right else value.ljust(col.width)
    return (" " if first else "") + padded + " "


def _cell(col: Column, value: str, first: bool) -> Text:
    return _text(_padded(col, value, first))


def _text(padded: str) -> Text:
    return Text(padded, no_wrap=True, overflow="crop", justify="left")


def profile_text(c: Circuit) -> str:
    """The profile, ``→FILE`` for a feeder (the panel it feeds), ``-`` for a spare."""
    if c.feed is not None:
        return "→" + c.feed.path
    return "-" if c.spare else c.profile


def flags_text(c: Circuit) -> str:
    """``"cont"``, ``"lock"``, ``"c+lk"`` (both) or ``""``."""
    if c.continuous and c.locked:
        return "c+lk"
    return "cont" if c.continuous else ("lock" if c.locked else "")


class CircuitTable(DataTable[Any]):
    """Circuits of the schedule; ``current_index`` is the circuit under the cursor."""

    DEFAULT_CSS = """
    CircuitTable { height: 1fr; }
    """
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("home,g,ctrl+home", "first", "First", show=False),
        Binding("end,G,ctrl+end", "last", "Last", show=False),
    ]

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(cursor_type="row", zebra_stripes=True, cell_padding=0, **kwargs)
        self._order: list[int] = []
        self._rows: list[tuple[str, ...]] = []
        self._shape: tuple[Any, ...] | None = None
        self.columns_shown: list[Column] = []

    def _set_columns(self, schedule: Schedule) -> None:
        width = self.size.width or 80
        profiles = [c.profile for c in schedule.circuits] or ["linear"]
        profile_w = min(max(len(p) for p in profiles), 10 if width < WIDE_AT else 18)
        profile_w = max(profile_w, len("Profile"))
        long_labels = any(len(x) > 1 for x in schedule.labels)
        leading = any(c.leading and c.pf < 0.9995 for c in schedule.circuits)
        longest = max((len(c.name) for c in schedule.circuits), default=10)
        wiring = uses_wiring(schedule)
        slots = schedule.panel.uses_slots
        shape = (width, slots, long_labels, profile_w, leading, longest, wiring)
        if self._shape == shape:
            return
        self.clear(columns=True)
        self.columns_shown = columns_for(
            width, slots, long_labels, profile_w, leading, longest, wiring
        )
        for k, c in enumerate(self.columns_shown):
            self.add_column(_cell(c, c.label, k == 0), width=c.width + 1 + (k == 0), key=c.key)
        self._shape = shape

    def _cells(
        self, c: Circuit, i: int, schedule: Schedule, analysis: Any, name: str, note: str
    ) -> tuple[str, ...]:
        amps = "…"
        if analysis is not None:
            try:
                amps = fmt.num(analysis.circuit_rms_a[i]) if c.is_placed else "-"
            except (AttributeError, IndexError):
                amps = "?"
        if schedule.panel.uses_slots or not c.is_placed:
            place = fmt.place_text(c, schedule)
        else:
            place = str(i + 1)
        phases = "3ph" if c.poles == 3 and c.is_placed else schedule.phase_text(c.phases)
        values = {
            "slot": place,
            "name": name,
            "poles": str(c.poles),
            "phases": phases,
            "load": fmt.load_text(c),
            "pf": fmt.pf_text(c),
            "profile": fmt.shorten(profile_text(c), self._width("profile")),
            "amps": amps,
            "breaker": fmt.breaker_text(c),
            "cont": "yes" if c.continuous else "",
            "lock": "lock" if c.locked else "",
            "flags": flags_text(c),
            "wiring": short_wiring(c, schedule) if "wiring" in self._keys else "",
            "note": note,
        }
        return tuple(
            _padded(col, values[col.key], k == 0) for k, col in enumerate(self.columns_shown)
        )

    @property
    def _keys(self) -> set[str]:
        return {c.key for c in self.columns_shown}

    def _width(self, key: str) -> int:
        return next((c.width for c in self.columns_shown if c.key == key), 10)

    def show(self, schedule: Schedule, analysis: Any, keep_index: int | None = None) -> None:
        """Redraw the rows; keep the cursor on circuit ``keep_index`` (default: same circuit).

        Rows are keyed by position, not by circuit: an edit replaces only the
        cells whose text changed and adds or removes rows at the end, so the
        table never measures every cell again (what a rebuild costs).
        """
        if keep_index is None:
            keep_index = self.current_index
        row_before = self.cursor_row
        shape = self._shape
        self._set_columns(schedule)
        order = display_order(schedule)
        names = fmt.fit_names([schedule.circuits[i].name for i in order], self._width("name"))
        note_w = self._width("note")
        rows = []
        for i, name in zip(order, names, strict=True):
            c = schedule.circuits[i]
            note = fmt.shorten(c.note, note_w)
            rows.append(self._cells(c, i, schedule, analysis, name, note))
        if shape != self._shape or not self._rows:
            self.clear()
            for r, cells in enumerate(rows):
                self.add_row(*(_text(x) for x in cells), key=f"r{r}")
        else:
            self._update_rows(rows)
        self._order, self._rows = order, rows
        if not self._order:
            return
        if keep_index is not None and keep_index in self._order:
            row = self._order.index(keep_index)
        else:
            row = min(max(row_before, 0), len(self._order) - 1)
        self.move_cursor(row=row, animate=False)

    def _update_rows(self, rows: list[tuple[str, ...]]) -> None:
        keys = [c.key for c in self.columns_shown]
        old = self._rows
        for r, (before, after) in enumerate(zip(old, rows, strict=False)):
            if before != after:
                for key, a, b in zip(keys, before, after, strict=True):
                    if a != b:
                        self.update_cell(f"r{r}", key, _text(b))
        for r in range(len(rows), len(old)):
            self.remove_row(f"r{r}")
        for r in range(len(old), len(rows)):
            self.add_row(*(_text(x) for x in rows[r]), key=f"r{r}")

    @property
    def current_index(self) -> int | None:
        """Index in ``schedule.circuits`` of the circuit under the cursor."""
        if not self._order or self.cursor_row < 0 or self.cursor_row >= len(self._order):
            return None
        return self._order[self.cursor_row]

    def select_index(self, index: int) -> None:
        """Put the cursor on circuit ``index`` (when it is listed)."""
        if index in self._order:
            self.move_cursor(row=self._order.index(index), animate=False)

    class Navigated(Message):
        """The user moved the cursor (a key), as opposed to a redraw keeping it in place."""

    def _navigated(self) -> None:
        self.post_message(self.Navigated())

    def action_first(self) -> None:
        self.move_cursor(row=0, animate=False)
        self._navigated()

    def action_last(self) -> None:
        self.move_cursor(row=max(len(self._order) - 1, 0), animate=False)
        self._navigated()

    def action_cursor_up(self) -> None:
        super().action_cursor_up()
        self._navigated()

    def action_cursor_down(self) -> None:
        super().action_cursor_down()
        self._navigated()

    def action_page_up(self) -> None:
        super().action_page_up()
        self._navigated()

    def action_page_down(self) -> None:
        super().action_page_down()
        self._navigated()

    def on_resize(self) -> None:
        if self._shape is not None and self.size.width != self._shape[0]:
            self.app.call_later(self._rebuild_for_width)

    def _rebuild_for_width(self) -> None:
        refresh = getattr(self.screen, "refresh_view", None)
        if refresh is not None:
            refresh()
