"""``tri report`` and ``tri check`` on buildings whose panels are wired (issue 13 after 12).

Sources: a feeder without a transformer carries its panel's line and neutral
currents unchanged [computed, Kirchhoff's current law], so each fed panel's
report in the building equals its report alone (the demo files
``tests/data/wiring/mwbc_208.toml``, shared neutrals and legs, and
``tri/panels_demo/woodshop_240d.toml``, a high-leg delta); hand-worked values
are in ``tests/test_engine_tree_wired.py``. The parents' own legs are
worked here: 600 VA and 900 VA legs on A and B of a 208Y/120 panel draw
5∠0° A and 7.5∠−120° A, whose neutral is ``|5 + 7.5∠−120°| = 6.614 A``
[computed].
"""

from __future__ import annotations

import json
import math
import shutil
from pathlib import Path

import pytest
from test_cli_building import tri

ROOT = Path(__file__).parents[1]
MWBC = ROOT / "tests" / "data" / "wiring" / "mwbc_208.toml"
SHOP = ROOT / "tri" / "panels_demo" / "woodshop_240d.toml"

MDP = """format = 1

[panel]
name = "MDP"
system = "208Y/120"
spaces = 42
bus_a = 400
main_a = 400

[[circuit]]
slot = 1
poles = 3
name = "Feeder to LP-2"
feeds = "lp2.toml"

[[circuit]]
slot = 2
poles = 2
neutral = true
name = "Receptacles"
load_va = [600, 900]
"""

OLD_SERVICE = """format = 1

[panel]
name = "Old service"
system = "240/120D"
spaces = 42
bus_a = 400
main_a = 400

[[circuit]]
slot = 1
poles = 3
name = "Feeder to the shop"
feeds = "shop.toml"
"""


B_UNIT = complex(-0.5, -math.sqrt(3) / 2)  # 1∠−120°


def phasor(d: dict) -> complex:
    """``current_a∠current_deg`` of a report entry [A]."""
    return d["current_a"] * complex(
        math.cos(math.radians(d["current_deg"])), math.sin(math.radians(d["current_deg"]))
    )


@pytest.fixture
def folder(tmp_path: Path) -> Path:
    shutil.copy(MWBC, tmp_path / "lp2.toml")
    shutil.copy(SHOP, tmp_path / "shop.toml")
    (tmp_path / "mdp.toml").write_text(MDP, encoding="utf-8")
    (tmp_path / "old.toml").write_text(OLD_SERVICE, encoding="utf-8")
    return tmp_path


def report(path: Path) -> dict:
    run = tri("report", str(path), "--format", "json")
    assert run.returncode == 0, run.stderr
    return json.loads(run.stdout)


@pytest.mark.parametrize(("root", "child"), [("mdp", "lp2"), ("old", "shop")])
def test_a_wired_child_in_the_building_equals_its_own_report(folder, root, child):
    building = report(folder / f"{root}.toml")
    alone = report(folder / f"{child}.toml")
    inside = building["building"]["panels"][1]["report"]
    for key, value in alone.items():
        if key == "circuits":  # the building adds "feeds" (None) to every circuit
            for a, b in zip(value, inside["circuits"], strict=True):
                assert b.pop("feeds") is None
                assert a == b
        elif key != "panel":
            assert inside[key] == value, key


def test_the_parent_sees_the_childs_lines_neutral_and_its_own_legs(folder):
    building = report(folder / "mdp.toml")
    alone = report(folder / "lp2.toml")
    (own,) = building["shared_neutrals"]
    assert own["name"] == "Receptacles"
    assert own["rms_a"] == pytest.approx(abs(5 + 7.5 * B_UNIT))
    feeder = building["circuits"][0]
    assert feeder["feeds"].endswith("lp2.toml")
    assert feeder["rms_a"] == pytest.approx(max(p["rms_a"] for p in alone["phases"].values()))
    # the service's lines and neutral: the child's plus its own 5∠0° A on A, 7.5∠−120° A on
    # B and their 6.614 A neutral (every load of both panels is linear)
    own_lines = {"A": 5.0, "B": 7.5 * B_UNIT, "C": 0.0}
    for lab, extra in own_lines.items():
        want = phasor(alone["phases"][lab]) + extra
        assert phasor(building["phases"][lab]) == pytest.approx(want, rel=1e-8)
    want = phasor(alone["neutral"]) + 5.0 + 7.5 * B_UNIT
    assert phasor(building["neutral"]) == pytest.approx(want, rel=1e-8)


def test_check_judges_the_wired_building(folder):
    run = tri("check", str(folder / "old.toml"), "--format", "json")
    assert run.returncode in (0, 1), run.stderr
    files = json.loads(run.stdout)["files"]
    assert files[0]["file"].endswith("old.toml") and files[1]["file"].endswith("shop.toml")
    assert all(f["checks"] for f in files)


def test_a_transformer_from_a_high_leg_panel_is_reported_and_a_yn_primary_refused(folder):
    """A 240/120D service feeding LP-2 (208Y/120) through a Dyn transformer is rolled up
    (:mod:`tri.engine.centre_tap`; its values in ``tests/test_engine_tree_centre_tap.py``);
    a YN primary on it, which would take the centre tap as a wye neutral, is a located error."""
    tx = (
        'transformer = {{ kva = 45, z_pct = 3.5, x_r = 2, connection = "{}", '
        'secondary = "208Y/120" }}\n'
    )
    base = OLD_SERVICE.replace('feeds = "shop.toml"', 'feeds = "lp2.toml"')
    (folder / "old.toml").write_text(base + tx.format("Dyn"), encoding="utf-8")
    building = report(folder / "old.toml")["building"]
    assert [p["file"].rsplit("/", 1)[-1] for p in building["panels"]] == ["old.toml", "lp2.toml"]
    (folder / "old.toml").write_text(base + tx.format("YNyn0"), encoding="utf-8")
    for command in ("report", "check"):
        run = tri(command, str(folder / "old.toml"))
        assert run.returncode == 2, run.stdout
        assert "old.toml" in run.stderr and "Feeder to the shop" in run.stderr
        assert "centre tap" in run.stderr and "Traceback" not in run.stderr
