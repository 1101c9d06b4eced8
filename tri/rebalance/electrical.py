"""The electrical block of every model: one option per breaker, and the currents it gives.

Variables
---------
* ``x_o ∈ {0, 1}``: free circuit ``owner[o]`` takes option ``o``; each
  free circuit takes exactly one option.
* ``V_p,h`` (real and imaginary parts): line current of phase p at order h,
  ``V = base + Σ_o x_o·contrib_o``, linear in ``x`` because the engine's
  currents add (:mod:`tri.rebalance.problem`).
* ``N_h``: the neutral current at every order (only when a neutral limit
  is set).

With several cases (scenarios, :mod:`tri.rebalance.problem`) a model has
one currents block per case on the same ``x`` (:func:`add_currents` with
each case's problem): every case's currents are then linear in the one
plan, and each case's rows bound its own block.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.rebalance.model import Model
from tri.rebalance.problem import Problem


@dataclass(frozen=True)
class Electrical:
    """Columns of the electrical block.

    Attributes
    ----------
    x : int
        First option column (``x + o`` is option ``o``).
    v : int
        First phase-current column: ``v + (p·H + h)·2 + {0 re, 1 im}``.
    n : int or None
        First neutral column ``n + 2·h + {0, 1}``, or None.
    h : int
        Number of orders ``H``.
    """

    x: int
    v: int
    n: int | None
    h: int

    def phase_cols(self, p: int) -> np.ndarray:
        """Columns of the real/imaginary parts of phase p, order by order."""
        return self.v + (p * self.h) * 2 + np.arange(2 * self.h)

    def neutral_cols(self) -> np.ndarray:
        """Columns of the neutral's parts, order by order."""
        assert self.n is not None
        return self.n + np.arange(2 * self.h)


def _equalities(m: Model, x: int, first_col: int, contrib: np.ndarray, base: np.ndarray) -> None:
    """``col_k - Σ_o x_o·contrib[o, k] = base_k`` for each part k (re, im of each order)."""
    parts = np.stack([contrib.real, contrib.imag], axis=-1).reshape(contrib.shape[0], -1)
    rhs = np.stack([base.real, base.imag], axis=-1).ravel()
    for k in range(rhs.size):
        coef = parts[:, k]
        nz = np.flatnonzero(coef)
        m.row(
            np.concatenate([[first_col + k], x + nz]),
            np.concatenate([[1.0], -coef[nz]]),
            float(rhs[k]),
            float(rhs[k]),
        )


def add_electrical(m: Model, pr: Problem, neutral: bool) -> Electrical:
    """Option columns, one option per free circuit, and the current columns (module notes).

    Parameters
    ----------
    m : Model
    pr : Problem
    neutral : bool
        Add the neutral's columns.

    Returns
    -------
    Electrical
    """
    return add_currents(m, pr, add_options(m, pr).x, neutral)


def add_currents(m: Model, pr: Problem, x: int, neutral: bool) -> Electrical:
    """The current columns of one case on existing option columns ``x`` (module notes).

    Parameters
    ----------
    m : Model
    pr : Problem
        The problem in that case (its own currents).
    x : int
        First option column.
    neutral : bool
        Add the neutral's columns.
    """
    h = pr.orders.size
    v = m.var(6 * h, -np.inf, np.inf)
    nv = m.var(2 * h, -np.inf, np.inf) if neutral else None
    for p in range(3):
        _equalities(m, x, v + p * h * 2, pr.contrib[:, p, :], pr.base[p])
    if nv is not None:
        _equalities(m, x, nv, pr.ncontrib, pr.nbase)
    return Electrical(x=x, v=v, n=nv, h=h)


def unit_rows(u: np.ndarray) -> np.ndarray:
    """Complex direction per order -> interleaved real coefficients (re, im)."""
    u = np.asarray(u, dtype=complex)
    return np.column_stack([u.real, u.imag]).ravel()


def add_neutral_cuts(m: Model, el: Electrical, limit: float, directions: list[np.ndarray]) -> None:
    """``<N, u> ≤ limit`` for each unit spectrum ``u`` (a relaxation of ``||N|| ≤ limit``).

    By Cauchy-Schwarz ``<N, u> ≤ ||N||·||u|| = ||N||``, so every plan whose
    neutral RMS current is within the limit satisfies every row
    (Theorem 3 of :mod:`tri.rebalance.polygon`).
    """
    cols = el.neutral_cols()
    for u in directions:
        m.row(cols, unit_rows(u), -np.inf, limit)


def decode_options(pr: Problem, x: np.ndarray, start: int) -> np.ndarray:
    """The option of each free circuit in a solution (int ndarray, shape (F,))."""
    vals = np.asarray(x[start : start + pr.n_options])
    out = np.empty(pr.n_free, dtype=int)
    for i in range(pr.n_free):
        seg = vals[pr.starts[i] : pr.starts[i + 1]]
        out[i] = pr.starts[i] + int(np.argmax(seg))
    return out


def add_options(m: Model, pr: Problem) -> Electrical:
    """Option columns and one option per free circuit, without current columns.

    For models about slots alone (the realisation of fixed options).
    """
    x = m.binary(pr.n_options)
    counts = np.diff(pr.starts)
    for size in np.unique(counts):
        circuits = np.flatnonzero(counts == size)
        m.block(x + pr.starts[circuits][:, None] + np.arange(size)[None, :], 1.0, 1.0, 1.0)
    return Electrical(x=x, v=-1, n=None, h=0)
