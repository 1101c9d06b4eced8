"""How the UI words a panel as it is wired: legs, shared neutrals, the high leg, spares, RCDs.

The facts come from the schedule layer (:mod:`tri.schedule.wiring`: each
breaker's legs and their phases, the neutral groups, the high leg's voltage
to neutral); this module only puts them in words, short for the list's
*Wiring* column and in full for the status line, and says where a
shared-neutral group's brackets go in the panel view. No textual here.
"""

from __future__ import annotations

from tri.schedule.model import Circuit, Schedule
from tri.schedule.wiring import LEG_TO_NEUTRAL, high_leg_to_neutral_v, legs_of, neutral_groups

_UNITS = {"va": "VA", "w": "W", "a": "A"}


def uses_wiring(schedule: Schedule) -> bool:
    """True for a high leg, or a circuit with a neutral, legs, a group, a spare or an RCD."""
    if schedule.panel.effective_high_leg is not None or schedule.rcds:
        return True
    return any(
        c.neutral or c.leg_values is not None or c.shared_neutral or c.spare or c.rcd
        for c in schedule.circuits
    )


def takes_high_leg(c: Circuit, schedule: Schedule) -> bool:
    """True when the breaker has a pole on the panel's high leg."""
    high = schedule.panel.effective_high_leg
    return high is not None and c.phases is not None and high in c.phases


def short_wiring(c: Circuit, schedule: Schedule) -> str:
    """The list's *Wiring* cell: ``spare``, ``+N legs``, ``Δ legs``, ``N:N23``, ``RCD R1``."""
    words = []
    if c.spare:
        words.append("spare")
    if c.poles > 1 and c.neutral:
        words.append("+N legs")
    elif c.leg_values is not None:
        words.append("Δ legs")
    if c.shared_neutral:
        words.append(f"N:{c.shared_neutral}")
    if c.rcd:
        words.append(f"RCD {c.rcd}")
    if c.poles == 1 and takes_high_leg(c, schedule):
        words.append("high leg")  # refused by the loader: shown until it is moved
    return " ".join(words)


def _legs_words(c: Circuit, schedule: Schedule) -> str | None:
    legs = legs_of(c, schedule)
    if not c.has_legs or len(legs) < 2:
        return None
    values = c.leg_values if c.leg_values is not None else (c.load_value,) * len(legs)
    unit = _UNITS[c.load_kind]
    each = ", ".join(
        f"{schedule.phase_text(leg.phases)} {v:g} {unit}"
        for leg, v in zip(legs, values, strict=False)
    )
    kind = "to neutral" if legs[0].kind == LEG_TO_NEUTRAL else "between poles"
    return f"one load per leg {kind}: {each}"


def _group_words(index: int, c: Circuit, schedule: Schedule) -> str | None:
    if c.shared_neutral is None:
        return None
    group = next((g for g in neutral_groups(schedule) if index in g.circuits), None)
    others = [] if group is None else [i for i in group.circuits if i != index]
    where = ", ".join(
        f"slot {schedule.circuits[i].slot}" if schedule.circuits[i].slot is not None
        else f'"{schedule.circuits[i].name}"'
        for i in others
    )  # fmt: skip
    tied = "handles tied" if group is not None and group.common_trip else "NOT handle-tied"
    with_whom = f" with {where}" if where else ""
    return f"shares neutral {c.shared_neutral}{with_whom} ({tied})"


def wiring_details(index: int, schedule: Schedule) -> list[str]:
    """The wiring of circuit ``index`` in full, for the status line (empty when plain)."""
    c = schedule.circuits[index]
    out = []
    if c.spare:
        out.append("spare: a breaker with nothing connected")
    legs = _legs_words(c, schedule)
    if legs:
        out.append(legs)
    group = _group_words(index, c, schedule)
    if group:
        out.append(group)
    if c.rcd:
        out.append(f"behind RCD {c.rcd}")
    if takes_high_leg(c, schedule):
        high = schedule.panel.effective_high_leg
        assert high is not None
        volts = high_leg_to_neutral_v(schedule)
        out.append(f"takes the high leg {schedule.labels[high]} ({volts:.0f} V to neutral)")
    return out


def group_brackets(schedule: Schedule) -> dict[int, str]:
    """Circuit index -> its bracket in a shared-neutral group of 1-pole breakers (``╓ ║ ╙``)."""
    out: dict[int, str] = {}
    for g in neutral_groups(schedule):
        if g.name is None or len(g.circuits) < 2:
            continue
        ordered = sorted(g.circuits, key=lambda i: schedule.circuits[i].slot or 0)
        for k, i in enumerate(ordered):
            out[i] = "╓" if k == 0 else ("╙" if k == len(ordered) - 1 else "║")
    return out
