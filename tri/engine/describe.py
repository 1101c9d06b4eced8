"""One panel's batch arrays as plain results with findings: :func:`describe_panel`
turns a :class:`~tri.engine.results.BatchAnalysis` of one panel (from
:func:`tri.engine.analysis.analyse_batch` or from the building roll-up) into a
:class:`~tri.engine.results.PanelAnalysis`, and gathers its findings (loading,
breakers, neutral, balance, voltage, readings) ordered limit, warning, info.
:class:`SourceFigures` is what the voltage result needs from behind the panel.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from tri.engine.high_leg import high_leg_caution, supply_phase_voltages
from tri.engine.inputs import CircuitArrays, MeasuredReadings, Ratings, SystemVoltages
from tri.engine.legs import breaker_results, shared_neutral_results
from tri.engine.limits import LEVEL_RANK, FindingLimits
from tri.engine.loading import breaker_findings, loading_findings
from tri.engine.neutral_rules import neutral_findings, three_pole_triplen_finding
from tri.engine.readings import compare_readings
from tri.engine.results import (
    BatchAnalysis,
    CurrentUnbalance,
    Finding,
    NeutralResult,
    PanelAnalysis,
    PhaseResult,
    Phasor,
    SequenceResult,
    VoltageResult,
)
from tri.engine.unbalance_findings import (
    deviation_findings,
    phase_kva_findings,
    voltage_findings,
)
from tri.words import plural

BASIS_NOMINAL = "nominal voltage"
BASIS_ITERATED = "panel voltage (iterated constant power)"


def _f(x: np.ndarray | float) -> float:
    return float(np.asarray(x))


def _given(x: np.ndarray | None) -> np.ndarray:
    """``x``, a voltage figure of a batch analysed with a supply (all or none are set)."""
    if x is None:
        raise ValueError("a batch with panel voltages lacks one of its voltage figures")
    return x


def _phasors3(x: np.ndarray) -> tuple[Phasor, Phasor, Phasor]:
    return (Phasor.of(x[0]), Phasor.of(x[1]), Phasor.of(x[2]))


@dataclass(frozen=True)
class SourceFigures:
    """What is behind a panel, for its voltage result.

    Attributes
    ----------
    z_phase_ohm, z_neutral_ohm : complex
        Phase-path and neutral-path impedance of the source model
        ``V_p = E_p − Z_phase·I_p − Z_neutral·I_N`` [Ω].
    transformer_full_load_a : float
        Rated secondary current of the transformer behind the panel [A].
    """

    z_phase_ohm: complex
    z_neutral_ohm: complex
    transformer_full_load_a: float


def describe_panel(
    b: BatchAnalysis,
    system: SystemVoltages,
    ratings: Ratings,
    source: SourceFigures | None = None,
    readings: MeasuredReadings | None = None,
    *,
    iterated: bool = False,
    iterate_requested: bool = False,
    phase_labels: tuple[str, str, str] = ("A", "B", "C"),
    limits: FindingLimits | None = None,
    circuits: CircuitArrays | None = None,
    circuit_labels: tuple[str, ...] | None = None,
) -> PanelAnalysis:
    """One panel's figures as plain numbers, with findings.

    Parameters
    ----------
    b : BatchAnalysis
        One panel's arrays (no batch dimensions), from
        :func:`tri.engine.analysis.analyse_batch` or from the roll-up of a tree
        of panels.
    system : SystemVoltages
        Nominal voltages [V].
    ratings : Ratings
        Ratings [A].
    source : SourceFigures, optional
        Impedances behind the panel; the voltage result needs it and
        ``b.v_phase``.
    readings : MeasuredReadings, optional
        Site readings.
    iterated : bool
        The currents were solved at the panel voltage (constant power).
    iterate_requested : bool
        Voltage iteration was asked for (an info finding says so when there
        is no source to iterate against).
    phase_labels : tuple of 3 str
        Labels for results and messages.
    limits : FindingLimits, optional
        Thresholds for findings.
    circuits : CircuitArrays, optional
        The panel's own circuit rows (breaker ratings and continuous flags
        for the per-breaker check, in the row order of ``b``'s per-circuit
        arrays; their ``breaker`` numbers gather the legs of each breaker in
        ``PanelAnalysis.breakers``); without them no breaker is judged.
    circuit_labels : tuple of str, optional
        How findings name each circuit row (slot or phases, and name; the
        legs of one breaker share its label); default ``"circuit 1"``,
        ``"circuit 2"``, ...

    Returns
    -------
    PanelAnalysis
    """
    limits = limits or FindingLimits()
    iterate_voltage = iterated and source is not None
    labels = tuple(phase_labels)
    if len(labels) != 3:
        raise ValueError("phase_labels needs three labels")
    a = _plain_analysis(b, system, ratings, source, labels, iterate_voltage, circuits)
    n_rows = len(a.circuit_rms_a)
    names = circuit_labels or tuple(f"circuit {k + 1}" for k in range(n_rows))
    if len(names) != n_rows:
        raise ValueError(f"circuit_labels has {len(names)} labels for {n_rows} circuits")
    unmet_iteration = iterate_requested and source is None
    findings = _panel_findings(a, b, system, ratings, limits, circuits, names, unmet_iteration)
    comparison = None
    if readings is not None:
        comparison, more = compare_readings(a, readings, limits)
        if system.high_leg is not None:  # unequal phase voltages by design: no deviation rate
            comparison = dataclasses.replace(comparison, phase_deviation_pct=None)
        findings.extend(more)
    findings.sort(key=lambda f: LEVEL_RANK[f.level])
    return dataclasses.replace(a, readings=comparison, findings=tuple(findings))


def _plain_analysis(
    b: BatchAnalysis,
    system: SystemVoltages,
    ratings: Ratings,
    source: SourceFigures | None,
    labels: tuple[str, str, str],
    iterate_voltage: bool,
    circuits: CircuitArrays | None,
) -> PanelAnalysis:
    """The panel's figures as plain numbers, without readings or findings."""
    phases = _phase_results(b, labels)
    voltage = None
    if source is not None and b.v_phase is not None:
        voltage = _voltage_result(b, system, source, iterate_voltage)
    seq = b.sequence
    return PanelAnalysis(
        phase_labels=labels,
        v_ll=float(system.v_ll),
        v_ln=None if system.v_ln is None else float(system.v_ln),
        frequency_hz=float(system.frequency_hz),
        currents_basis=BASIS_ITERATED if iterate_voltage else BASIS_NOMINAL,
        orders=tuple(int(h) for h in b.orders),
        rating_a=float(ratings.main_a if ratings.main_a is not None else ratings.bus_a),
        continuous_factor=float(ratings.continuous_factor),
        phases=phases,  # type: ignore[arg-type]
        neutral=_neutral_result(b, system, ratings, max(p.rms_a for p in phases)),
        sequence=SequenceResult(Phasor.of(seq[0]), Phasor.of(seq[1]), Phasor.of(seq[2])),
        current_unbalance=CurrentUnbalance(
            negative_sequence_pct=_f(b.negative_sequence_pct),
            zero_sequence_pct=_f(b.zero_sequence_pct),
            max_deviation_pct=_f(b.max_deviation_pct),
            max_deviation_fundamental_pct=_f(b.max_deviation_fundamental_pct),
            max_minus_min_pct=_f(b.max_minus_min_pct),
        ),
        voltage=voltage,
        readings=None,
        findings=(),
        circuit_current_a=tuple(float(x) for x in b.circuit_current_a),
        circuit_rms_a=tuple(float(x) for x in b.circuit_rms_a),
        nonlinear_share_pct=_f(b.nonlinear_share_pct),
        unplaced_count=int(b.unplaced_count),
        breakers=breaker_results(b, None if circuits is None else circuits.breaker),
        shared_neutrals=shared_neutral_results(b),
        nonlinear_ln_share_pct=_f(b.nonlinear_ln_share_pct),
        circuit_calculated_a=tuple(float(x) for x in b.circuit_calculated_a),
    )


def _phase_results(b: BatchAnalysis, labels: tuple[str, str, str]) -> tuple[PhaseResult, ...]:
    """The three phases' figures [VA], [A], [%] as plain numbers."""
    return tuple(
        PhaseResult(
            label=labels[k],
            va=_f(b.phase_va[k]),
            current=Phasor.of(b.phase_spectrum[k, 0]),
            rms_a=_f(b.phase_rms_a[k]),
            thd_pct=_f(b.phase_thd_pct[k]),
            loading_pct=_f(b.phase_loading_pct[k]),
            design_a=_f(b.phase_design_a[k]),
            design_loading_pct=_f(b.phase_design_loading_pct[k]),
            calculated_a=_f(b.phase_calculated_a[k]),
            calculated_pct=_f(b.phase_calculated_pct[k]),
            harmonic_a=tuple(float(x) for x in np.abs(b.phase_spectrum[k])),
        )
        for k in range(3)
    )


def _neutral_result(
    b: BatchAnalysis, system: SystemVoltages, ratings: Ratings, max_phase: float
) -> NeutralResult:
    """The neutral's figures; ``max_phase`` is the largest phase RMS current [A]."""
    neutral_rms = _f(b.neutral_rms_a)
    neutral_rating = ratings.neutral_a if ratings.neutral_a is not None else ratings.bus_a
    return NeutralResult(
        present=system.has_neutral,
        current=Phasor.of(b.neutral_spectrum[0]),
        rms_a=neutral_rms,
        rating_a=float(neutral_rating) if system.has_neutral else None,
        loading_pct=_f(b.neutral_loading_pct) if system.has_neutral else None,
        ratio_to_max_phase=neutral_rms / max_phase if max_phase > 0 else 0.0,
        harmonic_a=tuple(float(x) for x in np.abs(b.neutral_spectrum)),
        calculated_a=_f(b.neutral_calculated_a) if system.has_neutral else None,
    )


def _voltage_result(
    b: BatchAnalysis, system: SystemVoltages, source: SourceFigures, iterated: bool
) -> VoltageResult:
    """Voltages at the panel [V], their unbalance [%] and the source behind it."""
    assert b.v_phase is not None
    vln = system.v_ln_or_derived
    # each phase against its own nominal (the high leg of a high-leg delta: 208 V of 240)
    nominal = (vln,) * 3 if system.high_leg is None else np.abs(supply_phase_voltages(system))
    derating = _f(_given(b.motor_derating))
    phase_dev = _f(_given(b.phase_deviation_pct))
    return VoltageResult(
        phase_v=_phasors3(b.v_phase),
        line_v=_phasors3(_given(b.v_line)),
        vuf_pct=_f(_given(b.vuf_pct)),
        line_deviation_pct=_f(_given(b.line_deviation_pct)),
        phase_deviation_pct=None if math.isnan(phase_dev) else phase_dev,
        motor_derating=None if math.isnan(derating) else derating,
        drop_pct=tuple(  # type: ignore[arg-type]
            float(100.0 * (n - abs(v)) / n) for n, v in zip(nominal, b.v_phase, strict=True)
        ),
        z_phase_ohm=source.z_phase_ohm,
        z_neutral_ohm=source.z_neutral_ohm,
        transformer_full_load_a=source.transformer_full_load_a,
        iterated=iterated,
        iterations=int(_given(b.iterations)),
        converged=bool(_given(b.converged)),
    )


def _panel_findings(
    a: PanelAnalysis,
    b: BatchAnalysis,
    system: SystemVoltages,
    ratings: Ratings,
    limits: FindingLimits,
    circuits: CircuitArrays | None,
    names: tuple[str, ...],
    unmet_iteration: bool,
) -> list[Finding]:
    """Findings from the panel's own figures (before readings), unsorted;
    ``unmet_iteration``: voltage iteration was asked for without a supply."""
    # 310.15(E) and IEC Annex E are written for the neutral of a wye; a high-leg delta's
    # neutral is the centre tap of one winding
    wye = system.has_neutral and system.high_leg is None
    findings = _findings(a, circuits, ratings, limits, names, wye)
    if system.high_leg is not None:
        findings.append(high_leg_caution(a.phase_labels[system.high_leg], system.v_ll))
    if bool(b.three_pole_triplens):
        findings.append(three_pole_triplen_finding())
    findings.extend(voltage_findings(a, limits))
    if unmet_iteration:
        findings.append(
            Finding(
                "info",
                "Voltage iteration was asked for, but no supply is described; currents are "
                "at nominal voltage.",
                "tri engine option (needs the supply table)",
            )
        )
    return findings


def _findings(
    a: PanelAnalysis,
    circuits: CircuitArrays | None,
    ratings: Ratings,
    limits: FindingLimits,
    names: tuple[str, ...],
    wye: bool,
) -> list[Finding]:
    """Loading, breaker, neutral and balance findings of one panel (unsorted)."""
    out = loading_findings(a, ratings, limits)
    if circuits is not None:
        out += breaker_findings(a, circuits.breaker_a, circuits.continuous, names, circuits.breaker)
    out += neutral_findings(a, limits, wye)
    out += deviation_findings(a, limits)
    out += phase_kva_findings(a, limits)
    if a.unplaced_count:
        out.append(
            Finding(
                "info",
                f"Left out of the phase figures: {plural(a.unplaced_count, 'circuit')} not "
                "placed on a phase.",
                "tri schedule convention",
            )
        )
    return out
