"""The rebalancer on rail boards with RCD groups (issue 12), against every plan.

Reference (nothing of :mod:`tri.rebalance`): on a rail board a plan gives
each free circuit its phases; a circuit behind a 2-pole RCD may only be on
that RCD's phase (it feeds one phase and neutral), one behind a 4-pole RCD
on any (README, RCD groups: circuits stay behind their RCD). Every plan is
listed: a 1-pole circuit on A, B or C (its RCD's phase behind a 2-pole
RCD), a 2-pole one on A-B, B-C or C-A, a breaker with a neutral and one
load per leg on every order of two distinct phases; its relocations are
the circuits whose phases change (their order, for the per-leg one), its
figures the engine's on the schedule of the plan (one row per leg). Every
``optimal``, ``infeasible`` and bound is checked as in
``tests/test_rebalance_enumeration.py`` (``rebalance_sweep.check_case``).
[computed]
"""

from __future__ import annotations

import itertools
from dataclasses import replace

import numpy as np
import pytest
from rebalance_reference import Enumerated, free_breakers
from rebalance_sweep import PROFILES, cases_for, check_case
from rebalance_wired_reference import rail_options, stack_arrays
from sweep import seed_chunks, seed_ids

from tri.engine import analyse_batch
from tri.native_output import native_stdout_to_devnull
from tri.rebalance import SuggestOptions, suggest
from tri.schedule.model import Circuit, PanelInfo, Rcd, Schedule
from tri.schedule.slots import PHASES
from tri.schedule.to_engine import circuit_arrays, ratings, system_voltages
from tri.schedule.validate import check_schedule

PANELS = 8


def rail_panel(rng: np.random.Generator) -> Schedule:
    """A rail board: a 2-pole RCD on a random phase, a 4-pole RCD, circuits behind them."""
    phase = int(rng.integers(0, 3))
    rcds = (Rcd("R1", 2, phase), Rcd("R2", 4, None))
    circuits = []
    for n in range(int(rng.integers(4, 7))):
        kind = rng.choice(["r1", "r2", "r2", "plain", "pair", "mwbc"])
        va = float(rng.uniform(300, 5000))
        base = Circuit(name=f"C{n}", load_value=va, pf=float(rng.uniform(0.8, 1.0)))
        base = replace(base, profile=str(rng.choice(PROFILES)), locked=bool(rng.random() < 0.1))
        if kind == "r1":
            c = replace(base, phases=(phase,), rcd="R1")
        elif kind == "pair":
            c = replace(base, poles=2, phases=tuple(int(x) for x in rng.permutation(3)[:2]))
        elif kind == "mwbc":
            legs = tuple(float(x) for x in rng.uniform(300, 3000, 2))
            ph = tuple(int(x) for x in rng.permutation(3)[:2])
            c = replace(base, poles=2, phases=ph, neutral=True, leg_values=legs)
        else:
            c = replace(base, phases=(int(rng.integers(0, 3)),))
            if kind == "r2":
                c = replace(c, rcd="R2")
        circuits.append(c)
    info = PanelInfo("rail", "400Y/230", 50.0, 0, 63.0, layout=PHASES)
    sched = Schedule(panel=info, circuits=tuple(circuits), rcds=rcds)
    assert not check_schedule(sched), check_schedule(sched)[0].message
    return sched


def _changed(c: Circuit, ph: tuple[int, ...]) -> bool:
    assert c.phases is not None
    return tuple(c.phases) != ph if c.neutral else set(c.phases) != set(ph)


def _key(sched: Schedule, free: list[int], plan) -> tuple:
    """A plan's phases, as a set for a plain 2-pole load (either order is the same load)."""
    return tuple(
        tuple(ph) if sched.circuits[i].neutral else tuple(sorted(ph))
        for i, ph in zip(free, plan, strict=True)
    )


def enumerate_rail(sched: Schedule, free: list[int]) -> tuple[Enumerated, list]:
    """Every plan of the free circuits (module notes), and each plan's phases."""
    plans = list(itertools.product(*[rail_options(sched, (i,)) for i in free]))
    arrays, moved = [], []
    for plan in plans:
        out = sched
        for i, ph in zip(free, plan, strict=True):
            out = out.with_circuit(i, out.circuits[i].on_phases(ph))
        arrays.append(circuit_arrays(out))
        moved.append(
            sum(
                1
                for i, ph in zip(free, plan, strict=True)
                if sched.circuits[i].is_placed and _changed(sched.circuits[i], ph)
            )
        )
    batch = stack_arrays(arrays)
    res = analyse_batch(batch, system_voltages(sched), ratings(sched))
    n = len(plans)
    enum = Enumerated(
        slots=np.zeros((n, len(free)), dtype=int),
        relocations=np.array(moved, dtype=int),
        phase_rms=np.asarray(res.phase_rms_a).reshape(n, 1, 3),
        neutral_rms=np.asarray(res.neutral_rms_a).reshape(n),
        deviation_pct=np.asarray(res.max_deviation_pct).reshape(n),
    )
    return enum, plans


#: (through the listings, seeds) of each test: the programs alone are the slow part; the
#: suite runs one of their panels, TRI_FULL_SWEEP=1 all (tests/sweep.py).
RUNS = [(True, range(PANELS))] + [
    (False, seeds) for seeds in seed_chunks(0, PANELS, 3, in_suite=1, suite_size=1)
]


@pytest.mark.parametrize(
    ("list_plans", "seeds"),
    RUNS,
    ids=[("product-" if lp else "programs-") + seed_ids(seeds) for lp, seeds in RUNS],
)
def test_every_claim_is_true_on_rail_boards_with_rcds(list_plans: bool, seeds: range) -> None:
    false = []
    for seed in seeds:
        rng = np.random.default_rng(900 + seed)
        sched = rail_panel(rng)
        for case in cases_for(rng, sched):
            with native_stdout_to_devnull():
                s = suggest(
                    case.schedule,
                    case.options(time_limit_s=5.0, floor_gap=0.0, list_plans=list_plans),
                )
            free = free_breakers(sched, case.mode, case.place_new)
            enum, plans = enumerate_rail(sched, free)
            errors = [e for e in check_case(case, s, enum) if not e.startswith("relocations")]
            after = _key(sched, free, [s.schedule.circuits[i].phases or () for i in free])
            keys = [_key(sched, free, p) for p in plans]
            assert after in keys, "the plan is not among the reference's plans"
            row = keys.index(after)
            if int(enum.relocations[row]) != s.relocations:
                errors.append(f"relocations {s.relocations}, reference {enum.relocations[row]}")
            if abs(s.after.max_phase_rms_a - float(enum.max_rms[row])) > 1e-6:
                errors.append("the plan's figures differ from the reference's")
            r1 = [c for c in s.schedule.circuits if c.rcd == "R1"]
            if any(c.phases != (sched.rcds[0].phase,) for c in r1):
                errors.append("a circuit left its 2-pole RCD's phase")
            if check_schedule(s.schedule):
                errors.append(check_schedule(s.schedule)[0].message)
            false += [(seed, case.mode, s.status, e) for e in errors]
    assert not false


def test_the_rcd_note_says_what_is_kept() -> None:
    sched = rail_panel(np.random.default_rng(3))
    sched = replace(sched, circuits=(*sched.circuits, Circuit("Lamp", 1, None, (0,), rcd="R1")))
    sched = replace(sched, rcds=(Rcd("R1", 2, 0), Rcd("R2", 4, None)))
    with native_stdout_to_devnull():
        s = suggest(sched, SuggestOptions(relayout=True))
    assert any("2-pole RCD R1 stay on its phase" in n for n in s.notes)
    assert all(c.phases == (0,) for c in s.schedule.circuits if c.rcd == "R1")
