"""The rebalancer on panels as they are wired, against every arrangement (issue 12).

Each constraint the rebalancer now honours is checked the way
``tests/test_rebalance_enumeration.py`` checks the plain panels: dense
small two-column panels (:mod:`rebalance_sweep`), every mode asked, and
every ``optimal``, ``infeasible``, ``already-balanced`` and bound compared
with the minimum over every physical arrangement the reference lists
(:mod:`rebalance_reference`, which uses nothing of the rebalancer and reads
the phases of each slot from :mod:`tri.schedule.slots` with the panel's
``right_column``). [computed]

Tolerance: as in the plain sweep (``rebalance_sweep.EDGE``, a relative 1e-7).
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from cli_support import run_tri
from rebalance_reference import enumerate_panel, free_breakers
from rebalance_sweep import cases_for, check_case, dense_panel
from sweep import seed_chunks, seed_ids

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import suggest
from tri.schedule.load import load_schedule
from tri.schedule.model import Schedule
from tri.schedule.slots import RIGHT_CBA, slot_phases

#: Seeds with a C-B-A right column and within a reach limit, through the product's path
#: and the programs alone: the suite runs the first chunks, TRI_FULL_SWEEP=1 all
#: (tests/sweep.py).
CBA_SEEDS = seed_chunks(500, 24, 8, in_suite=1)
CBA_PROGRAM_SEEDS = seed_chunks(900, 8, 4, in_suite=1, suite_size=2)
REACH_SEEDS = seed_chunks(700, 24, 8, in_suite=1)
REACH_PROGRAM_SEEDS = seed_chunks(1100, 8, 4, in_suite=1, suite_size=2)


def cba(schedule: Schedule) -> Schedule:
    """The same breakers in a panelboard whose right column reads C-B-A from the top."""
    panel = replace(schedule.panel, right_column=RIGHT_CBA)
    out = replace(schedule, panel=panel)
    return replace(out, circuits=tuple(out.placed(c) for c in out.circuits))


def _cba_panel(seed: int):
    rng = np.random.default_rng(seed)
    return rng, cba(dense_panel(rng, int(rng.choice([8, 10, 12]))))


def _false_claims(seed: int, sched: Schedule, **extra) -> list:
    rng = np.random.default_rng(seed + 7)
    listed: dict[tuple[int, ...], object] = {}
    false = []
    for case in cases_for(rng, sched):
        with native_stdout_to_devnull():
            s = suggest(case.schedule, case.options(**extra))
        free = tuple(free_breakers(sched, case.mode, case.place_new))
        if free not in listed:
            listed[free] = enumerate_panel(sched, list(free))
        false += [(seed, case.mode, s.status, e) for e in check_case(case, s, listed[free])]
        for m in s.moves:  # each move's phases are those of its new slot as the panel reads it
            c = sched.circuits[m.circuit_index]
            if m.to_slot is not None and tuple(m.to_phases) != slot_phases(
                m.to_slot, c.poles, sched.panel.right_column
            ):
                false.append((seed, case.mode, s.status, f"{m.circuit}: phases {m.to_phases}"))
    return false


def test_the_reference_reads_the_right_column_c_b_a() -> None:
    """The reference's geometry is the schedule's: slot 2 on C, slot 4 on B, slot 6 on A."""
    # [common practice] a panelboard read C-B-A down its right column
    assert [slot_phases(s, 1, RIGHT_CBA)[0] for s in (1, 2, 3, 4, 5, 6)] == [0, 2, 1, 1, 2, 0]
    assert set(slot_phases(2, 2, RIGHT_CBA)) == {1, 2}  # C-B: the pair B-C


@pytest.mark.parametrize("seeds", CBA_SEEDS, ids=seed_ids)
def test_every_claim_is_true_with_a_c_b_a_right_column(seeds: range) -> None:
    false = []
    for seed in seeds:
        _, sched = _cba_panel(seed)
        false += _false_claims(seed, sched, time_limit_s=10.0, floor_gap=0.0)
    assert not false


@pytest.mark.parametrize("seeds", CBA_PROGRAM_SEEDS, ids=seed_ids)
def test_every_claim_of_the_programs_alone_is_true_with_c_b_a(seeds: range) -> None:
    false = []
    for seed in seeds:
        _, sched = _cba_panel(seed)
        false += _false_claims(seed, sched, time_limit_s=0.5, floor_gap=0.0, list_plans=False)
    assert not false


def test_the_c_b_a_check_can_fail() -> None:
    """The same plans judged with the A-B-C geometry are caught: the check is not vacuous."""
    for seed in range(40):
        rng, sched = _cba_panel(seed)
        case = next(c for c in cases_for(rng, sched) if c.mode == "relayout")
        with native_stdout_to_devnull():
            s = suggest(case.schedule, case.options(floor_gap=0.0))
        abc = replace(sched, panel=replace(sched.panel, right_column="ABC"))
        abc = replace(abc, circuits=tuple(abc.placed(c) for c in abc.circuits))
        enum = enumerate_panel(abc, free_breakers(abc, case.mode, case.place_new))
        if check_case(case, s, enum):
            return
    pytest.fail("no C-B-A plan differs from the A-B-C reading")


CBA_PANEL = """format = 1
[panel]
name = "LP-W"
system = "208Y/120"
spaces = 12
bus_a = 100
right_column = "CBA"

[[circuit]]
slot = 1
name = "Lights 1"
load_va = 3000

[[circuit]]
slot = 7
name = "Lights 2"
load_va = 3000

[[circuit]]
slot = 2
name = "Heater"
load_va = 2000

[[circuit]]
slot = 8
name = "Sign"
load_va = 500
"""


def test_cli_suggest_on_a_c_b_a_panel(tmp_path: Path) -> None:
    """``tri suggest`` on a C-B-A panel: every move's phases are those of its new slot.

    [computed] A (slots 1, 7) carries 6000 VA; C 2500 VA (slot 2, and slot
    8: rows 1-4 of a C-B-A right column read C, B, A, C); nothing on B. The
    best single relocation moves a 3000 VA light onto B (3000/3000/2500 VA).
    """
    p = tmp_path / "p.toml"
    p.write_text(CBA_PANEL, encoding="utf-8")
    sched = load_schedule(p).schedule
    assert [c.phases for c in sched.circuits] == [(0,), (0,), (2,), (2,)]
    out = run_tri("suggest", str(p), "--max-moves", "1", "--time-limit", "60", "--format", "json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    assert data["status"] == "optimal"
    (move,) = data["moves"]
    assert move["circuit"] in ("Lights 1", "Lights 2")
    assert slot_phases(move["to_slot"], 1, RIGHT_CBA) == (1,)  # a slot on B
    assert move["to_phases"] == "B"


def _reach_panel(seed: int):
    """A dense panel (C-B-A right column for odd seeds) with a reach of 0, 1 or 2 rows."""
    rng = np.random.default_rng(seed)
    sched = dense_panel(rng, int(rng.choice([8, 10, 12])))
    if seed % 2:
        sched = cba(sched)
    reach = int(rng.integers(0, 3))
    return rng, replace(sched, panel=replace(sched.panel, max_row_shift=reach))


@pytest.mark.parametrize("seeds", REACH_SEEDS, ids=seed_ids)
def test_every_claim_is_true_within_a_reach_limit(seeds: range) -> None:
    """Plans, fewest moves, budgets and bounds against every arrangement within the reach.

    The reference lists only arrangements in which no placed breaker's row
    changes by more than ``max_row_shift``, so a plan beyond the reach is
    caught ("not among the reference's arrangements"), and a claim proven
    on the panel without the limit but false with it is caught too.
    """
    false = []
    for seed in seeds:
        _, sched = _reach_panel(seed)
        false += _false_claims(seed, sched, time_limit_s=10.0, floor_gap=0.0)
    assert not false


@pytest.mark.parametrize("seeds", REACH_PROGRAM_SEEDS, ids=seed_ids)
def test_every_claim_of_the_programs_alone_is_true_within_a_reach_limit(seeds: range) -> None:
    false = []
    for seed in seeds:
        _, sched = _reach_panel(seed)
        false += _false_claims(seed, sched, time_limit_s=0.5, floor_gap=0.0, list_plans=False)
    assert not false


def test_the_reach_check_can_fail() -> None:
    """A plan found without the limit is caught by the reference with it (not vacuous)."""
    for seed in range(60):
        rng, sched = _reach_panel(seed)
        case = next(c for c in cases_for(rng, sched) if c.mode == "relayout")
        free = free_breakers(sched, case.mode, case.place_new)
        unlimited = replace(sched, panel=replace(sched.panel, max_row_shift=None))
        with native_stdout_to_devnull():
            s = suggest(unlimited, case.options(floor_gap=0.0))
        if check_case(case, s, enumerate_panel(sched, free)):
            return
    pytest.fail("no plan without the limit breaks it")


REACH_PANEL = """format = 1
[panel]
name = "LP-R"
system = "208Y/120"
spaces = 12
bus_a = 100
max_row_shift = 1

[[circuit]]
slot = 1
name = "Oven"
load_va = 3000

[[circuit]]
slot = 3
name = "Fryer"
load_va = 3000

[[circuit]]
slot = 7
name = "Mixer"
load_va = 3000

[[circuit]]
slot = 11
name = "Lights"
load_va = 300
"""


def test_cli_suggest_honours_the_reach(tmp_path: Path) -> None:
    """``tri suggest`` with ``max_row_shift = 1``: the plan moves no breaker more than a row.

    [computed] A carries 6000 VA (slots 1, 7), B 3000 (slot 3), C 300 (slot
    11). Without a limit the best single move takes a 3000 VA load to C
    (slot 5, or 6 ... any C slot); within one row only the Fryer (row 2 to
    row 3, slot 5 or 6) or the Mixer (row 4 to row 3) can reach C.
    """
    p = tmp_path / "p.toml"
    p.write_text(REACH_PANEL, encoding="utf-8")
    out = run_tri("suggest", str(p), "--max-moves", "1", "--time-limit", "60", "--format", "json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    assert data["status"] == "optimal"
    for m in data["moves"]:
        assert abs((m["to_slot"] + 1) // 2 - (m["from_slot"] + 1) // 2) <= 1
    assert any("reach limit honoured" in n for n in data["notes"])
    text = run_tri("suggest", str(p), "--max-moves", "1")
    assert "reach limit honoured" in text.stdout


DEMO = Path(__file__).resolve().parents[1] / "tri" / "panels_demo" / "bakery_208.toml"


def test_demo_panel_with_a_c_b_a_right_column_and_a_reach(tmp_path: Path) -> None:
    """The bakery demo read as a C-B-A panelboard with a reach of 2 rows, through ``tri suggest``.

    Every move stays within 2 rows [computed from the JSON], every move's
    phases are those of its new slot read C-B-A, and the figures after are
    the engine's for the schedule written by ``--write``.
    """
    text = DEMO.read_text(encoding="utf-8")
    text = text.replace("[panel]\n", '[panel]\nright_column = "CBA"\nmax_row_shift = 2\n', 1)
    p, out_file = tmp_path / "bakery_cba.toml", tmp_path / "after.toml"
    p.write_text(text, encoding="utf-8")
    sched = load_schedule(p).schedule
    args = ["suggest", str(p), "--max-moves", "3", "--format", "json", "--time-limit", "60"]
    r = run_tri(*args, "--write", str(out_file))
    assert r.returncode in (0, 1), r.stderr
    data = json.loads(r.stdout)
    assert data["status"] in ("optimal", "best-found")
    assert data["moves"], "the demo is unbalanced enough to move something"
    for m in data["moves"]:
        assert abs((m["to_slot"] + 1) // 2 - (m["from_slot"] + 1) // 2) <= 2
        c = next(c for c in sched.circuits if c.name == m["circuit"])
        want = slot_phases(m["to_slot"], c.poles, RIGHT_CBA)
        assert m["to_phases"] == sched.phase_text(want)
    from tri.schedule.to_engine import analyse_schedule

    after = analyse_schedule(load_schedule(out_file).schedule)
    assert after.current_unbalance.max_deviation_pct == pytest.approx(
        data["after"]["max_deviation_pct"], rel=1e-6
    )
