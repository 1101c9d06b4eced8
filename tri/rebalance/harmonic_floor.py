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
pairs would be more than :data:`PAIR_LIMIT` the floor is not computed
(None). With many non-linear breakers ``Q*`` tends to zero and the floor
to ``F``: it matters on small panels.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tri.rebalance.problem import Problem
from tri.rebalance.sequence_frame import rotated_of

#: Most pairs of half-sums compared (time and memory of the floor) [-].
PAIR_LIMIT = 20_000_000
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


def smallest_leftover(pr: Problem) -> Leftover | None:
    """``Q*``: the least ``Σ_p q_p²`` over the harmonic breakers' options [A²] (module notes).

    None when the pairs would exceed :data:`PAIR_LIMIT`.
    """
    base, items, which = _projected(pr)
    sizes = [len(d) for d in items]
    left, right = _split(list(range(len(items))), sizes)
    if math.prod(sizes[j] for j in left) * math.prod(sizes[j] for j in right) > PAIR_LIMIT:
        return None
    x = _sums([items[j] for j in left], base.size) + base
    y = _sums([items[j] for j in right], base.size)
    xx, yy = np.einsum("ij,ij->i", x, x), np.einsum("ij,ij->i", y, y)
    step = max(1, CHUNK // y.shape[0])
    best, at = math.inf, (0, 0)
    for s in range(0, x.shape[0], step):
        q = xx[s : s + step, None] + yy[None, :] + 2.0 * (x[s : s + step] @ y.T)
        k = int(np.argmin(q))
        if q.flat[k] < best:
            best, at = float(q.flat[k]), (s + k // q.shape[1], k % q.shape[1])
    picked = np.zeros(len(items), dtype=int)
    for group, index in ((left, at[0]), (right, at[1])):
        if group:
            picked[group] = np.unravel_index(index, [sizes[j] for j in group])
    options = np.array([pr.starts[which[j]] + picked[j] for j in range(len(items))], dtype=int)
    q_min = max(0.0, best - SLACK * (float(xx.max()) + float(yy.max())))
    return Leftover(q_min, np.array(which, dtype=int), options)


def harmonic_floor(pr: Problem) -> float | None:
    """The lemma's bound on every plan's largest phase RMS current [A], worst case first.

    Each case's bound holds for that case's value, so the largest of them
    bounds the worst case's. None when some case's ``Q*`` is too costly.
    """
    best = 0.0
    for view in pr.views():
        left = smallest_leftover(view)
        if left is None:
            return None
        f, q = view.floor_a, left.q_min
        best = max(best, 0.5 * (f + math.sqrt(f * f + 2.0 * q / 3.0)))
    return best
