"""Measured readings beside the computed figures.

What a clamp meter and a voltmeter say on site is compared with what the
schedule predicts: per-phase true-RMS currents, the neutral (far above the
fundamental estimate points to triplen harmonics; far from the schedule
points to a stale schedule) and the voltage unbalance from the three
line-voltage magnitudes (IEC 61000-4-30 β formula; the phase angles are not
needed).

References
----------
1. IEC 61000-4-30, voltage unbalance from line-voltage magnitudes
   (published formula).
2. NEMA MG 1 Part 14, percent voltage unbalance and derating (published).
3. NEC 408.4, circuit directory kept current (from memory).
"""

from __future__ import annotations

import math

import numpy as np

from tri.engine.inputs import MeasuredReadings
from tri.engine.limits import LOCAL, FindingLimits
from tri.engine.results import Finding, PanelAnalysis, PhaseReading, ReadingsComparison
from tri.engine.unbalance import deviation_rate_pct, nema_derating, vuf_from_line_magnitudes
from tri.engine.unbalance_findings import unbalance_findings


def _all(values: tuple[float | None, ...]) -> bool:
    return all(v is not None for v in values)


def _closes_triangle(u: tuple[float, float, float]) -> bool:
    a, b, c = sorted(u)
    return a + b >= c and c > 0


def _phase_share_findings(
    a: PanelAnalysis, readings: MeasuredReadings, mism: float
) -> list[Finding]:
    """Judge measured phase currents against the schedule by shares, not totals.

    A schedule lists connected load; a clamp meter sees demand, which is
    normally lower because not everything runs at once (diversity). So the
    total is only reported, and a phase is flagged when its ratio of
    measured to scheduled current departs by more than ``mism`` percent
    from the median ratio of the three phases (with two phases measured,
    from the other one's): that pattern, not the total, points to a stale
    schedule on that phase.
    """
    out: list[Finding] = []
    pairs = [
        (ph.label, float(m), ph.rms_a)
        for ph, m in zip(a.phases, readings.phase_amps, strict=True)
        if m is not None and ph.rms_a > 0
    ]
    if not pairs:
        return out
    source = f"comparison with readings; NEC 408.4 directory kept current (from memory); {LOCAL}"
    ratios = [m / c for _, m, c in pairs]
    if len(pairs) >= 2:
        middle = sorted(ratios)[1] if len(ratios) == 3 else None
        for k, (label, m, c) in enumerate(pairs):
            others = [r for j, r in enumerate(ratios) if j != k]
            ref = middle if middle is not None else others[0]
            if ref <= 0:
                continue
            share = 100.0 * (ratios[k] / ref - 1.0)
            if abs(share) > mism:
                more = "more" if share > 0 else "less"
                out.append(
                    Finding(
                        "warning",
                        f"Phase {label} measured {m:.1f} A against {c:.1f} A scheduled: "
                        f"{abs(share):.0f} % {more}, relative to its schedule, than the "
                        f"{'middle phase' if middle is not None else 'other measured phase'}. "
                        "The schedule may be "
                        "stale for this phase, or its loads run differently than scheduled.",
                        source,
                    )
                )
    overall = sum(m for _, m, _ in pairs) / sum(c for _, _, c in pairs)
    if overall > 1.0 + mism / 100.0:
        out.append(
            Finding(
                "warning",
                f"Measured phase currents are {100.0 * (overall - 1.0):.0f} % above the "
                "scheduled load: loads missing from the schedule, or values set too low.",
                source,
            )
        )
    elif overall < 1.0 - mism / 100.0 and len(pairs) >= 2:
        out.append(
            Finding(
                "info",
                f"Measured phase currents are {100.0 * overall:.0f} % of the scheduled "
                "connected load; demand below connected load is normal (not everything runs "
                "at once), so the phases are compared by their shares.",
                "comparison with readings; diversity of connected load (common practice)",
            )
        )
    return out


def compare_readings(
    a: PanelAnalysis, readings: MeasuredReadings, limits: FindingLimits
) -> tuple[ReadingsComparison, list[Finding]]:
    """Compare site readings with the computed figures.

    Parameters
    ----------
    a : PanelAnalysis
        Computed figures (``readings`` and ``findings`` not used).
    readings : MeasuredReadings
        Site measurements; any may be None.
    limits : FindingLimits
        Thresholds (``readings_mismatch_pct`` and the unbalance limits).

    Returns
    -------
    comparison : ReadingsComparison
    findings : list of Finding

    Notes
    -----
    Difference ``(measured − computed) / computed`` [%]. The neutral is
    judged against a materiality floor of 5 % of the mean phase current so
    that a balanced panel's near-zero estimate does not make every reading
    look "far above".
    """
    mism = limits.readings_mismatch_pct
    phases, out = _phase_readings(a, readings)
    out.extend(_phase_share_findings(a, readings, mism))
    out.extend(_neutral_reading_findings(a, readings, mism))
    vuf, line_dev, derating, more = _measured_line_voltages(readings, limits)
    out.extend(more)
    phase_dev = None
    if _all(readings.volts_ln):
        phase_dev = float(deviation_rate_pct(np.array(readings.volts_ln, dtype=float)))
    n = a.neutral
    nm = readings.neutral_amps

    comparison = ReadingsComparison(
        phases=(phases[0], phases[1], phases[2]),
        neutral_measured_a=nm,
        neutral_computed_fundamental_a=n.current_a,
        neutral_computed_rms_a=n.rms_a,
        volts_ll=readings.volts_ll,
        vuf_pct=vuf,
        line_deviation_pct=line_dev,
        motor_derating=derating,
        volts_ln=readings.volts_ln,
        phase_deviation_pct=phase_dev,
        computed_vuf_pct=None if a.voltage is None else a.voltage.vuf_pct,
    )
    return comparison, out


def _phase_readings(
    a: PanelAnalysis, readings: MeasuredReadings
) -> tuple[list[PhaseReading], list[Finding]]:
    """Measured against computed RMS current per phase [A], [%], and a warning for
    each phase measured loaded that the schedule leaves empty."""
    out: list[Finding] = []
    phases = []
    for ph, meas in zip(a.phases, readings.phase_amps, strict=True):
        diff = None
        if meas is not None and ph.rms_a > 0:
            diff = 100.0 * (meas - ph.rms_a) / ph.rms_a
        phases.append(PhaseReading(ph.label, meas, ph.rms_a, diff))
        if meas is not None and meas > 0 and ph.rms_a == 0:
            out.append(
                Finding(
                    "warning",
                    f"Phase {ph.label} measured {meas:.1f} A but the schedule puts no load on "
                    "it: the schedule is incomplete or stale.",
                    f"comparison with readings; NEC 408.4 (from memory); {LOCAL}",
                )
            )
    return phases, out


def _neutral_reading_findings(
    a: PanelAnalysis, readings: MeasuredReadings, mism: float
) -> list[Finding]:
    """The measured neutral current against the fundamental and RMS estimates
    (module notes: a materiality floor of 5 % of the mean phase current)."""
    out: list[Finding] = []
    n = a.neutral
    nm = readings.neutral_amps
    if nm is None or not n.present:
        return out
    measured_phases = [p for p in readings.phase_amps if p is not None]
    scale = (
        float(np.mean(measured_phases))
        if measured_phases
        else float(np.mean([p.rms_a for p in a.phases]))
    )
    floor = 0.05 * scale
    fund, rms_c = n.current_a, n.rms_a
    if nm > max(1.5 * fund, fund + floor):
        if nm <= max(rms_c * (1 + mism / 100.0), rms_c + floor):
            out.append(
                Finding(
                    "info",
                    f"Measured neutral {nm:.1f} A is well above the fundamental estimate "
                    f"{fund:.1f} A; the harmonic profiles account for it (computed RMS "
                    f"{rms_c:.1f} A).",
                    "comparison with readings; triplen harmonics add in the neutral "
                    "(Dugan et al., ch. 5, from memory)",
                )
            )
        else:
            out.append(
                Finding(
                    "warning",
                    f"Measured neutral {nm:.1f} A is far above the fundamental estimate "
                    f"{fund:.1f} A and the computed RMS {rms_c:.1f} A: triplen harmonics "
                    "from non-linear loads the schedule treats as linear, or a stale "
                    "schedule.",
                    "comparison with readings; triplen harmonics add in the neutral "
                    f"(Dugan et al., ch. 5, from memory); {LOCAL}",
                )
            )
    elif fund > floor and nm < 0.5 * fund:
        out.append(
            Finding(
                "info",
                f"Measured neutral {nm:.1f} A is well below the estimate {fund:.1f} A: the "
                "phases may be better balanced than the schedule says.",
                "comparison with readings",
            )
        )
    return out


def _measured_line_voltages(
    readings: MeasuredReadings, limits: FindingLimits
) -> tuple[float | None, float | None, float | None, list[Finding]]:
    """VUF [%], NEMA line deviation [%] and motor derating [-] of the measured line
    voltages (all None unless the three are given and close a triangle), with
    their findings."""
    out: list[Finding] = []
    vuf = line_dev = derating = None
    vll = readings.volts_ll
    if _all(vll):
        u = (float(vll[0]), float(vll[1]), float(vll[2]))  # type: ignore[arg-type]
        if _closes_triangle(u):
            vuf = float(vuf_from_line_magnitudes(*u))
            line_dev = float(deviation_rate_pct(np.array(u)))
            d = float(nema_derating(line_dev))
            derating = None if math.isnan(d) else d
            out.extend(
                unbalance_findings(vuf, line_dev, derating, limits, "Measured ", measured=True)
            )
        else:
            out.append(
                Finding(
                    "warning",
                    "The measured line voltages cannot close a triangle (one exceeds the sum "
                    "of the other two); check the readings.",
                    "circuit theory (line voltages sum to zero)",
                )
            )
    return vuf, line_dev, derating, out
