"""Panels as they are wired: legs of a breaker, shared neutrals, the high leg, RCD groups.

A breaker's *legs* are the loads it feeds. A 1-pole breaker has one leg to
neutral; a 2-pole breaker without a neutral one line-to-line load; a 3-pole
breaker without per-leg loads one balanced load. A 2- or 3-pole breaker
with ``neutral = true`` has one line-to-neutral leg per pole (a multi-wire
branch circuit, or an unbalanced wye load), and a 3-pole breaker with
``load_va = [x, y, z]`` and no neutral has three line-to-line legs between
poles 1-2, 2-3 and 3-1 (an unbalanced delta load). Pole order is the order
of the breaker's slots from the top (two-column panels) or of its
``phases`` text (rail boards).

A *neutral group* is a set of legs that return in one neutral conductor:
the legs of a breaker with a neutral, or the 1-pole circuits that give the
same ``shared_neutral`` name. Its legs must be on distinct phases (else
the neutral carries their sum) and, on a two-column panel, in adjacent
slots of one column, where handle ties or a common-trip breaker can reach
them (NEC 210.4(B), from memory; local code governs).

:func:`check_wiring` finds what cannot be built (every rebalancer honours
the rest: :mod:`tri.rebalance.units`).
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable
from dataclasses import dataclass

from tri.schedule.errors import ScheduleIssue
from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import PHASES, TWO_COLUMN, pole_phases

#: Leg kinds.
LEG_TO_NEUTRAL = "line-to-neutral"
LEG_LINE_TO_LINE = "line-to-line"
LEG_THREE_PHASE = "three-phase"


@dataclass(frozen=True)
class Leg:
    """One load of a breaker.

    Attributes
    ----------
    kind : str
        :data:`LEG_TO_NEUTRAL`, :data:`LEG_LINE_TO_LINE` or :data:`LEG_THREE_PHASE`.
    phases : tuple of int
        Phase indices: one (to neutral), two (current flows from the first
        to the second) or three.
    va : float
        Apparent power of the leg [VA] (the whole load for a single-leg breaker).
    """

    kind: str
    phases: tuple[int, ...]
    va: float


@dataclass(frozen=True)
class NeutralGroup:
    """Legs that return in one neutral conductor.

    Attributes
    ----------
    name : str or None
        The ``shared_neutral`` name, or ``None`` for a breaker with a neutral.
    circuits : tuple of int
        Schedule indices of the circuits whose legs it collects.
    common_trip : bool
        True for a multi-pole breaker, or single-pole breakers that are all
        ``handle_tied``.
    """

    name: str | None
    circuits: tuple[int, ...]
    common_trip: bool

    def label(self, schedule: Schedule) -> str:
        """How reports name the group: its shared-neutral name, else the breaker's name."""
        if self.name is not None:
            return self.name
        return schedule.circuits[self.circuits[0]].name


def circuit_pole_phases(circuit: Circuit, schedule: Schedule) -> tuple[int, ...] | None:
    """Phase of each pole of a placed breaker, first pole first (``None`` if unplaced)."""
    if circuit.phases is None:
        return None
    panel = schedule.panel
    if panel.layout == TWO_COLUMN and circuit.slot is not None:
        return pole_phases(circuit.slot, circuit.poles, panel.right_column)
    return tuple(circuit.phases)


def legs_of(circuit: Circuit, schedule: Schedule) -> tuple[Leg, ...]:
    """The loads a placed breaker feeds (empty when it is not placed; see the module notes)."""
    if circuit.phases is None:
        return ()
    system = schedule.system
    poles = circuit_pole_phases(circuit, schedule) if circuit.has_legs else None
    if poles is None or len(poles) != circuit.poles:
        kind = {1: LEG_TO_NEUTRAL, 2: LEG_LINE_TO_LINE}.get(circuit.poles, LEG_THREE_PHASE)
        phases = tuple(circuit.phases) if circuit.poles < 3 else (0, 1, 2)
        return (Leg(kind, phases, circuit.apparent_power_va(system)),)
    va = circuit.leg_va(system)
    if circuit.neutral:
        return tuple(Leg(LEG_TO_NEUTRAL, (p,), x) for p, x in zip(poles, va, strict=False))
    pairs = [(poles[k], poles[(k + 1) % 3]) for k in range(3)]
    return tuple(Leg(LEG_LINE_TO_LINE, pq, x) for pq, x in zip(pairs, va, strict=False))


def neutral_groups(schedule: Schedule) -> tuple[NeutralGroup, ...]:
    """Every neutral group of placed circuits, in the order of their first circuit."""
    out: list[NeutralGroup] = []
    shared: dict[str, list[int]] = {}
    for i, c in enumerate(schedule.circuits):
        if c.phases is None:
            continue
        if c.poles > 1 and c.neutral:
            out.append(NeutralGroup(None, (i,), True))
        elif c.poles == 1 and c.shared_neutral is not None:
            if c.shared_neutral not in shared:
                shared[c.shared_neutral] = []
                out.append(NeutralGroup(c.shared_neutral, (), False))
            shared[c.shared_neutral].append(i)
    result = []
    for g in out:
        if g.name is None:
            result.append(g)
            continue
        members = tuple(shared[g.name])
        tied = all(schedule.circuits[i].handle_tied for i in members)
        result.append(NeutralGroup(g.name, members, tied))
    return tuple(result)


def high_leg_to_neutral_v(schedule: Schedule) -> float:
    """Voltage of the high leg to neutral on a high-leg delta: ``sqrt(3)/2·V_LL`` [V]."""
    return math.sqrt(3.0) / 2.0 * schedule.system.v_ll


Add = Callable[[str, str | None], None]


def check_wiring(schedule: Schedule, where_of: Callable[[Circuit], str]) -> list[ScheduleIssue]:
    """Every wiring problem of ``schedule`` (see the module notes); empty when it can be built.

    Parameters
    ----------
    schedule : Schedule
        The panel.
    where_of : callable
        How messages name a circuit (``validate.circuit_where`` bound to the schedule).
    """
    issues: list[ScheduleIssue] = []
    for i, c in enumerate(schedule.circuits):

        def add(message: str, key: str | None, i: int = i, c: Circuit = c) -> None:
            issues.append(ScheduleIssue(message, where=where_of(c), key=key, circuit_index=i))

        _check_legs(c, schedule, add)
        _check_high_leg(c, schedule, add)
        _check_rcd(c, schedule, add)
    for group in neutral_groups(schedule):
        if group.name is not None:
            issues.extend(_check_group(group, schedule, where_of))
    issues.extend(_lonely_groups(schedule, where_of))
    return issues


def _check_legs(c: Circuit, schedule: Schedule, add: Add) -> None:
    load_key = f"load_{c.load_kind}"
    if c.leg_values is not None:
        n = len(c.leg_values)
        if c.poles == 1:
            add("a per-leg load on a 1-pole breaker, which has one leg; give one number", load_key)
        elif c.poles == 2 and not c.neutral:
            add(
                "a 2-pole breaker without a neutral feeds one line-to-line load; give one "
                "number, or set neutral = true for one load per leg",
                load_key,
            )
        elif n != c.poles:
            what = "leg" if c.neutral else "line-to-line load (poles 1-2, 2-3, 3-1)"
            add(f"found {n} values, expected {c.poles}: one per {what}", load_key)
    if c.neutral and c.poles == 1:
        add("neutral = true is for 2- and 3-pole breakers; a 1-pole circuit has it", "neutral")
    if c.neutral and not schedule.system.has_neutral:
        add(f"a breaker with a neutral on a {schedule.system.key} system (no neutral)", "neutral")
    if c.shared_neutral is not None and c.poles != 1:
        add(
            f"shared_neutral groups 1-pole breakers; a {c.poles}-pole breaker that carries "
            "a neutral says neutral = true",
            "shared_neutral",
        )
    if c.handle_tied and c.shared_neutral is None:
        add("handle_tied is for 1-pole breakers that give shared_neutral", "handle_tied")
    if c.spare and (c.load_value != 0 or c.leg_values is not None):
        add("a spare has nothing connected; expected no load", "spare")


def _check_high_leg(c: Circuit, schedule: Schedule, add: Add) -> None:
    high = schedule.panel.effective_high_leg
    poles = circuit_pole_phases(c, schedule)
    if high is None or poles is None or not (c.poles == 1 or c.neutral):
        return
    if high not in poles:
        return
    labels = schedule.labels
    low = [labels[p] for p in range(3) if p != high]
    volts = f"{high_leg_to_neutral_v(schedule):.0f} V"
    key = "slot" if c.slot is not None else "phases"
    if c.slot is not None:
        k = poles.index(high)
        place = f"slot {c.slot + 2 * k} is on {labels[high]}"
    else:
        place = f"phases {schedule.phase_text(c.phases)}"
    what = "a 1-pole 120 V circuit" if c.poles == 1 else "a leg to neutral of this breaker"
    add(
        f"{what} on the high leg {labels[high]} ({place}), which reads {volts} to neutral; "
        f"expected line-to-neutral loads on {low[0]} or {low[1]} only",
        key,
    )


def _check_rcd(c: Circuit, schedule: Schedule, add: Add) -> None:
    if c.rcd is None:
        return
    if schedule.panel.layout != PHASES:
        add(
            'RCD groups are for rail boards (layout = "phases"); a two-column panel protects '
            "breaker by breaker",
            "rcd",
        )
        return
    rcds = {r.name: r for r in schedule.rcds}
    device = rcds.get(c.rcd)
    if device is None:
        known = ", ".join(rcds) or "none defined"
        add(f"no [[rcd]] named '{c.rcd}' (known: {known})", "rcd")
        return
    if device.poles != 2 or device.phase is None:
        return
    label = schedule.labels[device.phase]
    if c.poles != 1:
        add(
            f"a {c.poles}-pole circuit behind the 2-pole RCD '{device.name}', which feeds "
            f"one phase ({label}) and neutral",
            "rcd",
        )
    elif c.phases is not None and c.phases[0] != device.phase:
        add(
            f"on {schedule.phase_text(c.phases)} behind the 2-pole RCD '{device.name}', which "
            f'is on {label}; expected phases = "{label}"',
            "phases",
        )


def _check_group(
    group: NeutralGroup, schedule: Schedule, where_of: Callable[[Circuit], str]
) -> list[ScheduleIssue]:
    members = [i for i in group.circuits if schedule.circuits[i].poles == 1]
    circuits = schedule.circuits
    out: list[ScheduleIssue] = []
    name = group.name

    def issue(i: int, message: str, key: str = "shared_neutral") -> None:
        out.append(ScheduleIssue(message, where=where_of(circuits[i]), key=key, circuit_index=i))

    seen: dict[int, int] = {}
    for i in members:
        p = circuits[i].phases[0]  # type: ignore[index]
        if p in seen:
            issue(
                i,
                f"shared neutral '{name}': this leg and {where_of(circuits[seen[p]])} are both "
                f"on {schedule.labels[p]}, so the neutral would carry their sum; expected each "
                "leg on its own phase",
            )
        seen.setdefault(p, i)
    if len(members) > 3:
        issue(members[3], f"shared neutral '{name}' has {len(members)} legs; expected at most 3")
    slots = sorted(s for s in (circuits[i].slot for i in members) if s is not None)
    if schedule.panel.uses_slots and len(slots) == len(members) > 1:
        same_column = len({s % 2 for s in slots}) == 1
        adjacent = all(b - a == 2 for a, b in itertools.pairwise(slots))
        if not (same_column and adjacent):
            issue(
                members[0],
                f"shared neutral '{name}' spans slots {', '.join(map(str, slots))}, which are "
                "not adjacent; expected its breakers side by side in one column (slots n, n+2, "
                "n+4), where handle ties or a common-trip breaker can join them",
            )
    return out


def _lonely_groups(schedule: Schedule, where_of: Callable[[Circuit], str]) -> list[ScheduleIssue]:
    """A shared-neutral name that only one circuit gives is a typing slip or a missing leg."""
    count: dict[str, list[int]] = {}
    for i, c in enumerate(schedule.circuits):
        if c.shared_neutral is not None and c.poles == 1:
            count.setdefault(c.shared_neutral, []).append(i)
    return [
        ScheduleIssue(
            f"shared neutral '{name}' has only this leg; expected 2 or 3 circuits with the same "
            "shared_neutral",
            where=where_of(schedule.circuits[idx[0]]),
            key="shared_neutral",
            circuit_index=idx[0],
        )
        for name, idx in count.items()
        if len(idx) == 1
    ]


def empty_slots(schedule: Schedule) -> list[int]:
    """Slots of a two-column panel with no breaker in them (spaces), in order."""
    if not schedule.panel.uses_slots:
        return []
    return [s for s in range(1, schedule.panel.spaces + 1) if schedule.circuit_at_slot(s) is None]
