"""A cancel is never kept waiting behind one long solver call.

HiGHS cannot be interrupted inside a call, so when a search can be cancelled
(Ctrl+C on the command line, Cancel in the UI) every call gets a slice: short
at first, twice as long after a call that ran out of time, never above
:data:`tri.rebalance.control.MAX_SLICE_S`. Before, the single-panel loops
doubled without end, and a long search's Ctrl+C could wait minutes.

The solver is replaced by one that always runs out of time at once, so each
loop doubles its slice as fast as it can; the test records the time limit of
every call. The rule is the project's (a cancel waits a few seconds at most),
not a published value.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from test_cli_suggest_tree import _big_building as big_building

from tri.rebalance import SuggestOptions, suggest
from tri.rebalance.control import MAX_SLICE_S, Cancelled, Control
from tri.rebalance.model import Model, Solution
from tri.rebalance.tree_solve import TreeOptions, suggest_tree
from tri.report.work_order import status_words
from tri.schedule.load import load_schedule
from tri.schedule.tree import load_tree

DEMOS = Path(__file__).parents[1] / "tri" / "panels_demo"
#: Solver calls before the test's cancel fires: enough for any slice to double past the cap.
CALLS = 12


class NeverAnswers:
    """A stand-in for :meth:`Model.solve`: out of time at once, no solution; records spans."""

    def __init__(self) -> None:
        self.spans: list[float] = []

    def solve(self, model: Model, cost: np.ndarray, time_limit: float, **_: object) -> Solution:
        self.spans.append(float(time_limit))
        return Solution("limit", None, None, None, "stand-in: time limit reached")

    def cancel(self) -> bool:
        """The cancel hook: fires once the loop has made :data:`CALLS` calls."""
        return len(self.spans) >= CALLS


@pytest.fixture
def solver(monkeypatch: pytest.MonkeyPatch) -> NeverAnswers:
    fake = NeverAnswers()
    monkeypatch.setattr(Model, "solve", lambda model, *args, **kw: fake.solve(model, *args, **kw))
    return fake


def _assert_sliced(fake: NeverAnswers) -> None:
    assert len(fake.spans) >= CALLS, fake.spans  # the loop reached the solver
    assert max(fake.spans) <= MAX_SLICE_S, fake.spans
    assert max(fake.spans) == pytest.approx(MAX_SLICE_S), fake.spans  # and did double


@pytest.mark.parametrize(
    "options",
    [
        SuggestOptions(target_pct=0.1, list_plans=False, time_limit_s=600),
        SuggestOptions(max_moves=2, list_plans=False, time_limit_s=600),
    ],
    ids=["fewest-moves", "balance"],
)
def test_single_panel_slices_stop_at_the_cap(solver: NeverAnswers, options: SuggestOptions):
    schedule = load_schedule(DEMOS / "machine_shop_480.toml").schedule
    with pytest.raises(Cancelled):  # a single panel's search ends so when cancelled
        suggest(schedule, options, cancel=solver.cancel)
    _assert_sliced(solver)


def test_a_kept_search_returns_the_best_plan_so_far(solver: NeverAnswers):
    """The command line's Ctrl+C: the best plan so far, claiming no more than was proven."""
    schedule = load_schedule(DEMOS / "machine_shop_480.toml").schedule
    options = SuggestOptions(target_pct=0.1, list_plans=False, time_limit_s=600)
    result = suggest(schedule, options, cancel=solver.cancel, keep_best_on_cancel=True)
    assert result.stopped == "cancelled"
    assert result.status == "best-found"  # the stand-in solver proves nothing
    assert "stopped by the user" in status_words(result)
    assert suggest(schedule, replace(options, time_limit_s=1)).stopped is None


def test_building_slices_stop_at_the_cap(solver: NeverAnswers, tmp_path: Path):
    tree = load_tree(big_building(tmp_path))
    options = TreeOptions(target_pct=0.5, child_target_pct=1, list_plans=False, time_limit_s=600)
    result = suggest_tree(tree, options, cancel=solver.cancel)
    _assert_sliced(solver)
    assert result.stopped == "cancelled"


def test_without_a_cancel_hook_one_call_gets_all_that_is_left():
    """Nobody can stop such a search early, so nothing is gained by slicing it."""
    assert Control(600.0).solver_span(0.5) == pytest.approx(600.0, abs=1.0)
    assert Control(600.0, cancel=lambda: False).solver_span(0.5) == 0.5
    assert Control(600.0, cancel=lambda: False).solver_span(100.0) == MAX_SLICE_S
    assert Control(1.0, cancel=lambda: False).solver_span(3.0) <= 1.0
