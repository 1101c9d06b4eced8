"""Bounds of the target model and the plan count, against the exhaustive search.

Sources of expected values: :func:`test_rebalance_helpers.exhaustive_rail`
(every assignment of a rail board analysed by the engine itself, not by
the rebalancer's superposition) and, for the model rows, HiGHS run on the
rows with the options fixed. Each test names the bound it checks; the
proofs are in the docstrings of :mod:`tri.rebalance.squares`,
:func:`tri.rebalance.milp._lower_block` and :mod:`tri.rebalance.exhaust`.

Tolerances: squares compared relative 1e-9 of the largest square (the same
sums taken in another order); bounds allowed 1e-9 relative of round-off on
the safe side only; HiGHS values 1e-7 relative (its feasibility tolerance
on rows of currents of hundreds of amperes).
"""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest
from test_rebalance_helpers import exhaustive_rail, movable_rail, random_rail

from tri.rebalance import milp
from tri.rebalance.exhaust import plans_count, plans_within
from tri.rebalance.heuristic import Goal
from tri.rebalance.problem import PAIRS, build_problem, rms, spectra
from tri.rebalance.squares import changed_max, square_bound

SEEDS = range(6)


def _assignments(schedule, pr) -> np.ndarray:
    """Problem assignments in the order of :func:`exhaustive_rail` (same product)."""
    free = movable_rail(schedule)
    assert pr.free.tolist() == free
    choices = []
    for i, idx in enumerate(free):
        c = schedule.circuits[idx]
        kinds = list(range(3)) if c.poles == 1 else list(range(len(PAIRS)))
        choices.append([int(pr.starts[i]) + k for k in kinds])
    return np.array(list(itertools.product(*choices)), dtype=int).reshape(-1, len(free))


def _panel(seed: int, n: int = 6):
    """Problem, exhaustive search and its assignments for a random rail board."""
    schedule = random_rail(np.random.default_rng(300 + seed), n)
    pr = build_problem(schedule, movable_rail(schedule))
    ex = exhaustive_rail(schedule)
    return pr, ex, _assignments(schedule, pr)


@pytest.mark.parametrize("seed", SEEDS)
def test_square_expansion_equals_engine(seed: int) -> None:
    # the expansion const + lin·x + ½ xᵀ g x is R_p² exactly, and G_p² for the
    # harmonic part (tolerance: round-off relative to the largest square)
    pr, ex, plans = _panel(seed)
    for p in range(3):
        full = square_bound(pr, p, pr.n_movable)
        harm = square_bound(pr, p, pr.n_movable, harmonics_only=True)
        scale = float(np.max(ex.rms[:, p] ** 2))
        for a, r in zip(plans, ex.rms[:, p], strict=True):
            assert full.value(a) == pytest.approx(r**2, abs=1e-9 * scale)
            v, _ = spectra(pr, a)
            g2 = float(np.sum(np.abs(v[p, 1:]) ** 2))
            assert harm.value(a) == pytest.approx(g2, abs=1e-9 * scale)


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("budget", [1, 2, 3])
def test_cross_bounds_hold_within_the_budget(seed: int, budget: int) -> None:
    # bounds A, B, C (tri.rebalance.squares) at every plan with at most `budget`
    # moves: the model's largest square is never below the engine's R_p², is
    # exact at plans whose changed options are all lazy (bound G), and the
    # triangle bound `lo` is never above it
    pr, ex, plans = _panel(seed)
    within = ex.moves <= budget
    lazy_all = set(range(pr.n_options))
    for p in range(3):
        for harmonics_only in (False, True):
            sb = square_bound(pr, p, budget, harmonics_only=harmonics_only)
            for a, ok, r in zip(plans, within, ex.rms[:, p], strict=True):
                if not ok:
                    continue
                true = sb.value(a) if harmonics_only else r**2
                tol = 1e-9 * max(1.0, sb.const, true)
                assert sb.largest(a, set()) >= true - tol
                assert sb.largest(a, lazy_all) == pytest.approx(true, abs=tol)
                assert sb.lo <= true + tol


@pytest.mark.parametrize("seed", SEEDS)
def test_count_bound_is_exact_with_one_change(seed: int) -> None:
    # bound B: with at most one circuit changed the cross term is 0, and the
    # model's largest square equals the exact one without any lazy option
    pr, ex, plans = _panel(seed)
    for p in range(3):
        sb = square_bound(pr, p, 3)
        for a, moves, r in zip(plans, ex.moves, ex.rms[:, p], strict=True):
            if moves <= 1:
                assert sb.largest(a, set()) == pytest.approx(r**2, rel=1e-9)


def _fixed_model(pr, assign: np.ndarray):
    m = milp._Model()
    x = m.var(pr.n_options, 0.0, 1.0, integer=True)
    xs = np.zeros(pr.n_options)
    xs[assign] = 1.0
    m.lb[0][:] = xs
    m.ub[0][:] = xs
    return m, x


def _fix_currents(m, pr, vars_, assign: np.ndarray) -> None:
    """Equality rows holding the model's phase currents at those of a plan."""
    v, _ = spectra(pr, assign)
    for q in range(3):
        parts = np.column_stack([v[q].real, v[q].imag]).ravel()
        m.block(milp._phase_cols(vars_, q)[:, None], 1.0, parts, parts)


@pytest.mark.parametrize("seed", range(3))
@pytest.mark.parametrize("through_currents", [False, True])
def test_cross_rows_in_the_model_match_the_bounds(seed: int, through_currents: bool) -> None:
    # the rows of _cross_rows, solved by HiGHS with the options fixed, allow
    # exactly CrossBound.largest (bounds A, B, C and, for lazy options, G);
    # bound G written with a coefficient per partner or through the currents
    # (_glover_rows) allows the same
    pr, ex, plans = _panel(seed)
    rng = np.random.default_rng(seed)
    budget = 3
    h = pr.orders.size
    picks = rng.choice(np.flatnonzero(ex.moves <= budget), size=6, replace=False)
    for p in range(3):
        for harmonics_only in (False, True):
            sb = square_bound(pr, p, budget, harmonics_only=harmonics_only)
            for k, idx in enumerate(picks):
                a = plans[idx]
                lazy = set(a.tolist()) if k % 2 else set()
                m, x = _fixed_model(pr, a)
                vcols = None
                if through_currents:
                    vars_ = milp._Vars(x=x, v=m.var(6 * h, -np.inf, np.inf), n=None, h=h)
                    _fix_currents(m, pr, vars_, a)
                    vcols = milp._phase_cols(vars_, p)
                col = milp._square_column(m, x, sb, lazy, -np.inf, np.inf, vcols)
                cost = np.zeros(m.n)
                cost[col] = -1.0
                res = m.solve(cost, 10.0, gap=0.0)
                assert res.status == 0
                want = sb.largest(a, lazy)
                assert -res.fun == pytest.approx(want, rel=1e-7, abs=1e-6)


@pytest.mark.parametrize("seed", range(4))
def test_lower_block_is_below_every_plan_and_exact_where_visited(seed: int) -> None:
    # _lower_block: at every plan the smallest r the rows allow is at most the
    # engine's R_p and at least the fundamental's polygon bound |z_p|·cos(0.5°)
    # (Theorem 1, one direction per degree); at a visited plan it equals R_p
    # (1e-7: HiGHS's tolerance)
    pr, _ex, plans = _panel(seed, n=5)
    rng = np.random.default_rng(seed)
    visited_idx = int(rng.integers(len(plans)))
    v_vis, _ = spectra(pr, plans[visited_idx])
    h = pr.orders.size
    for idx in [*rng.choice(len(plans), size=8, replace=False).tolist(), visited_idx]:
        a = plans[idx]
        v, _ = spectra(pr, a)
        for p in range(3):
            m, x = _fixed_model(pr, a)
            vars_ = milp._Vars(x=x, v=m.var(6 * h, -np.inf, np.inf), n=None, h=h)
            _fix_currents(m, pr, vars_, a)
            r = m.var(1, 0.0, np.inf)
            reach = milp.phase_reach(pr, p, pr.n_movable)[0]
            u = v_vis[p] / np.sqrt(np.sum(np.abs(v_vis[p]) ** 2))
            milp._lower_block(m, pr, vars_, p, [r], reach, [u], pr.n_movable)
            cost = np.zeros(m.n)
            cost[r] = 1.0
            res = m.solve(cost, 10.0, gap=0.0)
            assert res.status == 0
            true = float(rms(v[p]))
            assert res.fun <= true * (1 + 1e-7)
            assert res.fun >= abs(v[p, 0]) * math.cos(math.radians(0.5)) * (1 - 1e-7)
            if idx == visited_idx:
                assert res.fun == pytest.approx(true, rel=1e-7)


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("rank", [0, 5])
@pytest.mark.parametrize("centred", [True, False])
def test_every_plan_meeting_the_target_satisfies_the_target_model(
    seed: int, rank: int, centred: bool, monkeypatch: pytest.MonkeyPatch
):
    # the relaxation property (milp notes): a plan with at most `budget` moves
    # that meets the target exactly (engine) is feasible in the target model
    # with its options fixed, at every refinement level and with lazy options,
    # with and without the centred rows. The target is the deviation of the
    # rank-th best such plan, so one plan sits exactly on the boundary.
    if not centred:
        monkeypatch.setattr(milp, "CENTRED_MAX_CHANGED", 0)
    pr, ex, plans = _panel(seed)
    budget = 2
    within = np.flatnonzero(ex.moves <= budget)
    devs = np.sort(ex.deviation[within])
    target = float(devs[min(rank, devs.size - 1)])
    good = within[ex.deviation[within] <= target]
    refine = milp._Refine()
    refine.learn(pr, plans[within[0]])
    goal = Goal(target=target / 100)
    for level in (0, 2):
        for idx in good[:6]:
            m, _vars, _cost = milp._target_model(
                pr, goal, target / 100, budget, level, [], refine, [], None
            )
            xs = np.zeros(pr.n_options)
            xs[plans[idx]] = 1.0
            m.lb[0][:] = xs
            m.ub[0][:] = xs
            res = m.solve(np.zeros(m.n), 10.0, gap=0.0)
            assert res.status == 0, (level, idx, res.message)


def test_centred_tangents_cover_the_range_within_their_error() -> None:
    # (R² + ρ²)/(2ρ) over the grid is at most R·(1 + CENTRED_TANGENT_ERROR)
    # for every R in [r_min, r_max] [computed: worst case between two points]
    pts = milp._tangent_points(100.0, 250.0, [])
    r = np.linspace(100.0, 250.0, 20001)
    env = np.min((r[:, None] ** 2 + pts[None, :] ** 2) / (2 * pts[None, :]), axis=1)
    assert np.all(env >= r * (1 - 1e-12))
    assert np.max(env / r - 1) <= milp.CENTRED_TANGENT_ERROR * (1 + 1e-9)


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("target", [2.0, 5.0, 15.0])
def test_counting_out_finds_every_plan_the_exhaustive_search_finds(seed: int, target: float):
    # tri.rebalance.exhaust: the plans with at most k moves meeting the target
    # are exactly those of the engine's exhaustive search (up to the 1e-7 slack)
    pr, ex, plans = _panel(seed)
    for k in range(0, 4):
        assert plans_count(pr, k) == int(np.sum(ex.moves <= k))
        found = plans_within(pr, target / 100, None, k)
        assert found is not None
        got = {tuple(a.tolist()) for a in found}
        want = {
            tuple(plans[i].tolist())
            for i in np.flatnonzero((ex.moves <= k) & (ex.deviation <= target * (1 + 1e-9)))
        }
        near = {
            tuple(plans[i].tolist())
            for i in np.flatnonzero((ex.moves <= k) & (ex.deviation <= target * (1 + 2e-7)))
        }
        if len(found) < 64:
            assert want <= got <= near
        else:
            assert got <= near


@pytest.mark.parametrize("seed", range(4))
def test_counting_out_respects_the_neutral_limit(seed: int) -> None:
    pr, ex, plans = _panel(seed)
    limit = float(np.quantile(ex.neutral, 0.3))
    found = plans_within(pr, 0.5, limit, 2)
    assert found is not None
    got = {tuple(a.tolist()) for a in found}
    ok = (ex.moves <= 2) & (ex.deviation <= 50.0) & (ex.neutral <= limit * (1 + 1e-9))
    want = {tuple(plans[i].tolist()) for i in np.flatnonzero(ok)}
    if len(found) < 64:
        assert want <= got


def test_counting_out_declines_large_or_new_circuit_problems() -> None:
    from tri.rebalance import exhaust

    schedule = random_rail(np.random.default_rng(1), 8)
    pr = build_problem(schedule, movable_rail(schedule))
    assert changed_max(pr, 2) == min(2, pr.n_movable)
    old = exhaust.PLAN_LIMIT
    try:
        exhaust.PLAN_LIMIT = 5
        assert plans_within(pr, 0.05, None, 2) is None
    finally:
        exhaust.PLAN_LIMIT = old
    # a circuit without a slot: placing it is free, the count does not apply
    idx = movable_rail(schedule)[0]
    unplaced = schedule.with_circuit(idx, schedule.circuits[idx].on_phases(None))
    pr2 = build_problem(unplaced, movable_rail(schedule))
    assert plans_within(pr2, 0.05, None, 2) is None


def test_cross_bound_without_any_change() -> None:
    # no option changes the phase (every δ is 0): no products, empty parts
    from tri.rebalance.squares import cross_bound

    cb = cross_bound(np.array([0, 0, 1]), np.zeros((3, 4), dtype=complex), 2)
    assert cb.touch.size == 0 and cb.parts.shape == (0, 8)
    assert cb.largest(np.zeros(0), np.zeros(0, dtype=bool)) == 0.0
    assert cb.upper == 0.0
