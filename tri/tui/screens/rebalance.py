"""Rebalance: choose the mode, run the rebalancer in a worker, read the work order, apply.

The rebalancer runs in a worker thread with a progress bar; Esc cancels it.
The proposal is shown as a numbered work order with the engine's before and
after figures, and the safety caution is always on screen before anything
is applied. Applying is one undoable edit (u in the main view undoes it).
"""

from __future__ import annotations

import threading
import time
from typing import Any, ClassVar

from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Input, Label, ProgressBar, Static

from tri.cli.common import SAFETY_CAUTION
from tri.rebalance import DEFAULT_TARGET_PCT
from tri.schedule.to_engine import analyse_schedule
from tri.tui import rebalance_bridge as bridge
from tri.tui.fmt import parse_number
from tri.tui.messages import RebalanceDone, RebalanceProgress
from tri.tui.widgets.cycle import Cycle
from tri.tui.widgets.in_order import OrderedInput

MODES = (
    ("fewest moves to target", "fewest-moves"),
    ("best balance ≤ moves", "balance"),
    ("place new only", "place-new"),
    ("re-layout all (design)", "relayout"),
)

REBALANCE_HELP = """\
Three modes (← → on the mode field): fewest breaker moves that bring the
phase currents within the target (largest deviation of a phase's RMS
current from the mean); the best balance with at most the given number of
moves; or only the best free slots for circuits not placed yet. New
circuits are placed in the first two modes too. Ctrl+R (or F5, or Enter in
a number field) runs; Esc cancels a run, or goes back.
Locked circuits never move. The result is a work order: each line is one
breaker to relocate. Space selects or clears a move; a applies the selected
moves, A applies all of them; u in the main view undoes. Before and after
figures are the engine's, computed on both schedules. The safety caution
applies to every move: this is a plan to check, not approval to work."""


class RebalanceScreen(Screen[None]):
    """Mode fields, a progress line, the work order, before/after, the caution."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+r,f5", "run", "Run", id="rebalance.run"),
        Binding("escape", "cancel_or_back", "Back", id="rebalance.back"),
        Binding("space", "toggle_move", "Select", id="rebalance.select"),
        Binding("a", "apply_selected", "Apply", id="rebalance.apply"),
        Binding("A", "apply_all", "All", id="rebalance.apply_all"),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.plan: bridge.Plan | None = None
        self.chosen: set[int] = set()
        self.cancel_event: threading.Event | None = None
        self.running = False
        self.figures: tuple[Any, Any] | None = None

    def compose(self) -> ComposeResult:
        yield Static("", id="rb-title", classes="title-bar")
        with Horizontal(id="rb-mode"):
            yield Label("Target %", classes="rb-label")
            yield OrderedInput(
                f"{DEFAULT_TARGET_PCT:g}", id="rb-target", compact=True, classes="rb-num"
            )
            yield Label("Moves", classes="rb-label")
            yield OrderedInput("", id="rb-moves", placeholder="any", compact=True, classes="rb-num")
            yield Cycle(MODES, "fewest-moves", id="rb-mode-choice")
        with Horizontal(id="rb-progress-row"):
            yield ProgressBar(total=1.0, show_eta=False, id="rb-progress")
            yield Static("", id="rb-state")
        yield DataTable(id="rb-moves-table", cursor_type="row", zebra_stripes=True)
        yield Static("", id="rb-figures")
        yield Static(Text("CAUTION: " + SAFETY_CAUTION), id="rb-caution")
        yield Footer(show_command_palette=False)

    def on_mount(self) -> None:
        app: Any = self.app
        for widget in self.query(Input):
            widget.cursor_blink = False
        self.query_one("#rb-title", Static).update(
            Text(f" Rebalance · {app.session.schedule.panel.name}  (Ctrl+R runs, Esc back)")
        )
        table = self.query_one("#rb-moves-table", DataTable)
        table.add_column("Sel", width=3, key="sel")
        table.add_column("#", width=2, key="n")
        table.add_column("Work order", key="what")
        if bridge.find_entry() is None:
            self._state(
                "Waiting for the rebalancer: it is not in this build yet. Everything else works."
            )
        else:
            self._state("Set the mode, then Ctrl+R to run. Tab moves between fields.")
        self.query_one("#rb-target", Input).focus()

    # ------------------------------------------------------------ running

    def _state(self, text: str) -> None:
        self.query_one("#rb-state", Static).update(Text(text))

    def options(self) -> bridge.Options | str:
        """The mode fields as options, or what is wrong with them."""
        target = parse_number(self.query_one("#rb-target", Input).value)
        moves = parse_number(self.query_one("#rb-moves", Input).value)
        if target is not None and (not isinstance(target, int | float) or not 0 < target < 100):
            return "Target: expected a percent above 0 and below 100, or blank for best balance."
        if moves is not None and (not isinstance(moves, int) or moves < 0):
            return "Max moves: expected a whole number, 0 or more, or blank for any."
        mode = self.query_one("#rb-mode-choice", Cycle).value
        if mode == "fewest-moves" and target is None:
            return "Fewest moves needs a target %; or choose best balance (← → on the mode)."
        if mode == "balance" and moves is None:
            return "Best balance needs a number of moves; or choose fewest moves to a target."
        return bridge.Options(
            target_pct=None if target is None else float(target),
            max_moves=moves if isinstance(moves, int) else None,
            place_new=True,
            mode=mode,
        )

    def on_input_submitted(self, event: Input.Submitted) -> None:
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
        self.plan = None
        self.cancel_event = threading.Event()
        self.query_one("#rb-progress", ProgressBar).update(progress=0.0)
        self._state("Searching… Esc cancels.")
        self._search(app.session.schedule, options, self.cancel_event)

    @work(thread=True, exclusive=True, group="rebalance", exit_on_error=False)
    def _search(self, schedule: Any, options: bridge.Options, cancel: threading.Event) -> None:
        last = [0.0]

        def progress(fraction: float | None, text: str) -> None:
            now = time.perf_counter()
            if now - last[0] >= 0.1:
                last[0] = now
                self.app.call_from_thread(self.post_message, RebalanceProgress(fraction, text))

        try:
            plan = bridge.run(schedule, options, progress, cancel)
            figures = (analyse_schedule(schedule), analyse_schedule(plan.after))
            message = RebalanceDone((plan, figures), None, cancel.is_set())
        except bridge.RebalancerMissing as exc:
            message = RebalanceDone(None, str(exc))
        except Exception as exc:  # shown as a message; the schedule is untouched
            cancelled = cancel.is_set() or type(exc).__name__ == "Cancelled"
            message = RebalanceDone(None, None if cancelled else f"{exc}", cancelled)
        self.app.call_from_thread(self.post_message, message)

    def on_rebalance_progress(self, message: RebalanceProgress) -> None:
        if message.fraction is not None:
            self.query_one("#rb-progress", ProgressBar).update(progress=message.fraction)
        self._state(message.text + "  (Esc cancels)")

    def on_rebalance_done(self, message: RebalanceDone) -> None:
        self.running = False
        bar = self.query_one("#rb-progress", ProgressBar)
        if message.plan is None:
            bar.update(progress=0.0)
            if message.cancelled:
                self._state("Cancelled; nothing changed.")
            else:
                self._state(message.error or "The rebalancer gave no plan.")
            return
        bar.update(progress=1.0)
        plan, figures = message.plan
        self.plan, self.figures = plan, figures
        self.chosen = set(range(len(plan.moves)))
        moves = sum(1 for m in plan.moves if not m.is_placement)
        placed = len(plan.moves) - moves
        extra = f", {placed} new circuit(s) placed" if placed else ""
        note = " (stopped early: best so far)" if message.cancelled else ""
        self._state(f"{plan.status}: {moves} move(s){extra}{note}. Space selects, a/A apply.")
        self._show_plan()
        self.query_one("#rb-moves-table", DataTable).focus()

    # ------------------------------------------------------------ the work order

    def _show_plan(self) -> None:
        table = self.query_one("#rb-moves-table", DataTable)
        table.clear()
        assert self.plan is not None
        if not self.plan.moves:
            table.add_row("", "", Text("No move needed: the panel already meets the target."))
        for n, step in enumerate(self.plan.steps):
            sel = "[x]" if step.move in self.chosen else "[ ]"
            table.add_row(Text(sel), str(n + 1), Text(step.text), key=str(n))
        self._show_figures()

    def _show_figures(self) -> None:
        if self.figures is None:
            return
        before, after = self.figures
        t = Text("Engine figures, before → after all moves:\n", style="bold")
        for pb, pa in zip(before.phases, after.phases, strict=True):
            t.append(f"{pb.label} {pb.rms_a:.1f} → {pa.rms_a:.1f} A   ")
        if before.neutral.present:
            t.append(f"N {before.neutral.rms_a:.1f} → {after.neutral.rms_a:.1f} A")
        cb, ca = before.current_unbalance, after.current_unbalance
        t.append(
            f"\ndeviation {cb.max_deviation_pct:.1f} → {ca.max_deviation_pct:.1f} %   "
            f"I2/I1 {cb.negative_sequence_pct:.1f} → {ca.negative_sequence_pct:.1f} %"
        )
        self.query_one("#rb-figures", Static).update(t)

    def action_toggle_move(self) -> None:
        if self.plan is None or not self.plan.moves:
            return
        row = self.query_one("#rb-moves-table", DataTable).cursor_row
        if not 0 <= row < len(self.plan.steps):
            return
        self.chosen ^= {self.plan.steps[row].move}
        self._show_plan()
        self.query_one("#rb-moves-table", DataTable).move_cursor(row=row)

    def _apply(self, chosen: set[int]) -> None:
        app: Any = self.app
        if self.plan is None or not self.plan.moves:
            self._state("Nothing to apply: run the rebalancer first (Ctrl+R).")
            return
        if not chosen:
            self._state("No move selected: Space selects, A applies all.")
            return
        new, reason = bridge.apply_moves(app.session.schedule, self.plan, chosen)
        if new is None:
            self._state(f"Not applied: {reason}")
            self.app.bell()
            return
        n = len(chosen)
        app.apply(new, f"Rebalance: applied {n} of {len(self.plan.moves)} move(s)")
        self.app.pop_screen()

    def action_apply_selected(self) -> None:
        self._apply(set(self.chosen))

    def action_apply_all(self) -> None:
        self._apply(set(range(len(self.plan.moves))) if self.plan else set())

    def action_cancel_or_back(self) -> None:
        if self.running and self.cancel_event is not None:
            self.cancel_event.set()
            self._state("Cancelling…")
            return
        self.app.pop_screen()
