"""An independent reference for the rebalancer: every physical arrangement of a small panel.

Nothing here uses :mod:`tri.rebalance`. A two-column panel's free breakers
(unlocked ones, and new circuits when they are to be placed) are put in
every possible set of first slots that the panel's geometry allows
(:mod:`tri.schedule.slots`: a breaker of ``k`` poles takes ``k``
consecutive rows of one column, no slot twice, locked breakers where they
are). Each arrangement is a schedule; its figures come from the engine
itself (:func:`tri.engine.analyse_batch`, all arrangements in one batch),
and its relocation count is counted here as the work order counts it: a
placed breaker whose first slot changes is one relocation (a breaker set
aside in a swap is still one relocation), a new circuit's placement is
none. The optimum of each mode is then a minimum over this list. With a
reach limit (``[panel] max_row_shift``) only the arrangements in which no
placed breaker's row changes by more than the limit are listed.

Scenarios: a schedule with ``use`` factors is judged in every case, the
connected load (every factor 1.0) and each named scenario (README, Loads
over time: every name in any ``use`` table is a scenario, a circuit that
does not name it is at 1.0 there). The factors are read here from the
circuits' ``use`` directly, each case is its own engine batch of the
scaled loads, and the figures kept are the worst over the cases (the
largest deviation, neutral and phase current), which is what a plan must
meet in every case.

The enumeration walks the slots in increasing number: the lowest slot
nobody has decided is either left empty (while the panel has empty slots
to spare) or takes the first pole of a free breaker whose other poles fit
below it in the same column. Each arrangement is produced exactly once.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from tri.engine import analyse_batch
from tri.engine.inputs import CircuitArrays
from tri.schedule.model import Schedule
from tri.schedule.slots import fits, occupied_slots, slot_phases
from tri.schedule.to_engine import circuit_arrays, connection_of, ratings, system_voltages


def free_breakers(schedule: Schedule, mode: str, place_new: bool) -> list[int]:
    """Circuits whose slot may change, as each mode defines them (README, tri suggest).

    fewest-moves and balance: every unlocked placed breaker, and the new
    circuits when ``place_new``; place-new: the new circuits only; relayout:
    every unlocked circuit.
    """
    out = []
    for i, c in enumerate(schedule.circuits):
        if c.locked and c.is_placed:
            continue
        if c.is_placed:
            if mode != "place-new":
                out.append(i)
        elif place_new or mode in ("place-new", "relayout"):
            out.append(i)
    return out


def arrangements(schedule: Schedule, free: list[int], limit: int = 2_000_000) -> np.ndarray:
    """Every set of first slots for the ``free`` breakers (int ndarray, shape (A, len(free))).

    Breakers not in ``free`` keep their slots; unplaced circuits not in
    ``free`` stay unplaced.
    """
    spaces = schedule.panel.spaces
    circuits = schedule.circuits
    free_set = set(free)
    taken = set()
    for i, c in enumerate(circuits):
        if i not in free_set and c.slot is not None:
            taken.update(occupied_slots(c.slot, c.poles))
    poles = [circuits[i].poles for i in free]
    empties = spaces - len(taken) - sum(poles)
    out: list[tuple[int, ...]] = []
    slot_of = [0] * len(free)
    used = set(taken)

    def walk(cell: int, left: set[int], spare: int) -> None:
        while cell <= spaces and cell in used:
            cell += 1
        if not left:
            out.append(tuple(slot_of))
            if len(out) > limit:
                raise RuntimeError("too many arrangements for the reference")
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
            slot_of[k] = cell
            walk(cell + 1, left - {k}, spare)
            used.difference_update(cells)

    if empties >= 0:
        walk(1, set(range(len(free))), empties)
    return np.array(out, dtype=int).reshape(len(out), len(free))


def within_reach(schedule: Schedule, free: list[int], slots: np.ndarray) -> np.ndarray:
    """The arrangements in which no placed breaker's first slot moves more rows than
    ``[panel] max_row_shift`` (README: rows between first slots, either column)."""
    reach = schedule.panel.max_row_shift
    if reach is None:
        return slots
    keep = np.ones(slots.shape[0], dtype=bool)
    for k, i in enumerate(free):
        old = schedule.circuits[i].slot
        if old is not None:
            keep &= np.abs((slots[:, k] + 1) // 2 - (old + 1) // 2) <= reach
    return slots[keep]


@dataclass(frozen=True)
class Enumerated:
    """Every arrangement with its engine figures.

    Attributes
    ----------
    slots : int ndarray, shape (A, F)
        First slot of each free breaker.
    relocations : int ndarray, shape (A,)
        Placed breakers whose first slot changes [-].
    phase_rms : float ndarray, shape (A, S, 3)
        [A], from the engine, in each case (connected load first).
    neutral_rms : float ndarray, shape (A,)
        Largest over the cases [A], from the engine.
    deviation_pct : float ndarray, shape (A,)
        Largest deviation of a phase RMS current from the mean, over the
        cases [%], from the engine.
    cases : tuple of str
        The cases (module notes).
    """

    slots: np.ndarray
    relocations: np.ndarray
    phase_rms: np.ndarray
    neutral_rms: np.ndarray
    deviation_pct: np.ndarray
    cases: tuple[str, ...] = ("connected",)

    @property
    def max_rms(self) -> np.ndarray:
        """Largest phase RMS current of each arrangement over every case [A]."""
        return self.phase_rms.max(axis=(1, 2))


def case_factors(schedule: Schedule) -> tuple[tuple[str, ...], np.ndarray]:
    """The cases and each circuit's factor in each (module notes), shape (S, n)."""
    names: list[str] = []
    for c in schedule.circuits:
        names += [n for n, _ in c.use if n not in names]
    factors = np.ones((1 + len(names), len(schedule.circuits)))
    for i, c in enumerate(schedule.circuits):
        for n, f in c.use:
            factors[1 + names.index(n), i] = f
    return ("connected", *names), factors


def enumerate_panel(schedule: Schedule, free: list[int]) -> Enumerated:
    """Every arrangement of ``free`` and its figures (module notes).

    Arrangements that put every breaker on the same phases have the same
    currents, so the engine runs once per distinct set of phases.
    """
    slots = within_reach(schedule, free, arrangements(schedule, free))
    n_arr = slots.shape[0]
    old = [schedule.circuits[i].slot for i in free]
    moved = np.zeros(n_arr, dtype=int)
    codes = np.zeros((n_arr, len(free)), dtype=int)
    rc = schedule.panel.right_column
    for k, i in enumerate(free):
        # the set of phases the breaker takes in each first slot (a C-B-A right column
        # puts a 2-pole breaker whose first pole is on C on B-C, the left column on C-A)
        poles = schedule.circuits[i].poles
        code = np.zeros(schedule.panel.spaces + 1, dtype=int)
        for s in range(1, schedule.panel.spaces + 1):
            code[s] = sum(1 << p for p in slot_phases(s, poles, rc))
        codes[:, k] = code[slots[:, k]]
        if old[k] is not None:
            moved += slots[:, k] != old[k]
    uniq, back = np.unique(codes, axis=0, return_inverse=True)
    first_slot = np.zeros_like(uniq)
    for u in range(uniq.shape[0]):
        first_slot[u] = slots[np.flatnonzero(back.ravel() == u)[0]]
    names, factors = case_factors(schedule)
    figures = [_engine(schedule, free, first_slot, f) for f in factors]
    rms = np.stack([f[0] for f in figures], axis=1)  # (U, S, 3)
    neutral = np.max([f[1] for f in figures], axis=0)
    dev = np.max([f[2] for f in figures], axis=0)
    back = back.ravel()
    return Enumerated(
        slots=slots,
        relocations=moved,
        phase_rms=rms[back],
        neutral_rms=neutral[back],
        deviation_pct=dev[back],
        cases=names,
    )


def _engine(schedule: Schedule, free: list[int], first_slot: np.ndarray, factors: np.ndarray):
    """Engine figures of the schedules with ``free`` at each row of first slots,
    every circuit's load scaled by its factor (one case)."""
    ca = circuit_arrays(schedule)
    assert len(ca.s_va) == len(schedule.circuits)  # one row per circuit (no per-leg loads)
    n_arr = first_slot.shape[0]
    conn = np.tile(ca.connection, (n_arr, 1))
    pp = np.tile(ca.phase_p, (n_arr, 1))
    qq = np.tile(ca.phase_q, (n_arr, 1))
    for k, i in enumerate(free):
        c = schedule.circuits[i]
        for s in np.unique(first_slot[:, k]):
            rows = first_slot[:, k] == s
            placed = schedule.placed(c.at_slot(int(s)))  # the panel's own geometry
            conn[rows, i], pp[rows, i], qq[rows, i] = connection_of(placed)
    batch = CircuitArrays(
        s_va=np.tile(np.asarray(ca.s_va) * factors, (n_arr, 1)),
        connection=conn,
        phase_p=pp,
        phase_q=qq,
        harmonics=np.tile(ca.harmonics, (n_arr, 1, 1)),
        orders=ca.orders,
        continuous=np.tile(ca.continuous, (n_arr, 1)),
    )
    res = analyse_batch(batch, system_voltages(schedule), ratings(schedule))
    return (
        np.asarray(res.phase_rms_a).reshape(n_arr, 3),
        np.asarray(res.neutral_rms_a).reshape(n_arr),
        np.asarray(res.max_deviation_pct).reshape(n_arr),
    )


def schedule_of(schedule: Schedule, free: list[int], slots: np.ndarray) -> Schedule:
    """The schedule of one arrangement."""
    out = schedule
    for k, i in enumerate(free):
        out = out.with_circuit(i, replace(out.circuits[i]).at_slot(int(slots[k])))
    return out
