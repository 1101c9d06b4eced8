"""Rebalance: choose the mode, run the rebalancer in a worker, read the work order, apply.

The screen calls the rebalancer's public function (:func:`tri.rebalance.suggest`)
from a worker thread with a progress bar; Esc stops it with the best plan so
far (nothing changes until a plan is applied). What it shows is
what ``tri suggest`` prints, from the same data and the same words
(:mod:`tri.report.suggest`): the status and its proven bound, the count of
relocations, the numbered work order, the engine's figures before and
after, the floor, and any rating still exceeded after the moves. The
safety caution is always on screen. Applying is one undoable edit (u in
the main view undoes it).
"""

from __future__ import annotations

import threading
from dataclasses import replace
from typing import Any, ClassVar

from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal
from textual.screen import Screen
from textual.widgets import DataTable, Input, ProgressBar, Static

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import (
    DEFAULT_TARGET_PCT,
    Suggestion,
    SuggestOptions,
    apply_moves,
    suggest,
)
from tri.report.floor_words import floor_brief, floor_words
from tri.report.work_order import (
    WorkLine,
    case_lines,
    count_words,
    deciding_words,
    fixed,
    limits_brief,
    limits_words,
    status_words,
    work_order,
)
from tri.safety import SAFETY_CAUTION
from tri.schedule.model import Schedule
from tri.schedule.validate import check_schedule
from tri.tui.fmt import parse_number
from tri.tui.messages import RebalanceDone, RebalanceProgress
from tri.tui.screens.search_fields import (
    FIELD_KEYS,
    neutral_from,
    number_field,
    progress_poster,
)
from tri.tui.widgets.cycle import Cycle
from tri.tui.widgets.key_footer import KeyFooter

MODES = (
    ("fewest moves to target", "fewest-moves"),
    ("best balance ≤ moves", "balance"),
    ("place new only", "place-new"),
    ("re-layout all (design)", "relayout"),
)
#: Search budget of the screen [s] (the command line's default is longer).
TIME_LIMIT_S = 3.0
#: Screen height from which the floor and the ratings are given in full sentences [rows].
ROOMY_HEIGHT = 32

REBALANCE_HELP = """\
Four modes (← → on the mode field): the fewest breakers relocated that bring
the phase currents within the target (largest deviation of a phase's RMS
current from the mean); the best balance with at most the given number of
relocations; only the best free slots for circuits not placed yet; or a full
re-layout for design work. New circuits are placed in the first two modes
too. Neutral A, when given, is the largest neutral RMS current the plan may
leave (every mode; blank: no limit). Enter in a field, Ctrl+R or F5 runs;
Esc stops a run with the best plan so far (its status says what was proven by
then), or goes back. Locked circuits never move. The status says
what was proven, as tri suggest does. The result is a work order: each line
is one step. Space selects or clears a move; a applies the selected moves, A
applies all of them; u in the main view undoes. Before and after figures are
the engine's, computed on both schedules. The safety caution applies to
every move: this is a plan to check, not approval to work."""


def options_from(target: Any, moves: Any, mode: str, neutral: Any = None) -> SuggestOptions | str:
    """The fields as the rebalancer's options, or what is wrong with them."""
    limit = neutral_from(neutral)
    if isinstance(limit, str):
        return limit
    if target is not None and (not isinstance(target, int | float) or not 0 < target < 100):
        return "Target: expected a percent above 0 and below 100."
    if moves is not None and (not isinstance(moves, int) or moves < 0):
        return "Moves: expected a whole number, 0 or more, or blank for any."
    if mode == "fewest-moves" and target is None:
        return "Fewest moves needs a target %; or choose best balance (← → on the mode)."
    if mode == "balance" and moves is None:
        return "Best balance needs a number of moves; or choose fewest moves to a target."
    budget = moves if isinstance(moves, int) else None
    base = SuggestOptions(time_limit_s=TIME_LIMIT_S, neutral_max_a=limit)
    if mode == "fewest-moves" and target is not None:
        return replace(base, target_pct=float(target), max_moves=budget, place_new=True)
    if mode == "balance":
        return replace(base, max_moves=budget, place_new=True)
    if mode == "place-new":
        return replace(base, place_new=True)
    return replace(base, relayout=True)


def move_unit(s: Suggestion, circuit_index: int) -> set[int]:
    """The circuits that move with ``circuit_index``: its shared-neutral group's, or itself."""
    group = next((m.group for m in s.moves if m.circuit_index == circuit_index), None)
    if group is None:
        return {circuit_index}
    return {m.circuit_index for m in s.moves if m.group == group}


def apply_chosen(
    schedule: Schedule, s: Suggestion, chosen: set[int]
) -> tuple[Schedule | None, str]:
    """``schedule`` with the moves of the circuits ``chosen`` carried out.

    Returns ``(None, reason)`` when that subset does not fit on its own (for
    example a move into a slot that only another, unchosen move frees).
    """
    # a shared-neutral group moves as one block: choosing its step chooses all its breakers
    groups = {m.group for m in s.moves if m.circuit_index in chosen and m.group is not None}
    picked = [m for m in s.moves if m.circuit_index in chosen or m.group in groups]
    new = apply_moves(schedule, picked)
    issues = check_schedule(new)
    if issues:
        return None, f"these moves do not fit on their own: {issues[0].message}"
    return new, ""


class RebalanceScreen(Screen[None]):
    """Mode fields, a progress line, the status, the work order, before/after, the caution."""

    DEFAULT_CSS = """
    RebalanceScreen #rb-moves-table { min-height: 5; }
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+r,f5", "run", "Run", id="rebalance.run"),
        Binding("escape", "cancel_or_back", "Back", id="rebalance.back"),
        Binding("space", "toggle_move", "Select", id="rebalance.select"),
        Binding("a", "apply_selected", "Apply", id="rebalance.apply"),
        Binding("A", "apply_all", "All", id="rebalance.apply_all"),
        *FIELD_KEYS,
    ]

    def __init__(self) -> None:
        super().__init__()
        self.plan: Suggestion | None = None
        self.lines: tuple[WorkLine, ...] = ()
        self.before: Schedule | None = None
        self.chosen: set[int] = set()
        self.cancel_event: threading.Event | None = None
        self.running = False

    def compose(self) -> ComposeResult:
        yield Static("", id="rb-title", classes="title-bar")
        with Horizontal(id="rb-mode"):
            yield from number_field("Target %", "rb-target", f"{DEFAULT_TARGET_PCT:g}")
            yield from number_field("Moves", "rb-moves", placeholder="any")
            yield from number_field("Neutral A", "rb-neutral", placeholder="any")
            yield Cycle(MODES, "fewest-moves", id="rb-mode-choice")
        with Horizontal(id="rb-progress-row"):
            yield ProgressBar(total=1.0, show_eta=False, id="rb-progress")
            yield Static("", id="rb-state")
        yield DataTable(id="rb-moves-table", cursor_type="row", zebra_stripes=True)
        yield Static("", id="rb-figures")
        yield Static(Text("CAUTION: " + SAFETY_CAUTION), id="rb-caution")
        yield KeyFooter(show_command_palette=False)

    def on_mount(self) -> None:
        app: Any = self.app
        for widget in self.query(Input):
            widget.cursor_blink = False
        self.query_one("#rb-title", Static).update(
            Text(
                f" Rebalance · {app.session.schedule.panel.name}  (Enter or Ctrl+R runs, Esc back)"
            )
        )
        table = self.query_one("#rb-moves-table", DataTable)
        table.add_column("Sel", width=3, key="sel")
        table.add_column("#", width=2, key="n")
        table.add_column("Work order", key="what")
        self._state("Set the mode, then Enter (or Ctrl+R) runs. Tab moves between fields.")
        self.query_one("#rb-target", Input).focus()

    # ------------------------------------------------------------ running

    def _state(self, text: str) -> None:
        self.query_one("#rb-state", Static).update(Text(text))

    def options(self) -> SuggestOptions | str:
        """The mode fields as options, or what is wrong with them."""
        return options_from(
            parse_number(self.query_one("#rb-target", Input).value),
            parse_number(self.query_one("#rb-moves", Input).value),
            str(self.query_one("#rb-mode-choice", Cycle).value),
            parse_number(self.query_one("#rb-neutral", Input).value),
        )

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_run()

    def on_key(self, event: Any) -> None:
        """Enter on the mode choice runs too, as the title says (it has no Enter of its own)."""
        if event.key == "enter" and isinstance(self.focused, Cycle):
            event.stop()
            self.action_run()

    def action_run(self) -> None:
        if self.running:
            return
        options = self.options()
        if isinstance(options, str):
            self._state(options)
            self.app.bell()
            return
        app: Any = self.app
        self.running = True
        self.plan, self.lines = None, ()
        self.cancel_event = threading.Event()
        self.query_one("#rb-progress", ProgressBar).update(progress=0.0)
        self._state("Searching… Esc stops with the best so far.")
        self._search(app.session.schedule, options, self.cancel_event)

    @work(thread=True, exclusive=True, group="rebalance", exit_on_error=False)
    def _search(self, schedule: Schedule, options: SuggestOptions, cancel: threading.Event) -> None:
        progress = progress_poster(self)
        try:
            with native_stdout_to_devnull():
                result = suggest(
                    schedule, options, progress=progress, cancel=cancel, keep_best_on_cancel=True
                )
            message = RebalanceDone((schedule, result), None)
        except ValueError as exc:  # options the panel cannot take
            message = RebalanceDone(None, f"Cannot rebalance this panel: {exc}.")
        except Exception as exc:  # shown as a message; the schedule is untouched
            message = RebalanceDone(None, f"The rebalancer stopped: {type(exc).__name__}: {exc}")
        self.app.call_from_thread(self.post_message, message)

    def on_rebalance_progress(self, message: RebalanceProgress) -> None:
        if message.fraction is not None:
            self.query_one("#rb-progress", ProgressBar).update(progress=message.fraction)
        self._state(message.text + "  (Esc stops)")

    def on_rebalance_done(self, message: RebalanceDone) -> None:
        self.running = False
        bar = self.query_one("#rb-progress", ProgressBar)
        if message.plan is None:
            bar.update(progress=0.0)
            self._state(str(message.error))
            return
        bar.update(progress=1.0)
        self.before, self.plan = message.plan
        assert self.before is not None and self.plan is not None
        self.lines = work_order(self.plan, self.before)
        self.chosen = {m.circuit_index for m in self.plan.moves}
        tail = " Space selects, a/A apply." if self.plan.moves else ""
        self._state(f"{status_words(self.plan)}. {count_words(self.plan)}.{tail}")
        self._show_plan()
        self.query_one("#rb-moves-table", DataTable).focus()

    # ------------------------------------------------------------ the work order

    def _show_plan(self) -> None:
        table = self.query_one("#rb-moves-table", DataTable)
        table.clear()
        assert self.plan is not None
        if not self.plan.moves:
            table.add_row("", "", Text("No breaker moves are proposed."))
        for w in self.lines:
            sel = "[x]" if w.circuit_index in self.chosen else "[ ]"
            table.add_row(Text(sel), str(w.number), Text(w.brief), key=str(w.number))
        self._show_figures()

    def _show_figures(self) -> None:
        s = self.plan
        if s is None:
            return
        labels = self.before.labels if self.before is not None else ("A", "B", "C")
        load = " (connected load)" if s.cases else ""
        t = Text(f"Engine figures, before → after all moves{load}:\n", style="bold")
        for lab, b, a in zip(labels, s.before.phases_rms_a, s.after.phases_rms_a, strict=True):
            t.append(f"{lab} {fixed(b, 1)} → {fixed(a, 1)} A   ")
        if s.before.neutral_rms_a or s.after.neutral_rms_a:
            t.append(f"N {fixed(s.before.neutral_rms_a, 1)} → {fixed(s.after.neutral_rms_a, 1)} A")
        before, after = s.before, s.after
        t.append(
            f"\ndeviation {fixed(before.max_deviation_pct, 1)} → "
            f"{fixed(after.max_deviation_pct, 1)} %   I2/I1 "
            f"{fixed(before.negative_sequence_pct, 1)} → {fixed(after.negative_sequence_pct, 1)} %"
        )
        roomy = self.app.size.height >= ROOMY_HEIGHT
        if s.cases:  # every scenario judged: the same words as tri suggest
            t.append("\n" + (deciding_words(s) or "") if roomy else "\nCases (* decides):")
            for line in case_lines(s):
                t.append("\n" + line)
        t.append("\n" + (floor_words(s) if roomy else floor_brief(s)))
        limits = limits_words(s) if roomy else limits_brief(s)
        if limits:
            t.append("\n" + limits, style="bold")
        self.query_one("#rb-figures", Static).update(t)

    def action_toggle_move(self) -> None:
        if self.plan is None or not self.plan.moves:
            return
        row = self.query_one("#rb-moves-table", DataTable).cursor_row
        if not 0 <= row < len(self.lines):
            return
        unit = move_unit(self.plan, self.lines[row].circuit_index)
        if self.lines[row].circuit_index in self.chosen:
            self.chosen -= unit
        else:
            self.chosen |= unit
        self._show_plan()
        self.query_one("#rb-moves-table", DataTable).move_cursor(row=row)

    def _apply(self, chosen: set[int]) -> None:
        app: Any = self.app
        if self.plan is None or not self.plan.moves:
            self._state("Nothing to apply: run the rebalancer first (Enter or Ctrl+R).")
            return
        if not chosen:
            self._state("No move selected: Space selects, A applies all.")
            return
        new, reason = apply_chosen(app.session.schedule, self.plan, chosen)
        if new is None:
            self._state(f"Not applied: {reason}")
            self.app.bell()
            return
        # a shared-neutral group moved as one block is one move, as in the work order
        units = {m.group or m.circuit_index for m in self.plan.moves}
        done = {m.group or m.circuit_index for m in self.plan.moves if m.circuit_index in chosen}
        total = len(units)
        app.apply(new, f"Rebalance: applied {len(done)} of {total} move{'s' if total != 1 else ''}")
        self.app.pop_screen()

    def action_apply_selected(self) -> None:
        self._apply(set(self.chosen))

    def action_apply_all(self) -> None:
        self._apply({m.circuit_index for m in self.plan.moves} if self.plan else set())

    def action_cancel_or_back(self) -> None:
        if self.running and self.cancel_event is not None:
            self.cancel_event.set()
            self._state("Stopping: the best plan so far follows…")
            return
        self.app.pop_screen()
