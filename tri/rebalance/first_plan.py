"""The heuristic's first plan: insertion, descent, kicks and pruning in that order.

The steps are those of :class:`tri.rebalance.heuristic.LocalSearch` (its
module notes give them and their references); this module runs them from
the present arrangement, and for a full re-layout also from nothing, and
keeps the better plan (fewer moves on a tie).
"""

from __future__ import annotations

import numpy as np

from tri.rebalance.control import Control
from tri.rebalance.goal import Goal
from tri.rebalance.heuristic import LocalSearch
from tri.rebalance.problem import Problem


def heuristic_plan(
    problem: Problem,
    goal: Goal,
    control: Control,
    *,
    from_scratch: bool = False,
    swaps: bool = True,
    kicks: bool = True,
    seed: int = 0,
    stop_gap: float = 1e-12,
) -> np.ndarray | None:
    """A good plan at once: insertion, descent, pruning (module notes).

    Parameters
    ----------
    problem : Problem
    goal : Goal
    control : Control
        Time limit and cancel hook (the search stops early, keeping its best).
    from_scratch : bool
        Also build a plan by inserting every free circuit afresh (full
        re-layout) and keep the better one.
    swaps : bool
        Allow swaps in the descent.
    kicks : bool
        Follow the descent by an iterated local search (random kicks, fixed
        ``seed`` so results repeat).
    seed : int
        Seed of the kicks.
    stop_gap : float
        Balance: stop once the largest phase is within this fraction of the
        floor ``F`` (a proven bound, so nothing more is needed) [-].

    Returns
    -------
    int ndarray, shape (F,) or None
        Option of each free circuit; None when the new circuits do not fit.
    """
    start = np.where(problem.current >= 0, problem.current, -1)
    rng = np.random.default_rng(seed)

    def run_from(first: np.ndarray) -> LocalSearch | None:
        """Insertion, descent, kicks and pruning from ``first``; None if a new circuit
        does not fit."""
        ls = LocalSearch(problem, goal, control, first, stop_gap)
        if not ls.insert_missing():
            return None
        ls.descend(swaps=swaps)
        if kicks:
            ls.iterate(rng)
        ls.prune()
        return ls

    starts = [start]
    if from_scratch and problem.n_free:
        starts.append(np.full(problem.n_free, -1))
    plans = [ls for ls in map(run_from, starts) if ls is not None]
    if not plans:
        return None
    best = plans[0]
    for other in plans[1:]:
        p, s = other.score()
        bp, bs = best.score()
        if best._better(p, s, (bp, bs)) or (
            p <= bp + best.tol[0] and s <= bs + best.tol[1] and other.moves < best.moves
        ):
            best = other
    return best.assign.copy()
