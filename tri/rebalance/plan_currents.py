"""A plan's currents by superposition, and its exact figures with the engine's own formulas.

At nominal voltage the engine is linear in the circuits, so a plan's phase
and neutral spectra are the fixed circuits' currents plus those of the
options taken (:func:`spectra`); the RMS currents, the deviation and the
sequence components then come from the engine's functions
(:func:`tri.engine.harmonics.rms`, :func:`tri.engine.unbalance.deviation_rate_pct`,
:func:`tri.engine.sequence.sequence_of_orders`). The floor ``F`` is defined
in :mod:`tri.rebalance.problem`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from tri.engine.harmonics import is_triplen, rms
from tri.engine.sequence import sequence_of_orders
from tri.engine.unbalance import deviation_rate_pct

if TYPE_CHECKING:
    from tri.rebalance.problem import Problem


def floor_of(spectrum: np.ndarray, orders: np.ndarray) -> float:
    """``F = sqrt(Σ_h |J_h|²)``, the order-invariant sequence currents (module notes).

    Parameters
    ----------
    spectrum : complex ndarray, shape (3, H)
        Phase currents at each order [A].
    orders : int ndarray, shape (H,)
        Orders of the columns.

    Returns
    -------
    float
        ``F`` [A]; ``|I_1|`` (positive sequence) when only order 1 is present.
    """
    return float(rms(sequence_of_orders(spectrum, orders)))


def spectra(problem: Problem, assign: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Phase and neutral currents of a plan, by superposition.

    Parameters
    ----------
    problem : Problem
    assign : int ndarray, shape (F,)
        Option index chosen for each free circuit.

    Returns
    -------
    phase : complex ndarray, shape (3, H)
        Line currents per order [A].
    neutral : complex ndarray, shape (H,)
        Neutral current per order [A].
    """
    a = np.asarray(assign, dtype=int)
    return (
        problem.base + problem.contrib[a].sum(axis=0),
        problem.nbase + problem.ncontrib[a].sum(axis=0),
    )


@dataclass(frozen=True)
class Assessment:
    """Exact figures of one plan in every case (by superposition of the engine's currents).

    Attributes
    ----------
    phase_rms_a : tuple of 3 float
        RMS current of each phase in the first case (the connected load) [A].
    neutral_rms_a : float
        Largest RMS neutral current over the cases [A] (0 on a 3-wire system).
    deviation_pct : float
        Largest deviation of a phase RMS current from their mean, over the cases [%].
    cases : tuple of CaseFigures
        The figures in each case (:attr:`tri.rebalance.problem.Problem.case_names` order).
    """

    phase_rms_a: tuple[float, float, float]
    neutral_rms_a: float
    deviation_pct: float
    cases: tuple[CaseFigures, ...] = ()

    @property
    def max_rms_a(self) -> float:
        """Largest phase RMS current over every case [A] (the worst case's)."""
        if not self.cases:
            return max(self.phase_rms_a)
        return max(c.max_rms_a for c in self.cases)


@dataclass(frozen=True)
class CaseFigures:
    """Exact figures of a plan in one case.

    Attributes
    ----------
    name : str
    phase_rms_a : tuple of 3 float
        [A].
    neutral_rms_a : float
        [A] (0 on a 3-wire system).
    deviation_pct : float
        [%].
    """

    name: str
    phase_rms_a: tuple[float, float, float]
    neutral_rms_a: float
    deviation_pct: float

    @property
    def max_rms_a(self) -> float:
        """Largest phase RMS current [A]."""
        return max(self.phase_rms_a)


def assess(problem: Problem, assign: np.ndarray) -> Assessment:
    """Exact figures of a plan in every case (see :class:`Assessment`), engine formulas."""
    cases = []
    for view, name in zip(problem.views(), problem.case_names, strict=True):
        v, n = spectra(view, assign)
        r = rms(v)
        cases.append(
            CaseFigures(
                name=name,
                phase_rms_a=(float(r[0]), float(r[1]), float(r[2])),
                neutral_rms_a=float(rms(n)) if problem.has_neutral else 0.0,
                deviation_pct=float(deviation_rate_pct(r)),
            )
        )
    return Assessment(
        phase_rms_a=cases[0].phase_rms_a,
        neutral_rms_a=max(c.neutral_rms_a for c in cases),
        deviation_pct=max(c.deviation_pct for c in cases),
        cases=tuple(cases),
    )


def triplen_neutral_a(problem: Problem) -> float:
    """RMS of the neutral's triplen orders, the same for every plan [A].

    A 1-pole circuit's current at a triplen order is the same phasor on
    whichever phase it sits (the rotation ``a^(-h·k)`` is 1 for ``h ≡ 0
    mod 3``), so no move changes it.
    """
    if not problem.has_neutral or not problem.symmetric:
        return 0.0  # a high-leg delta: a 120 V load on A or C has opposite triplens
    _, n = spectra(problem, problem.current_assignment())  # this problem's own case
    return float(rms(n[is_triplen(problem.orders)]))
