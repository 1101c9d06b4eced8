"""The crossing bounds (tri.rebalance.crossing) against exhaustive enumeration.

Sources of expected values: :func:`test_rebalance_helpers.exhaustive_rail`
(every assignment of a rail board's movable circuits, each whole panel
analysed by the engine itself) and :mod:`rebalance_reference` (every
arrangement of a dense two-column panel, relocations counted as the work
order counts them, engine figures); plain Python loops over every plan
for the knapsack and Lagrange pieces. [computed]

Tolerances: a bound may pass the true value only by round-off, 1e-9
relative; targets are given to the reference with a relative 1e-7 band
(``rebalance_sweep.EDGE``) so that a plan on the very edge never decides.
"""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from rebalance_reference import enumerate_panel, free_breakers
from rebalance_sweep import EDGE, dense_panel
from test_rebalance_helpers import exhaustive_rail, movable_rail, random_rail

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import SuggestOptions, suggest
from tri.rebalance.crossing import budget_floor, changes_lower_bound, frame_of
from tri.rebalance.knapsack import best_gain, max_under_row
from tri.rebalance.plan_currents import spectra
from tri.rebalance.problem import build_problem
from tri.rebalance.solve import free_indices

TARGETS = (2.0, 5.0, 10.0, 20.0, 150.0)


def _rail(seed: int, n: int | None = None):
    rng = np.random.default_rng(seed)
    sched = random_rail(rng, n or int(rng.integers(3, 8)), harmonics=bool(rng.random() < 0.8))
    free = movable_rail(sched)
    return sched, build_problem(sched, free) if free else None


def _plans(pr) -> np.ndarray:
    """Every plan of a problem (options per free circuit), in product order."""
    axes = [range(pr.starts[i], pr.starts[i + 1]) for i in range(pr.n_free)]
    return np.array(list(itertools.product(*axes)), dtype=int).reshape(-1, pr.n_free)


def test_frame_is_the_sequence_frame() -> None:
    # a_p ≤ R_p at every plan (Lemma 1), Σ_p a_p = 3F at every plan (the
    # sequence currents do not move), and at the reference a² + b² = R²
    for seed in range(12):
        _sched, pr = _rail(seed, 6)
        if pr is None:
            continue
        fr = frame_of(pr)
        assert fr.floor_a == pytest.approx(pr.floor_a, rel=1e-12)
        b0 = np.sum(fr.l0**2, axis=1) + fr.res0**2
        r0 = np.sqrt(np.sum(np.abs(spectra(pr, pr.current_assignment())[0]) ** 2, axis=1))
        assert fr.a0**2 + b0 == pytest.approx(r0**2, rel=1e-9)
        for a in _plans(pr):
            ap = fr.a0 + fr.da[a].sum(axis=0)
            r = np.sqrt(np.sum(np.abs(spectra(pr, a)[0]) ** 2, axis=1))
            assert np.all(ap <= r * (1 + 1e-12) + 1e-9)
            assert ap.sum() == pytest.approx(3 * pr.floor_a, rel=1e-9)


def _changes(pr, a: np.ndarray) -> int:
    return int(np.sum(pr.movable & (a != pr.current_assignment())))


@pytest.mark.parametrize("seed", range(6))
def test_best_gain_is_the_best_plan_within_the_changes(seed: int) -> None:
    _sched, pr = _rail(seed, 6)
    fr = frame_of(pr)
    rng = np.random.default_rng(seed)
    values = rng.normal(size=(3, pr.n_options))
    values[:, pr.current_assignment()] = 0.0  # reference options give 0
    plans = _plans(pr)
    for k in range(pr.n_movable + 1):
        got = best_gain(fr.choices, values, k)
        for j in range(3):
            want = max(values[j, a].sum() for a in plans if _changes(pr, a) <= k)
            assert got[j] == pytest.approx(want, abs=1e-12)


@pytest.mark.parametrize("seed", range(6))
def test_lagrange_bound_holds_at_every_plan_under_the_row(seed: int) -> None:
    # max_under_row is at least f at every plan with ≤ k changes that meets the row,
    # and at most the unconstrained maximum (it is a bound, and not a vacuous one)
    _sched, pr = _rail(seed, 6)
    fr = frame_of(pr)
    rng = np.random.default_rng(100 + seed)
    df = rng.normal(size=(4, pr.n_options))
    d = rng.normal(size=pr.n_options)
    df[:, pr.current_assignment()] = 0.0
    d[pr.current_assignment()] = 0.0
    f0, c = rng.normal(size=4), 0.5
    plans = _plans(pr)
    for k in range(pr.n_movable + 1):
        ok = [a for a in plans if _changes(pr, a) <= k]
        beta = float(np.median([c + d[a].sum() for a in ok]))
        ub = max_under_row(fr.choices, f0, df, (c, d, beta), k)
        for j in range(4):
            under = [f0[j] + df[j, a].sum() for a in ok if c + d[a].sum() <= beta]
            assert max(under) <= ub[j] + 1e-9
            assert ub[j] <= f0[j] + best_gain(fr.choices, df[j], k) + 1e-9


def _fewest_rail(ex, target_pct: float, cap: int) -> int:
    """Fewest moves meeting the target (``cap + 1`` when none), with the edge band."""
    best = ex.fewest_moves(target_pct * (1 - EDGE))
    return cap + 1 if best is None else best


def test_changes_bound_never_exceeds_the_fewest_moves_on_rail_boards() -> None:
    # every target and every small panel: bound ≤ the exhaustive minimum; and the
    # bound is no formality: it reaches the minimum (above 0) on a good share of them
    tight = total = 0
    for seed in range(60):
        sched, pr = _rail(seed)
        if pr is None:
            continue
        ex = exhaustive_rail(sched)
        for t in TARGETS:
            truth = _fewest_rail(ex, t, pr.n_movable)
            lb = changes_lower_bound(pr, t / 100, pr.n_movable + 1, pr.n_movable)
            assert lb <= truth, (seed, t, lb, truth)
            total += 1
            tight += 0 < lb == truth
    assert tight >= total // 20


def test_changes_bound_never_exceeds_the_relocations_on_dense_two_column_panels() -> None:
    # the reference counts relocations over every arrangement (slots included);
    # option changes never exceed relocations, so the bound holds for them too
    checked = 0
    for seed in range(40):
        rng = np.random.default_rng(seed)
        sched = dense_panel(rng, int(rng.choice([8, 10, 12])))
        opts = SuggestOptions(target_pct=10.0)
        free = free_indices(sched, opts)
        if not free:
            continue
        assert free == free_breakers(sched, "fewest-moves", False)
        pr = build_problem(sched, free)
        enum = enumerate_panel(sched, free)
        for t in TARGETS:
            ok = enum.deviation_pct <= t * (1 - EDGE)
            truth = int(enum.relocations[ok].min()) if np.any(ok) else pr.n_movable + 1
            lb = changes_lower_bound(pr, t / 100, pr.n_movable + 1, pr.n_movable)
            assert lb <= truth, (seed, t, lb, truth)
            checked += 1
    assert checked > 100


def test_budget_floor_never_exceeds_the_best_balance() -> None:
    # Theorem 3 against every assignment within k moves, with extra directions
    # from random plans (any unit direction is allowed); at least the floor F
    for seed in range(40):
        sched, pr = _rail(seed)
        if pr is None:
            continue
        ex = exhaustive_rail(sched)
        rng = np.random.default_rng(seed)
        plans = _plans(pr)
        dirs = [spectra(pr, plans[i])[0] for i in rng.integers(0, len(plans), 3)]
        for k in range(pr.n_movable + 1):
            bound = budget_floor(pr, k, dirs)
            assert bound >= pr.floor_a * (1 - 1e-12)
            assert bound <= ex.best_max_rms(k) * (1 + 1e-9), (seed, k)


def test_budget_floor_sees_a_crowded_phase() -> None:
    # six 1 kW loads on phase A, one of them movable: one move takes at most one
    # load off A, so A keeps at least 5 kW; the floor F is the mean, 2 kW. With
    # unity power factor and no harmonics the bound is exact: 5 kW / 120 V = 41.67 A
    # [computed: R_A = 5·1000/120, the best the exhaustive search finds too]
    from test_rebalance_helpers import circuit, panel

    from tri.schedule.model import Schedule

    loads = [circuit(f"L{i}", 1000, phases=(0,), locked=i > 0) for i in range(6)]
    sched = Schedule(panel=panel(), circuits=tuple(loads))
    pr = build_problem(sched, movable_rail(sched))
    ex = exhaustive_rail(sched)
    assert ex.best_max_rms(1) == pytest.approx(5000 / 120, rel=1e-9)
    assert budget_floor(pr, 1) == pytest.approx(5000 / 120, rel=1e-9)
    assert pr.floor_a == pytest.approx(6000 / 120 / 3, rel=1e-9)


@pytest.mark.parametrize("layout", ["two-column", "phases"])
def test_the_bound_is_reached_on_an_84_circuit_panel(layout: str) -> None:
    # on the benchmark's 84-circuit panels the bound equals the relocations of a
    # plan that meets the target (counted here from the schedules, deviation from
    # the engine): the plan is optimal, and the suggestion says so
    import sys
    from pathlib import Path

    sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "bench"))
    from bench_rebalance import random_panel

    from tri.schedule.to_engine import analyse_schedule

    for seed in range(3):
        sched = random_panel(84, seed, layout)
        with native_stdout_to_devnull():
            s = suggest(sched, SuggestOptions(target_pct=10.0, time_limit_s=20))
        moved = sum(
            1
            for a, b in zip(sched.circuits, s.schedule.circuits, strict=True)
            if (a.slot, a.phases) != (b.slot, b.phases)
        )
        assert analyse_schedule(s.schedule).current_unbalance.max_deviation_pct <= 10.0
        pr = build_problem(sched, free_indices(sched, SuggestOptions(target_pct=10.0)))
        assert changes_lower_bound(pr, 0.1, moved, pr.n_movable) == moved
        assert s.status == "optimal" and s.relocations == moved


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(seed=st.integers(0, 100_000), n=st.integers(2, 6), t=st.sampled_from(TARGETS))
def test_hypothesis_changes_bound_is_a_bound(seed: int, n: int, t: float) -> None:
    sched, pr = _rail(seed, n)
    if pr is None:
        return
    truth = _fewest_rail(exhaustive_rail(sched), t, pr.n_movable)
    assert changes_lower_bound(pr, t / 100, pr.n_movable + 1, pr.n_movable) <= truth


@given(
    a=st.floats(1e-3, 1e4),
    frac=st.floats(1e-3, 1.0),
    b=st.floats(-1e4, 1e4),
)
def test_lemma_one_second_order(a: float, frac: float, b: float) -> None:
    # sqrt(a² + b²) ≤ a + b²/(2L) for a ≥ L > 0, and ≥ a [computed]
    low = a * frac
    r = math.hypot(a, b)
    assert a <= r * (1 + 1e-15)
    assert r <= (a + b * b / (2 * low)) * (1 + 1e-12)
