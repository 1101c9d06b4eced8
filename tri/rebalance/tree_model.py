"""The fewest-relocations program for a building: every panel's slots, every panel's target.

One mixed-integer program over the whole search (:mod:`tri.rebalance.tree_problem`):

* *Options*: one block of option columns per panel, one option per free
  circuit (:func:`tri.rebalance.electrical.add_options`), in the global
  numbering, so that every panel's subtree is one contiguous block.
* *Slots*: each panel's own slot block (:mod:`tri.rebalance.slot_model`),
  which counts its relocations exactly as the work order does; the
  objective is their sum over the panels, with at most ``budget`` in all.
* *Currents*: for every node k, the columns of its line currents at every
  order, ``V_k = B_k + Σ_o x_o·C_ok`` (equality rows over the options of
  the panels at and below k).
* *Phase RMS currents* ``r_kp`` of every node, bounded on both sides by
  rows that hold at every plan: below by the polygon rows of
  :func:`tri.rebalance.lower_bounds.add_rms_lower_bounds`, above by the
  exact square (every product of two options, McCormick's inequalities,
  tangents of the square root; :mod:`tri.rebalance.exact_square`), both on
  the node view (:meth:`~tri.rebalance.tree_problem.TreeProblem.node_view`).
* *Targets*: ``(1 - t_k)·mean_k ≤ r_kp ≤ (1 + t_k)·mean_k`` at every node,
  with ``t_k`` widened by :data:`TARGET_SLACK` (a looser relaxation).
* *Neutral* (with a limit ``L`` at the service): the columns of the
  service's neutral current at every order, ``N = NB + Σ_o x_o·NC_o``, and
  ``<N, u> ≤ L`` for unit spectra ``u`` (fundamental directions around the
  circle, then the direction of every proposal's neutral that failed the
  exact check): by Cauchy-Schwarz every plan whose neutral RMS is within
  ``L`` satisfies each row (:func:`tri.rebalance.electrical.add_neutral_cuts`).

Every plan that meets every target with at most ``budget`` relocations
satisfies the program with its own values (it is a relaxation), so an
infeasible program proves that no such plan exists, and the program's
optimum (or HiGHS's dual bound) is a lower bound on the relocations. What
the loop learns from a proposal that failed the exact check (the
directions of its spectra, its RMS currents as tangent points) holds at
every plan; a no-good cut removes only the one set of options it names,
which was checked exactly and failed.

With scenarios (:mod:`tri.rebalance.tree_problem`, Cases) every node has
its currents, RMS bounds, exact square and target rows once per case, on
the same option and slot columns: a plan is feasible only when it meets
every target in every case, so the program stays a relaxation.

When a node's exact square would need more than :data:`MAX_PRODUCTS`
products the program is not built (:func:`model_fits` is False) and the
search relies on listing plans (:mod:`tri.rebalance.tree_search`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from tri.rebalance.electrical import Electrical, add_neutral_cuts, add_options
from tri.rebalance.exact_square import SquareTerms, add_exact_square_rows, square_terms
from tri.rebalance.lower_bounds import (
    RESOLUTIONS,
    PhaseReach,
    add_rms_lower_bounds,
    phase_reach,
    unit_spectrum,
)
from tri.rebalance.model import Model
from tri.rebalance.polygon import polygon_directions
from tri.rebalance.problem import Problem
from tri.rebalance.slot_model import SlotColumns, add_slots
from tri.rebalance.tree_problem import TreeProblem

#: Largest number of option products of one node's exact square [-].
MAX_PRODUCTS = 20_000
#: Relative widening of every target in the program (keeps it a relaxation at round-off) [-].
TARGET_SLACK = 1e-7


@dataclass
class TreeLearnt:
    """What the loop learnt from proposals that failed the exact check.

    Attributes
    ----------
    cuts : list of list of list of list of complex ndarray
        Per case, node and phase, unit spectra of visited plans.
    rms : list of list of list of list of float
        Per case, node and phase, RMS currents of visited plans (tangent points) [A].
    neutral : list of list of complex ndarray
        Per case, unit spectra of the service's neutral at visited plans.
    nogoods : list of int ndarray
        Global option vectors excluded (checked exactly, failed).
    level : int
        Resolution of the polygons and tangents (index into ``RESOLUTIONS``).
    """

    size: int
    n_cases: int = 1
    cuts: list = field(default_factory=list)
    rms: list = field(default_factory=list)
    neutral: list = field(default_factory=list)
    nogoods: list[np.ndarray] = field(default_factory=list)
    level: int = 0

    def __post_init__(self) -> None:
        self.cuts = [[[[], [], []] for _ in range(self.size)] for _ in range(self.n_cases)]
        self.rms = [[[[], [], []] for _ in range(self.size)] for _ in range(self.n_cases)]
        self.neutral = [[] for _ in range(self.n_cases)]

    def learn(self, tp: TreeProblem, assign: np.ndarray) -> None:
        """Directions and RMS currents of every node's phases at a proposed plan, every case."""
        for c, case in enumerate(tp.views()):
            v = case.spectra(assign)
            for k in range(tp.size):
                for p in range(3):
                    u = unit_spectrum(v[k, p])
                    if u is not None:
                        self.cuts[c][k][p].append(u)
                    self.rms[c][k][p].append(float(np.sqrt(np.sum(np.abs(v[k, p]) ** 2))))
            if tp.neutral_max_a is not None:
                u = unit_spectrum(case.neutral_spectra(assign)[0])
                if u is not None:
                    self.neutral[c].append(u)


class TreeModelParts:
    """The node views (every case) and their exact squares, computed once per search."""

    def __init__(self, tp: TreeProblem) -> None:
        self.tp = tp
        self.views: list[Problem] = [tp.node_view(k) for k in range(tp.size)]
        self.squares: list[list[SquareTerms | None]] = [
            [square_terms(c, MAX_PRODUCTS) for c in v.views()] if v.n_free else []
            for v in self.views
        ]
        self._reach: dict[tuple[int, int, int], list[PhaseReach]] = {}

    def fits(self) -> bool:
        """True when every node with free circuits below it has its exact square in every case."""
        return all(s is not None for per_case in self.squares for s in per_case)

    def reaches(self, k: int, budget: int, case: int = 0) -> list[PhaseReach]:
        """Where node k's phases can go within ``budget`` changes in one case (cached)."""
        key = (k, budget, case)
        if key not in self._reach:
            view = self.views[k].views()[case]
            self._reach[key] = [phase_reach(view, p, budget) for p in range(3)]
        return self._reach[key]


@dataclass(frozen=True)
class TreeModel:
    """An assembled program.

    Attributes
    ----------
    model : Model
    x : int
        First option column (global numbering).
    slots : list of SlotColumns or None
        Per node (None for a node without free circuits).
    cost : float ndarray
        Objective: relocations = ``cost·x + offset``.
    offset : float
    """

    model: Model
    x: int
    slots: list[SlotColumns | None]
    cost: np.ndarray
    offset: float


def _current_rows(m: Model, x: int, v: int, contrib: np.ndarray, base: np.ndarray) -> None:
    """``v_k - Σ_o x_o·contrib[o, k] = base_k`` for every part (re, im of each phase and order)."""
    parts = np.stack([contrib.real, contrib.imag], axis=-1).reshape(contrib.shape[0], -1)
    rhs = np.stack([base.real, base.imag], axis=-1).ravel()
    for k in range(rhs.size):
        nz = np.flatnonzero(parts[:, k])
        m.row(
            np.concatenate([[v + k], x + nz]),
            np.concatenate([[1.0], -parts[nz, k]]),
            float(rhs[k]),
            float(rhs[k]),
        )


def _deviation_rows(m: Model, r0: int, target: float) -> None:
    """``(1 - t)·mean ≤ r_p ≤ (1 + t)·mean`` for every phase."""
    t = target * (1 + TARGET_SLACK) + 1e-12
    for p in range(3):
        up = np.full(3, -(1 + t) / 3.0)
        up[p] += 1.0
        m.row(r0 + np.arange(3), up, -np.inf, 0.0)
        down = np.full(3, (1 - t) / 3.0)
        down[p] -= 1.0
        m.row(r0 + np.arange(3), down, -np.inf, 0.0)


def _node_rows(m: Model, parts: TreeModelParts, k: int, x: int, budget: int, learnt) -> None:
    """Currents, RMS bounds and the target of node ``k`` in every case (module notes)."""
    for c, view in enumerate(parts.views[k].views()):
        _case_rows(m, parts, (k, c), view, x, budget, learnt)


def _case_rows(
    m: Model, parts: TreeModelParts, at: tuple[int, int], view: Problem, x: int, budget: int, learnt
) -> None:
    """The rows of :func:`_node_rows` for node ``k`` in case ``c`` (``at = (k, c)``)."""
    tp = parts.tp
    k, c = at
    h = tp.orders.size
    xk = x + int(tp.offsets[k])
    v = m.var(6 * h, -np.inf, np.inf)
    _current_rows(m, xk, v, view.contrib.reshape(view.n_options, 3, h), view.base)
    el = Electrical(x=xk, v=v, n=None, h=h)
    reaches = parts.reaches(k, budget, c)
    r_maxes = [rc.rms_max * (1 + 1e-9) + 1e-9 for rc in reaches]
    r0 = m.var(3, 0.0, r_maxes)
    res = RESOLUTIONS[learnt.level]
    for p in range(3):
        add_rms_lower_bounds(m, view, el, p, [r0 + p], reaches[p], learnt.cuts[c][k][p], res)
    terms = parts.squares[k][c]
    assert terms is not None
    r_min = max(1e-9, (1.0 - float(tp.targets[k])) * view.floor_a * (1 - 1e-9))
    r_min = min(r_min, min(r_maxes))
    add_exact_square_rows(
        m, xk, [r0 + p for p in range(3)], terms, r_min, r_maxes, learnt.level, learnt.rms[c][k]
    )
    _deviation_rows(m, r0, float(tp.targets[k]))


def _neutral_rows(m: Model, tp: TreeProblem, x: int, learnt: TreeLearnt) -> None:
    """The service's neutral within its limit, in every case (module notes, Neutral)."""
    limit = tp.neutral_max_a
    if limit is None:
        return
    h = tp.orders.size
    first = []
    for d in polygon_directions(36):
        u = np.zeros(h, dtype=complex)
        u[0] = d
        first.append(u)
    for c, case in enumerate(tp.views()):
        nv = m.var(2 * h, -np.inf, np.inf)
        _current_rows(m, x, nv, case.ncontrib[:, 0][:, None, :], case.nbase[0][None, :])
        el = Electrical(x=x, v=-1, n=nv, h=h)
        add_neutral_cuts(m, el, float(limit), first + learnt.neutral[c])


def build_tree_model(parts: TreeModelParts, budget: int, learnt: TreeLearnt) -> TreeModel:
    """The program of the module notes for at most ``budget`` relocations in all.

    Parameters
    ----------
    parts : TreeModelParts
        Node views and exact squares (``parts.fits()`` must be True).
    budget : int
        Largest number of relocations over every panel [-].
    learnt : TreeLearnt
    """
    tp = parts.tp
    m = Model()
    x = m.var(0)
    slots: list[SlotColumns | None] = []
    for k, pr in enumerate(tp.problems):
        el = add_options(m, pr)
        assert el.x == x + int(tp.offsets[k])
    const, cols, vals = 0.0, [], []
    for k, pr in enumerate(tp.problems):
        if not pr.n_free:
            slots.append(None)
            continue
        sc = add_slots(m, pr, Electrical(x=x + int(tp.offsets[k]), v=-1, n=None, h=0))
        slots.append(sc)
        c, cc, vv = sc.relocation_terms()
        const += c
        cols.append(cc)
        vals.append(vv)
    stay_cols = np.concatenate(cols) if cols else np.zeros(0, int)
    stay_vals = np.concatenate(vals) if vals else np.zeros(0)
    if stay_cols.size and budget < const:
        m.row(stay_cols, -stay_vals, const - budget, np.inf)
    for bad in learnt.nogoods:
        m.row(x + bad, np.ones(bad.size), -np.inf, bad.size - 1.0)
    for k in range(tp.size):
        if parts.views[k].n_free:
            _node_rows(m, parts, k, x, budget, learnt)
    _neutral_rows(m, tp, x, learnt)
    cost = np.zeros(m.n)
    np.add.at(cost, stay_cols, stay_vals)
    return TreeModel(m, x, slots, cost, const)


def relocations_bound(value: float, offset: float) -> int:
    """A proven lower bound on relocations from the program's bound (rounded up) [-]."""
    return math.ceil(value + offset - 1e-6)
