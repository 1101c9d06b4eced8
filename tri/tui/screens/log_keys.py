"""The log view's keys: views, the time cursor, zoom, scroll, demand peaks, channels, levels,
and their words for the help screen (:data:`LOG_HELP`, :data:`LOG_KEY_WORDS`).

A mixin of :class:`~tri.tui.screens.log_view.LogScreen` (which holds the
log, its figures and the window shown). Moving and zooming only choose
which intervals are drawn; the figures are never recomputed here.
"""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.containers import VerticalScroll
from textual.widgets import Static

from tri.tui.log_plot import Window, column_range

VIEWS = ("current", "duration", "figures")

#: The help screen's paragraph on the log view.
LOG_HELP = """\
The log view reads the schedule's [log] file (a logger's CSV export) in the
background with a progress bar; Esc cancels, r reads it again. Current over
time: each phase and the neutral (dotted) as the average of the intervals
under each dot column; ▼ marks where each channel's highest demand window
starts (p jumps to them in turn); the dim dotted line is the rating. ← →
move the cursor (its time and values are written under the picture), + and
− zoom in and out around it, PgUp PgDn scroll, Home End go to the ends, 0
shows the whole log, 1 2 3 4 hide or show A, B, C and N. Duration: the
hours each current was exceeded (interval values); ↑↓ choose a current.
Figures: the report's own text (scenarios, log, demand, unbalance over
time, NEC 220.87 capacity with its 'not a basis' wording, log against
schedule). Every figure comes from the same functions as tri report."""

#: What each key of the log view does, for the help screen.
LOG_KEY_WORDS: dict[str, str] = {
    "cancel_or_back": "cancel reading, or back to the main view",
    "view(1)": "current over time, duration, figures",
    "zoom(1)": "zoom in around the cursor",
    "zoom(-1)": "zoom out",
    "peak": "jump to the next demand peak (A, B, C, N in turn)",
    "read": "read the log again",
    "view(-1)": "the previous view",
    "cursor(-1)": "cursor back in time (at the edge the picture scrolls)",
    "cursor(1)": "cursor on in time",
    "pan(-1)": "scroll back one screen",
    "pan(1)": "scroll on one screen",
    "edge(0)": "the start of the log (figures: the top)",
    "edge(1)": "the end of the log (figures: the end)",
    "whole": "the whole log",
    "level(1)": "duration: a higher current (figures: scroll up)",
    "level(-1)": "duration: a lower current (figures: scroll down)",
    "channel(0)": "hide or show the first phase",
    "channel(1)": "hide or show the second phase",
    "channel(2)": "hide or show the third phase",
    "channel(3)": "hide or show the neutral",
}


class LogChart(Static):
    """A picture drawn at the widget's own size by the screen's ``draw(cols, rows)``."""

    def __init__(self, draw: Any, **kwargs: Any) -> None:
        super().__init__("", **kwargs)
        self.draw = draw

    def render(self) -> Text:
        cols = self.content_size.width or 78
        rows = self.content_size.height or 12
        return Text("\n").join(self.draw(cols, rows))


class LogKeys:
    """Key actions of the log view (the screen's state and drawing are declared only)."""

    app: Any
    view: str
    logged: Any
    figures: Any
    stack: Any
    window: Window
    cursor: int
    level: int
    shown: list[bool]
    peak_turn: int
    note: Text | None
    query_one: Any
    refresh_view: Any
    _plot: Any

    def action_view(self, step: int) -> None:
        self.view = VIEWS[(VIEWS.index(self.view) + step) % len(VIEWS)]
        self.refresh_view()

    def _plot_cols(self) -> int:
        width = self.query_one(LogChart).content_size.width or 78
        return self._plot(width, 12).plot_cols

    def _cursor_index(self) -> int:
        return column_range(self.window, self._plot_cols(), self.cursor)[0]

    def _show_window(self, start: int, length: int, at: int | None = None) -> None:
        """Show ``length`` intervals from ``start`` (clamped), the cursor on interval ``at``."""
        total = self.stack.shape[-1]
        length = min(max(length, min(self._plot_cols(), total)), total)
        start = min(max(start, 0), total - length)
        self.window = Window(start, start + length)
        if at is not None:
            cols = self._plot_cols()
            self.cursor = min(max((at - start) * cols // length, 0), cols - 1)
        self.refresh_view()

    def action_cursor(self, step: int) -> None:
        if self.logged is None or self.view != "current":
            return
        self.note = None
        cols = self._plot_cols()
        target = self.cursor + step
        if 0 <= target < cols:
            self.cursor = target
            self.refresh_view()
            return
        w = self.window
        shift = max(w.length // 4, 1) * step
        self._show_window(w.start + shift, w.length, self._cursor_index() + w.length // cols * step)

    def action_zoom(self, direction: int) -> None:
        if self.logged is None or self.view != "current":
            return
        self.note = None
        at = self._cursor_index()
        w = self.window
        length = w.length // 2 if direction > 0 else w.length * 2
        share = (at - w.start) / max(w.length, 1)
        self._show_window(round(at - share * length), length, at)

    def action_pan(self, step: int) -> None:
        if self.logged is not None and self.view == "current":
            self._show_window(self.window.start + step * self.window.length, self.window.length)

    def action_edge(self, end: int) -> None:
        if self.logged is None:
            return
        if self.view == "figures":
            scroll = self.query_one("#log-figures", VerticalScroll)
            scroll.scroll_end(animate=False) if end else scroll.scroll_home(animate=False)
            return
        total = self.stack.shape[-1]
        at = total - 1 if end else 0
        self._show_window(at - self.window.length // 2, self.window.length, at)

    def action_whole(self) -> None:
        if self.logged is not None:
            self._show_window(0, self.stack.shape[-1], self._cursor_index())

    def action_peak(self) -> None:
        """Jump to the next channel's highest demand window (its start under the cursor)."""
        if self.logged is None:
            return
        f = self.figures
        channels = [(k, ch) for k, ch in enumerate([*f.phases, f.neutral]) if ch is not None]
        channels = [(k, ch) for k, ch in channels if ch.start_index >= 0]
        if not channels:
            self.app.bell()
            return
        k, ch = channels[self.peak_turn % len(channels)]
        self.peak_turn += 1
        self.view = "current"
        w = self.window
        self._show_window(ch.start_index - w.length // 2, w.length, ch.start_index)
        name = self._plot(80, 12).names[k]
        start = self.logged.time_at(ch.start_index).strftime("%a %m-%d %H:%M")
        end = self.logged.time_at(ch.start_index + f.window_intervals).strftime("%H:%M")
        self.note = Text(f"peak {name} {ch.value_a:.1f} A {start}-{end}", style="bold")
        self.refresh_view()

    def action_level(self, step: int) -> None:
        if self.view == "figures":
            self.query_one("#log-figures", VerticalScroll).scroll_relative(y=-step, animate=False)
        elif self.view == "duration":
            self.level = max(self.level + step, 0)
            self.refresh_view()

    def action_channel(self, k: int) -> None:
        if k == 3 and (self.logged is None or self.logged.arrays.neutral_a is None):
            return
        self.shown[k] = not self.shown[k]
        if not any(self.shown):
            self.shown[k] = True
        self.refresh_view()
