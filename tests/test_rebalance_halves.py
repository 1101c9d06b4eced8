"""The listing of every plan below a cutoff (tri.rebalance.halves), against every arrangement.

The reference (:mod:`rebalance_reference`) lists every physical arrangement
of a dense small two-column panel (1-, 2- and 3-pole breakers, some locked,
a quarter of the loads with harmonics) with its figures from the engine and
its relocations as the work order counts them, every other panel in two
scenarios too (the worst case's figures); nothing of the rebalancer is
used. [computed]

* Every arrangement with at most ``k`` relocations (so at most ``k`` option
  changes) whose largest phase RMS current is below the listing's ``tail``
  has its phases among the plans listed, and every plan listed has the
  engine's value of its phases.
* The balance search with a budget, made to settle by this listing
  (the smaller listing of :mod:`tri.rebalance.exhaust` switched off), makes
  only true claims (``rebalance_sweep.check_case``).
"""

from __future__ import annotations

import numpy as np
import pytest
from rebalance_reference import distinct_rows, enumerate_panel, free_breakers
from rebalance_sweep import EDGE, Case, check_case, dense_panel, with_scenarios
from sweep import sweep

import tri.rebalance.balance as balance
import tri.rebalance.solve as solve
from tri.native_output import native_stdout_to_devnull
from tri.rebalance import suggest
from tri.rebalance.halves import halves_fit, plans_below
from tri.rebalance.problem import build_problem
from tri.schedule.slots import slot_phases

#: Panels of each test [-].
PANELS = 60


def _panel(seed: int):
    rng = np.random.default_rng(50_000 + seed)
    sched = dense_panel(rng, int(rng.choice([8, 10, 12])), max_free=7)
    return rng, (with_scenarios(rng, sched) if seed % 2 else sched)


def _phases_key(phases) -> tuple:
    return tuple(tuple(sorted(p)) for p in phases)


def _listed_values(got: dict, slots: np.ndarray, poles: list[int]) -> np.ndarray:
    """The listed value of each arrangement's phases (NaN: not listed) [A].

    Arrangements that give every breaker the same phases share a key, so the
    keys are built once per distinct row of phase codes.
    """
    codes = np.zeros(slots.shape, dtype=int)
    keys_of: list[list[tuple[int, ...]]] = []
    for k, p in enumerate(poles):
        seen: list[tuple[int, ...]] = []
        table = np.zeros(int(slots.max(initial=0)) + 1, dtype=int)
        for s in np.unique(slots[:, k]):
            key = tuple(sorted(slot_phases(int(s), p)))
            if key not in seen:
                seen.append(key)
            table[s] = seen.index(key)
        codes[:, k] = table[slots[:, k]]
        keys_of.append(seen)
    first_row, back = distinct_rows(codes)
    per_row = np.array(
        [got.get(tuple(keys_of[k][c] for k, c in enumerate(codes[r])), np.nan) for r in first_row],
        dtype=float,
    )
    return per_row[back] if back.size else np.zeros(0)


@pytest.mark.parametrize("chunk", sweep(range(3), 1))  # all 3 chunks: TRI_FULL_SWEEP=1
def test_every_plan_below_the_cutoff_is_listed(chunk: int) -> None:
    checked = 0
    for seed in range(chunk * PANELS // 3, (chunk + 1) * PANELS // 3):
        rng, sched = _panel(seed)
        free = free_breakers(sched, "balance", False)
        pr = build_problem(sched, free)
        k = int(rng.integers(1, 5))
        if not halves_fit(pr, k):
            continue
        enum = enumerate_panel(sched, free)
        within = enum.relocations <= k
        values = np.sort(enum.max_rms[within])
        cutoff = float(values[min(values.size - 1, int(rng.integers(0, 12)))]) * (1 + 1e-6)
        listed = plans_below(pr, k, cutoff)
        assert listed is not None
        got = {
            _phases_key(pr.phases[o] for o in a): v
            for a, v in zip(listed.plans, listed.values, strict=True)
        }
        poles = [sched.circuits[i].poles for i in free]
        listed_value = _listed_values(got, enum.slots, poles)
        shown = ~np.isnan(listed_value)
        value = enum.max_rms
        # the listed value is the engine's (pytest.approx's rel=1e-9 band)
        off = shown & ~(np.abs(listed_value - value) <= np.maximum(1e-9 * value, 1e-12))
        assert not np.any(off), (seed, listed_value[off], value[off])
        missed = ~shown & (enum.relocations <= k) & (value < listed.tail * (1 - EDGE))
        if np.any(missed):
            a = value[missed][0]
            pytest.fail(f"seed {seed}: a plan at {a} A below {listed.tail} A is not listed")
        assert all(v < cutoff for v in listed.values)
        checked += 1
    assert checked >= PANELS // 6


def test_the_listing_sees_what_it_must(monkeypatch) -> None:
    """A cutoff below the floor lists nothing; the listing is not vacuous above the optimum."""
    for seed in range(40):
        _, sched = _panel(seed)
        pr = build_problem(sched, free_breakers(sched, "balance", False))
        if halves_fit(pr, 2):
            break
    else:
        pytest.fail("no panel the listing applies to")
    assert plans_below(pr, 2, pr.floor_a * 0.999).plans == []
    some = plans_below(pr, 2, pr.floor_a * 10.0)
    assert some is not None and len(some.plans) >= 2
    assert some.values == sorted(some.values)


@pytest.mark.parametrize("chunk", range(2))
def test_balance_claims_settled_by_the_listing_are_true(chunk: int, monkeypatch) -> None:
    monkeypatch.setattr(balance, "enumeration_fits", lambda pr, k: False)
    monkeypatch.setattr(solve, "enumeration_fits", lambda pr, k: False)
    calls = []
    real = balance.plans_below

    def spy(*args, **kwargs):
        out = real(*args, **kwargs)
        calls.append(out is not None)
        return out

    monkeypatch.setattr(balance, "plans_below", spy)
    false = []
    for seed in range(chunk * PANELS // 2, (chunk + 1) * PANELS // 2):
        rng, sched = _panel(seed)
        if any(not c.is_placed for c in sched.circuits):
            continue
        free = free_breakers(sched, "balance", False)
        enum = enumerate_panel(sched, free)
        for k in (1, 2, int(rng.integers(3, 6))):
            case = Case(sched, "balance", max_moves=k)
            with native_stdout_to_devnull():
                s = suggest(sched, case.options(time_limit_s=10.0, floor_gap=0.0))
            false += [(seed, k, s.status, e) for e in check_case(case, s, enum)]
    assert not false
    assert sum(calls) >= 10  # the listing settled questions
