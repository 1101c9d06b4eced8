"""Bounds of the target model and the plan count, against the exhaustive search.

Sources of expected values: :func:`test_rebalance_helpers.exhaustive_rail`
(every assignment of a rail board analysed by the engine itself, not by
the rebalancer's superposition) and, for the model rows, HiGHS run on the
rows with the options fixed. Each test names the bound it checks; the
proofs are in the docstrings of :mod:`tri.rebalance.squares`,
:mod:`tri.rebalance.lower_bounds`, :mod:`tri.rebalance.exact_square` and
:mod:`tri.rebalance.exhaust`.

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
from sweep import sweep
from test_rebalance_helpers import exhaustive_rail, movable_rail, random_rail

from tri.engine.harmonics import rms
from tri.rebalance import target_model
from tri.rebalance.electrical import Electrical
from tri.rebalance.exact_square import add_exact_square_rows, square_terms
from tri.rebalance.exhaust import plans_count, plans_within
from tri.rebalance.lower_bounds import RESOLUTIONS, add_rms_lower_bounds, phase_reach
from tri.rebalance.model import Model
from tri.rebalance.plan_currents import spectra
from tri.rebalance.problem import PAIRS, build_problem
from tri.rebalance.square_rows import TANGENT_ERROR, square_column, tangent_points
from tri.rebalance.squares import changed_max, square_bound
from tri.rebalance.target_model import Learnt, build_target_model

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


def _fix(m: Model, x: int, pr, assign: np.ndarray) -> None:
    xs = np.zeros(pr.n_options)
    xs[assign] = 1.0
    m.fix(np.arange(x, x + pr.n_options), xs)


def _fixed_model(pr, assign: np.ndarray):
    m = Model()
    x = m.binary(pr.n_options)
    return m, x


def _currents(m: Model, x: int, pr) -> Electrical:
    return Electrical(x=x, v=m.var(6 * pr.orders.size, -np.inf, np.inf), n=None, h=pr.orders.size)


def _fix_currents(m, pr, el: Electrical, assign: np.ndarray) -> None:
    """Equality rows holding the model's phase currents at those of a plan."""
    v, _ = spectra(pr, assign)
    for q in range(3):
        parts = np.column_stack([v[q].real, v[q].imag]).ravel()
        m.block(el.phase_cols(q)[:, None], 1.0, parts, parts)


@pytest.mark.parametrize("seed", range(3))
@pytest.mark.parametrize("through_currents", [False, True])
def test_cross_rows_in_the_model_match_the_bounds(seed: int, through_currents: bool) -> None:
    # the rows of square_rows.cross_rows, solved by HiGHS with the options
    # fixed, allow exactly CrossBound.largest (bounds A, B, C and, for lazy
    # options, G); bound G written with a coefficient per partner or through
    # the currents (glover_rows) allows the same
    pr, ex, plans = _panel(seed)
    rng = np.random.default_rng(seed)
    budget = 3
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
                    el = _currents(m, x, pr)
                    _fix_currents(m, pr, el, a)
                    vcols = el.phase_cols(p)
                col = square_column(m, x, sb, lazy, -np.inf, np.inf, vcols)
                _fix(m, x, pr, a)
                cost = np.zeros(m.n)
                cost[col] = -1.0
                res = m.solve(cost, 10.0, gap=0.0)
                assert res.status == "optimal"
                want = sb.largest(a, lazy)
                assert -res.objective == pytest.approx(want, rel=1e-7, abs=1e-6)


@pytest.mark.parametrize("seed", range(4))
def test_lower_block_is_below_every_plan_and_exact_where_visited(seed: int) -> None:
    # add_rms_lower_bounds: at every plan the smallest r the rows allow is at
    # most the engine's R_p and at least the fundamental's polygon bound
    # |z_p|·cos(step/2) (Theorem 1, at each resolution); at a visited plan it
    # equals R_p (1e-7: HiGHS's tolerance)
    pr, _ex, plans = _panel(seed, n=5)
    rng = np.random.default_rng(seed)
    visited_idx = int(rng.integers(len(plans)))
    v_vis, _ = spectra(pr, plans[visited_idx])
    picks = [*rng.choice(len(plans), size=6, replace=False).tolist(), visited_idx]
    for res_level in RESOLUTIONS:
        for idx in picks:
            a = plans[idx]
            v, _ = spectra(pr, a)
            for p in range(3):
                m, x = _fixed_model(pr, a)
                el = _currents(m, x, pr)
                _fix_currents(m, pr, el, a)
                r = m.var(1, 0.0, np.inf)
                reach = phase_reach(pr, p, pr.n_movable)
                u = v_vis[p] / np.sqrt(np.sum(np.abs(v_vis[p]) ** 2))
                add_rms_lower_bounds(m, pr, el, p, [r], reach, [u], res_level)
                _fix(m, x, pr, a)
                cost = np.zeros(m.n)
                cost[r] = 1.0
                res = m.solve(cost, 10.0, gap=0.0)
                assert res.status == "optimal"
                true = float(rms(v[p]))
                half = math.radians(res_level.step_deg / 2)
                assert res.objective <= true * (1 + 1e-7)
                assert res.objective >= abs(v[p, 0]) * math.cos(half) * (1 - 1e-7)
                if idx == visited_idx:
                    assert res.objective == pytest.approx(true, rel=1e-7)


@pytest.mark.parametrize("seed", sweep(SEEDS, 1))  # all six: TRI_FULL_SWEEP=1
@pytest.mark.parametrize("rank", [0, 5])
@pytest.mark.parametrize("upper", ["centred", "sectors", "exact"])
def test_every_plan_meeting_the_target_satisfies_the_target_model(
    seed: int, rank: int, upper: str, monkeypatch: pytest.MonkeyPatch
):
    # the relaxation property (target_model notes): a plan with at most
    # `budget` moves that meets the target exactly (engine) is feasible in the
    # target model with its options fixed, at every refinement level and with
    # lazy options, with the centred rows, the sectors alone, or the exact
    # squares. The target is the deviation of the rank-th best such plan, so
    # one plan sits exactly on the boundary.
    if upper == "sectors":
        monkeypatch.setattr(target_model, "CENTRED_MAX_CHANGED", 0)
    pr, ex, plans = _panel(seed)
    squares = square_terms(pr) if upper == "exact" else None
    budget = 2
    within = np.flatnonzero(ex.moves <= budget)
    devs = np.sort(ex.deviation[within])
    target = float(devs[min(rank, devs.size - 1)])
    good = within[ex.deviation[within] <= target]
    learnt = Learnt()
    learnt.learn(pr, plans[within[0]])
    for level in (0, 2):
        for idx in good[:6]:
            tm = build_target_model(pr, target / 100, budget, level, learnt, None, [], squares)
            _fix(tm.model, tm.electrical.x, pr, plans[idx])
            res = tm.model.solve(np.zeros(tm.model.n), 10.0, gap=0.0)
            assert res.status == "optimal", (level, idx, res.message)


@pytest.mark.parametrize("seed", sweep(range(2), 1))  # ~10 s each; both: TRI_FULL_SWEEP=1
def test_exact_squares_equal_the_engine_and_bound_it_from_above(seed: int) -> None:
    # exact_square: the terms give R_p² of every plan (round-off), and the rows
    # let R_p reach the engine's value at a plan but not exceed it by more
    # than the tangent error (1e-6 relative at the finest level, plus 1e-7 of
    # HiGHS's tolerance)
    pr, ex, plans = _panel(seed)
    terms = square_terms(pr)
    assert terms is not None
    for a, r in zip(plans[::7], ex.rms[::7], strict=True):
        assert terms.value(a) == pytest.approx(r**2, rel=1e-9)
    for idx in range(0, len(plans), max(1, len(plans) // 3)):  # the first, a third, ...
        m, x = _fixed_model(pr, plans[idx])
        r0 = m.var(3, 0.0, np.inf)
        add_exact_square_rows(m, x, [r0, r0 + 1, r0 + 2], terms, 1.0, [1e4] * 3, 2)
        _fix(m, x, pr, plans[idx])
        for p in range(3):
            cost = np.zeros(m.n)
            cost[r0 + p] = -1.0
            res = m.solve(cost, 10.0, gap=0.0)
            assert res.status == "optimal"
            assert -res.objective >= ex.rms[idx, p] * (1 - 1e-7)
            if ex.rms[idx, p] >= 1.0:  # the envelope's range starts at r_min = 1 A
                assert -res.objective <= ex.rms[idx, p] * (1 + 1e-6 + 1e-7)


def test_centred_tangents_cover_the_range_within_their_error() -> None:
    # (R² + ρ²)/(2ρ) over the grid is at most R·(1 + TANGENT_ERROR) for every
    # R in [r_min, r_max] [computed: worst case between two points]
    pts = tangent_points(100.0, 250.0, [])
    r = np.linspace(100.0, 250.0, 20001)
    env = np.min((r[:, None] ** 2 + pts[None, :] ** 2) / (2 * pts[None, :]), axis=1)
    assert np.all(env >= r * (1 - 1e-12))
    assert np.max(env / r - 1) <= TANGENT_ERROR * (1 + 1e-9)


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("target", [2.0, 5.0, 15.0])
def test_counting_out_finds_every_plan_the_exhaustive_search_finds(seed: int, target: float):
    # tri.rebalance.exhaust: the plans with at most k moves meeting the target
    # are exactly those of the engine's exhaustive search (up to the 1e-7 slack)
    pr, ex, plans = _panel(seed)
    for k in range(0, 4):
        assert plans_count(pr, k) == int(np.sum(ex.moves <= k))
        counted = plans_within(pr, target / 100, None, k)
        assert counted is not None
        got = {tuple(a.tolist()) for a in counted.plans}
        want = {
            tuple(plans[i].tolist())
            for i in np.flatnonzero((ex.moves <= k) & (ex.deviation <= target * (1 + 1e-9)))
        }
        near = {
            tuple(plans[i].tolist())
            for i in np.flatnonzero((ex.moves <= k) & (ex.deviation <= target * (1 + 2e-7)))
        }
        assert counted.complete  # at most 3^6 plans: all listed
        assert want <= got <= near


@pytest.mark.parametrize("seed", range(4))
def test_counting_out_respects_the_neutral_limit(seed: int) -> None:
    pr, ex, plans = _panel(seed)
    limit = float(np.quantile(ex.neutral, 0.3))
    counted = plans_within(pr, 0.5, limit, 2)
    assert counted is not None and counted.complete
    got = {tuple(a.tolist()) for a in counted.plans}
    ok = (ex.moves <= 2) & (ex.deviation <= 50.0) & (ex.neutral <= limit * (1 + 1e-9))
    want = {tuple(plans[i].tolist()) for i in np.flatnonzero(ok)}
    assert want <= got


def test_counting_out_declines_large_problems_and_lists_new_circuits_freely() -> None:
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
    # a circuit without a slot: placing it is not a relocation, so every one of
    # its options is listed on top of the k changes [computed: 3 options, so
    # three times the plans of the others with up to k changes]
    idx = movable_rail(schedule)[0]
    unplaced = schedule.with_circuit(idx, schedule.circuits[idx].on_phases(None))
    pr2 = build_problem(unplaced, movable_rail(schedule))
    rest = build_problem(unplaced, [i for i in movable_rail(schedule) if i != idx])
    assert plans_count(pr2, 2) >= 3 * plans_count(rest, 2) - 2 * plans_count(rest, 2)
    counted = plans_within(pr2, 2.0, None, 2)
    assert counted is not None and counted.complete
    new_opts = {int(a[pr2.free.tolist().index(idx)]) for a in counted.plans}
    assert new_opts == set(pr2.options_of(pr2.free.tolist().index(idx)))
    assert max(counted.changes) <= 2


def test_cross_bound_without_any_change() -> None:
    # no option changes the phase (every δ is 0): no products, empty parts
    from tri.rebalance.squares import cross_bound

    cb = cross_bound(np.array([0, 0, 1]), np.zeros((3, 4), dtype=complex), 2)
    assert cb.touch.size == 0 and cb.parts.shape == (0, 8)
    assert cb.largest(np.zeros(0), np.zeros(0, dtype=bool)) == 0.0
    assert cb.upper == 0.0
