"""The blocks of the report dict (:func:`tri.report.data.report_data`) built from
the engine's figures: one circuit's row, the phases, the neutral, the sizing
rule, the voltage and the site readings, as plain numbers (see
:mod:`tri.report.data` for every key and unit)."""

from __future__ import annotations

from typing import Any

from tri.engine.limits import RATING_PCT, exceeds, loading_word
from tri.engine.loading import calculation_words, sizing_clauses
from tri.engine.results import PanelAnalysis, Phasor
from tri.report import wiring_data
from tri.report.numbers import num
from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import occupied_slots


def phasor(p: Phasor, unit: str) -> dict[str, float | None]:
    """``{unit: magnitude, "deg": angle}`` of a phasor (``unit`` ``"a"`` or ``"v"``)."""
    return {unit: num(p.magnitude), "deg": num(p.deg)}


def line_labels(labels: tuple[str, str, str]) -> tuple[str, str, str]:
    """Line-voltage names: ``AB, BC, CA``, or ``L1-L2, L2-L3, L3-L1`` for long labels."""
    j = "-" if any(len(x) > 1 for x in labels) else ""
    a, b, c = labels
    return (f"{a}{j}{b}", f"{b}{j}{c}", f"{c}{j}{a}")


def _load_unit(c: Circuit) -> str:
    """The unit the load was written in (``VA``, ``W`` or ``A``)."""
    return {"va": "VA", "w": "W", "a": "A"}[c.load_kind]


def circuit_data(
    number: int,
    c: Circuit,
    schedule: Schedule,
    currents: tuple[float, float, float],
) -> dict[str, Any]:
    """One circuit's row of ``circuits`` (``number`` from 1; ``currents`` the
    fundamental, RMS and calculated current [A])."""
    current_a, rms_a, calculated_a = currents
    system = schedule.system
    va = c.apparent_power_va(system)
    share = wiring_data.leg_phase_va(c, schedule)
    slots = list(occupied_slots(c.slot, c.poles)) if c.slot is not None else []
    return {
        "number": number,
        "name": c.name,
        "slot": c.slot,
        "slots": slots,
        "poles": c.poles,
        "phases": schedule.phase_text(c.phases) if c.phases is not None else None,
        "placed": c.is_placed,
        "load": {"value": num(c.load_value), "unit": _load_unit(c)},
        "va": num(va),
        "w": num(c.real_power_w(system)),
        "pf": num(c.pf),
        "leading": c.leading,
        "profile": c.profile,
        "continuous": c.continuous,
        "locked": c.locked,
        "breaker_a": num(c.breaker_a),
        "note": c.note,
        "current_a": num(current_a),
        "rms_a": num(rms_a),
        "phase_va": {lab: num(v) for lab, v in share.items()},
        "calculated_a": num(calculated_a),
        "over_breaker": None if c.breaker_a is None else exceeds(calculated_a, c.breaker_a),
    }


def voltage_data(a: PanelAnalysis) -> dict[str, Any] | None:
    """The ``voltage`` block [V], [deg], [%], [Ω]; None without a supply."""
    v = a.voltage
    if v is None:
        return None
    labels = a.phase_labels
    lines = line_labels(labels)
    return {
        "phase_v": {lab: phasor(p, "v") for lab, p in zip(labels, v.phase_v, strict=True)},
        "line_v": {lab: phasor(p, "v") for lab, p in zip(lines, v.line_v, strict=True)},
        "vuf_pct": num(v.vuf_pct),
        "line_deviation_pct": num(v.line_deviation_pct),
        "phase_deviation_pct": num(v.phase_deviation_pct),
        "motor_derating": num(v.motor_derating),
        "drop_pct": {lab: num(d) for lab, d in zip(labels, v.drop_pct, strict=True)},
        "iterated": v.iterated,
        "iterations": v.iterations,
        "converged": v.converged,
        "transformer_full_load_a": num(v.transformer_full_load_a),
        "z_phase_ohm": {"r": num(v.z_phase_ohm.real), "x": num(v.z_phase_ohm.imag)},
        "z_neutral_ohm": {"r": num(v.z_neutral_ohm.real), "x": num(v.z_neutral_ohm.imag)},
    }


def readings_data(a: PanelAnalysis, schedule: Schedule) -> dict[str, Any] | None:
    """The ``readings`` block [A], [V], [%]; None without site readings."""
    r = a.readings
    if r is None:
        return None
    labels = a.phase_labels
    lines = line_labels(labels)
    taken = schedule.readings.taken if schedule.readings is not None else None
    neutral_diff = None
    if r.neutral_measured_a is not None and r.neutral_computed_rms_a > 0:
        neutral_diff = (
            100.0 * (r.neutral_measured_a - r.neutral_computed_rms_a) / r.neutral_computed_rms_a
        )
    return {
        "taken": taken,
        "phases": {
            p.label: {
                "measured_a": num(p.measured_a),
                "computed_rms_a": num(p.computed_rms_a),
                "difference_pct": num(p.difference_pct),
            }
            for p in r.phases
        },
        "neutral": {
            "measured_a": num(r.neutral_measured_a),
            "computed_current_a": num(r.neutral_computed_fundamental_a),
            "computed_rms_a": num(r.neutral_computed_rms_a),
            "difference_pct": num(neutral_diff),
        },
        "volts_ll": {lab: num(x) for lab, x in zip(lines, r.volts_ll, strict=True)},
        "volts_ln": {lab: num(x) for lab, x in zip(labels, r.volts_ln, strict=True)},
        "vuf_pct": num(r.vuf_pct),
        "line_deviation_pct": num(r.line_deviation_pct),
        "phase_deviation_pct": num(r.phase_deviation_pct),
        "motor_derating": num(r.motor_derating),
        "computed_vuf_pct": num(r.computed_vuf_pct),
    }


def phases_data(a: PanelAnalysis, headroom_pct: float) -> dict[str, Any]:
    """The ``phases`` block keyed by phase label [VA], [A], [deg], [%], with status words."""
    return {
        ph.label: {
            "va": num(ph.va),
            "current_a": num(ph.current_a),
            "current_deg": num(ph.current_deg),
            "rms_a": num(ph.rms_a),
            "thd_pct": num(ph.thd_pct),
            "loading_pct": num(ph.loading_pct),
            "design_a": num(ph.design_a),
            "design_loading_pct": num(ph.design_loading_pct),
            "calculated_a": num(ph.calculated_a),
            "calculated_pct": num(ph.calculated_pct),
            "status": loading_word(ph.loading_pct, headroom_pct),
        }
        for ph in a.phases
    }


def neutral_data(a: PanelAnalysis, headroom_pct: float) -> dict[str, Any]:
    """The ``neutral`` block [A], [%], with its status word."""
    n = a.neutral
    return {
        "current_a": num(n.current_a),
        "current_deg": num(n.current_deg),
        "rms_a": num(n.rms_a),
        "loading_pct": num(n.loading_pct),
        "present": n.present,
        "rating_a": num(n.rating_a),
        "ratio_to_max_phase": num(n.ratio_to_max_phase),
        "calculated_a": num(n.calculated_a),
        "status": loading_word(n.loading_pct, headroom_pct),
    }


def sizing_data(
    a: PanelAnalysis, schedule: Schedule, circuits: list[dict[str, Any]]
) -> dict[str, Any]:
    """The ``sizing`` block: the code's rule, its clauses and the breakers judged by it."""
    clause, branch = sizing_clauses(
        a.frequency_hz, schedule.panel.main_a is not None, a.continuous_factor
    )
    rated = [c for c in circuits if c["over_breaker"] is not None]
    per_phase = "scheduled VA per phase over V_LN"
    if schedule.panel.effective_high_leg is not None:
        per_phase = "scheduled 1-pole VA per phase over V_LN and 2- and 3-pole shares over V_LL/√3"
    return {
        "per_phase": per_phase,
        "method": calculation_words(a.continuous_factor),
        "clause": clause,
        "breaker_clause": branch,
        "over": [p.label for p in a.phases if exceeds(p.calculated_pct, RATING_PCT)],
        "breakers_rated": len(rated),
        "breakers_over": sum(1 for c in rated if c["over_breaker"]),
    }
