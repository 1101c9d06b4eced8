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
    ``free`` stay unplaced. The walk of the module notes, taken for every
    partial arrangement at once (:func:`_walk_step`), lists them in the order
    a depth-first walk would: at each undecided slot, empty first, then the
    free breakers in order.
    """
    spaces = schedule.panel.spaces
    assert spaces <= 62, "slot sets are 64-bit masks"
    circuits = schedule.circuits
    free_set = set(free)
    taken = 0
    for i, c in enumerate(circuits):
        if i not in free_set and c.slot is not None:
            for s in occupied_slots(c.slot, c.poles):
                taken |= 1 << s
    poles = [circuits[i].poles for i in free]
    empties = spaces - bin(taken).count("1") - sum(poles)
    if empties < 0:
        return np.zeros((0, len(free)), dtype=int)
    # cells[k, s]: the slots breaker k takes with its first pole in slot s, -1 off the panel
    cells = np.full((len(free), spaces + 2), -1, dtype=np.int64)
    for k, p in enumerate(poles):
        for s in range(1, spaces + 1):
            if fits(s, p, spaces):
                cells[k, s] = sum(1 << c for c in occupied_slots(s, p))
    state = _Walk(
        used=np.array([taken], dtype=np.int64),
        left=np.array([(1 << len(free)) - 1], dtype=np.int64),
        spare=np.array([empties]),
        cell=np.array([1]),
        slot_of=np.zeros((1, len(free)), dtype=int),
    )
    while not np.all(state.left == 0):
        state = _walk_step(state, cells, spaces)
        if state.left.size > limit:
            raise RuntimeError("too many arrangements for the reference")
    return state.slot_of


@dataclass(frozen=True)
class _Walk:
    """Partial arrangements: slots taken (bit s for slot s), free breakers still to
    place (bit k for breaker k), empty slots still to spare, the next slot to
    decide, and each breaker's first slot so far."""

    used: np.ndarray
    left: np.ndarray
    spare: np.ndarray
    cell: np.ndarray
    slot_of: np.ndarray


def _walk_step(w: _Walk, cells: np.ndarray, spaces: int) -> _Walk:
    """Decide the lowest undecided slot of every partial arrangement (module notes).

    Each one becomes, in this order: itself when it is complete, the slot left
    empty (while slots remain to spare), the slot taken by the first pole of
    each free breaker whose other poles fit. One with no slot left for its
    breakers ends. Children follow their parent's place, so the order is the
    depth-first walk's.
    """
    n_free = cells.shape[0]
    slot_bits = np.int64(1) << np.arange(spaces + 2, dtype=np.int64)
    # the lowest slot at or after the cursor that nobody has taken (spaces + 1: none)
    open_ = (w.used[:, None] & slot_bits[None, :]) == 0
    open_ &= np.arange(spaces + 2)[None, :] >= w.cell[:, None]
    open_[:, spaces + 1] = True
    cell = np.argmax(open_, axis=1)
    done = w.left == 0
    live = ~done & (cell <= spaces)
    bit = slot_bits[cell]
    take = cells[:, cell].T  # (N, F)
    has = (w.left[:, None] >> np.arange(n_free, dtype=np.int64)[None, :]) & 1 == 1
    fit = live[:, None] & has & (take >= 0) & ((w.used[:, None] & np.maximum(take, 0)) == 0)
    choice = np.column_stack([done, live & (w.spare > 0), fit])
    parent, what = np.nonzero(choice)
    k = what - 2
    placed = k >= 0
    used = w.used[parent].copy()
    left = w.left[parent].copy()
    spare = w.spare[parent].copy()
    nxt = cell[parent] + 1
    slot_of = w.slot_of[parent].copy()
    empty = what == 1
    used[empty] |= bit[parent[empty]]
    spare[empty] -= 1
    rows = np.flatnonzero(placed)
    used[rows] |= take[parent[rows], k[rows]]
    left[rows] &= ~(np.int64(1) << k[rows].astype(np.int64))
    slot_of[rows, k[rows]] = cell[parent[rows]]
    stay = what == 0
    nxt[stay] = w.cell[parent[stay]]
    return _Walk(used, left, spare, nxt, slot_of)


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
    first_row, back = distinct_rows(codes)
    first_slot = slots[first_row]
    names, factors = case_factors(schedule)
    figures = [_engine(schedule, free, first_slot, f) for f in factors]
    rms = np.stack([f[0] for f in figures], axis=1)  # (U, S, 3)
    neutral = np.max([f[1] for f in figures], axis=0)
    dev = np.max([f[2] for f in figures], axis=0)
    return Enumerated(
        slots=slots,
        relocations=moved,
        phase_rms=rms[back],
        neutral_rms=neutral[back],
        deviation_pct=dev[back],
        cases=names,
    )


def distinct_rows(codes: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """First row of each distinct row of ``codes`` and each row's distinct index.

    As ``np.unique(codes, axis=0, return_index=True, return_inverse=True)``
    (same order), for codes 0-7 in at most 21 columns, read as one base-8
    number per row (much faster than comparing rows).
    """
    n_rows, n_cols = codes.shape
    if n_rows == 0:
        return np.zeros(0, dtype=int), np.zeros(0, dtype=int)
    assert n_cols <= 21 and (n_cols == 0 or (codes.min() >= 0 and codes.max() < 8))
    keys = np.zeros(n_rows, dtype=np.int64)
    for k in range(n_cols):
        keys = (keys << 3) | codes[:, k].astype(np.int64)
    _, first_row, back = np.unique(keys, return_index=True, return_inverse=True)
    return first_row, back.ravel()


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
