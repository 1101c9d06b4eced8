"""A plan as the electrician would carry it out, and the exact checks every plan passes.

A :class:`Plan` is options (phases) *and* an arrangement (slots), with the
exact figures of the options (superposition of the engine's currents) and
the relocations of the arrangement. The :class:`Evaluator` makes plans
from options (the fewest relocations that realise them,
:func:`tri.rebalance.realise.realise`) or from a model's solution (its
stayers and windows), and judges them against the goal with the exact
figures, never with a model's approximation.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.rebalance.control import Control
from tri.rebalance.geometry import Window
from tri.rebalance.goal import Goal
from tri.rebalance.plan_currents import Assessment, assess
from tri.rebalance.problem import Problem
from tri.rebalance.realise import REALISE_TIME_S, Arrangement, arrange, realise

#: Relative tolerance of the exact checks (round-off only) [-].
TOL = 1e-9


@dataclass(frozen=True)
class Plan:
    """Options, slots and exact figures of one plan.

    Attributes
    ----------
    assign : int ndarray, shape (F,)
        Option of each free circuit.
    arrangement : Arrangement
        First slots (two-column panels) and relocations.
    figures : Assessment
        Exact phase and neutral RMS currents and deviation.
    """

    assign: np.ndarray
    arrangement: Arrangement
    figures: Assessment

    @property
    def relocations(self) -> int:
        """Breakers relocated, as the work order counts them [-]."""
        return self.arrangement.relocations

    @property
    def max_rms_a(self) -> float:
        """Largest phase RMS current [A]."""
        return self.figures.max_rms_a


class Evaluator:
    """Plans from options or solutions, and the exact checks (module notes)."""

    def __init__(self, pr: Problem, goal: Goal, control: Control | None = None) -> None:
        self.pr = pr
        self.goal = goal
        self.control = control
        self._cache: dict[bytes, Plan | None] = {}
        self._proven: dict[bytes, bool] = {}

    def plan(self, assign: np.ndarray) -> Plan | None:
        """The plan of these options with the fewest relocations; None if they do not fit."""
        a = np.asarray(assign, dtype=int)
        key = a.tobytes()
        if key not in self._cache:
            left = self.control.remaining() if self.control is not None else REALISE_TIME_S
            arr, proven = realise(self.pr, a, left)
            self._cache[key] = None if arr is None else Plan(a.copy(), arr, assess(self.pr, a))
            self._proven[key] = proven
        return self._cache[key]

    def proven(self, assign: np.ndarray) -> bool:
        """Whether :meth:`plan` of these options is proven (fewest relocations, or no fit)."""
        a = np.asarray(assign, dtype=int)
        self.plan(a)
        return self._proven.get(a.tobytes(), False)

    def from_solution(
        self, assign: np.ndarray, stays: np.ndarray, windows: list[Window]
    ) -> Plan | None:
        """The plan a model's solution describes (its stayers and windows)."""
        a = np.asarray(assign, dtype=int)
        if self.pr.geometry is None:
            return self.plan(a)
        arr = arrange(self.pr, a, stays, windows)
        if arr is None:
            return None
        plan = Plan(a.copy(), arr, assess(self.pr, a))
        key = a.tobytes()
        cached = self._cache.get(key)
        if key in self._cache and (cached is None or plan.relocations < cached.relocations):
            # fewer than the realisation found: that one was not the fewest
            self._cache[key], self._proven[key] = plan, False
        return plan

    def meets_target(self, figures: Assessment) -> bool:
        """The target on the deviation (if any) holds, to round-off."""
        t = self.goal.target
        return t is None or figures.deviation_pct <= 100.0 * t * (1 + TOL) + 1e-12

    def meets_neutral(self, figures: Assessment) -> bool:
        """The neutral limit (if any) holds, to round-off."""
        lim = self.goal.neutral_max_a
        return lim is None or not self.pr.has_neutral or figures.neutral_rms_a <= lim * (1 + TOL)

    def within_budget(self, plan: Plan) -> bool:
        """At most the goal's number of relocations."""
        k = self.goal.max_moves
        return k is None or plan.relocations <= k

    def good(self, plan: Plan | None) -> bool:
        """Meets the target, the neutral limit and the budget."""
        return (
            plan is not None
            and self.meets_target(plan.figures)
            and self.meets_neutral(plan.figures)
            and self.within_budget(plan)
        )
