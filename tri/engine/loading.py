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
Thresholds, factors and sources come from :mod:`tri.engine.limits`; the
calculation's arrays from :mod:`tri.engine.calculated_load` (re-exported).

References
----------
1. NFPA 70 (NEC) 210.20(A), 215.2(A)(1), 215.3, 230.42(A)(1), 408.30,
   408.36 (published, secondary); see :mod:`tri.engine.limits`.
"""

from __future__ import annotations

import numpy as np

from tri.engine.calculated_load import (
    calculated_load_a,
    circuit_calculated_a,
    continuous_weights,
    loading_pct,
    neutral_calculated_load_a,
    phase_voltage_magnitudes,
    scheduled_current_a,
)
from tri.engine.inputs import Ratings
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
from tri.engine.results import Finding, PanelAnalysis

#: Re-exported: the load calculation's arrays (:mod:`tri.engine.calculated_load`)
#: are imported from here by older code and the tests.
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
    "phase_voltage_magnitudes",
    "scheduled_current_a",
    "sizing_clauses",
    "sizing_sources",
]


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
