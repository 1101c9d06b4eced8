"""Smallest largest-phase RMS current within a relocation budget: the loop and its bound.

Before any model, the floor within the budget
(:func:`tri.rebalance.crossing.budget_floor`: with few moves a crowded
phase keeps at least what its largest movable breakers cannot take away)
may already be within ``stop_gap`` of the best plan. Then, when the
plans are few (:mod:`tri.rebalance.exhaust`), every one is listed; when
the budget is small, every plan that could beat the best one is listed by
meeting in the middle (:mod:`tri.rebalance.halves`: the partition's sizes
must fall in a small triangle around ``F``), which proves the best plan
optimal in a fraction of a second where the model's bound stays near
``F``. Otherwise the model (electrical
block, exact slot block with the relocation budget, and ``T ≥`` the lower
bound of every phase's RMS current from
:mod:`tri.rebalance.lower_bounds`) is a relaxation: its optimum, or
HiGHS's dual bound, is a proven lower bound on the largest phase RMS
current of every plan with at most that many relocations. The floor ``F``
(:mod:`tri.rebalance.problem`) is another. Each solution is checked
exactly; the directions of its spectra are added (so the bound is exact
there, Kelley's cutting planes) and the model must beat the best plan by
:data:`IMPROVE` the next time. The loop ends when

* the model has no solution below the best plan: the plan is within
  ``IMPROVE`` of optimal (proven);
* the best plan is within :data:`PROVEN_GAP` of the bound: optimal;
* the best plan is within ``stop_gap`` of the bound: good enough as
  asked, with the bound reported (not called optimal);
* time runs out: the bound is reported.

This min-max problem is like number partitioning: the bound closes fast
when many circuits can share the load evenly, and slowly when a few large
ones decide; ``stop_gap`` keeps the search from chasing the last
hundredths of a percent.

With several cases (scenarios) the objective is the worst case's largest
phase RMS current: ``T`` bounds every case's phases from below (one
currents block per case on the same options), every case's floor and
floor within the budget is a bound, and each case learns the directions of
its own spectra.
"""

from __future__ import annotations

import math

import numpy as np

from tri.rebalance.control import Control, longer_slice
from tri.rebalance.crossing import budget_floor
from tri.rebalance.electrical import add_currents, add_neutral_cuts, add_options, decode_options
from tri.rebalance.exchange import exchange_search
from tri.rebalance.exhaust import best_plans_within, enumeration_fits
from tri.rebalance.goal import Goal
from tri.rebalance.halves import PAIR_LIMIT, halves_fit, plans_below
from tri.rebalance.harmonic_floor import floor_and_start
from tri.rebalance.heuristic import LocalSearch
from tri.rebalance.lower_bounds import (
    RESOLUTIONS,
    add_rms_lower_bounds,
    phase_reach,
    unit_spectrum,
)
from tri.rebalance.model import Model
from tri.rebalance.plan_currents import spectra
from tri.rebalance.plans import Evaluator, Plan
from tri.rebalance.problem import Problem
from tri.rebalance.relaxation import relaxed_bound
from tri.rebalance.slot_model import add_slots
from tri.rebalance.target import Outcome, neutral_setup, triplen_note

#: Relative improvement the model must find over the best plan [-].
IMPROVE = 1e-7
#: Relative gap at which a plan counts as proven optimal [-].
PROVEN_GAP = 1e-6
#: Shares of the remaining time for the exchanges and for the relaxation, within a budget [-].
EXCHANGE_SHARE, RELAX_SHARE = 0.3, 0.3


class _BalanceSearch:
    """State of one balance search (module notes)."""

    def __init__(self, pr: Problem, goal: Goal, control: Control, ev: Evaluator):
        self.pr, self.goal, self.control, self.ev = pr, goal, control, ev
        self.out = Outcome(plan=None, proven=False, bound=pr.worst_floor_a)
        self.lower = pr.worst_floor_a
        self.budget = pr.n_movable if goal.max_moves is None else min(goal.max_moves, pr.n_movable)
        self.views = pr.views()
        self.reaches = [[phase_reach(v, p, self.budget) for p in range(3)] for v in self.views]
        self.visited: list[list[list[np.ndarray]]] = [[[], [], []] for _ in self.views]
        self.neutral = [neutral_setup(v, goal) for v in self.views]
        self.nlim = self.neutral[0][0]
        self.ncuts = [list(d) for _, d in self.neutral]
        self.slice_s = 0.25
        self.level = 0
        self.learn(pr.current_assignment())

    @property
    def best(self) -> float:
        return math.inf if self.out.plan is None else self.out.plan.max_rms_a

    def learn(self, assign: np.ndarray) -> None:
        """Directions of a plan's spectra in every case (lower bounds exact there)."""
        for k, view in enumerate(self.views):
            v, n = spectra(view, assign)
            for p in range(3):
                u = unit_spectrum(v[p])
                if u is not None:
                    self.visited[k][p].append(u)
            if self.neutral[k][0] is not None:
                u = unit_spectrum(np.where(self.pr.orders % 3 == 0, 0.0, n))
                if u is not None:
                    self.ncuts[k].append(u)

    def offer(self, plan: Plan | None) -> None:
        if self.ev.good(plan) and plan is not None and plan.max_rms_a < self.best:
            self.out.plan = plan

    def model(self):
        m = Model()
        x = add_options(m, self.pr).x
        t = m.var(1, self.lower, np.inf)
        res = RESOLUTIONS[self.level]
        el = None
        for k, view in enumerate(self.views):  # one currents block per case (module notes)
            nlim = self.neutral[k][0]
            el_k = add_currents(m, view, x, nlim is not None)
            el = el if el is not None else el_k
            for p in range(3):
                reach, seen = self.reaches[k][p], self.visited[k][p]
                add_rms_lower_bounds(m, view, el_k, p, [t], reach, seen, res)
            if nlim is not None:
                add_neutral_cuts(m, el_k, nlim, self.ncuts[k])
        assert el is not None
        sc = add_slots(m, self.pr, el)
        sc.add_budget(m, self.budget)
        if math.isfinite(self.best):
            m.row([t], [1.0], -np.inf, self.best * (1 - IMPROVE))
        cost = np.zeros(m.n)
        cost[t] = 1.0
        return m, el, sc, cost

    def step(self, stop_gap: float) -> bool:
        """One model call; False when the loop must stop."""
        m, el, sc, cost = self.model()
        self.control.report(
            f"solver: looking for a plan below {self.best:.2f} A (bound {self.lower:.2f} A)"
        )
        span = min(self.slice_s, self.control.solver_span(self.slice_s))
        sol = m.solve(cost, span, gap=PROVEN_GAP / 10)
        self.out.solver_calls += 1
        if sol.status == "error":
            self.out.notes.append(f"the solver stopped: {sol.message}")
            return False
        if sol.status == "infeasible":  # nothing better than the best plan exists
            if math.isfinite(self.best):
                self.lower = max(self.lower, self.best * (1 - IMPROVE))
            self.out.proven = True
            return False
        lb = sol.lower_bound()
        if lb is not None:
            self.lower = max(self.lower, lb)
        if sol.x is None:
            self.slice_s = longer_slice(self.slice_s) if self.control.can_cancel else 1e9
            return True
        a = decode_options(self.pr, sol.x, el.x)
        stays = np.zeros(self.pr.n_free, dtype=bool)
        stays[sc.placed] = sc.stays(sol.x)
        self.learn(a)
        plan = self.ev.from_solution(a, stays, sc.used_windows(sol.x))
        if plan is None:  # the slot block is exact: this would be a bug
            plan = self.ev.plan(a)
            self.out.notes.append("a solution's slots did not fit and were found again")
        before = self.best
        self.offer(plan)
        if self.best >= before:  # no better plan: finer polygons next time
            self.level = min(self.level + 1, len(RESOLUTIONS) - 1)
        if sol.status != "optimal":
            self.slice_s = longer_slice(self.slice_s)
        return not self.done(stop_gap)

    def count_out(self) -> bool:
        """Settle the question by listing the best plans, when there are few.

        Every plan within the budget has at most ``budget`` option changes,
        so it is among those listed (:func:`tri.rebalance.exhaust.best_plans_within`)
        unless its value is at least the last one listed (:meth:`settle`).
        Returns True when settled.
        """
        if not enumeration_fits(self.pr, self.budget):
            return False
        self.control.report("checking every plan")
        ranked = best_plans_within(
            self.pr, self.goal.neutral_max_a, self.budget, stop=self.control.stop
        )
        if ranked is None:
            return False
        tail = math.inf if ranked.complete or not ranked.values else ranked.values[-1]
        return self.settle(ranked.plans, ranked.values, tail)

    def split_out(self, stop_gap: float) -> bool:
        """Settle the question by listing every plan below a cutoff (:mod:`tri.rebalance.halves`).

        Cutoffs rise from a quarter of the way from ``F`` to the best plan,
        to the best plan divided by ``1 + stop_gap``, to the best plan
        itself (each list costs about the square of its distance to ``F``):
        a plan found below a cutoff that meets the goal is optimal (every
        plan below it is listed); none found raises the bound to the cutoff.
        A list predicted too long (from the last one's pairs) is not tried.
        Returns True when settled.
        """
        if not (math.isfinite(self.best) and halves_fit(self.pr, self.budget)):
            return False
        self.control.report("listing every plan that could beat the best")
        floor, last = self.pr.worst_floor_a, None
        span = self.best - floor
        cutoffs = sorted(
            {
                floor + 0.25 * span,
                floor + 0.5 * span,
                self.best / (1 + stop_gap),
                self.best * (1 - IMPROVE),
            }
        )
        for cutoff in cutoffs:
            if cutoff <= self.lower or cutoff <= floor:
                continue
            if last is not None and last[1] * ((cutoff - floor) / last[0]) ** 2 > PAIR_LIMIT:
                return False
            listed = plans_below(
                self.pr, self.budget, cutoff, self.goal.neutral_max_a, stop=self.control.stop
            )
            if listed is None:
                return False
            last = (cutoff - floor, listed.pairs)
            if self.settle(listed.plans, listed.values, listed.tail) or self.done(stop_gap):
                return True  # optimal, or the bound within the stopping gap
        return False

    def settle(self, plans: list[np.ndarray], values: list[float], tail: float) -> bool:
        """Walk a list of plans by value, the first that meets the goal being the best.

        ``plans`` holds every plan within the budget (passing the capacity
        counts and the neutral limit) whose value is below ``tail``, by
        value. Taken in order, the first that meets the goal exactly (its
        fewest relocations within the budget,
        :func:`tri.rebalance.realise.realise`) is optimal, provided every one
        before it was proven not to; if none below the best plan does,
        the best plan is optimal, and if the list ends first, ``tail`` is a
        lower bound. Returns True when settled (optimal).
        """
        sure = True
        for a, value in zip(plans, values, strict=True):
            if value >= self.best or self.control.stop():
                break
            plan = self.ev.plan(a)
            if self.ev.good(plan):
                self.offer(plan)
                break
            sure = sure and self.ev.proven(a)
        else:
            if sure and math.isfinite(min(tail, self.best)):
                self.lower = max(self.lower, min(tail, self.best) * (1 - 1e-9))
            if not (sure and math.isinf(tail)):
                return False  # the caller's done() decides whether the bound closed
        if not sure or self.control.stop():
            return False
        self.out.proven = True
        if self.out.plan is not None:
            self.lower = max(self.lower, self.out.plan.max_rms_a * (1 - 1e-12))
        return True

    def cross(self) -> None:
        """The floor within the budget (:func:`tri.rebalance.crossing.budget_floor`).

        With few moves, the current a crowded phase can shed is limited by its
        largest movable breakers: a bound above ``F``, in milliseconds.
        """
        if self.budget >= self.pr.n_movable:
            return
        for view in self.views:  # each case's floor bounds the worst case's current
            seen = [] if self.out.plan is None else [spectra(view, self.out.plan.assign)[0]]
            self.lower = max(self.lower, budget_floor(view, self.budget, seen))

    def harmonics(self, stop_gap: float) -> None:
        """The harmonic floor (:mod:`tri.rebalance.harmonic_floor`), and a plan from its minimum.

        The floor is a bound on every plan; when the budget allows every
        breaker to move, the local search also starts from the harmonic
        breakers where the floor's minimum puts them (a plan, not a proof).
        """
        if self.done(stop_gap):
            return
        got = floor_and_start(self.pr, self.control.stop)
        if got is None:
            return
        bound, left = got
        self.lower = max(self.lower, bound)
        if self.done(stop_gap) or self.budget < self.pr.n_movable:
            return
        start = np.full(self.pr.n_free, -1)
        start[left.circuits] = left.options
        ls = LocalSearch(self.pr, self.goal, self.control, start, stop_gap / 2)
        if ls.insert_missing():
            ls.descend()
            ls.iterate(np.random.default_rng(0), share=0.1)
            self.offer(self.ev.plan(ls.assign))

    def within_budget(self, stop_gap: float) -> None:
        """With a budget that binds: exchanges that keep the move count, then the relaxation
        (on a high-leg delta, where there is no floor, the relaxation in a re-layout too).

        :mod:`tri.rebalance.exchange` finds better plans (no proof);
        :mod:`tri.rebalance.relaxation` bounds every plan with fractional
        moves, stopping once the bound closes on the best plan.
        """
        c = self.control
        binds = self.budget < self.pr.n_movable
        # a re-layout on phases 120° apart has the floor F; on a high leg only this bound
        if self.out.plan is None or not (binds or not self.pr.symmetric):
            return
        if binds and not self.done(stop_gap):
            until = c.elapsed() + EXCHANGE_SHARE * c.remaining()
            start = self.out.plan.assign
            self.offer(self.ev.plan(exchange_search(self.pr, self.goal, c, start, until, stop_gap)))
        if not self.done(stop_gap):
            until = c.elapsed() + RELAX_SHARE * c.remaining()
            seen = [self.pr.current_assignment(), self.out.plan.assign]
            enough = self.best / (1 + stop_gap)
            bound = relaxed_bound(
                self.pr, self.budget, seen, enough, stop=lambda: c.stop() or c.elapsed() > until
            )
            self.lower = max(self.lower, -math.inf if bound is None else bound)

    def done(self, stop_gap: float) -> bool:
        if self.best <= self.lower * (1 + PROVEN_GAP):
            self.out.proven = True
            return True
        return self.best <= self.lower * (1 + stop_gap)


def solve_balance(
    pr: Problem,
    goal: Goal,
    control: Control,
    incumbent: Plan | None,
    ev: Evaluator,
    *,
    stop_gap: float = 1e-3,
    list_plans: bool = True,
) -> Outcome:
    """Minimise the (worst case's) largest phase RMS current within the budget (module notes).

    Parameters
    ----------
    pr : Problem
    goal : Goal
        ``target`` is ignored; ``max_moves`` (relocations) and ``neutral_max_a`` apply.
    control : Control
    incumbent : Plan or None
        A plan to beat (from the heuristic).
    ev : Evaluator
    stop_gap : float
        Stop once the best plan is within this fraction of the proven bound [-].
    list_plans : bool
        Settle small questions by listing every plan (:meth:`_BalanceSearch.count_out`).

    Returns
    -------
    Outcome
        ``bound`` is a proven lower bound on the largest phase RMS current
        [A]; with no plan and ``proven``, no plan exists at all.
    """
    search = _BalanceSearch(pr, goal, control, ev)
    out = search.out
    over = [
        n
        for n, (lim, _) in zip(pr.case_names, search.neutral, strict=True)
        if lim is not None and lim < 0
    ]
    if over:
        out.proven = True
        out.notes.append(triplen_note(pr, over))
        return out
    search.offer(incumbent)
    search.cross()
    search.harmonics(stop_gap)
    settled = list_plans and (search.count_out() or search.split_out(stop_gap))
    if not settled:
        search.within_budget(stop_gap)
    if not search.done(stop_gap) and not settled:
        while not control.stop() and search.step(stop_gap):
            pass
    out.bound = max(search.lower, pr.worst_floor_a)
    if out.plan is not None and out.plan.max_rms_a <= out.bound * (1 + PROVEN_GAP):
        out.proven = True
    if out.plan is not None and out.proven:
        out.bound = min(out.bound, out.plan.max_rms_a)
    return out
