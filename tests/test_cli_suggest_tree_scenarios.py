"""``tri suggest`` on a building with ``use`` scenarios: the brewery demo with day and night loads.

A copy of the brewery demo (``tri/panels_demo/brewery/``) with use factors
on LP-1 (a taproom: busy at night) and LP-2 (a kitchen: busy by day), as a
user would add them (invented data). Checked, in process:

* the words (text, JSON, the UI's result) name every case and the deciding one;
* the JSON's plan, written into the schedules and rolled up by the engine in
  every case, meets every target in every case and matches the figures
  shown **[computed]**;
* the ``optimal`` count is at least the sum of the leaves' own proven
  optima in every case (a leaf's figures depend on its own breakers only;
  the single-panel rebalancer judges the same cases) **[computed]**, and the
  plan differs from the connected load's alone (which misses a scenario);
* with targets no plan meets (LP-2 alone cannot reach 10 % in every case,
  proven by the single-panel rebalancer), the building search proves
  ``infeasible`` too (its subtree bounds run first when no plan is found).
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest
from cli_support import run_tri

from tri.report.tree_work_order import render_tree_text, tree_suggestion_data
from tri.schedule.tree import load_tree, with_schedules
from tri.schedule.tree_to_engine import analyse_building
from tri.tui.screens.tree_rebalance import result_text

ROOT = Path(__file__).resolve().parents[1]
BREWERY = ROOT / "tri" / "panels_demo" / "brewery"
CASES = ["connected", "day", "night"]
#: Use factors added to the demo, by file and circuit name (invented data).
USE = {
    "lp1_208.toml": {
        "Taproom pendant lights": "day = 0.2, night = 1.0",
        "Bar receptacles": "day = 0.3, night = 1.0",
        "TV wall": "day = 0.1, night = 1.0",
        "Patio heaters controls": "day = 0.0, night = 1.0",
        "Keg cooler condensing unit": "day = 0.8, night = 0.6",
    },
    "lp2_208.toml": {
        "Fryer": "day = 1.0, night = 0.2",
        "Pizza oven": "day = 1.0, night = 0.3",
        "Prep receptacles": "day = 1.0, night = 0.1",
        "Kitchen LED lighting": "day = 1.0, night = 0.5",
    },
}
#: The targets of the demo run; a time limit that only a proof ends (a loaded machine is slow).
TARGETS = ("--target", "10", "--child-target", "15", "--time-limit", "120")


@pytest.fixture(scope="module")
def brewery(tmp_path_factory) -> Path:
    """The demo copied with the use factors of :data:`USE`; returns the MDP's file."""
    folder = tmp_path_factory.mktemp("brewery")
    for f in BREWERY.glob("*.toml"):
        shutil.copy(f, folder / f.name)
    for file, circuits in USE.items():
        text = (folder / file).read_text()
        for name, use in circuits.items():
            line = f'name = "{name}"\n'
            assert line in text
            text = text.replace(line, f"{line}use = {{ {use} }}\n", 1)
        (folder / file).write_text(text)
    return folder / "mdp_480.toml"


def _json(*args: str) -> tuple[int, dict]:
    r = run_tri("suggest", *args, "--format", "json")
    assert r.returncode in (0, 1), r.stderr
    return r.returncode, json.loads(r.stdout)


@pytest.fixture(scope="module")
def plan(brewery) -> dict:
    code, d = _json(str(brewery), *TARGETS)
    assert code == 0
    return d


def _apply(tree, data: dict):
    """The building after the JSON's moves, each found by circuit name and slot."""
    by_file = {p.path.name: i for i, p in enumerate(tree.panels)}
    schedules = [p.schedule for p in tree.panels]
    for panel in data["panels"]:
        k = by_file[Path(panel["file"]).name]
        for m in panel["moves"]:
            idx = next(
                i
                for i, c in enumerate(tree.panels[k].schedule.circuits)
                if c.name == m["circuit"] and c.slot == m["from_slot"]
            )
            schedules[k] = schedules[k].with_circuit(
                idx, schedules[k].circuits[idx].at_slot(m["to_slot"])
            )
    return with_schedules(tree, schedules)


@pytest.fixture(scope="module")
def suggestion(brewery):
    """The same search in process: the suggestion and the schedules before."""
    from tri.native_output import native_stdout_to_devnull
    from tri.rebalance.tree_solve import TreeOptions, suggest_tree

    tree = load_tree(brewery)
    with native_stdout_to_devnull():
        s = suggest_tree(tree, TreeOptions(target_pct=10, child_target_pct=15, time_limit_s=120))
    return s, tuple(p.schedule for p in tree.panels)


def test_text_names_every_case_and_the_deciding_one(suggestion):
    s, before = suggestion
    out = render_tree_text(s, before, "caution", ascii_only=True)
    text = " ".join(out.split())
    assert "optimal: proven that no plan with fewer breakers relocated" in text
    assert "meets every target in every case" in text
    assert "in every case (the connected load and the scenarios day, night)" in text
    assert "Judged in every case (connected, day, night; connected = every use factor 1.0)" in text
    assert "Deciding case after the moves:" in text
    # the figures table: first word of each row
    rows = [(line.strip("| ").split() or [""])[0] for line in out.splitlines() if "|" in line]
    for name in CASES:  # one row per case under each of the four panels
        assert rows.count(name) == 4


def test_json_plan_meets_every_target_in_every_case(brewery, plan):
    d = plan
    assert d["status"] == "optimal" and d["target_met"] and d["cases"] == CASES
    after = _apply(load_tree(brewery), d)
    worst = (-1e9, None)
    for c, name in enumerate(CASES):
        result = analyse_building(after, scenario=None if c == 0 else name)
        for p, node in zip(d["panels"], result.nodes, strict=True):
            dev = node.analysis.current_unbalance.max_deviation_pct
            shown = next(x for x in p["cases"] if x["name"] == name)
            # JSON rounds to 9 significant digits
            assert dev == pytest.approx(shown["after"]["max_deviation_pct"], rel=1e-8, abs=1e-9)
            assert dev <= p["target_pct"] * (1 + 1e-9)
            worst = max(worst, (dev - p["target_pct"], (name, p["panel"])), key=lambda w: w[0])
    assert (d["deciding_case"]["case"], d["deciding_case"]["panel"]) == worst[1]
    for p in d["panels"]:
        flagged = [x["name"] for x in p["cases"] if x["deciding"]]
        assert len(flagged) == 1
        assert p["after"] == p["cases"][0]["after"]  # the connected load's


def test_optimum_is_at_least_the_leaves_own_optima(brewery, plan):
    leaf_sum = 0
    for leaf in ("hp1_480", "lp1_208", "lp2_208"):
        _, single = _json(
            str(brewery.parent / f"{leaf}.toml"), "--target", "15", "--time-limit", "120"
        )
        assert single["status"] in ("optimal", "already-balanced")
        leaf_sum += single["relocations"]
    assert plan["relocations"] >= leaf_sum
    # the connected load alone would settle for another plan: one that misses a scenario
    _, plain = _json(str(BREWERY / "mdp_480.toml"), *TARGETS)
    assert plain["status"] == "optimal"
    plain_after = _apply(load_tree(brewery), plain)
    devs = [
        [
            n.analysis.current_unbalance.max_deviation_pct
            for n in analyse_building(plain_after, scenario=name).nodes
        ]
        for name in CASES[1:]
    ]
    targets = [p["target_pct"] for p in plain["panels"]]
    assert any(dv > t for row in devs for dv, t in zip(row, targets, strict=True))


def test_unreachable_targets_are_proven_so(brewery):
    _, lp2 = _json(str(brewery.parent / "lp2_208.toml"), "--target", "10", "--time-limit", "120")
    assert lp2["status"] == "infeasible"  # LP-2 alone cannot meet 10 % in every case
    code, d = _json(str(brewery), "--target", "10", "--time-limit", "120")
    assert code == 1
    assert d["status"] == "infeasible" and d["relocations"] == 0 and not d["target_met"]
    assert "no plan brings every panel within its target in every case" in d["status_text"]


def test_ui_result_names_the_worst_case(suggestion):
    s, before = suggestion
    text = result_text(s, before).plain
    assert "Judged in every case: connected, day, night; worst case shown." in text
    lp1 = next(line for line in text.splitlines() if "LP-1 taproom: deviation" in line)
    assert f"target 15 %, {s.panels[2].deciding})" in lp1
    data = tree_suggestion_data(s, before, "caution")
    assert data["deciding_text"].startswith("Judged in every case")
