"""Every claim of the rebalancer against every arrangement of dense small panels.

The reference (:mod:`rebalance_reference`) lists every physical arrangement
of a small two-column panel's free breakers, counts relocations as the work
order does and takes the figures from the engine; nothing of the
rebalancer is used. For each panel (:mod:`rebalance_sweep`: all slots but
0-2 taken, 1-, 2- and 3-pole breakers, some locked, a quarter of the loads
with harmonics, sometimes a new circuit) every mode is asked — fewest moves
to a target (with and without a budget, with and without placing the new
circuit), best balance with K moves, full re-layout, place-new — and every
``optimal``, ``infeasible``, ``already-balanced`` and bound returned is
checked against the minimum over the list. [computed]

Tolerance: a claim is false only when a plan beats it by more than a
relative 1e-7 (``rebalance_sweep.EDGE``): near an edge, round-off of the
order of 1e-12 decides, and random loads never sit closer than that.

Two paths are checked: the product's (small questions settled by listing
every plan, :mod:`tri.rebalance.exhaust`), and the mixed-integer programs
alone (``list_plans=False``) with a short time limit, where statuses are
often ``best-found`` and their bounds are what is checked.
"""

from __future__ import annotations

import collections
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from rebalance_reference import enumerate_panel, free_breakers
from rebalance_sweep import Case, cases_for, check_case, dense_panel
from sweep import seed_chunks, seed_ids

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import SuggestOptions, suggest
from tri.schedule.load import load_schedule
from tri.schedule.slots import fits, occupied_slots
from tri.schedule.to_engine import analyse_schedule

DATA = Path(__file__).parent / "data" / "rebalance"
#: Seeds through the product's path and through the programs alone (the slow part): the
#: suite runs the first chunks, TRI_FULL_SWEEP=1 all (tests/sweep.py);
#: bench/bench_rebalance_sweep.py runs many more.
PRODUCT_SEEDS = seed_chunks(0, 120, 12, in_suite=1)
PROGRAM_SEEDS = seed_chunks(10_000, 12, 3, in_suite=1, suite_size=1)
STATUSES: collections.Counter[tuple[str, str]] = collections.Counter()


def _panel(seed: int):
    rng = np.random.default_rng(seed)
    return rng, dense_panel(rng, int(rng.choice([8, 10, 12])))


def _run(case: Case, **extra):
    with native_stdout_to_devnull():
        return suggest(case.schedule, case.options(**extra))


def _false_claims(seed: int, sched, cases: list[Case], mode_tag: str, **extra) -> list:
    """Every false claim over the cases of one panel (one listing per free set)."""
    listed: dict[tuple[int, ...], object] = {}
    false = []
    for case in cases:
        s = _run(case, **extra)
        STATUSES[(case.mode + mode_tag, s.status)] += 1
        free = tuple(free_breakers(sched, case.mode, case.place_new))
        if free not in listed:
            listed[free] = enumerate_panel(sched, list(free))
        false += [(seed, case.mode, s.status, e) for e in check_case(case, s, listed[free])]
    return false


@pytest.mark.parametrize("seeds", PRODUCT_SEEDS, ids=seed_ids)
def test_every_claim_is_true_on_dense_panels(seeds: range) -> None:
    false = []
    for seed in seeds:
        rng, sched = _panel(seed)
        false += _false_claims(
            seed, sched, cases_for(rng, sched), "", time_limit_s=10.0, floor_gap=0.0
        )
    assert not false


@pytest.mark.parametrize("seeds", PROGRAM_SEEDS, ids=seed_ids)
def test_every_claim_of_the_programs_alone_is_true(seeds: range) -> None:
    false = []
    for seed in seeds:
        rng, sched = _panel(seed)
        false += _false_claims(
            seed,
            sched,
            cases_for(rng, sched),
            " (programs)",
            time_limit_s=0.5,
            floor_gap=0.0,
            list_plans=False,
        )
    assert not false


def test_the_sweep_proves_things() -> None:
    """The sweep is not vacuous: optimal, infeasible and already-balanced all occur.

    Run after the sweeps above (pytest keeps file order); alone it runs a
    chunk itself.
    """
    if not any(mode == "fewest-moves" for mode, _ in STATUSES):  # product path not run here
        test_every_claim_is_true_on_dense_panels(PRODUCT_SEEDS[0])
    seen = {status for (_, status) in STATUSES}
    assert {"optimal", "infeasible", "already-balanced"} <= seen
    fewest = {st for (mode, st), n in STATUSES.items() if mode == "fewest-moves" and n}
    assert "optimal" in fewest


def test_the_checker_catches_false_claims() -> None:
    """Claims made false on purpose are caught: the sweep can fail."""
    for seed in range(200):
        rng, sched = _panel(seed)
        case = cases_for(rng, sched)[0]
        s = _run(case)
        if s.status == "optimal" and s.relocations >= 1:
            break
    else:
        pytest.fail("no panel with an optimal plan of at least one relocation")
    free = free_breakers(sched, case.mode, case.place_new)
    enum = enumerate_panel(sched, free)
    assert check_case(case, s, enum) == []
    assert check_case(case, replace(s, status="infeasible"), enum)
    assert check_case(case, replace(s, status="best-found", bound=s.relocations + 1.0), enum)
    worse = replace(case, target_pct=case.target_pct / 1e3)  # same plan, a target it misses
    assert check_case(worse, s, enumerate_panel(sched, free))
    balance = Case(sched, "relayout")
    b = _run(balance, floor_gap=0.0)
    benum = enumerate_panel(sched, free_breakers(sched, "relayout", False))
    assert check_case(balance, b, benum) == []
    assert check_case(
        balance, replace(b, status="best-found", bound=b.after.max_phase_rms_a * 1.01), benum
    )


def _single_relocations(sched):
    """Every schedule one relocation away: a free breaker moved into empty slots."""
    spaces = sched.panel.spaces
    taken = {
        s for c in sched.circuits if c.slot is not None for s in occupied_slots(c.slot, c.poles)
    }
    for i, c in enumerate(sched.circuits):
        if c.locked or c.slot is None:
            continue
        own = set(occupied_slots(c.slot, c.poles))
        for first in range(1, spaces + 1):
            cells = set(occupied_slots(first, c.poles))
            if first != c.slot and fits(first, c.poles, spaces) and not (cells & (taken - own)):
                yield sched.with_circuit(i, c.at_slot(first))


def test_the_reported_repro_finds_two_relocations() -> None:
    """The case of issue 8: C4 16 -> 18 and C10 20 -> 2 give 2.87 % with 2 relocations.

    [computed] here with the engine: none of the plans with one relocation
    (every free breaker into every run of empty slots it fits) meets 3 %,
    and the two named moves give 2.87 % (the figure the issue reports, to
    its two decimals).
    """
    sched = load_schedule(DATA / "false-optimal.toml").schedule
    singles = [
        analyse_schedule(s).current_unbalance.max_deviation_pct for s in _single_relocations(sched)
    ]
    assert singles and min(singles) > 3.0
    case = Case(sched, "fewest-moves", target_pct=3.0)
    s = _run(case)
    assert s.status == "optimal"
    assert s.relocations == 2
    assert {(m.circuit, m.from_slot, m.to_slot) for m in s.moves} == {
        ("C4", 16, 18),
        ("C10", 20, 2),
    }
    assert s.after.max_deviation_pct == pytest.approx(2.87, abs=0.005)
    # the programs alone prove the same
    m = _run(case, list_plans=False, time_limit_s=20.0)
    assert (m.status, m.relocations) == ("optimal", 2)


def test_status_is_claimed_on_relocations_with_a_budget_of_one() -> None:
    """A budget of one relocation where the repro needs two: proven impossible."""
    sched = load_schedule(DATA / "false-optimal.toml").schedule
    s = suggest(sched, SuggestOptions(target_pct=3.0, max_moves=1))
    assert s.status == "infeasible"
    assert s.relocations <= 1
