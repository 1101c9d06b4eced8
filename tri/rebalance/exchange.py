"""Exchanges that keep the move count: moved breakers sent home, as many others moved instead.

With a relocation budget, the local search of :mod:`tri.rebalance.heuristic`
soon has every move spent; then a single change can only shuffle the
breakers already moved, and a swap needs two breakers on each other's
phases. Which *few* breakers move decides the balance (number
partitioning with a count), so this search tries the exchanges that keep
the count: one moved breaker back home and one other breaker moved, or two
and two, every such pair at once (vectorised over the candidates, scored
with the exact currents, capacity checked), the best one taken, then the
descent again. Kicks restart it elsewhere (iterated local search), until a
share of the time is used or :data:`PATIENCE` kicks in a row found nothing
better (a small panel is settled in a few milliseconds, not the whole
share). It finds plans; it proves nothing.
"""

from __future__ import annotations

import itertools

import numpy as np

from tri.rebalance.control import Control
from tri.rebalance.goal import Goal, measures
from tri.rebalance.heuristic import LocalSearch
from tri.rebalance.problem import Problem

#: Most candidate plans scored in one exchange step (time of a step) [-].
STEP_LIMIT = 1_500_000
#: Candidate plans scored per array (memory) [-].
CHUNK = 60_000
#: Kicks in a row without a better plan before the search gives up [-].
PATIENCE = 50

Change = tuple[int, int]


def _changes(ls: LocalSearch) -> tuple[np.ndarray, np.ndarray]:
    """Every change of a placed breaker not moved now: circuits and their new options."""
    pr = ls.pr
    o = np.arange(pr.n_options)
    i = pr.owner
    keep = pr.movable[i] & ~ls.moved[i] & (ls.assign[i] >= 0) & (o != ls.assign[i])
    return i[keep], o[keep]


def _pairs(i: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Index pairs of changes on two different circuits."""
    a, b = np.triu_indices(i.size, 1)
    ok = i[a] != i[b]
    return a[ok], b[ok]


def _best_of(
    ls: LocalSearch, home: tuple[int, ...], add: list[np.ndarray], i: np.ndarray, o: np.ndarray
) -> tuple[float, float, list[Change]] | None:
    """The best plan with ``home`` sent home and one change per ``add`` column (capacity kept)."""
    pr = ls.pr
    back = [(m, int(pr.current[m])) for m in home]
    v, n = ls.v.copy(), ls.n.copy()
    cells, win = ls.cells.copy(), ls.win.copy()
    for m, h in back:
        old = int(ls.assign[m])
        v += ls.contrib[h] - ls.contrib[old]
        n += ls.ncontrib[h] - ls.ncontrib[old]
        cells += pr.use_cells[h] - pr.use_cells[old]
        win += pr.use_window[h] - pr.use_window[old]
    best = None
    for s in range(0, add[0].size, CHUNK):
        cols = [c[s : s + CHUNK] for c in add]
        cv, cn = v, n
        cc, cw = cells, win
        for c in cols:
            now = ls.assign[i[c]]
            cv = cv + (ls.contrib[o[c]] - ls.contrib[now])
            cn = cn + (ls.ncontrib[o[c]] - ls.ncontrib[now])
            cc = cc + (pr.use_cells[o[c]] - pr.use_cells[now])
            cw = cw + (pr.use_window[o[c]] - pr.use_window[now])
        p, sec = measures(pr, ls.goal, cv, cn)
        if pr.slots:
            fits = np.all(cc <= ls.cap_total, axis=-1) & np.all(cw <= pr.cap_window, axis=-1)
            p = np.where(fits, p, np.inf)
        k = int(np.argmin(p))
        if np.isfinite(p[k]) and (best is None or ls._better(float(p[k]), float(sec[k]), best[:2])):
            best = (float(p[k]), float(sec[k]), [(int(i[c[k]]), int(o[c[k]])) for c in cols])
    if best is None:
        return None
    return best[0], best[1], back + best[2]


def exchange_step(ls: LocalSearch, rng: np.random.Generator) -> bool:
    """Apply the best exchange that keeps the move count, if it is better; True if applied."""
    moved = [int(m) for m in np.flatnonzero(ls.moved)]
    if not moved:
        return False
    i, o = _changes(ls)
    if i.size == 0:
        return False
    a, b = _pairs(i)
    tries: list[tuple[tuple[int, ...], list[np.ndarray]]] = [
        ((m,), [np.arange(i.size)]) for m in moved
    ]
    twos = list(itertools.combinations(moved, 2))
    room = max(1, STEP_LIMIT // max(1, a.size))
    if len(twos) > room:  # too many: a random share of them (seeded)
        twos = [twos[j] for j in rng.choice(len(twos), room, replace=False)]
    tries += [(pair, [a, b]) for pair in twos]
    ref = ls.score()
    best = None
    for home, add in tries:
        if ls.control.stop():
            break
        found = _best_of(ls, home, add, i, o)
        if found is not None and (best is None or ls._better(found[0], found[1], best[:2])):
            best = found
    if best is None or not ls._better(best[0], best[1], ref):
        return False
    for c, opt in best[2]:
        ls.set(c, opt)
    return True


def exchange_search(
    pr: Problem, goal: Goal, control: Control, start: np.ndarray, until_s: float, stop_gap: float
) -> np.ndarray:
    """Exchanges, descents and kicks from ``start`` until ``until_s`` elapsed or
    :data:`PATIENCE` kicks bring nothing (module notes).

    Returns the best plan found (options per free circuit), ``start`` if none is better.
    """
    rng = np.random.default_rng(0)
    ls = LocalSearch(pr, goal, control, start, stop_gap)
    best, ref = ls.assign.copy(), ls.score()
    idle = 0

    def out_of_time() -> bool:
        return control.stop() or control.elapsed() > until_s

    while not out_of_time() and not ls.done() and idle < PATIENCE:
        while not out_of_time() and not ls.done() and exchange_step(ls, rng):
            ls.descend()
        best, ref, better = ls.keep_better(best, ref)
        idle = 0 if better else idle + 1
        ls.kick(rng, int(rng.integers(2, 5)))
        ls.descend()
    return best
