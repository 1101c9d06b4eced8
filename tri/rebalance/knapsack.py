"""The knapsack with a count: the best sum of per-circuit gains with at most ``k`` changes.

Every bound of :mod:`tri.rebalance.crossing` comes down to one question:
over the plans in which at most ``k`` placed circuits take another option
(new circuits take any option without counting), what is the largest
``Σ_circuits v(option)`` for given values ``v`` with ``v = 0`` at each
circuit's reference option?

Lemma 1 (sorted by size)
------------------------
The answer is the sum of the ``k`` largest positive per-circuit maxima
``max_o v(o)`` over placed circuits, plus every new circuit's maximum.

*Proof.* The sum is separable: each circuit contributes the value of its
option. A placed circuit that keeps its reference option gives 0, one that
changes gives at most its maximum, and at most ``k`` change; a new circuit
gives at most its maximum and costs nothing. Taking the ``k`` largest
positive maxima attains the bound. ∎

Lemma 2 (one more row, Lagrange)
--------------------------------
For ``f(x) = f0 + Σ df(option)``, ``g(x) = c + Σ d(option)`` and every
``λ ≥ 0``, ``max {f(x) : g(x) ≤ β, at most k changes} ≤ f0 + λ·(β - c) +
best(df - λ·d)``.

*Proof.* Where ``g(x) ≤ β``, ``f(x) ≤ f(x) - λ·(g(x) - β)``, and the
right side, a sum of per-circuit values plus constants, is at most its
best by Lemma 1. ∎
The right side is convex in ``λ`` (a maximum of affine functions); every
``λ`` gives a bound, so a grid search loses tightness, never validity.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.rebalance.problem import Problem

#: Points of the coarse grid of each Lagrangian search (and half as many fine ones) [-].
LAGRANGE_STEPS = 16


@dataclass(frozen=True, eq=False)
class Choices:
    """The other options of each free circuit that has any, and which ones count as changes.

    Attributes
    ----------
    alt : int ndarray, shape (C, A)
        Per circuit with another option, its options other than the
        reference one (padded with the reference option, whose value is 0).
    movable : bool ndarray, shape (C,)
        Placed circuits (a change counts); new circuits change freely.
    """

    alt: np.ndarray
    movable: np.ndarray


def choices_of(pr: Problem) -> Choices:
    """The choices of a problem's free circuits (those with one option never change)."""
    ref = pr.current_assignment()
    counts = np.diff(pr.starts)
    width = max(1, int(counts.max(initial=1)) - 1)
    rows, movable = [], []
    for i in np.flatnonzero(counts > 1):
        others = [o for o in range(pr.starts[i], pr.starts[i + 1]) if o != ref[i]]
        rows.append(others + [int(ref[i])] * (width - len(others)))
        movable.append(bool(pr.movable[i]))
    return Choices(np.array(rows, dtype=int).reshape(-1, width), np.array(movable, dtype=bool))


def best_gain(ch: Choices, values: np.ndarray, k: int) -> np.ndarray:
    """Largest ``Σ_circuits values(option)`` over plans with at most ``k`` changes (Lemma 1).

    Parameters
    ----------
    ch : Choices
    values : float ndarray, shape (..., O)
        A value per option, 0 for every reference option.
    k : int
        Changes of placed circuits [-].

    Returns
    -------
    float ndarray, shape (...)
        The ``k`` largest positive per-circuit maxima of placed circuits, plus
        every new circuit's maximum (a new circuit takes an option without
        counting; its reference option gives 0).
    """
    per = np.zeros(values.shape[:-1] + ch.alt.shape[:1])
    for j in range(ch.alt.shape[1]):  # a column at a time: a reduction over 2 is slow
        np.maximum(per, values[..., ch.alt[:, j]], out=per)
    return _best_of(ch, per, k)


def _best_of(ch: Choices, per: np.ndarray, k: int) -> np.ndarray:
    """Lemma 1 from per-circuit maxima ``per`` (..., C), already at least 0."""
    if ch.movable.all():
        out, mov = 0.0, per
    else:
        out, mov = per[..., ~ch.movable].sum(axis=-1), per[..., ch.movable]
    n = mov.shape[-1]
    kk = min(max(0, int(k)), n)
    if kk == n:
        return out + mov.sum(axis=-1)
    if kk == 0:
        return out + np.zeros(mov.shape[:-1])
    # the k largest: everything but the n - k smallest
    rest = np.partition(mov, n - kk - 1, axis=-1)[..., : n - kk].sum(axis=-1)
    return out + mov.sum(axis=-1) - rest


def max_under_row(
    ch: Choices, f0: np.ndarray, df: np.ndarray, row: tuple[float, np.ndarray, float], k: int
) -> np.ndarray:
    """Upper bounds of ``f_n(x) = f0_n + Σ df_n(option)`` over ``{g(x) ≤ β}`` with ``k`` changes.

    Lemma 2 of the module notes.

    ``g(x) = c + Σ d(option)`` is ``row = (c, d, β)``. For every ``λ ≥ 0``,
    ``f0 + λ·(β - c) + best_gain(df - λ·d)`` is an upper bound (Lagrange);
    it is convex in ``λ``. It is evaluated on a grid of ``log λ`` for every
    ``n`` at once, then on a finer grid around each best point, and the
    least value met is returned (every value is a bound).

    Parameters
    ----------
    ch : Choices
    f0 : float ndarray, shape (N,)
    df : float ndarray, shape (N, O)
    row : (float, float ndarray of shape (O,), float)
    k : int

    Returns
    -------
    float ndarray, shape (N,)
    """
    c, d, beta = row
    dmax = float(np.max(np.abs(d), initial=0.0))
    best = f0 + best_gain(ch, df, k)  # λ = 0
    if dmax <= 0:
        return best
    scale = np.maximum(np.max(np.abs(df), axis=1), 1e-12) / dmax  # (N,)

    cols = [(df[:, ch.alt[:, j]], d[ch.alt[:, j]]) for j in range(ch.alt.shape[1])]

    def values(logs: np.ndarray) -> np.ndarray:  # logs (G, N) -> (G, N)
        lam = (scale[None, :] * np.exp(logs))[:, :, None]
        per = np.zeros((logs.shape[0], f0.size, ch.alt.shape[0]))
        for df_j, d_j in cols:
            np.maximum(per, df_j[None] - lam * d_j[None, None], out=per)
        return f0[None, :] + lam[:, :, 0] * (beta - c) + _best_of(ch, per, k)

    coarse = np.linspace(-8.0, 8.0, LAGRANGE_STEPS)
    logs = np.broadcast_to(coarse[:, None], (coarse.size, f0.size))
    vals = values(logs)
    at = coarse[np.argmin(vals, axis=0)]
    best = np.minimum(best, vals.min(axis=0))
    width = coarse[1] - coarse[0]
    fine = at[None, :] + np.linspace(-width, width, LAGRANGE_STEPS // 2)[:, None]
    return np.minimum(best, values(fine).min(axis=0))
