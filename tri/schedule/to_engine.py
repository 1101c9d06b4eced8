"""Turn a schedule model into the engine's plain-data inputs.

This is the only place that knows both the model and the engine's input
contract (:mod:`tri.engine.inputs`).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from tri.engine.analysis import analyse
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
from tri.engine.legs import shared_neutral_finding
from tri.engine.limits import (
    CONTINUOUS_FACTOR,
    LEVEL_RANK,
    FindingLimits,
    continuous_factor_for,
    practice_for,
)
from tri.engine.profiles import profile_matrix
from tri.engine.results import Finding, PanelAnalysis
from tri.schedule.model import Circuit, Schedule
from tri.schedule.validate import circuit_where
from tri.schedule.wiring import (
    LEG_LINE_TO_LINE,
    LEG_TO_NEUTRAL,
    Leg,
    NeutralGroup,
    legs_of,
    neutral_groups,
)
from tri.words import plural

#: The continuous factor in NEC practice [-] (:data:`tri.engine.limits.CONTINUOUS_FACTOR`);
#: the default follows the panel's practice (:func:`default_continuous_factor`).
DEFAULT_CONTINUOUS_FACTOR = CONTINUOUS_FACTOR


def connection_of(circuit: Circuit) -> tuple[int, int, int]:
    """``(connection, phase_p, phase_q)`` codes of one single-leg circuit for the engine."""
    if circuit.phases is None:
        return UNPLACED, 0, 0
    if circuit.poles == 1:
        p = circuit.phases[0]
        return LINE_TO_NEUTRAL, p, p
    if circuit.poles == 2:
        return LINE_TO_LINE, circuit.phases[0], circuit.phases[1]
    return THREE_PHASE, 0, 0


_CODES = {LEG_TO_NEUTRAL: LINE_TO_NEUTRAL, LEG_LINE_TO_LINE: LINE_TO_LINE}


def _leg_codes(leg: Leg) -> tuple[int, int, int]:
    code = _CODES.get(leg.kind, THREE_PHASE)
    if code == THREE_PHASE:
        return THREE_PHASE, 0, 0
    return code, leg.phases[0], leg.phases[-1]


def element_rows(schedule: Schedule) -> list[tuple[int, Leg | None]]:
    """The engine's rows as ``(circuit index, leg)``; ``None`` for an unplaced circuit.

    Row ``i`` is circuit ``i``'s first leg (so the first ``len(circuits)``
    rows follow the schedule); the further legs of breakers with several
    legs come after them, in circuit and pole order.
    """
    legs = [legs_of(c, schedule) for c in schedule.circuits]
    rows: list[tuple[int, Leg | None]] = [(i, g[0] if g else None) for i, g in enumerate(legs)]
    rows += [(i, leg) for i, g in enumerate(legs) for leg in g[1:]]
    return rows


def circuit_arrays(schedule: Schedule) -> CircuitArrays:
    """Every circuit of ``schedule`` as engine arrays (unplaced ones contribute nothing).

    One row per circuit, in order, then one more row for each further leg of
    a breaker with several legs (:func:`element_rows`). When such a breaker
    exists the rows carry breaker numbers (the circuit's index), and when a
    shared neutral exists, neutral-group numbers in the order of
    :func:`tri.schedule.wiring.neutral_groups`.
    """
    circuits = schedule.circuits
    rows = element_rows(schedule)
    n = len(rows)
    codes = np.array(
        [_leg_codes(leg) if leg else (UNPLACED, 0, 0) for _, leg in rows], dtype=np.int64
    ).reshape(n, 3)
    s_va = np.array([_leg_power(schedule, circuits[i], leg) for i, leg in rows], dtype=complex)
    pf = np.array([circuits[i].pf for i, _ in rows], dtype=float)
    by_poles = {k: schedule.system.circuit_voltage(k) for k in (1, 2, 3)}
    volts = np.array([by_poles[_leg_poles(circuits[i], leg)] for i, leg in rows], dtype=float)
    user = {p.name: p.harmonics for p in schedule.profiles}
    harmonics, orders = profile_matrix([circuits[i].profile for i, _ in rows], pf, volts, user)
    return CircuitArrays(
        s_va=s_va,
        connection=codes[:, 0],
        phase_p=codes[:, 1],
        phase_q=codes[:, 2],
        harmonics=harmonics,
        orders=orders,
        continuous=np.array([circuits[i].continuous for i, _ in rows], dtype=bool),
        breaker_a=np.array(
            [np.nan if circuits[i].breaker_a is None else circuits[i].breaker_a for i, _ in rows],
            dtype=float,
        ),
        **_wiring_numbers(schedule, rows),
    )


def circuit_labels(schedule: Schedule) -> tuple[str, ...]:
    """How findings name each engine row: its circuit's name and slot or phases, never a
    number (the legs of one breaker share its label; :func:`element_rows`)."""
    where = [circuit_where(c, schedule) for c in schedule.circuits]
    return tuple(where[i] for i, _ in element_rows(schedule))


def _leg_power(schedule: Schedule, c: Circuit, leg: Leg | None) -> complex:
    """Complex power of one leg [VA], ``Q > 0`` lagging (the whole circuit when unplaced)."""
    if leg is None:
        return c.complex_power_va(schedule.system)
    sin_phi = math.sqrt(max(0.0, 1.0 - c.pf * c.pf))
    return complex(leg.va * c.pf, (-1.0 if c.leading else 1.0) * leg.va * sin_phi)


def _leg_poles(c: Circuit, leg: Leg | None) -> int:
    """Pole count whose voltage a leg sees (what voltage-dependent profiles are scaled by)."""
    if leg is None:
        return c.poles
    return {LEG_TO_NEUTRAL: 1, LEG_LINE_TO_LINE: 2}.get(leg.kind, 3)


def _wiring_numbers(schedule: Schedule, rows: list[tuple[int, Leg | None]]) -> dict:
    """``breaker`` and ``neutral_group`` arrays, for schedules that need them."""
    out: dict[str, np.ndarray] = {}
    if len(rows) > len(schedule.circuits):
        out["breaker"] = np.array([i for i, _ in rows], dtype=np.int64)
    groups = neutral_groups(schedule)
    if groups:
        of = {i: g for g, group in enumerate(groups) for i in group.circuits}
        out["neutral_group"] = np.array(
            [of.get(i, -1) if leg is not None else -1 for i, leg in rows], dtype=np.int64
        )
    return out


def system_voltages(schedule: Schedule) -> SystemVoltages:
    """Nominal voltages and frequency of the panel's system (and its high leg, if any)."""
    v = schedule.system.voltages(schedule.panel.frequency_hz)
    high = schedule.panel.effective_high_leg
    return v if high is None else dataclasses.replace(v, high_leg=high)


def default_continuous_factor(schedule: Schedule) -> float:
    """The continuous factor of the panel's practice: 1.25 (NEC, 60 Hz), 1 (IEC, 50 Hz) [-]."""
    return continuous_factor_for(practice_for(system_voltages(schedule).frequency_hz))


def ratings(schedule: Schedule, continuous_factor: float | None = None) -> Ratings:
    """Bus, main and neutral ratings of the panel [A] (factor None: the practice's)."""
    if continuous_factor is None:
        continuous_factor = default_continuous_factor(schedule)
    p = schedule.panel
    return Ratings(
        bus_a=p.bus_a,
        main_a=p.main_a,
        neutral_a=p.effective_neutral_a if schedule.system.has_neutral else None,
        continuous_factor=continuous_factor,
    )


def supply_impedance(schedule: Schedule) -> SupplyImpedance | None:
    """The ``[supply]`` table for the engine, or ``None``."""
    return schedule.supply


def measured(schedule: Schedule) -> MeasuredReadings | None:
    """The ``[readings]`` table for the engine, or ``None`` when nothing was measured."""
    r = schedule.readings
    if r is None or r.is_empty:
        return None
    return MeasuredReadings(
        phase_amps=r.phase_amps,
        neutral_amps=r.neutral_amps,
        volts_ll=r.volts_ll,
        volts_ln=r.volts_ln,
    )


def analyse_schedule(
    schedule: Schedule,
    *,
    iterate_voltage: bool = False,
    continuous_factor: float | None = None,
    limits: FindingLimits | None = None,
) -> PanelAnalysis:
    """Run the engine on a schedule: the one call the CLI, the UI and the rebalancer share.

    Parameters
    ----------
    schedule : Schedule
        The panel.
    iterate_voltage : bool
        With a ``[supply]``, solve loads as constant power at the panel voltage.
    continuous_factor : float, optional
        Multiplier on continuous loads for the sizing check [-]; default the
        panel's practice (:func:`default_continuous_factor`).
    limits : FindingLimits, optional
        Thresholds for findings.
    """
    result = analyse(
        circuit_arrays(schedule),
        system_voltages(schedule),
        ratings(schedule, continuous_factor),
        supply_impedance(schedule),
        measured(schedule),
        iterate_voltage=iterate_voltage,
        phase_labels=schedule.labels,
        limits=limits,
        circuit_labels=circuit_labels(schedule),
    )
    result = per_circuit(result, schedule)
    fed = [c.feed.path for c in schedule.circuits if c.feed is not None]
    if fed:  # one panel of a building, analysed alone (the UI, tri suggest)
        note = Finding(
            "info",
            f"This panel feeds {plural(len(fed), 'panel')} ({', '.join(fed)}); these figures leave "
            "out what it feeds. `tri report` on this file rolls the whole building up.",
            "tri roll-up (feeder circuits carry no load of their own)",
        )
        result = dataclasses.replace(result, findings=(*result.findings, note))
    return result


def per_circuit(analysis: PanelAnalysis, schedule: Schedule) -> PanelAnalysis:
    """The analysis with one current per circuit and the shared-neutral findings added.

    A breaker with several legs gets its largest pole current (fundamental
    and RMS) and its largest pole's calculated load (the engine's figure for
    each of its rows); its legs stay in ``analysis.breakers``. A shared
    neutral whose breakers do not trip together gets the NEC 210.4(B)
    finding.
    """
    n = len(schedule.circuits)
    current = list(analysis.circuit_current_a[:n])
    rms = list(analysis.circuit_rms_a[:n])
    calculated = analysis.circuit_calculated_a[:n]
    for i, b in enumerate(analysis.breakers):
        if schedule.circuits[i].has_legs and schedule.circuits[i].is_placed:
            current[i], rms[i] = b.max_current_a, b.max_rms_a
    findings = list(analysis.findings)
    for group, result in zip(neutral_groups(schedule), analysis.shared_neutrals, strict=True):
        finding = shared_neutral_finding(
            _group_text(group, schedule), group.common_trip, result.rms_a
        )
        if finding is not None:
            findings.append(finding)
    findings.sort(key=lambda f: LEVEL_RANK[f.level])
    return dataclasses.replace(
        analysis,
        circuit_current_a=tuple(current),
        circuit_rms_a=tuple(rms),
        circuit_calculated_a=calculated,
        findings=tuple(findings),
    )


def _group_text(group: NeutralGroup, schedule: Schedule) -> str:
    """``'N21' (slots 21, 23)`` or ``'N21' (Copier, Printer)`` on a rail board."""
    cs = [schedule.circuits[i] for i in group.circuits]
    slots = [c.slot for c in cs if c.slot is not None]
    if len(slots) == len(cs):
        where = "slots " + ", ".join(str(slot) for slot in sorted(slots))
    else:
        where = ", ".join(c.name for c in cs)
    return f"'{group.label(schedule)}' ({where})"
