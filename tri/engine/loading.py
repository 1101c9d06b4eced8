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
from tri.engine.phasors import connection_masks, element_currents, schedule_va
from tri.engine.results import Finding, PanelAnalysis
from tri.engine.sequence import sequence_components

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


def continuous_weights(continuous: np.ndarray, factor: float | np.ndarray) -> np.ndarray:
    """Multiplier on each circuit for the sizing rule.

    Parameters
    ----------
    continuous : bool ndarray, shape (..., n)
        Continuous loads (3 h or more).
    factor : float or float ndarray broadcastable to (..., n)
        Continuous factor [-] (1.25, :data:`tri.engine.limits.CONTINUOUS_FACTOR`);
        an array gives each panel of a batch its own (shape (..., 1)).

    Returns
    -------
    float ndarray, shape (..., n)
        ``factor`` on continuous rows, 1 elsewhere [-].
    """
    return np.where(np.asarray(continuous, dtype=bool), np.asarray(factor, dtype=float), 1.0)


def scheduled_current_a(circuits: CircuitArrays, v_phase: np.ndarray) -> np.ndarray:
    """Each circuit's line current from its scheduled load at nominal voltage [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    v_phase : complex ndarray, shape (3,) or (..., 3)
        Nominal phase-to-neutral phasors [V]: balanced ``V_LN∠0°, ∠−120°,
        ∠+120°`` on a wye (``V_LL/√3`` on a 3-wire system), the high-leg set
        on a high-leg delta (:func:`tri.engine.high_leg.supply_phase_voltages`).

    Returns
    -------
    ndarray, shape (..., n)
        ``|S|/|V_p|`` (1 pole), ``|S|/|V_p − V_q|`` (2 poles),
        ``|S|/(3·|V_1|)`` (3 poles, ``V_1`` the positive-sequence voltage), 0
        unplaced [A]. On a wye that is ``|S|/V_LN``, ``|S|/V_LL`` and
        ``|S|/(√3·V_LL)`` with ``V_LL = √3·V_LN``, the magnitude of the
        engine's nominal ``V_A − V_B`` (so a load given in amperes comes back
        unchanged); on a 240/120 V high-leg delta every line pair is 240 V and
        ``|V_1| = 240/√3``. The load as the schedule states it, the figure the
        code's calculations use (nameplate loads, nominal voltage), without
        the harmonic profile and whatever ``--iterate``.
    """
    return np.abs(element_currents(circuits, np.asarray(v_phase, dtype=complex)))


def phase_voltage_magnitudes(v_phase: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``|V_p|`` of each phase and ``|V_1|``, the voltage the code divides VA shares by.

    Parameters
    ----------
    v_phase : complex ndarray, shape (..., 3)
        Nominal phase-to-neutral phasors [V].

    Returns
    -------
    to_neutral : ndarray, shape (..., 3)
        Each phase's voltage to neutral [V] (the divisor of 1-pole VA).
    equivalent : ndarray, shape (...)
        ``|V_1| = V_LL/√3`` for a symmetric line-voltage set [V] (the divisor
        of the per-phase share of 2- and 3-pole VA); ``V_LN`` on a wye.
    """
    v = np.asarray(v_phase, dtype=complex)
    return np.abs(v), np.abs(sequence_components(v)[..., 1])


def circuit_calculated_a(
    circuits: CircuitArrays, factor: float | np.ndarray, v_phase: np.ndarray
) -> np.ndarray:
    """Each circuit's calculated load for its breaker: continuous ones at the factor.

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    factor : float or float ndarray broadcastable to (..., n)
        Continuous factor [-].
    v_phase : complex ndarray, shape (3,) or (..., 3)
        Nominal phase-to-neutral phasors [V] (:func:`scheduled_current_a`).

    Returns
    -------
    ndarray, shape (..., n)
        ``factor·I`` for continuous circuits, ``I`` otherwise, with ``I`` the
        scheduled line current [A] (NEC 210.20(A): a circuit is either
        continuous or not, so its "noncontinuous plus 125 % of continuous" is
        one of the two).
    """
    weights = continuous_weights(circuits.continuous, factor)
    return weights * scheduled_current_a(circuits, v_phase)


def calculated_load_a(circuits: CircuitArrays, factor: float, v_phase: np.ndarray) -> np.ndarray:
    """The code's calculated load on each phase [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    factor : float
        Continuous factor [-].
    v_phase : complex ndarray, shape (3,)
        Nominal phase-to-neutral phasors [V] (:func:`scheduled_current_a`).

    Returns
    -------
    ndarray, shape (..., 3)
        ``Σ_c w_c·VA_c,p / V_c,p`` [A]: the scheduled VA on each phase, with
        ``w_c`` the continuous factor on continuous circuits and 1 on the
        others, and ``V_c,p`` the phase's voltage to neutral for a 1-pole
        row, ``|V_1|`` for the share of a 2- or 3-pole row
        (:func:`phase_voltage_magnitudes`). On a wye both are ``V_LN``.

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

    On a 240/120 V high-leg delta a 1-pole row is on a 120 V low leg
    (``|V_p| = 120``) and 2- and 3-pole shares are over ``|V_1| = 240/√3``,
    so a balanced 3-pole load of ``S`` gives ``S/(√3·240)`` on each phase,
    its line current [computed].
    """
    weights = continuous_weights(circuits.continuous, factor)
    s = np.asarray(circuits.s_va) * weights
    ln, _, _ = connection_masks(circuits)
    to_neutral, equivalent = phase_voltage_magnitudes(v_phase)
    ln_va = schedule_va(replace(circuits, s_va=np.where(ln, s, 0.0)))
    multi_va = schedule_va(replace(circuits, s_va=np.where(ln, 0.0, s)))
    return ln_va / to_neutral + multi_va / equivalent


def neutral_calculated_load_a(circuits: CircuitArrays, v_phase: np.ndarray) -> np.ndarray:
    """The neutral load of the code's calculation: the maximum unbalanced load [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    v_phase : complex ndarray, shape (3,)
        Nominal phase-to-neutral phasors [V] (:func:`scheduled_current_a`).

    Returns
    -------
    ndarray, shape (...)
        ``max_p Σ_{1-pole c on p} |S_c| / |V_p|`` [A]: the largest scheduled
        line-to-neutral load on any one phase, at 100 % (NEC 220.61(A); a
        neutral not connected to an overcurrent device takes no 125 %,
        215.2(A)(1) Exception No. 2). 2- and 3-pole circuits put no load on
        the neutral; each leg to neutral of a breaker with a neutral or of a
        shared neutral is a 1-pole row on its own phase and counts there. On
        a wye ``|V_p| = V_LN``. On a high-leg delta the schedule refuses any
        load to neutral on the high leg, so only the 120 V loads of the two
        low legs count (a row to neutral on the high leg, which the engine
        can still be given, would count at its own 207.8 V).
    """
    ln, _, _ = connection_masks(circuits)
    line_to_neutral = replace(circuits, s_va=np.where(ln, np.asarray(circuits.s_va), 0.0))
    to_neutral, _ = phase_voltage_magnitudes(v_phase)
    return np.max(schedule_va(line_to_neutral) / to_neutral, axis=-1)


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
    breaker: np.ndarray | None = None,
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
    breaker : int ndarray, shape (n,), optional
        ``CircuitArrays.breaker``: rows with one number are the legs of one
        breaker, whose ``circuit_calculated_a`` is already that of its
        largest pole (:func:`tri.engine.legs.breaker_calculated_a`); only
        its first row is judged, so a breaker gets one finding.

    Returns
    -------
    list of Finding
        One limit per breaker over its rating (equal passes).
    """
    out: list[Finding] = []
    cf = a.continuous_factor
    _, source = sizing_sources(a.frequency_hz, True, cf)
    numbers = None if breaker is None else np.asarray(breaker)
    seen: set[int] = set()
    for k, rating in enumerate(np.asarray(breaker_a, dtype=float)):
        legs = 1
        if numbers is not None:
            if int(numbers[k]) in seen:
                continue
            seen.add(int(numbers[k]))
            legs = int(np.sum(numbers == numbers[k]))
        need = a.circuit_calculated_a[k]
        if not np.isfinite(rating) or not exceeds(need, rating):
            continue
        cont = bool(continuous[k]) and cf != 1.0
        how = f" (continuous {need / cf:.1f} A at {cf * 100:g} %)" if cont else ""
        pole = " on its largest pole" if legs > 1 else ""
        out.append(
            Finding(
                "limit",
                f"{circuit_labels[k]}: {need:.1f} A{pole} over its {rating:g} A breaker{how}.",
                f"{source}; {LOCAL}",
            )
        )
    return out
