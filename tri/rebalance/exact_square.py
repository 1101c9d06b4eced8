"""The exact square of each phase's RMS current, for small searches: every product of options.

A plan's phase spectrum is ``v_p = v_ref + Σ_o x_o·δ_o`` (``δ_o`` what
option ``o`` changes against the reference plan), so

``R_p² = ||v_ref||² + Σ_o lin_o·x_o + Σ_{o<o'} g_oo'·x_o·x_o'``

with ``lin_o = 2·Re<v_ref, δ_o> + ||δ_o||²`` and ``g_oo' = 2·Re<δ_o, δ_o'>``
(``x_o² = x_o``; two options of one circuit are never both taken). Each
product becomes a variable ``y ∈ [0, 1]`` under McCormick's inequalities
[1] on the side its coefficients need (``y ≤ x_o``, ``y ≤ x_o'`` where a
coefficient is positive, ``y ≥ x_o + x_o' - 1`` where negative): at an
integer point the product itself satisfies them, and no other value makes
``T_p`` larger than the true square, so ``T_p`` is an upper bound of
``R_p²`` that is exact at integer points. ``sqrt`` is concave, so each
tangent ``R ≤ (T + ρ²)/(2ρ)`` lies above it; tangents on a geometric grid
of ``ρ`` keep the envelope within the chosen error of ``sqrt(T)``.

This replaces the sector rows when the search is small (few free options):
there, the angles a phase can reach are wide and sectors would need many
binaries, while the products are few.

References
----------
1. G. P. McCormick, "Computability of global solutions to factorable
   nonconvex programs: Part I", *Math. Prog.* 10 (1976) 147-175.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tri.rebalance.model import Model
from tri.rebalance.problem import Problem
from tri.rebalance.squares import gram

#: Largest number of option products for which the exact square is used [-].
MAX_PRODUCTS = 4000
#: Tangent-envelope error of sqrt, coarse to fine (paired with the model's level) [-].
TANGENT_ERRORS = (1e-4, 1e-5, 1e-6)


@dataclass(frozen=True)
class SquareTerms:
    """``R_p² = const_p + lin_p·x + Σ_k coef[k, p]·x_{a_k}·x_{b_k}`` for the three phases.

    Attributes
    ----------
    const : float ndarray, shape (3,)
        [A²].
    lin : float ndarray, shape (3, O)
        [A²].
    a, b : int ndarray, shape (K,)
        The options of each product (different circuits).
    coef : float ndarray, shape (K, 3)
        [A²].
    """

    const: np.ndarray
    lin: np.ndarray
    a: np.ndarray
    b: np.ndarray
    coef: np.ndarray

    def value(self, assign: np.ndarray) -> np.ndarray:
        """``R_p²`` of a plan, from the terms [A²] (shape (3,))."""
        x = np.zeros(self.lin.shape[1])
        x[np.asarray(assign, dtype=int)] = 1.0
        return self.const + self.lin @ x + (x[self.a] * x[self.b]) @ self.coef


def square_terms(pr: Problem, limit: int = MAX_PRODUCTS) -> SquareTerms | None:
    """The terms of the module notes; None when there are more than ``limit`` products."""
    ref = pr.current_assignment()
    const, lin, grams = np.zeros(3), np.zeros((3, pr.n_options)), []
    for p in range(3):
        c = pr.contrib[:, p, :]
        v_ref = pr.base[p] + np.sum(c[ref], axis=0)
        delta = c - c[ref[pr.owner]]
        size2 = np.sum(delta.real**2 + delta.imag**2, axis=-1)
        lin[p] = 2.0 * np.real(np.sum(np.conj(v_ref)[None, :] * delta, axis=-1)) + size2
        const[p] = float(np.sum(v_ref.real**2 + v_ref.imag**2))
        grams.append((delta, size2))
    scale = max(float(np.max([np.max(s2, initial=0.0) for _, s2 in grams])), 1e-300)
    active = np.flatnonzero(np.any([s2 > 1e-18 * scale for _, s2 in grams], axis=0))
    own = pr.owner[active]
    n_pairs = active.size * (active.size - 1) // 2
    if n_pairs > 4 * limit:
        return None
    ia, ib = np.triu_indices(active.size, 1)
    keep = own[ia] != own[ib]
    ia, ib = ia[keep], ib[keep]
    coef = np.stack([gram(d[active])[ia, ib] for d, _ in grams], axis=-1)
    nz = np.any(np.abs(coef) > 1e-12 * scale, axis=1)
    if int(np.sum(nz)) > limit:
        return None
    return SquareTerms(const, lin, active[ia[nz]], active[ib[nz]], coef[nz])


def add_exact_square_rows(
    m: Model,
    x: int,
    r_cols: list[int],
    terms: SquareTerms,
    r_min: float,
    r_maxes: list[float],
    level: int,
    extra_points: list[list[float]] | None = None,
) -> None:
    """Rows ``R_p ≤ (T_p + ρ²)/(2ρ)`` with ``T_p ≥ R_p²`` exact at integer points (module notes).

    Parameters
    ----------
    m : Model
    x : int
        First option column.
    r_cols : list of int
        The three ``R_p`` columns.
    terms : SquareTerms
    r_min : float
        Smallest phase RMS current of interest [A].
    r_maxes : list of float
        Largest possible phase RMS current of each phase [A].
    level : int
        Index into :data:`TANGENT_ERRORS`.
    extra_points : list of list of float, optional
        More tangent points per phase (RMS currents of visited plans) [A].
    """
    k = terms.a.size
    y0 = m.var(k, 0.0, 1.0)
    pos = np.flatnonzero(np.any(terms.coef > 0, axis=1))
    neg = np.flatnonzero(np.any(terms.coef < 0, axis=1))
    ones = np.ones(pos.size)
    m.block(
        np.column_stack([y0 + pos, x + terms.a[pos]]), np.column_stack([ones, -ones]), -np.inf, 0.0
    )
    m.block(
        np.column_stack([y0 + pos, x + terms.b[pos]]), np.column_stack([ones, -ones]), -np.inf, 0.0
    )
    m.block(
        np.column_stack([y0 + neg, x + terms.a[neg], x + terms.b[neg]]),
        np.column_stack([np.ones(neg.size), -np.ones(neg.size), -np.ones(neg.size)]),
        -1.0,
        np.inf,
    )
    t0 = m.var(3, 0.0, np.inf)
    ratio = 1.0 + math.sqrt(8.0 * TANGENT_ERRORS[level])
    for p in range(3):
        nz = np.flatnonzero(terms.lin[p])
        ky = np.flatnonzero(terms.coef[:, p])
        m.row(
            np.concatenate([[t0 + p], x + nz, y0 + ky]),
            np.concatenate([[1.0], -terms.lin[p, nz], -terms.coef[ky, p]]),
            float(terms.const[p]),
            float(terms.const[p]),
        )
        lo = max(r_min, 1e-9 * max(1.0, r_maxes[p]))
        count = max(1, math.ceil(math.log(max(r_maxes[p], lo) / lo) / math.log(ratio)) + 1)
        extra = [] if extra_points is None else [v for v in extra_points[p] if v > 0]
        rhos = np.unique(np.concatenate([lo * ratio ** np.arange(count), extra]))
        m.block(
            np.column_stack([np.full(rhos.size, r_cols[p]), np.full(rhos.size, t0 + p)]),
            np.column_stack([np.ones(rhos.size), -0.5 / rhos]),
            -np.inf,
            0.5 * rhos,
        )
