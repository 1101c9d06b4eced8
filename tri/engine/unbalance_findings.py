"""Findings on balance: phase-current deviation, kVA between phases, voltage unbalance.

Each figure says its definition and where its limit applies:

* the current deviation is the largest ``|I − mean| / mean`` (the NEMA
  definition); a meter that shows ``(max − min) / mean`` reads about twice
  as much, and site readings may be either. It is judged only when the
  phases carry enough current for it to matter (the light-load threshold);
* an optional cap on the apparent power between phases (some grid
  operators set one, e.g. 4.6 kVA; a setting, from memory);
* EN 50160's 2 % is a weekly statistic of 10-minute values at the supply
  terminals, so a figure computed at the panel, or one set of readings, is
  indicative; ANSI C84.1's 3 % applies at the revenue meter under no load.

Thresholds and sources come from :mod:`tri.engine.limits`.
"""

from __future__ import annotations

import numpy as np

from tri.engine.limits import (
    LOCAL,
    SRC_ANSI,
    SRC_DEVIATION,
    SRC_DEVIATION_DEFINITION,
    SRC_DROP,
    SRC_EN50160,
    SRC_IEC_DROP,
    SRC_LIGHT_LOAD,
    SRC_NEMA_CURVE,
    SRC_NEMA_LIMIT,
    SRC_PHASE_KVA,
    FindingLimits,
    exceeds,
    practice_for,
)
from tri.engine.results import Finding, PanelAnalysis


def lightly_loaded(a: PanelAnalysis, limits: FindingLimits) -> bool:
    """True when the heaviest phase is below the light-load share of the rating.

    Parameters
    ----------
    a : PanelAnalysis
        Phase loadings [%].
    limits : FindingLimits
        ``light_load_pct`` [%].

    Returns
    -------
    bool
        ``max loading_pct < light_load_pct`` (equal is judged).
    """
    return max(p.loading_pct for p in a.phases) < limits.light_load_pct


def deviation_findings(a: PanelAnalysis, limits: FindingLimits) -> list[Finding]:
    """The phase-current deviation, judged only where it matters.

    Parameters
    ----------
    a : PanelAnalysis
        Phase RMS currents and the current unbalance figures.
    limits : FindingLimits
        ``deviation_warn_pct``, ``light_load_pct``.

    Returns
    -------
    list of Finding
        A warning above the target on a loaded panel; an info (not judged)
        above it on a lightly loaded one; nothing within it.
    """
    cu = a.current_unbalance
    if not exceeds(cu.max_deviation_pct, limits.deviation_warn_pct):
        return []
    rms = np.array([p.rms_a for p in a.phases])
    worst = a.phases[int(np.argmax(np.abs(rms - rms.mean())))]
    figure = (
        f"Phase currents deviate up to {cu.max_deviation_pct:.1f} % from their mean (phase "
        f"{worst.label} furthest, {worst.rms_a:.1f} A; (max - min)/mean "
        f"{cu.max_minus_min_pct:.1f} %)"
    )
    heaviest = max(p.loading_pct for p in a.phases)
    if lightly_loaded(a, limits):
        return [
            Finding(
                "info",
                f"{figure}, but the heaviest phase carries only {heaviest:.1f} % of the "
                f"{a.rating_a:g} A rating, below the {limits.light_load_pct:g} % light-load "
                "threshold: not judged.",
                f"{SRC_LIGHT_LOAD}; {SRC_DEVIATION_DEFINITION}",
            )
        ]
    return [
        Finding(
            "warning",
            f"{figure}; negative-sequence current {cu.negative_sequence_pct:.1f} % of positive.",
            f"{SRC_DEVIATION} (target {limits.deviation_warn_pct:g} %); "
            f"{SRC_DEVIATION_DEFINITION}; {LOCAL}",
        )
    ]


def phase_kva_findings(a: PanelAnalysis, limits: FindingLimits) -> list[Finding]:
    """The optional cap on scheduled apparent power between phases.

    Parameters
    ----------
    a : PanelAnalysis
        Phase VA (the schedule convention) [VA].
    limits : FindingLimits
        ``phase_kva_limit`` [kVA]; None: nothing judged.

    Returns
    -------
    list of Finding
        A warning when the largest minus the smallest phase VA is above the
        cap (equal passes).
    """
    if limits.phase_kva_limit is None:
        return []
    va = [p.va for p in a.phases]
    hi, lo = int(np.argmax(va)), int(np.argmin(va))
    gap = (va[hi] - va[lo]) / 1000.0
    if not exceeds(gap, limits.phase_kva_limit):
        return []
    return [
        Finding(
            "warning",
            f"Scheduled apparent power differs by {gap:.2f} kVA between phases "
            f"{a.phases[hi].label} ({va[hi] / 1000:.2f} kVA) and {a.phases[lo].label} "
            f"({va[lo] / 1000:.2f} kVA), over the {limits.phase_kva_limit:g} kVA cap.",
            f"{SRC_PHASE_KVA}; the grid operator's rules decide",
        )
    ]


def unbalance_findings(
    vuf: float | None,
    line_dev: float | None,
    derating: float | None,
    limits: FindingLimits,
    prefix: str,
    *,
    measured: bool = False,
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
    measured : bool
        The figures come from site readings (else computed at the panel);
        says why either is indicative against EN 50160 and ANSI C84.1.

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    what = f"{prefix}voltage unbalance" if prefix else "Voltage unbalance"
    snapshot = "one set of readings" if measured else "a figure computed at this panel"
    if vuf is not None and vuf > limits.vuf_warn_pct:
        out.append(
            Finding(
                "warning",
                f"{what} (VUF) {vuf:.2f} % exceeds {limits.vuf_warn_pct:g} %. EN 50160's "
                "limit is a weekly statistic of 10-minute values at the supply terminals; "
                f"{snapshot} is indicative.",
                f"{SRC_EN50160}; {LOCAL}",
            )
        )
    if line_dev is not None and line_dev > limits.ansi_unbalance_pct:
        out.append(
            Finding(
                "warning",
                f"{what} {line_dev:.2f} % (largest deviation of the line voltages from their "
                f"mean) exceeds {limits.ansi_unbalance_pct:g} %. ANSI C84.1 sets it for the "
                f"revenue meter under no load, at the service; {snapshot} is indicative.",
                f"{SRC_ANSI}; {LOCAL}",
            )
        )
    if line_dev is not None and line_dev > limits.motor_unbalance_pct:
        if derating is None:
            out.append(
                Finding(
                    "limit",
                    f"{what} {line_dev:.2f} % (NEMA definition) is above 5 %: operating "
                    "motors is not recommended.",
                    f"{SRC_NEMA_LIMIT}; {LOCAL}",
                )
            )
        else:
            out.append(
                Finding(
                    "warning",
                    f"{what} {line_dev:.2f} % (NEMA definition) is above "
                    f"{limits.motor_unbalance_pct:g} %: derate 3-phase motors to "
                    f"{derating:.2f} of rated load.",
                    f"{SRC_NEMA_CURVE}; {LOCAL}",
                )
            )
    return out


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
    out = unbalance_findings(v.vuf_pct, v.line_deviation_pct, v.motor_derating, limits, "")
    worst = max(v.drop_pct)
    if worst > limits.drop_warn_pct:
        label = a.phase_labels[int(np.argmax(v.drop_pct))]
        out.append(
            Finding(
                "info",
                f"Voltage at the panel is {worst:.1f} % below nominal on phase {label} "
                "(transformer and feeder).",
                f"{SRC_IEC_DROP if practice_for(a.frequency_hz) == 'IEC' else SRC_DROP}; {LOCAL}",
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
