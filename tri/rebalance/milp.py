"""Mixed-integer programs for the rebalancer, solved by HiGHS through ``scipy.optimize.milp``.

Variables
---------
* ``x_o ∈ {0, 1}``: free circuit ``owner[o]`` takes option ``o``; each
  free circuit takes exactly one option.
* ``V_p,h`` (real and imaginary parts): line current of phase p at order h,
  ``V = base + Σ_o x_o·contrib_o`` — linear in ``x`` because the engine's
  currents add (:mod:`tri.rebalance.problem`).
* ``N_h``: neutral current at the non-triplen orders (when a neutral limit
  is set; the triplen part is the same for every plan).

Constraints shared by every model: one option per circuit; the move budget
``Σ_{placed} (1 - x_current) + Σ displaced ≤ K``; slot capacity on
two-column panels (slots per phase, and the exact window geometry of 2-
and 3-pole breakers — consecutive rows of one column, a breaker that stays
blocks its window, a 1-pole one can be displaced at the cost of a move;
see ``_windows_block``); the neutral limit as cuts ``<N, u> ≤ N_max'``
(Theorem 3 of :mod:`tri.rebalance.polygon`).

Lower bounds on a phase RMS current (both models, :func:`_lower_block`)
-----------------------------------------------------------------------
Order by order: ``a_h ≥ <I_p,h, d>`` over polygon directions (the
fundamental's every degree over the angles it can reach, error 0.0038 %,
Theorem 1; each harmonic's around the circle), then a harmonic RMS
``g ≥ Σ_{h>1} w_h·a_h`` over unit magnitude profiles ``w``, then
``R_p ≥ cos β·a_1 + sin β·g`` over a grid of tilts β. Every row holds at
every plan; the directions, profile and tilt of each plan the solver
proposes are added, so the bound is exact there (like an
outer-approximation cut, Theorem 3) and close wherever the *magnitudes*
of the orders are like those of a plan seen, whatever their angles.

Balance model (:func:`solve_balance`)
-------------------------------------
Minimise ``T`` subject to ``T ≥`` the lower bound of every phase. The
program is a relaxation: its optimum (or HiGHS's dual bound) is a proven
lower bound on the largest phase RMS current of every plan, and a plan
whose exact value reaches it is optimal. The floor ``F`` is a second
bound. This min-max problem is like number partitioning: proofs at tight
gaps are rare, so the search stops once a plan is within ``stop_gap`` of
``F``.

Target model (:func:`solve_target`)
-----------------------------------
Minimise the number of moves subject to the target on the *exact*
deviation ``|R_p - mean R| ≤ t·mean R`` for every phase. ``R_p`` is a
magnitude on both sides, so the program must bound it from above too,
which a magnitude (a convex function) only allows piecewise:

* *Lower side*: as above; and ``R_p ≥ (1 - t)·F`` (a plan meeting the
  target has ``R_p ≥ (1-t)·mean`` and the mean is at least ``F``).
* *Upper side, sector rows*: the angles the fundamental can take within
  the move budget (support function of its reachable set,
  :func:`tri.rebalance.polygon.reach_from_support`) are cut into sectors; a
  binary per sector says which one holds the current, where Theorem 2
  bounds ``|z|`` from above; one extra row bounds it over the whole cone
  without a binary (looser, but it holds in the LP relaxation, which makes
  the root bound useful). Harmonics: ``R = sqrt(|z|² + G²)`` with
  ``G² ≤ q``, the square of the harmonic part as a function of the options
  (:mod:`tri.rebalance.squares`: exact linear terms, the products of
  options bounded by partner, count and Cauchy-Schwarz bounds, and
  exactly — Glover's linearisation — for the options of plans the solver
  proposed); ``sqrt(s² + q)`` is bounded by its tangent in ``q`` and its
  chord in ``s``.
* *Upper side, centred rows* (budgets of at most
  :data:`CENTRED_MAX_CHANGED` changed circuits): ``R_p²`` itself, centred
  on the current plan, with the same bounds on its products, and
  ``R_p ≤ (R_p² + ρ²)/(2ρ)`` for a grid of ``ρ`` (tangents of the concave
  square root). Exact for a phase no move touches and for a phase one
  move touches — the cases where the sector rows are loosest, since a
  phase's harmonic RMS enters them through its smallest possible
  fundamental.
* *Upper side, exact-square model* (small panels with harmonics, after a
  failed proposal): ``R_p²`` with every product of options (McCormick's
  inequalities, exact at integer points) and the same tangents.

With these, **every plan that meets the target exactly satisfies the
program** (it is a relaxation): when the program has no solution with
``k`` moves, no plan with ``k`` moves exists, which is how ``optimal`` is
proven. A plan the program proposes is checked exactly; if it fails (it is
within the slack of the target), the model learns from it (lower-bound
directions, exact products of its options, a tangent at its RMS
currents), is refined (narrower sectors, the exact-square model) and, at
the finest level, the plan is excluded by a no-good cut. Each step keeps
the program a relaxation, so its optimum stays a proven lower bound on
the moves.

When the budget is small enough, the proof is instead a count of every
plan with that many moves, each checked exactly
(:mod:`tri.rebalance.exhaust`); it ignores slot capacity, so it rules out
a superset. Once a plan is known, HiGHS's primal heuristics are off: the
call is then a proof, and they took most of its time.

The approximations are only in what the program accepts; every figure a
plan reports is computed exactly (and again by the engine on the final
schedule).

HiGHS runs with its log off (``disp=False``); the native library can still
print a stray line outside Python's control, so the command line sends the
process's standard output elsewhere while it runs (a user interface should
do the same, or run the search in a subprocess).
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp
from scipy.sparse import coo_matrix

from tri.rebalance.control import Control
from tri.rebalance.exhaust import enumeration_fits, plans_within
from tri.rebalance.heuristic import Goal
from tri.rebalance.polygon import (
    DEFAULT_SIDES,
    Reach,
    polygon_directions,
    reach_from_support,
    sectors,
)
from tri.rebalance.problem import Problem, rms, spectra
from tri.rebalance.realise import occupants, windows
from tri.rebalance.squares import CrossBound, SquareBound, changed_max, gram, square_bound

#: Sector widths of the target model, coarse to fine [deg]; upper-bound
#: errors ``1/cos(w/2) - 1`` of 0.24 %, 0.034 %, 0.0038 % (levels pair with
#: :data:`TANGENT_ERRORS` in the exact-square model).
SECTOR_WIDTHS_DEG = (4.0, 2.0, 1.0)
#: Spacing of the lower-bound polygon over a phase's reachable angles [deg]
#: (error ``1 - cos(0.5°)`` = 0.0038 %).
LOWER_STEP_DEG = 1.0
#: Directions used for the reachable-set support function [-].
REACH_DIRECTIONS = 72
#: Relative improvement the balance model must find over the incumbent [-].
IMPROVE = 1e-7
#: Relative gap at which a balance plan counts as proven optimal [-].
PROVEN_GAP = 1e-6

Verifier = Callable[[np.ndarray], tuple[bool, bool]]
"""``verify(assign) -> (meets the goal and the budget exactly, realisable in slots)``."""
Counter = Callable[[np.ndarray], int]
"""``count(assign) -> breakers relocated`` (slot realisation included)."""


@dataclass
class Outcome:
    """What a solver loop found.

    Attributes
    ----------
    assign : int ndarray or None
        Best plan (option per free circuit), None if none meets the goal.
    proven : bool
        True when the plan is proven optimal (or, with no plan, the goal is
        proven impossible).
    bound : float or None
        Proven lower bound on the objective: moves (target) or the largest
        phase RMS current [A] (balance).
    solver_calls : int
        HiGHS calls made.
    notes : list of str
        Plain remarks for the report.
    """

    assign: np.ndarray | None
    proven: bool
    bound: float | None
    solver_calls: int = 0
    notes: list[str] = field(default_factory=list)


# -- model assembly ------------------------------------------------------------------
class _Model:
    """Sparse rows and typed variables, assembled for one ``milp`` call."""

    def __init__(self) -> None:
        self.lb: list[np.ndarray] = []
        self.ub: list[np.ndarray] = []
        self.integer: list[np.ndarray] = []
        self.n = 0
        self.rows: list[np.ndarray] = []
        self.cols: list[np.ndarray] = []
        self.vals: list[np.ndarray] = []
        self.row_lo: list[np.ndarray] = []
        self.row_hi: list[np.ndarray] = []
        self.n_rows = 0

    def var(self, count: int, lb, ub, integer: bool = False) -> int:
        start = self.n
        self.lb.append(np.broadcast_to(np.asarray(lb, dtype=float), (count,)).copy())
        self.ub.append(np.broadcast_to(np.asarray(ub, dtype=float), (count,)).copy())
        self.integer.append(np.full(count, 1 if integer else 0, dtype=np.uint8))
        self.n += count
        return start

    def row(self, cols, vals, lo: float, hi: float) -> None:
        cols = np.asarray(cols, dtype=np.int64).ravel()
        self.rows.append(np.full(cols.size, self.n_rows, dtype=np.int64))
        self.cols.append(cols)
        self.vals.append(np.asarray(vals, dtype=float).ravel())
        self.row_lo.append(np.array([lo], dtype=float))
        self.row_hi.append(np.array([hi], dtype=float))
        self.n_rows += 1

    def block(self, cols, vals, lo, hi) -> None:
        """Rows of equal length at once: ``cols`` and ``vals`` of shape (rows, k)."""
        cols = np.atleast_2d(np.asarray(cols, dtype=np.int64))
        vals = np.broadcast_to(np.asarray(vals, dtype=float), cols.shape)
        k = cols.shape[0]
        if k == 0:
            return
        self.rows.append(np.repeat(np.arange(self.n_rows, self.n_rows + k), cols.shape[1]))
        self.cols.append(cols.ravel())
        self.vals.append(np.ascontiguousarray(vals).ravel())
        self.row_lo.append(np.broadcast_to(np.asarray(lo, dtype=float), (k,)).copy())
        self.row_hi.append(np.broadcast_to(np.asarray(hi, dtype=float), (k,)).copy())
        self.n_rows += k

    def solve(
        self,
        cost: np.ndarray,
        time_limit: float,
        gap: float = 1e-6,
        presolve: bool = True,
        heuristics: bool = True,
    ):
        n_rows = self.n_rows
        a = coo_matrix(
            (np.concatenate(self.vals), (np.concatenate(self.rows), np.concatenate(self.cols))),
            shape=(n_rows, self.n),
        ).tocsr()
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return milp(
                cost,
                integrality=np.concatenate(self.integer),
                bounds=Bounds(np.concatenate(self.lb), np.concatenate(self.ub)),
                constraints=LinearConstraint(
                    a, np.concatenate(self.row_lo), np.concatenate(self.row_hi)
                ),
                options={
                    "disp": False,
                    "time_limit": max(0.01, float(time_limit)),
                    "mip_rel_gap": gap,
                    "presolve": presolve,
                    **({} if heuristics else _NO_HEURISTICS),
                },
            )


#: HiGHS options (passed through by scipy) that turn its primal heuristics off [-].
_NO_HEURISTICS = {
    "mip_heuristic_effort": 0.0,
    "mip_heuristic_run_feasibility_jump": False,
    "mip_heuristic_run_rins": False,
    "mip_heuristic_run_rens": False,
    "mip_heuristic_run_root_reduced_cost": False,
    "mip_heuristic_run_zi_round": False,
    "mip_heuristic_run_shifting": False,
}


@dataclass
class _Vars:
    x: int
    v: int  # 3·H·2: index v + (p·H + h)·2 + {0 re, 1 im}
    n: int | None  # neutral, 2·H
    h: int
    disp: list[int] = field(default_factory=list)  # displaced 1-pole breakers (a move each)


def _windows_block(m: _Model, pr: Problem, x: int) -> list[int]:
    """Exact window geometry for 2- and 3-pole breakers that move or are placed.

    Binary ``y_w`` per window clear of fixed circuits: windows sharing a slot
    exclude each other; a window over a breaker that keeps its option needs
    that breaker gone — impossible for a 2-/3-pole one, a *displacement*
    ``d_j`` (one more move) for a 1-pole one; each moving multi-pole option
    of a type needs one window of that type. Returns the ``d`` columns.
    """
    wins = windows(pr)
    occ = occupants(pr)
    y = m.var(len(wins), 0.0, 1.0, integer=True)
    singles = sorted({occ[s] for w in wins for s in w.cells if s in occ and pr.poles[occ[s]] == 1})
    d = m.var(len(singles), 0.0, 1.0, integer=True)
    dcol = {j: d + k for k, j in enumerate(singles)}
    by_cell: dict[int, list[int]] = {}
    for k, w in enumerate(wins):
        for s in w.cells:
            by_cell.setdefault(s, []).append(y + k)
        for j in sorted({occ[s] for s in w.cells if s in occ}):
            cur = x + int(pr.current[j])
            if pr.poles[j] > 1:
                m.row([y + k, cur], [1.0, 1.0], -np.inf, 1.0)
            else:
                m.row([y + k, cur, dcol[j]], [1.0, 1.0, -1.0], -np.inf, 1.0)
    for ks in by_cell.values():
        if len(ks) > 1:
            m.row(ks, np.ones(len(ks)), -np.inf, 1.0)
    for j in singles:
        m.row([dcol[j], x + int(pr.current[j])], [1.0, -1.0], -np.inf, 0.0)
    current = set(pr.current[pr.current >= 0].tolist())
    for t in range(pr.use_window.shape[1]):
        opts = [int(o) for o in np.flatnonzero(pr.use_window[:, t]) if int(o) not in current]
        if not opts:
            continue
        ys = [y + k for k, w in enumerate(wins) if w.type == t]
        m.row(
            np.concatenate([x + np.array(opts), np.array(ys, dtype=int)]),
            np.concatenate([np.ones(len(opts)), -np.ones(len(ys))]),
            -np.inf,
            0.0,
        )
    return [dcol[j] for j in singles]


def _base_model(
    pr: Problem, goal: Goal, budget: int | None, nogoods: list[np.ndarray], neutral: bool
) -> tuple[_Model, _Vars]:
    m = _Model()
    h = pr.orders.size
    x = m.var(pr.n_options, 0.0, 1.0, integer=True)
    v = m.var(6 * h, -np.inf, np.inf)
    nv = m.var(2 * h, -np.inf, np.inf) if neutral else None
    # one option per circuit
    for i in range(pr.n_free):
        o = np.arange(pr.starts[i], pr.starts[i + 1])
        m.row(x + o, np.ones(o.size), 1.0, 1.0)
    # currents: V_p,h - Σ x_o·contrib = base
    for p in range(3):
        for k in range(h):
            c = pr.contrib[:, p, k]
            for part, (coef, rhs) in enumerate(
                ((c.real, pr.base[p, k].real), (c.imag, pr.base[p, k].imag))
            ):
                nz = np.flatnonzero(coef)
                m.row(
                    np.concatenate([[v + (p * h + k) * 2 + part], x + nz]),
                    np.concatenate([[1.0], -coef[nz]]),
                    rhs,
                    rhs,
                )
    if nv is not None:
        for k in range(h):
            c = pr.ncontrib[:, k]
            for part, (coef, rhs) in enumerate(
                ((c.real, pr.nbase[k].real), (c.imag, pr.nbase[k].imag))
            ):
                nz = np.flatnonzero(coef)
                m.row(
                    np.concatenate([[nv + 2 * k + part], x + nz]),
                    np.concatenate([[1.0], -coef[nz]]),
                    rhs,
                    rhs,
                )
    disp: list[int] = []
    if pr.slots and np.any(pr.use_window):
        disp = _windows_block(m, pr, x)
    # move budget: Σ_placed x_current - Σ displaced ≥ n_placed - K
    placed = np.flatnonzero(pr.movable)
    if budget is not None and placed.size and budget < placed.size + len(disp):
        m.row(
            np.concatenate([x + pr.current[placed], np.array(disp, dtype=int)]),
            np.concatenate([np.ones(placed.size), -np.ones(len(disp))]),
            placed.size - budget,
            np.inf,
        )
    # slot capacity
    if pr.slots:
        total = pr.cap_cells.sum(axis=1)
        for p in range(3):
            nz = np.flatnonzero(pr.use_cells[:, p])
            if nz.size:
                m.row(x + nz, pr.use_cells[nz, p], -np.inf, float(total[p]))
        for t in range(pr.use_window.shape[1]):
            nz = np.flatnonzero(pr.use_window[:, t])
            if nz.size:
                m.row(x + nz, np.ones(nz.size), -np.inf, float(pr.cap_window[t]))
    for bad in nogoods:
        m.row(x + bad, np.ones(bad.size), -np.inf, bad.size - 1.0)
    return m, _Vars(x=x, v=v, n=nv, h=h, disp=disp)


def _phase_cols(vars_: _Vars, p: int) -> np.ndarray:
    """Columns of the real/imaginary parts of phase p, order by order."""
    return vars_.v + (p * vars_.h) * 2 + np.arange(2 * vars_.h)


def _unit_rows(u: np.ndarray) -> np.ndarray:
    """Complex direction per order -> interleaved real coefficients (re, im)."""
    u = np.asarray(u, dtype=complex)
    return np.column_stack([u.real, u.imag]).ravel()


def _neutral_cuts(
    m: _Model, vars_: _Vars, pr: Problem, limit: float, directions: list[np.ndarray]
) -> None:
    """``<N_nontriplen, u> ≤ limit`` for each direction (a relaxation of ``||N|| ≤ limit``)."""
    assert vars_.n is not None
    cols = vars_.n + np.arange(2 * vars_.h)
    for u in directions:
        m.row(cols, _unit_rows(u), -np.inf, limit)


def _lower_directions(reach: Reach) -> np.ndarray:
    """Polygon directions every :data:`LOWER_STEP_DEG` over a reachable cone (Theorem 1).

    Within the cone (widened by one step each side) the nearest direction is
    at most half a step away, so ``max_j <z, u_j> ≥ |z|·cos(step/2)``; outside
    it no plan goes. The whole circle when the cone is.
    """
    step = math.radians(LOWER_STEP_DEG)
    if reach.angle_stop - reach.angle_start >= 2 * np.pi - 1e-9:
        return polygon_directions(max(3, math.ceil(2 * np.pi / step)))
    lo, hi = reach.angle_start - step, reach.angle_stop + step
    return np.exp(1j * np.linspace(lo, hi, max(2, math.ceil((hi - lo) / step) + 1)))


#: Sides of the polygon bounding each harmonic order's magnitude from below
#: (error ``1/cos(π/m) - 1`` = 0.86 % of that order, Theorem 1; a harmonic
#: order enters ``R_p`` about as its square over ``2·R_p``, so the error on
#: ``R_p`` is a small fraction of that; the directions of visited plans make
#: it exact there). Measured: 24 sides prove the 500-circuit benchmark
#: panels about 30 % faster than 72, with no more failed proposals [-].
HARMONIC_SIDES = 24
#: Spacing of the tilt between fundamental and harmonic RMS in the lower bound [deg].
TILT_STEP_DEG = 0.5


def _lower_block(
    m: _Model,
    pr: Problem,
    vars_: _Vars,
    p: int,
    r_cols: list[int],
    reach: Reach,
    visited: list[np.ndarray],
    budget: int,
) -> None:
    """Rows ``r ≥ (lower bound of R_p)`` for each column ``r`` of ``r_cols``, order by order.

    Parameters
    ----------
    m : _Model
    pr : Problem
    vars_ : _Vars
    p : int
        Phase.
    r_cols : list of int
        Columns bounded from below by ``R_p``'s bound.
    reach : Reach
        Where phase p's fundamental can go within the budget.
    visited : list of complex ndarray, shape (H,)
        Unit spectra ``v/||v||`` of phase p at plans seen so far.
    budget : int
        Largest number of moves [-].

    Notes
    -----
    Variables ``a_h ≥ <I_p,h, d>`` for polygon directions ``d`` of each order
    h (the fundamental's over its reachable cone every
    :data:`LOWER_STEP_DEG`; each harmonic's around the circle,
    :data:`HARMONIC_SIDES`; plus order h's direction at every visited
    plan), so at the true point ``a_h = max_d <I_p,h, d>`` lies between
    ``cos(π/m)·|I_p,h|`` and ``|I_p,h|`` (Theorem 1 of
    :mod:`tri.rebalance.polygon`). A harmonic variable
    ``g ≥ Σ_{h>1} w_h·a_h`` for unit profiles ``w ≥ 0`` (each order alone,
    and the order magnitudes of each visited plan) is at most
    ``||(a_h)_{h>1}|| ≤ G_p`` (Cauchy-Schwarz). Finally
    ``r ≥ cos β·a_1 + sin β·g`` for β on a grid of :data:`TILT_STEP_DEG` up
    to the largest possible ``atan(G_p/|z_p|)``: at most
    ``sqrt(a_1² + g²) ≤ R_p``, so the rows hold at every plan, and at least
    ``cos(step/2)·sqrt(a_1² + g²)``; the tilt of every visited plan is on
    the grid too. At a visited plan every step is exact (its own directions,
    profile and tilt), so the bound equals ``R_p`` there, like a cut on the
    whole spectrum (Theorem 3); elsewhere it is within the polygon errors
    wherever the harmonic profile is one already seen, whatever the angles
    of the harmonic orders, which change with every move.
    """
    cols = _phase_cols(vars_, p)
    base_dirs = _lower_directions(reach)
    h = pr.orders.size

    def project(target: int, k: int, dirs: np.ndarray) -> None:
        n = dirs.size
        m.block(
            np.column_stack(
                [np.full(n, target), np.full(n, cols[2 * k]), np.full(n, cols[2 * k + 1])]
            ),
            np.column_stack([np.ones(n), -dirs.real, -dirs.imag]),
            0.0,
            np.inf,
        )

    seen = [u[0] / abs(u[0]) for u in visited if abs(u[0]) > 0]
    fund_dirs = np.concatenate([base_dirs, np.array(seen, dtype=complex)])
    if h == 1:
        for r in r_cols:
            project(r, 0, fund_dirs)
        return
    a0 = m.var(h, 0.0, np.inf)
    project(a0, 0, fund_dirs)
    ring = polygon_directions(HARMONIC_SIDES)
    for k in range(1, h):
        extra = np.array([u[k] / abs(u[k]) for u in visited if abs(u[k]) > 1e-12], dtype=complex)
        project(a0 + k, k, np.concatenate([ring, extra]))
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
    _, g_max, _ = phase_reach(pr, p, budget)
    beta_max = math.atan2(g_max, max(reach.min_abs, 1e-9 * max(1.0, g_max)))
    step = math.radians(TILT_STEP_DEG)
    n_beta = max(1, math.ceil(beta_max / step))
    # and the tilt of each visited plan, where the rows are then exact
    tilts = [math.atan2(float(np.sqrt(np.sum(np.abs(u[1:]) ** 2))), abs(u[0])) for u in visited]
    beta = np.concatenate([np.linspace(0.0, n_beta * step, n_beta + 1), tilts])
    for r in r_cols:
        m.block(
            np.column_stack([np.full(beta.size, r), np.full(beta.size, a0), np.full(beta.size, g)]),
            np.column_stack([np.ones(beta.size), -np.cos(beta), -np.sin(beta)]),
            0.0,
            np.inf,
        )


def _oa(vec: np.ndarray) -> np.ndarray | None:
    """Unit vector along a spectrum (an outer-approximation cut there)."""
    nrm = float(np.sqrt(np.sum(np.abs(vec) ** 2)))
    return None if nrm <= 0 else vec / nrm


def _neutral_limit(pr: Problem, goal: Goal) -> float | None:
    """Limit on the non-triplen neutral RMS [A]; -1 when triplens alone exceed it."""
    if goal.neutral_max_a is None or not pr.has_neutral:
        return None
    _, n = spectra(pr, pr.current_assignment())
    trip = float(rms(n[pr.orders % 3 == 0]))
    if trip > goal.neutral_max_a:
        return -1.0
    return math.sqrt(goal.neutral_max_a**2 - trip**2)


def _decode(pr: Problem, x: np.ndarray, start: int) -> np.ndarray:
    vals = np.asarray(x[start : start + pr.n_options])
    out = np.empty(pr.n_free, dtype=int)
    for i in range(pr.n_free):
        seg = vals[pr.starts[i] : pr.starts[i + 1]]
        out[i] = pr.starts[i] + int(np.argmax(seg))
    return out


def _neutral_dirs(pr: Problem) -> list[np.ndarray]:
    h = pr.orders.size
    out = []
    for d in polygon_directions(DEFAULT_SIDES):
        u = np.zeros(h, dtype=complex)
        u[0] = d
        out.append(u)
    return out


def _nontriplen(pr: Problem, n: np.ndarray) -> np.ndarray:
    out = np.array(n, dtype=complex, copy=True)
    out[pr.orders % 3 == 0] = 0
    return out


def _infeasible(res) -> bool:
    """True only when HiGHS proved the model infeasible (not on a model error)."""
    return res.status == 2 and "nfeasible" in str(getattr(res, "message", ""))


def _failed(res) -> bool:
    """True when HiGHS stopped on an error rather than a result or a limit."""
    return res.status in (2, 3, 4) and not _infeasible(res)


def _dual_bound(res) -> float | None:
    b = getattr(res, "mip_dual_bound", None)
    if b is None or not np.isfinite(b):
        return None
    return float(b)


# -- balance ---------------------------------------------------------------------------
def solve_balance(
    pr: Problem,
    goal: Goal,
    control: Control,
    incumbent: np.ndarray | None,
    verify: Verifier,
    *,
    stop_gap: float = 1e-3,
) -> Outcome:
    """Minimise the largest phase RMS current within the move budget (module notes).

    Parameters
    ----------
    pr : Problem
    goal : Goal
        ``target`` is ignored; ``max_moves`` and ``neutral_max_a`` apply.
    control : Control
    incumbent : int ndarray or None
        A plan to beat (from the heuristic); it must be realisable.
    verify : callable
        Exact check of a plan (neutral limit, realisable in slots).
    stop_gap : float
        Stop once the incumbent is within this fraction of the floor ``F``
        (the solver rarely proves tighter gaps on this min-max problem) [-].

    Returns
    -------
    Outcome
        ``bound`` is a proven lower bound on the largest phase RMS [A].
    """
    out = Outcome(assign=incumbent, proven=False, bound=pr.floor_a)
    nlim = _neutral_limit(pr, goal)
    if nlim is not None and nlim < 0:
        out.proven = True
        out.assign = None
        out.notes.append("triplen harmonics alone exceed the neutral limit")
        return out

    def value(a: np.ndarray) -> float:
        v, _ = spectra(pr, a)
        return float(rms(v).max())

    best = value(incumbent) if incumbent is not None else math.inf
    lower = pr.floor_a
    if best <= lower * (1 + PROVEN_GAP):
        out.proven = True
        out.bound = lower
        return out
    ref_v, _ = spectra(pr, incumbent if incumbent is not None else pr.current_assignment())
    budget = pr.n_movable if goal.max_moves is None else min(goal.max_moves, pr.n_movable)
    reaches = [phase_reach(pr, p, budget)[0] for p in range(3)]
    visited: list[list[np.ndarray]] = [[], [], []]
    for p in range(3):
        u = _oa(ref_v[p])
        if u is not None:
            visited[p].append(u)
    ncuts = _neutral_dirs(pr) if nlim is not None else []
    nogoods: list[np.ndarray] = []
    exact_proof = True
    slice_s = 0.25
    while not control.stop():
        if best <= pr.floor_a * (1 + stop_gap) or best <= lower * (1 + PROVEN_GAP):
            break
        m, vars_ = _base_model(pr, goal, goal.max_moves, nogoods, nlim is not None)
        t = m.var(1, lower, np.inf)
        for p in range(3):
            _lower_block(m, pr, vars_, p, [t], reaches[p], visited[p], budget)
        if nlim is not None:
            _neutral_cuts(m, vars_, pr, nlim, ncuts)
        if math.isfinite(best):
            m.row([t], [1.0], -np.inf, best * (1 - IMPROVE))
        cost = np.zeros(m.n)
        cost[t] = 1.0
        control.report(f"solver: looking for a plan below {best:.2f} A (bound {lower:.2f} A)")
        res = m.solve(cost, min(slice_s, control.remaining()), gap=PROVEN_GAP / 10)
        out.solver_calls += 1
        if _failed(res):
            out.notes.append(f"the solver stopped: {res.message}")
            break
        if _infeasible(res):  # nothing better than the incumbent exists
            if math.isfinite(best) and exact_proof:
                lower = max(lower, best * (1 - IMPROVE))
            elif exact_proof:
                out.proven = True  # no plan at all fits
            break
        db = _dual_bound(res)
        if res.status == 0 and res.fun is not None:
            lower = max(lower, float(res.fun))
        elif db is not None:
            lower = max(lower, db)
        if res.x is None:
            # nothing found: the same model again would repeat the work, so
            # the next call gets the rest of the time (or twice the slice when
            # a cancel must be seen between calls)
            slice_s = 2 * slice_s if control.can_cancel else control.remaining()
            continue
        a = _decode(pr, res.x, vars_.x)
        v, n = spectra(pr, a)
        val = float(rms(v).max())
        for p in range(3):
            u = _oa(v[p])
            if u is not None:
                visited[p].append(u)
        if nlim is not None:
            u = _oa(_nontriplen(pr, n))
            if u is not None:
                ncuts.append(u)
        ok, realisable = verify(a)
        if not realisable:
            nogoods.append(a)
            exact_proof = False
        elif ok and val < best:
            best = val
            out.assign = a
        if res.status == 0 and best <= lower * (1 + PROVEN_GAP):
            out.proven = True
            break
        if res.status != 0:
            slice_s *= 2
    out.bound = max(lower, pr.floor_a)
    if out.assign is not None and best <= out.bound * (1 + PROVEN_GAP):
        out.proven = True
    if not exact_proof:
        out.notes.append("a plan could not be fitted into the slots and was skipped")
    return out


# -- fewest moves to a target -------------------------------------------------------
def phase_reach(pr: Problem, p: int, budget: int) -> tuple[Reach, float, np.ndarray]:
    """Where phase p's fundamental can go with at most ``budget`` moves.

    Parameters
    ----------
    pr : Problem
    p : int
        Phase index.
    budget : int
        Largest number of moves [-].

    Returns
    -------
    reach : Reach
        Bounds on the fundamental phasor [A, rad].
    g_max : float
        Upper bound on the RMS of phase p's harmonic orders [A].
    support : float ndarray
        The support values used [A].

    Notes
    -----
    Support in direction n: ``<z_now, n>`` plus, for each new circuit, its
    best option's projection, plus the ``budget`` largest positive gains
    ``max_o <c_o - c_now, n>`` of placed circuits: an upper bound on
    ``max <z, n>`` over every plan (capacity ignored, so a superset).
    """
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
    gains = np.maximum(0.0, best[placed] - proj[cur[placed]])
    k = min(budget, gains.shape[0])
    if k > 0:
        top = -np.partition(-gains, k - 1, axis=0)[:k]
        support = support + top.sum(axis=0)
    reach = reach_from_support(dirs, support)
    # harmonic RMS bound by the triangle inequality
    g = pr.contrib[:, p, 1:]
    g_now = pr.base[p, 1:] + np.sum(g[cur[placed]], axis=0)
    g_max = float(np.sqrt(np.sum(np.abs(g_now) ** 2)))
    if g.shape[1]:
        gn = np.sqrt(np.sum(np.abs(g) ** 2, axis=-1))
        if np.any(new):
            seg = np.maximum.reduceat(gn, pr.starts[:-1]) if pr.n_free else gn[:0]
            g_max += float(np.sum(seg[new]))
        diff = np.sqrt(np.sum(np.abs(g - g[cur[pr.owner]]) ** 2, axis=-1))
        worst = np.maximum.reduceat(diff, pr.starts[:-1]) if pr.n_free else diff[:0]
        wp = np.sort(worst[placed])[::-1][:k]
        g_max += float(np.sum(wp))
    return reach, g_max, support


#: Largest number of option products for the exact-square target model [-].
MAX_PRODUCTS = 5000
#: Tangent-envelope error of sqrt in the exact-square model, coarse to fine [-].
TANGENT_ERRORS = (1e-3, 1e-4, 1e-5)
#: Relative error of the tangent envelope of sqrt in the centred rows [-]
#: (between tangent points ``ρ`` and ``ρ·q``, ``(R² + ρ²)/(2ρ) ≤ R·(1 + (q - 1)²/8)``).
CENTRED_TANGENT_ERROR = 1e-5
#: Largest number of changed circuits for which the centred rows are added: beyond
#: it their bounds on the products are loose and only make the model larger [-].
CENTRED_MAX_CHANGED = 8


def square_terms(
    pr: Problem,
) -> tuple[list[tuple[float, np.ndarray]], dict[tuple[int, int], list[float]]]:
    """``R_p² = const_p + Σ_o lin_p,o·x_o + Σ_{o<o'} coef_p,oo'·x_o·x_o'`` exactly.

    Parameters
    ----------
    pr : Problem

    Returns
    -------
    linear : list of (const [A²], lin [A²] shape (O,)), one per phase
    products : dict
        ``(o, o') -> [coef for phase 0, 1, 2]`` [A²], options of different
        circuits whose changes to some phase are not orthogonal.

    Notes
    -----
    ``v_p = v_ref + Σ_o x_o·δ_o`` with ``δ_o`` the change option ``o`` makes to
    phase p's spectrum (0 for the reference option). Expanding
    ``||v_p||²`` and using ``x_o² = x_o`` and ``x_o·x_o' = 0`` for two options
    of one circuit gives the stated form.
    """
    ref = pr.current_assignment()
    linear = []
    products: dict[tuple[int, int], list[float]] = {}
    for p in range(3):
        c = pr.contrib[:, p, :]
        v_ref = pr.base[p] + (np.sum(c[ref], axis=0) if pr.n_free else 0)
        delta = c - c[ref[pr.owner]] if pr.n_free else c
        size2 = np.sum(np.abs(delta) ** 2, axis=-1)
        lin = 2.0 * np.real(np.sum(np.conj(v_ref)[None, :] * delta, axis=-1)) + size2
        linear.append((float(np.sum(np.abs(v_ref) ** 2)), lin))
        scale = max(float(np.sqrt(np.max(size2, initial=0.0))), 1e-300)
        active = np.flatnonzero(size2 > (1e-9 * scale) ** 2)
        if active.size > 2 * math.isqrt(2 * MAX_PRODUCTS) + 2:
            products[(-1, -1)] = [0.0, 0.0, 0.0]  # too many: signal the caller
            continue
        g = gram(delta[active])
        own = pr.owner[active]
        ia, ib = np.triu_indices(active.size, 1)
        keep = (own[ia] != own[ib]) & (g[ia, ib] != 0.0)
        for a_i, b_i in zip(ia[keep], ib[keep], strict=True):
            key = (int(active[a_i]), int(active[b_i]))
            products.setdefault(key, [0.0, 0.0, 0.0])[p] = float(g[a_i, b_i])
    return linear, products


def _exact_square_fits(pr: Problem) -> bool:
    """True when the exact-square model is small enough (harmonics present)."""
    if pr.orders.size == 1:
        return False
    _, prods = square_terms(pr)
    return (-1, -1) not in prods and len(prods) <= MAX_PRODUCTS


def _cross_rows(
    m: _Model,
    x: int,
    cb: CrossBound,
    lazy: set[int],
    dense: tuple[np.ndarray, np.ndarray] | None = None,
) -> int | None:
    """A column ``X`` with ``X ≤`` bounds A, B, C and (for ``lazy`` options) G.

    Bounds of :mod:`tri.rebalance.squares`: every plan with at most
    ``changed_max`` changed circuits satisfies them at its true cross term
    (with ``w_o = x_o·ψ_o``, ``t = [m ≥ 1]``), so a row ``S ≤ ... + X`` keeps
    the model a relaxation. None when no product can be nonzero.
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
        # bound G: w ≤ ψ(x) - ψ_lo·(1 - x)
        if dense is not None:
            _glover_rows(m, x, cb, w, la, *dense)
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
        t = m.var(1, 0.0, 1.0, integer=True)
        m.row([*xs, t], [*([1.0] * len(xs)), -float(cb.changed_max)], -np.inf, 0.0)
        m.row([big_x, *xs, t], [1.0, *([-cb.slope] * len(xs)), cb.slope], -np.inf, 0.0)
    # bound C
    m.row([big_x, *xs], [1.0, *(-(cb.changed_max - 1) * cb.size2).tolist()], -np.inf, 0.0)
    return big_x


def _glover_rows(
    m: _Model,
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
    Gram matrix has the rank of a spectrum (twice the number of orders), so
    a row needs about that many coefficients instead of one per partner;
    the rows allow the same points as the explicit ones.
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


def _square_column(
    m: _Model,
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
    big_x = _cross_rows(m, x, sb.cross, lazy, dense)
    if big_x is not None:
        cols.append(big_x)
        vals.append(-1.0)
    m.row(cols, vals, -np.inf, sb.const)
    return s


def _square_max(sb: SquareBound) -> float:
    """Largest value the bound on ``S`` can take [A²]."""
    return sb.const + float(np.sum(np.maximum(sb.lin, 0.0))) + max(0.0, sb.cross.upper)


def _tangent_points(r_min: float, r_max: float, extra: list[float]) -> np.ndarray:
    """Tangent points ``ρ`` of sqrt from ``r_min`` to ``r_max``, and ``extra`` [A]."""
    ratio = 1.0 + math.sqrt(8.0 * CENTRED_TANGENT_ERROR)
    lo = max(r_min, 1e-9 * max(1.0, r_max))
    count = max(1, math.ceil(math.log(max(r_max, lo) / lo) / math.log(ratio)) + 1)
    pts = lo * ratio ** np.arange(count)
    return np.unique(np.concatenate([pts, [v for v in extra if v > 0]]))


@dataclass
class _Refine:
    """What the target loop learnt from proposals that failed the exact check.

    Attributes
    ----------
    cuts : list of list of complex ndarray
        Unit spectra of visited plans, per phase (lower bounds).
    lazy : list of set of int
        Options whose products are bounded exactly (bound G), per phase.
    rms : list of list of float
        Phase RMS currents of visited plans (tangent points) [A].
    """

    cuts: list[list[np.ndarray]] = field(default_factory=lambda: [[], [], []])
    lazy: list[set[int]] = field(default_factory=lambda: [set(), set(), set()])
    rms: list[list[float]] = field(default_factory=lambda: [[], [], []])

    def learn(self, pr: Problem, assign: np.ndarray) -> None:
        """Cuts, exact products and tangent points at a proposed plan."""
        v, _ = spectra(pr, assign)
        ref = pr.current_assignment()
        changed = np.asarray(assign)[np.asarray(assign) != ref]
        for p in range(3):
            u = _oa(v[p])
            if u is not None:
                self.cuts[p].append(u)
            self.rms[p].append(float(rms(v[p])))
            self.lazy[p].update(int(o) for o in changed)


def _target_model(
    pr: Problem,
    goal: Goal,
    target: float,
    budget: int,
    level: int,
    nogoods: list[np.ndarray],
    refine: _Refine,
    ncuts: list[np.ndarray],
    nlim: float | None,
    exact_square: bool = False,
) -> tuple[_Model, _Vars, np.ndarray]:
    m, vars_ = _base_model(pr, goal, budget, nogoods, nlim is not None)
    width = math.radians(SECTOR_WIDTHS_DEG[level])
    linear, products = square_terms(pr) if exact_square else ([], {})
    reaches = [phase_reach(pr, p, budget) for p in range(3)]
    g_maxes = [g for _, g, _ in reaches]
    r_maxes = [math.hypot(r.max_abs, g) * (1 + 1e-9) + 1e-9 for r, g, _ in reaches]
    # every plan meeting the target has R_p ≥ (1 - t)·mean ≥ (1 - t)·F (problem notes)
    r_min = min((1.0 - target) * pr.floor_a * (1 - 1e-9), min(r_maxes))
    r0 = m.var(3, max(0.0, r_min), r_maxes)
    ref_v, _ = spectra(pr, pr.current_assignment())
    harmonics = pr.orders.size > 1
    for p in range(3):
        reach = reaches[p][0]
        r_max = r_maxes[p]
        fund = _phase_cols(vars_, p)[:2]
        # lower bounds: order by order over the reachable angles
        ref_u = _oa(ref_v[p])
        visited = [*([ref_u] if ref_u is not None else []), *refine.cuts[p]]
        _lower_block(m, pr, vars_, p, [r0 + p], reach, visited, budget)
        if exact_square:
            continue
        # upper bound 1: the square of R_p centred on the current plan, and
        # tangents of sqrt (exact at the current plan and one change away)
        pcols = _phase_cols(vars_, p)
        if changed_max(pr, budget) <= CENTRED_MAX_CHANGED:
            sq = square_bound(pr, p, budget)
            s_col = _square_column(m, vars_.x, sq, refine.lazy[p], -np.inf, np.inf, pcols)
            rhos = _tangent_points(r_min, r_max, [math.sqrt(sq.const), *refine.rms[p]])
            m.block(
                np.column_stack([np.full(rhos.size, r0 + p), np.full(rhos.size, s_col)]),
                np.column_stack([np.ones(rhos.size), -0.5 / rhos]),
                -np.inf,
                0.5 * rhos,
            )
        # upper bound 2: sectors (Theorem 2) for |z|, harmonics through q ≥ G²
        sec = sectors(reach.angle_start, reach.angle_stop, width)
        hs = square_bound(pr, p, budget, harmonics_only=True) if harmonics else None
        # a plan meeting the target has R_p ≥ (1 - t)·mean ≥ (1 - t)·F, so
        # |z_p| = sqrt(R_p² - G_p²) ≥ sqrt(((1 - t)·F)² - G_max²)
        floor_r = (1.0 - target) * pr.floor_a
        s_floor = math.sqrt(max(0.0, floor_r**2 - g_maxes[p] ** 2))
        s_lo = max(reach.min_abs, s_floor)
        s_hi = max(reach.max_abs, s_lo + 1e-9)
        q0 = hs.lo if hs is not None else 0.0
        f_lo, f_hi = math.sqrt(s_lo**2 + q0), math.sqrt(s_hi**2 + q0)
        slope = (f_hi - f_lo) / (s_hi - s_lo) if q0 > 0 else 1.0
        icpt = f_lo - slope * s_lo if q0 > 0 else 0.0
        q_max = _square_max(hs) if hs is not None else 0.0
        q_col: list[int] = []
        c_q = 0.0
        if hs is not None and q_max > 0 and f_lo > 1e-3 * r_max:
            # sqrt(s² + q) ≤ sqrt(s² + q0) + (q - q0)/(2·f_lo) for q ≥ q0, s ≥ s_lo
            c_q = 0.5 / f_lo
            q_col = [_square_column(m, vars_.x, hs, refine.lazy[p], q0, q_max, pcols)]
            icpt -= c_q * q0
        elif q_max > 0:  # |z| may vanish: R ≤ |z| + sqrt(q_max)
            icpt += math.sqrt(q_max)
        big_z = reach.max_abs * 1.01 + 1e-6
        w0 = m.var(sec.count, 0.0, 1.0, integer=True) if sec.count > 1 else None
        coef = slope * sec.upper_factor
        big_u = r_max + coef * big_z + abs(icpt) + c_q * q_max + 1.0
        for j in range(sec.count):
            cj = sec.centres[j]
            cols_u = [r0 + p, *fund, *q_col]
            vals_u = [1.0, -coef * cj.real, -coef * cj.imag, *([-c_q] if q_col else [])]
            if w0 is None:
                m.row(cols_u, vals_u, -np.inf, icpt)
                continue
            w = w0 + j
            m.row([*cols_u, w], [*vals_u, big_u], -np.inf, icpt + big_u)
            for nrm in (sec.lower_normals[j], sec.upper_normals[j]):
                m.row([*fund, w], [nrm.real, nrm.imag, -big_z], -big_z, np.inf)
        if w0 is not None:
            m.row(w0 + np.arange(sec.count), np.ones(sec.count), 1.0, 1.0)
            span = reach.angle_stop - reach.angle_start
            if span < math.radians(170.0):
                # the whole reachable cone as one sector: looser, but needs no
                # binary, so it also holds in the LP relaxation (a much better
                # bound in the root node)
                whole = sectors(reach.angle_start, reach.angle_stop, 2 * np.pi)
                cw = slope * whole.upper_factor * whole.centres[0]
                vals_w = [1.0, -cw.real, -cw.imag, *([-c_q] if q_col else [])]
                m.row([r0 + p, *fund, *q_col], vals_w, -np.inf, icpt)
    if exact_square:
        _exact_square_rows(m, vars_, r0, linear, products, r_min, r_maxes, level)
    # the target on the deviation from the mean
    for p in range(3):
        up = np.full(3, -(1 + target) / 3.0)
        up[p] += 1.0
        m.row(r0 + np.arange(3), up, -np.inf, 0.0)
        down = np.full(3, (1 - target) / 3.0)
        down[p] -= 1.0
        m.row(r0 + np.arange(3), down, -np.inf, 0.0)
    if nlim is not None:
        _neutral_cuts(m, vars_, pr, nlim, ncuts)
    cost = np.zeros(m.n)
    placed = np.flatnonzero(pr.movable)
    cost[vars_.x + pr.current[placed]] = -1.0
    cost[vars_.disp] = 1.0
    return m, vars_, cost


def _exact_square_rows(
    m: _Model,
    vars_: _Vars,
    r0: int,
    linear: list[tuple[float, np.ndarray]],
    products: dict[tuple[int, int], list[float]],
    r_min: float,
    r_maxes: list[float],
    level: int,
) -> None:
    """Upper bounds ``R_p ≤ (T_p + ρ²)/(2ρ)`` with ``T_p = R_p²`` exact at integer points.

    ``T_p`` is :func:`square_terms` with each product ``x_o·x_o'`` replaced by
    ``y ∈ [0, 1]`` under McCormick's inequalities (``y ≤ x_o``, ``y ≤ x_o'``
    where a coefficient is positive, ``y ≥ x_o + x_o' - 1`` where negative):
    at integer ``x`` the only values allowed make ``T_p`` at most the exact
    square. ``sqrt`` is concave, so each tangent ``(T + ρ²)/(2ρ)`` lies above
    it; tangents on a geometric grid of ``ρ`` from the smallest RMS a plan
    meeting the target can have up to the largest possible keep the envelope
    within :data:`TANGENT_ERRORS` of ``sqrt(T)`` over that range.
    """
    keys = list(products)
    y0 = m.var(len(keys), 0.0, 1.0)
    for k, (o1, o2) in enumerate(keys):
        coefs = products[(o1, o2)]
        if any(c > 0 for c in coefs):
            m.row([y0 + k, vars_.x + o1], [1.0, -1.0], -np.inf, 0.0)
            m.row([y0 + k, vars_.x + o2], [1.0, -1.0], -np.inf, 0.0)
        if any(c < 0 for c in coefs):
            m.row([y0 + k, vars_.x + o1, vars_.x + o2], [1.0, -1.0, -1.0], -1.0, np.inf)
    t0 = m.var(3, 0.0, np.inf)
    ratio = 1.0 + math.sqrt(8.0 * TANGENT_ERRORS[level])
    for p in range(3):
        const, lin = linear[p]
        nz = np.flatnonzero(lin)
        ky = [k for k, key in enumerate(keys) if products[key][p] != 0.0]
        m.row(
            np.concatenate([[t0 + p], vars_.x + nz, y0 + np.array(ky, dtype=int)]),
            np.concatenate([[1.0], -lin[nz], -np.array([products[keys[k]][p] for k in ky])]),
            const,
            const,
        )
        rho = max(r_min, 1e-9 * max(1.0, r_maxes[p]))
        while True:
            m.row([r0 + p, t0 + p], [1.0, -0.5 / rho], -np.inf, 0.5 * rho)
            if rho >= r_maxes[p]:
                break
            rho *= ratio


def solve_target(
    pr: Problem,
    goal: Goal,
    control: Control,
    incumbent: np.ndarray | None,
    verify: Verifier,
    count: Counter,
    repair: Callable[[np.ndarray, int], np.ndarray | None],
) -> Outcome:
    """Fewest moves that meet the target (module notes).

    Parameters
    ----------
    pr : Problem
    goal : Goal
        ``target`` (fraction), optional ``neutral_max_a`` and ``max_moves``.
    control : Control
    incumbent : int ndarray or None
        A realisable plan that meets the target (from the heuristic).
    verify : callable
        Exact check of a plan.
    count : callable
        Breakers a plan relocates (with slot realisation).
    repair : callable
        ``repair(assign, k)`` tries to turn a near plan into one that meets
        the target with at most k moves (local search), or returns None.

    Returns
    -------
    Outcome
        ``bound`` is a proven lower bound on the number of moves.
    """
    assert goal.target is not None
    n_placed = pr.n_movable
    cap = n_placed if goal.max_moves is None else min(goal.max_moves, n_placed)
    out = Outcome(assign=incumbent, proven=False, bound=0.0)
    nlim = _neutral_limit(pr, goal)
    if nlim is not None and nlim < 0:
        out.assign, out.proven = None, True
        out.notes.append("triplen harmonics alone exceed the neutral limit")
        return out
    best_k = count(incumbent) if incumbent is not None else None
    lower = 0
    # refinement stages: (sector level, exact-square model?). The exact-square
    # check costs as much as a small proof: done on the first refinement only
    square_ok: bool | None = None
    stages = [(0, False), (1, True), (2, True)]
    stage = 0
    slice_s = 0.5
    exact_proof = True
    nogoods: list[np.ndarray] = []
    refine = _Refine()
    ncuts = _neutral_dirs(pr) if nlim is not None else []
    counted_out: set[int] = set()
    while not control.stop():
        budget = cap if best_k is None else min(cap, best_k - 1)
        if budget < lower:
            break
        if budget not in counted_out and enumeration_fits(pr, budget):
            # few moves: count every plan out exactly (tri.rebalance.exhaust)
            counted_out.add(budget)
            what = f"at most {budget} move{'s' if budget != 1 else ''}"
            control.report(f"checking every plan with {what}")
            found = plans_within(pr, goal.target, goal.neutral_max_a, budget)
            if found is not None and not found:
                lower = budget + 1
                break
            better = [a for a in found or [] if verify(a)[0] and count(a) <= budget]
            if better:
                out.assign = min(better, key=count)
                best_k = count(out.assign)
                continue
        m, vars_, cost = _target_model(
            pr,
            goal,
            goal.target,
            budget,
            stages[stage][0],
            nogoods,
            refine,
            ncuts,
            nlim,
            exact_square=stages[stage][1] and square_ok is True,
        )
        what = f"at most {budget} move{'s' if budget != 1 else ''}"
        control.report(f"solver: looking for a plan with {what}")
        # with a cancel hook, time slices that double: a cancel is seen between
        # them, at the cost of at most about twice the work
        span = min(slice_s, control.remaining()) if control.can_cancel else control.remaining()
        # HiGHS's presolve pays off with harmonics, not without them (measured
        # on the benchmark panels: 4x faster proofs at 500 linear circuits).
        # Its primal heuristics are off once a plan is known: the call is then
        # a proof (or a refutation), and they took most of its time
        res = m.solve(
            cost,
            span,
            gap=0.0,
            presolve=pr.orders.size > 1,
            heuristics=best_k is None,
        )
        out.solver_calls += 1
        if _failed(res):
            out.notes.append(f"the solver stopped: {res.message}")
            break
        if _infeasible(res):
            lower = budget + 1
            break
        db = _dual_bound(res)
        fun = float(res.fun) if res.status == 0 and res.fun is not None else db
        if fun is not None:
            lower = max(lower, math.ceil(n_placed + fun - 1e-6))
        if res.x is None:
            slice_s *= 2
            continue
        a = _decode(pr, res.x, vars_.x)
        ok, realisable = verify(a)
        if ok and realisable:
            out.assign, best_k = a, count(a)
            continue
        refine.learn(pr, a)
        if nlim is not None:
            _, n = spectra(pr, a)
            u = _oa(_nontriplen(pr, n))
            if u is not None:
                ncuts.append(u)
        fixed = repair(a, budget) if realisable else None
        if fixed is not None:
            fk = count(fixed)
            if best_k is None or fk < best_k:
                out.assign, best_k = fixed, fk
                continue
        if not realisable:
            exact_proof = False
            nogoods.append(a)
        elif stage + 1 < len(stages):
            stage += 1
            if square_ok is None:
                square_ok = _exact_square_fits(pr)
        else:
            nogoods.append(a)
    out.bound = float(lower)
    if out.assign is not None:
        out.proven = exact_proof and lower >= count(out.assign)
    else:
        out.proven = exact_proof and lower > cap
    if not exact_proof:
        out.notes.append("a plan could not be fitted into the slots and was skipped")
    return out
