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

An option is what a breaker's position means electrically; *where* it
sits (which slot, and whether it moves at all) is the slot model's
(:mod:`tri.rebalance.geometry`, :mod:`tri.rebalance.slot_model`): on a
two-column panel a breaker may relocate and keep its option (to make room),
and that is a move too. Options never differ by column alone, so no two
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

High leg
--------
On a high-leg delta (``240/120D``) the phase voltages to neutral are not
120° apart: the two low phases are 180° apart, the high leg 90° from
them. A 120 V load moved from A to C has its current reversed, not rotated
by 120°, so its share of ``J_h`` changes, and so does every ``J_h`` with
the plan: ``F`` is no bound there, nor are the bounds built on it (the
crossing and triangle bounds of :mod:`tri.rebalance.crossing` and
:mod:`tri.rebalance.halves`, the plan-free triplen neutral). On such a
panel :attr:`Problem.symmetric` is False, ``floor_a`` is 0 and those bounds
are not used; proofs come from listing every plan
(:mod:`tri.rebalance.exhaust`), from the relaxation with fractional moves
(:mod:`tri.rebalance.relaxation`, which holds for any phasors: in the
balance modes, a re-layout included, it stands in for the floor) and from
the programs, whose rows (the
magnitude bounds of :mod:`tri.rebalance.lower_bounds`, Cauchy-Schwarz on
each phase's own currents, and the budget floor of Theorem 3 of
:mod:`tri.rebalance.crossing`, which is the same inequality) hold for any
phasors.

With ``use`` scenarios the problem carries every case's currents
(:mod:`tri.rebalance.cases`): its own arrays are the connected load's,
:attr:`Problem.others` the problem in each further case.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace
from functools import cached_property
from typing import TYPE_CHECKING

import numpy as np

from tri.rebalance.geometry import SlotGeometry, Window, disjoint_window_counts, slot_geometry
from tri.rebalance.option_currents import engine_currents
from tri.rebalance.units import PAIRS as PAIRS  # re-exported
from tri.rebalance.units import Unit, free_units, pair_index, unit_options
from tri.schedule.model import Schedule
from tri.schedule.to_engine import circuit_arrays

if TYPE_CHECKING:
    from tri.rebalance.cases import Stacked

#: Capacity types of the heuristic: 2-pole windows on the pairs A-B, B-C, C-A; 3-pole windows [-].
WINDOW_TYPES = 4
#: "No limit" in the capacity arrays of a rail board [-].
_UNLIMITED = np.iinfo(np.int32).max // 4


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
        True for placed circuits (relocating them is a move).
    poles : int ndarray, shape (F,)
        Pole count of each free circuit.
    starts : int ndarray, shape (F + 1,)
        Options of free circuit ``i`` are ``starts[i]:starts[i+1]``.
    owner, kind : int ndarray, shape (O,)
        Free circuit and kind (see the module table) of each option.
    phases : tuple of tuple of int, length O
        Phases of each option, in pole order.
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
    geometry : SlotGeometry or None
        Open slots, windows and homes on a two-column panel; None on a rail board.
    use_cells : int ndarray, shape (O, 3)
        Slots per phase an option takes [-].
    use_window : int ndarray, shape (O, 4)
        One-hot capacity type of a multi-pole option on a two-column panel [-].
    cap_phase : int ndarray, shape (3,)
        Open slots per phase [-] (unlimited on a rail board).
    cap_window : int ndarray, shape (4,)
        Most windows of each type side by side in the open slots [-].
    floor_a : float
        ``F`` of these currents: no plan's largest phase RMS current is below
        it [A] (module notes).
    case_names : tuple of str
        The cases, this problem's own first (module notes, Cases).
    others : tuple of Problem
        The problem in each further case (same options; empty without scenarios).
    units : tuple of Unit
        What each free circuit stands for (:mod:`tri.rebalance.units`): its
        breakers (a shared-neutral group moves as one), empty when built by
        hand (then every free circuit is one plain breaker).
    symmetric : bool
        The phases are 120° apart (not a high-leg delta): the floor and the
        bounds built on ``J_h`` hold (module notes).
    wired_mask : bool ndarray, shape (F,), or None
        Which free circuits are wired units, for a problem whose units belong
        to several schedules (a building's node view); None: read off ``units``.
    """

    schedule: Schedule
    free: np.ndarray
    movable: np.ndarray
    poles: np.ndarray
    starts: np.ndarray
    owner: np.ndarray
    kind: np.ndarray
    phases: tuple[tuple[int, ...], ...]
    current: np.ndarray
    orders: np.ndarray
    contrib: np.ndarray
    ncontrib: np.ndarray
    base: np.ndarray
    nbase: np.ndarray
    has_neutral: bool
    geometry: SlotGeometry | None
    use_cells: np.ndarray
    use_window: np.ndarray
    cap_phase: np.ndarray
    cap_window: np.ndarray
    floor_a: float = 0.0
    case_names: tuple[str, ...] = ("connected",)
    others: tuple[Problem, ...] = ()
    units: tuple[Unit, ...] = ()
    symmetric: bool = True
    wired_mask: np.ndarray | None = None

    @cached_property
    def wired(self) -> np.ndarray:
        """Bool per free circuit: a wired unit, whose options are orders of phases [-]."""
        if self.wired_mask is not None:
            return self.wired_mask
        if not self.units:
            return np.zeros(self.n_free, dtype=bool)
        return np.array([u.wired for u in self.units], dtype=bool)

    def members(self, i: int) -> tuple[int, ...]:
        """Schedule indices of the breakers free circuit ``i`` stands for, in pole order."""
        return self.units[i].members if self.units else (int(self.free[i]),)

    def cell_option(self, i: int, phase: int) -> int | None:
        """Option a 1-pole free circuit ``i`` takes in a slot on ``phase`` (None: not offered)."""
        for o in self.options_of(i):
            if self.phases[o] == (phase,):
                return o
        return None

    def window_option(self, i: int, w: Window) -> int | None:
        """Option free circuit ``i`` takes in window ``w``; None when it cannot go there.

        A plain breaker takes the option of the window's kind; a wired unit
        the option whose order of phases is the window's (none on a panel
        whose other column reads the phases the other way round).
        """
        if w.poles != int(self.poles[i]):
            return None
        if not self.wired[i]:
            return int(self.starts[i]) + w.kind
        for o in self.options_of(i):
            if self.phases[o] == w.order:
                return o
        return None

    @property
    def n_cases(self) -> int:
        """Number of cases ``S`` (1 without scenarios) [-]."""
        return 1 + len(self.others)

    def views(self) -> tuple[Problem, ...]:
        """The problem in each case, in :attr:`case_names` order (each with no others)."""
        if not self.others:
            return (self,)
        return (self._own, *self.others)

    @cached_property
    def _own(self) -> Problem:
        return replace(self, others=(), case_names=self.case_names[:1])

    @property
    def worst_floor_a(self) -> float:
        """The largest case floor: no plan's worst-case largest phase RMS is below it [A]."""
        return max(v.floor_a for v in self.views())

    @cached_property
    def stacked(self) -> Stacked:
        """The currents of every case with a case axis (:class:`tri.rebalance.cases.Stacked`)."""
        from tri.rebalance.cases import stack

        return stack(self.views())

    @property
    def slots(self) -> bool:
        """True on a two-column panel (slot geometry applies)."""
        return self.geometry is not None

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

    def option_changes(self, assign: np.ndarray) -> int:
        """Placed free circuits whose option differs from now [-].

        Never more than the relocations of any realisation of the plan
        (a breaker on other phases has left its slot); equal on a rail board.
        """
        return int(np.sum(self.movable & (np.asarray(assign) != self.current)))


def _capacity(phases, geo: SlotGeometry | None):
    """Slots per phase and capacity type of each option, and what the panel offers."""
    n_opt = len(phases)
    use_cells = np.zeros((n_opt, 3), dtype=int)
    use_window = np.zeros((n_opt, WINDOW_TYPES), dtype=int)
    for o, ph in enumerate(phases):
        for p in ph:
            use_cells[o, p] += 1
        if len(ph) > 1 and geo is not None:
            use_window[o, 3 if len(ph) == 3 else pair_index(ph)] = 1
    if geo is None:
        return (
            use_cells,
            use_window,
            np.full(3, _UNLIMITED, dtype=int),
            np.full(WINDOW_TYPES, _UNLIMITED, dtype=int),
        )
    return use_cells, use_window, geo.open_per_phase.copy(), disjoint_window_counts(geo)


def build_problem(
    schedule: Schedule,
    free: Sequence[int],
    scenarios: bool = True,
    case_names: tuple[str, ...] | None = None,
) -> Problem:
    """Arrays for the rebalancer with the circuits ``free`` open to choice.

    Parameters
    ----------
    schedule : Schedule
        The panel.
    free : sequence of int
        Schedule indices of the circuits whose position may be chosen
        (placed: relocating is a move; unplaced: a placement). They are
        gathered into units (:func:`tri.rebalance.units.free_units`): a
        shared-neutral group is one free circuit of the problem.
    scenarios : bool
        Add the problem in every scenario of the schedule's ``use`` factors
        (module notes, Cases); False: the connected load alone.
    case_names : tuple of str, optional
        The scenarios to judge, in order (a building's); default the
        schedule's own.

    Returns
    -------
    Problem
    """
    circuits = schedule.circuits
    units, _ = free_units(schedule, free)
    owner: list[int] = []  # free unit (problem index) of each option
    kind: list[int] = []
    phases: list[tuple[int, ...]] = []
    starts: list[int] = [0]
    current: list[int] = []
    for fi, unit in enumerate(units):
        opts, now = unit_options(schedule, unit)
        current.append(-1 if now < 0 else len(owner) + now)
        for k, ph in enumerate(opts):
            owner.append(fi)
            kind.append(k)
            phases.append(ph)
        starts.append(len(owner))
    owner_a = np.array(owner, dtype=int)
    engine_args = (schedule, units, phases, owner_a)
    base, nbase, contrib, ncontrib = engine_currents(*engine_args)
    geo = slot_geometry(schedule, [u.members for u in units])
    use_cells, use_window, cap_phase, cap_window = _capacity(phases, geo)
    problem = Problem(
        schedule=schedule,
        free=np.array([u.lead for u in units], dtype=int),
        movable=np.array([circuits[u.lead].is_placed for u in units], dtype=bool),
        poles=np.array([u.poles for u in units], dtype=int),
        starts=np.array(starts, dtype=int),
        owner=owner_a,
        kind=np.array(kind, dtype=int),
        phases=tuple(phases),
        current=np.array(current, dtype=int),
        orders=np.concatenate([[1], np.asarray(circuit_arrays(schedule).orders, dtype=int)]),
        contrib=contrib,
        ncontrib=ncontrib,
        base=base,
        nbase=nbase,
        has_neutral=schedule.system.has_neutral,
        geometry=geo,
        use_cells=use_cells,
        use_window=use_window,
        cap_phase=cap_phase,
        cap_window=cap_window,
        units=tuple(units),
        symmetric=schedule.panel.effective_high_leg is None,
    )
    problem = with_floor(problem)
    if not scenarios:
        return problem
    from tri.rebalance.cases import with_cases

    return with_cases(problem, schedule, lambda f: engine_currents(*engine_args, f), case_names)


def with_floor(problem: Problem) -> Problem:
    """The problem with its floor ``F`` (module notes); 0 on a high-leg delta (High leg)."""
    from tri.rebalance.plan_currents import floor_of, spectra

    if not problem.symmetric:
        return replace(problem, floor_a=0.0)

    v, _ = spectra(problem, problem.current_assignment())
    return replace(problem, floor_a=floor_of(v, problem.orders))
