"""Checks on a whole schedule model: slots, phases, system, profiles, wiring.

These are the checks that matter after every edit, whether the schedule
came from a file, the terminal UI or the rebalancer. Type and key checks of
the raw file live in :mod:`tri.schedule.load`.
"""

from __future__ import annotations

from tri.engine.profiles import BUILTIN_PROFILES
from tri.schedule.errors import ScheduleIssue, name_circuit
from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import fits, occupied_slots
from tri.schedule.wiring import check_wiring
from tri.words import plural


def circuit_where(circuit: Circuit, schedule: Schedule) -> str:
    """How messages name a circuit: its name and its slot or phases (see ``name_circuit``)."""
    place = None
    if circuit.slot is not None:
        place = f"slot {circuit.slot}"
    elif circuit.phases is not None:
        place = f"phases {schedule.phase_text(circuit.phases)}"
    return name_circuit(circuit.name, place)


def check_schedule(schedule: Schedule) -> list[ScheduleIssue]:
    """Every model-level problem of ``schedule`` (empty list when it is sound).

    Lines and file names are not known here; :mod:`tri.schedule.load` adds
    them for problems found while loading.
    """
    issues: list[ScheduleIssue] = []
    panel = schedule.panel
    system = schedule.system
    known_profiles = set(BUILTIN_PROFILES) | {p.name for p in schedule.profiles}
    owner: dict[int, int] = {}
    for i, c in enumerate(schedule.circuits):
        where = circuit_where(c, schedule)

        def add(message: str, key: str | None, where: str = where, i: int = i) -> None:
            issues.append(ScheduleIssue(message, where=where, key=key, circuit_index=i))

        if c.poles == 1 and not system.has_neutral:
            add(
                f"a 1-pole (line-to-neutral) circuit on a {system.key} system, which has "
                "no neutral; expected poles = 2 or 3",
                "poles",
            )
        if c.profile not in known_profiles:
            add(
                f"unknown harmonic profile '{c.profile}'; expected one of "
                f"{', '.join(sorted(known_profiles))} or a [profiles.{c.profile}] table",
                "profile",
            )
        if c.phases is not None and len(c.phases) != c.poles:
            add(f"{c.poles}-pole circuit connected to {plural(len(c.phases), 'phase')}", "phases")
        if c.phases is not None and len(set(c.phases)) != len(c.phases):
            add("the same phase is named twice; expected distinct phases", "phases")
        if c.slot is None:
            continue
        if not panel.uses_slots:
            add("slots are only used with layout = \"two-column\"; give 'phases'", "slot")
            continue
        if not fits(c.slot, c.poles, panel.spaces):
            last = c.slot + 2 * (c.poles - 1)
            if c.slot > panel.spaces or c.slot < 1:
                add(f"slot {c.slot} is not on the panel; expected 1 to {panel.spaces}", "slot")
            else:
                add(
                    f"a {c.poles}-pole breaker in slot {c.slot} needs slot {last}, past the "
                    f"last space {panel.spaces}",
                    "slot",
                )
            continue
        for s in occupied_slots(c.slot, c.poles):
            if s in owner:
                other = schedule.circuits[owner[s]]
                add(
                    f"slot {s} is already taken by {circuit_where(other, schedule)}; "
                    "two breakers cannot share a slot",
                    "slot",
                )
                break
        for s in occupied_slots(c.slot, c.poles):
            owner.setdefault(s, i)
    issues.extend(check_wiring(schedule, lambda c: circuit_where(c, schedule)))
    return issues
