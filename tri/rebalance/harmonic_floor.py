"""A floor above ``F`` from the harmonics that the few non-linear breakers cannot cancel.

The floor ``F`` (:mod:`tri.rebalance.problem`) is what a perfect partition
would reach: every phase's rotated spectrum equal to the mean ``J``. The
fundamental can be shared out finely by the many linear breakers, but the
harmonic orders are carried by the few non-linear ones only, and with a
dozen of them the harmonic part of the phases cannot all be made equal:
what is left over adds to the phase RMS currents, to second order, and the
model's relaxation (which splits breakers fractionally) never sees it.

Sizes (the frame of :mod:`tri.rebalance.sequence_frame`)
--------------------------------------------------------
``w_p`` is phase p's rotated spectrum as a real vector (real parts, then
imaginary parts, one coordinate pair per harmonic order), ``J`` the mean
of the three (the same for every plan), ``F = ||J||``, ``U = J/F``,
``a_p = <w_p, U>`` and ``R_p = ||w_p||`` the phase RMS current (the
rotation keeps norms). ``Σ_p a_p = 3·<J, U> = 3F`` for every plan.

Let ``E`` be the coordinates of the orders other than 1, ``U_E`` the part of
``U`` in them, and ``P`` the orthogonal projection onto
``S = {v in E : <v, U_E> = 0}`` (all of ``E`` when ``U_E = 0``). ``S`` is
orthogonal to ``U``, so ``P·U = 0``; and a breaker with no harmonic current
has ``P`` of its contribution zero, whichever option it takes. Write
``q_p = ||P·w_p||``, which depends only on where the non-linear breakers are.

Lemma (the harmonic floor)
--------------------------
Let ``Q* ≤ min Σ_p q_p²`` over every choice of options of the non-linear
free breakers (budget, slots and neutral limit ignored: a relaxation).
Every plan's largest phase RMS current ``v`` satisfies
``v ≥ (F + sqrt(F² + 2·Q*/3)) / 2``.

*Proof.* ``P`` is an orthogonal projection onto a subspace orthogonal to
``U``, so ``R_p² = ||w_p||² ≥ <w_p, U>² + ||P·w_p||² = a_p² + q_p²``
(Pythagoras on ``U``, ``S`` and the rest). With ``v = max_p R_p``:
``q_p ≤ v`` and ``a_p ≤ sqrt(v² - q_p²) ≤ v - q_p²/(2v)``
(``sqrt(1 - x) ≤ 1 - x/2`` for ``0 ≤ x ≤ 1``). Summing over the phases,
``3F = Σ a_p ≤ 3v - Σ_p q_p²/(2v)``, so ``6v² - 6F·v - Q* ≥ 0``, whose
positive root is the bound. ∎

Computing ``Q*``
----------------
``P·w_p`` is the fixed circuits' part plus one vector per non-linear free
breaker (by its option), so the stacked vector ``(P·w_A, P·w_B, P·w_C)`` is
a sum of one vector per breaker, and ``Σ_p q_p²`` its squared norm. Split
the breakers into two groups, list every sum of each group (meeting in the
middle: ``3^(m/2)`` each for ``m`` breakers), and
``Q* = min ||x + y||² = min (||x||² + ||y||² + 2·x·y)`` over all pairs, by
matrix products in chunks; a relative slack covers round-off. When the
pairs would be more than :data:`PAIR_LIMIT`, only the pairs closer than a
value some choice reaches are looked for (:func:`tri.rebalance.nearest_sums.least_pair`,
a k-d tree on principal coordinates, exact): the value comes from a
descent over the harmonic breakers' options (:func:`_descent`), so the
minimum found, or that value when no pair is below it, is ``Q*`` itself.
When either list would be longer than :data:`SIDE_LIMIT` (about 20
harmonic breakers), or the close pairs too many, the floor is not computed
(None). With many non-linear breakers ``Q*`` tends to zero and the floor
to ``F``: it matters on small panels.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from tri.rebalance.nearest_sums import least_pair
from tri.rebalance.problem import Problem
from tri.rebalance.sequence_frame import rotated_of

#: Most pairs of half-sums compared (time and memory of the floor) [-].
PAIR_LIMIT = 20_000_000
#: Most half-sums in one list of the pruned search (:mod:`tri.rebalance.nearest_sums`) [-].
SIDE_LIMIT = 60_000
#: Random starts of the descent that gives the pruned search its ceiling [-].
RESTARTS = 40
#: Entries of one chunk of the pair matrix [-].
CHUNK = 2_000_000
#: Relative slack on ``Q*`` for round-off [-].
SLACK = 1e-9


def _projected(pr: Problem) -> tuple[np.ndarray, list[np.ndarray], list[int]]:
    """The fixed part of ``(P·w_A, P·w_B, P·w_C)``, each harmonic breaker's options.

    Returns the reference plan's stacked vector (3D,), one (options, 3D)
    array of changes per free breaker whose options differ in ``P·w``, and
    those breakers (free-circuit indices).
    """
    rs = rotated_of(pr)
    k = rs.w.shape[1]
    h = k // 2
    harmonic = np.ones(k, dtype=bool)
    harmonic[[0, h]] = False  # order 1 (orders[0] == 1): real and imaginary parts
    u = rs.unit[harmonic]
    norm = float(np.linalg.norm(u))

    def project(v: np.ndarray) -> np.ndarray:
        v = v[..., harmonic]
        if norm > 0:
            v = v - (v @ (u / norm))[..., None] * (u / norm)
        return v.reshape(*v.shape[:-2], -1)

    base = project(rs.w)
    change = project(rs.dw)
    scale = max(1.0, float(np.abs(rs.w).max()))
    items, which = [], []
    for i in range(pr.n_free):
        d = change[pr.starts[i] : pr.starts[i + 1]]
        if d.size and d.shape[0] > 1 and float(np.abs(d - d[0]).max()) > 1e-12 * scale:
            items.append(d)
            which.append(i)
    return base, items, which


def _sums(items: list[np.ndarray], width: int) -> np.ndarray:
    """Every sum of one row per item (n, width)."""
    out = np.zeros((1, width))
    for d in items:
        out = (out[:, None, :] + d[None, :, :]).reshape(-1, width)
    return out


@dataclass(frozen=True)
class Leftover:
    """``Q*`` and where it is reached (module notes).

    Attributes
    ----------
    q_min : float
        A lower bound on ``Σ_p q_p²`` over every plan [A²].
    circuits : int ndarray
        The free breakers with harmonic currents.
    options : int ndarray
        The option of each at the minimum (a start for the search).
    """

    q_min: float
    circuits: np.ndarray
    options: np.ndarray


def _split(items: list[int], sizes: list[int]) -> tuple[list[int], list[int]]:
    """Two groups of items with products of option counts as equal as the counts allow."""
    left: list[int] = []
    right: list[int] = []
    for i in sorted(items, key=lambda j: -sizes[j]):
        side = math.prod(sizes[j] for j in left) <= math.prod(sizes[j] for j in right)
        (left if side else right).append(i)
    return left, right


def _descent(base: np.ndarray, items: list[np.ndarray], restarts: int) -> tuple[float, np.ndarray]:
    """A choice of one row per item with a small ``||base + Σ rows||²``, and that value.

    Best single changes from random starts (seeded: the same every call);
    the value is reached, so it is at least ``Q*``.
    """
    rng = np.random.default_rng(0)
    best, best_pick = math.inf, np.zeros(len(items), dtype=int)
    for _ in range(restarts):
        pick = np.array([rng.integers(len(d)) for d in items])
        z = base + sum((d[k] for d, k in zip(items, pick, strict=True)), np.zeros_like(base))
        while True:
            gain, move = 0.0, None
            for j, d in enumerate(items):
                trial = z[None, :] - d[pick[j]] + d
                q = np.einsum("ij,ij->i", trial, trial)
                k = int(np.argmin(q))
                if float(z @ z) - q[k] > gain + 1e-12 * max(1.0, float(z @ z)):
                    gain, move = float(z @ z) - q[k], (j, k)
            if move is None:
                break
            j, k = move
            z = z - items[j][pick[j]] + items[j][k]
            pick[j] = k
        if float(z @ z) < best:
            best, best_pick = float(z @ z), pick.copy()
    return best, best_pick


def _dense_minimum(x: np.ndarray, y: np.ndarray) -> tuple[float, tuple[int, int], float]:
    """The least ``||x_i + y_j||²`` over every pair, by matrix products in chunks.

    Returns the least value, its pair and the round-off scale (largest squared norms).
    """
    xx, yy = np.einsum("ij,ij->i", x, x), np.einsum("ij,ij->i", y, y)
    step = max(1, CHUNK // y.shape[0])
    best, at = math.inf, (0, 0)
    for s in range(0, x.shape[0], step):
        q = xx[s : s + step, None] + yy[None, :] + 2.0 * (x[s : s + step] @ y.T)
        k = int(np.argmin(q))
        if q.flat[k] < best:
            best, at = float(q.flat[k]), (s + k // q.shape[1], k % q.shape[1])
    return best, at, float(xx.max()) + float(yy.max())


def smallest_leftover(pr: Problem, stop: Callable[[], bool] | None = None) -> Leftover | None:
    """``Q*``: the least ``Σ_p q_p²`` over the harmonic breakers' options [A²] (module notes).

    None when the lists would exceed :data:`SIDE_LIMIT` with more than
    :data:`PAIR_LIMIT` pairs, when the pruned search gives up, or when
    ``stop`` fires.
    """
    base, items, which = _projected(pr)
    sizes = [len(d) for d in items]
    left, right = _split(list(range(len(items))), sizes)
    n_left, n_right = (math.prod(sizes[j] for j in g) for g in (left, right))
    if n_left * n_right > PAIR_LIMIT and max(n_left, n_right) > SIDE_LIMIT:
        return None
    x = _sums([items[j] for j in left], base.size) + base
    y = _sums([items[j] for j in right], base.size)
    picked = np.zeros(len(items), dtype=int)
    if n_left * n_right <= PAIR_LIMIT:
        best, at, scale = _dense_minimum(x, y)
    else:
        ceiling, picked = _descent(base, items, RESTARTS)
        near = least_pair(x, y, ceiling, stop=stop)
        if near is None:
            return None
        best, at = near.value, (near.i, near.j)
        scale = float(np.einsum("ij,ij->i", x, x).max() + np.einsum("ij,ij->i", y, y).max())
    if at[0] >= 0:
        for group, index in ((left, at[0]), (right, at[1])):
            if group:
                picked[group] = np.unravel_index(index, [sizes[j] for j in group])
    options = np.array([pr.starts[which[j]] + picked[j] for j in range(len(items))], dtype=int)
    q_min = max(0.0, best - SLACK * scale)
    return Leftover(q_min, np.array(which, dtype=int), options)


def floor_and_start(
    pr: Problem, stop: Callable[[], bool] | None = None
) -> tuple[float, Leftover] | None:
    """The lemma's bound on every plan's largest phase RMS current [A], and the own case's ``Q*``.

    Each case's bound holds for that case's value, so the largest of them
    bounds the worst case's. None when some case's ``Q*`` is too costly.
    """
    best, own = 0.0, None
    for view in pr.views():
        left = smallest_leftover(view, stop)
        if left is None:
            return None
        own = left if own is None else own
        f, q = view.floor_a, left.q_min
        best = max(best, 0.5 * (f + math.sqrt(f * f + 2.0 * q / 3.0)))
    assert own is not None
    return best, own


def harmonic_floor(pr: Problem, stop: Callable[[], bool] | None = None) -> float | None:
    """The lemma's bound on every plan's largest phase RMS current [A] (:func:`floor_and_start`)."""
    got = floor_and_start(pr, stop)
    return None if got is None else got[0]
