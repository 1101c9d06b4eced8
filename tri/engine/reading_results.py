"""Frozen results of the site-readings comparison: measured against computed
current per phase (:class:`PhaseReading`) and the whole comparison with the
measured voltages' unbalance (:class:`ReadingsComparison`); computed by
:mod:`tri.engine.readings`."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class PhaseReading:
    """Measured against computed current of one phase.

    Attributes
    ----------
    label : str
        Phase label.
    measured_a : float or None
        Measured true-RMS current [A].
    computed_rms_a : float
        Computed true-RMS current [A].
    difference_pct : float or None
        ``(measured − computed) / computed`` [%]; None if not measured or
        nothing computed.
    """

    label: str
    measured_a: float | None
    computed_rms_a: float
    difference_pct: float | None


@dataclass(frozen=True)
class ReadingsComparison:
    """What was measured on site, beside what the schedule predicts.

    Attributes
    ----------
    phases : tuple of 3 PhaseReading
        Per-phase currents.
    neutral_measured_a : float or None
        Measured neutral current [A].
    neutral_computed_fundamental_a : float
        Computed fundamental neutral current [A].
    neutral_computed_rms_a : float
        Computed true-RMS neutral current [A].
    volts_ll : tuple of 3 (float or None)
        Measured line voltages AB, BC, CA [V].
    vuf_pct : float or None
        VUF from the three measured line magnitudes by the β formula
        (IEC 61000-4-30) [%].
    line_deviation_pct : float or None
        NEMA percent unbalance of the measured line voltages [%].
    motor_derating : float or None
        NEMA MG 1 derating at the measured unbalance [-].
    volts_ln : tuple of 3 (float or None)
        Measured phase-to-neutral voltages [V].
    phase_deviation_pct : float or None
        Deviation rate of the measured phase voltages [%].
    computed_vuf_pct : float or None
        VUF the supply model predicts, when a supply is described [%].
    """

    phases: tuple[PhaseReading, PhaseReading, PhaseReading]
    neutral_measured_a: float | None
    neutral_computed_fundamental_a: float
    neutral_computed_rms_a: float
    volts_ll: tuple[float | None, float | None, float | None]
    vuf_pct: float | None
    line_deviation_pct: float | None
    motor_derating: float | None
    volts_ln: tuple[float | None, float | None, float | None]
    phase_deviation_pct: float | None
    computed_vuf_pct: float | None
