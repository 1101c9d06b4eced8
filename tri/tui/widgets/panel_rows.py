"""The lines of the panel view as text: positions, poles, spaces, phase groups (no textual).

:func:`build_lines` lays the schedule out (from :mod:`tri.tui.panel_layout`);
a :class:`Frame` holds what one drawing needs (schedule, engine result,
fitted names, width, cursor, the breaker being moved) and its methods turn
one line into styled text. Styles are bold, dim, italic, underline and
reverse only, so the view reads the same in every theme, 16 colours
included.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from rich.text import Text

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
#: A breaker with a neutral (one load per leg to neutral) joins its poles with double lines.
NEUTRAL_BRACKET = {(1, 2): "╓", (2, 2): "╙", (1, 3): "╓", (2, 3): "║", (3, 3): "╙"}
#: The high leg's letter in the bus column is marked, so the row reads "▲B│B▲".
HIGH_MARK = "▲"


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


@dataclass
class Frame:
    """What drawing the view needs: the data, the width [cells], the cursor, the move."""

    schedule: Schedule
    analysis: Any
    lines: list[Line]
    width: int
    names: dict[int, str] = field(default_factory=dict)
    row: int = 0
    side: int = 0
    picking: int | None = None
    groups: dict[int, str] = field(default_factory=dict)  #: shared-neutral brackets

    # ------------------------------------------------------------ geometry

    @property
    def wide(self) -> bool:
        """Room for amperes and "pole 2 of 3"."""
        return self.width >= WIDE_AT - 2

    @property
    def half(self) -> int:
        """Cells of one column of a two-column panel (the bus takes 5 in the middle)."""
        return max((self.width - 5) // 2, 20)

    @property
    def info_width(self) -> int:
        return 12 if self.wide else 6

    @property
    def name_width(self) -> int:
        """Cells for a name in one column: the half less slot, bracket, rating and gaps."""
        return max(self.half - 3 - 1 - 1 - 1 - self.info_width - 1, 8)

    @property
    def rail_name_width(self) -> int:
        return max(self.width - RAIL_LEAD - RAIL_INFO - 2, 8)

    def name_room(self) -> int:
        """Cells a name gets in this layout (for fitting names apart)."""
        return self.name_width if self.schedule.panel.uses_slots else self.rail_name_width

    # ------------------------------------------------------------ the move

    @property
    def current(self) -> Cell | None:
        """The cell under the cursor."""
        if not 0 <= self.row < len(self.lines) or not self.lines[self.row].cells:
            return None
        cells = self.lines[self.row].cells
        return cells[min(self.side, len(cells) - 1)]

    def pick_target(self) -> Any:
        """Where the breaker being moved would go from the cursor: a slot, phases, or None."""
        cell = self.current
        if self.picking is None or cell is None:
            return None
        if cell.kind == "slot" and cell.position is not None:
            return cell.position.slot
        if cell.kind in ("group", "member") and cell.phase is not None:
            return rail_target(self.schedule.circuits[self.picking], cell.phase)
        return None

    def target_slots(self) -> set[int]:
        target = self.pick_target()
        if self.picking is None or not isinstance(target, int):
            return set()
        return set(occupied_slots(target, self.schedule.circuits[self.picking].poles))

    # ------------------------------------------------------------ text

    def line_text(self, r: int) -> Text:
        """Line ``r`` of the view."""
        line = self.lines[r]
        if line.heading:
            return Text(" " + line.heading, style="bold")
        if line.cells[0].kind == "slot":
            return self._row_text(line, r, self.target_slots())
        return self._rail_text(line.cells[0], r)

    def header(self) -> Text:
        s = self.schedule
        if not s.panel.uses_slots:
            name_w = self.rail_name_width
            return Text(f"{'':{RAIL_LEAD}}{'Circuit, under each phase it takes':<{name_w}} "
                        f"{'Ph':<6} Brkr        Amps")  # fmt: skip
        half = self.half
        info = "Brkr  Amps" if self.wide else "Brkr"
        left = f"{'#':>3}  {'Circuit':<{half - 5 - len(info) - 1}}{info:>{len(info)}} "
        right = f" {info:<{len(info)}} {'Circuit':<{half - 5 - len(info) - 1}} {'#':<3}"
        return Text(left[:half].ljust(half) + " Ph  " + right[:half])

    def _info(self, pos: Position, circuit: Any) -> str:
        if pos.continues:
            return f"pole {pos.pole} of {pos.poles}" if self.wide else f"pole {pos.pole}"
        flags = ("*" if circuit.continuous else " ") + ("#" if circuit.locked else " ")
        brk = fmt.breaker_text(circuit)
        if not self.wide:
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
        assert cell.position is not None
        pos, half = cell.position, self.half
        info_w, name_w = self.info_width, self.name_width
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
            joins = NEUTRAL_BRACKET if c.neutral and c.poles > 1 else BRACKET
            mark = self.groups.get(pos.circuit) or joins.get((pos.pole, pos.poles), "│")
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
        half = self.half
        cur = self.current
        same = cur.circuit if cur is not None and self.picking is None else None
        t = Text()
        labels: list[str] = []
        for k, cell in enumerate(line.cells):
            text, style = self._cell_text(cell, right=k == 1, targets=targets)
            if r == self.row and k == min(self.side, len(line.cells) - 1):
                style = (style + " reverse").strip() if "reverse" not in style else "bold"
            elif same is not None and cell.circuit == same:
                style = (style + " bold underline").strip()
            if k == 1:
                t.append(f"{labels[0]:>2}│{self._bus(cell.phase, right=True):<2}", style="bold")
            labels.append(self._bus(cell.phase, right=False))
            t.append(text, style=style)
        if len(line.cells) == 1:
            t.append(f"{labels[0]:>2}│  ", style="bold")
            t.append(" " * half)
        return t

    def _bus(self, phase: int | None, right: bool) -> str:
        """The phase letter of one side of the bus column, the high leg marked ``▲``."""
        label = self.schedule.labels[phase or 0]
        if phase is not None and phase == self.schedule.panel.effective_high_leg:
            return label + HIGH_MARK if right else HIGH_MARK + label
        return label

    def _rail_text(self, cell: Cell, r: int) -> Text:
        s = self.schedule
        width = self.width
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
        name_w = self.rail_name_width
        # A circuit not placed yet has the whole line on a two-column panel.
        fitted = c.name if cell.kind == "new" else self.names.get(i, c.name)
        name = fmt.shorten(fitted, name_w)
        text = f"  {mark} {name:<{name_w}} {info}"
        style = "italic" if continues else ""
        if self.picking == i:
            style = "dim"
        if selected:
            style = "reverse bold"
        return Text(text[:width].ljust(width), style=style)
