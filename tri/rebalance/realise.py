"""From options to slots: the arrangement with the fewest relocations, and where each breaker goes.

A plan's options say which phases each breaker takes; on a two-column
panel the electrician also needs the slots. :func:`realise` finds, for
given options, an arrangement with the fewest relocations there are
(exactly: the slot block of :mod:`tri.rebalance.slot_model` with the
options fixed, minimising relocations), and :func:`arrange` turns a choice
of stayers and windows (from that program or from a model's solution)
into first slots.

Within what the count allows, positions are chosen near where each breaker
was: an assignment problem [1] per window pool and per phase, cost 0 for a
breaker's own slot, 1 for any other, plus a small preference for slots few
rows away in the same column (too small ever to trade a relocation;
:func:`tri.schedule.slots.slot_distance`). A new circuit prefers low slot
numbers. A position beyond a breaker's reach (``[panel] max_row_shift``,
:meth:`~tri.rebalance.geometry.SlotGeometry.allowed`) costs
:data:`BEYOND_REACH`, more than every other cost together, so an
assignment uses one only when no other exists, and is then refused.

Before any program runs, a quick fill tries to keep every breaker whose
option is unchanged in its slot: when it succeeds the relocations equal the
option changes, which no arrangement can beat (a breaker on other phases
has left its slot).

References
----------
1. H. W. Kuhn, "The Hungarian method for the assignment problem", *Naval
   Res. Logist. Q.* 2 (1955) 83-97 (``scipy.optimize.linear_sum_assignment``).
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass, replace

import numpy as np

from tri.rebalance.electrical import add_options
from tri.rebalance.geometry import SlotGeometry, Window
from tri.rebalance.model import Model
from tri.rebalance.problem import Problem
from tri.rebalance.slot_model import add_slots
from tri.schedule.slots import occupied_slots, slot_distance

#: Time limit of the realisation program [s] (it is small: slots only).
REALISE_TIME_S = 10.0
#: Cost of a position beyond a breaker's reach in the assignment problems [-].
BEYOND_REACH = 1e6


@dataclass(frozen=True)
class Arrangement:
    """Where every free breaker goes.

    Attributes
    ----------
    first_slot : dict
        Schedule index -> first slot, for every free circuit (empty on a
        rail board).
    relocations : int
        Placed breakers whose first slot changes (on a rail board: whose
        phases change) [-].
    fewest : bool
        Proven the fewest relocations these options allow (by the quick
        fill, or by the realisation program solved to optimality).
    """

    first_slot: dict[int, int]
    relocations: int
    fewest: bool = False


def _near(b_home: int | None, slot: int, scale: float) -> float:
    return scale * (slot if b_home is None else slot_distance(slot, b_home))


def _assign(costs: np.ndarray) -> np.ndarray:
    from scipy.optimize import linear_sum_assignment

    rows, cols = linear_sum_assignment(np.minimum(costs, 2 * BEYOND_REACH))
    out = np.empty(costs.shape[0], dtype=int)
    out[rows] = cols
    return out


def arrange(
    pr: Problem, assign: np.ndarray, stays: np.ndarray, windows: list[Window]
) -> Arrangement | None:
    """First slots from options, stayers and the windows used (module notes).

    Parameters
    ----------
    pr : Problem
        A two-column panel.
    assign : int ndarray, shape (F,)
        Option of each free circuit.
    stays : bool ndarray, shape (F,)
        Placed breakers that stay in their slots (must keep their option).
    windows : list of Window
        Windows for the relocated or placed multi-pole breakers (at least
        one for each); they are matched in one assignment problem, a
        breaker only to a window that gives it its option
        (:meth:`~tri.rebalance.problem.Problem.window_option`) within its reach.

    Returns
    -------
    Arrangement or None
        None when the choice does not fit (a slot used twice, too few slots).
    """
    geo = pr.geometry
    assert geo is not None
    scale = 1.0 / (4.0 * (geo.spaces + 4) * max(1, pr.n_free))
    first: dict[int, int] = {}
    taken: set[int] = set()
    movers: list[int] = []
    singles: dict[int, list[int]] = defaultdict(list)
    for b in range(pr.n_free):
        o = int(assign[b])
        if stays[b]:
            if o != pr.current[b]:
                return None
            home = geo.homes[b]
            assert home is not None
            first[b] = home[0]
            taken.update(home)
        elif pr.poles[b] > 1:
            movers.append(b)
        else:
            singles[pr.phases[o][0]].append(b)
    if movers:
        if len(windows) < len(movers):
            return None
        cost = np.array(
            [[_window_cost(pr, b, int(assign[b]), w, scale) for w in windows] for b in movers]
        )
        for r, (b, k) in enumerate(zip(movers, _assign(cost), strict=True)):
            if cost[r, k] >= BEYOND_REACH:
                return None  # no window of the right option within reach for it
            first[b] = windows[k].first
            taken.update(windows[k].cells)
    if len(taken) != sum(len(occupied_slots(first[b], int(pr.poles[b]))) for b in first):
        return None
    left = [int(c) for c in geo.open_cells if int(c) not in taken]
    for p, bs in singles.items():
        cells = [c for c in left if geo.phase_of(c) == p]
        if len(cells) < len(bs):
            return None
        cost = np.array([[_cell_cost(geo, b, c, scale) for c in cells] for b in bs])
        for b, k in zip(bs, _assign(cost), strict=True):
            if not geo.allowed(b, cells[k]):
                return None
            first[b] = cells[k]
    return _arrangement(pr, first)


def _window_cost(pr: Problem, b: int, o: int, w: Window, scale: float) -> float:
    """0 for its own slot, 1 for another, :data:`BEYOND_REACH` where it cannot take option o."""
    geo = pr.geometry
    assert geo is not None
    home = geo.home_first(b)
    if pr.window_option(b, w) != o or not geo.allowed(b, w.first):
        return BEYOND_REACH
    return (0.0 if home == w.first else 1.0) + _near(home, w.first, scale)


def _cell_cost(geo: SlotGeometry, b: int, c: int, scale: float) -> float:
    home = geo.home_first(b)
    if not geo.allowed(b, c):
        return BEYOND_REACH
    return (0.0 if home == c else 1.0) + _near(home, c, scale)


def _arrangement(pr: Problem, first: dict[int, int]) -> Arrangement:
    geo = pr.geometry
    assert geo is not None
    out = {int(pr.free[b]): s for b, s in first.items()}
    moved = sum(1 for b, s in first.items() if pr.movable[b] and geo.home_first(b) != s)
    return Arrangement(out, moved, fewest=False)


def _quick_fill(pr: Problem, assign: np.ndarray) -> Arrangement | None:
    """Keep every breaker whose option is unchanged; place the others greedily."""
    geo = pr.geometry
    assert geo is not None
    stays = pr.movable & (np.asarray(assign) == pr.current)
    taken = {c for b in np.flatnonzero(stays) for c in geo.homes[b] or ()}
    open_set = set(geo.open_cells.tolist()) - taken
    chosen: list[Window] = []
    movers = [b for b in range(pr.n_free) if not stays[b] and pr.poles[b] > 1]
    for b in sorted(movers, key=lambda b: -pr.poles[b]):
        home = geo.home_first(b)
        fits = [
            w
            for w in geo.windows
            if pr.window_option(b, w) == int(assign[b])
            and open_set.issuperset(w.cells)
            and geo.allowed(b, w.first)
        ]
        if not fits:
            return None
        w = min(fits, key=lambda w: _near(home, w.first, 1.0))
        chosen.append(w)
        open_set.difference_update(w.cells)
    return arrange(pr, assign, stays, chosen)


def realise(
    pr: Problem, assign: np.ndarray, time_limit: float = REALISE_TIME_S
) -> tuple[Arrangement | None, bool]:
    """An arrangement of the options ``assign`` with the fewest relocations (module notes).

    Parameters
    ----------
    pr : Problem
    assign : int ndarray, shape (F,)
        Option of each free circuit.
    time_limit : float
        Budget of the realisation program [s].

    Returns
    -------
    arrangement : Arrangement or None
        None when no arrangement of these options was found.
    proven : bool
        The answer is proven: the arrangement has the fewest relocations
        there are, or (None) no arrangement of these options fits the panel.
    """
    assign = np.asarray(assign, dtype=int)
    if pr.geometry is None:
        return Arrangement({}, pr.option_changes(assign), fewest=True), True
    quick = _quick_fill(pr, assign)
    if quick is not None and quick.relocations <= pr.option_changes(assign):
        return replace(quick, fewest=True), True  # no arrangement has fewer
    m = Model()
    el = add_options(m, pr)
    sc = add_slots(m, pr, el)
    x = np.zeros(pr.n_options)
    x[assign] = 1.0
    m.fix(np.arange(el.x, el.x + pr.n_options), x)
    cost = np.zeros(m.n)
    cost[sc.stay] -= 1.0
    sol = m.solve(cost, min(REALISE_TIME_S, max(0.05, time_limit)), gap=0.0)
    if sol.x is None:
        return None, sol.status == "infeasible"
    stays = np.zeros(pr.n_free, dtype=bool)
    stays[sc.placed] = sc.stays(sol.x)
    arr = arrange(pr, assign, stays, sc.used_windows(sol.x))
    if arr is None or sol.status != "optimal":
        return arr, False
    return replace(arr, fewest=True), True
