"""Turn a schedule model into the engine's plain-data inputs.

This is the only place that knows both the model and the engine's input
contract (:mod:`tri.engine.inputs`).
"""

from __future__ import annotations

import dataclasses

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
from tri.engine.limits import CONTINUOUS_FACTOR, FindingLimits, continuous_factor_for, practice_for
from tri.engine.profiles import profile_matrix
from tri.engine.results import Finding, PanelAnalysis
from tri.schedule.model import Circuit, Schedule
from tri.schedule.validate import circuit_where

#: The continuous factor in NEC practice [-] (:data:`tri.engine.limits.CONTINUOUS_FACTOR`);
#: the default follows the panel's practice (:func:`default_continuous_factor`).
DEFAULT_CONTINUOUS_FACTOR = CONTINUOUS_FACTOR


def connection_of(circuit: Circuit) -> tuple[int, int, int]:
    """``(connection, phase_p, phase_q)`` codes of one circuit for the engine."""
    if circuit.phases is None:
        return UNPLACED, 0, 0
    if circuit.poles == 1:
        p = circuit.phases[0]
        return LINE_TO_NEUTRAL, p, p
    if circuit.poles == 2:
        return LINE_TO_LINE, circuit.phases[0], circuit.phases[1]
    return THREE_PHASE, 0, 0


def circuit_arrays(schedule: Schedule) -> CircuitArrays:
    """Every circuit of ``schedule`` as engine arrays (unplaced ones contribute nothing)."""
    system = schedule.system
    circuits = schedule.circuits
    n = len(circuits)
    codes = np.array([connection_of(c) for c in circuits], dtype=np.int64).reshape(n, 3)
    s_va = np.array([c.complex_power_va(system) for c in circuits], dtype=complex)
    pf = np.array([c.pf for c in circuits], dtype=float)
    volts = np.array([system.circuit_voltage(c.poles) for c in circuits], dtype=float)
    user = {p.name: p.harmonics for p in schedule.profiles}
    harmonics, orders = profile_matrix([c.profile for c in circuits], pf, volts, user)
    return CircuitArrays(
        s_va=s_va,
        connection=codes[:, 0],
        phase_p=codes[:, 1],
        phase_q=codes[:, 2],
        harmonics=harmonics,
        orders=orders,
        continuous=np.array([c.continuous for c in circuits], dtype=bool),
        breaker_a=np.array(
            [np.nan if c.breaker_a is None else c.breaker_a for c in circuits], dtype=float
        ),
    )


def circuit_labels(schedule: Schedule) -> tuple[str, ...]:
    """How findings name each circuit: its name and its slot or phases, never a number."""
    return tuple(circuit_where(c, schedule) for c in schedule.circuits)


def system_voltages(schedule: Schedule) -> SystemVoltages:
    """Nominal voltages and frequency of the panel's system."""
    return schedule.system.voltages(schedule.panel.frequency_hz)


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
    fed = [c.feed.path for c in schedule.circuits if c.feed is not None]
    if fed:  # one panel of a building, analysed alone (the UI, tri suggest)
        note = Finding(
            "info",
            f"This panel feeds {len(fed)} panel(s) ({', '.join(fed)}); these figures leave "
            "them out. `tri report` on this file rolls the whole building up.",
            "tri roll-up (feeder circuits carry no load of their own)",
        )
        result = dataclasses.replace(result, findings=(*result.findings, note))
    return result
