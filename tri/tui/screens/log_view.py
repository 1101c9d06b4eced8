"""The log view: current over time, hours above each current, and the report's figures.

The schedule's ``[log]`` file is read away from the screen by the file layer's
own reader (:func:`tri.schedule.log_file.read_log`; a big file in a child
process, :mod:`tri.tui.log_reader`) with a progress bar; Esc cancels (a
million rows take seconds). Its figures are the engine's
(:func:`tri.report.over_time_data.analyse_logged`) and the report's
(:func:`tri.tui.compute.log_report`), never recomputed here. Three views
(Tab): current over time (← → move the cursor, + − zoom, PgUp PgDn scroll,
p jumps to each demand peak), the demand-duration view (↑↓ choose a
current), and the figures as ``tri report`` prints them.
"""

from __future__ import annotations

import contextlib
import threading
import time
from pathlib import Path
from typing import Any, ClassVar

import numpy as np
from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, ProgressBar, Static

from tri.engine.over_time import envelope
from tri.schedule.errors import ScheduleError
from tri.tui import compute
from tri.tui.log_plot import Plot, Window, column_range, duration_picture, legend, time_picture
from tri.tui.log_reader import LogCancelled, read_and_analyse
from tri.tui.log_summary import facts_line, summary_lines
from tri.tui.messages import LogProgress, LogRead
from tri.tui.screens.log_keys import LOG_HELP, LOG_KEY_WORDS, VIEWS, LogChart, LogKeys
from tri.tui.wording import issue_text, plural

#: Re-exported: the help screen imports it here.
__all__ = ["LOG_HELP", "LogScreen"]


class LogScreen(LogKeys, Screen[None]):
    """Current over time, duration and figures of the schedule's log."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel_or_back", "Back", id="log.back"),
        Binding("tab", "view(1)", "View", id="log.view"),
        Binding("shift+tab", "view(-1)", "Prev view", show=False),
        Binding("left,h", "cursor(-1)", "Cursor", show=False),
        Binding("right,l", "cursor(1)", "Cursor", show=False),
        Binding("plus,equals_sign", "zoom(1)", "Zoom in", id="log.zoom_in"),
        Binding("minus", "zoom(-1)", "Out", id="log.zoom_out"),
        Binding("pageup", "pan(-1)", "Scroll", show=False),
        Binding("pagedown", "pan(1)", "Scroll", show=False),
        Binding("home", "edge(0)", "Start", show=False),
        Binding("end", "edge(1)", "End", show=False),
        Binding("0", "whole", "Whole log", show=False),
        Binding("p", "peak", "Peak", id="log.peak"),
        Binding("up,k", "level(1)", "Level", show=False),
        Binding("down,j", "level(-1)", "Level", show=False),
        Binding("1", "channel(0)", "A", show=False),
        Binding("2", "channel(1)", "B", show=False),
        Binding("3", "channel(2)", "C", show=False),
        Binding("4", "channel(3)", "N", show=False),
        Binding("r", "read", "Read again", show=False, id="log.read"),
        Binding("q", "app.quit", "Quit", show=False),
    ]
    KEY_WORDS: ClassVar[dict[str, str]] = LOG_KEY_WORDS

    def __init__(self) -> None:
        super().__init__()
        self.view = "current"
        self.logged: Any = None
        self.figures: Any = None
        self.stack: Any = None
        self.data: dict[str, Any] | None = None
        self.window = Window(0, 1)
        self.cursor = 0
        self.level = -1  #: duration view: index of the level chosen (-1: the middle one)
        self.shown = [True, True, True, True]
        self.peak_turn = 0
        self.reading = False
        self.cancel: threading.Event | None = None
        self.token = 0
        self.problems: list[str] = []
        self.note: Text | None = None  #: a demand peak's words, until the cursor moves
        self._ready = False

    def compose(self) -> ComposeResult:
        yield Static("", id="log-title", classes="title-bar")
        with Horizontal(id="log-progress-row"):
            yield ProgressBar(total=1.0, show_eta=False, id="log-progress")
            yield Static("", id="log-state")
        yield LogChart(self._draw, id="log-chart")
        yield Static("", id="log-readout")
        yield Static("", id="log-summary")
        with VerticalScroll(id="log-figures"):
            yield Static("", id="log-figures-body")
        yield Footer(show_command_palette=False)

    def on_mount(self) -> None:
        self._ready = True
        self.query_one("#log-figures").display = False
        self.action_read(use_cache=True)

    # ------------------------------------------------------------ reading

    def _cache_key(self, spec: Any, base: Path | None) -> Any:
        path = Path(base or ".") / spec.file
        try:
            st = path.stat()
        except OSError:
            return None
        return (str(path.resolve()), st.st_mtime_ns, st.st_size, spec)

    def action_read(self, use_cache: bool = False) -> None:
        """Read the schedule's log (from the cache when the file has not changed)."""
        if self.reading:
            return
        app: Any = self.app
        spec = app.session.schedule.log
        if spec is None:
            self._state("This schedule has no [log] table.")
            return
        base = app.session.source_dir
        key = self._cache_key(spec, base)
        if use_cache and key is not None and key in app.log_cache:
            self._loaded(*app.log_cache[key])
            return
        self.reading, self.problems = True, []
        self.token += 1
        self.cancel = threading.Event()
        self.query_one("#log-progress-row").display = True
        self.query_one("#log-progress", ProgressBar).update(progress=0.0)
        self._state(f"Reading {spec.file}… Esc cancels.")
        self.refresh_view()
        self._read(spec, base, key, self.token, self.cancel)

    @work(thread=True, exclusive=True, group="log", exit_on_error=False)
    def _read(self, spec: Any, base: Any, key: Any, token: int, cancel: threading.Event) -> None:
        last = [0.0]

        def progress(fraction: float, what: str) -> None:
            now = time.perf_counter()
            if now - last[0] >= 0.1 or fraction >= 1.0:
                last[0] = now
                self._post(LogProgress(fraction, what))

        try:
            log, figures = read_and_analyse(spec, base, progress, cancel)
            message = LogRead(log, figures, [])
            message.key = key  # type: ignore[attr-defined]
        except LogCancelled:
            message = LogRead(None, None, [], cancelled=True)
        except ScheduleError as exc:
            # The log as the schedule names it, never the full path it was read from.
            full = str(Path(base or ".") / spec.file)
            words = [issue_text(i, spec.file).replace(full, spec.file) for i in exc.issues]
            message = LogRead(None, None, words)
        except Exception as exc:  # a message on screen, never a traceback
            message = LogRead(None, None, [f"{spec.file}: the log could not be read: {exc}"])
        if cancel.is_set():
            message = LogRead(None, None, [], cancelled=True)
        message.token = token  # type: ignore[attr-defined]
        self._post(message)

    def _post(self, message: Any) -> None:
        with contextlib.suppress(RuntimeError):  # the app has stopped
            self.app.call_from_thread(self.post_message, message)

    def on_log_progress(self, message: LogProgress) -> None:
        if not self.reading:
            return
        self.query_one("#log-progress", ProgressBar).update(progress=message.fraction)
        self._state(f"{message.text[:1].upper()}{message.text[1:]}… Esc cancels.")

    def on_log_read(self, message: LogRead) -> None:
        if getattr(message, "token", None) != self.token or not self.reading:
            return
        self.reading = False
        self.query_one("#log-progress-row").display = False
        if message.cancelled:
            self._state("Cancelled; nothing was read. r reads the log, Esc goes back.")
        elif message.problems:
            self.problems = message.problems
            n = len(message.problems)
            self._state(f"The log cannot be read ({plural(n, 'problem')}); r reads it again.")
        else:
            app: Any = self.app
            key = getattr(message, "key", None)
            if key is not None:
                app.log_cache = {key: (message.log, message.figures)}
            self._loaded(message.log, message.figures)
            return
        self.refresh_view()

    def _loaded(self, log: Any, figures: Any) -> None:
        self.logged, self.figures = log, figures
        rows = [*log.arrays.phase_a]
        neutral = log.arrays.neutral_a
        rows.append(neutral if neutral is not None else np.full(log.arrays.n_intervals, np.nan))
        self.stack = np.stack(rows)
        self.shown[3] = neutral is not None
        self.window = Window(0, max(log.arrays.n_intervals, 1))
        self.cursor = 0
        self.query_one("#log-progress-row").display = False
        self._state("")
        self.refresh_view()

    def action_cancel_or_back(self) -> None:
        if self.reading and self.cancel is not None:
            self.cancel.set()
            self.reading = False
            self.query_one("#log-progress-row").display = False
            self._state("Cancelled; nothing was read. r reads the log, Esc goes back.")
            self.refresh_view()
            return
        self.app.pop_screen()

    # ------------------------------------------------------------ drawing

    def _state(self, text: str) -> None:
        self.query_one("#log-state", Static).update(Text(text))
        if not self.query_one("#log-progress-row").display:
            self.query_one("#log-readout", Static).update(Text(text))

    def refresh_view(self) -> None:
        """Redraw from the app's latest figures (the schedule may have changed)."""
        if not self._ready:
            return
        app: Any = self.app
        if self.logged is not None and app.connected_analysis is not None and app.analysis_current:
            self.data = compute.log_report(
                app.session.schedule,
                app.connected_analysis,
                app.cases,
                self.logged,
                self.figures,
                app.session.title_name,
            )
        self._title()
        figures_view = self.view == "figures"
        self.query_one("#log-chart").display = not figures_view
        self.query_one("#log-readout").display = not figures_view
        self.query_one("#log-summary").display = not figures_view
        self.query_one("#log-figures").display = figures_view
        self.query_one(LogChart).refresh()
        self._readout()
        self._summary()

    def _title(self) -> None:
        t = Text(" Log")
        if self.data is not None:
            t.append(" · " + facts_line(self.data["log"]))
        views = Text(" │")
        for v in VIEWS:
            views.append(" ")
            views.append(
                f"[{v}]" if v == self.view else v, style="reverse" if v == self.view else ""
            )
        room = max(self.size.width - views.cell_len, 10)
        if t.cell_len > room:
            t.truncate(room - 1)
            t.append("…")
        t.append(" " * max(room - t.cell_len, 0))
        self.query_one("#log-title", Static).update(t + views)

    def _plot(self, cols: int, rows: int) -> Plot:
        app: Any = self.app
        a, b, c = app.session.schedule.labels
        shown = self.shown
        return Plot(
            cols, rows, (shown[0], shown[1], shown[2], shown[3]), (a, b, c, "N"), self.cursor
        )

    def _draw(self, cols: int, rows: int) -> list[Text]:
        if self.logged is None:
            return [Text(p) for p in self.problems] or [Text("")]
        plot = self._plot(cols, rows)
        self.cursor = min(self.cursor, plot.plot_cols - 1)
        plot = self._plot(cols, rows)
        if self.view == "duration":
            return self._draw_duration(plot)
        f = self.figures
        channels = [*f.phases, f.neutral]
        peaks = [(k, ch.start_index) for k, ch in enumerate(channels) if ch and ch.start_index >= 0]
        rating = self.data["log"]["capacity"]["rating_a"] if self.data else None
        return time_picture(
            self.stack,
            self.window,
            plot,
            rating_a=rating,
            peaks=peaks,
            time_label=lambda i: self.logged.time_at(i).strftime(self._clock_format()),
        )

    def _clock_format(self) -> str:
        """Times on the axis: with the year when the log spans most of one."""
        days = self.window.length * self.logged.interval_s / 86400.0
        if self.figures.span_days > 300:
            return "%Y-%m-%d" if days > 3 else "%Y-%m-%d %H:%M"
        return "%a %m-%d %H:%M" if days > 1 else "%a %H:%M"

    def _draw_duration(self, plot: Plot) -> list[Text]:
        if self.data is None:
            return [Text("Waiting for the figures…")]
        d = self.data["log"]["duration"]
        app: Any = self.app
        names = [*app.session.schedule.labels, "N"]
        hours = [d["hours_above"].get(n) for n in names]
        return duration_picture(d["levels_a"], hours, plot, level_cursor=self._level_index())

    def _level_index(self) -> int:
        """The duration view's chosen level (the middle one until ↑↓ choose)."""
        assert self.data is not None
        n = len(self.data["log"]["duration"]["levels_a"])
        self.level = n // 2 if self.level < 0 else min(self.level, n - 1)
        return self.level

    def _readout(self) -> None:
        if self.logged is None or self.reading:
            return
        present = [True, True, True, self.logged.arrays.neutral_a is not None]
        plot = self._plot(self.query_one(LogChart).content_size.width or 78, 12)
        t = legend(plot, present)
        if self.view == "duration" and self.data is not None:
            t.append_text(self._level_words())
        elif self.view == "current":
            t.append_text(self.note or self._cursor_words(plot))
        self.query_one("#log-readout", Static).update(t)

    def _cursor_words(self, plot: Plot) -> Text:
        first, last = column_range(self.window, plot.plot_cols, self.cursor)
        env = envelope(self.stack[:, first:last], 1)
        long = self.figures.span_days > 300
        t = Text(
            self.logged.time_at(first).strftime("%Y-%m-%d %H:%M" if long else "%a %m-%d %H:%M"),
            style="bold",
        )
        for k, name in enumerate(plot.names):
            value = env.mean[k, 0] if env.mean.shape[-1] else float("nan")
            if np.isfinite(value):
                t.append(f" {name} {value:.1f}")
        t.append(" A")
        return t

    def _level_words(self) -> Text:
        assert self.data is not None
        d = self.data["log"]["duration"]
        k = self._level_index()
        t = Text(f"above {d['levels_a'][k]:.1f} A:", style="bold")
        for name, hours in d["hours_above"].items():
            t.append(f" {name} {hours[k]:.1f} h")
        return t

    def _summary(self) -> None:
        summary = self.query_one("#log-summary", Static)
        body = self.query_one("#log-figures-body", Static)
        if self.data is None:
            hint = "Correct the log file (or [log] in the schedule), then r reads it again."
            summary.update(Text(hint if self.problems else ""))
            body.update(Text("\n".join(self.problems)))
            return
        width = max(self.size.width - 2, 40)
        summary.update(Text("\n").join(summary_lines(self.data, width)))
        if self.view == "figures":
            from tri.report.over_time_text import render_over_time_text

            width = max(self.size.width - 4, 40)
            body.update(Text(render_over_time_text(self.data, width=width).strip("\n")))
