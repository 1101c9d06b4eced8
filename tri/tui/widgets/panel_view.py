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

from typing import Any, ClassVar

from rich.style import Style
from rich.text import Text
from textual.binding import Binding, BindingType
from textual.geometry import Region, Size
from textual.message import Message
from textual.scroll_view import ScrollView
from textual.strip import Strip

from tri.schedule.model import Schedule
from tri.tui import fmt
from tri.tui.widgets.panel_rows import Cell, Frame, Line, build_lines
from tri.tui.wiring_words import group_brackets


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
        self.groups: dict[int, str] = {}

    # ------------------------------------------------------------ data

    def show(self, schedule: Schedule, analysis: Any, keep_index: int | None = None) -> None:
        """Redraw for ``schedule``; keep the cursor on circuit ``keep_index`` or the same place."""
        before = self.current
        self.schedule, self.analysis = schedule, analysis
        self.lines = build_lines(schedule)
        self.groups = group_brackets(schedule)
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

    def frame(self) -> Frame:
        """Everything one drawing needs, at the present width."""
        assert self.schedule is not None
        return Frame(
            self.schedule,
            self.analysis,
            self.lines,
            self.scrollable_content_region.width or self.size.width,
            self.names,
            self.row,
            self.side,
            self.picking,
            self.groups,
        )

    def _fit_names(self) -> None:
        if self.schedule is None:
            return
        width = self.frame().name_room()
        names = [c.name for c in self.schedule.circuits]
        self.names = dict(enumerate(fmt.fit_names(names, width)))

    def on_resize(self) -> None:
        if self.schedule is not None:
            self._fit_names()
            self.virtual_size = Size(0, len(self.lines) + 1)
            self.call_after_refresh(self.scroll_to_cursor)
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

    def scroll_to_cursor(self) -> None:
        """Scroll so the cursor's line shows under the heading (only once the view has a size)."""
        if self.lines and self.size.height > 2:
            self.scroll_to_region(
                Region(0, self.row, max(self.size.width, 1), 2), animate=False, force=True
            )

    def _moved(self, notify: bool = True) -> None:
        self.scroll_to_cursor()
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
        return None if self.schedule is None else self.frame().pick_target()

    # ------------------------------------------------------------ drawing

    def render_line(self, y: int) -> Strip:
        if self.schedule is None:
            return Strip.blank(self.size.width)
        frame = self.frame()
        if y == 0:
            return self._strip(frame.header(), frame.width, Style(bold=True, underline=True))
        r = self.scroll_offset.y + y - 1
        if not 0 <= r < len(self.lines):
            return Strip.blank(frame.width)
        return self._strip(frame.line_text(r), frame.width)

    def _strip(self, text: Text, width: int, style: Style | None = None) -> Strip:
        segments = [s for s in text.render(self.app.console) if s.text != "\n"]
        strip = Strip(segments).adjust_cell_length(width)
        return strip.apply_style(style) if style else strip
