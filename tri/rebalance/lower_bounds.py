"""Linear lower bounds on a phase's RMS current, and where its fundamental can go.

Both models need ``r ≤ R_p`` rows that hold at *every* plan (so the model
stays a relaxation) and are tight at the plans that matter. They are built
order by order from the polygon bounds of :mod:`tri.rebalance.polygon`.

Rows (:func:`add_rms_lower_bounds`)
-----------------------------------
Variables ``a_h ≥ <I_p,h, d>`` for polygon directions ``d`` of each order
h (the fundamental's over the angles it can reach within the budget, one
every ``step_deg``; each harmonic's around the circle, ``harmonic_sides``;
plus order h's direction at every visited plan; the spacings are those of
a :class:`Resolution`, coarse first, finer as the search asks),
so at the true point ``a_h = max_d <I_p,h, d>`` lies between
``cos(π/m)·|I_p,h|`` and ``|I_p,h|`` (Theorem 1). A harmonic variable
``g ≥ Σ_{h>1} w_h·a_h`` for unit profiles ``w ≥ 0`` (each order alone, and
the order magnitudes of each visited plan) is at most ``||(a_h)_{h>1}|| ≤
G_p`` (Cauchy-Schwarz). Finally ``r ≥ cos β·a_1 + sin β·g`` for β on a grid
of ``tilt_deg`` up to the largest possible ``atan(G_p/|z_p|)``,
and the tilt of every visited plan: at most ``sqrt(a_1² + g²) ≤ R_p``, so
the rows hold at every plan. At a visited plan every step is exact (its
own directions, profile and tilt), so the bound equals ``R_p`` there, like
an outer-approximation cut on the whole spectrum (Theorem 3, Kelley's
cutting planes); elsewhere it is within the polygon errors wherever the
harmonic profile is one already seen, whatever the angles of the harmonic
orders, which change with every move.

Reach (:func:`phase_reach`)
---------------------------
Where phase p's fundamental can be after at most ``budget`` option
changes: its support in a direction n is ``<z_now, n>``, plus each new
circuit's best projection, plus the ``budget`` largest gains
``max_o <c_o - c_now, n>`` of placed circuits; the polygon of these
supports contains every reachable phasor
(:func:`tri.rebalance.polygon.reach_from_support`). A relocation that keeps
the option changes nothing electrically, so the same holds for at most
``budget`` relocations.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tri.rebalance.electrical import Electrical
from tri.rebalance.model import Model
from tri.rebalance.polygon import Reach, polygon_directions, reach_from_support
from tri.rebalance.problem import Problem


@dataclass(frozen=True)
class Resolution:
    """Spacings of the lower-bound polygons (module notes).

    Attributes
    ----------
    step_deg : float
        Between the fundamental's directions [deg]; error ``1 - cos(step/2)``.
    harmonic_sides : int
        Sides of each harmonic order's polygon [-]; error ``1/cos(π/m) - 1`` of
        that order (a harmonic order enters ``R_p`` about as its square over
        ``2·R_p``, so the error on ``R_p`` is a small fraction of that).
    tilt_deg : float
        Between the tilts of fundamental and harmonic RMS [deg].
    """

    step_deg: float
    harmonic_sides: int
    tilt_deg: float


#: Coarse to fine (fundamental errors 0.061 %, 0.015 %, 0.0038 %): models
#: start coarse and small, and refine where a proposal failed.
RESOLUTIONS = (Resolution(4.0, 12, 2.0), Resolution(2.0, 24, 1.0), Resolution(1.0, 36, 0.5))
#: Directions used for the reachable-set support function [-].
REACH_DIRECTIONS = 72


@dataclass(frozen=True)
class PhaseReach:
    """Bounds on phase p within a budget.

    Attributes
    ----------
    fundamental : Reach
        Where the fundamental phasor can be [A, rad].
    harmonic_max : float
        Upper bound on the RMS of the harmonic orders [A].
    """

    fundamental: Reach
    harmonic_max: float

    @property
    def rms_max(self) -> float:
        """Upper bound on the phase's RMS current [A]."""
        return math.hypot(self.fundamental.max_abs, self.harmonic_max)


def unit_spectrum(vec: np.ndarray) -> np.ndarray | None:
    """Unit vector along a spectrum (an outer-approximation cut there), None if zero."""
    nrm = float(np.sqrt(np.sum(np.abs(vec) ** 2)))
    return None if nrm <= 0 else vec / nrm


def _top_gains(gains: np.ndarray, k: int) -> np.ndarray:
    if k <= 0 or gains.shape[0] == 0:
        return np.zeros(gains.shape[1:])
    k = min(k, gains.shape[0])
    return (-np.partition(-gains, k - 1, axis=0)[:k]).sum(axis=0)


def phase_reach(pr: Problem, p: int, budget: int) -> PhaseReach:
    """Where phase p's current can go with at most ``budget`` moves (module notes)."""
    dirs = polygon_directions(REACH_DIRECTIONS)
    c = pr.contrib[:, p, 0]
    proj = np.real(np.conj(dirs)[None, :] * c[:, None])  # (O, m)
    best = np.maximum.reduceat(proj, pr.starts[:-1], axis=0) if pr.n_free else proj[:0]
    placed = pr.movable
    cur = np.where(pr.current >= 0, pr.current, 0)
    now = pr.base[p, 0] + np.sum(c[cur[placed]])
    support = np.real(np.conj(dirs) * now)
    new = ~placed
    if np.any(new):
        support = support + best[new].sum(axis=0)
    support = support + _top_gains(np.maximum(0.0, best[placed] - proj[cur[placed]]), budget)
    reach = reach_from_support(dirs, support)
    # harmonic RMS bound by the triangle inequality
    g = pr.contrib[:, p, 1:]
    g_now = pr.base[p, 1:] + np.sum(g[cur[placed]], axis=0)
    g_max = float(np.sqrt(np.sum(np.abs(g_now) ** 2)))
    if g.shape[1] and pr.n_free:
        gn = np.sqrt(np.sum(np.abs(g) ** 2, axis=-1))
        if np.any(new):
            g_max += float(np.sum(np.maximum.reduceat(gn, pr.starts[:-1])[new]))
        diff = np.sqrt(np.sum(np.abs(g - g[cur[pr.owner]]) ** 2, axis=-1))
        worst = np.maximum.reduceat(diff, pr.starts[:-1])
        g_max += float(np.sum(np.sort(worst[placed])[::-1][: max(0, budget)]))
    return PhaseReach(reach, g_max)


def lower_directions(reach: Reach, step_deg: float) -> np.ndarray:
    """Polygon directions every ``step_deg`` over a reachable cone (Theorem 1).

    Within the cone (widened by one step each side) the nearest direction is
    at most half a step away, so ``max_j <z, u_j> ≥ |z|·cos(step/2)``; outside
    it no plan goes. The whole circle when the cone is.
    """
    step = math.radians(step_deg)
    if reach.angle_stop - reach.angle_start >= 2 * np.pi - 1e-9:
        return polygon_directions(max(3, math.ceil(2 * np.pi / step)))
    lo, hi = reach.angle_start - step, reach.angle_stop + step
    return np.exp(1j * np.linspace(lo, hi, max(2, math.ceil((hi - lo) / step) + 1)))


def _project(m: Model, target: int, re_col: int, im_col: int, dirs: np.ndarray) -> None:
    """Rows ``target ≥ <z, d>`` for each direction ``d`` (z: the two columns)."""
    n = dirs.size
    m.block(
        np.column_stack([np.full(n, target), np.full(n, re_col), np.full(n, im_col)]),
        np.column_stack([np.ones(n), -dirs.real, -dirs.imag]),
        0.0,
        np.inf,
    )


def add_rms_lower_bounds(
    m: Model,
    pr: Problem,
    el: Electrical,
    p: int,
    r_cols: list[int],
    reach: PhaseReach,
    visited: list[np.ndarray],
    resolution: Resolution = RESOLUTIONS[-1],
) -> None:
    """Rows ``r ≥ (lower bound of R_p)`` for each column ``r`` of ``r_cols`` (module notes).

    Parameters
    ----------
    m : Model
    pr : Problem
    el : Electrical
    p : int
        Phase.
    r_cols : list of int
        Columns bounded from below by ``R_p``'s bound.
    reach : PhaseReach
        Where phase p can go within the budget.
    visited : list of complex ndarray, shape (H,)
        Unit spectra ``v/||v||`` of phase p at plans seen so far.
    resolution : Resolution
        Spacings of the polygons.
    """
    cols = el.phase_cols(p)
    h = pr.orders.size
    seen = [u[0] / abs(u[0]) for u in visited if abs(u[0]) > 0]
    base = lower_directions(reach.fundamental, resolution.step_deg)
    fund_dirs = np.concatenate([base, np.array(seen, complex)])
    if h == 1:
        for r in r_cols:
            _project(m, r, int(cols[0]), int(cols[1]), fund_dirs)
        return
    a0 = m.var(h, 0.0, np.inf)
    _project(m, a0, int(cols[0]), int(cols[1]), fund_dirs)
    ring = polygon_directions(resolution.harmonic_sides)
    for k in range(1, h):
        extra = np.array([u[k] / abs(u[k]) for u in visited if abs(u[k]) > 1e-12], dtype=complex)
        _project(m, a0 + k, int(cols[2 * k]), int(cols[2 * k + 1]), np.concatenate([ring, extra]))
    g = m.var(1, 0.0, np.inf)
    profiles = [np.eye(h - 1)[k] for k in range(h - 1)]
    for u in visited:
        mag = np.abs(u[1:])
        nrm = float(np.sqrt(np.sum(mag**2)))
        if nrm > 1e-12:
            profiles.append(mag / nrm)
    prof = np.array(profiles)
    m.block(
        np.column_stack(
            [np.full(len(prof), g), np.tile(a0 + 1 + np.arange(h - 1), (len(prof), 1))]
        ),
        np.column_stack([np.ones(len(prof)), -prof]),
        0.0,
        np.inf,
    )
    beta = _tilts(reach, visited, resolution.tilt_deg)
    for r in r_cols:
        m.block(
            np.column_stack([np.full(beta.size, r), np.full(beta.size, a0), np.full(beta.size, g)]),
            np.column_stack([np.ones(beta.size), -np.cos(beta), -np.sin(beta)]),
            0.0,
            np.inf,
        )


def _tilts(reach: PhaseReach, visited: list[np.ndarray], tilt_deg: float) -> np.ndarray:
    """Tilts β on a grid up to the largest possible, and those of visited plans [rad]."""
    g_max = reach.harmonic_max
    beta_max = math.atan2(g_max, max(reach.fundamental.min_abs, 1e-9 * max(1.0, g_max)))
    step = math.radians(tilt_deg)
    n_beta = max(1, math.ceil(beta_max / step))
    tilts = [math.atan2(float(np.sqrt(np.sum(np.abs(u[1:]) ** 2))), abs(u[0])) for u in visited]
    return np.concatenate([np.linspace(0.0, n_beta * step, n_beta + 1), tilts])
