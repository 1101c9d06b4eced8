"""The fewest-relocations model: every plan that meets the target is a solution of it.

Minimise the relocations (:mod:`tri.rebalance.slot_model`, exact) subject
to the target on the *exact* deviation ``|R_p - mean R| ≤ t·mean R`` for
every phase. ``R_p`` is a magnitude on both sides, so the program bounds
it from below (:mod:`tri.rebalance.lower_bounds`) and from above, which a
magnitude (a convex function) only allows piecewise:

* *Lower side*: order by order, and ``R_p ≥ (1 - t)·F`` (a plan meeting the
  target has ``R_p ≥ (1 - t)·mean`` and the mean is at least ``F``).
* *Upper side, sector rows*: the angles the fundamental can take within
  the budget are cut into sectors; a binary per sector says which one
  holds the current, where Theorem 2 of :mod:`tri.rebalance.polygon`
  bounds ``|z|`` from above; one extra row bounds it over the whole cone
  without a binary (looser, but it holds in the LP relaxation). Harmonics:
  ``R = sqrt(|z|² + G²)`` with ``G² ≤ q``, the square of the harmonic part
  as a function of the options (:mod:`tri.rebalance.squares`);
  ``sqrt(s² + q)`` is bounded by its tangent in ``q`` and its chord in ``s``.
* *Upper side, centred rows* (budgets of at most
  :data:`CENTRED_MAX_CHANGED` changed circuits): ``R_p²`` itself, centred
  on the current plan, with the bounds on its products, and
  ``R_p ≤ (R_p² + ρ²)/(2ρ)`` for a grid of ``ρ`` (tangents of the concave
  square root). Exact for a phase no move touches and for a phase one
  move touches.

With several cases (scenarios) the target holds in every case: each case
has its own currents block on the same options (:func:`add_currents`), its
own ``R_p`` columns and the rows above for its own currents
(:class:`CaseRows`); a plan meeting the target in every case satisfies all.

With these, every plan that meets the target exactly satisfies the
program (it is a relaxation): when the program has no solution with ``k``
relocations, no plan with ``k`` relocations exists. What the loop learnt
from proposals that failed the exact check (:class:`Learnt`) only adds
rows that hold at every plan, and a no-good cut removes only the one
arrangement of options it names, which was checked exactly and failed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from tri.rebalance.electrical import Electrical, add_currents, add_neutral_cuts, add_options
from tri.rebalance.exact_square import SquareTerms, add_exact_square_rows
from tri.rebalance.lower_bounds import (
    RESOLUTIONS,
    PhaseReach,
    add_rms_lower_bounds,
    phase_reach,
    unit_spectrum,
)
from tri.rebalance.model import Model
from tri.rebalance.plan_currents import spectra
from tri.rebalance.polygon import sectors
from tri.rebalance.problem import Problem
from tri.rebalance.slot_model import SlotColumns, add_slots
from tri.rebalance.square_rows import square_column, square_max, tangent_points
from tri.rebalance.squares import changed_max, square_bound

#: Sector widths, coarse to fine [deg]; upper-bound errors ``1/cos(w/2) - 1``
#: of 0.24 %, 0.034 %, 0.0038 %.
SECTOR_WIDTHS_DEG = (4.0, 2.0, 1.0)
#: Largest number of changed circuits for which the centred rows are added:
#: beyond it their bounds on the products are loose and only make the model larger [-].
CENTRED_MAX_CHANGED = 8


@dataclass
class Learnt:
    """What the loop learnt from proposals that failed the exact check.

    Attributes
    ----------
    cuts : list of list of complex ndarray
        Unit spectra of visited plans, per phase (lower bounds).
    lazy : list of set of int
        Options whose products are bounded exactly (bound G), per phase.
    rms : list of list of float
        Phase RMS currents of visited plans (tangent points) [A].
    nogoods : list of int ndarray
        Option vectors excluded (checked exactly, failed).
    neutral : list of complex ndarray
        Unit non-triplen neutral spectra of visited plans.
    """

    cuts: list[list[np.ndarray]] = field(default_factory=lambda: [[], [], []])
    lazy: list[set[int]] = field(default_factory=lambda: [set(), set(), set()])
    rms: list[list[float]] = field(default_factory=lambda: [[], [], []])
    nogoods: list[np.ndarray] = field(default_factory=list)
    neutral: list[np.ndarray] = field(default_factory=list)

    def learn(self, pr: Problem, assign: np.ndarray) -> None:
        """Cuts, exact products and tangent points at a proposed plan."""
        v, n = spectra(pr, assign)
        changed = np.asarray(assign)[np.asarray(assign) != pr.current_assignment()]
        for p in range(3):
            u = unit_spectrum(v[p])
            if u is not None:
                self.cuts[p].append(u)
            self.rms[p].append(float(np.sqrt(np.sum(np.abs(v[p]) ** 2))))
            self.lazy[p].update(int(o) for o in changed)
        nt = np.where(pr.orders % 3 == 0, 0.0, n)
        u = unit_spectrum(nt)
        if u is not None:
            self.neutral.append(u)


@dataclass(frozen=True)
class TargetModel:
    """An assembled target model.

    Attributes
    ----------
    model : Model
    electrical : Electrical
    slots : SlotColumns
    cost : float ndarray
        Objective; relocations = ``cost·x + offset``.
    offset : float
    """

    model: Model
    electrical: Electrical
    slots: SlotColumns
    cost: np.ndarray
    offset: float


@dataclass(frozen=True)
class CaseRows:
    """What the model needs of one further case: its problem and what was learnt there.

    Attributes
    ----------
    view : Problem
        The problem in that case (its own currents).
    learnt : Learnt
        Cuts, exact products and tangent points of that case (its no-goods unused).
    neutral_limit : float or None
        Limit on that case's non-triplen neutral RMS [A].
    neutral_dirs : list of complex ndarray
    squares : SquareTerms or None
    """

    view: Problem
    learnt: Learnt
    neutral_limit: float | None
    neutral_dirs: list[np.ndarray]
    squares: SquareTerms | None = None


def build_target_model(
    pr: Problem,
    target: float,
    budget: int,
    level: int,
    learnt: Learnt,
    neutral_limit: float | None,
    neutral_dirs: list[np.ndarray],
    squares: SquareTerms | None = None,
    cases: tuple[CaseRows, ...] = (),
) -> TargetModel:
    """The model of the module notes for at most ``budget`` relocations.

    Parameters
    ----------
    pr : Problem
        The problem in the first case (its own currents are used).
    target : float
        Largest deviation from the mean, a fraction [-].
    budget : int
        Largest number of relocations [-].
    level : int
        Index into :data:`SECTOR_WIDTHS_DEG` and
        :data:`tri.rebalance.lower_bounds.RESOLUTIONS`.
    learnt : Learnt
        The first case's (and every no-good cut).
    neutral_limit : float or None
        Limit on the non-triplen neutral RMS [A].
    neutral_dirs : list of complex ndarray
        Directions of the neutral rows (non-triplen orders only).
    squares : SquareTerms, optional
        The exact squares (:mod:`tri.rebalance.exact_square`): the upper side
        then uses them instead of sectors and centred rows.
    cases : tuple of CaseRows
        Every further case, each with its own rows on the same options.
    """
    m = Model()
    x = add_options(m, pr).x
    el = add_currents(m, pr, x, neutral_limit is not None)
    sc = add_slots(m, pr, el)
    sc.add_budget(m, budget)
    for bad in learnt.nogoods:
        m.row(el.x + bad, np.ones(bad.size), -np.inf, bad.size - 1.0)
    first = CaseRows(pr, learnt, neutral_limit, neutral_dirs, squares)
    for case in (first, *cases):
        case_el = (
            el if case is first else add_currents(m, case.view, x, case.neutral_limit is not None)
        )
        _case_rows(m, case, case_el, target, budget, level)
    cost = np.zeros(m.n)
    const, cols, vals = sc.relocation_terms()
    np.add.at(cost, cols, vals)
    return TargetModel(m, el, sc, cost, const)


def _case_rows(
    m: Model, case: CaseRows, el: Electrical, target: float, budget: int, level: int
) -> None:
    """The ``R_p`` columns of one case, their bounds and the target on them (module notes)."""
    pr, learnt = case.view, case.learnt
    reaches = [phase_reach(pr, p, budget) for p in range(3)]
    r_maxes = [rc.rms_max * (1 + 1e-9) + 1e-9 for rc in reaches]
    r_min = min((1.0 - target) * pr.floor_a * (1 - 1e-9), min(r_maxes))
    r0 = m.var(3, max(0.0, r_min), r_maxes)
    ref_v, _ = spectra(pr, pr.current_assignment())
    for p in range(3):
        ref_u = unit_spectrum(ref_v[p])
        visited = [*([ref_u] if ref_u is not None else []), *learnt.cuts[p]]
        add_rms_lower_bounds(m, pr, el, p, [r0 + p], reaches[p], visited, RESOLUTIONS[level])
        if case.squares is not None:
            continue
        if changed_max(pr, budget) <= CENTRED_MAX_CHANGED:
            _centred_rows(m, pr, el, p, r0 + p, budget, learnt, r_min, r_maxes[p])
        _sector_rows(m, pr, el, p, r0 + p, budget, level, learnt, reaches[p], target)
    if case.squares is not None:
        cols = [r0 + p for p in range(3)]
        add_exact_square_rows(m, el.x, cols, case.squares, r_min, r_maxes, level, learnt.rms)
    _deviation_rows(m, r0, target)
    if case.neutral_limit is not None:
        add_neutral_cuts(m, el, case.neutral_limit, case.neutral_dirs + learnt.neutral)


def _deviation_rows(m: Model, r0: int, target: float) -> None:
    """``(1 - t)·mean ≤ R_p ≤ (1 + t)·mean`` for every phase."""
    for p in range(3):
        up = np.full(3, -(1 + target) / 3.0)
        up[p] += 1.0
        m.row(r0 + np.arange(3), up, -np.inf, 0.0)
        down = np.full(3, (1 - target) / 3.0)
        down[p] -= 1.0
        m.row(r0 + np.arange(3), down, -np.inf, 0.0)


def _centred_rows(
    m: Model,
    pr: Problem,
    el: Electrical,
    p: int,
    r_col: int,
    budget: int,
    learnt: Learnt,
    r_min: float,
    r_max: float,
) -> None:
    """``R_p ≤ (S_p + ρ²)/(2ρ)`` with ``S_p ≥ R_p²`` centred on the current plan."""
    sq = square_bound(pr, p, budget)
    s_col = square_column(m, el.x, sq, learnt.lazy[p], -np.inf, np.inf, el.phase_cols(p))
    rhos = tangent_points(r_min, r_max, [math.sqrt(sq.const), *learnt.rms[p]])
    m.block(
        np.column_stack([np.full(rhos.size, r_col), np.full(rhos.size, s_col)]),
        np.column_stack([np.ones(rhos.size), -0.5 / rhos]),
        -np.inf,
        0.5 * rhos,
    )


def _sector_rows(
    m: Model,
    pr: Problem,
    el: Electrical,
    p: int,
    r_col: int,
    budget: int,
    level: int,
    learnt: Learnt,
    reach: PhaseReach,
    target: float,
) -> None:
    """Upper bound on ``R_p`` by sectors of the fundamental and ``q ≥ G²`` (module notes)."""
    fund = el.phase_cols(p)[:2]
    rf = reach.fundamental
    sec = sectors(rf.angle_start, rf.angle_stop, math.radians(SECTOR_WIDTHS_DEG[level]))
    hs = square_bound(pr, p, budget, harmonics_only=True) if pr.orders.size > 1 else None
    # a plan meeting the target has R_p ≥ (1 - t)·F, so |z_p| ≥ sqrt(((1 - t)·F)² - G_max²)
    s_floor = math.sqrt(max(0.0, ((1.0 - target) * pr.floor_a) ** 2 - reach.harmonic_max**2))
    s_lo = max(rf.min_abs, s_floor)
    s_hi = max(rf.max_abs, s_lo + 1e-9)
    q0 = hs.lo if hs is not None else 0.0
    f_lo, f_hi = math.sqrt(s_lo**2 + q0), math.sqrt(s_hi**2 + q0)
    slope = (f_hi - f_lo) / (s_hi - s_lo) if q0 > 0 else 1.0
    icpt = f_lo - slope * s_lo if q0 > 0 else 0.0
    q_max = square_max(hs) if hs is not None else 0.0
    r_max = reach.rms_max * (1 + 1e-9) + 1e-9
    q_col: list[int] = []
    c_q = 0.0
    if hs is not None and q_max > 0 and f_lo > 1e-3 * r_max:
        # sqrt(s² + q) ≤ sqrt(s² + q0) + (q - q0)/(2·f_lo) for q ≥ q0, s ≥ s_lo
        c_q = 0.5 / f_lo
        q_col = [square_column(m, el.x, hs, learnt.lazy[p], q0, q_max, el.phase_cols(p))]
        icpt -= c_q * q0
    elif q_max > 0:  # |z| may vanish: R ≤ |z| + sqrt(q_max)
        icpt += math.sqrt(q_max)
    coef = slope * sec.upper_factor
    big_z = rf.max_abs * 1.01 + 1e-6
    big_u = r_max + coef * big_z + abs(icpt) + c_q * q_max + 1.0
    q_part = [-c_q] if q_col else []
    if sec.count == 1:
        c0 = sec.centres[0]
        m.row(
            [r_col, *fund, *q_col], [1.0, -coef * c0.real, -coef * c0.imag, *q_part], -np.inf, icpt
        )
        return
    w0 = m.binary(sec.count)
    for j in range(sec.count):
        cj = sec.centres[j]
        vals = [1.0, -coef * cj.real, -coef * cj.imag, *q_part, big_u]
        m.row([r_col, *fund, *q_col, w0 + j], vals, -np.inf, icpt + big_u)
        for nrm in (sec.lower_normals[j], sec.upper_normals[j]):
            m.row([*fund, w0 + j], [nrm.real, nrm.imag, -big_z], -big_z, np.inf)
    m.row(w0 + np.arange(sec.count), np.ones(sec.count), 1.0, 1.0)
    if rf.angle_stop - rf.angle_start < math.radians(170.0):
        # the whole reachable cone as one sector, without a binary
        whole = sectors(rf.angle_start, rf.angle_stop, 2 * np.pi)
        cw = slope * whole.upper_factor * whole.centres[0]
        m.row([r_col, *fund, *q_col], [1.0, -cw.real, -cw.imag, *q_part], -np.inf, icpt)
