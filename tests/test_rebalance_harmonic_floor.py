"""The harmonic floor (tri.rebalance.harmonic_floor), against every arrangement.

The reference (:mod:`rebalance_reference`) lists every physical arrangement
of a dense small two-column panel (1-, 2- and 3-pole breakers, some locked,
a quarter of the loads with harmonics, every other panel in two scenarios:
the worst case's figures) with its largest phase RMS current from the
engine; nothing of the rebalancer is used. [computed]

* The floor is at most the smallest largest-phase RMS current of every
  arrangement (it is a lower bound on every plan), and its ``Q*`` at most
  the least ``Σ_p q_p²`` found by trying every option of every harmonic
  breaker one by one (a brute force written here).
* The re-layout search that uses it makes only true claims
  (``rebalance_sweep.check_case``).
* Both ways of finding ``Q*``: every pair of half-sums (small panels), and
  the pruned search of :mod:`tri.rebalance.nearest_sums` from the
  descent's value (forced here by a pair limit of 0, as on panels with
  about 20 harmonic breakers).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from rebalance_reference import enumerate_panel, free_breakers
from rebalance_sweep import EDGE, Case, check_case, dense_panel, with_scenarios

import tri.rebalance.harmonic_floor as harmonic_floor_module
from tri.native_output import native_stdout_to_devnull
from tri.rebalance import suggest
from tri.rebalance.harmonic_floor import _projected, harmonic_floor, smallest_leftover
from tri.rebalance.problem import build_problem

#: Panels checked against the brute force of Q* [-].
PANELS = 40
#: Panels enumerated (slow: every arrangement) [-].
ENUMERATED = 10


def _panel(seed: int):
    rng = np.random.default_rng(70_000 + seed)
    sched = dense_panel(rng, int(rng.choice([8, 10, 12])), max_free=7)
    return rng, (with_scenarios(rng, sched) if seed % 2 else sched)


@pytest.fixture(params=["every-pair", "pruned"])
def search(request: pytest.FixtureRequest, monkeypatch: pytest.MonkeyPatch) -> str:
    """Which way ``Q*`` is found: every pair, or the pruned search (pair limit 0)."""
    if request.param == "pruned":
        monkeypatch.setattr(harmonic_floor_module, "PAIR_LIMIT", 0)
    return str(request.param)


def test_the_floor_is_below_every_arrangement_and_relayout_claims_are_true(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    above_f, false = 0, []
    for seed in range(ENUMERATED):
        _, sched = _panel(seed)
        free = free_breakers(sched, "relayout", False)
        pr = build_problem(sched, free)
        bound = harmonic_floor(pr)
        with monkeypatch.context() as m:
            m.setattr(harmonic_floor_module, "PAIR_LIMIT", 0)
            pruned = harmonic_floor(pr)
        assert bound is not None and pruned is not None
        assert pruned == pytest.approx(bound, rel=1e-9)
        assert bound >= pr.worst_floor_a * (1 - EDGE)
        enum = enumerate_panel(sched, free)
        if enum.max_rms.size == 0:
            continue
        assert float(enum.max_rms.min()) >= max(bound, pruned) * (1 - EDGE), seed
        above_f += bound > pr.worst_floor_a * (1 + 1e-6)
        if seed % 2 == 0:
            case = Case(sched, "relayout")
            with native_stdout_to_devnull():
                s = suggest(sched, case.options(time_limit_s=2.0, floor_gap=1e-3))
            false += [(seed, s.status, e) for e in check_case(case, s, enum)]
    assert not false
    assert above_f >= ENUMERATED // 4  # not vacuous: the bound rises above F


def test_q_min_against_brute_force(search: str) -> None:
    for seed in range(PANELS):
        _, sched = _panel(seed)
        pr = build_problem(sched, free_breakers(sched, "relayout", False), scenarios=False)
        base, items, _ = _projected(pr)
        left = smallest_leftover(pr)
        assert left is not None
        least = min(
            float(np.sum((base + sum((d[i] for d, i in zip(items, pick, strict=True)), 0)) ** 2))
            for pick in itertools.product(*(range(len(d)) for d in items))
        )
        assert left.q_min <= least * (1 + 1e-9) + 1e-12
        assert left.q_min == pytest.approx(least, rel=1e-6, abs=1e-9)
