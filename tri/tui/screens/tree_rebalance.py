"""Rebalance a building: the targets, the search in a worker, the work order by panel, apply.

Opened from the building's tree (r) on the panel under the cursor: that
panel and every panel below it are searched, as ``tri suggest PARENT --at
PANEL`` does (:func:`tri.rebalance.tree_solve.suggest_tree`), on the
building as it is on screen (unsaved edits included). The words are the
command line's (:mod:`tri.report.tree_work_order`): the status and what it
proves, every panel's deviation before and after from the engine (with
``use`` scenarios: the worst over every case, and which case), the work
order grouped by panel. Esc during a run stops it with the best plan so far
and its honest status. A applies every move: one undoable edit in each
panel that changes (u in that panel's view undoes its part). The safety
caution is always on screen.
"""

from __future__ import annotations

import threading
from typing import Any, ClassVar

from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, VerticalScroll
from textual.message import Message
from textual.screen import Screen
from textual.widgets import Input, ProgressBar, Static

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import DEFAULT_TARGET_PCT
from tri.rebalance.tree_results import TreeSuggestion
from tri.rebalance.tree_solve import TreeOptions, suggest_tree
from tri.report.tree_work_order import panel_steps, tree_status_words
from tri.report.work_order import fixed, moves_count_words
from tri.safety import SAFETY_CAUTION
from tri.schedule.errors import ScheduleError
from tri.tui.fmt import parse_number
from tri.tui.messages import RebalanceProgress
from tri.tui.screens.search_fields import (
    FIELD_KEYS,
    neutral_from,
    number_field,
    progress_poster,
)
from tri.tui.widgets.key_footer import KeyFooter
from tri.words import plural

#: Search budget of the screen [s].
TIME_LIMIT_S = 5.0


class TreeRebalanceDone(Message):
    """The building search finished (``result`` is None on error; ``error`` says why)."""

    def __init__(self, result: TreeSuggestion | None, before: Any, error: str | None) -> None:
        self.result = result
        self.before = before
        self.error = error
        super().__init__()


def targets_from(target: Any, below: Any, neutral: Any = None) -> TreeOptions | str:
    """The fields as targets and the neutral limit at this panel, or what is wrong with them."""
    limit = neutral_from(neutral)
    if isinstance(limit, str):
        return limit
    for what, v in (("Target", target), ("Below", below)):
        if v is not None and (not isinstance(v, int | float) or not 0 < v < 100):
            return f"{what}: expected a percent above 0 and below 100."
    if target is None:
        return "Target: give the largest deviation allowed at this panel, in percent."
    return TreeOptions(
        target_pct=float(target),
        child_target_pct=None if below is None else float(below),
        neutral_max_a=limit,
        time_limit_s=TIME_LIMIT_S,
    )


def result_text(s: TreeSuggestion, before: tuple) -> Text:
    """The status, every panel's deviation, and the work order grouped by panel."""
    t = Text(f"{tree_status_words(s)}.\n", style="bold")
    scenarios = len(s.case_names) > 1
    if scenarios:
        t.append(f"Judged in every case: {', '.join(s.case_names)}; worst case shown.\n")
    for p in s.panels:
        mark = "" if p.target_met else "  over its target"
        worst = f", {p.deciding}" if scenarios else ""
        t.append(
            f"{'  ' * p.depth}{p.panel}: deviation {fixed(p.worst_before_pct, 1)} → "
            f"{fixed(p.worst_after_pct, 1)} % (target {p.target_pct:g} %{worst}){mark}\n"
        )
    moving = [p for p in s.panels if p.moves]
    if not moving:
        t.append("No breaker moves are proposed.\n")
    else:
        t.append(
            f"Work order: {moves_count_words(*(p.moves for p in moving))} in "
            f"{plural(len(moving), 'panel')}; each panel is its own job.\n",
            style="bold",
        )
    for p in moving:
        t.append(f"{p.panel} ({p.file.rsplit('/', 1)[-1]}):\n", style="bold")
        for w in panel_steps(p, before[p.index]):
            t.append(f" {w.number}. {w.brief}\n")
    for note in s.notes:
        t.append(f"Note: {note}.\n")
    return t


class TreeRebalanceScreen(Screen[None]):
    """Targets, a progress line, the result by panel, the caution."""

    DEFAULT_CSS = """
    TreeRebalanceScreen #trb-progress { width: auto; }
    TreeRebalanceScreen #trb-progress Bar { width: 14; }
    TreeRebalanceScreen #trb-state { width: 1fr; height: auto; margin-left: 1; }
    TreeRebalanceScreen #trb-scroll { height: 1fr; padding: 0 1; }
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+r,f5", "run", "Run", id="tree_rebalance.run"),
        Binding("escape", "cancel_or_back", "Back", id="tree_rebalance.back"),
        Binding("A", "apply_all", "Apply all", id="tree_rebalance.apply_all"),
        *FIELD_KEYS,
    ]

    def __init__(self, service: int) -> None:
        super().__init__()
        self.service = service
        self.result: TreeSuggestion | None = None
        self.before: tuple = ()
        self.cancel_event: threading.Event | None = None
        self.running = False

    def compose(self) -> ComposeResult:
        yield Static("", id="trb-title", classes="title-bar")
        with Horizontal(id="rb-mode"):
            yield from number_field("Target %", "trb-target", f"{DEFAULT_TARGET_PCT:g}")
            yield from number_field("Below %", "trb-below", placeholder="same")
            yield from number_field("Neutral A", "trb-neutral", placeholder="any")
        with Horizontal(id="rb-progress-row"):
            yield ProgressBar(total=1.0, show_eta=False, id="trb-progress")
            yield Static("", id="trb-state")
        with VerticalScroll(id="trb-scroll"):
            yield Static("", id="trb-result")
        yield Static(Text("CAUTION: " + SAFETY_CAUTION), id="rb-caution")
        yield KeyFooter(show_command_palette=False)

    def on_mount(self) -> None:
        app: Any = self.app
        name = app.building.sessions[self.service].schedule.panel.name
        self.query_one("#trb-title", Static).update(
            Text(f" Rebalance the building from {name}  (Enter runs, Esc back)")
        )
        for widget in self.query(Input):
            widget.cursor_blink = False
        self._state(
            "Target at this panel, below it (blank: the same), neutral limit here "
            "(blank: none). Enter runs."
        )
        self.query_one("#trb-target", Input).focus()

    def _state(self, text: str) -> None:
        self.query_one("#trb-state", Static).update(Text(text))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_run()

    def action_run(self) -> None:
        if self.running:
            return
        opts = targets_from(
            parse_number(self.query_one("#trb-target", Input).value),
            parse_number(self.query_one("#trb-below", Input).value),
            parse_number(self.query_one("#trb-neutral", Input).value),
        )
        if isinstance(opts, str):
            self._state(opts)
            self.app.bell()
            return
        app: Any = self.app
        b = app.building
        try:
            tree = b.edited_tree()
        except ScheduleError as exc:
            self._state(f"The building cannot be searched: {exc.summary()}")
            return
        opts = TreeOptions(
            target_pct=opts.target_pct,
            child_target_pct=opts.child_target_pct,
            service=tree.panels[self.service].shown,
            neutral_max_a=opts.neutral_max_a,
            time_limit_s=opts.time_limit_s,
        )
        self.running = True
        self.result = None
        self.cancel_event = threading.Event()
        self.query_one("#trb-progress", ProgressBar).update(progress=0.0)
        self._state("Searching the building… Esc stops with the best so far.")
        self._search(tree, opts, self.cancel_event)

    @work(thread=True, exclusive=True, group="tree-rebalance", exit_on_error=False)
    def _search(self, tree: Any, opts: TreeOptions, cancel: threading.Event) -> None:
        progress = progress_poster(self)
        before = tuple(p.schedule for p in tree.panels)
        try:
            with native_stdout_to_devnull():
                result = suggest_tree(tree, opts, progress=progress, cancel=cancel)
            message = TreeRebalanceDone(result, before, None)
        except ValueError as exc:
            message = TreeRebalanceDone(None, before, f"Cannot rebalance this building: {exc}.")
        except Exception as exc:  # shown as a message; nothing is changed
            message = TreeRebalanceDone(
                None, before, f"The rebalancer stopped: {type(exc).__name__}: {exc}"
            )
        self.app.call_from_thread(self.post_message, message)

    def on_rebalance_progress(self, message: RebalanceProgress) -> None:
        if message.fraction is not None:
            self.query_one("#trb-progress", ProgressBar).update(progress=message.fraction)
        self._state(message.text + "  (Esc stops)")

    def on_tree_rebalance_done(self, message: TreeRebalanceDone) -> None:
        self.running = False
        if message.result is None:
            self.query_one("#trb-progress", ProgressBar).update(progress=0.0)
            self._state(str(message.error))
            return
        self.query_one("#trb-progress", ProgressBar).update(progress=1.0)
        self.result, self.before = message.result, message.before
        tail = " A applies every move." if self.result.relocations else ""
        self._state(f"Done ({plural(self.result.relocations, 'relocation')}).{tail}")
        self.query_one("#trb-result", Static).update(result_text(self.result, self.before))
        self.query_one("#trb-scroll", VerticalScroll).focus()

    def action_apply_all(self) -> None:
        app: Any = self.app
        s = self.result
        if s is None or not s.relocations:
            self._state("Nothing to apply: run the search first (Enter).")
            return
        b = app.building
        moving = [p for p in s.panels if p.moves]
        if any(b.sessions[p.index].schedule != self.before[p.index] for p in moving):
            self._state("Not applied: a panel changed since the search; run it again.")
            self.app.bell()
            return
        for p in moving:
            label = f"Building rebalance: {moves_count_words(p.moves)}"
            b.sessions[p.index].apply(p.schedule, label)
        app.schedule_changed(
            f"Building rebalance applied in {plural(len(moving), 'panel')}; u in each panel "
            "undoes its part."
        )
        self.app.pop_screen()

    def action_cancel_or_back(self) -> None:
        if self.running and self.cancel_event is not None:
            self.cancel_event.set()
            self._state("Stopping: the best plan so far follows…")
            return
        self.app.pop_screen()
