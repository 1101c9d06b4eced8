"""Scenarios in a building: ``use`` factors of any panel, every figure and check per case.

Sources: the figures are worked by hand from the phasors [computed]: on
208Y/120 a 1-pole unity-power-factor load of S on phase A, B or C draws
S/120 A at 0°, −120° or +120°; the neutral carries their phasor sum; a
feeder without a transformer carries its panel's currents unchanged
(Kirchhoff's current law), so a scenario that changes a sub-panel's loads
changes its parent's figures in that scenario. The deviation is the
largest |I − mean|/mean (NEMA MG 1 definition, as the one-panel report).

The building (invented): LP feeds from MDP's 3-pole slot 1.
LP: 1200 VA on A (10 A) with ``use = { night = 2.0 }``, 2400 VA on B (20 A)
with ``use = { day = 0.0 }``. MDP: 1200 VA on C (10 A), no ``use``.

====== ============ ============ ============ ===================
case   LP A, B (A)  LP neutral   MDP A, B, C  MDP neutral, dev
====== ============ ============ ============ ===================
conn.  10, 20       17.32 A      10, 20, 10   10 A, 50 %
night  20, 20       20 A         20, 20, 10   10 A, 40 %
day    10, 0        10 A         10, 0, 10    10 A, 100 %
====== ============ ============ ============ ===================

LP neutral, connected: |10 + 20∠−120°| = |−j17.32| = 17.32 A; night:
|20 + 20∠−120°| = 20 A. MDP neutral, connected: 10 + 20∠−120° + 10∠120°
= −5 − j8.66, 10 A; night 5 − j8.66 and day 5 + j8.66, 10 A each.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from test_cli_building import tri

MDP = """format = 1

[panel]
name = "MDP"
system = "208Y/120"
spaces = 12
bus_a = 400

[[circuit]]
slot = 1
poles = 3
name = "Feeder to LP"
feeds = "lp.toml"

[[circuit]]
slot = 6
name = "Lights C"
load_va = 1200
"""

LP = """format = 1

[panel]
name = "LP"
system = "208Y/120"
spaces = 12
bus_a = 100
neutral_a = 18

[[circuit]]
slot = 1
name = "Heater A"
load_va = 1200
use = { night = 2.0 }

[[circuit]]
slot = 3
name = "Heater B"
load_va = 2400
use = { day = 0.0 }
"""


@pytest.fixture
def folder(tmp_path: Path) -> Path:
    (tmp_path / "mdp.toml").write_text(MDP, encoding="utf-8")
    (tmp_path / "lp.toml").write_text(LP, encoding="utf-8")
    return tmp_path


def cases(report: dict) -> dict[str, dict]:
    return {c["name"]: c for c in report["scenarios"]["cases"]}


def test_every_panel_has_its_figures_in_every_case_of_the_building(folder):
    run = tri("report", str(folder / "mdp.toml"), "--format", "json")
    assert run.returncode == 0, run.stderr
    data = json.loads(run.stdout)
    assert data["building"]["scenarios"] == ["night", "day"]
    mdp, lp = (p["report"] for p in data["building"]["panels"])
    assert data["scenarios"] == mdp["scenarios"]  # the top level is the service's report
    lp_cases, mdp_cases = cases(lp), cases(mdp)
    assert list(lp_cases) == ["connected", "night", "day"]
    want_lp = {"connected": (20, 17.32), "night": (20, 20), "day": (10, 10)}
    for name, (largest, neutral) in want_lp.items():
        c = lp_cases[name]
        assert c["max_phase_rms_a"] == pytest.approx(largest, rel=1e-6)
        assert c["neutral_rms_a"] == pytest.approx(neutral, rel=1e-3)
    assert lp_cases["night"]["phases"]["A"]["rms_a"] == pytest.approx(20.0)
    assert lp["scenarios"]["worst"]["neutral_rms_a"]["case"] == "night"
    # the parent sees the child's night and day loads, though it names no scenario
    want_mdp = {"connected": (10, 20, 10, 50), "night": (20, 20, 10, 40), "day": (10, 0, 10, 100)}
    for name, (a, b, c, dev) in want_mdp.items():
        got = mdp_cases[name]
        assert [got["phases"][k]["rms_a"] for k in "ABC"] == pytest.approx([a, b, c], abs=1e-9)
        assert got["neutral_rms_a"] == pytest.approx(10.0)
        assert got["max_deviation_pct"] == pytest.approx(dev)
    assert mdp["scenarios"]["worst"]["max_deviation_pct"] == {"case": "day", "value": 100.0}


def test_text_and_markdown_show_each_panels_cases(folder):
    text = tri("report", str(folder / "mdp.toml"))
    assert text.returncode == 0, text.stderr
    assert text.stdout.count("SCENARIOS (use factors; the worst case decides)") == 2
    assert "connected  night" in text.stdout
    md = tri("report", str(folder / "mdp.toml"), "--format", "markdown")
    assert "## Scenarios" in md.stdout and "### Scenarios" in md.stdout  # service, then LP


def test_check_judges_every_panel_in_every_case_and_names_the_deciding_one(folder):
    # every deviation judged (--light-load-pct 0): these panels are lightly loaded
    options = ("--max-deviation", "60", "--light-load-pct", "0")
    run = tri("check", str(folder / "mdp.toml"), *options, "--format", "json")
    assert run.returncode == 1, run.stderr
    files = {Path(f["file"]).name: f for f in json.loads(run.stdout)["files"]}
    mdp = {c["key"]: c for c in files["mdp.toml"]["checks"]}
    # MDP's deviation is 50 % connected, 100 % in the day: the day decides and fails
    assert mdp["deviation"]["status"] == "fail"
    assert mdp["deviation"]["value"] == pytest.approx(100.0)
    assert "worst case: day" in mdp["deviation"]["where"]
    lp = {c["key"]: c for c in files["lp.toml"]["checks"]}
    # LP's neutral: 17.32 A of 18 (96 %) connected, 20 A (111 %) at night
    assert lp["neutral"]["status"] == "fail"
    assert lp["neutral"]["value"] == pytest.approx(100.0 * 20.0 / 18.0, rel=1e-6)
    assert "worst case: night" in lp["neutral"]["where"]
    text = tri("check", str(folder / "mdp.toml"), *options)
    assert text.returncode == 1 and "worst case: night" in text.stdout


def test_without_use_factors_the_building_report_has_no_scenarios(folder):
    (folder / "lp.toml").write_text(
        "\n".join(line for line in LP.splitlines() if not line.startswith("use")),
        encoding="utf-8",
    )
    data = json.loads(tri("report", str(folder / "mdp.toml"), "--format", "json").stdout)
    assert data["building"]["scenarios"] == []
    assert all("scenarios" not in p["report"] for p in data["building"]["panels"])
    neutral = data["building"]["panels"][1]["report"]["neutral"]["rms_a"]
    assert neutral == pytest.approx(10.0 * math.sqrt(3.0))  # |10 + 20∠−120°| = 17.32 A


def test_leg_rows_take_their_circuits_factor(tmp_path):
    from tri.schedule.tree import load_tree
    from tri.schedule.tree_scenarios import building_scenario_names, row_factors

    (tmp_path / "mdp.toml").write_text(MDP + "use = { late = 0.5 }\n", encoding="utf-8")
    (tmp_path / "lp.toml").write_text(
        LP
        + '\n[[circuit]]\nslot = 5\npoles = 2\nneutral = true\nname = "Legs"\n'
        + "load_va = [600, 600]\nuse = { night = 0.25 }\n",
        encoding="utf-8",
    )
    tree = load_tree(tmp_path / "mdp.toml")
    assert building_scenario_names(tree) == ("late", "night", "day")
    lp = tree.panels[1].schedule
    # rows: the three circuits, then the 2-pole breaker's second leg
    assert list(row_factors(lp, "night")) == [2.0, 1.0, 0.25, 0.25]
    assert list(row_factors(lp, "late")) == [1.0, 1.0, 1.0, 1.0]


def test_finding_options_reach_every_panel_of_the_building(folder):
    # --max-phase-kva 1: MDP's phases carry 1.2, 2.4 and 1.2 kVA (1.2 kVA apart) and LP's
    # 1.2, 2.4 and 0 kVA (2.4 apart), both over the 1 kVA cap [computed]
    def kva_findings(*options: str) -> list[str]:
        run = tri("report", str(folder / "mdp.toml"), "--format", "json", *options)
        assert run.returncode == 0, run.stderr
        panels = json.loads(run.stdout)["building"]["panels"]
        return [
            f["message"] for p in panels for f in p["report"]["findings"] if "kVA" in f["message"]
        ]

    assert kva_findings() == []
    found = kva_findings("--max-phase-kva", "1")
    assert len(found) == 2
    assert "1.20 kVA between" in found[0] and "2.40 kVA between" in found[1]
