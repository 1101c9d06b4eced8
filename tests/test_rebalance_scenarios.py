"""Every claim of the rebalancer in every scenario at once, against every arrangement.

The same dense small two-column panels as ``test_rebalance_enumeration.py``
(:mod:`rebalance_sweep`), each circuit given random ``use`` factors in two
scenarios (:func:`rebalance_sweep.with_scenarios`). The reference
(:mod:`rebalance_reference`) lists every physical arrangement, runs the
engine on each in every case (the connected load and each scenario, the
loads scaled by their factors) and keeps the worst case's deviation,
neutral and largest phase current; nothing of the rebalancer is used.
Every ``optimal``, ``infeasible``, ``already-balanced`` and bound of every
mode is checked against the minimum over that list. [computed]

Tolerance: as in ``test_rebalance_enumeration.py`` (a relative 1e-7 band,
``rebalance_sweep.EDGE``: round-off decides only at the very edge).
"""

from __future__ import annotations

import collections
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from rebalance_reference import enumerate_panel, free_breakers
from rebalance_sweep import Case, cases_for, check_case, dense_panel, with_scenarios
from sweep import seed_chunks, seed_ids

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import suggest
from tri.schedule.load import load_schedule
from tri.schedule.to_scenarios import analyse_cases

#: Seeds through the product's path and through the programs alone (the slow part): the
#: suite runs the first chunks, TRI_FULL_SWEEP=1 all (tests/sweep.py).
PRODUCT_SEEDS = seed_chunks(20_000, 40, 10, in_suite=1)
PROGRAM_SEEDS = seed_chunks(30_000, 10, 2, in_suite=1, suite_size=1)
STATUSES: collections.Counter[tuple[str, str]] = collections.Counter()


def _panel(seed: int):
    rng = np.random.default_rng(seed)
    sched = dense_panel(rng, int(rng.choice([8, 10, 12])))
    return rng, with_scenarios(rng, sched)


def _run(case: Case, **extra):
    with native_stdout_to_devnull():
        return suggest(case.schedule, case.options(**extra))


#: Targets of the fewest-moves cases [%]: three cases must meet them at once on a
#: panel of a few breakers, so wider than the connected-load sweep's, and both
#: optimal and infeasible answers occur.
TARGETS = (10.0, 20.0, 30.0, 50.0, 80.0)


def _cases(rng: np.random.Generator, sched) -> list[Case]:
    out = []
    for case in cases_for(rng, sched):
        if case.mode == "fewest-moves":
            case = replace(case, target_pct=float(rng.choice(TARGETS)))
        out.append(case)
    return out + _neutral_cases(rng, sched)


def _neutral_cases(rng: np.random.Generator, sched) -> list[Case]:
    """Fewest moves and a budget with a neutral limit every case must keep (drawn
    between the worst-case neutral currents of the arrangements, so it binds)."""
    enum = enumerate_panel(sched, free_breakers(sched, "balance", False))
    lim = float(np.quantile(enum.neutral_rms, rng.uniform(0.05, 0.6)))
    if lim <= 0:
        return []
    target = float(rng.choice(TARGETS))
    return [
        Case(sched, "fewest-moves", target_pct=target, neutral_max_a=lim),
        Case(sched, "balance", max_moves=int(rng.integers(1, 3)), neutral_max_a=lim),
    ]


def _false_claims(seed: int, sched, tag: str, **extra) -> list:
    rng = np.random.default_rng(seed + 1)
    listed: dict[tuple[int, ...], object] = {}
    false = []
    for case in _cases(rng, sched):
        s = _run(case, **extra)
        assert {c.name for c in s.cases} == {"connected", "day", "night"}
        STATUSES[(case.mode + tag, s.status)] += 1
        free = tuple(free_breakers(sched, case.mode, case.place_new))
        if free not in listed:
            listed[free] = enumerate_panel(sched, list(free))
        false += [(seed, case.mode, s.status, e) for e in check_case(case, s, listed[free])]
    return false


@pytest.mark.parametrize("seeds", PRODUCT_SEEDS, ids=seed_ids)
def test_every_claim_holds_in_every_scenario(seeds: range) -> None:
    false = []
    for seed in seeds:
        _, sched = _panel(seed)
        false += _false_claims(seed, sched, "", time_limit_s=10.0, floor_gap=0.0)
    assert not false


@pytest.mark.parametrize("seeds", PROGRAM_SEEDS, ids=seed_ids)
def test_every_claim_of_the_programs_alone_holds_in_every_scenario(seeds: range) -> None:
    false = []
    for seed in seeds:
        _, sched = _panel(seed)
        false += _false_claims(
            seed, sched, " (programs)", time_limit_s=0.5, floor_gap=0.0, list_plans=False
        )
    assert not false


def test_the_scenario_sweep_proves_things() -> None:
    """Not vacuous: optimal and infeasible occur with scenarios (run after the sweeps)."""
    if not any(mode == "fewest-moves" for mode, _ in STATUSES):  # product path not run here
        test_every_claim_holds_in_every_scenario(PRODUCT_SEEDS[0])
    seen = {status for (_, status) in STATUSES}
    assert {"optimal", "infeasible"} <= seen
    fewest = {st for (mode, st), n in STATUSES.items() if mode == "fewest-moves" and n}
    assert {"optimal", "infeasible"} <= fewest


def _strip(sched):
    return replace(sched, circuits=tuple(replace(c, use=()) for c in sched.circuits))


def test_the_checker_judges_every_scenario() -> None:
    """A plan made on the connected load alone is caught when the scenarios count.

    The same panel without its ``use`` factors is balanced on the connected
    load; its suggestion (figures of the connected load only) is checked as
    if it answered the question with scenarios. Where the scenarios change
    the answer the reference says so, so the sweep above can fail.
    """
    caught = 0
    for seed in range(20_000, 20_080):
        _, sched = _panel(seed)
        case = Case(sched, "fewest-moves", target_pct=10.0)
        free = free_breakers(sched, case.mode, case.place_new)
        enum = enumerate_panel(sched, free)
        assert check_case(case, _run(case), enum) == []
        plain = _run(replace(case, schedule=_strip(sched)))
        claim = replace(
            plain,
            schedule=replace(
                plain.schedule,
                circuits=tuple(
                    replace(a, use=b.use)
                    for a, b in zip(plain.schedule.circuits, sched.circuits, strict=True)
                ),
            ),
        )
        caught += bool(check_case(case, claim, enum))
        if caught >= 3:
            break
    assert caught >= 3


DAY_NIGHT = Path(__file__).parent / "data" / "rebalance" / "day-night.toml"
#: [computed] by hand from the file: 1-pole 1440 VA / 120 V = 12 A; the 3-pole
#: 3000 VA unit carries 3000 / (3 x 120 V) = 8.333 A per line (unity power factor
#: throughout, so currents add on each line). Day: A = 24 + 0.8 x 8.333 = 30.667 A,
#: B = 6.667 A, C = 12 + 6.667 = 18.667 A; mean 18.667 A, deviation 12/18.667 = 64.29 %.
#: Night: A = 2.4 + 2.5 = 4.9 A, B = 24 + 2.5 = 26.5 A, C = 12 + 2.5 = 14.5 A;
#: mean 15.3 A, deviation 11.2/15.3 = 73.20 %.
DAY_DEV_PCT, NIGHT_DEV_PCT = 12 / 18.6667 * 100, 11.2 / 15.3 * 100


def test_connected_load_balance_leaves_day_and_night_far_off_and_the_scenario_plan_fixes_it():
    sched = load_schedule(DAY_NIGHT).schedule
    plain = _run(Case(_strip(sched), "fewest-moves", target_pct=10.0))
    assert plain.status == "already-balanced" and not plain.moves  # balanced on connected load
    by_case = {c.name: c.analysis for c in analyse_cases(sched)}
    assert by_case["day"].current_unbalance.max_deviation_pct == pytest.approx(
        DAY_DEV_PCT, rel=1e-4
    )
    assert by_case["night"].current_unbalance.max_deviation_pct == pytest.approx(
        NIGHT_DEV_PCT, rel=1e-4
    )
    case = Case(sched, "fewest-moves", target_pct=10.0)
    s = _run(case)
    assert s.status == "optimal" and s.relocations == 2 and s.target_met
    assert s.deciding == "night"
    for c in s.cases:  # every case within the target, by the engine on the schedule after
        after = {x.name: x.analysis for x in analyse_cases(s.schedule)}[c.name]
        assert after.current_unbalance.max_deviation_pct == pytest.approx(c.after.max_deviation_pct)
        assert c.after.max_deviation_pct <= 10.0
    free = free_breakers(sched, case.mode, case.place_new)
    assert check_case(case, s, enumerate_panel(sched, free)) == []  # 2 is the fewest [computed]


@pytest.mark.parametrize("seed", range(40_000, 40_008))
def test_a_scenario_at_full_load_changes_nothing(seed: int) -> None:
    """A scenario with every factor 1.0 is the connected load again: the same answer.

    [computed] The case's currents equal the connected load's, so every claim,
    plan and bound must be the same as without it.
    """
    rng = np.random.default_rng(seed)
    sched = dense_panel(rng, int(rng.choice([8, 10, 12])))
    full = replace(sched, circuits=tuple(replace(c, use=(("full", 1.0),)) for c in sched.circuits))
    for case in cases_for(rng, sched):
        a = _run(case, time_limit_s=10.0, floor_gap=0.0)
        b = _run(replace(case, schedule=full), time_limit_s=10.0, floor_gap=0.0)
        assert a.status != "best-found"  # small panels: settled by listing, not by the clock
        assert (a.status, a.relocations, a.bound) == (b.status, b.relocations, b.bound)
        assert a.after.phases_rms_a == pytest.approx(b.after.phases_rms_a, rel=1e-12)
        assert [c.name for c in b.cases] == ["connected", "full"]
        assert b.cases[1].after.phases_rms_a == pytest.approx(b.after.phases_rms_a, rel=1e-9)
