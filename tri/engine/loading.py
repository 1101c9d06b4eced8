"""Loading against ratings: the code's sizing rule, per panel and per breaker.

Two different questions, kept apart:

* **Current**: the phase's true-RMS current against the main breaker (the
  bus without a main). Above 100 % the equipment is overloaded (a limit);
  above the design headroom (80 % by default) it is near (a warning named
  as headroom, never as a code rule).
* **Sizing** (the code's rule): the noncontinuous load plus 125 % of the
  continuous load (the factor is a setting) against the main, the bus
  (408.30) and each circuit's breaker (210.20(A)). Loads are the scheduled
  ones at nominal voltage, added as the code's load calculation and panel
  schedules add them (VA per phase); harmonics and the voltage iteration
  change the physical current, not the calculation.

Every finding names its source and defers to local code. Messages use the
phase labels and circuit labels passed in, never text read from a file.
Thresholds, factors and sources come from :mod:`tri.engine.limits`.

References
----------
1. NFPA 70 (NEC) 210.20(A), 215.2(A)(1), 215.3, 230.42(A)(1), 408.30,
   408.36 (published, secondary); see :mod:`tri.engine.limits`.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from tri.engine.inputs import CircuitArrays, Ratings
from tri.engine.limits import (
    CLAUSE_BRANCH,
    CLAUSE_IEC_SIZING,
    CLAUSE_SIZING_BUS,
    CLAUSE_SIZING_MAIN,
    IEC,
    LOCAL,
    NEAR,
    RATING_PCT,
    SRC_BRANCH,
    SRC_EQUIPMENT_RATING,
    SRC_IEC_SIZING,
    SRC_MAIN_ABOVE_BUS,
    SRC_SIZING_BUS,
    SRC_SIZING_MAIN,
    FindingLimits,
    exceeds,
    loading_word,
    practice_for,
)
from tri.engine.phasors import connection_masks, schedule_va
from tri.engine.results import Finding, PanelAnalysis

__all__ = [
    "LOCAL",
    "FindingLimits",
    "breaker_findings",
    "calculated_load_a",
    "circuit_calculated_a",
    "continuous_weights",
    "loading_findings",
    "loading_pct",
    "neutral_calculated_load_a",
    "scheduled_current_a",
    "sizing_clauses",
    "sizing_sources",
]


def loading_pct(current_a: np.ndarray, rating_a: float) -> np.ndarray:
    """Current as a percent of a rating.

    Parameters
    ----------
    current_a : ndarray
        Current [A].
    rating_a : float
        Rating [A], > 0.

    Returns
    -------
    ndarray
        ``100·I / rating`` [%].
    """
    return 100.0 * np.asarray(current_a, dtype=float) / float(rating_a)


def continuous_weights(continuous: np.ndarray, factor: float) -> np.ndarray:
    """Multiplier on each circuit for the sizing rule.

    Parameters
    ----------
    continuous : bool ndarray, shape (..., n)
        Continuous loads (3 h or more).
    factor : float
        Continuous factor [-] (1.25, :data:`tri.engine.limits.CONTINUOUS_FACTOR`).

    Returns
    -------
    float ndarray, shape (..., n)
        ``factor`` on continuous rows, 1 elsewhere [-].
    """
    return np.where(np.asarray(continuous, dtype=bool), np.asarray(factor, dtype=float), 1.0)


def scheduled_current_a(circuits: CircuitArrays, v_ln: float | np.ndarray) -> np.ndarray:
    """Each circuit's line current from its scheduled load at nominal voltage [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    v_ln : float or ndarray broadcasting against shape (..., n)
        Nominal line-to-neutral voltage [V] (``v_ll/√3`` on a 3-wire system).

    Returns
    -------
    ndarray, shape (..., n)
        ``|S|/V_LN`` (1 pole), ``|S|/V_LL`` (2 poles), ``|S|/(√3·V_LL)``
        (3 poles), 0 unplaced [A], with ``V_LL = √3·V_LN``, the magnitude of
        the engine's nominal ``V_A − V_B`` (so a load given in amperes comes
        back unchanged): the load as the schedule states it, the figure the
        code's calculations use (nameplate loads, nominal voltage), without
        the harmonic profile and whatever ``--iterate``.
    """
    ln, ll, tp = connection_masks(circuits)
    v = np.asarray(v_ln, dtype=float)
    v_ll = np.sqrt(3.0) * v
    volts = np.where(ln, v, np.where(ll, v_ll, np.sqrt(3.0) * v_ll))
    s = np.abs(np.asarray(circuits.s_va, dtype=complex))
    return np.where(ln | ll | tp, s / volts, 0.0)


def circuit_calculated_a(
    circuits: CircuitArrays, factor: float | np.ndarray, v_ln: float | np.ndarray
) -> np.ndarray:
    """Each circuit's calculated load for its breaker: continuous ones at the factor.

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    factor : float
        Continuous factor [-].
    v_ln : float
        Nominal line-to-neutral voltage [V] (:func:`scheduled_current_a`).

    Returns
    -------
    ndarray, shape (..., n)
        ``factor·I`` for continuous circuits, ``I`` otherwise, with ``I`` the
        scheduled line current [A] (NEC 210.20(A): a circuit is either
        continuous or not, so its "noncontinuous plus 125 % of continuous" is
        one of the two).
    """
    weights = continuous_weights(circuits.continuous, factor)
    return weights * scheduled_current_a(circuits, v_ln)


def calculated_load_a(circuits: CircuitArrays, factor: float, v_ln: float) -> np.ndarray:
    """The code's calculated load on each phase [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    factor : float
        Continuous factor [-].
    v_ln : float
        Nominal line-to-neutral voltage [V] (``v_ll/√3`` on a 3-wire system).

    Returns
    -------
    ndarray, shape (..., 3)
        ``Σ_c w_c·VA_c,p / V_LN`` [A]: the scheduled VA on each phase, with
        ``w_c`` the continuous factor on continuous circuits and 1 on the
        others.

    Notes
    -----
    The code's load calculation adds VA per phase (NEC Article 220), as a
    panel schedule does: all of a 1-pole circuit's VA on its phase, half of
    a 2-pole's on each of its two, a third of a 3-pole's on each
    (:func:`tri.engine.phasors.schedule_va`); dividing by ``V_LN`` gives
    amperes. For a circuit of scheduled line current ``I`` that is ``I`` (1
    pole; 3 poles on a wye, ``√3·V_LL·I/3/V_LN = I``) and ``I·V_LL/(2·V_LN)``
    for 2 poles (``√3/2·I`` on a wye). Loads add arithmetically, as the
    code's calculation does; the physical current (phasors, harmonics) is
    the RMS phase current, judged separately against the rating.
    """
    weights = continuous_weights(circuits.continuous, factor)
    weighted = replace(circuits, s_va=np.asarray(circuits.s_va) * weights)
    return schedule_va(weighted) / float(v_ln)


def neutral_calculated_load_a(circuits: CircuitArrays, v_ln: float) -> np.ndarray:
    """The neutral load of the code's calculation: the maximum unbalanced load [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    v_ln : float
        Nominal line-to-neutral voltage [V].

    Returns
    -------
    ndarray, shape (...)
        ``max_p Σ_{1-pole c on p} |S_c| / V_LN`` [A]: the largest scheduled
        line-to-neutral load on any one phase, at 100 % (NEC 220.61(A); a
        neutral not connected to an overcurrent device takes no 125 %,
        215.2(A)(1) Exception No. 2). 2- and 3-pole circuits put no load on
        the neutral.
    """
    ln, _, _ = connection_masks(circuits)
    line_to_neutral = replace(circuits, s_va=np.where(ln, np.asarray(circuits.s_va), 0.0))
    return np.max(schedule_va(line_to_neutral), axis=-1) / float(v_ln)


def calculation_words(factor: float) -> str:
    """What the calculated load is, in words, for a continuous factor [-]."""
    if factor == 1.0:
        return "no continuous-load factor"
    return f"noncontinuous plus {factor * 100:g} % of continuous"


def sizing_sources(frequency_hz: float, has_main: bool, factor: float) -> tuple[str, str]:
    """Sources of the sizing rule against the panel and against a branch breaker.

    Parameters
    ----------
    frequency_hz : float
        System frequency [Hz] (:func:`tri.engine.limits.practice_for`).
    has_main : bool
        The panel has a main breaker (else its bus is judged, 408.30).
    factor : float
        Continuous factor [-]: a factor other than 1 is the NEC's rule,
        whatever the frequency.

    Returns
    -------
    panel, branch : str
        Source texts with their tags: IEC 60364-4-43 on an IEC-practice
        panel without a continuous factor, the NEC's clauses otherwise.
    """
    if practice_for(frequency_hz) == IEC and factor == 1.0:
        return SRC_IEC_SIZING, SRC_IEC_SIZING
    return (SRC_SIZING_MAIN if has_main else SRC_SIZING_BUS), SRC_BRANCH


def sizing_clauses(frequency_hz: float, has_main: bool, factor: float) -> tuple[str, str]:
    """Short names of :func:`sizing_sources`' clauses (panel, branch), for summaries."""
    if practice_for(frequency_hz) == IEC and factor == 1.0:
        return CLAUSE_IEC_SIZING, CLAUSE_IEC_SIZING
    return (CLAUSE_SIZING_MAIN if has_main else CLAUSE_SIZING_BUS), CLAUSE_BRANCH


def _and(items: list[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def _lead(labels: list[str], figures: list[str]) -> str:
    """``"Phase A 202.7 A"`` or ``"Phases A and B 204.5 A and 176.7 A"`` (figure first,
    so a one-line view keeps it)."""
    word = "Phase" if len(labels) == 1 else "Phases"
    return f"{word} {_and(labels)} {_and(figures)}"


def loading_findings(a: PanelAnalysis, ratings: Ratings, limits: FindingLimits) -> list[Finding]:
    """Findings on the phases' current and the code's sizing rule.

    Parameters
    ----------
    a : PanelAnalysis
        The panel's figures (``findings`` not used).
    ratings : Ratings
        Bus and main [A] (which one ``a.rating_a`` is, and 408.36).
    limits : FindingLimits
        ``headroom_pct``.

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    rating = a.rating_a
    what = "main" if ratings.main_a is not None else "bus (no main)"
    over = [p for p in a.phases if exceeds(p.loading_pct, RATING_PCT)]
    if over:
        lead = _lead(
            [p.label for p in over], [f"{p.rms_a:.1f} A ({p.loading_pct:.1f} %)" for p in over]
        )
        out.append(
            Finding(
                "limit",
                f"{lead} RMS, over the {rating:g} A rating of the {what}.",
                f"{SRC_EQUIPMENT_RATING}; {LOCAL}",
            )
        )
    sizing = [p for p in a.phases if exceeds(p.calculated_pct, RATING_PCT)]
    if sizing:
        lead = _lead(
            [p.label for p in sizing],
            [f"{p.calculated_a:.1f} A ({p.calculated_pct:.1f} %)" for p in sizing],
        )
        source, _ = sizing_sources(a.frequency_hz, ratings.main_a is not None, a.continuous_factor)
        out.append(
            Finding(
                "limit",
                f"{lead} calculated load, over the {rating:g} A rating of the {what} "
                f"({calculation_words(a.continuous_factor)}).",
                f"{source}; {LOCAL}",
            )
        )
    if ratings.main_a is not None and ratings.main_a > ratings.bus_a:
        out.append(
            Finding(
                "limit",
                f"The {ratings.main_a:g} A main is rated above the {ratings.bus_a:g} A bus.",
                f"{SRC_MAIN_ABOVE_BUS}; {LOCAL}",
            )
        )
        bus_over = [p for p in a.phases if exceeds(p.calculated_a, ratings.bus_a)]
        if bus_over:
            lead = _lead([p.label for p in bus_over], [f"{p.calculated_a:.1f} A" for p in bus_over])
            out.append(
                Finding(
                    "limit",
                    f"{lead} calculated load, over the {ratings.bus_a:g} A rating of the bus.",
                    f"{SRC_SIZING_BUS}; {LOCAL}",
                )
            )
    near = [p for p in a.phases if loading_word(p.loading_pct, limits.headroom_pct) == NEAR]
    if near:
        lead = _lead([p.label for p in near], [f"{p.loading_pct:.1f} %" for p in near])
        out.append(
            Finding(
                "warning",
                f"{lead} of the {rating:g} A rating of the {what}, above the "
                f"{limits.headroom_pct:g} % design "
                "headroom; little room for added load.",
                f"design headroom of {limits.headroom_pct:g} % (common practice; a margin, "
                f"not a code rule); {LOCAL}",
            )
        )
    return out


def breaker_findings(
    a: PanelAnalysis,
    breaker_a: np.ndarray,
    continuous: np.ndarray,
    circuit_labels: tuple[str, ...],
) -> list[Finding]:
    """Circuits whose calculated load is over their breaker (NEC 210.20(A)).

    Parameters
    ----------
    a : PanelAnalysis
        ``circuit_calculated_a``, ``continuous_factor``.
    breaker_a : ndarray, shape (n,)
        Breaker ratings [A]; NaN where none is given.
    continuous : bool ndarray, shape (n,)
        Continuous circuits.
    circuit_labels : tuple of str
        How messages name each circuit (slot or phases, and name).

    Returns
    -------
    list of Finding
        One limit per circuit over its breaker (equal passes).
    """
    out: list[Finding] = []
    cf = a.continuous_factor
    _, source = sizing_sources(a.frequency_hz, True, cf)
    for k, rating in enumerate(np.asarray(breaker_a, dtype=float)):
        need = a.circuit_calculated_a[k]
        if not np.isfinite(rating) or not exceeds(need, rating):
            continue
        cont = bool(continuous[k]) and cf != 1.0
        how = f" (continuous {need / cf:.1f} A at {cf * 100:g} %)" if cont else ""
        out.append(
            Finding(
                "limit",
                f"{circuit_labels[k]}: {need:.1f} A over its {rating:g} A breaker{how}.",
                f"{source}; {LOCAL}",
            )
        )
    return out
