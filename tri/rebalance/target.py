"""Fewest relocations that meet a target: the search loop and its proof.

First the crossing bound (:mod:`tri.rebalance.crossing`: how much
current must cross between phases, given the largest movable breakers)
shows how many relocations every plan needs; when that is the best plan's
count, the plan is optimal at once. Otherwise each round asks for a plan
with one relocation fewer than the best known (``budget``). The question
is answered by

1. counting out every plan with at most ``budget`` *option changes*
   (:mod:`tri.rebalance.exhaust`), when there are few: a plan with
   ``budget`` relocations has at most ``budget`` option changes, so when
   none of them meets the target, none with ``budget`` relocations does;
   those that do are realised with their fewest relocations
   (:func:`tri.rebalance.realise.realise`) and kept if within the budget;
2. otherwise the model of :mod:`tri.rebalance.target_model`, a relaxation
   that counts relocations exactly: infeasible proves the budget
   impossible; a solution is checked exactly; one that fails teaches the
   model (cuts, exact products, finer sectors, finally a no-good cut on
   its options) and the round repeats.

The proven lower bound is the crossing bound, the largest budget plus one
shown impossible, or the model's own bound (its optimum or HiGHS's dual bound) rounded up.
``proven`` means the bound reached the plan's relocations (or, with no
plan, passed the cap).

With several cases (scenarios) the target must hold in every case: a plan
needs at least the crossing bound of each case (the largest of them is a
bound); the listing checks every case; the model has every case's rows on
the same options (:class:`tri.rebalance.target_model.CaseRows`), each case
learning from the proposals in its own currents.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from tri.rebalance.case_alone import case_alone_step
from tri.rebalance.control import Control, longer_slice
from tri.rebalance.crossing import changes_lower_bound
from tri.rebalance.electrical import decode_options
from tri.rebalance.exact_square import square_terms
from tri.rebalance.exhaust import enumeration_fits, plans_within
from tri.rebalance.goal import Goal
from tri.rebalance.heuristic import LocalSearch
from tri.rebalance.model import Solution
from tri.rebalance.plan_currents import triplen_neutral_a
from tri.rebalance.plans import Evaluator, Plan
from tri.rebalance.polygon import polygon_directions
from tri.rebalance.problem import Problem
from tri.rebalance.target_model import (
    SECTOR_WIDTHS_DEG,
    CaseRows,
    Learnt,
    build_target_model,
)
from tri.words import plural


@dataclass
class Outcome:
    """What a search loop found.

    Attributes
    ----------
    plan : Plan or None
        Best plan found, None if none meets the goal.
    proven : bool
        The plan is proven optimal (or, with no plan, the goal proven impossible).
    bound : float or None
        Proven lower bound on the objective: relocations (target) or the
        largest phase RMS current [A] (balance).
    solver_calls : int
        HiGHS calls made.
    notes : list of str
        Plain remarks for the output.
    """

    plan: Plan | None
    proven: bool
    bound: float | None
    solver_calls: int = 0
    notes: list[str] = field(default_factory=list)


def neutral_setup(pr: Problem, goal: Goal) -> tuple[float | None, list[np.ndarray]]:
    """Limit on the non-triplen neutral RMS [A] and its first directions, in ``pr``'s own case.

    The triplen orders of the neutral are the same for every plan
    (:func:`tri.rebalance.problem.triplen_neutral_a`), so ``||N|| ≤ L`` is
    ``||N_other|| ≤ sqrt(L² - N_triplen²)``. Returns ``(-1, [])`` when the
    triplens alone exceed the limit.
    """
    if goal.neutral_max_a is None or not pr.has_neutral:
        return None, []
    trip = triplen_neutral_a(pr)
    if trip > goal.neutral_max_a:
        return -1.0, []
    dirs = []
    for d in polygon_directions(36):
        u = np.zeros(pr.orders.size, dtype=complex)
        u[0] = d
        dirs.append(u)
    return math.sqrt(goal.neutral_max_a**2 - trip**2), dirs


def triplen_note(pr: Problem, cases: list[str]) -> str:
    """The note when triplen harmonics alone exceed the neutral limit (in which cases)."""
    where = (
        ""
        if pr.n_cases == 1
        else f" (in the case{'s' if len(cases) > 1 else ''} {', '.join(cases)})"
    )
    return f"triplen harmonics alone exceed the neutral limit{where}"


class _TargetSearch:
    """State of one fewest-relocations search (module notes)."""

    def __init__(
        self, pr: Problem, goal: Goal, control: Control, ev: Evaluator, list_plans: bool = True
    ):
        assert goal.target is not None
        self.target: float = goal.target  # the fewest-relocations search always has one
        self.list_plans = list_plans
        self.pr, self.goal, self.control, self.ev = pr, goal, control, ev
        self.cap = pr.n_movable if goal.max_moves is None else min(goal.max_moves, pr.n_movable)
        self.out = Outcome(plan=None, proven=False, bound=0.0)
        self.lower = 0
        self.level = 0
        self.views = pr.views()
        self.learnts = [Learnt() for _ in self.views]
        self.learnt = self.learnts[0]
        self.counted_out: set[int] = set()
        self.alone_tried = pr.n_cases == 1
        self.slice_s = 0.5
        self.neutral = [neutral_setup(v, goal) for v in self.views]
        self.nlim, self.ndirs = self.neutral[0]
        self.squares = [square_terms(v) for v in self.views]

    @property
    def best_k(self) -> int | None:
        return None if self.out.plan is None else self.out.plan.relocations

    def offer(self, plan: Plan | None) -> bool:
        """Keep ``plan`` if it meets the goal with fewer relocations than the best."""
        if not self.ev.good(plan):
            return False
        assert plan is not None
        if self.best_k is None or plan.relocations < self.best_k:
            self.out.plan = plan
            return True
        return False

    def count_out(self, budget: int) -> bool | None:
        """Step 1 of the module notes: True if a better plan was found, False if the
        question is settled (the best plan proven optimal, or the budget impossible),
        None if undecided."""
        self.counted_out.add(budget)
        what = f"at most {budget} phase change{'s' if budget != 1 else ''}"
        self.control.report(f"checking every plan with {what}")
        counted = plans_within(
            self.pr, self.target, self.goal.neutral_max_a, budget, self.control.stop
        )
        if counted is None:
            return None
        improved, settled = False, counted.complete
        for a, changes in zip(counted.plans, counted.changes, strict=True):
            if self.best_k is not None and changes >= self.best_k:
                break  # listed by changes: no later plan has fewer relocations
            if self.control.stop():
                return True if improved else None
            plan = self.ev.plan(a)
            settled = settled and self.ev.proven(a)
            if plan is not None and plan.relocations <= budget and self.offer(plan):
                improved = True
        if settled:
            # every plan with at most `budget` relocations was listed and realised exactly
            self.lower = max(self.lower, budget + 1 if self.best_k is None else self.best_k)
            return False
        return True if improved else None

    def ask_model(self, budget: int) -> bool:
        """Step 2 of the module notes; False when the loop must stop."""
        cases = tuple(
            CaseRows(v, learnt, nlim, ndirs, sq)
            for v, learnt, (nlim, ndirs), sq in zip(
                self.views[1:], self.learnts[1:], self.neutral[1:], self.squares[1:], strict=True
            )
        )
        tm = build_target_model(
            self.pr,
            self.target,
            budget,
            self.level,
            self.learnt,
            self.nlim,
            self.ndirs,
            self.squares[0],
            cases,
        )
        what = f"at most {budget} relocation{'s' if budget != 1 else ''}"
        self.control.report(f"solver: looking for a plan with {what}")
        c = self.control
        span = c.solver_span(self.slice_s)
        sol = tm.model.solve(
            tm.cost,
            span,
            gap=0.0,
            presolve=self.best_k is not None,
            heuristics=self.best_k is None,
        )
        self.out.solver_calls += 1
        if sol.status == "error":
            self.out.notes.append(f"the solver stopped: {sol.message}")
            return False
        if sol.status == "infeasible":
            self.lower = budget + 1
            return False
        self._raise_lower(sol, tm.offset)
        if sol.x is None:
            self.slice_s = longer_slice(self.slice_s)
            return True
        return self._proposal(sol, tm, budget)

    def _raise_lower(self, sol: Solution, offset: float) -> None:
        lb = sol.lower_bound()
        if lb is not None:
            self.lower = max(self.lower, math.ceil(lb + offset - 1e-6))

    def _proposal(self, sol: Solution, tm, budget: int) -> bool:
        assert sol.x is not None
        a = decode_options(self.pr, sol.x, tm.electrical.x)
        stays = np.zeros(self.pr.n_free, dtype=bool)
        stays[tm.slots.placed] = tm.slots.stays(sol.x)
        plan = self.ev.from_solution(a, stays, tm.slots.used_windows(sol.x))
        if plan is None:  # the slot block is exact: this would be a bug
            plan = self.ev.plan(a)
            self.out.notes.append("a solution's slots did not fit and were found again")
        if self.offer(plan):
            return True
        for view, learnt in zip(self.views, self.learnts, strict=True):
            learnt.learn(view, a)
        if self.offer(self._repair(a, budget)):
            return True
        if self.level + 1 < len(SECTOR_WIDTHS_DEG):
            self.level += 1
        else:
            self.learnt.nogoods.append(a)
        return True

    def _repair(self, a: np.ndarray, budget: int) -> Plan | None:
        goal = Goal(self.target, self.goal.neutral_max_a, budget)
        ls = LocalSearch(self.pr, goal, self.control, a)
        ls.descend(max_steps=4 * max(1, budget) + 10)
        ls.prune()
        plan = self.ev.plan(ls.assign)
        return plan if plan is not None and plan.relocations <= budget else None

    def case_alone(self, budget: int) -> None:
        """Each case's program alone (:mod:`tri.rebalance.case_alone`) raises the bound."""
        step = case_alone_step(
            self.views, self.learnts, self.neutral, self.squares, self.target, budget, self.control
        )
        self.out.solver_calls += step.calls
        self.lower = max(self.lower, step.lower)
        if step.impossible_in is not None:
            within = (
                "in any arrangement"
                if budget >= self.pr.n_movable
                else f"with at most {plural(budget, 'relocation')}"
            )
            self.out.notes.append(
                f"proven on the case {step.impossible_in} alone: no plan {within} "
                "meets the target in it"
            )

    def cross(self) -> None:
        """Step 0: the crossing bound (:mod:`tri.rebalance.crossing`) raises the lower bound."""
        known = self.cap + 1 if self.best_k is None else self.best_k
        self.control.report("bounding the moves by the current that must cross between phases")
        for view in self.views:  # every case must meet the target: each one's bound holds
            lb = changes_lower_bound(view, self.target, known, self.cap, self.control.stop)
            self.lower = max(self.lower, lb)

    def run(self) -> Outcome:
        self.cross()
        while not self.control.stop():
            budget = self.cap if self.best_k is None else min(self.cap, self.best_k - 1)
            if budget < self.lower:
                break
            listable = self.list_plans and enumeration_fits(self.pr, budget)
            if budget not in self.counted_out and listable:
                decided = self.count_out(budget)
                if decided is False:
                    break
                if decided is True:
                    continue
            if not self.alone_tried:
                self.alone_tried = True
                self.case_alone(budget)
                continue
            if not self.ask_model(budget):
                break
        out = self.out
        out.bound = float(self.lower)
        if out.plan is not None:
            out.proven = self.lower >= out.plan.relocations
        else:
            out.proven = self.lower > self.cap
        return out


def solve_target(
    pr: Problem,
    goal: Goal,
    control: Control,
    incumbent: Plan | None,
    ev: Evaluator,
    *,
    list_plans: bool = True,
) -> Outcome:
    """Fewest relocations that meet the target (module notes).

    Parameters
    ----------
    pr : Problem
    goal : Goal
        ``target`` (fraction), optional ``neutral_max_a`` and ``max_moves``.
    control : Control
    incumbent : Plan or None
        A plan that meets the goal (from the heuristic).
    ev : Evaluator
        Exact checks.
    list_plans : bool
        Settle small budgets by listing every plan (step 1).

    Returns
    -------
    Outcome
        ``bound`` is a proven lower bound on the relocations.
    """
    search = _TargetSearch(pr, goal, control, ev, list_plans)
    over = [
        n
        for n, (lim, _) in zip(pr.case_names, search.neutral, strict=True)
        if lim is not None and lim < 0
    ]
    if over:
        search.out.proven = True
        search.out.notes.append(triplen_note(pr, over))
        return search.out
    search.offer(incumbent)
    return search.run()
