"""Each case alone (:mod:`tri.rebalance.case_alone`), checked against every arrangement.

The step claims two things: that no plan within a budget meets the target
in one named case (so in every case at once), and a lower bound on the
relocations of any plan meeting it in every case. Both are checked against
the reference's list of every physical arrangement of dense small panels
with random scenarios (:mod:`rebalance_reference`, engine figures in each
case; nothing of the rebalancer is used). [computed]
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from rebalance_reference import enumerate_panel, free_breakers
from rebalance_sweep import EDGE, dense_panel, with_scenarios

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import SuggestOptions, suggest
from tri.rebalance.case_alone import case_alone_step
from tri.rebalance.control import Control
from tri.rebalance.exact_square import square_terms
from tri.rebalance.goal import Goal
from tri.rebalance.problem import build_problem
from tri.rebalance.solve import free_indices
from tri.rebalance.target import neutral_setup
from tri.rebalance.target_model import Learnt
from tri.schedule.load import load_schedule
from tri.schedule.model import Schedule

DEMOS = Path(__file__).parents[1] / "tri" / "panels_demo"
SEEDS = range(41_000, 41_024)
#: Targets [%]: tight enough that one case alone often decides.
TARGETS = (5.0, 10.0, 20.0, 40.0)


def _draw(seed: int) -> tuple[Schedule, float, int]:
    """A dense panel with scenarios, a target [%] and a budget [-]."""
    rng = np.random.default_rng(seed)
    sched = with_scenarios(rng, dense_panel(rng, int(rng.choice([8, 10, 12]))))
    return sched, float(rng.choice(TARGETS)), int(rng.integers(0, 4))


def _step(sched: Schedule, target: float, budget: int):
    free = free_indices(sched, SuggestOptions())
    pr = build_problem(sched, free)
    views = pr.views()
    goal = Goal(target=target, neutral_max_a=None, max_moves=None)
    with native_stdout_to_devnull():
        return case_alone_step(
            views,
            [Learnt() for _ in views],
            [neutral_setup(v, goal) for v in views],
            [square_terms(v) for v in views],
            target,
            budget,
            Control(30.0),
        )


def _case_deviation(enum) -> np.ndarray:
    """Largest deviation from the mean of each arrangement in each case [%], shape (A, S)."""
    rms = enum.phase_rms
    mean = rms.mean(axis=2, keepdims=True)
    return (np.abs(rms - mean).max(axis=2) / mean[..., 0]) * 100.0


@pytest.mark.parametrize("seed", SEEDS)
def test_each_case_alone_claims_only_what_every_arrangement_shows(seed: int) -> None:
    sched, target_pct, budget = _draw(seed)
    enum = enumerate_panel(sched, free_breakers(sched, "fewest-moves", False))
    dev = _case_deviation(enum)
    step = _step(sched, target_pct / 100.0, budget)
    within = enum.relocations <= budget
    if step.impossible_in is not None:
        k = enum.cases.index(step.impossible_in)
        # a plan within the budget meeting the target clearly in that case would refute it
        assert not np.any(within & (dev[:, k] <= target_pct * (1 - EDGE)))
        assert step.lower == budget + 1
    meets_all = (dev <= target_pct * (1 - EDGE)).all(axis=1)
    if meets_all.any():
        assert step.lower <= enum.relocations[meets_all].min()


def test_the_sweep_sees_both_answers() -> None:
    """Not vacuous: some seeds prove a case impossible alone, some do not."""
    seen = set()
    for seed in SEEDS:
        sched, target_pct, budget = _draw(seed)
        seen.add(_step(sched, target_pct / 100.0, budget).impossible_in is not None)
    assert seen == {True, False}


def test_the_logged_garage_is_proven_out_of_reach_by_its_evening() -> None:
    """The demo's 10 % target in every case: the evening case alone settles it
    (before this step the joint program needed more than the default 5 s)."""
    sched = load_schedule(DEMOS / "garage_logged_208.toml").schedule
    with native_stdout_to_devnull():
        s = suggest(sched, SuggestOptions(target_pct=10.0, time_limit_s=30.0))
    assert s.status == "infeasible"
    assert any("case evening alone" in n for n in s.notes)
