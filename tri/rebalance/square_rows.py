"""Rows that bound a phase's squared RMS current from above, through its option products.

The bounds themselves (partner, Glover, count, Cauchy-Schwarz) are proven
in :mod:`tri.rebalance.squares`; this module writes them as rows of a
:class:`~tri.rebalance.model.Model`. Every row holds at every plan with at
most ``changed_max`` changed circuits, so a model that uses them stays a
relaxation.
"""

from __future__ import annotations

import math

import numpy as np

from tri.rebalance.model import Model
from tri.rebalance.squares import CrossBound, SquareBound

#: Relative error of the tangent envelope of sqrt [-] (between tangent points
#: ``ρ`` and ``ρ·q``, ``(R² + ρ²)/(2ρ) ≤ R·(1 + (q - 1)²/8)``).
TANGENT_ERROR = 1e-5


def cross_rows(
    m: Model,
    x: int,
    cb: CrossBound,
    lazy: set[int],
    dense: tuple[np.ndarray, np.ndarray] | None = None,
) -> int | None:
    """A column ``X`` with ``X ≤`` bounds A, B, C and (for ``lazy`` options) G.

    Every plan with at most ``changed_max`` changed circuits satisfies them
    at its true cross term (with ``w_o = x_o·ψ_o``, ``t = [m ≥ 1]``), so a
    row ``S ≤ ... + X`` keeps the model a relaxation. None when no product
    can be nonzero.
    """
    opts = cb.touch
    if opts.size < 2 or cb.changed_max < 2:
        return None
    big_x = m.var(1, cb.lower, np.inf)
    is_lazy = np.isin(opts, np.fromiter(lazy, dtype=int, count=len(lazy)))
    la = np.flatnonzero(is_lazy)
    rest = np.flatnonzero(~is_lazy & (cb.partner != 0.0))
    cols = [big_x, *(x + opts[rest]).tolist()]
    vals = [1.0, *(-0.5 * cb.partner[rest]).tolist()]
    if la.size:
        w = m.var(la.size, -np.inf, np.inf)
        cols += list(range(w, w + la.size))
        vals += [-0.5] * la.size
        # bound A for the lazy options: w ≤ T·x
        m.block(
            np.column_stack([w + np.arange(la.size), x + opts[la]]),
            np.column_stack([np.ones(la.size), -cb.partner[la]]),
            -np.inf,
            0.0,
        )
        if dense is not None:
            glover_rows(m, x, cb, w, la, *dense)
        else:
            for k, a in enumerate(la):
                nz = np.flatnonzero(cb.gram[a])
                m.row(
                    [w + k, *(x + opts[nz]).tolist(), x + int(opts[a])],
                    [1.0, *(-cb.gram[a, nz]).tolist(), -float(cb.psi_lo[a])],
                    -np.inf,
                    -float(cb.psi_lo[a]),
                )
    m.row(cols, vals, -np.inf, 0.0)
    xs = (x + opts).tolist()
    if cb.slope > 0:  # bound B with t = [m ≥ 1]
        t = m.binary(1)
        m.row([*xs, t], [*([1.0] * len(xs)), -float(cb.changed_max)], -np.inf, 0.0)
        m.row([big_x, *xs, t], [1.0, *([-cb.slope] * len(xs)), cb.slope], -np.inf, 0.0)
    # bound C
    m.row([big_x, *xs], [1.0, *(-(cb.changed_max - 1) * cb.size2).tolist()], -np.inf, 0.0)
    return big_x


def glover_rows(
    m: Model,
    x: int,
    cb: CrossBound,
    w: int,
    which: np.ndarray,
    vcols: np.ndarray,
    ref_parts: np.ndarray,
) -> None:
    """Bound G, ``w_k ≤ ψ_o(x) - ψ_lo,o·(1 - x_o)``, for the options ``cb.touch[which]``.

    Written through the phase's currents, which are columns of the model:
    ``ψ_o(x) = 2·<δ_o, Δ(x)> - Σ_{b of o's circuit} 2·<δ_o, δ_b>·x_b`` with
    ``Δ(x) = V - v_ref = Σ_b x_b·δ_b`` (``vcols``: the parts of ``V`` in the
    order of ``CrossBound.parts``; ``ref_parts``: those of ``v_ref``). The
    rows allow the same points as the explicit ones, with about twice the
    number of orders as coefficients instead of one per partner.
    """
    opts = cb.touch
    rhs = -2.0 * np.einsum("ik,k->i", cb.parts[which], ref_parts)
    for k, a in enumerate(which.tolist()):
        same = np.flatnonzero(cb.own == cb.own[a])  # options of a's circuit, a included
        g_own = 2.0 * np.einsum("ik,k->i", cb.parts[same], cb.parts[a])
        g_own[same == a] -= float(cb.psi_lo[a])
        m.row(
            [w + k, *vcols.tolist(), *(x + opts[same]).tolist()],
            [1.0, *(-2.0 * cb.parts[a]).tolist(), *g_own.tolist()],
            -np.inf,
            float(rhs[k] - cb.psi_lo[a]),
        )


def square_column(
    m: Model,
    x: int,
    sb: SquareBound,
    lazy: set[int],
    lo: float,
    hi: float,
    vcols: np.ndarray | None = None,
) -> int:
    """A column ``S`` in ``[lo, hi]`` with ``S ≤ const + Σ_o lin_o·x_o + X`` (an upper bound)."""
    s = m.var(1, lo, hi)
    nz = np.flatnonzero(sb.lin)
    cols = [s, *(x + nz).tolist()]
    vals = [1.0, *(-sb.lin[nz]).tolist()]
    dense = None if vcols is None else (vcols[2 * sb.first_order :], sb.ref_parts)
    big_x = cross_rows(m, x, sb.cross, lazy, dense)
    if big_x is not None:
        cols.append(big_x)
        vals.append(-1.0)
    m.row(cols, vals, -np.inf, sb.const)
    return s


def square_max(sb: SquareBound) -> float:
    """Largest value the bound on ``S`` can take [A²]."""
    return sb.const + float(np.sum(np.maximum(sb.lin, 0.0))) + max(0.0, sb.cross.upper)


def tangent_points(r_min: float, r_max: float, extra: list[float]) -> np.ndarray:
    """Tangent points ``ρ`` of sqrt from ``r_min`` to ``r_max``, and ``extra`` [A].

    ``sqrt`` is concave, so each tangent ``R ≤ (R² + ρ²)/(2ρ)`` lies above it;
    points on a geometric grid of ratio ``1 + sqrt(8·TANGENT_ERROR)`` keep
    the envelope within :data:`TANGENT_ERROR` of ``sqrt`` over the range.
    """
    ratio = 1.0 + math.sqrt(8.0 * TANGENT_ERROR)
    lo = max(r_min, 1e-9 * max(1.0, r_max))
    count = max(1, math.ceil(math.log(max(r_max, lo) / lo) / math.log(ratio)) + 1)
    pts = lo * ratio ** np.arange(count)
    return np.unique(np.concatenate([pts, [v for v in extra if v > 0]]))
