"""The report's keys for panels as they are wired: legs, shared neutrals, high leg, directory.

:func:`tri.report.data.report_data` adds these to every report; their
meaning is documented there with the other keys. Everything here reads the
engine's result (:class:`~tri.engine.results.PanelAnalysis`) and the
schedule's wiring (:mod:`tri.schedule.wiring`); nothing is recomputed.
"""

from __future__ import annotations

from typing import Any

from tri.engine.results import PanelAnalysis
from tri.report.numbers import num
from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import occupied_slots
from tri.schedule.wiring import (
    circuit_pole_phases,
    empty_slots,
    high_leg_to_neutral_v,
    legs_of,
    neutral_groups,
)


def panel_wiring(schedule: Schedule) -> dict[str, Any]:
    """The panel's wiring keys: high leg, column order, source marking, reach limit."""
    p = schedule.panel
    high = p.effective_high_leg
    return {
        "high_leg": None if high is None else schedule.labels[high],
        "high_leg_to_neutral_v": None if high is None else num(high_leg_to_neutral_v(schedule)),
        "right_column": p.right_column,
        "fed_from": p.fed_from,
        "max_row_shift": p.max_row_shift,
    }


def circuit_wiring(
    index: int, c: Circuit, schedule: Schedule, analysis: PanelAnalysis
) -> dict[str, Any]:
    """The wiring keys of one circuit: legs, pole currents, group, spare, RCD, high leg."""
    labels = schedule.labels
    legs = legs_of(c, schedule)
    breaker = analysis.breakers[index] if index < len(analysis.breakers) else None
    if not (c.has_legs and c.is_placed):
        breaker = None  # one leg: the circuit's own current, no pole currents
    leg_a = breaker.leg_current_a if breaker is not None else (analysis.circuit_current_a[index],)
    leg_rms = breaker.leg_rms_a if breaker is not None else (analysis.circuit_rms_a[index],)
    high = schedule.panel.effective_high_leg
    poles = circuit_pole_phases(c, schedule) or ()
    return {
        "load": {
            "value": num(c.load_value),
            "unit": {"va": "VA", "w": "W", "a": "A"}[c.load_kind],
            "legs": None if c.leg_values is None else [num(x) for x in c.leg_values],
        },
        "neutral": c.neutral,
        "shared_neutral": c.shared_neutral,
        "handle_tied": c.handle_tied,
        "spare": c.spare,
        "rcd": c.rcd,
        "legs": [
            {
                "kind": leg.kind,
                "phases": schedule.phase_text(leg.phases),
                "va": num(leg.va),
                "current_a": num(a),
                "rms_a": num(r),
            }
            for leg, a, r in zip(legs, leg_a, leg_rms, strict=False)
        ],
        "pole_currents": None
        if breaker is None
        else {
            labels[k]: {
                "current_a": num(breaker.current[k].magnitude),
                "current_deg": num(breaker.current[k].deg),
                "rms_a": num(breaker.rms_a[k]),
            }
            for k in dict.fromkeys(poles)
        },
        "on_high_leg": high is not None and high in poles,
    }


def leg_phase_va(c: Circuit, schedule: Schedule) -> dict[str, float]:
    """Share of the circuit's VA on each phase label, leg by leg [VA] (schedule bookkeeping)."""
    share = {lab: 0.0 for lab in schedule.labels}
    for leg in legs_of(c, schedule):
        for p in leg.phases:
            share[schedule.labels[p]] += leg.va / len(leg.phases)
    return share


def shared_neutrals(analysis: PanelAnalysis, schedule: Schedule) -> list[dict[str, Any]]:
    """Every shared neutral with its legs and its current at every order."""
    out = []
    groups = neutral_groups(schedule)
    for group, result in zip(groups, analysis.shared_neutrals, strict=True):
        cs = [schedule.circuits[i] for i in group.circuits]
        phases = [p for c in cs for leg in legs_of(c, schedule) for p in leg.phases]
        out.append(
            {
                "name": group.label(schedule),
                "shared_neutral": group.name,
                "circuits": [i + 1 for i in group.circuits],
                "slots": sorted(s for c in cs if c.slot is not None for s in _slots(c)),
                "phases": schedule.phase_text(tuple(phases)),
                "common_trip": group.common_trip,
                "current_a": num(result.current.magnitude),
                "current_deg": num(result.current.deg),
                "rms_a": num(result.rms_a),
                "harmonic_a": [num(x) for x in result.harmonic_a],
            }
        )
    return out


def _slots(c: Circuit) -> tuple[int, ...]:
    return occupied_slots(c.slot, c.poles) if c.slot is not None else ()


def directory(schedule: Schedule) -> dict[str, Any]:
    """``fed_from``, the spares (breakers with nothing connected) and the spaces (empty slots)."""
    return {
        "fed_from": schedule.panel.fed_from,
        "spares": [
            {"number": i + 1, "slot": c.slot, "name": c.name, "breaker_a": num(c.breaker_a)}
            for i, c in enumerate(schedule.circuits)
            if c.spare
        ],
        "spaces": empty_slots(schedule),
    }


def rcds(schedule: Schedule) -> list[dict[str, Any]]:
    """The RCD groups of a rail board, each with the circuits behind it."""
    return [
        {
            "name": r.name,
            "poles": r.poles,
            "phase": None if r.phase is None else schedule.labels[r.phase],
            "circuits": [i + 1 for i, c in enumerate(schedule.circuits) if c.rcd == r.name],
        }
        for r in schedule.rcds
    ]
