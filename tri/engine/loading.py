"""Loading against ratings, and the findings a panel's figures call for.

Every finding names its source and defers to local code: ``tri`` estimates,
a licensed practitioner and the authority having jurisdiction decide.
Messages use the phase labels passed in (default A, B, C), never labels
read from a file.

References
----------
1. NFPA 70, *National Electrical Code* (NEC): 210.19(A), 210.20(A),
   215.2(A), 230.42(A) continuous loads at 125 % (from memory);
   310.15(E) (310.15(B)(5) in earlier editions) neutral counted as a
   current-carrying conductor when the major portion of a 4-wire wye load
   is non-linear (published).
2. EN 50160, supply voltage unbalance 2 % (95 % of 10-min values over a
   week) (published); IEC 61000-2-2 compatibility level 2 % (from memory).
3. ANSI C84.1, voltage unbalance 3 % at the meter under no load
   (published, secondary).
4. NEMA MG 1 Part 14: motors rated for 1 % voltage unbalance, derating
   above it, operation above 5 % not recommended (published).
5. R. C. Dugan et al., *Electrical Power Systems Quality*, ch. 5: triplen
   harmonics add in the neutral (from memory; that a neutral can approach
   √3 × the phase current is common practice and follows from the
   definitions, see ``shared/spec/check-values.md``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.results import Finding, PanelAnalysis

LOCAL = "local code and a licensed practitioner decide"


@dataclass(frozen=True)
class FindingLimits:
    """Thresholds for findings (all percent).

    Attributes
    ----------
    loading_warn_pct : float
        Warn when a phase's RMS loading passes this [%] (common practice:
        keep headroom below 80 % of the rating).
    deviation_warn_pct : float
        Warn when phase RMS currents deviate more than this from their mean
        [%] (common practice rule of thumb, not a code requirement).
    nonlinear_major_pct : float
        Share of non-linear load above which the neutral counts as a
        current-carrying conductor [%] (NEC 310.15(E): "major portion",
        published; "major" read as more than half).
    vuf_warn_pct : float
        Voltage unbalance warning [%] (EN 50160, published; IEC 61000-2-2,
        from memory: 2 %).
    vuf_limit_pct : float
        Line-voltage unbalance limit [%], on the largest deviation of the
        line-voltage magnitudes from their mean (the NEMA definition, which
        ANSI C84.1 also uses): 3 % at the meter, no load (published,
        secondary). Not compared with the VUF, which is a different figure.
    motor_unbalance_pct : float
        NEMA percent unbalance above which motors derate [%] (NEMA MG 1: 1 %,
        published).
    drop_warn_pct : float
        Voltage drop at the panel worth a note [%] (NEC informational
        notes: 3 % on a feeder, 5 % feeder plus branch; from memory).
    readings_mismatch_pct : float
        Measured vs computed current difference worth a warning [%]
        (common practice for clamp readings against a schedule).
    """

    loading_warn_pct: float = 80.0
    deviation_warn_pct: float = 10.0
    nonlinear_major_pct: float = 50.0
    vuf_warn_pct: float = 2.0
    vuf_limit_pct: float = 3.0
    motor_unbalance_pct: float = 1.0
    drop_warn_pct: float = 3.0
    readings_mismatch_pct: float = 25.0


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
    """Multiplier on each circuit for the sizing check.

    Parameters
    ----------
    continuous : bool ndarray, shape (..., n)
        Continuous loads (3 h or more).
    factor : float
        Continuous factor [-] (1.25 common North American practice [1]).

    Returns
    -------
    float ndarray, shape (..., n)
        ``factor`` on continuous rows, 1 elsewhere [-].

    Notes
    -----
    The sizing current of a phase is the RMS of the phasor sum with every
    continuous circuit's current scaled by the factor: the phasor form of
    "non-continuous load plus 125 % of continuous load" [1].
    """
    return np.where(np.asarray(continuous, dtype=bool), float(factor), 1.0)


def _fmt(x: float, digits: int = 1) -> str:
    return f"{x:.{digits}f}"


def panel_findings(a: PanelAnalysis, limits: FindingLimits) -> list[Finding]:
    """Findings on loading, neutral and current balance of one panel.

    Parameters
    ----------
    a : PanelAnalysis
        The panel's figures (``findings`` not used).
    limits : FindingLimits
        Thresholds.

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    rating = a.rating_a
    cf = a.continuous_factor
    for ph in a.phases:
        if ph.loading_pct > 100.0:
            out.append(
                Finding(
                    "limit",
                    f"Phase {ph.label} carries {_fmt(ph.rms_a)} A RMS, "
                    f"{_fmt(ph.loading_pct)} % of the {rating:g} A rating.",
                    f"equipment rating (common practice); {LOCAL}",
                )
            )
        elif ph.design_loading_pct > 100.0:
            out.append(
                Finding(
                    "limit",
                    f"Phase {ph.label}: with continuous loads at {cf * 100:g} % it needs "
                    f"{_fmt(ph.design_a)} A, {_fmt(ph.design_loading_pct)} % of the "
                    f"{rating:g} A rating.",
                    "NEC 210.20(A), 215.2(A), 230.42(A): continuous load at 125 % "
                    f"(from memory); {LOCAL}",
                )
            )
        elif ph.loading_pct > limits.loading_warn_pct:
            out.append(
                Finding(
                    "warning",
                    f"Phase {ph.label} is at {_fmt(ph.loading_pct)} % of the {rating:g} A "
                    f"rating; little headroom for added load.",
                    f"common practice ({limits.loading_warn_pct:g} % headroom rule); {LOCAL}",
                )
            )

    n = a.neutral
    if n.present:
        if n.loading_pct is not None and n.loading_pct > 100.0:
            out.append(
                Finding(
                    "limit",
                    f"Neutral carries {_fmt(n.rms_a)} A RMS, {_fmt(n.loading_pct)} % of its "
                    f"{n.rating_a:g} A rating.",
                    f"equipment rating (common practice); {LOCAL}",
                )
            )
        max_phase = max(p.rms_a for p in a.phases)
        if max_phase > 0 and n.rms_a > max_phase * (1 + 1e-9):
            out.append(
                Finding(
                    "warning",
                    f"Neutral RMS {_fmt(n.rms_a)} A exceeds the largest phase current "
                    f"({_fmt(max_phase)} A, ratio {n.ratio_to_max_phase:.2f}): triplen "
                    "harmonics add in the neutral.",
                    "common practice; Dugan et al., Electrical Power Systems Quality, "
                    "ch. 5 (from memory); " + LOCAL,
                )
            )
        if a.nonlinear_share_pct > limits.nonlinear_major_pct:
            out.append(
                Finding(
                    "warning",
                    f"{_fmt(a.nonlinear_share_pct, 0)} % of the connected load is non-linear: "
                    "count the neutral as a current-carrying conductor when adjusting "
                    "ampacity.",
                    "NEC 310.15(E) (310.15(B)(5) in earlier editions), 4-wire wye with a major "
                    f"portion of non-linear load (published); {LOCAL}",
                )
            )

    cu = a.current_unbalance
    if cu.max_deviation_pct > limits.deviation_warn_pct:
        rms = np.array([p.rms_a for p in a.phases])
        worst = a.phases[int(np.argmax(np.abs(rms - rms.mean())))]
        out.append(
            Finding(
                "warning",
                f"Phase currents deviate up to {_fmt(cu.max_deviation_pct)} % from their mean "
                f"(phase {worst.label} furthest, {_fmt(worst.rms_a)} A); negative-sequence "
                f"current {_fmt(cu.negative_sequence_pct)} % of positive.",
                f"common practice (about {limits.deviation_warn_pct:g} %; a rule of thumb, not "
                f"a code requirement); {LOCAL}",
            )
        )

    if a.unplaced_count:
        out.append(
            Finding(
                "info",
                f"{a.unplaced_count} circuit(s) not placed on a phase are left out of the "
                "phase figures.",
                "tri schedule convention",
            )
        )
    return out


def three_pole_triplen_finding() -> Finding:
    """Info finding: 3-pole circuits' triplen harmonics were removed."""
    return Finding(
        "info",
        "Triplen harmonics (3rd, 9th, …) of 3-pole circuits were left out: a 3-wire load "
        "cannot draw zero-sequence current without a neutral.",
        "circuit theory (zero-sequence current needs a return path); "
        "Dugan et al., ch. 5 (from memory)",
    )


def voltage_findings(a: PanelAnalysis, limits: FindingLimits) -> list[Finding]:
    """Findings on the computed panel voltages (none without a supply).

    Parameters
    ----------
    a : PanelAnalysis
        Figures with ``voltage`` set.
    limits : FindingLimits
        Thresholds.

    Returns
    -------
    list of Finding
    """
    v = a.voltage
    if v is None:
        return []
    out: list[Finding] = []
    out.extend(unbalance_findings(v.vuf_pct, v.line_deviation_pct, v.motor_derating, limits, ""))
    worst = max(v.drop_pct)
    if worst > limits.drop_warn_pct:
        label = a.phase_labels[int(np.argmax(v.drop_pct))]
        out.append(
            Finding(
                "info",
                f"Voltage at the panel is {_fmt(worst)} % below nominal on phase {label} "
                "(transformer and feeder).",
                "NEC informational notes to 210.19(A) and 215.2(A): 3 % feeder, 5 % total "
                f"(from memory; advisory); {LOCAL}",
            )
        )
    if v.iterated:
        if v.converged:
            out.append(
                Finding(
                    "info",
                    f"Currents solved at the panel voltage with constant-power loads "
                    f"({v.iterations} iterations).",
                    "tri engine option (iterated load flow)",
                )
            )
        else:
            out.append(
                Finding(
                    "warning",
                    f"The constant-power voltage iteration did not converge in {v.iterations} "
                    "iterations; voltages are unreliable (supply impedance too high?).",
                    "tri engine option (iterated load flow)",
                )
            )
    return out


def unbalance_findings(
    vuf: float | None,
    line_dev: float | None,
    derating: float | None,
    limits: FindingLimits,
    prefix: str,
) -> list[Finding]:
    """Findings for a voltage unbalance (computed or measured).

    Parameters
    ----------
    vuf : float or None
        IEC voltage unbalance factor [%].
    line_dev : float or None
        NEMA percent unbalance of the line voltages [%].
    derating : float or None
        NEMA MG 1 derating factor [-], None above 5 %.
    limits : FindingLimits
        Thresholds.
    prefix : str
        ``""`` or e.g. ``"Measured "`` to start the message.

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    what = f"{prefix}voltage unbalance" if prefix else "Voltage unbalance"
    if vuf is not None and vuf > limits.vuf_warn_pct:
        out.append(
            Finding(
                "warning",
                f"{what} (VUF) {vuf:.2f} % exceeds {limits.vuf_warn_pct:g} %.",
                "EN 50160, 2 % (published); IEC 61000-2-2 compatibility level 2 % "
                f"(from memory); {LOCAL}",
            )
        )
    if line_dev is not None and line_dev > limits.vuf_limit_pct:
        out.append(
            Finding(
                "limit",
                f"{what} {line_dev:.2f} % (largest deviation of the line voltages from "
                f"their mean) exceeds {limits.vuf_limit_pct:g} %.",
                f"ANSI C84.1, 3 % at the meter under no load (published, secondary); {LOCAL}",
            )
        )
    if line_dev is not None and line_dev > limits.motor_unbalance_pct:
        if derating is None:
            out.append(
                Finding(
                    "limit",
                    f"{what} {line_dev:.2f} % (NEMA definition) is above 5 %: operating "
                    "motors is not recommended.",
                    f"NEMA MG 1 Part 14 (published); {LOCAL}",
                )
            )
        else:
            out.append(
                Finding(
                    "warning",
                    f"{what} {line_dev:.2f} % (NEMA definition) is above "
                    f"{limits.motor_unbalance_pct:g} %: derate 3-phase motors to "
                    f"{derating:.2f} of rated load.",
                    f"NEMA MG 1 Part 14 derating curve (published); {LOCAL}",
                )
            )
    return out
