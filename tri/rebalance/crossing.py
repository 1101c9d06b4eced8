"""How much current must cross between phases: lower bounds on moves, in the sequence frame.

Number partitioning in three bins, seen through the engine's own currents.
Rotate phase p's order-h current by ``a^(h·p mod 3)`` (``a = 1∠120°``):
the mean of the three rotated spectra is ``J``, the per-order sequence
current that no move changes, and ``F = ||J||`` is the floor
(:mod:`tri.rebalance.problem`). With ``U = J/F`` and the rotated spectrum
``w_p`` of phase p (a linear function of the options, so of the plan ``x``),
split ``w_p`` along and across ``U``:

``a_p(x) = <w_p(x), U>``, ``b_p(x) = ||w_p(x) - a_p(x)·U||``,
``R_p = ||w_p|| = sqrt(a_p² + b_p²)`` (the rotation keeps norms).

``a_p`` is the "size" of phase p's load as the partition sees it, linear in
the options: a 1-pole circuit adds the same rotated spectrum to whichever
phase it sits on, so moving it from A to B takes ``<I_c, U>`` from ``a_A``
and gives it to ``a_B``. ``b_p`` is what the partition cannot see
(power-factor angles and harmonics across ``U``); it only enters to second
order.

Lemma 1 (first and second order)
--------------------------------
For every plan, ``R_p ≥ a_p``; and if ``a_p ≥ L_p > 0`` then
``R_p ≤ a_p + b_p²/(2·L_p)``.

*Proof.* ``sqrt(a² + b²) ≥ |a| ≥ a``. For ``a > 0``,
``sqrt(a² + b²) ≤ a + b²/(2a)`` (square both sides:
``a² + b² ≤ a² + b² + b⁴/(4a²)``), and ``b²/(2a) ≤ b²/(2L)``. ∎

Theorem 1 (the target as rows)
------------------------------
Let every plan with at most ``k`` option changes that meets the deviation
target ``t`` (every ``R_p`` within ``t`` of the mean of the three) have
``a_q ≥ L_q > 0`` and ``b_q² ≤ B_q``, and write ``Q_q = B_q/(2·L_q)``.
With ``τ⁺ = max(0, 2 - t)`` and ``τ⁻ = max(0, 1 - t)``, every such plan
satisfies, for every phase p (q, r the other two),

* ``τ⁺·a_p - (1 + t)·(a_q + a_r) ≤ (1 + t)·(Q_q + Q_r)``,
* ``τ⁻·(a_q + a_r) - (2 + t)·a_p ≤ (2 + t)·Q_p``.

*Proof.* ``R_p ≤ (1 + t)·mean`` is ``(2 - t)·R_p ≤ (1 + t)·(R_q + R_r)``,
so ``τ⁺·R_p ≤ (1 + t)·(R_q + R_r)`` (for ``t > 2`` the left is 0);
bound ``R_p`` below and ``R_q``, ``R_r`` above by Lemma 1.
``R_p ≥ (1 - t)·mean`` is ``(2 + t)·R_p ≥ (1 - t)·(R_q + R_r)``, so
``(2 + t)·R_p ≥ τ⁻·(R_q + R_r)`` (``R ≥ 0``); bound the other way round. ∎

Each row is ``c + Σ_circuits d(option) ≤ β``, linear and separable, so the
smallest value it takes with at most ``k`` changes is a knapsack with a
count: the current value plus the ``k`` largest per-circuit gains (sorted
by size, :func:`tri.rebalance.knapsack.best_gain`). If that smallest value
is above ``β``, no plan with ``k`` changes meets the target.

Theorem 2 (closing the second order by a fixed point)
------------------------------------------------------
Start from crude ``L, B`` (the current value minus or plus the ``k``
largest changes: the triangle inequality). Every plan meeting the target
satisfies the rows of Theorem 1 with these ``Q``; so it lies in the
*region* of plans with at most ``k`` changes that satisfy them. Over that
region, each coordinate of ``w_q - a_q·U`` (in an orthonormal basis of
principal directions) lies between the Lagrangian bounds ``lo_j, hi_j``
of :func:`tri.rebalance.knapsack.max_under_row`, and the norm ``ρ`` of the
remaining coordinates is at most its value at the reference plus the
changes' (triangle inequality, bounded the same way), so
``b_q² ≤ Σ_j max(lo_j², hi_j²) + ρ²`` there, and ``a_q ≥`` its smallest
value there: new valid ``L, B`` for every plan meeting the target.
Repeat; the rows tighten as ``Q`` shrinks, and when a row's smallest
value passes its ``β``, no plan with ``k`` changes meets the target. ∎

A plan with ``k`` relocations has at most ``k`` option changes (a breaker
on other phases has left its slot), so the bound on changes is a bound on
relocations, on rail boards and two-column panels alike; slots are not
needed for it.

Theorem 3 (the balance floor within a budget)
---------------------------------------------
For weights ``λ_p ≥ 0`` with ``Σ λ_p = 1`` and unit directions ``u_p``,
every plan with at most ``k`` changes has
``max_p R_p ≥ Σ_p λ_p·<w_p, u_p> ≥ Σ_p λ_p·<w_p(ref), u_p> - (k largest
per-circuit decreases)``.

*Proof.* ``R_p = ||w_p|| ≥ <w_p, u_p>`` (Cauchy-Schwarz) and a weighted mean
is at most the largest; the right side is a knapsack as above. ∎
With ``u_p = U`` and equal weights it is ``F``; other weights show how
much current ``k`` moves cannot take off a crowded phase.

The frame itself (rotated spectra, ``a_p`` and the principal coordinates
across ``u_p``) is :mod:`tri.rebalance.sequence_frame`.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from tri.rebalance.knapsack import best_gain, choices_of, max_under_row
from tri.rebalance.plan_currents import spectra
from tri.rebalance.problem import Problem
from tri.rebalance.sequence_frame import (
    KEPT_COORDINATES,
    Frame,
    Rotated,
    frame_in,
    frame_of,
    real_parts,
    rotated_of,
    rotations,
)

#: Re-exported: the tests import the frame here.
__all__ = [
    "KEPT_COORDINATES",
    "Frame",
    "Rotated",
    "budget_floor",
    "changes_impossible",
    "changes_lower_bound",
    "frame_in",
    "frame_of",
    "rotated_of",
    "rotations",
    "target_rows",
]

#: Rounds of Theorem 2's fixed point [-].
FIXED_POINT_ROUNDS = 10
#: Relative slack on the target: a plan within round-off of it is never excluded [-].
TARGET_SLACK = 1e-7


def target_rows(
    fr: Frame, t: float, q_second: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The six rows of Theorem 1: ``c`` (6,), ``d`` (O, 6), ``β`` (6,); upper, lower per phase."""
    a0, da = fr.a0, fr.da
    up, down = max(0.0, 2.0 - t), max(0.0, 1.0 - t)
    c, d, beta = [], [], []
    for p in range(3):
        others = [q for q in range(3) if q != p]
        c.append(up * a0[p] - (1 + t) * a0[others].sum())
        d.append(up * da[:, p] - (1 + t) * da[:, others].sum(axis=1))
        beta.append((1 + t) * q_second[others].sum())
        c.append(down * a0[others].sum() - (2 + t) * a0[p])
        d.append(down * da[:, others].sum(axis=1) - (2 + t) * da[:, p])
        beta.append((2 + t) * q_second[p])
    return np.array(c), np.array(d).T, np.array(beta)


def _row_impossible(fr: Frame, rows, k: int) -> bool:
    c, d, beta = rows
    smallest = c - best_gain(fr.choices, -d.T, k)
    return bool(np.any(smallest > beta + 1e-9 * max(fr.floor_a, 1e-9)))


def _ranges(region: Frame, rows, k: int, fr: Frame):
    """Bounds of ``fr``'s coordinates over the region of ``rows`` (Theorem 2).

    ``rows`` are in ``region``'s frame; only those violated at the reference
    are used (each alone is a valid restriction). Returns ``lo, hi`` (3, m)
    of the principal coordinates, the residual norm (3,), and the least and
    largest ``a_p`` (3,), (3,).
    """
    c, d, beta = rows
    m, n_opt = fr.l0.shape[1], fr.dl.shape[0]
    flat = fr.dl.reshape(n_opt, -1).T
    f0 = np.concatenate([fr.l0.ravel(), -fr.l0.ravel(), fr.res0, -fr.a0, fr.a0])
    df = np.concatenate([flat, -flat, fr.dres.T, -fr.da.T, fr.da.T])
    ub = np.full(f0.size, np.inf)
    for j in np.flatnonzero(c > beta):
        ub = np.minimum(ub, max_under_row(fr.choices, f0, df, (c[j], d[:, j], beta[j]), k))
    hi, lo = ub[: 3 * m].reshape(3, m), -ub[3 * m : 6 * m].reshape(3, m)
    res = np.maximum(ub[6 * m : 6 * m + 3], 0.0)
    return lo, hi, res, -ub[6 * m + 3 : 6 * m + 6], ub[6 * m + 6 :]


def _recentred(fr: Frame, lo: np.ndarray, hi: np.ndarray, a_mid: np.ndarray) -> Frame:
    """A frame whose ``u_p`` point at the middle of the region (smaller ``b_p`` there)."""
    centre = np.einsum("pkm,pm->pk", fr.basis, 0.5 * (lo + hi))
    u = a_mid[:, None] * fr.directions + centre
    if not np.all(np.isfinite(u)) or np.any(np.linalg.norm(u, axis=1) <= 0):
        return fr
    return frame_in(fr.rotated, u, fr.l0.shape[1])


def changes_impossible(
    fr: Frame,
    target: float,
    k: int,
    rounds: int = FIXED_POINT_ROUNDS,
    stop: Callable[[], bool] | None = None,
) -> bool:
    """True when proven: no plan with at most ``k`` changes meets the target (Theorems 1-2).

    Each round bounds the second order over the region of the last rows, in
    a frame re-centred on that region (any ``u_p`` may be used: Lemma 1
    holds for every unit direction), and stops when a row is shut or the
    second order stops shrinking.

    Parameters
    ----------
    fr : Frame
    target : float
        Largest deviation from the mean, a fraction [-].
    k : int
        Changes of placed circuits [-].
    rounds : int
        Rounds of the fixed point.
    stop : callable, optional
        Checked between rounds; when it returns True the answer is False (not proven).
    """
    t = target * (1 + TARGET_SLACK) + 1e-12
    c, d, beta = target_rows(fr, t, np.zeros(3))
    if np.all(c - best_gain(fr.choices, -d.T, k) <= beta):
        return False  # even without the second order some plan passes every row
    lower = fr.a0 - best_gain(fr.choices, -fr.da.T, k)
    if np.any(lower <= 0):
        return False
    across0 = np.sqrt(np.sum(fr.l0**2, axis=1) + fr.res0**2)
    step = np.sqrt(np.sum(fr.dl**2, axis=2) + fr.dres**2)  # (O, 3)
    sq = (across0 + best_gain(fr.choices, step.T, k)) ** 2
    nxt, last = fr, np.inf
    for _ in range(rounds):
        if stop is not None and stop():
            return False
        q_second = sq / (2.0 * lower)
        rows = target_rows(fr, t, q_second)
        if _row_impossible(fr, rows, k):
            return True
        total = float(q_second.sum())
        if total > 0.98 * last:
            return False
        last = total
        lo, hi, res, a_min, a_max = _ranges(fr, rows, k, nxt)
        if not (np.all(np.isfinite(lo)) and np.all(np.isfinite(hi))):
            return False  # no row restricts the region: nothing to shut
        new_sq = np.sum(np.maximum(lo**2, hi**2), axis=1) + res**2
        if nxt is fr:
            new_sq, a_min = np.minimum(sq, new_sq), np.maximum(lower, a_min)
        if not np.all(np.isfinite(new_sq)) or np.any(a_min <= 0):
            return False
        fr, sq, lower = nxt, new_sq, a_min
        nxt = _recentred(fr, lo, hi, 0.5 * (a_min + np.maximum(a_max, a_min)))
    return _row_impossible(fr, target_rows(fr, t, sq / (2.0 * lower)), k)


def changes_lower_bound(
    pr: Problem,
    target: float,
    known: int,
    cap: int,
    stop: Callable[[], bool] | None = None,
) -> int:
    """Fewest option changes (so relocations) a plan meeting the target needs, as proven here.

    Parameters
    ----------
    pr : Problem
    target : float
        Largest deviation from the mean, a fraction [-].
    known : int
        Changes of the best plan known (the search for a bound starts just below).
    cap : int
        Largest number of changes allowed [-].
    stop : callable, optional
        Checked between budgets.

    Returns
    -------
    int
        ``k + 1`` for the largest ``k < min(known, cap + 1)`` proven impossible
        (Theorem 2; every smaller budget is then impossible too), 0 if none.
    """
    if pr.n_free == 0 or not pr.symmetric:
        return 0  # a high-leg delta: J is not the same for every plan (Theorems 1-2 need it)
    fr = frame_of(pr)
    top = min(known, cap + 1) - 1
    t = target * (1 + TARGET_SLACK) + 1e-12
    first = target_rows(fr, t, np.zeros(3))
    for k in range(top, -1, -1):
        if stop is not None and stop():
            return 0
        c, d, beta = first
        if np.all(c - best_gain(fr.choices, -d.T, k) <= beta):
            continue  # not even the first order shuts this budget out
        if changes_impossible(fr, target, k, stop=stop):
            return k + 1
    return 0


def budget_floor(pr: Problem, k: int, directions: list[np.ndarray] | None = None) -> float:
    """A lower bound on the largest phase RMS current with at most ``k`` changes (Theorem 3) [A].

    Parameters
    ----------
    pr : Problem
    k : int
        Changes of placed circuits [-].
    directions : list of complex ndarray, shape (3, H), optional
        Spectra whose phase directions give more ``u_p`` (plans seen).

    Returns
    -------
    float
        The largest bound over a grid of weights and the directions [A]
        (at least the floor ``F`` when ``U`` is among them, which it always is).
    """
    if pr.n_free == 0:
        return pr.floor_a
    rot = rotations(pr.orders)
    ref = pr.current_assignment()
    w = real_parts(rot * spectra(pr, ref)[0])
    dw = real_parts(rot[None] * pr.contrib)
    dw = dw - dw[ref[pr.owner]]
    choices = choices_of(pr)
    dirs = [np.broadcast_to(w.mean(axis=0), w.shape)]
    for spec in directions or []:
        dirs.append(real_parts(rot * spec))
    n = 24
    i, j = np.meshgrid(np.arange(n + 1), np.arange(n + 1), indexing="ij")
    keep = i + j <= n
    lam = np.stack([i[keep], j[keep], n - i[keep] - j[keep]], axis=-1) / n  # (G, 3)
    best = pr.floor_a
    for u in dirs:
        nrm = np.linalg.norm(u, axis=-1, keepdims=True)
        if np.any(nrm <= 0):
            continue
        u = u / nrm
        a0 = np.einsum("pk,pk->p", w, u)
        da = np.einsum("opk,pk->op", dw, u)
        val = lam @ a0 - best_gain(choices, -(lam @ da.T), k)
        best = max(best, float(val.max()))
    return best
