"""Top-level analysis of a panel (or a batch of panels).

:func:`analyse_batch` does the numerics on arrays of any leading batch
shape and returns a :class:`~tri.engine.results.BatchAnalysis`;
:func:`analyse` runs the same code on one panel and adds the findings,
the readings comparison and plain-number results
(:class:`~tri.engine.results.PanelAnalysis`).

Unless ``iterate_voltage`` is set, every current is computed at nominal
voltage, as panel schedules are (``I = conj(S / V)``). With a supply and
``iterate_voltage=True`` every load draws its scheduled power at the
computed panel voltage, and all currents (fundamental and harmonics) follow
from that solution; ``PanelAnalysis.currents_basis`` says which.

References
----------
See the modules: :mod:`tri.engine.phasors`, :mod:`tri.engine.sequence`,
:mod:`tri.engine.harmonics`, :mod:`tri.engine.supply`,
:mod:`tri.engine.unbalance`, :mod:`tri.engine.loading`,
:mod:`tri.engine.readings`.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from tri.engine.harmonics import order_currents, rms, thd_pct
from tri.engine.high_leg import high_leg_caution, supply_phase_voltages
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    UNPLACED,
    CircuitArrays,
    MeasuredReadings,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)
from tri.engine.legs import (
    breaker_calculated_a,
    breaker_results,
    check_wiring_inputs,
    shared_neutral_results,
    wiring_spectra,
)
from tri.engine.limits import LEVEL_RANK, FindingLimits
from tri.engine.loading import (
    breaker_findings,
    calculated_load_a,
    circuit_calculated_a,
    continuous_weights,
    loading_findings,
    loading_pct,
    neutral_calculated_load_a,
)
from tri.engine.neutral_rules import neutral_findings, three_pole_triplen_finding
from tri.engine.phasors import (
    element_currents,
    line_voltages,
    schedule_va,
)
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
from tri.engine.sequence import sequence_components, unbalance_pct
from tri.engine.supply import solve_voltages, supply_impedances, transformer_impedance
from tri.engine.unbalance import deviation_rate_pct, max_minus_min_pct, nema_derating, vuf_pct
from tri.engine.unbalance_findings import (
    deviation_findings,
    phase_kva_findings,
    voltage_findings,
)
from tri.words import plural

#: Phasors smaller than this fraction of the panel's total circuit current are
#: round-off and are set to exactly 0 (so a balanced neutral reads 0∠0°) [-].
SNAP_RELATIVE = 1e-12

BASIS_NOMINAL = "nominal voltage"
BASIS_ITERATED = "panel voltage (iterated constant power)"


def check_inputs(circuits: CircuitArrays, system: SystemVoltages, ratings: Ratings) -> None:
    """Raise ``ValueError`` for input the engine cannot analyse.

    Parameters
    ----------
    circuits : CircuitArrays
    system : SystemVoltages
    ratings : Ratings

    Notes
    -----
    Checked: array shapes agree; connection codes known; phase indices 0..2
    on placed rows; a 2-pole circuit's phases differ; complex powers finite;
    no line-to-neutral circuit on a 3-wire system; voltages and ratings > 0.
    """
    shape = np.shape(circuits.s_va)
    if not shape:
        raise ValueError("circuit arrays need at least one axis (circuits)")
    for name in ("connection", "phase_p", "phase_q", "continuous", "breaker_a"):
        if np.shape(getattr(circuits, name)) != shape:
            raise ValueError(f"{name} has shape {np.shape(getattr(circuits, name))}, not {shape}")
    h = np.shape(circuits.orders)
    if len(h) != 1 or np.shape(circuits.harmonics) != (*shape, h[0]):
        raise ValueError("harmonics must have shape (..., n, len(orders))")
    if h[0] and np.any(np.asarray(circuits.orders) < 2):
        raise ValueError("harmonic orders must be > 1 (the fundamental is implicit)")
    if np.any(np.diff(np.asarray(circuits.orders)) <= 0):
        raise ValueError("harmonic orders must be strictly increasing")
    conn = np.asarray(circuits.connection)
    if np.any((conn < UNPLACED) | (conn > THREE_PHASE)):
        raise ValueError("unknown connection code")
    placed = (conn == LINE_TO_NEUTRAL) | (conn == LINE_TO_LINE)
    for name in ("phase_p", "phase_q"):
        idx = np.asarray(getattr(circuits, name))
        if np.any(placed & ((idx < 0) | (idx > 2))):
            raise ValueError(f"{name} must be 0, 1 or 2 on placed circuits")
    if np.any((conn == LINE_TO_LINE) & (circuits.phase_p == circuits.phase_q)):
        raise ValueError("a line-to-line circuit needs two different phases")
    if not np.all(np.isfinite(circuits.s_va)):
        raise ValueError("loads must be finite numbers")
    if not system.has_neutral and np.any(conn == LINE_TO_NEUTRAL):
        raise ValueError("line-to-neutral circuit on a 3-wire system (no neutral)")
    if not system.v_ll > 0 or (system.v_ln is not None and not system.v_ln > 0):
        raise ValueError("system voltages must be > 0")
    for name in ("bus_a", "main_a", "neutral_a"):
        value = getattr(ratings, name)
        if value is not None and not value > 0:
            raise ValueError(f"rating {name} must be > 0, got {value!r}")
    if not ratings.continuous_factor > 0:
        raise ValueError("continuous_factor must be > 0")
    breakers = np.asarray(circuits.breaker_a, dtype=float)
    if np.any(~np.isnan(breakers) & ~(breakers > 0)) or np.any(np.isinf(breakers)):
        raise ValueError("breaker ratings must be > 0 and finite (NaN: none)")
    check_wiring_inputs(circuits, system)


def _snap(x: np.ndarray, scale: np.ndarray, extra_dims: int) -> np.ndarray:
    """Zero phasors below ``SNAP_RELATIVE·scale`` (``scale`` per panel)."""
    s = np.reshape(scale, np.shape(scale) + (1,) * extra_dims)
    return np.where(np.abs(x) <= SNAP_RELATIVE * s, 0, x)


def _code_figures(
    circuits: CircuitArrays,
    system: SystemVoltages,
    ratings: Ratings,
    rating: float,
    nonlinear: np.ndarray,
    total_va: np.ndarray,
) -> dict[str, np.ndarray]:
    """The figures of the code's calculation (scheduled loads) and the non-linear
    line-to-neutral share, as :class:`BatchAnalysis` fields."""
    factor = ratings.continuous_factor
    e = supply_phase_voltages(system)
    calculated = calculated_load_a(circuits, factor, e)
    s_abs = np.abs(np.asarray(circuits.s_va))
    ln = np.asarray(circuits.connection) == LINE_TO_NEUTRAL
    nl_ln_va = np.sum(np.where(nonlinear & ln, s_abs, 0.0), axis=-1)
    safe = np.where(total_va > 0, total_va, 1.0)
    return {
        "phase_calculated_a": calculated,
        "phase_calculated_pct": loading_pct(calculated, rating),
        "neutral_calculated_a": neutral_calculated_load_a(circuits, e),
        "circuit_calculated_a": breaker_calculated_a(
            circuits, circuit_calculated_a(circuits, factor, e), factor, e
        ),
        "nonlinear_ln_share_pct": np.where(total_va > 0, 100.0 * nl_ln_va / safe, 0.0),
    }


def analyse_batch(
    circuits: CircuitArrays,
    system: SystemVoltages,
    ratings: Ratings,
    supply: SupplyImpedance | None = None,
    *,
    iterate_voltage: bool = False,
    tol: float = 1e-9,
    max_iter: int = 100,
) -> BatchAnalysis:
    """Numeric analysis of one panel or a batch of panels.

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (B..., n) (``B`` may be empty); shorter panels padded with
        ``UNPLACED`` rows of zero load.
    system : SystemVoltages
        Nominal voltages, shared by the batch.
    ratings : Ratings
        Ratings, shared by the batch [A].
    supply : SupplyImpedance, optional
        Transformer and feeder; enables the voltage results.
    iterate_voltage : bool
        Solve loads as constant power at the panel voltage (needs ``supply``).
    tol, max_iter : float, int
        Iteration tolerance [pu of V_LN] and limit.

    Returns
    -------
    BatchAnalysis
        Arrays with leading shape ``B``; each panel's figures equal those of
        the panel analysed alone.
    """
    check_inputs(circuits, system, ratings)
    if supply is not None and system.high_leg is not None:
        raise ValueError(
            "voltages at the panel are not modelled for a high-leg delta (the supply model is "
            "a wye source)"
        )
    conn = np.asarray(circuits.connection)
    e = supply_phase_voltages(system)

    sol = None
    if supply is not None:
        sol = solve_voltages(
            circuits, system, supply, iterate=iterate_voltage, tol=tol, max_iter=max_iter
        )
        i_e = sol.i_element
    else:
        i_e = element_currents(circuits, e)

    weights = continuous_weights(circuits.continuous, ratings.continuous_factor)
    oc = order_currents(circuits, i_e, weights if np.any(circuits.continuous) else None)
    if not (np.all(np.isfinite(oc.phase)) and np.all(np.isfinite(oc.circuit_rms_a))):
        raise ValueError("harmonics must be finite numbers")
    scale = np.sum(oc.circuit_rms_a, axis=-1)
    rating = ratings.main_a if ratings.main_a is not None else ratings.bus_a
    neutral_rating = ratings.neutral_a if ratings.neutral_a is not None else ratings.bus_a
    currents = current_figures(
        oc.phase, oc.neutral, oc.phase_weighted, scale, rating, neutral_rating
    )

    s_abs = np.abs(np.asarray(circuits.s_va))
    placed = conn != UNPLACED
    nonlinear = (oc.harmonic_power_pu > 0) & placed
    total_va = np.sum(np.where(placed, s_abs, 0.0), axis=-1)
    nl_va = np.sum(np.where(nonlinear, s_abs, 0.0), axis=-1)
    nl_share = np.where(total_va > 0, 100.0 * nl_va / np.where(total_va > 0, total_va, 1.0), 0.0)
    tp_triplen = np.any((conn == THREE_PHASE) & (oc.triplen_power_pu > 0), axis=-1)

    volt: dict[str, np.ndarray | None] = {}
    if sol is not None:
        volt = voltage_figures(sol.v_phase, system.has_neutral)
        volt.update(iterations=sol.iterations, converged=sol.converged)

    wiring = {
        k: _snap(v, scale, v.ndim - np.ndim(scale))
        for k, v in wiring_spectra(circuits, i_e).items()
    }

    return BatchAnalysis(
        orders=oc.orders,
        phase_va=schedule_va(circuits),
        circuit_current_a=oc.circuit_fundamental_a,
        circuit_rms_a=oc.circuit_rms_a,
        nonlinear_share_pct=nl_share,
        unplaced_count=np.sum((conn == UNPLACED) & (s_abs > 0), axis=-1),
        three_pole_triplens=tp_triplen,
        **currents,
        **_code_figures(circuits, system, ratings, rating, nonlinear, total_va),
        **volt,
        **wiring,
    )


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


def current_figures(
    phase: np.ndarray,
    neutral: np.ndarray,
    phase_weighted: np.ndarray | None,
    scale: np.ndarray,
    rating_a: float | np.ndarray,
    neutral_rating_a: float | np.ndarray,
) -> dict[str, np.ndarray]:
    """Phase, neutral and sequence figures from line and neutral spectra.

    Parameters
    ----------
    phase : complex ndarray, shape (B..., 3, H)
        Line currents at each order, the fundamental first [A].
    neutral : complex ndarray, shape (B..., H)
        Neutral current at each order [A].
    phase_weighted : complex ndarray, shape (B..., 3, H), or None
        Line currents with continuous loads at the continuous factor [A]
        (None: the same as ``phase``).
    scale : float ndarray, shape (B...)
        Sum of the circuits' RMS currents [A]; phasors below
        ``SNAP_RELATIVE·scale`` are round-off and set to 0.
    rating_a, neutral_rating_a : float or ndarray of shape (B...)
        Phase rating (main, else bus) and neutral rating [A].

    Returns
    -------
    dict
        The :class:`~tri.engine.results.BatchAnalysis` fields ``phase_spectrum``
        to ``max_deviation_fundamental_pct`` and ``max_minus_min_pct`` [A], [%].
    """
    phase_spec = _snap(phase, scale, 2)
    neutral_spec = _snap(neutral, scale, 1)
    design_spec = phase_spec if phase_weighted is None else phase_weighted
    rating = np.asarray(rating_a, dtype=float)[..., None]
    phase_rms = rms(phase_spec)
    design_rms = rms(design_spec)
    neutral_rms = rms(neutral_spec)
    fund = phase_spec[..., 0]
    seq = _snap(sequence_components(fund), scale, 1)
    return {
        "phase_spectrum": phase_spec,
        "phase_rms_a": phase_rms,
        "phase_thd_pct": thd_pct(phase_spec),
        "phase_loading_pct": 100.0 * phase_rms / rating,
        "phase_design_a": design_rms,
        "phase_design_loading_pct": 100.0 * design_rms / rating,
        "neutral_spectrum": neutral_spec,
        "neutral_rms_a": neutral_rms,
        "neutral_loading_pct": 100.0 * neutral_rms / np.asarray(neutral_rating_a, dtype=float),
        "sequence": seq,
        "negative_sequence_pct": unbalance_pct(seq, 2),
        "zero_sequence_pct": unbalance_pct(seq, 0),
        "max_deviation_pct": deviation_rate_pct(phase_rms),
        "max_deviation_fundamental_pct": deviation_rate_pct(np.abs(fund)),
        "max_minus_min_pct": max_minus_min_pct(phase_rms),
    }


def voltage_figures(v_phase: np.ndarray, has_neutral: bool | np.ndarray) -> dict[str, np.ndarray]:
    """Voltage unbalance figures from panel phase voltages.

    Parameters
    ----------
    v_phase : complex ndarray, shape (B..., 3)
        Phase-to-neutral voltages at the panel [V].
    has_neutral : bool or bool ndarray of shape (B...)
        4-wire panels (the phase deviation is NaN on 3-wire ones).

    Returns
    -------
    dict
        The :class:`~tri.engine.results.BatchAnalysis` fields ``v_phase``,
        ``v_line``, ``vuf_pct``, ``line_deviation_pct``,
        ``phase_deviation_pct`` and ``motor_derating``.
    """
    v_line = line_voltages(v_phase)
    line_dev = deviation_rate_pct(np.abs(v_line))
    return {
        "v_phase": v_phase,
        "v_line": v_line,
        "vuf_pct": vuf_pct(v_line),
        "line_deviation_pct": line_dev,
        "phase_deviation_pct": np.where(has_neutral, deviation_rate_pct(np.abs(v_phase)), np.nan),
        "motor_derating": nema_derating(line_dev),
    }


def _f(x: np.ndarray | float) -> float:
    return float(np.asarray(x))


def _phasors3(x: np.ndarray) -> tuple[Phasor, Phasor, Phasor]:
    return (Phasor.of(x[0]), Phasor.of(x[1]), Phasor.of(x[2]))


def analyse(
    circuits: CircuitArrays,
    system: SystemVoltages,
    ratings: Ratings,
    supply: SupplyImpedance | None = None,
    readings: MeasuredReadings | None = None,
    *,
    iterate_voltage: bool = False,
    phase_labels: tuple[str, str, str] = ("A", "B", "C"),
    limits: FindingLimits | None = None,
    circuit_labels: tuple[str, ...] | None = None,
    tol: float = 1e-9,
    max_iter: int = 100,
) -> PanelAnalysis:
    """Analyse one panel: currents, neutral, sequence, harmonics, voltages, findings.

    Parameters
    ----------
    circuits : CircuitArrays
        One panel, per-circuit arrays of shape (n,) (n may be 0).
    system : SystemVoltages
        Nominal voltages [V].
    ratings : Ratings
        Bus, main and neutral ratings [A] and the continuous factor [-].
    supply : SupplyImpedance, optional
        Transformer and feeder; without it ``voltage`` is None.
    readings : MeasuredReadings, optional
        Site readings; without them ``readings`` is None.
    iterate_voltage : bool
        With a supply, solve loads as constant power at the panel voltage
        (without one it has no effect beyond an info finding).
    phase_labels : tuple of 3 str
        Labels for results and messages (e.g. ``("L1", "L2", "L3")``).
    limits : FindingLimits, optional
        Thresholds for findings (defaults: :mod:`tri.engine.limits`).
    circuit_labels : tuple of str, optional
        How findings name each circuit row (slot or phases, and name);
        default ``"circuit 1"``, ``"circuit 2"``, ...
    tol, max_iter : float, int
        Voltage iteration tolerance [pu of V_LN] and limit.

    Returns
    -------
    PanelAnalysis

    Raises
    ------
    ValueError
        For malformed input (:func:`check_inputs`) or batched arrays.

    Notes
    -----
    The computation is :func:`analyse_batch` on a batch of one; this function
    only converts its arrays to plain numbers and adds findings (loading,
    neutral, balance, voltage, readings; see :mod:`tri.engine.loading` and
    :mod:`tri.engine.readings`), ordered limit, warning, info.
    """
    if np.ndim(circuits.s_va) != 1:
        raise ValueError("analyse() takes one panel; use analyse_batch() for a batch")
    b = analyse_batch(
        circuits,
        system,
        ratings,
        supply,
        iterate_voltage=iterate_voltage and supply is not None,
        tol=tol,
        max_iter=max_iter,
    )
    source = None
    if supply is not None:
        z_ph, z_n = supply_impedances(supply, system)
        tx = transformer_impedance(
            supply.transformer_kva, supply.transformer_z_pct, supply.transformer_x_r, system.v_ll
        )
        source = SourceFigures(complex(z_ph), complex(z_n), tx.full_load_a)
    return describe_panel(
        b,
        system,
        ratings,
        source,
        readings,
        iterated=iterate_voltage and supply is not None,
        iterate_requested=iterate_voltage,
        phase_labels=phase_labels,
        limits=limits,
        circuits=circuits,
        circuit_labels=circuit_labels,
    )


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
        One panel's arrays (no batch dimensions), from :func:`analyse_batch`
        or from the roll-up of a tree of panels.
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
    orders = tuple(int(h) for h in b.orders)

    phases = tuple(
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
    max_phase = max(p.rms_a for p in phases)
    neutral_rms = _f(b.neutral_rms_a)
    neutral_rating = ratings.neutral_a if ratings.neutral_a is not None else ratings.bus_a
    neutral = NeutralResult(
        present=system.has_neutral,
        current=Phasor.of(b.neutral_spectrum[0]),
        rms_a=neutral_rms,
        rating_a=float(neutral_rating) if system.has_neutral else None,
        loading_pct=_f(b.neutral_loading_pct) if system.has_neutral else None,
        ratio_to_max_phase=neutral_rms / max_phase if max_phase > 0 else 0.0,
        harmonic_a=tuple(float(x) for x in np.abs(b.neutral_spectrum)),
        calculated_a=_f(b.neutral_calculated_a) if system.has_neutral else None,
    )
    voltage = None
    if source is not None and b.v_phase is not None:
        vln = system.v_ln_or_derived
        # each phase against its own nominal (the high leg of a high-leg delta: 208 V of 240)
        nominal = (vln,) * 3 if system.high_leg is None else np.abs(supply_phase_voltages(system))
        derating = _f(b.motor_derating)
        phase_dev = _f(b.phase_deviation_pct)
        voltage = VoltageResult(
            phase_v=_phasors3(b.v_phase),
            line_v=_phasors3(b.v_line),
            vuf_pct=_f(b.vuf_pct),
            line_deviation_pct=_f(b.line_deviation_pct),
            phase_deviation_pct=None if math.isnan(phase_dev) else phase_dev,
            motor_derating=None if math.isnan(derating) else derating,
            drop_pct=tuple(  # type: ignore[arg-type]
                float(100.0 * (n - abs(v)) / n) for n, v in zip(nominal, b.v_phase, strict=True)
            ),
            z_phase_ohm=source.z_phase_ohm,
            z_neutral_ohm=source.z_neutral_ohm,
            transformer_full_load_a=source.transformer_full_load_a,
            iterated=iterate_voltage,
            iterations=int(b.iterations),
            converged=bool(b.converged),
        )
    seq = b.sequence
    a = PanelAnalysis(
        phase_labels=labels,  # type: ignore[arg-type]
        v_ll=float(system.v_ll),
        v_ln=None if system.v_ln is None else float(system.v_ln),
        frequency_hz=float(system.frequency_hz),
        currents_basis=BASIS_ITERATED if iterate_voltage else BASIS_NOMINAL,
        orders=orders,
        rating_a=float(ratings.main_a if ratings.main_a is not None else ratings.bus_a),
        continuous_factor=float(ratings.continuous_factor),
        phases=phases,  # type: ignore[arg-type]
        neutral=neutral,
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
    n_rows = len(a.circuit_rms_a)
    names = circuit_labels or tuple(f"circuit {k + 1}" for k in range(n_rows))
    if len(names) != n_rows:
        raise ValueError(f"circuit_labels has {len(names)} labels for {n_rows} circuits")
    # 310.15(E) and IEC Annex E are written for the neutral of a wye; a high-leg delta's
    # neutral is the centre tap of one winding
    wye = system.has_neutral and system.high_leg is None
    findings = _findings(a, circuits, ratings, limits, names, wye)
    if system.high_leg is not None:
        findings.append(high_leg_caution(labels[system.high_leg], system.v_ll))
    if bool(b.three_pole_triplens):
        findings.append(three_pole_triplen_finding())
    findings.extend(voltage_findings(a, limits))
    if iterate_requested and source is None:
        findings.append(
            Finding(
                "info",
                "Voltage iteration was asked for, but no supply is described; currents are "
                "at nominal voltage.",
                "tri engine option (needs the supply table)",
            )
        )
    comparison = None
    if readings is not None:
        comparison, more = compare_readings(a, readings, limits)
        if system.high_leg is not None:  # unequal phase voltages by design: no deviation rate
            comparison = dataclasses.replace(comparison, phase_deviation_pct=None)
        findings.extend(more)
    findings.sort(key=lambda f: LEVEL_RANK[f.level])
    return dataclasses.replace(a, readings=comparison, findings=tuple(findings))
