"""The least ``||x_i + y_j||²`` over every pair of two point sets, exactly, without every pair.

Meeting in the middle (:mod:`tri.rebalance.harmonic_floor`) turns a
minimum over every choice of options into a minimum over pairs of two
lists of half-sums. With ``3^10`` sums per list the pairs are too many to
try one by one, but only those closer than an achieved value can matter,
and few pairs are that close.

Lemma (a lower bound in a few coordinates)
------------------------------------------
Let the rows of ``E`` (``k × D``) be orthonormal, ``R = I - EᵀE`` the
projection onto the rest. For every ``x`` and ``y``,
``||x + y||² ≥ ||E·x - (-E·y)||² + (||R·x|| - ||R·y||)²``.

*Proof.* ``E·(x + y)`` and ``R·(x + y)`` are orthogonal parts of
``x + y``, so ``||x + y||² = ||E·(x + y)||² + ||R·x + R·y||²``, and
``||R·x + R·y|| ≥ | ||R·x|| - ||R·y|| |`` (triangle inequality). ∎

So with the points ``x̂ = (-E·x, ||R·x||)`` and ``ŷ = (E·y, ||R·y||)`` in
``k + 1`` coordinates, every pair with ``||x + y||² ≤ c`` has
``||x̂ - ŷ|| ≤ sqrt(c)``: a fixed-radius search of a k-d tree
(:class:`scipy.spatial.cKDTree`) finds every such pair, and each is then
checked exactly. ``E`` holds the principal directions of the two sets
(where they spread most), so the radius excludes most pairs. The ceiling
``c`` starts at a value known to be reached (or at least as large as the
answer) and falls to the smallest pair found, chunk by chunk; a relative
slack on the radius covers round-off.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

#: Principal coordinates the tree is built on (the residual norm is one more) [-].
KEPT = 6
#: Points of the smaller set looked up per chunk [-].
CHUNK = 4096
#: Most candidate pairs checked before the search gives up [-].
CANDIDATE_LIMIT = 4_000_000
#: Rows of each set the principal directions are taken from [-].
SAMPLE = 4096
#: Relative slack on the radius for round-off [-].
SLACK = 1e-9


@dataclass(frozen=True)
class Nearest:
    """The least squared norm of a pair sum, or the ceiling when no pair is below it.

    Attributes
    ----------
    value : float
        ``min(ceiling, min ||x_i + y_j||²)`` [units of the points, squared].
    i, j : int
        The pair reaching it; -1 when no pair is below the ceiling.
    """

    value: float
    i: int
    j: int


def _principal(x: np.ndarray, y: np.ndarray, kept: int) -> np.ndarray:
    """Orthonormal rows along which the two sets spread most (``kept × D``).

    From at most :data:`SAMPLE` rows of each set: any orthonormal rows keep
    the search exact, these only make it fast.
    """
    moment = np.zeros((x.shape[1], x.shape[1]))
    for p in (x, y):
        c = p[:: max(1, p.shape[0] // SAMPLE)]
        c = c - c.mean(axis=0)
        moment += np.einsum("ij,ik->jk", c, c)  # not BLAS: tall products stall its threads
    _, vecs = np.linalg.eigh(moment)
    return vecs[:, ::-1][:, : min(kept, x.shape[1])].T


def _lifted(p: np.ndarray, e: np.ndarray, sign: float) -> np.ndarray:
    """``(sign·E·p, ||R·p||)`` for every row of ``p`` (module notes)."""
    c = np.einsum("ij,kj->ik", p, e)
    rest = np.linalg.norm(p - np.einsum("ik,kj->ij", c, e), axis=1)
    return np.hstack([sign * c, rest[:, None]])


def least_pair(
    x: np.ndarray,
    y: np.ndarray,
    ceiling: float,
    *,
    kept: int = KEPT,
    stop: Callable[[], bool] | None = None,
) -> Nearest | None:
    """``min(ceiling, min_ij ||x_i + y_j||²)`` and where it is reached (module notes).

    Parameters
    ----------
    x, y : float ndarray, shapes (n, D) and (m, D)
        The two sets.
    ceiling : float
        Pairs at or above this are not looked for (a value reached, or any
        value at least the answer, keeps the result exact) [squared units].
    kept : int
        Principal coordinates of the tree.
    stop : callable, optional
        Checked between chunks; when it returns True the answer is None.

    Returns
    -------
    Nearest or None
        None when stopped, or when more than :data:`CANDIDATE_LIMIT` pairs
        would have to be checked.
    """
    from scipy.spatial import cKDTree  # only when a search runs

    e = _principal(x, y, kept)
    flip = x.shape[0] < y.shape[0]  # the tree holds the larger set
    big, small = (x, y) if not flip else (y, x)
    tree = cKDTree(_lifted(big, e, -1.0 if not flip else 1.0))
    queries = _lifted(small, e, 1.0 if not flip else -1.0)
    scale = float(np.einsum("ij,ij->i", x, x).max() + np.einsum("ij,ij->i", y, y).max())
    best, at, checked = ceiling, (-1, -1), 0
    for s in range(0, small.shape[0], CHUNK):
        if stop is not None and stop():
            return None
        radius = math.sqrt(max(best, 0.0) + SLACK * scale) * (1 + SLACK)
        lists = tree.query_ball_point(queries[s : s + CHUNK], radius, return_sorted=False)
        counts = np.fromiter((len(item) for item in lists), dtype=int, count=len(lists))
        if not counts.sum():
            continue
        checked += int(counts.sum())
        if checked > CANDIDATE_LIMIT:
            return None
        k_big = np.concatenate([np.asarray(item, dtype=int) for item in lists if item])
        k_small = s + np.repeat(np.arange(len(lists)), counts)
        z = big[k_big] + small[k_small]
        q = np.einsum("ij,ij->i", z, z)
        k = int(np.argmin(q))
        if q[k] < best:
            best = float(q[k])
            at = (int(k_big[k]), int(k_small[k])) if not flip else (int(k_small[k]), int(k_big[k]))
    return Nearest(best, at[0], at[1])
