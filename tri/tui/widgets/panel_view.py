"""The panel as it is built: every position, every pole, spaces; moves picked on it.

Two-column panels show their two columns side by side, slot numbers at the
outer edges and the phase of each row in the middle where the bus runs;
every position names the breaker that sits there, a multi-pole breaker's
poles joined by a bracket (┌ first pole, │ │ └ the ones it continues onto,
with "pole 2" where the rating would be). Rail boards show their circuits
grouped by phase. Circuits not yet placed follow, so they can be placed.

The widget only draws and moves its cursor; the main screen decides what a
key does (edit, move, add) and what the status line says.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, ClassVar

from rich.style import Style
from rich.text import Text
from textual.binding import Binding, BindingType
from textual.geometry import Region, Size
from textual.message import Message
from textual.scroll_view import ScrollView
from textual.strip import Strip

from tri.schedule.model import Schedule
from tri.schedule.slots import occupied_slots
from tri.tui import fmt
from tri.tui.panel_layout import (
    Position,
    is_spare,
    rail_groups,
    rail_target,
    two_column_rows,
    unplaced,
)

WIDE_AT = 110
RAIL_INFO = 22  #: phases 6, rating 5, flags 2, gap 1, amps 8
RAIL_LEAD = 4  #: indent, mark, gap
BRACKET = {(1, 1): " ", (1, 2): "┌", (2, 2): "└", (1, 3): "┌", (2, 3): "│", (3, 3): "└"}


@dataclass(frozen=True)
class Cell:
    """Something the cursor can stand on.

    ``kind`` is ``"slot"`` (a position of a two-column panel), ``"group"``
    (a phase of a rail board), ``"member"`` (a circuit under a phase) or
    ``"new"`` (a circuit not placed yet).
    """

    kind: str
    position: Position | None = None
    circuit: int | None = None
    phase: int | None = None


@dataclass(frozen=True)
class Line:
    """One line of the view: its cells (two on a two-column row) or a heading."""

    cells: tuple[Cell, ...] = ()
    heading: str = ""


def build_lines(schedule: Schedule) -> list[Line]:
    """The view's lines for ``schedule`` (headings are not selectable)."""
    lines: list[Line] = []
    if schedule.panel.uses_slots:
        for left, right in two_column_rows(schedule):
            cells = [Cell("slot", left, left.circuit, left.phase)]
            if right is not None:
                cells.append(Cell("slot", right, right.circuit, right.phase))
            lines.append(Line(tuple(cells)))
    else:
        for phase, members in rail_groups(schedule):
            lines.append(Line((Cell("group", phase=phase),)))
            for p in members:
                lines.append(Line((Cell("member", p, p.circuit, phase),)))
    new = unplaced(schedule)
    if new:
        lines.append(Line(heading="Not placed yet (m places one; left out of the figures)"))
        lines += [Line((Cell("new", circuit=i),)) for i in new]
    return lines


class PanelView(ScrollView, can_focus=True):
    """The physical panel; ``current`` is the cell under the cursor."""

    DEFAULT_CSS = """
    PanelView { height: 1fr; overflow-x: hidden; }
    """
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("down,j", "step(1)", "Down", show=False),
        Binding("up,k", "step(-1)", "Up", show=False),
        Binding("right", "side(1)", "Right column", show=False),
        Binding("left", "side(-1)", "Left column", show=False),
        Binding("pagedown", "page(1)", "Page down", show=False),
        Binding("pageup", "page(-1)", "Page up", show=False),
        Binding("home,g,ctrl+home", "edge(0)", "First", show=False),
        Binding("end,G,ctrl+end", "edge(1)", "Last", show=False),
        Binding("enter", "choose", "Choose", show=False),
    ]

    class CursorMoved(Message):
        """The cursor stands on a new cell."""

        def __init__(self, cell: Cell | None) -> None:
            self.cell = cell
            super().__init__()

    class Chosen(Message):
        """Enter on a cell."""

        def __init__(self, cell: Cell | None) -> None:
            self.cell = cell
            super().__init__()

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.schedule: Schedule | None = None
        self.analysis: Any = None
        self.lines: list[Line] = []
        self.row = 0
        self.side = 0
        self.picking: int | None = None
        self.names: dict[int, str] = {}

    # ------------------------------------------------------------ data

    def show(self, schedule: Schedule, analysis: Any, keep_index: int | None = None) -> None:
        """Redraw for ``schedule``; keep the cursor on circuit ``keep_index`` or the same place."""
        before = self.current
        self.schedule, self.analysis = schedule, analysis
        self.lines = build_lines(schedule)
        self._fit_names()
        self.virtual_size = Size(0, len(self.lines) + 1)
        if keep_index is not None and self.select_index(keep_index):
            return
        slot = before.position.slot if before is not None and before.position else None
        if (
            slot is not None
            and before is not None
            and before.kind == "slot"
            and self.select_slot(slot)
        ):
            return
        self.row = min(self.row, max(len(self.lines) - 1, 0))
        self._settle(1)
        self.refresh()

    def _info_width(self) -> int:
        return 12 if self._wide() else 6

    def _name_width(self) -> int:
        """Cells for a name in one column: the half less slot, bracket, rating and gaps."""
        return max(self._half() - 3 - 1 - 1 - 1 - self._info_width() - 1, 8)

    def _content_width(self) -> int:
        return self.scrollable_content_region.width or self.size.width

    def _fit_names(self) -> None:
        s = self.schedule
        if s is None:
            return
        width = self._name_width() if s.panel.uses_slots else self._rail_name_width()
        names = [c.name for c in s.circuits]
        self.names = dict(enumerate(fmt.fit_names(names, width)))

    def _wide(self) -> bool:
        return self.size.width >= WIDE_AT

    def _half(self) -> int:
        return max((self._content_width() - 5) // 2, 20)

    def _rail_name_width(self) -> int:
        return max(self._content_width() - RAIL_LEAD - RAIL_INFO - 2, 8)

    def on_resize(self) -> None:
        if self.schedule is not None:
            self._fit_names()
            self.virtual_size = Size(0, len(self.lines) + 1)
            self.refresh()

    # ------------------------------------------------------------ cursor

    @property
    def current(self) -> Cell | None:
        """The cell under the cursor."""
        if not self.lines or not 0 <= self.row < len(self.lines):
            return None
        cells = self.lines[self.row].cells
        if not cells:
            return None
        return cells[min(self.side, len(cells) - 1)]

    @property
    def current_index(self) -> int | None:
        """Index in ``schedule.circuits`` of the breaker under the cursor (None on a space)."""
        cell = self.current
        return None if cell is None else cell.circuit

    def _settle(self, step: int) -> None:
        """Move off headings, in the direction of ``step``."""
        n = len(self.lines)
        while 0 <= self.row < n and not self.lines[self.row].cells:
            self.row += 1 if step >= 0 else -1
        if not 0 <= self.row < n:
            self.row = max(min(self.row, n - 1), 0)
            while 0 <= self.row < n and not self.lines[self.row].cells:
                self.row += -1 if step >= 0 else 1

    def _moved(self, notify: bool = True) -> None:
        if self.lines:
            self.scroll_to_region(
                Region(0, self.row, max(self.size.width, 1), 2), animate=False, force=True
            )
        self.refresh()
        if notify:
            self.post_message(self.CursorMoved(self.current))

    def select_index(self, index: int) -> bool:
        """Put the cursor on circuit ``index`` (its first pole); False when it is not shown."""
        for r, line in enumerate(self.lines):
            for k, cell in enumerate(line.cells):
                first = cell.position is None or cell.position.pole <= 1
                if cell.circuit == index and first and cell.kind != "group":
                    self.row, self.side = r, k
                    self._moved(notify=False)
                    return True
        return False

    def select_slot(self, slot: int) -> bool:
        """Put the cursor on position ``slot``."""
        for r, line in enumerate(self.lines):
            for k, cell in enumerate(line.cells):
                if cell.kind == "slot" and cell.position and cell.position.slot == slot:
                    self.row, self.side = r, k
                    self._moved(notify=False)
                    return True
        return False

    def action_step(self, step: int) -> None:
        if not self.lines:
            return
        row = self.row + step
        while 0 <= row < len(self.lines) and not self.lines[row].cells:
            row += step
        if 0 <= row < len(self.lines):
            self.row = row
            self._moved()

    def action_side(self, step: int) -> None:
        cell = self.current
        if cell is not None and cell.kind == "slot":
            width = len(self.lines[self.row].cells)
            self.side = min(max(self.side + step, 0), width - 1)
        elif self.lines:  # rail board: ← → jump between the phase groups
            r = self.row + step
            while 0 <= r < len(self.lines):
                cells = self.lines[r].cells
                if cells and cells[0].kind in ("group",):
                    self.row = r
                    break
                r += step
        self._moved()

    def action_page(self, step: int) -> None:
        self.row = min(max(self.row + step * max(self.size.height - 2, 1), 0), len(self.lines) - 1)
        self._settle(step)
        self._moved()

    def action_edge(self, end: int) -> None:
        self.row = len(self.lines) - 1 if end else 0
        self._settle(-1 if end else 1)
        self._moved()

    def action_choose(self) -> None:
        self.post_message(self.Chosen(self.current))

    # ------------------------------------------------------------ picking a target

    def pick_target(self) -> Any:
        """Where the breaker being moved would go from the cursor: a slot, phases, or None."""
        s, cell = self.schedule, self.current
        if self.picking is None or s is None or cell is None:
            return None
        if cell.kind == "slot" and cell.position is not None:
            return cell.position.slot
        if cell.kind in ("group", "member") and cell.phase is not None:
            return rail_target(s.circuits[self.picking], cell.phase)
        return None

    def _target_slots(self) -> set[int]:
        s = self.schedule
        target = self.pick_target()
        if s is None or self.picking is None or not isinstance(target, int):
            return set()
        return set(occupied_slots(target, s.circuits[self.picking].poles))

    # ------------------------------------------------------------ drawing

    def render_line(self, y: int) -> Strip:
        width = self._content_width()
        if y == 0:
            return self._strip(self._header(), width, Style(bold=True, underline=True))
        r = self.scroll_offset.y + y - 1
        if not 0 <= r < len(self.lines) or self.schedule is None:
            return Strip.blank(width)
        line = self.lines[r]
        if line.heading:
            return self._strip(Text(" " + line.heading, style="bold"), width)
        targets = self._target_slots()
        if line.cells[0].kind == "slot":
            text = self._row_text(line, r, targets)
        else:
            text = self._rail_text(line.cells[0], r)
        return self._strip(text, width)

    def _strip(self, text: Text, width: int, style: Style | None = None) -> Strip:
        segments = list(text.render(self.app.console))
        segments = [s for s in segments if s.text != "\n"]
        strip = Strip(segments).adjust_cell_length(width)
        return strip.apply_style(style) if style else strip

    def _header(self) -> Text:
        s = self.schedule
        if s is None:
            return Text("")
        if not s.panel.uses_slots:
            name_w = self._rail_name_width()
            return Text(f"{'':{RAIL_LEAD}}{'Circuit, under each phase it takes':<{name_w}} "
                        f"{'Ph':<6} Brkr        Amps")  # fmt: skip
        half = self._half()
        info = "Brkr  Amps" if self._wide() else "Brkr"
        left = f"{'#':>3}  {'Circuit':<{half - 5 - len(info) - 1}}{info:>{len(info)}} "
        right = f" {info:<{len(info)}} {'Circuit':<{half - 5 - len(info) - 1}} {'#':<3}"
        return Text(left[:half].ljust(half) + " Ph  " + right[:half])

    def _info(self, pos: Position, circuit: Any) -> str:
        if pos.continues:
            return f"pole {pos.pole} of {pos.poles}" if self._wide() else f"pole {pos.pole}"
        flags = ("*" if circuit.continuous else " ") + ("#" if circuit.locked else " ")
        brk = fmt.breaker_text(circuit)
        if not self._wide():
            return f"{brk:>4}{flags}"
        amps = "…"
        if self.analysis is not None:
            try:
                amps = fmt.num(self.analysis.circuit_rms_a[pos.circuit])
            except (AttributeError, IndexError, TypeError):
                amps = "?"
        return f"{brk:>4}{flags}{amps:>6}"

    def _cell_text(self, cell: Cell, right: bool, targets: set[int]) -> tuple[str, str]:
        """(text, style) of one position, ``half`` cells wide."""
        s = self.schedule
        assert s is not None and cell.position is not None
        pos, half = cell.position, self._half()
        info_w, name_w = self._info_width(), self._name_width()
        style = ""
        if pos.slot in targets and self.picking is not None:
            moving = s.circuits[self.picking]
            if pos.circuit is None or pos.circuit == self.picking:
                mark, name, info = "→", moving.name, "free"
            else:
                mark, name, info = "✗", "taken: " + s.circuits[pos.circuit].name, "taken"
            style = "reverse bold"
        elif pos.circuit is None:
            mark, name, info, style = " ", "· space", "", "dim"
        else:
            c = s.circuits[pos.circuit]
            mark = BRACKET.get((pos.pole, pos.poles), "│")
            name = "spare" if is_spare(c) else self.names.get(pos.circuit, c.name)
            info = self._info(pos, c)
            if pos.continues:
                style = "italic"
            if self.picking == pos.circuit:
                mark, style = "◆", "dim"
        name = fmt.shorten(name, name_w)
        if right:
            text = f" {info:<{info_w}} {mark}{name:<{name_w}} {pos.slot:<3}"
        else:
            text = f"{pos.slot:>3} {mark}{name:<{name_w}} {info:>{info_w}} "
        return text[:half].ljust(half), style

    def _row_text(self, line: Line, r: int, targets: set[int]) -> Text:
        s = self.schedule
        assert s is not None
        half = self._half()
        cur = self.current
        same = cur.circuit if cur is not None and self.picking is None else None
        t = Text()
        labels = []
        for k, cell in enumerate(line.cells):
            text, style = self._cell_text(cell, right=k == 1, targets=targets)
            if r == self.row and k == min(self.side, len(line.cells) - 1):
                style = (style + " reverse").strip() if "reverse" not in style else "bold"
            elif same is not None and cell.circuit == same:
                style = (style + " bold underline").strip()
            if k == 1:
                t.append(f"{labels[0]:>2}│{s.labels[cell.phase or 0]:<2}", style="bold")
            labels.append(s.labels[cell.phase or 0])
            t.append(text, style=style)
        if len(line.cells) == 1:
            t.append(f"{labels[0]:>2}│  ", style="bold")
            t.append(" " * half)
        return t

    def _rail_text(self, cell: Cell, r: int) -> Text:
        s = self.schedule
        assert s is not None
        width = self._content_width()
        selected = r == self.row
        if cell.kind == "group":
            phase = cell.phase or 0
            count = sum(1 for c in s.circuits if c.phases is not None and phase in c.phases)
            figure = ""
            if self.analysis is not None:
                figure = f" · {fmt.amps(self.analysis.phases[phase].rms_a)} RMS"
            text = f"── {s.labels[phase]}{figure} · {count} on this phase "
            if self.picking is not None and selected:
                target = self.pick_target()
                where = "no other place" if target is None else s.phase_text(target)
                text = f"── {s.labels[phase]} → move here: {where} "
            style = "bold reverse" if selected else "bold"
            return Text(text.ljust(width, "─")[:width], style=style)
        i = cell.circuit
        assert i is not None
        c = s.circuits[i]
        pos = cell.position
        continues = pos is not None and pos.continues
        if cell.kind == "new":
            mark, where = " ", "new"
        else:
            mark = "╌" if continues else "─"
            where = "3ph" if c.poles == 3 else s.phase_text(c.phases)
        flags = ("*" if c.continuous else " ") + ("#" if c.locked else " ")
        amps = ""
        if continues and pos is not None:
            amps = f"pole {pos.pole}"
        elif self.analysis is not None and c.is_placed:
            try:
                amps = fmt.amps(self.analysis.circuit_rms_a[i])
            except (AttributeError, IndexError, TypeError):
                amps = "?"
        info = f"{where:<6}{fmt.breaker_text(c):>5}{flags} {amps:>8}"
        name_w = self._rail_name_width()
        name = fmt.shorten(self.names.get(i, c.name), name_w)
        text = f"  {mark} {name:<{name_w}} {info}"
        style = "italic" if continues else ""
        if self.picking == i:
            style = "dim"
        if selected:
            style = "reverse bold"
        return Text(text[:width].ljust(width), style=style)
