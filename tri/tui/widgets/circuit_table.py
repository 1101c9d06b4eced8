"""The schedule as a table: one row per circuit, sorted by slot."""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.widgets import DataTable

from tri.schedule.model import Circuit, Schedule
from tri.tui import fmt

HELP = """\
The schedule, one row per breaker, in slot order (new circuits, not yet
placed, at the end). Slot: first slot of the breaker; P: poles; Ph: phases
it takes; Load: as the schedule gives it; PF: power factor ('ld' leading);
Amps: the engine's true-RMS line current of the circuit; Lock: the
rebalancer will not move it."""

# (key, label, width, wide only)
COLUMNS: tuple[tuple[str, str, int, bool], ...] = (
    ("slot", "Slot", 4, False),
    ("name", "Circuit", 17, False),
    ("poles", "P", 1, False),
    ("phases", "Ph", 3, False),
    ("load", "Load", 8, False),
    ("pf", "PF", 4, False),
    ("profile", "Profile", 11, False),
    ("amps", "Amps", 6, False),
    ("lock", "Lock", 4, False),
    ("breaker", "Brkr", 5, True),
    ("cont", "Cont", 4, True),
    ("note", "Note", 20, True),
)
WIDE_AT = 110


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


class CircuitTable(DataTable[Any]):
    """Circuits of the schedule; ``current_index`` is the circuit under the cursor."""

    DEFAULT_CSS = """
    CircuitTable { height: 1fr; }
    """

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(cursor_type="row", zebra_stripes=True, cell_padding=1, **kwargs)
        self._order: list[int] = []
        self._wide: bool | None = None
        self._shape: tuple[bool, bool, bool] | None = None
        self.name_width = 17

    def _columns_for(self, wide: bool, schedule: Schedule) -> None:
        slots = schedule.panel.uses_slots
        long_labels = any(len(x) > 1 for x in schedule.labels)
        shape = (wide, slots, long_labels)
        if self._shape == shape:
            return
        self.clear(columns=True)
        self.name_width = (26 if wide else 17) - (2 if long_labels else 0)
        for key, label, width, wide_only in COLUMNS:
            if wide_only and not wide:
                continue
            w = width
            if key == "name":
                w = self.name_width
            elif key == "phases" and long_labels:
                w = 5
            elif key == "slot" and not slots:
                label = "No."
            self.add_column(label, width=w, key=key)
        self._wide = wide
        self._shape = shape

    def _cells(
        self, c: Circuit, i: int, schedule: Schedule, analysis: Any, wide: bool
    ) -> list[Any]:
        amps = "…"
        if analysis is not None:
            try:
                amps = f"{analysis.circuit_rms_a[i]:.1f}" if c.is_placed else "-"
            except (AttributeError, IndexError):
                amps = "?"
        name_width = self.name_width
        name = c.name if len(c.name) <= name_width else c.name[: name_width - 1] + "…"
        if schedule.panel.uses_slots or not c.is_placed:
            place = fmt.place_text(c, schedule)
        else:
            place = str(i + 1)
        phases = "3ph" if c.poles == 3 and c.is_placed else schedule.phase_text(c.phases)
        cells: list[Any] = [
            Text(place, justify="right"),
            Text(name),
            str(c.poles),
            phases,
            Text(fmt.load_text(c), justify="right"),
            Text(fmt.pf_text(c), justify="right"),
            Text(c.profile[:11]),
            Text(amps, justify="right"),
            "lock" if c.locked else "",
        ]
        if wide:
            cells += [
                Text("-" if c.breaker_a is None else f"{c.breaker_a:g} A", justify="right"),
                "yes" if c.continuous else "",
                Text(c.note),
            ]
        return cells

    def show(self, schedule: Schedule, analysis: Any, keep_index: int | None = None) -> None:
        """Rebuild the rows; keep the cursor on circuit ``keep_index`` (default: same circuit)."""
        wide = self.size.width >= WIDE_AT if self.size.width else False
        if keep_index is None:
            keep_index = self.current_index
        row_before = self.cursor_row
        self._columns_for(wide, schedule)
        self.clear()
        self._order = display_order(schedule)
        for i in self._order:
            c = schedule.circuits[i]
            self.add_row(*self._cells(c, i, schedule, analysis, wide), key=str(i))
        if not self._order:
            return
        if keep_index is not None and keep_index in self._order:
            row = self._order.index(keep_index)
        else:
            row = min(max(row_before, 0), len(self._order) - 1)
        self.move_cursor(row=row, animate=False)

    @property
    def current_index(self) -> int | None:
        """Index in ``schedule.circuits`` of the circuit under the cursor."""
        if not self._order or self.cursor_row < 0 or self.cursor_row >= len(self._order):
            return None
        return self._order[self.cursor_row]

    def on_resize(self) -> None:
        wide = self.size.width >= WIDE_AT
        if self._wide is not None and wide != self._wide:
            self.app.call_later(self._rebuild_for_width)

    def _rebuild_for_width(self) -> None:
        screen = self.screen
        refresh = getattr(screen, "refresh_view", None)
        if refresh is not None:
            refresh()
