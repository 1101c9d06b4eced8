"""The order in which relocations can be carried out, set-aside swaps included.

A breaker can go to its new slot once every breaker now in those slots has
left. Moves are ordered so (a topological order); when breakers form a
cycle (a swap), one of them is taken out and set aside first and
installed last. A swap of two breakers is therefore two relocations and
three steps, with no spare slot needed. On a rail board circuits are
reconnected one by one.
"""

from __future__ import annotations

from dataclasses import dataclass

from tri.schedule.model import Schedule
from tri.schedule.slots import occupied_slots


@dataclass(frozen=True)
class WorkStep:
    """One step of the work order.

    Attributes
    ----------
    action : {"move", "take-out", "install", "place", "reconnect", "connect"}
        ``move`` a breaker to a free slot; ``take-out`` a breaker and set it
        aside (to break a cycle); ``install`` a set-aside breaker; ``place``
        a new circuit's breaker; ``reconnect``/``connect`` on a rail board.
    circuit_index : int
        Index of the circuit in the schedule (the first breaker of a group).
    members : tuple of int
        A shared-neutral group moved as one (:mod:`tri.rebalance.units`):
        the schedule index of each of its breakers, top to bottom; empty for
        one breaker.
    """

    action: str
    circuit_index: int
    members: tuple[int, ...] = ()


def order_work(
    schedule: Schedule,
    new_slots: dict[int, int],
    groups: dict[int, tuple[int, ...]] | None = None,
) -> list[WorkStep]:
    """Steps that carry out the relocations (module notes).

    Parameters
    ----------
    schedule : Schedule
        The panel before the work.
    new_slots : dict
        Schedule index -> new first slot of every breaker that moves or is
        placed (of a group: its first breaker's, standing for the group).
    groups : dict, optional
        First breaker -> every breaker of a shared-neutral group that moves
        as one block (its breakers in slots ``first, first + 2, ...``).

    Returns
    -------
    list of WorkStep
        ``move``/``place`` when the target is free, ``take-out`` then
        ``install`` for a breaker set aside to break a cycle.
    """
    circuits = schedule.circuits
    groups = groups or {}
    changing = {idx: slot for idx, slot in new_slots.items() if circuits[idx].slot != slot}

    def members(idx: int) -> tuple[int, ...]:
        return groups.get(idx, (idx,))

    holder: dict[int, int] = {}
    for idx in changing:
        for i in members(idx):
            c = circuits[i]
            if c.slot is not None:
                for s in occupied_slots(c.slot, c.poles):
                    holder[s] = idx
    waits: dict[int, set[int]] = {}
    for idx, slot in changing.items():
        poles = sum(circuits[i].poles for i in members(idx))
        deps = {holder[s] for s in occupied_slots(slot, poles) if s in holder}
        deps.discard(idx)
        waits[idx] = deps
    steps: list[WorkStep] = []
    gone: set[int] = set()  # breakers out of their old slot
    pending = sorted(changing, key=lambda i: (circuits[i].slot is None, circuits[i].slot or 0, i))
    aside: set[int] = set()
    while pending:
        ready = [i for i in pending if waits[i] <= gone]
        if ready:
            i = ready[0]
            pending.remove(i)
            group = groups.get(i, ())
            if i in aside:
                steps.append(WorkStep("install", i, group))
            else:
                action = "move" if circuits[i].slot is not None else "place"
                steps.append(WorkStep(action, i, group))
            gone.add(i)
            continue
        # a cycle: set aside the first breaker that others wait for
        blocking = [i for i in pending if i not in gone and any(i in waits[j] for j in pending)]
        i = blocking[0] if blocking else pending[0]
        steps.append(WorkStep("take-out", i, groups.get(i, ())))
        aside.add(i)
        gone.add(i)
    return steps


def rail_steps(
    schedule: Schedule, changed: list[int], groups: dict[int, tuple[int, ...]] | None = None
) -> list[WorkStep]:
    """Steps on a rail board: reconnect moved circuits (a group in one step), connect new ones."""
    groups = groups or {}
    return [
        WorkStep("reconnect" if schedule.circuits[i].is_placed else "connect", i, groups.get(i, ()))
        for i in sorted(changed)
    ]
