"""A plan as the work order sees it: every breaker's move, the steps, and the notes on units.

A unit (:mod:`tri.rebalance.units`) that moves gives one :class:`Move` per
breaker (a shared-neutral group's breakers go to ``first, first + 2, ...``
in their order, each move naming the group) and one work-order step
(:func:`tri.rebalance.workorder.order_work` with the group's breakers);
a wired breaker's phases are shown in pole order.
"""

from __future__ import annotations

from tri.rebalance.plans import Plan
from tri.rebalance.problem import Problem
from tri.rebalance.results import Move
from tri.rebalance.units import Unit, free_units, rcd_note
from tri.rebalance.workorder import order_work, rail_steps
from tri.schedule.model import Schedule
from tri.schedule.slots import pole_phases


def unit_notes(schedule: Schedule, free: list[int], pr: Problem) -> list[str]:
    """What the output must say about units (:mod:`tri.rebalance.units`)."""
    out = list(free_units(schedule, free)[1])
    rcd = rcd_note(schedule, pr.units)
    if rcd is not None:
        out.append(rcd)
    high = schedule.panel.effective_high_leg
    if high is not None:
        out.append(
            f"high-leg delta: no 120 V circuit or leg to neutral is offered the high leg "
            f"{schedule.labels[high]}; the bounds that need phases 120° apart (the floor, "
            "the crossing and triangle bounds) are not used, so proofs here come from listing "
            "every plan and from the programs' own bounds"
        )
    if any(u.group is not None for u in pr.units):
        out.append(
            "a shared-neutral group moves as one block, its breakers side by side in their "
            "order, and counts as one relocation; reordering a group's breakers is not offered"
        )
    return out


def moves_for(pr: Problem, plan: Plan) -> tuple[list[Move], list]:
    """The moves of every breaker, and the work order (a group's breakers in one step)."""
    sched = pr.schedule
    circuits = sched.circuits
    moves: dict[int, Move] = {}
    groups = {u.lead: u.members for u in pr.units if u.group is not None}
    units = {u.lead: u for u in pr.units}
    if pr.slots:
        changing = {}
        for idx, slot in plan.arrangement.first_slot.items():
            if circuits[idx].slot == slot:
                continue
            changing[idx] = slot
            unit = units.get(idx)
            for k, i in enumerate(groups.get(idx, (idx,))):
                moves[i] = _slot_move(sched, i, slot + 2 * k, unit)
        steps = order_work(sched, changing, groups)
    else:
        changed = []
        for b, idx in enumerate(pr.free.tolist()):
            ph = tuple(pr.phases[int(plan.assign[b])])
            unit = units.get(idx)
            members = groups.get(idx, (idx,))
            now = tuple(p for i in members for p in (circuits[i].phases or ()))
            wired = bool(pr.wired[b])
            if circuits[idx].phases is not None and (now == ph if wired else set(now) == set(ph)):
                continue
            changed.append(idx)
            for k, i in enumerate(members):
                c = circuits[i]
                to = (ph[k],) if len(members) > 1 else ph
                group = unit.group if unit is not None else None
                moves[i] = Move(i, c.name, c.poles, None, None, c.phases, to, group, wired)
        steps = rail_steps(sched, changed, groups)
    order = [i for s in steps if s.action != "take-out" for i in (s.members or (s.circuit_index,))]
    return [moves[i] for i in order], steps


def _slot_move(sched: Schedule, i: int, slot: int, unit: Unit | None) -> Move:
    """Breaker ``i`` to first slot ``slot`` (phases in pole order for a wired one)."""
    c = sched.circuits[i]
    wired = unit is not None and unit.wired
    new = sched.placed(c.at_slot(slot))
    before, after = c.phases, new.phases
    if wired and c.slot is not None:
        rc = sched.panel.right_column
        before, after = pole_phases(c.slot, c.poles, rc), pole_phases(slot, c.poles, rc)
    group = unit.group if unit is not None else None
    return Move(i, c.name, c.poles, c.slot, slot, before, after, group, wired)
