"""What a search aims at, and how candidate plans are scored against it.

Scores (lexicographic, smaller is better): for *balance*, the largest phase
RMS current (plus a penalty on neutral current above the limit), then the
sum of squared phase RMS currents (which spreads the rest evenly); for a
*target*, the deviation above the target (plus the relative neutral
excess), then the largest phase RMS current. The RMS currents are the
engine's formula (:func:`tri.engine.harmonics.rms`) on exact spectra.

With several cases (:mod:`tri.rebalance.problem`, Cases) the currents carry a
case axis before the phases: balance scores the worst case (its largest
phase RMS current plus its neutral penalty) and spreads the rest over every
case; a target scores the sum over the cases of what each misses (every
case must meet it), then the worst case's largest phase RMS current.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.harmonics import rms
from tri.rebalance.problem import Problem

#: Neutral excess weight in the balance score [A of phase per A of neutral].
NEUTRAL_WEIGHT = 1.0e3


@dataclass(frozen=True)
class Goal:
    """What the search aims at.

    Attributes
    ----------
    target : float or None
        Largest allowed deviation of phase RMS currents from their mean, as
        a fraction [-]; None for *balance* (minimise the largest phase RMS).
    neutral_max_a : float or None
        Largest allowed neutral RMS current [A].
    max_moves : int or None
        Largest number of moves; None for no limit.
    """

    target: float | None = None
    neutral_max_a: float | None = None
    max_moves: int | None = None


def measures(
    problem: Problem, goal: Goal, v: np.ndarray, n: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Primary and secondary scores of candidate plans (module notes).

    Parameters
    ----------
    problem : Problem
    goal : Goal
    v : complex ndarray, shape (..., S, 3, H)
        Phase currents per case and order [A].
    n : complex ndarray, shape (..., S, H)
        Neutral currents per case and order [A].

    Returns
    -------
    primary, secondary : float ndarray, shape (...)
        Balance: ``max over cases of (max R_p + w·neutral excess)`` [A] and
        ``Σ R_p²`` over cases and phases [A²]. Target: the sum over cases of
        ``max(0, deviation - target) + neutral excess / limit`` [-] and the
        largest ``R_p`` over cases [A].
    """
    r = rms(v)  # (..., S, 3)
    top = r.max(axis=-1)  # (..., S)
    excess = np.zeros_like(top)
    if goal.neutral_max_a is not None and problem.has_neutral:
        excess = np.maximum(0.0, rms(n) - goal.neutral_max_a)
    if goal.target is None:
        return (top + NEUTRAL_WEIGHT * excess).max(axis=-1), np.sum(r * r, axis=(-1, -2))
    mean = r.mean(axis=-1)
    dev = np.max(np.abs(r - mean[..., None]), axis=-1) / np.where(mean > 0, mean, 1.0)
    viol = np.maximum(0.0, dev - goal.target)
    if goal.neutral_max_a is not None:
        viol = viol + excess / max(goal.neutral_max_a, 1e-9)
    return viol.sum(axis=-1), top.max(axis=-1)
