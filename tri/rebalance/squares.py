"""Squared norms of phase currents as functions of the options, with linear upper bounds.

The target model needs *upper* bounds on a phase's RMS current ``R_p``
(:mod:`tri.rebalance.milp`). Squares are the natural handle: a plan's
phase spectrum is ``v = v_ref + Σ_o x_o·δ_o`` (``δ_o`` what option ``o``
changes against the reference plan, zero for the reference option itself;
``x_o ∈ {0, 1}``, one option per circuit), so

``||v||² = const + Σ_o lin_o·x_o + X``,  ``X = Σ_{o<o'} g_oo'·x_o·x_o'``,

with ``const = ||v_ref||²``, ``lin_o = 2·Re<v_ref, δ_o> + ||δ_o||²``,
``g_oo' = 2·Re<δ_o, δ_o'>`` (``x_o² = x_o``; two options of one circuit
are never both taken). Only the cross term ``X`` is not linear. This
module bounds it from above without a variable per product; the model
(:func:`cross_rows`) combines the bounds below, all valid for every plan
in which at most ``M`` free circuits differ from the reference plan (the
move budget plus the new circuits). Write ``S`` for the taken options
with ``δ ≠ 0`` (at most ``M``, one per circuit), ``ψ_o(x) = Σ_o' g_oo'·x_o'``,
so that ``X = ½·Σ_o x_o·ψ_o(x)``.

Bound A (partners)
    ``x_o·ψ_o ≤ T_o·x_o`` with ``T_o`` the sum of the ``M - 1`` largest,
    over the other circuits j, of ``max(0, max_{o'∈j} g_oo')``: when ``o``
    is taken, the other members of ``S`` are at most ``M - 1`` circuits,
    each adding at most that. Exact when no other circuit changes.

Bound G (products with one option, exact; Glover [1])
    ``x_o·ψ_o ≤ ψ_o(x) - ψ_lo,o·(1 - x_o)`` with ``ψ_lo,o`` the sum of the
    ``M`` smallest, over the other circuits, of ``min(0, min_{o'∈j} g_oo')``
    (a lower bound of ``ψ_o`` over every plan): for ``x_o = 1`` both sides
    are ``ψ_o(x)``; for ``x_o = 0`` the left is 0 and the right is
    ``ψ_o(x) - ψ_lo,o ≥ 0``. With bound A at ``x_o = 0`` (which gives 0),
    the product ``x_o·ψ_o(x)`` is bounded *exactly* at every integer point.
    One row per option: added lazily, for the options of plans the solver
    proposed, and written through the phase's currents, since
    ``ψ_o(x) = 2·<δ_o, Δ(x)> - Σ_{b of o's circuit} 2·<δ_o, δ_b>·x_b`` with
    ``Δ(x)`` the change of the currents, already columns of the model
    (``tri.rebalance.milp._glover_rows``).

Bound B (count)
    With ``m = |S|``, ``X ≤ C(m)`` where ``C(m)`` is half the sum of the
    ``m`` largest, over circuits, of ``max_o T_o^(m-1)`` (``T_o`` with
    ``m - 1`` partners) by the argument of bound A; ``C(0) = C(1) = 0``;
    so ``X ≤ s·(m - 1)`` for ``m ≥ 1`` with
    ``s = max_{2≤m≤M} C(m)/(m - 1)``. In the model a binary ``t`` with
    ``m ≤ M·t`` makes ``X ≤ s·(m - t)`` valid for ``m = 0`` too. Exact
    when at most one circuit touches the phase.

Bound C (Cauchy-Schwarz)
    ``||Σ_{o∈S} δ_o||² ≤ m·Σ_{o∈S} ||δ_o||²``, so
    ``X ≤ (M - 1)·Σ_o ||δ_o||²·x_o``.

And from below, ``X ≥ -Σ_{o∈S} ||δ_o||²`` (``||Σ δ||² ≥ 0``): at least
minus the sum of the ``M`` largest ``max_o ||δ_o||²`` over circuits.

References
----------
1. F. Glover, "Improved linear integer programming formulations of
   nonlinear integer problems", *Management Sci.* 22 (1975) 455-460
   (the product of a binary and a bounded linear function, linearised
   exactly at integer points).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.rebalance.problem import Problem


def gram(d: np.ndarray) -> np.ndarray:
    """``2·Re(d·d^H)`` for complex rows (spectra), without BLAS.

    Parameters
    ----------
    d : complex ndarray, shape (n, K)
        Spectra [A].

    Returns
    -------
    float ndarray, shape (n, n)
        ``2·Re<d_i, d_j>`` [A²].

    Notes
    -----
    The matrices are small; a multithreaded BLAS can spend milliseconds
    waking its threads for each one (measured on two cores), so the
    product is summed by ``einsum`` instead.
    """
    re = np.concatenate([d.real, d.imag], axis=-1)
    return 2.0 * np.einsum("ik,jk->ij", re, re)


def _top_sums(values: np.ndarray, k: int, largest: bool) -> np.ndarray:
    """Row sums of the ``k`` largest (or smallest) entries [same unit]."""
    if k <= 0 or values.shape[1] == 0:
        return np.zeros(values.shape[0])
    k = min(k, values.shape[1])
    if largest:
        part = -np.partition(-values, k - 1, axis=1)[:, :k]
    else:
        part = np.partition(values, k - 1, axis=1)[:, :k]
    return part.sum(axis=1)


@dataclass(frozen=True)
class CrossBound:
    """Data of bounds A, G, B and C on the cross term (module notes).

    Attributes
    ----------
    touch : int ndarray, shape (n,)
        Options with ``δ ≠ 0``, increasing (so grouped by circuit).
    gram : float ndarray, shape (n, n)
        ``g`` among them, 0 between options of one circuit [A²].
    partner : float ndarray, shape (n,)
        ``T_o`` (bound A) [A²].
    psi_lo : float ndarray, shape (n,)
        ``ψ_lo,o ≤ 0`` (bound G) [A²].
    slope : float
        ``s`` (bound B) [A²].
    size2 : float ndarray, shape (n,)
        ``||δ_o||²`` (bound C) [A²].
    changed_max : int
        ``M``: circuits that may differ from the reference plan [-].
    lower : float
        ``X`` is never below this [A²].
    parts : float ndarray, shape (n, 2K)
        ``δ_o`` of the options of :attr:`touch`, real and imaginary part of
        each order in turn (the column order of a phase's currents in the
        model) [A].
    own : int ndarray, shape (n,)
        Circuit of each option of :attr:`touch`.
    """

    touch: np.ndarray
    gram: np.ndarray
    partner: np.ndarray
    psi_lo: np.ndarray
    slope: float
    size2: np.ndarray
    changed_max: int
    lower: float
    parts: np.ndarray
    own: np.ndarray

    def largest(self, x_touch: np.ndarray, lazy: np.ndarray) -> float:
        """The largest ``X`` the model's rows allow at an integer point [A²].

        Parameters
        ----------
        x_touch : float ndarray, shape (n,)
            0/1 for the options of :attr:`touch`.
        lazy : bool ndarray, shape (n,)
            Options with bound G.

        Returns
        -------
        float
            ``min`` of bound A (with ``min(T_o, ψ_o(x))`` for the lazy
            options), bound B and bound C at ``x``.
        """
        x = np.asarray(x_touch, dtype=float)
        if self.touch.size < 2 or self.changed_max < 2:
            return 0.0
        psi = np.einsum("ij,j->i", self.gram, x)
        per = np.where(lazy, np.minimum(self.partner, psi), self.partner) * x
        bound_a = 0.5 * float(np.sum(per))
        m = float(np.sum(x))
        bound_b = self.slope * max(m - 1.0, 0.0) if self.slope > 0 else np.inf
        bound_c = (self.changed_max - 1) * float(np.sum(self.size2 * x))
        return float(min(bound_a, bound_b, bound_c))

    @property
    def upper(self) -> float:
        """``X`` is never above this (bound A summed over the ``M`` largest) [A²]."""
        if self.touch.size == 0:
            return 0.0
        k = min(self.changed_max, self.touch.size)
        return 0.5 * float(np.sum(np.sort(self.partner)[::-1][:k]))


def cross_bound(owner: np.ndarray, delta: np.ndarray, changed_max: int) -> CrossBound:
    """The bounds of the module notes for the changes ``delta`` of one phase.

    Parameters
    ----------
    owner : int ndarray, shape (O,)
        Circuit of each option (nondecreasing).
    delta : complex ndarray, shape (O, K)
        ``δ_o``: what each option changes against the reference plan [A].
    changed_max : int
        ``M`` [-].

    Returns
    -------
    CrossBound
    """
    size2_all = np.sum(delta.real**2 + delta.imag**2, axis=-1)
    scale = max(float(np.max(size2_all, initial=0.0)), 1e-300)
    touch = np.flatnonzero(size2_all > 1e-24 * scale)
    size2 = size2_all[touch]
    n = touch.size
    m_max = max(0, int(changed_max))
    zero = np.zeros(n)
    d = delta[touch]
    parts = np.stack([d.real, d.imag], axis=-1).reshape(n, 2 * delta.shape[1])
    if n == 0 or m_max == 0:
        return CrossBound(
            touch, np.zeros((n, n)), zero, zero, 0.0, size2, m_max, 0.0, parts, owner[touch]
        )
    own = owner[touch]
    first = np.flatnonzero(np.r_[True, own[1:] != own[:-1]])
    per_circuit_size = np.maximum.reduceat(size2, first)
    lower = -float(np.sum(np.sort(per_circuit_size)[::-1][:m_max]))
    g = gram(d)
    g[own[:, None] == own[None, :]] = 0.0
    if first.size < 2:
        return CrossBound(touch, g, zero, zero, 0.0, size2, m_max, lower, parts, own)
    hi = np.maximum.reduceat(np.maximum(g, 0.0), first, axis=1)  # (n, circuits)
    lo = np.minimum.reduceat(np.minimum(g, 0.0), first, axis=1)
    # an option's own circuit has 0 in hi and lo (zeroed above): harmless
    partner = _top_sums(hi, m_max - 1, largest=True)
    psi_lo = _top_sums(lo, m_max, largest=False)
    slope = 0.0
    if m_max >= 2:
        k = min(m_max - 1, hi.shape[1])
        ranked = -np.sort(-hi, axis=1)[:, :k]
        cum = np.cumsum(ranked, axis=1)  # cum[:, j]: the j + 1 largest partners
        for mm in range(2, min(m_max, first.size) + 1):
            t_m = cum[:, min(mm - 2, k - 1)]
            best = np.sort(np.maximum.reduceat(t_m, first))[::-1][:mm]
            slope = max(slope, 0.5 * float(np.sum(best)) / (mm - 1))
    return CrossBound(touch, g, partner, psi_lo, slope, size2, m_max, lower, parts, own)


@dataclass(frozen=True)
class SquareBound:
    """``S(x) = const + Σ_o lin_o·x_o + X(x)``, a squared norm of phase p (module notes).

    Attributes
    ----------
    const : float
        ``S`` at the reference plan [A²].
    lin : float ndarray, shape (O,)
        Linear coefficients [A²].
    cross : CrossBound
        Bounds on ``X``.
    lo : float
        ``S ≥ lo ≥ 0`` at every plan considered [A²].
    ref_parts : float ndarray, shape (2K,)
        The reference plan's spectrum, parts as in :attr:`CrossBound.parts` [A].
    first_order : int
        Index of the first order counted (0, or 1 for the harmonics alone).
    """

    const: float
    lin: np.ndarray
    cross: CrossBound
    lo: float
    ref_parts: np.ndarray
    first_order: int

    def value(self, assign: np.ndarray) -> float:
        """``S`` of a plan, exactly (the expansion of the module notes) [A²]."""
        x = np.zeros(self.lin.size)
        x[np.asarray(assign, dtype=int)] = 1.0
        xt = x[self.cross.touch]
        cross = 0.5 * float(np.einsum("i,ij,j->", xt, self.cross.gram, xt))
        return float(self.const + np.sum(self.lin * x) + cross)

    def largest(self, assign: np.ndarray, lazy: set[int]) -> float:
        """The largest ``S`` the model's rows allow at a plan [A²] (:meth:`CrossBound.largest`)."""
        x = np.zeros(self.lin.size)
        x[np.asarray(assign, dtype=int)] = 1.0
        xt = x[self.cross.touch]
        mask = np.isin(self.cross.touch, np.fromiter(lazy, dtype=int, count=len(lazy)))
        return float(self.const + np.sum(self.lin * x) + self.cross.largest(xt, mask))


def changed_max(pr: Problem, budget: int) -> int:
    """``M``: free circuits that may differ from the reference plan within ``budget`` [-]."""
    return int(min(pr.n_movable, max(0, budget)) + np.sum(~pr.movable))


def square_bound(pr: Problem, p: int, budget: int, harmonics_only: bool = False) -> SquareBound:
    """``R_p²`` (or, with ``harmonics_only``, the square ``G_p²`` of the harmonic RMS).

    Parameters
    ----------
    pr : Problem
    p : int
        Phase.
    budget : int
        Largest number of moves [-].
    harmonics_only : bool
        Orders above the fundamental only.

    Returns
    -------
    SquareBound
        The reference plan is the current one (new circuits on their first
        option). ``lo``: the triangle inequality, ``||v|| ≥ ||v_ref|| - D``
        with ``D`` the sum of the ``M`` largest ``max_o ||δ_o||``.
    """
    sl = slice(1, None) if harmonics_only else slice(None)
    ref = pr.current_assignment()
    c = pr.contrib[:, p, sl]
    v_ref = pr.base[p, sl] + (np.sum(c[ref], axis=0) if pr.n_free else 0.0)
    delta = c - c[ref[pr.owner]] if pr.n_free else c
    size2 = np.sum(delta.real**2 + delta.imag**2, axis=-1)
    lin = 2.0 * np.real(np.sum(np.conj(v_ref)[None, :] * delta, axis=-1)) + size2
    const = float(np.sum(v_ref.real**2 + v_ref.imag**2))
    m_max = changed_max(pr, budget)
    cross = cross_bound(pr.owner, delta, m_max)
    lo = 0.0
    if pr.n_free:
        worst = np.sqrt(np.maximum.reduceat(size2, pr.starts[:-1]))
        d = float(np.sum(np.sort(worst)[::-1][:m_max]))
        lo = max(0.0, np.sqrt(const) - d) ** 2
    ref_parts = np.stack([v_ref.real, v_ref.imag], axis=-1).ravel()
    return SquareBound(const, lin, cross, lo, ref_parts, 1 if harmonics_only else 0)
