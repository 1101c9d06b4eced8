"""Each case alone: a quick proof step of the fewest-relocations search with scenarios.

With ``use`` scenarios a plan must meet the target in every case at once
(:mod:`tri.rebalance.cases`), and the program of :mod:`tri.rebalance.target_model`
carries every case's rows on the same options. Its rows for one case alone
are a relaxation of it: every plan that meets the target in every case
satisfies them. So

* when one case's program has no solution with ``budget`` relocations, no
  plan with ``budget`` relocations meets the target in every case;
* each case's proven lower bound on the relocations (its optimum, or
  HiGHS's dual bound when the time slice ends first) is a lower bound for
  all cases at once.

One case's program is a third of the joint one or less (a case where many
circuits are off, a night, is smaller still), and it is often one case
alone that makes the target impossible: measured on the logged garage demo
(three cases), the evening case proves a 10 % target out of reach in about
0.6 s where the joint program needs 6 to 9 s. The smaller programs are
tried first, each with half the time left to the step (the last with all of
it); the step is a proof call (presolve on, primal heuristics off).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from tri.rebalance.control import Control
from tri.rebalance.exact_square import SquareTerms
from tri.rebalance.model import Solution
from tri.rebalance.problem import Problem
from tri.rebalance.target_model import Learnt, build_target_model

#: Share of the remaining search time the whole step may use [-].
STEP_SHARE = 0.6


@dataclass(frozen=True)
class CaseAlone:
    """What the step proved.

    Attributes
    ----------
    impossible_in : str or None
        The case whose program alone has no solution within the budget.
    lower : int
        Proven lower bound on the relocations of any plan meeting the target in
        every case [-] (0 when nothing was proven).
    calls : int
        HiGHS calls made [-].
    """

    impossible_in: str | None
    lower: int
    calls: int


def case_alone_step(
    views: Sequence[Problem],
    learnts: Sequence[Learnt],
    neutral: Sequence[tuple[float | None, list]],
    squares: Sequence[SquareTerms | None],
    target: float,
    budget: int,
    control: Control,
) -> CaseAlone:
    """Each case's program alone at ``budget`` relocations (module notes).

    Parameters
    ----------
    views : sequence of Problem
        The problem in each case (:meth:`~tri.rebalance.problem.Problem.views`).
    learnts, neutral, squares : sequences, one entry per case
        The search's state for that case (rows that hold at every plan).
    target : float
        Largest deviation from the mean, a fraction [-].
    budget : int
        Largest number of relocations asked about [-].
    control : Control
        Time limit and cancellation.
    """
    models = []
    for i, view in enumerate(views):
        (nlim, ndirs), sq = neutral[i], squares[i]
        tm = build_target_model(view, target, budget, 0, learnts[i], nlim, ndirs, sq)
        models.append((tm.model.n, i, tm))
    models.sort(key=lambda item: item[0])
    keep = control.remaining() * (1.0 - STEP_SHARE)  # left for the joint program
    lower, calls = 0, 0
    for k, (_, i, tm) in enumerate(models):
        # the smaller programs first, each given half of what is left (the last all of it)
        span = (control.remaining() - keep) * (1.0 if k == len(models) - 1 else 0.5)
        if control.stop() or span <= 0.0:
            break
        span = min(span, control.solver_span(span))  # a cancel waits one slice at most
        control.report(f"solver: the case {views[i].case_names[0]} alone")
        sol: Solution = tm.model.solve(tm.cost, span, gap=0.0, presolve=True, heuristics=False)
        calls += 1
        if sol.status == "infeasible":
            return CaseAlone(views[i].case_names[0], budget + 1, calls)
        lb = sol.lower_bound()
        if lb is not None:
            lower = max(lower, math.ceil(lb + tm.offset - 1e-6))
    return CaseAlone(None, lower, calls)
