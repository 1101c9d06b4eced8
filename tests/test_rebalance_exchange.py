"""Exchanges that keep the move count (tri.rebalance.exchange), against every such exchange.

From a plan with its budget spent, on small dense two-column panels
(:mod:`rebalance_sweep`), every exchange of one or two moved breakers sent
home for as many other changes is listed here one by one, kept when the
slots' capacity holds, and scored by the local search's own measure; the
step must take one that scores as well as the best of them, keep the move
count, and do nothing when none is better. The search must never return a
plan worse than its start or over the budget. [computed]
"""

from __future__ import annotations

import itertools

import numpy as np
from rebalance_reference import free_breakers
from rebalance_sweep import dense_panel

from tri.rebalance.control import Control
from tri.rebalance.exchange import exchange_search, exchange_step
from tri.rebalance.first_plan import heuristic_plan
from tri.rebalance.goal import Goal
from tri.rebalance.heuristic import LocalSearch
from tri.rebalance.problem import build_problem

#: Panels tried [-].
PANELS = 12


def _exchanges(ls: LocalSearch):
    """Every budget-neutral exchange of one or two breakers (lists of (circuit, option))."""
    pr = ls.pr
    moved = [int(m) for m in np.flatnonzero(ls.moved)]
    changes = [
        (int(pr.owner[o]), o)
        for o in range(pr.n_options)
        if pr.movable[pr.owner[o]] and not ls.moved[pr.owner[o]] and o != ls.assign[pr.owner[o]]
    ]
    for m in moved:
        for c in changes:
            yield [(m, int(pr.current[m])), c]
    for m1, m2 in itertools.combinations(moved, 2):
        for c1, c2 in itertools.combinations(changes, 2):
            if c1[0] != c2[0]:
                yield [(m1, int(pr.current[m1])), (m2, int(pr.current[m2])), c1, c2]


def _score_after(ls: LocalSearch, steps) -> tuple[float, float] | None:
    """The score after the steps, None when the slots' capacity fails."""
    pr = ls.pr
    before = ls.assign.copy()
    for i, o in steps:
        ls.set(i, o)
    fits = not pr.slots or (
        bool(np.all(ls.cells <= ls.cap_total)) and bool(np.all(ls.win <= pr.cap_window))
    )
    got = ls.score()
    ls.load(before)
    return got if fits else None


def test_the_step_takes_the_best_exchange_and_the_search_never_loses() -> None:
    taken = 0
    for seed in range(PANELS):
        rng = np.random.default_rng(73_000 + seed)
        sched = dense_panel(rng, int(rng.choice([10, 12])), max_free=8)
        pr = build_problem(sched, free_breakers(sched, "balance", False), scenarios=False)
        k = int(rng.integers(1, 4))
        goal, control = Goal(max_moves=k), Control(30.0)
        if pr.n_free < 2 or seed % 3 == 0:
            start = heuristic_plan(pr, goal, control, kicks=False)
        else:  # k random changes: exchanges are more likely to help
            start = pr.current_assignment().copy()
            for i in rng.choice(np.flatnonzero(pr.movable), min(k, int(pr.movable.sum())), False):
                start[i] = pr.starts[i] + (start[i] - pr.starts[i] + 1) % (
                    pr.starts[i + 1] - pr.starts[i]
                )
        if start is None:
            continue
        ls = LocalSearch(pr, goal, control, start)
        if pr.slots and not (np.all(ls.cells <= ls.cap_total) and np.all(ls.win <= pr.cap_window)):
            continue
        ref, moves = ls.score(), ls.moves
        scores = [_score_after(ls, steps) for steps in _exchanges(ls)]
        better = [s for s in scores if s is not None and ls._better(s[0], s[1], ref)]
        applied = exchange_step(ls, np.random.default_rng(0))
        assert applied == bool(better), seed
        assert ls.moves == moves
        if applied:
            taken += 1
            best = min(better)
            got = ls.score()
            assert not ls._better(best[0], best[1], got), (seed, best, got)
        found = exchange_search(pr, goal, control, start, control.elapsed() + 0.2, 1e-12)
        after = LocalSearch(pr, goal, control, found)
        assert pr.option_changes(found) <= k
        assert not after._better(ref[0], ref[1], after.score())
    assert taken >= 2  # not vacuous
