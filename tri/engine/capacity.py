"""Room for added load from logged demand (the NEC 220.87 method), and log against schedule.

References
----------
1. NEC (NFPA 70) 220.87, "Determining existing loads": the existing load
   may be taken as 125 % of the maximum demand, the highest average phase
   demand over 15-minute intervals recorded continuously for at least 30
   days; that plus the new load must not exceed the rating of the service or
   feeder (from memory: read the edition your jurisdiction enforces).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: Multiplier NEC 220.87 puts on the recorded maximum demand [-] (from memory).
NEC_220_87_FACTOR = 1.25
#: Shortest recording NEC 220.87 accepts [days] (from memory).
NEC_220_87_MIN_DAYS = 30.0
#: Demand interval NEC 220.87 names [min] (from memory).
NEC_220_87_DEMAND_MINUTES = 15.0


@dataclass(frozen=True)
class AddedLoadCapacity:
    """Existing demand at 125 % plus the new load, phase by phase, against the rating.

    Attributes
    ----------
    demand_a : tuple of 3 float
        Highest average current of each phase over the demand window [A].
    existing_a : tuple of 3 float
        ``factor × demand_a`` [A].
    new_load_a : tuple of 3 float
        Current the new circuits add to each phase [A].
    total_a : tuple of 3 float
        ``existing_a + new_load_a`` [A].
    rating_a : float
        Rating judged against: the main, else the bus [A].
    worst_phase : int
        Phase index with the largest total.
    spare_a : float
        ``rating_a − max(total_a)`` [A]; negative when over.
    within_rating : bool
        True when every phase's total is at most the rating.
    factor : float
        The multiplier on demand [-].
    log_days : float
        Time the log covers with data [days].
    demand_minutes : float
        Demand window used [min].
    is_basis : bool
        True when the log meets the method's conditions (at least
        :data:`NEC_220_87_MIN_DAYS` of data and a 15-minute demand window).
    not_basis_reasons : tuple of str
        Why it is not a basis, in words (empty when it is).
    """

    demand_a: tuple[float, float, float]
    existing_a: tuple[float, float, float]
    new_load_a: tuple[float, float, float]
    total_a: tuple[float, float, float]
    rating_a: float
    worst_phase: int
    spare_a: float
    within_rating: bool
    factor: float
    log_days: float
    demand_minutes: float
    is_basis: bool
    not_basis_reasons: tuple[str, ...]


def added_load_capacity(
    demand_a: np.ndarray,
    new_load_a: np.ndarray,
    rating_a: float,
    *,
    log_days: float,
    demand_minutes: float,
    factor: float = NEC_220_87_FACTOR,
) -> AddedLoadCapacity:
    """The NEC 220.87 comparison for one panel.

    Parameters
    ----------
    demand_a : float ndarray, shape (3,)
        Highest average current of each phase over the demand window [A].
    new_load_a : float ndarray, shape (3,)
        Current the new circuits add to each phase [A].
    rating_a : float
        Main (or bus) rating [A].
    log_days : float
        Time covered by recorded data [days].
    demand_minutes : float
        Demand window [min].
    factor : float
        Multiplier on the recorded demand [-].

    Returns
    -------
    AddedLoadCapacity

    Notes
    -----
    Per phase: ``total_p = factor · D_p + N_p`` and the check is
    ``max_p total_p <= rating`` [1]. The figures are computed whatever the
    log's length; ``is_basis`` says whether the method accepts them.
    """
    d = np.asarray(demand_a, dtype=float).reshape(3)
    n = np.asarray(new_load_a, dtype=float).reshape(3)
    if not rating_a > 0:
        raise ValueError(f"rating must be > 0, got {rating_a!r}")
    existing = factor * d
    total = existing + n
    worst = int(np.nanargmax(np.where(np.isfinite(total), total, -np.inf)))
    reasons = []
    if log_days < NEC_220_87_MIN_DAYS:
        reasons.append(
            f"the log covers {log_days:.1f} days of data; the method needs at least "
            f"{NEC_220_87_MIN_DAYS:g}"
        )
    if demand_minutes != NEC_220_87_DEMAND_MINUTES:
        reasons.append(
            f"the demand window is {demand_minutes:g} minutes; the method uses "
            f"{NEC_220_87_DEMAND_MINUTES:g}"
        )
    spare = float(rating_a - total[worst])
    return AddedLoadCapacity(
        demand_a=_triple(d),
        existing_a=_triple(existing),
        new_load_a=_triple(n),
        total_a=_triple(total),
        rating_a=float(rating_a),
        worst_phase=worst,
        spare_a=spare,
        within_rating=bool(np.all(total <= rating_a)),
        factor=float(factor),
        log_days=float(log_days),
        demand_minutes=float(demand_minutes),
        is_basis=not reasons,
        not_basis_reasons=tuple(reasons),
    )


def _triple(x: np.ndarray) -> tuple[float, float, float]:
    return (float(x[0]), float(x[1]), float(x[2]))


@dataclass(frozen=True)
class ShareComparison:
    """Each phase's share of the three phase currents, logged against scheduled.

    Attributes
    ----------
    logged_pct : tuple of 3 float
        ``100·I_p / (I_A + I_B + I_C)`` of the logged average currents [%].
    scheduled_pct : tuple of 3 float
        The same of the schedule's phase RMS currents [%].
    difference_pts : tuple of 3 float
        ``logged − scheduled`` [percentage points]; positive where the phase
        carries more than the schedule explains.
    most_over : int
        Phase index with the largest difference.
    """

    logged_pct: tuple[float, float, float]
    scheduled_pct: tuple[float, float, float]
    difference_pts: tuple[float, float, float]
    most_over: int


def phase_shares(logged_a: np.ndarray, scheduled_a: np.ndarray) -> ShareComparison:
    """Compare how the log and the schedule split current among the phases.

    Parameters
    ----------
    logged_a : float ndarray, shape (3,)
        Logged average current of each phase [A].
    scheduled_a : float ndarray, shape (3,)
        Schedule's phase RMS current [A].

    Returns
    -------
    ShareComparison
        Shares are 0 when a total is 0.

    Notes
    -----
    Shares remove the overall level (the log sees diversity and duty cycles
    that a connected-load schedule does not), leaving where the current
    goes: a phase whose logged share is well above its scheduled share has
    load the schedule does not show, or shows on another phase.
    """
    logged = _shares(np.asarray(logged_a, dtype=float).reshape(3))
    sched = _shares(np.asarray(scheduled_a, dtype=float).reshape(3))
    diff = logged - sched
    return ShareComparison(
        logged_pct=_triple(logged),
        scheduled_pct=_triple(sched),
        difference_pts=_triple(diff),
        most_over=int(np.argmax(diff)),
    )


def _shares(x: np.ndarray) -> np.ndarray:
    total = float(np.sum(x))
    return 100.0 * x / total if total > 0 else np.zeros(3)
