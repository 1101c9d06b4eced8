"""``tri suggest`` on a schedule with ``use`` scenarios: every case in the text and the JSON.

The panel (``tests/data/rebalance/day-night.toml``) is balanced on its
connected load and far off by day and by night; the plan meets the target
in every case (proven against every arrangement in
``test_rebalance_scenarios.py``). Here: the command's words and JSON name
the cases, the deciding case and each case's figures, and they are the
engine's on the schedule before and after.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from cli_support import run_tri

from tri.schedule.load import load_schedule
from tri.schedule.to_scenarios import analyse_cases

DAY_NIGHT = Path(__file__).parent / "data" / "rebalance" / "day-night.toml"


def test_json_names_every_case_and_the_deciding_one() -> None:
    out = run_tri("suggest", str(DAY_NIGHT), "--target", "10", "--format", "json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    assert data["status"] == "optimal" and data["relocations"] == 2 and data["target_met"]
    assert [c["name"] for c in data["cases"]] == ["connected", "day", "night"]
    assert data["deciding_case"] == "night"
    assert [c["deciding"] for c in data["cases"]] == [False, False, True]
    assert "in every case" in data["objective"] and "day, night" in data["objective"]
    assert data["cases"][0]["after"] == data["after"]  # the top level is the connected load
    before = {c.name: c.analysis for c in analyse_cases(load_schedule(DAY_NIGHT).schedule)}
    for c in data["cases"]:
        engine = before[c["name"]].current_unbalance.max_deviation_pct
        assert c["before"]["max_deviation_pct"] == pytest.approx(engine, rel=1e-8)
        assert c["after"]["max_deviation_pct"] <= 10.0
    assert data["cases"][1]["before"]["max_deviation_pct"] > 60.0  # [computed] 64.29 %
    assert data["deciding_text"].startswith("Judged in every case")


def test_text_shows_each_case_before_and_after() -> None:
    out = run_tri("suggest", str(DAY_NIGHT), "--target", "10")
    assert out.returncode == 0, out.stderr
    text = out.stdout
    assert "Deciding case after the moves: night" in text
    for line in ("connected", "day", "night *"):
        assert any(row.strip(" |").startswith(line) for row in text.splitlines()), line
    # day deviation [%], before -> after (ASCII here: the output is not a UTF-8 terminal)
    assert "64.29 -> 0.00" in text  # [computed] in test_rebalance_scenarios.py


def test_without_scenarios_the_json_has_no_cases(tmp_path: Path) -> None:
    plain = "\n".join(
        line for line in DAY_NIGHT.read_text(encoding="utf-8").splitlines() if "use =" not in line
    )
    p = tmp_path / "plain.toml"
    p.write_text(plain + "\n", encoding="utf-8")
    data = json.loads(run_tri("suggest", str(p), "--format", "json").stdout)
    assert data["status"] == "already-balanced"
    assert data["cases"] == [] and data["deciding_case"] is None
