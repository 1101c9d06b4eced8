"""The polygon and sector bounds (Theorems 1-3 of ``tri.rebalance.polygon``) and the floor.

Kinds: the proven error bound checked numerically and at its worst case
(analytic special case), invariants by hypothesis, and the problem's
superposition against the engine run on whole schedules.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from test_rebalance_helpers import movable_rail, random_rail, random_two_column

from tri.rebalance.plan_currents import assess, floor_of, spectra, triplen_neutral_a
from tri.rebalance.polygon import (
    DEFAULT_SIDES,
    polygon_directions,
    polygon_error,
    polygon_norm,
    reach_from_support,
    sectors,
    sides_for_error,
)
from tri.rebalance.problem import build_problem
from tri.rebalance.results import apply_moves
from tri.schedule.to_engine import analyse_schedule

finite = st.floats(-1e4, 1e4, allow_nan=False)


def test_default_polygon_error_is_below_half_a_percent() -> None:
    # 1/cos(pi/36) - 1 = 0.003820 [computed] (DEFAULT_SIDES is 36); pytest's default
    # 1e-6 relative: the same closed form, equal up to round-off
    assert polygon_error(DEFAULT_SIDES) == pytest.approx(1 / math.cos(math.pi / 36) - 1)
    assert polygon_error(DEFAULT_SIDES) < 0.005


def test_fewest_sides_for_half_a_percent_is_32() -> None:
    # 1/cos(pi/32) - 1 = 0.00484 <= 0.005 < 1/cos(pi/31) - 1 = 0.00516 [computed]
    assert sides_for_error(0.005) == 32
    assert polygon_error(31) > 0.005 >= polygon_error(32)


@settings(max_examples=200)
@given(x=finite, y=finite, m=st.integers(3, 90))
def test_polygon_between_cos_and_one(x: float, y: float, m: int) -> None:
    # Theorem 1: cos(pi/m)|z| <= P_m(z) <= |z| (tolerance: float round-off)
    z = complex(x, y)
    p = float(polygon_norm(z, m))
    assert p <= abs(z) * (1 + 1e-12) + 1e-12
    assert p >= math.cos(math.pi / m) * abs(z) * (1 - 1e-12) - 1e-12


@pytest.mark.parametrize("m", [8, 32, 36, 90])
def test_polygon_bound_is_attained_halfway_between_directions(m: int) -> None:
    # analytic worst case: z at angle pi/m lies halfway between u_0 and u_1, so
    # P_m(z) = |z| cos(pi/m) exactly; the bound of Theorem 1 cannot be improved
    z = 5.0 * complex(math.cos(math.pi / m), math.sin(math.pi / m))
    assert float(polygon_norm(z, m)) == pytest.approx(5.0 * math.cos(math.pi / m), rel=1e-12)
    # and the constraint set {P_m <= R} reaches R / cos(pi/m): relative error polygon_error(m)
    # (rel 1e-9: "x - 1" of x ≈ 1.0005..1.08 keeps all but ~3 of the 16 digits)
    assert abs(z) / float(polygon_norm(z, m)) - 1 == pytest.approx(polygon_error(m), rel=1e-9)


@settings(max_examples=200)
@given(
    start=st.floats(-math.pi, math.pi),
    span=st.floats(0.0, 2.0),
    frac=st.floats(0.0, 1.0),
    mag=st.floats(1e-3, 1e3),
    width=st.floats(0.01, 0.5),
)
def test_sector_upper_bound(start: float, span: float, frac: float, mag: float, width: float):
    # Theorem 2: inside its sector, |z| <= <z, centre> / cos(half-width) [computed]
    # (tolerances 1e-9 relative and absolute: round-off of cos/sin of the drawn angles,
    # far below the ≥ 0.01 rad sector widths drawn)
    sec = sectors(start, start + span, width)
    ang = start + frac * span
    z = mag * complex(math.cos(ang), math.sin(ang))
    inside = [
        j
        for j in range(sec.count)
        if (z * np.conj(sec.lower_normals[j])).real >= -1e-9 * mag
        and (z * np.conj(sec.upper_normals[j])).real >= -1e-9 * mag
    ]
    assert inside, "every angle of the interval lies in some sector"
    j = inside[0]
    proj = (z * np.conj(sec.centres[j])).real
    assert mag <= proj * sec.upper_factor * (1 + 1e-9) + 1e-9
    assert sec.half_width <= width / 2 + 1e-12


@settings(max_examples=60)
@given(
    pts=st.lists(st.tuples(finite, finite), min_size=1, max_size=20),
)
def test_reach_contains_every_point(pts: list[tuple[float, float]]) -> None:
    z = np.array([complex(a, b) for a, b in pts])
    dirs = polygon_directions(72)
    support = np.max(np.real(np.conj(dirs)[:, None] * z[None, :]), axis=1)
    r = reach_from_support(dirs, support)
    # tolerances 1e-9 relative + 1e-6 absolute: points up to |z| ≈ 1.4e4 and support
    # values built from cos/sin of 72 directions, so round-off is ~1e-12 of that, with
    # margin; a real miss would be of the order of the polygon error (≥ 1e-3 relative)
    assert np.all(np.abs(z) <= r.max_abs * (1 + 1e-9) + 1e-6)
    assert np.all(np.abs(z) >= r.min_abs * (1 - 1e-9) - 1e-6)
    if r.angle_stop - r.angle_start < 2 * math.pi - 1e-9:
        rel = np.angle(z * np.exp(-1j * r.angle_start))
        rel = np.where(rel < -1e-9, rel + 2 * math.pi, rel)
        assert np.all(rel <= r.angle_stop - r.angle_start + 1e-6)


@pytest.mark.parametrize("seed", range(6))
def test_superposition_equals_engine_on_the_moved_schedule(seed: int) -> None:
    # the optimiser's exact figures (sum of per-option engine currents) must equal
    # the engine run on the schedule after the moves (tolerance: round-off, 1e-9)
    rng = np.random.default_rng(seed)
    schedule = random_rail(rng, 9)
    pr = build_problem(schedule, movable_rail(schedule))
    assign = np.array(
        [rng.integers(pr.starts[i], pr.starts[i + 1]) for i in range(pr.n_free)], dtype=int
    )
    mine = assess(pr, assign)
    moved = schedule
    for i, idx in enumerate(pr.free.tolist()):
        moved = moved.with_circuit(idx, schedule.circuits[idx].on_phases(pr.phases[assign[i]]))
    eng = analyse_schedule(moved)
    assert mine.phase_rms_a == pytest.approx([p.rms_a for p in eng.phases], rel=1e-9)
    assert mine.neutral_rms_a == pytest.approx(eng.neutral.rms_a, rel=1e-9, abs=1e-9)
    assert mine.deviation_pct == pytest.approx(
        eng.current_unbalance.max_deviation_pct, rel=1e-7, abs=1e-9
    )


@pytest.mark.parametrize("seed", range(6))
def test_floor_is_invariant_and_below_every_phase(seed: int) -> None:
    rng = np.random.default_rng(50 + seed)
    schedule = random_rail(rng, 8)
    pr = build_problem(schedule, movable_rail(schedule))
    trip = triplen_neutral_a(pr)
    for _ in range(20):
        assign = np.array(
            [rng.integers(pr.starts[i], pr.starts[i + 1]) for i in range(pr.n_free)], dtype=int
        )
        v, n = spectra(pr, assign)
        # F is the same for every plan (problem notes) [computed]; rel 1e-9: the same
        # sums taken over differently assigned spectra (round-off only)
        assert floor_of(v, pr.orders) == pytest.approx(pr.floor_a, rel=1e-9)
        r = np.sqrt(np.sum(np.abs(v) ** 2, axis=1))
        assert r.max() >= pr.floor_a * (1 - 1e-12)
        assert r.mean() >= pr.floor_a * (1 - 1e-12)
        # the triplen part of the neutral never changes
        mask = pr.orders % 3 == 0
        assert float(np.sqrt(np.sum(np.abs(n[mask]) ** 2))) == pytest.approx(trip, rel=1e-9)


def test_floor_is_the_positive_sequence_current_for_linear_loads() -> None:
    # with linear loads F = |I1|, the engine's positive-sequence magnitude [computed]
    # (rel 1e-9: two routes to the same sums, round-off only)
    rng = np.random.default_rng(3)
    schedule = random_two_column(rng, 14, harmonics=False)
    pr = build_problem(schedule, [])
    eng = analyse_schedule(schedule)
    assert pr.floor_a == pytest.approx(eng.sequence.i1.magnitude, rel=1e-9)


def test_apply_moves_keeps_source_index() -> None:
    from test_rebalance_helpers import panel

    from tri.rebalance import Move
    from tri.schedule.model import Circuit, Schedule

    c = Circuit(name="x", slot=1, phases=(0,), load_value=100.0, source_index=4)
    s = Schedule(panel=panel("two-column"), circuits=(c,))
    out = apply_moves(s, [Move(0, "x", 1, 1, 4, (0,), (1,))])
    assert out.circuits[0].slot == 4 and out.circuits[0].phases == (1,)
    assert out.circuits[0].source_index == 4
