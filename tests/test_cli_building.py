"""``tri report`` and ``tri check`` on a building (the brewery demo and small made-up trees).

Sources: the roll-up of a fed panel equals that panel's own report
[computed: a feeder carries its panel's currents unchanged]; a parent's
phase spectrum is its own plus what each feeder brings (tested in the
engine, here only through the command). Commands run as ``python -m tri``
in a subprocess, as scripts and CI would. Tolerance on figures compared
through JSON: 1e-8 relative (the report rounds to 9 significant digits).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from cli_support import Result, run_tri

ROOT = Path(__file__).parents[1]
BREWERY = ROOT / "tri" / "panels_demo" / "brewery"
MDP = str(BREWERY / "mdp_480.toml")


def tri(*args: str, cwd: Path | None = None) -> Result:
    """``tri ARGS...`` in this process (the same code as the command, without start-up)."""
    return run_tri(*args, cwd=cwd)


@pytest.fixture(scope="module")
def building() -> dict:
    run = tri("report", MDP, "--format", "json")
    assert run.returncode == 0, run.stderr
    return json.loads(run.stdout)


def test_json_gives_every_panel(building):
    panels = building["building"]["panels"]
    assert [Path(p["file"]).name for p in panels] == [
        "mdp_480.toml",
        "hp1_480.toml",
        "lp1_208.toml",
        "lp2_208.toml",
    ]
    assert [p["depth"] for p in panels] == [0, 1, 1, 1]
    assert panels[0]["report"]["phases"] == building["phases"]  # the top level is the root
    lp1 = panels[2]
    tx = lp1["feeder"]["transformer"]
    assert tx["vector_group"] == "Dyn1" and tx["secondary"] == "208Y/120"
    assert lp1["report"]["supply"] is None and lp1["report"]["voltage"]["source"]
    feeds = [c["feeds"] for c in building["circuits"]]
    assert sum(f is not None for f in feeds) == 3


def test_a_fed_panel_equals_its_own_report(building, tmp_path):
    # HP-1 has no [supply]: its report alone has the same currents as in the building
    alone = json.loads(tri("report", str(BREWERY / "hp1_480.toml"), "--format", "json").stdout)
    inside = building["building"]["panels"][1]["report"]
    for lab in alone["phase_order"]:
        for key in ("current_a", "current_deg", "rms_a", "va"):
            assert inside["phases"][lab][key] == pytest.approx(alone["phases"][lab][key], rel=1e-8)
    assert inside["neutral"]["rms_a"] == pytest.approx(alone["neutral"]["rms_a"], rel=1e-8)


def test_a_parent_includes_its_children(building):
    # the direct feeder to HP-1 carries exactly HP-1's RMS currents
    hp1 = building["building"]["panels"][1]
    for lab in building["phase_order"]:
        assert hp1["feeder"]["current"][lab]["rms_a"] == pytest.approx(
            hp1["report"]["phases"][lab]["rms_a"], rel=1e-8
        )
    row = next(c for c in building["circuits"] if c["feeds"] and "hp1" in c["feeds"])
    assert row["rms_a"] == pytest.approx(
        max(hp1["report"]["phases"][lab]["rms_a"] for lab in building["phase_order"]), rel=1e-8
    )


@pytest.mark.parametrize("fmt", ["text", "markdown", "csv"])
def test_other_formats_list_every_panel(fmt):
    run = tri("report", MDP, "--format", fmt)
    assert run.returncode == 0, run.stderr
    # CSV names each panel by its file; the others by its name
    names = ("hp1_480", "lp1_208", "lp2_208") if fmt == "csv" else ("HP-1", "LP-1", "LP-2")
    for name in names:
        assert name in run.stdout
    if fmt == "text":
        table = run.stdout.split("Panels in this building")[1].splitlines()[:6]
        assert all(len(line) <= 80 for line in table)
        assert "Dyn1" in run.stdout


def test_iterate_solves_the_whole_tree():
    run = tri("report", MDP, "--format", "json", "--iterate")
    data = json.loads(run.stdout)
    lp2 = data["building"]["panels"][3]["report"]
    assert lp2["voltage"]["iterated"] and lp2["voltage"]["converged"]
    assert lp2["basis"]["currents"].startswith("panel voltage")


def test_check_judges_every_panel_and_names_it():
    run = tri("check", MDP)
    assert run.returncode == 1
    assert "service): FAIL" in run.stdout
    assert "LP-1 taproom; fed from" in run.stdout and "deviation" in run.stdout
    ok = tri("check", MDP, "--max-deviation", "70")
    assert ok.returncode == 0, ok.stdout
    assert ok.stdout.count("PASS, all") == 4


def test_check_fails_on_a_child_only(tmp_path):
    # the service passes; the fed panel's neutral is over its 20 A rating
    (tmp_path / "mdp.toml").write_text(
        'format = 1\n[panel]\nname = "MDP"\nsystem = "208Y/120"\nspaces = 12\nbus_a = 400\n\n'
        '[[circuit]]\nslot = 1\npoles = 3\nname = "Feeder"\nfeeds = "lp.toml"\n',
        encoding="utf-8",
    )
    (tmp_path / "lp.toml").write_text(
        'format = 1\n[panel]\nname = "LP"\nsystem = "208Y/120"\nspaces = 12\nbus_a = 100\n'
        "neutral_a = 20\n\n"
        '[[circuit]]\nslot = 1\nname = "Heater"\nload_a = 30\n',
        encoding="utf-8",
    )
    run = tri("check", "mdp.toml", "--max-deviation", "200", cwd=tmp_path)
    assert run.returncode == 1
    lp = run.stdout.split("lp.toml (LP")[1]
    assert lp.split("\n\n")[0].count("FAIL") >= 2 and "neutral" in lp  # verdict and the limit


def test_bad_building_exits_2_naming_both_files(tmp_path):
    (tmp_path / "mdp.toml").write_text(
        'format = 1\n[panel]\nname = "MDP"\nsystem = "480Y/277"\nspaces = 12\nbus_a = 400\n\n'
        '[[circuit]]\nslot = 1\npoles = 3\nname = "Feeder"\nfeeds = "lp.toml"\n',
        encoding="utf-8",
    )
    (tmp_path / "lp.toml").write_text(
        'format = 1\n[panel]\nname = "LP"\nsystem = "208Y/120"\nspaces = 12\nbus_a = 100\n',
        encoding="utf-8",
    )
    for command in ("report", "check"):
        run = tri(command, "mdp.toml", cwd=tmp_path)
        assert run.returncode == 2, run.stderr
        assert "mdp.toml:12:" in run.stderr  # the line of feeds and "lp.toml" in run.stderr
        assert "Traceback" not in run.stderr
