"""Turn a phase assignment into slots with the fewest relocations, and order the work.

Two-column geometry (``tri.schedule.slots``): odd slots left, even right;
slot ``n`` in row ``(n + 1) // 2``; rows cycle A, B, C; a 2-pole breaker
takes two consecutive rows of one column (rows A-B, B-C or C-A), a 3-pole
three. Rail boards have no slots: a move only changes phases.

Realisation
-----------
Circuits whose option did not change stay where they are. Multi-pole
breakers that must move are placed first, in windows (consecutive rows of
the right phases in either column) picked by a small exact program
that displaces the fewest 1-pole breakers, then keeps breakers near where
they were. Then every 1-pole breaker that is free to
choose gets a slot by a linear assignment problem [1]
(``scipy.optimize.linear_sum_assignment``): cost 0 to stay in its own
slot, 1 to go to any other free slot of its phase, forbidden on another
phase, plus a small preference for slots near the old one (same column,
few rows away; too small ever to trade a relocation). The assignment
minimises relocations exactly for the 1-pole breakers given the windows.

Order of work
-------------
A breaker can go to its new slot once every breaker now in that slot has
left. Moves are ordered so (a topological order); when breakers form a
cycle (a swap), one of them is taken out and set aside first and
installed last. A swap of two breakers is therefore two moves and three
steps, with no spare slot needed.

References
----------
1. H. W. Kuhn, "The Hungarian method for the assignment problem", *Naval
   Res. Logist. Q.* 2 (1955) 83-97; D. F. Crouse, "On implementing 2D
   rectangular assignment algorithms", *IEEE Trans. AES* 52 (2016) 1679-1696
   (the algorithm in SciPy).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import Bounds, LinearConstraint, linear_sum_assignment, milp
from scipy.sparse import coo_matrix

from tri.rebalance.problem import Problem, Window, column_of, fixed_slots
from tri.schedule.model import Schedule
from tri.schedule.slots import occupied_slots, slot_row

_FORBIDDEN = 1.0e9


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
        Index of the circuit in the schedule.
    """

    action: str
    circuit_index: int


def _distance(slot: int, old: int | None, scale: float) -> float:
    if old is None:
        return scale * slot
    other_column = 3 if column_of(slot) != column_of(old) else 0
    return scale * (abs(slot_row(slot) - slot_row(old)) + other_column)


def windows(problem: Problem) -> tuple[Window, ...]:
    """Every window clear of fixed circuits, of the types free circuits can use."""
    return problem.windows


def occupants(problem: Problem) -> dict[int, int]:
    """Slot -> free-circuit index, for the slots free circuits hold now."""
    out = {}
    for i, idx in enumerate(problem.free.tolist()):
        c = problem.schedule.circuits[idx]
        if c.slot is not None:
            for s in occupied_slots(c.slot, c.poles):
                out[s] = i
    return out


def _choose_windows(
    problem: Problem, assign: np.ndarray, movers: list[int], scale: float
) -> tuple[dict[int, Window], set[int]] | None:
    """Windows for moving multi-pole breakers, displacing the fewest 1-pole ones.

    A small exact program (HiGHS): one window per breaker, no slot used
    twice, no window over a breaker that stays unless it is a 1-pole one,
    which is then displaced (a relocation). Minimises displacements, then
    distance.
    """
    if not movers:
        return {}, set()
    circuits = problem.schedule.circuits
    occ = occupants(problem)
    stays = problem.movable & (np.asarray(assign) == problem.current)
    cands: list[tuple[int, Window, list[int]]] = []
    for m in movers:
        t = int(np.flatnonzero(problem.use_window[int(assign[m])])[0])
        for w in windows(problem):
            if w.type != t:
                continue
            shifted: list[int] = []
            ok = True
            for s in w.cells:
                j = occ.get(s)
                if j is None or not stays[j]:
                    continue
                if problem.poles[j] > 1:
                    ok = False
                    break
                shifted.append(j)
            if ok:
                cands.append((m, w, shifted))
    if not cands:
        return None
    singles = sorted({j for _, _, sh in cands for j in sh})
    col_of = {j: k for k, j in enumerate(singles)}
    n_z, n_d = len(cands), len(singles)
    rows, cols, vals, lo, hi = [], [], [], [], []

    def add(cs, vs, lo_, hi_):
        r = len(lo)
        rows.extend([r] * len(cs))
        cols.extend(cs)
        vals.extend(vs)
        lo.append(lo_)
        hi.append(hi_)

    for m in movers:
        ks = [k for k, (mm, _, _) in enumerate(cands) if mm == m]
        if not ks:
            return None
        add(ks, [1.0] * len(ks), 1.0, 1.0)
    by_cell: dict[int, list[int]] = {}
    for k, (_, w, sh) in enumerate(cands):
        for s in w.cells:
            by_cell.setdefault(s, []).append(k)
        for j in sh:
            add([k, n_z + col_of[j]], [1.0, -1.0], -np.inf, 0.0)
    for ks in by_cell.values():
        if len(ks) > 1:
            add(ks, [1.0] * len(ks), -np.inf, 1.0)
    cost = np.zeros(n_z + n_d)
    for k, (m, w, _) in enumerate(cands):
        cost[k] = _distance(w.first, circuits[int(problem.free[m])].slot, scale)
    cost[n_z:] = 1.0
    a = coo_matrix((vals, (rows, cols)), shape=(len(lo), n_z + n_d)).tocsr()
    res = milp(
        cost,
        integrality=np.ones(n_z + n_d),
        bounds=Bounds(0, 1),
        constraints=LinearConstraint(a, lo, hi),
        options={"disp": False, "time_limit": 10.0},
    )
    if res.x is None:
        return None
    chosen = {cands[k][0]: cands[k][1] for k in range(n_z) if res.x[k] > 0.5}
    shifted_out = {singles[k] for k in range(n_d) if res.x[n_z + k] > 0.5}
    return chosen, shifted_out


def realise_slots(problem: Problem, assign: np.ndarray) -> dict[int, int] | None:
    """First slot of every free circuit's breaker after the plan.

    Parameters
    ----------
    problem : Problem
        A two-column panel.
    assign : int ndarray, shape (F,)
        Option of each free circuit.

    Returns
    -------
    dict or None
        Schedule index -> first slot, for every free circuit; None when the
        breakers cannot all be fitted.
    """
    sched = problem.schedule
    spaces = sched.panel.spaces
    circuits = sched.circuits
    assign = np.asarray(assign, dtype=int)
    taken = fixed_slots(problem)
    scale = 1.0 / (len(circuits) * (spaces + 4) + 1.0)
    result: dict[int, int] = {}
    single: list[int] = []
    movers: list[int] = []
    for i, idx in enumerate(problem.free.tolist()):
        c = circuits[idx]
        stays = bool(problem.movable[i]) and int(assign[i]) == int(problem.current[i])
        if c.poles == 1:
            single.append(i)
        elif stays:
            assert c.slot is not None
            result[idx] = c.slot
            taken.update(occupied_slots(c.slot, c.poles))
        else:
            movers.append(i)
    chosen = _choose_windows(problem, assign, movers, scale)
    if chosen is None:
        return None
    placed, displaced = chosen
    for m, w in placed.items():
        result[int(problem.free[m])] = w.first
        taken.update(w.cells)
    # 1-pole breakers that keep their phase and were not displaced stay (the
    # slot counts per phase leave room for the others, so keeping them costs
    # nothing); the rest get slots by an assignment problem over the slots left
    rest = []
    for i in single:
        idx = int(problem.free[i])
        c = circuits[idx]
        stays = bool(problem.movable[i]) and int(assign[i]) == int(problem.current[i])
        if stays and i not in displaced and c.slot is not None and c.slot not in taken:
            result[idx] = c.slot
            taken.add(c.slot)
        else:
            rest.append(i)
    cells = np.array([s for s in range(1, spaces + 1) if s not in taken], dtype=int)
    if len(rest) > cells.size:
        return None
    if rest:
        cell_phase = ((cells + 1) // 2 - 1) % 3
        cell_row = (cells + 1) // 2
        cell_col = (cells + 1) % 2  # 0 left (odd), 1 right (even)
        old = np.array([circuits[int(problem.free[i])].slot or 0 for i in rest])
        want = np.array([problem.phases[int(assign[i])][0] for i in rest])
        moved = np.array([bool(problem.movable[i]) for i in rest])
        dist = np.where(
            (old > 0)[:, None],
            np.abs(cell_row[None, :] - ((old + 1) // 2)[:, None])
            + 3 * (cell_col[None, :] != ((old + 1) % 2)[:, None]),
            cells[None, :],
        )
        cost = np.where(moved, 1.0, 0.0)[:, None] + scale * dist
        cost = np.where(cell_phase[None, :] == want[:, None], cost, _FORBIDDEN)
        rows, cols = linear_sum_assignment(cost)
        if np.any(cost[rows, cols] >= _FORBIDDEN):
            return None
        for r, k in zip(rows, cols, strict=True):
            result[int(problem.free[rest[r]])] = int(cells[k])
    return result


def order_work(schedule: Schedule, new_slots: dict[int, int]) -> list[WorkStep]:
    """Steps that carry out the relocations (module notes).

    Parameters
    ----------
    schedule : Schedule
        The panel before the work.
    new_slots : dict
        Schedule index -> new first slot of every breaker that moves or is
        placed.

    Returns
    -------
    list of WorkStep
        ``move``/``place`` when the target is free, ``take-out`` then
        ``install`` for a breaker set aside to break a cycle.
    """
    circuits = schedule.circuits
    changing = {idx: slot for idx, slot in new_slots.items() if circuits[idx].slot != slot}
    holder: dict[int, int] = {}
    for idx in changing:
        c = circuits[idx]
        if c.slot is not None:
            for s in occupied_slots(c.slot, c.poles):
                holder[s] = idx
    waits: dict[int, set[int]] = {}
    for idx, slot in changing.items():
        deps = {holder[s] for s in occupied_slots(slot, circuits[idx].poles) if s in holder}
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
            if i in aside:
                steps.append(WorkStep("install", i))
            else:
                steps.append(WorkStep("move" if circuits[i].slot is not None else "place", i))
            gone.add(i)
            continue
        # a cycle: set aside the first breaker that others wait for
        blocking = [i for i in pending if i not in gone and any(i in waits[j] for j in pending)]
        i = blocking[0] if blocking else pending[0]
        steps.append(WorkStep("take-out", i))
        aside.add(i)
        gone.add(i)
    return steps


def rail_steps(schedule: Schedule, changed: list[int]) -> list[WorkStep]:
    """Steps on a rail board: reconnect moved circuits, connect new ones."""
    return [
        WorkStep("reconnect" if schedule.circuits[i].is_placed else "connect", i)
        for i in sorted(changed)
    ]
