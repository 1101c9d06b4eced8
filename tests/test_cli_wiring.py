"""The command line on panels as they are wired (issue 12): every report format carries
the high-leg caution and the shared neutrals; ``tri suggest`` refuses what the
rebalancer cannot honour yet (exit 2, located); ``tri new`` makes a 240/120D panel.
"""

from __future__ import annotations

import csv
import io
import json
import math
from pathlib import Path

import pytest
from cli_support import Result, run_tri

from tri.schedule.load import load_schedule
from tri.schedule.to_engine import analyse_schedule

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "tri" / "panels_demo" / "woodshop_240d.toml"
MWBC = ROOT / "tests" / "data" / "wiring" / "mwbc_208.toml"


def tri(*args: str, cwd: Path | None = None) -> Result:
    """``tri ARGS...`` in this process (the same code as the command, without start-up)."""
    return run_tri(*args, cwd=cwd)


@pytest.mark.parametrize("fmt", ["text", "json", "markdown", "csv"])
def test_every_format_carries_the_high_leg_caution(fmt: str) -> None:
    r = tri("report", str(DEMO), "--format", fmt)
    assert r.returncode == 0, r.stderr
    assert "208 V to neutral" in r.stdout
    if fmt == "csv":
        rows = list(csv.DictReader(io.StringIO(r.stdout)))
        saw = {row["name"]: row["high_leg"] for row in rows}
        assert saw["Table saw, 5 hp"].startswith("B: 208 V to neutral")
        assert saw["Office lights and receptacles"] == ""


def test_json_reports_shared_neutrals_legs_and_directory() -> None:
    d = json.loads(tri("report", str(MWBC), "--format", "json").stdout)
    groups = {g["name"]: g for g in d["shared_neutrals"]}
    # [computed] 16 A legs on A and B: |16∠0° + 16∠−120°| = 16 A
    assert groups["Office receptacles (shared neutral)"]["current_a"] == pytest.approx(16.0)
    # [computed] 30/20/10 A on A/B/C at unity: sqrt(30²+20²+10²−30·20−20·10−10·30) = 17.32 A
    assert groups["Sub-board feeder"]["rms_a"] == pytest.approx(math.sqrt(300), rel=1e-8)
    assert groups["N21"]["common_trip"] is False and groups["N13"]["common_trip"] is True
    feeder = next(c for c in d["circuits"] if c["name"] == "Sub-board feeder")
    assert [leg["phases"] for leg in feeder["legs"]] == ["A", "B", "C"]
    assert feeder["current_a"] == pytest.approx(30.0)  # its largest pole
    assert feeder["phase_va"] == {"A": 3600.0, "B": 2400.0, "C": 1200.0}
    assert d["directory"]["fed_from"] == "MDP-1, circuit 7"
    assert d["directory"]["spares"][0]["slot"] == 17
    assert 19 in d["directory"]["spaces"]
    nec = [f for f in d["findings"] if "210.4(B)" in f["source"]]
    assert len(nec) == 1 and "'N21'" in nec[0]["message"]
    # the circuits' phase VA add up to the phases' (schedule bookkeeping)
    for lab in d["phase_order"]:
        total = sum(c["phase_va"][lab] for c in d["circuits"])
        assert total == pytest.approx(d["phases"][lab]["va"])


def test_analyse_schedule_gives_one_current_per_circuit() -> None:
    s = load_schedule(MWBC).schedule
    a = analyse_schedule(s)
    assert len(a.circuit_current_a) == len(s.circuits)
    kiln = next(i for i, c in enumerate(s.circuits) if c.name.startswith("Kiln"))
    # [computed] slot 8 is on A: pairs AB 4000, BC 2000, CA 1000 VA at 207.85 V;
    # I_B = I_bc − I_ab = 9.623∠−90° − 19.245∠30° = 25.46 A, the largest pole
    v = 120 * math.sqrt(3)
    i_ab = 4000 / v * complex(math.cos(math.radians(30)), math.sin(math.radians(30)))
    i_bc = 2000 / v * -1j
    assert a.circuit_current_a[kiln] == pytest.approx(abs(i_bc - i_ab), rel=1e-9)


def test_suggest_keeps_120_v_circuits_off_the_high_leg() -> None:
    """The high-leg demo is rebalanced now; the plan is a valid panel and says what it skips."""
    r = tri("suggest", str(DEMO), "--format", "json")
    assert r.returncode in (0, 1), r.stderr
    assert "not yet" not in r.stderr and "Traceback" not in r.stderr
    d = json.loads(r.stdout)
    assert any("high-leg delta: no 120 V circuit" in n for n in d["notes"])
    assert all(m["to_phases"] != "B" for m in d["moves"])  # high leg B: no 1-pole load there


def test_suggest_honours_shared_neutrals_and_per_leg_loads() -> None:
    """Breakers with a neutral, per-leg loads and shared-neutral groups move as units now."""
    r = tri("suggest", str(MWBC), "--format", "json")
    assert r.returncode in (0, 1), r.stderr
    assert "not yet" not in r.stderr and "Traceback" not in r.stderr
    d = json.loads(r.stdout)
    # 2 relocations proven fewest (the exhaustive checks of every status are in
    # tests/test_rebalance_units.py); a group moved as one block counts once, and every
    # claim names that count rather than "breakers"
    assert d["status"] == "optimal" and d["relocations"] == 2
    once = "a shared-neutral group moved as one block counting as one"
    assert f"no plan with fewer relocations ({once})" in d["status_text"]
    assert d["objective"].startswith("number of relocations so that")


def test_suggest_honours_a_right_column_and_a_reach(tmp_path: Path) -> None:
    p = tmp_path / "p.toml"
    p.write_text(
        'format = 1\n[panel]\nname = "P"\nsystem = "208Y/120"\nspaces = 12\nbus_a = 100\n'
        'right_column = "CBA"\nmax_row_shift = 2\n\n[[circuit]]\nslot = 1\nname = "x"\n'
        "load_va = 100\n"
    )
    r = tri("suggest", str(p))
    assert r.returncode in (0, 1), r.stderr  # honoured now: no refusal (exit 2)
    assert "not yet" not in r.stderr and "Traceback" not in r.stderr
    assert "reach limit honoured" in r.stdout


def test_check_runs_on_the_demo() -> None:
    r = tri("check", str(DEMO))
    assert r.returncode in (0, 1), r.stderr
    assert "Traceback" not in r.stderr


def test_new_makes_a_high_leg_delta(tmp_path: Path) -> None:
    r = tri(
        "new", "p.toml", "--system", "240/120D", "--spaces", "24", "--high-leg", "C", cwd=tmp_path
    )
    assert r.returncode == 0, r.stderr
    s = load_schedule(tmp_path / "p.toml").schedule
    assert s.panel.effective_high_leg == 2
    r = tri("new", "q.toml", "--system", "208Y/120", "--high-leg", "B", cwd=tmp_path)
    assert r.returncode == 2 and "no high leg" in r.stderr


def test_a_building_with_shared_neutrals_is_reported_and_rebalanced(tmp_path: Path) -> None:
    import shutil

    for f in (ROOT / "tri" / "panels_demo" / "brewery").glob("*.toml"):
        shutil.copy(f, tmp_path / f.name)
    child = tmp_path / "lp1_208.toml"
    child.write_text(
        child.read_text()
        + '\n[[circuit]]\nslot = 41\nname = "Leg 1"\nload_va = 500\nshared_neutral = "NX"\n'
        + '\n[[circuit]]\nslot = 39\nname = "Leg 2"\nload_va = 500\nshared_neutral = "NX"\n'
    )
    r = tri("report", "mdp_480.toml", "--format", "json", cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    panels = {p["file"]: p["report"] for p in json.loads(r.stdout)["building"]["panels"]}
    alone = json.loads(tri("report", "lp1_208.toml", "--format", "json", cwd=tmp_path).stdout)
    # the building lists the union of every panel's harmonic orders: compare all but those
    inside = panels["lp1_208.toml"]["shared_neutrals"]
    for a, b in zip(inside, alone["shared_neutrals"], strict=True):
        assert {k: v for k, v in a.items() if k != "harmonic_a"} == {
            k: v for k, v in b.items() if k != "harmonic_a"
        }
        assert a["harmonic_a"][0] == b["harmonic_a"][0]
    # the building rebalancer honours the group (tests/test_rebalance_tree_wired.py)
    r = tri("suggest", "mdp_480.toml", "--target", "10", "--child-target", "15", cwd=tmp_path)
    assert r.returncode == 0 and "Traceback" not in r.stderr, r.stderr
    words = " ".join(r.stdout.split())
    assert "Status: optimal" in words and "a shared-neutral group moved as one block" in words
    assert "LP-1 taproom (lp1_208.toml): a shared-neutral group moves as one block" in words
