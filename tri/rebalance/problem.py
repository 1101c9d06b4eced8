"""The rebalancing problem as arrays: free circuits, their options, what each option adds.

A *free* circuit is one whose connection the rebalancer may choose: a
placed circuit that is not locked (changing it is a *move*), or a new
circuit that has no slot yet (placing it is not counted as a move). Every
other circuit is *fixed* and only adds its currents and occupies its slots.

Options of a free circuit (``kind`` numbers them within a pole count):

==========  ==================================  =====================
poles       two-column panel                    rail board ("phases")
==========  ==================================  =====================
1           phase A, B or C (kind = phase)      the same
2           rows A-B, B-C or C-A (kind = pair)  pair A-B, B-C or C-A
3           one option (any three rows)         one option
==========  ==================================  =====================

Which column and rows a breaker takes is left to the slot realisation
(:mod:`tri.rebalance.realise`), whose window geometry the mixed-integer
program models exactly; options never differ by column alone, so no two
options are electrically identical.

What an option adds to the phase and neutral currents at every harmonic
order comes from the engine itself (:func:`tri.engine.analyse_batch` on a
batch of one-circuit panels), so the optimiser and the report share one
set of equations. At nominal voltage the engine is linear in the circuits
(every circuit's current is fixed by its own power and voltage), so a
plan's currents are the sum of its options' contributions: the exact
figures of any plan follow by addition (:func:`spectra`).

The floor (:attr:`Problem.floor_a`)
-----------------------------------
For harmonic order ``h`` let ``J_h`` be the sequence component of the phase
currents that rotates like order ``h``: positive sequence
``(I_A + a·I_B + a²·I_C)/3`` for ``h ≡ 1 (mod 3)``, negative sequence
``(I_A + a²·I_B + a·I_C)/3`` for ``h ≡ 2``, zero sequence for ``h ≡ 0``
(``a = 1∠120°``). A 1-pole circuit moved from phase A to phase k has its
order-h current rotated by ``a^(-h·k)`` and carried by line k, so its share
of ``J_h`` is unchanged; the same holds for a 2-pole circuit moved between
pairs (and a 2-pole circuit adds nothing to the zero sequence). So every
``J_h``, and ``F = sqrt(Σ_h |J_h|²)``, is the same for every plan. Since
``J = (1/3)·Σ_p D_p·v_p`` with ``v_p`` the spectrum of phase p and ``D_p``
diagonal with unit entries, ``F = ||J|| ≤ (1/3)·Σ_p ||v_p||`` = the mean
phase RMS current ≤ the largest one. ``F`` is a lower bound on the largest
phase RMS current of *every* plan, and on their mean. With linear loads
``F = |I_1|``, the positive-sequence current.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np

from tri.engine import analyse_batch
from tri.engine.inputs import LINE_TO_LINE, LINE_TO_NEUTRAL, THREE_PHASE, UNPLACED, CircuitArrays
from tri.engine.unbalance import deviation_rate_pct
from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import occupied_slots, slot_phase
from tri.schedule.to_engine import circuit_arrays, ratings, system_voltages

#: The three phase pairs of 2-pole options, in row order of a two-column panel [-].
PAIRS: tuple[tuple[int, int], ...] = ((0, 1), (1, 2), (2, 0))
#: Number of window types: 2-pole breakers starting on row A, B or C; 3-pole [-].
WINDOW_TYPES = 4
_A = np.exp(2j * np.pi / 3)
#: Weights of the order-invariant sequence component for h mod 3 = 0, 1, 2 [-].
_SEQ_WEIGHTS = np.array([[1, 1, 1], [1, _A, _A**2], [1, _A**2, _A]], dtype=complex) / 3.0


def column_of(slot: int) -> int:
    """Column of a slot in a two-column panel: 0 left (odd), 1 right (even)."""
    return 0 if slot % 2 == 1 else 1


def pair_index(phases: Sequence[int]) -> int:
    """Index in :data:`PAIRS` of an (unordered) pair of phases."""
    s = set(phases)
    for k, pair in enumerate(PAIRS):
        if set(pair) == s:
            return k
    raise ValueError(f"not a pair of distinct phases: {phases!r}")


@dataclass(frozen=True)
class Window:
    """Consecutive rows of one column where a 2- or 3-pole breaker can go.

    Attributes
    ----------
    type : int
        Start phase (0, 1, 2) of a 2-pole window, 3 for a 3-pole window
        (the ``use_window`` columns of a Problem); either column.
    first : int
        First slot [-].
    cells : tuple of int
        Every slot the breaker takes.
    """

    type: int
    first: int
    cells: tuple[int, ...]


@dataclass(frozen=True, eq=False)
class Problem:
    """Everything the search needs about one panel, as arrays.

    Attributes
    ----------
    schedule : Schedule
        The panel as it is.
    free : int ndarray, shape (F,)
        Schedule index of each free circuit.
    movable : bool ndarray, shape (F,)
        True for placed circuits (changing their option is a move).
    poles : int ndarray, shape (F,)
        Pole count of each free circuit.
    starts : int ndarray, shape (F + 1,)
        Options of free circuit ``i`` are ``starts[i]:starts[i+1]``.
    owner, kind : int ndarray, shape (O,)
        Free circuit and kind (see the module table) of each option.
    phases : tuple of tuple of int, length O
        Phases of each option, in pole order.
    column : int ndarray, shape (O,)
        Column an option is tied to; -1 (either) for every option.
    current : int ndarray, shape (F,)
        Option each free circuit has now; -1 for new circuits.
    orders : int ndarray, shape (H,)
        Harmonic orders, ``orders[0] == 1``.
    contrib : complex ndarray, shape (O, 3, H)
        Line currents each option adds, per phase and order [A].
    ncontrib : complex ndarray, shape (O, H)
        Neutral current each option adds, per order [A].
    base, nbase : complex ndarray, shapes (3, H) and (H,)
        Currents of the fixed circuits [A].
    has_neutral : bool
        False on a 3-wire system.
    slots : bool
        True on a two-column panel (slot capacity applies).
    cap_cells : int ndarray, shape (3, 2)
        Slots per phase and column not taken by fixed circuits [-].
    use_cells : int ndarray, shape (O, 3)
        Slots per phase an option takes [-].
    use_window : int ndarray, shape (O, 4)
        One-hot window type of a multi-pole option (start row A, B, C; 3-pole) [-].
    cap_window : int ndarray, shape (4,)
        Free windows of each type, both columns (same-type windows never
        overlap within a column) [-].
    floor_a : float
        ``F``: no plan's largest phase RMS current is below it [A] (module notes).
    windows : tuple of Window
        Windows clear of fixed circuits, of the types free circuits use.
    """

    schedule: Schedule
    free: np.ndarray
    movable: np.ndarray
    poles: np.ndarray
    starts: np.ndarray
    owner: np.ndarray
    kind: np.ndarray
    phases: tuple[tuple[int, ...], ...]
    column: np.ndarray
    current: np.ndarray
    orders: np.ndarray
    contrib: np.ndarray
    ncontrib: np.ndarray
    base: np.ndarray
    nbase: np.ndarray
    has_neutral: bool
    slots: bool
    cap_cells: np.ndarray
    use_cells: np.ndarray
    use_window: np.ndarray
    cap_window: np.ndarray
    floor_a: float
    windows: tuple[Window, ...] = ()

    @property
    def n_free(self) -> int:
        """Number of free circuits ``F`` [-]."""
        return int(self.free.size)

    @property
    def n_options(self) -> int:
        """Number of options ``O`` [-]."""
        return int(self.owner.size)

    @property
    def n_movable(self) -> int:
        """Free circuits that are placed now [-]."""
        return int(np.sum(self.movable))

    def options_of(self, i: int) -> range:
        """Option indices of free circuit ``i``."""
        return range(int(self.starts[i]), int(self.starts[i + 1]))

    def current_assignment(self) -> np.ndarray:
        """Current options, new circuits at their first option (int ndarray, shape (F,))."""
        return np.where(self.current >= 0, self.current, self.starts[:-1])

    def moves(self, assign: np.ndarray) -> int:
        """Number of placed free circuits whose option differs from now [-]."""
        return int(np.sum(self.movable & (np.asarray(assign) != self.current)))


def _options(c: Circuit, slots: bool) -> list[tuple[int, tuple[int, ...], int]]:
    """``(kind, phases, column)`` of every option of a circuit."""
    if c.poles == 1:
        return [(p, (p,), -1) for p in range(3)]
    if c.poles == 2:
        out = []
        for k, pair in enumerate(PAIRS):
            keep = not slots and c.phases is not None and set(c.phases) == set(pair)
            out.append((k, tuple(c.phases) if keep else pair, -1))  # type: ignore[arg-type]
        return out
    return [(0, (0, 1, 2), -1)]


def _current_kind(c: Circuit, slots: bool) -> int:
    if c.phases is None:
        return -1
    if c.poles == 1:
        return c.phases[0]
    if c.poles == 2:
        return pair_index(c.phases)
    return 0


def _connection(poles: int) -> int:
    return {1: LINE_TO_NEUTRAL, 2: LINE_TO_LINE}.get(poles, THREE_PHASE)


def column_rows(spaces: int, col: int) -> int:
    """Number of rows (slots) in a column of a two-column panel."""
    return (spaces + 1) // 2 if col == 0 else spaces // 2


def slot_at(row: int, col: int) -> int:
    """Slot number of a row (1-based) and column (0 left, 1 right)."""
    return 2 * row - 1 if col == 0 else 2 * row


def _capacity(schedule: Schedule, fixed: Sequence[int]) -> tuple[np.ndarray, np.ndarray, set[int]]:
    """Free slots per phase and column, window counts, and the blocked slots."""
    spaces = schedule.panel.spaces
    blocked: set[int] = set()
    for idx in fixed:
        c = schedule.circuits[idx]
        if c.slot is not None:
            blocked.update(occupied_slots(c.slot, c.poles))
    cap = np.zeros((3, 2), dtype=int)
    for s in range(1, spaces + 1):
        if s not in blocked:
            cap[slot_phase(s), column_of(s)] += 1
    win = np.zeros(WINDOW_TYPES, dtype=int)
    for col in (0, 1):
        rows = column_rows(spaces, col)
        free = [slot_at(r, col) not in blocked for r in range(1, rows + 1)]
        for r in range(rows - 1):
            if free[r] and free[r + 1]:
                win[r % 3] += 1  # row r+1 (1-based) has phase r % 3
        run = 0
        for f in [*free, False]:
            if f:
                run += 1
            else:
                win[3] += run // 3
                run = 0
    return cap, win, blocked


def fixed_slots(problem: Problem) -> set[int]:
    """Slots taken by circuits that are not free."""
    free_set = set(problem.free.tolist())
    out: set[int] = set()
    for idx, c in enumerate(problem.schedule.circuits):
        if c.slot is not None and idx not in free_set:
            out.update(occupied_slots(c.slot, c.poles))
    return out


def _windows(problem: Problem) -> tuple[Window, ...]:
    spaces = problem.schedule.panel.spaces
    blocked = fixed_slots(problem)
    wanted = set(np.flatnonzero(problem.use_window.sum(axis=0)).tolist())
    out = []
    for col in (0, 1):
        for row in range(1, column_rows(spaces, col) + 1):
            first = slot_at(row, col)
            for poles in (2, 3):
                cells = occupied_slots(first, poles)
                if cells[-1] > spaces or blocked.intersection(cells):
                    continue
                t = 3 if poles == 3 else slot_phase(first)
                if t in wanted:
                    out.append(Window(t, first, cells))
    return tuple(out)


def _single_circuit_batch(ca: CircuitArrays, rows: np.ndarray, conn, p, q) -> CircuitArrays:
    """One-circuit panels: row ``rows[k]`` of ``ca`` connected as (conn, p, q)[k]."""
    return CircuitArrays(
        s_va=ca.s_va[rows][:, None],
        connection=np.asarray(conn, dtype=np.int64)[:, None],
        phase_p=np.asarray(p, dtype=np.int64)[:, None],
        phase_q=np.asarray(q, dtype=np.int64)[:, None],
        harmonics=ca.harmonics[rows][:, None, :],
        orders=ca.orders,
        continuous=np.zeros((rows.size, 1), dtype=bool),
    )


def build_problem(schedule: Schedule, free: Sequence[int]) -> Problem:
    """Arrays for the rebalancer with the circuits ``free`` open to choice.

    Parameters
    ----------
    schedule : Schedule
        The panel.
    free : sequence of int
        Schedule indices of the circuits whose connection may be chosen
        (placed: a move; unplaced: a placement).

    Returns
    -------
    Problem
    """
    circuits = schedule.circuits
    slots = schedule.panel.uses_slots
    free_arr = np.array(sorted(set(int(i) for i in free)), dtype=int)
    free_set = set(free_arr.tolist())
    fixed = [i for i, c in enumerate(circuits) if i not in free_set and c.is_placed]

    owner, kind, phases, column, starts, current = [], [], [], [], [0], []
    for fi, idx in enumerate(free_arr):
        c = circuits[idx]
        opts = _options(c, slots)
        cur_kind = _current_kind(c, slots)
        cur = -1
        for k, ph, col in opts:
            if k == cur_kind:
                cur = len(owner)
            owner.append(fi)
            kind.append(k)
            phases.append(ph)
            column.append(col)
        starts.append(len(owner))
        current.append(cur)
    n_opt = len(owner)
    owner_a = np.array(owner, dtype=int)

    ca = circuit_arrays(schedule)
    system = system_voltages(schedule)
    rat = ratings(schedule)
    orders = np.concatenate([[1], np.asarray(ca.orders, dtype=int)])
    h = orders.size

    conn = np.array(ca.connection, copy=True)
    conn[free_arr] = UNPLACED
    base_ca = CircuitArrays(
        s_va=ca.s_va,
        connection=conn,
        phase_p=ca.phase_p,
        phase_q=ca.phase_q,
        harmonics=ca.harmonics,
        orders=ca.orders,
        continuous=np.zeros_like(ca.continuous),
    )
    if len(circuits):
        b = analyse_batch(base_ca, system, rat)
        base = np.asarray(b.phase_spectrum, dtype=complex)
        nbase = np.asarray(b.neutral_spectrum, dtype=complex)
    else:
        base = np.zeros((3, h), dtype=complex)
        nbase = np.zeros(h, dtype=complex)

    if n_opt:
        rows = free_arr[owner_a]
        poles = np.array([circuits[i].poles for i in rows])
        batch = _single_circuit_batch(
            ca,
            rows,
            [_connection(int(p)) for p in poles],
            [ph[0] if len(ph) < 3 else 0 for ph in phases],
            [ph[1] if len(ph) == 2 else (ph[0] if len(ph) == 1 else 0) for ph in phases],
        )
        ob = analyse_batch(batch, system, rat)
        contrib = np.asarray(ob.phase_spectrum, dtype=complex)
        ncontrib = np.asarray(ob.neutral_spectrum, dtype=complex)
    else:
        contrib = np.zeros((0, 3, h), dtype=complex)
        ncontrib = np.zeros((0, h), dtype=complex)

    use_cells = np.zeros((n_opt, 3), dtype=int)
    use_window = np.zeros((n_opt, WINDOW_TYPES), dtype=int)
    for o, ph in enumerate(phases):
        for p in ph:
            use_cells[o, p] += 1
        if len(ph) > 1 and slots:
            use_window[o, 3 if len(ph) == 3 else ph[0]] = 1
    if slots:
        cap, win, _ = _capacity(schedule, fixed)
    else:
        cap = np.full((3, 2), np.iinfo(np.int32).max // 4, dtype=int)
        win = np.full(WINDOW_TYPES, np.iinfo(np.int32).max // 4, dtype=int)

    problem = Problem(
        schedule=schedule,
        free=free_arr,
        movable=np.array([circuits[i].is_placed for i in free_arr], dtype=bool),
        poles=np.array([circuits[i].poles for i in free_arr], dtype=int),
        starts=np.array(starts, dtype=int),
        owner=owner_a,
        kind=np.array(kind, dtype=int),
        phases=tuple(phases),
        column=np.array(column, dtype=int),
        current=np.array(current, dtype=int),
        orders=orders,
        contrib=contrib,
        ncontrib=ncontrib,
        base=base,
        nbase=nbase,
        has_neutral=schedule.system.has_neutral,
        slots=slots,
        cap_cells=cap,
        use_cells=use_cells,
        use_window=use_window,
        cap_window=win,
        floor_a=0.0,
    )
    v, _ = spectra(problem, problem.current_assignment())
    return replace(
        problem,
        floor_a=floor_of(v, orders),
        windows=_windows(problem) if slots and np.any(use_window) else (),
    )


def floor_of(spectrum: np.ndarray, orders: np.ndarray) -> float:
    """``F = sqrt(Σ_h |J_h|²)``, the order-invariant sequence currents (module notes).

    Parameters
    ----------
    spectrum : complex ndarray, shape (3, H)
        Phase currents at each order [A].
    orders : int ndarray, shape (H,)
        Orders of the columns.

    Returns
    -------
    float
        ``F`` [A]; ``|I_1|`` (positive sequence) when only order 1 is present.
    """
    w = _SEQ_WEIGHTS[np.asarray(orders) % 3]  # (H, 3)
    j = np.einsum("hp,ph->h", w, np.asarray(spectrum, dtype=complex))
    return float(np.sqrt(np.sum(np.abs(j) ** 2)))


def spectra(problem: Problem, assign: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Phase and neutral currents of a plan, by superposition.

    Parameters
    ----------
    problem : Problem
    assign : int ndarray, shape (F,)
        Option index chosen for each free circuit.

    Returns
    -------
    phase : complex ndarray, shape (3, H)
        Line currents per order [A].
    neutral : complex ndarray, shape (H,)
        Neutral current per order [A].
    """
    a = np.asarray(assign, dtype=int)
    return (
        problem.base + problem.contrib[a].sum(axis=0),
        problem.nbase + problem.ncontrib[a].sum(axis=0),
    )


def rms(spectrum: np.ndarray) -> np.ndarray:
    """True RMS over the last axis (orders): ``sqrt(Σ_h |I_h|²)`` [A]."""
    s = np.asarray(spectrum)
    return np.sqrt(np.sum(s.real**2 + s.imag**2, axis=-1))


@dataclass(frozen=True)
class Assessment:
    """Exact figures of one plan (by superposition of the engine's currents).

    Attributes
    ----------
    phase_rms_a : tuple of 3 float
        RMS current of each phase [A].
    neutral_rms_a : float
        RMS neutral current [A] (0 on a 3-wire system).
    deviation_pct : float
        Largest deviation of a phase RMS current from their mean [%].
    moves : int
        Placed circuits whose connection changes [-].
    """

    phase_rms_a: tuple[float, float, float]
    neutral_rms_a: float
    deviation_pct: float
    moves: int

    @property
    def max_rms_a(self) -> float:
        """Largest phase RMS current [A]."""
        return max(self.phase_rms_a)


def assess(problem: Problem, assign: np.ndarray) -> Assessment:
    """Exact figures of a plan (see :class:`Assessment`)."""
    v, n = spectra(problem, assign)
    r = rms(v)
    return Assessment(
        phase_rms_a=(float(r[0]), float(r[1]), float(r[2])),
        neutral_rms_a=float(rms(n)) if problem.has_neutral else 0.0,
        deviation_pct=float(deviation_rate_pct(r)),
        moves=problem.moves(assign),
    )


def triplen_neutral_a(problem: Problem) -> float:
    """RMS of the neutral's triplen orders, the same for every plan [A].

    A 1-pole circuit's current at a triplen order is the same phasor on
    whichever phase it sits (the rotation ``a^(-h·k)`` is 1 for ``h ≡ 0
    mod 3``), so no move changes it.
    """
    _, n = spectra(problem, problem.current_assignment())
    mask = problem.orders % 3 == 0
    return float(rms(n[mask])) if problem.has_neutral else 0.0
