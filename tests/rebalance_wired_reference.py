"""An independent reference for wired panels: every arrangement of breakers and groups.

Nothing here uses :mod:`tri.rebalance`. As :mod:`rebalance_reference`, but
what moves is a *block*: a breaker (of any wiring: with a neutral and one
load per leg, a wye or delta per-leg 3-pole, or plain), or the 1-pole
breakers of one ``shared_neutral`` group, which move together, side by side
in one column in their order top to bottom (README, shared neutrals: a
group's breakers in adjacent slots of one column). Every set of first slots
of the free blocks that the panel's geometry allows is listed (a block of
``k`` poles takes ``k`` consecutive rows of one column); its relocation
count is the number of placed blocks whose first slot changes (a group
moved counts once, as the work order counts it); its figures come from the
engine on the schedule of that arrangement (:func:`circuit_arrays`, one row
per leg, every arrangement in one batch), so each leg sits on the phase of
its own slot as the panel reads it (``right_column``).

On a high-leg delta (``240/120D``) an arrangement that puts a load to
neutral on the high leg (a 1-pole breaker, a leg of a breaker with a
neutral, a group's breaker) cannot be built (README, high leg: such a
circuit is a located error) and is not listed.

The connected load alone is judged (no ``use`` scenarios).
"""

from __future__ import annotations

import itertools

import numpy as np
from rebalance_reference import Enumerated

from tri.engine import analyse_batch
from tri.engine.inputs import CircuitArrays
from tri.schedule.model import Schedule
from tri.schedule.slots import fits, occupied_slots, pole_phases
from tri.schedule.to_engine import circuit_arrays, ratings, system_voltages


def blocks_of(schedule: Schedule, free: list[int]) -> list[tuple[int, ...]]:
    """The free blocks (module notes): a group's free breakers top to bottom, else one each."""
    circuits = schedule.circuits
    out: list[tuple[int, ...]] = []
    seen: set[str] = set()
    for i in free:
        c = circuits[i]
        name = c.shared_neutral if c.poles == 1 and c.is_placed else None
        if name is None:
            out.append((i,))
        elif name not in seen:
            seen.add(name)
            members = [j for j in free if circuits[j].shared_neutral == name]
            out.append(tuple(sorted(members, key=lambda j: circuits[j].slot or 0)))
    return out


def block_arrangements(schedule: Schedule, blocks: list[tuple[int, ...]]) -> np.ndarray:
    """Every set of first slots of the blocks (int ndarray, shape (A, len(blocks)))."""
    spaces = schedule.panel.spaces
    circuits = schedule.circuits
    moving = {i for b in blocks for i in b}
    used: set[int] = set()
    for i, c in enumerate(circuits):
        if i not in moving and c.slot is not None:
            used.update(occupied_slots(c.slot, c.poles))
    poles = [sum(circuits[i].poles for i in b) for b in blocks]
    out: list[tuple[int, ...]] = []
    first = [0] * len(blocks)

    def walk(cell: int, left: set[int], spare: int) -> None:
        while cell <= spaces and cell in used:
            cell += 1
        if not left:
            out.append(tuple(first))
            return
        if cell > spaces:
            return
        if spare > 0:
            used.add(cell)
            walk(cell + 1, left, spare - 1)
            used.discard(cell)
        for k in sorted(left):
            cells = occupied_slots(cell, poles[k])
            if not fits(cell, poles[k], spaces) or used.intersection(cells):
                continue
            used.update(cells)
            first[k] = cell
            walk(cell + 1, left - {k}, spare)
            used.difference_update(cells)

    empties = spaces - len(used) - sum(poles)
    if empties >= 0:
        walk(1, set(range(len(blocks))), empties)
    return np.array(out, dtype=int).reshape(len(out), len(blocks))


def schedule_at(schedule: Schedule, blocks: list[tuple[int, ...]], firsts) -> Schedule:
    """The schedule with every block at its first slot (a group's breakers in order)."""
    out = schedule
    for block, f in zip(blocks, firsts, strict=True):
        slot = int(f)
        for i in block:
            c = out.circuits[i]
            out = out.with_circuit(i, c.at_slot(slot))
            slot += 2 * c.poles
    return out


def rail_options(schedule: Schedule, block: tuple[int, ...]) -> list[tuple[int, ...]]:
    """Every phases (in pole order) a block may take on a rail board (README, RCD groups).

    A circuit behind a 2-pole RCD: that RCD's phase only (it feeds one
    phase and neutral); a shared-neutral group or a breaker with one load
    per leg: every order of distinct phases; a plain 1-pole circuit: A, B
    or C; a plain 2-pole one: A-B, B-C or C-A; a plain 3-pole one: A-B-C.
    """
    c = schedule.circuits[block[0]]
    rcd = next((r for r in schedule.rcds if r.name == c.rcd and r.poles == 2), None)
    if rcd is not None:
        assert rcd.phase is not None
        return [(rcd.phase,)]
    poles = sum(schedule.circuits[i].poles for i in block)
    if len(block) > 1 or c.has_legs:
        return list(itertools.permutations(range(3), poles))
    plain: dict[int, list[tuple[int, ...]]] = {
        1: [(0,), (1,), (2,)],
        2: [(0, 1), (1, 2), (2, 0)],
        3: [(0, 1, 2)],
    }
    return plain[poles]


def stack_arrays(arrays: list[CircuitArrays]) -> CircuitArrays:
    """One batch of the engine's circuit arrays, one plan per row."""
    return CircuitArrays(
        s_va=np.stack([a.s_va for a in arrays]),
        connection=np.stack([a.connection for a in arrays]),
        phase_p=np.stack([a.phase_p for a in arrays]),
        phase_q=np.stack([a.phase_q for a in arrays]),
        harmonics=np.stack([a.harmonics for a in arrays]),
        orders=arrays[0].orders,
    )


def buildable(schedule: Schedule, blocks: list[tuple[int, ...]], firsts: np.ndarray):
    """Rows of ``firsts`` with no load to neutral on the high leg (module notes)."""
    high = schedule.panel.effective_high_leg
    keep = np.ones(firsts.shape[0], dtype=bool)
    if high is None:
        return keep
    rc = schedule.panel.right_column
    for k, b in enumerate(blocks):
        c = schedule.circuits[b[0]]
        if not (len(b) > 1 or c.poles == 1 or c.neutral):
            continue  # line-to-line or balanced: any phases
        poles = sum(schedule.circuits[i].poles for i in b)
        ok = {int(s): high not in pole_phases(int(s), poles, rc) for s in np.unique(firsts[:, k])}
        keep &= np.array([ok[int(s)] for s in firsts[:, k]], dtype=bool)
    return keep


def enumerate_wired(schedule: Schedule, free: list[int]) -> Enumerated:
    """Every arrangement of the free blocks and its engine figures (module notes).

    ``slots`` has one column per circuit of ``free`` (its own first slot),
    as :func:`rebalance_sweep.check_case` reads it.
    """
    blocks = blocks_of(schedule, free)
    firsts = block_arrangements(schedule, blocks)
    firsts = firsts[buildable(schedule, blocks, firsts)]
    circuits = schedule.circuits
    rc = schedule.panel.right_column
    old = [circuits[b[0]].slot for b in blocks]
    moved = np.zeros(firsts.shape[0], dtype=int)
    for k, s0 in enumerate(old):
        if s0 is not None:
            moved += firsts[:, k] != s0
    # arrangements that give every block the same phases in the same order share figures
    codes = np.zeros_like(firsts)
    for k, b in enumerate(blocks):
        poles = sum(circuits[i].poles for i in b)
        seen: list[tuple[int, ...]] = []
        for s in range(1, schedule.panel.spaces + 1):
            if pole_phases(s, poles, rc) not in seen:
                seen.append(pole_phases(s, poles, rc))
        codes[:, k] = [seen.index(pole_phases(int(s), poles, rc)) for s in firsts[:, k]]
    if firsts.shape[0] == 0:
        empty = np.zeros(0)
        return Enumerated(
            np.zeros((0, len(free)), dtype=int),
            empty.astype(int),
            np.zeros((0, 1, 3)),
            empty,
            empty,
        )
    uniq, first_row, back = np.unique(codes, axis=0, return_index=True, return_inverse=True)
    arrays = [circuit_arrays(schedule_at(schedule, blocks, firsts[r])) for r in first_row]
    res = analyse_batch(stack_arrays(arrays), system_voltages(schedule), ratings(schedule))
    n = uniq.shape[0]
    rms = np.asarray(res.phase_rms_a).reshape(n, 1, 3)
    back = back.ravel()
    per_circuit = np.zeros((firsts.shape[0], len(free)), dtype=int)
    col = {i: j for j, i in enumerate(free)}
    for k, b in enumerate(blocks):
        offset = 0
        for i in b:
            per_circuit[:, col[i]] = firsts[:, k] + offset
            offset += 2 * circuits[i].poles
    return Enumerated(
        slots=per_circuit,
        relocations=moved,
        phase_rms=rms[back],
        neutral_rms=np.asarray(res.neutral_rms_a).reshape(n)[back],
        deviation_pct=np.asarray(res.max_deviation_pct).reshape(n)[back],
    )
