"""``tri suggest PARENT --write DIR``: the building after the moves, one file per panel.

The written folder is checked from outside the search: it is loaded again
as a building (:func:`tri.schedule.tree.load_tree`) and rolled up by the
engine (``analyse_building``, the same as ``tri report``), and every panel's
deviation must equal the plan's after-figure in the JSON; each moved
breaker must sit in the slot the work order names; the inputs must be
byte-for-byte unchanged and the comments of every file kept.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest
from cli_support import run_tri

from tri.schedule.tree import load_tree
from tri.schedule.tree_to_engine import analyse_building

ROOT = Path(__file__).resolve().parents[1]
BREWERY = ROOT / "tri" / "panels_demo" / "brewery"
PROOF_TIME = ("--time-limit", "120")


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {str(f.relative_to(folder)): f.read_bytes() for f in folder.rglob("*") if f.is_file()}


@pytest.fixture
def brewery(tmp_path: Path) -> Path:
    folder = tmp_path / "brewery"
    shutil.copytree(BREWERY, folder)
    return folder


def _suggest_write(root: Path, out: Path, *extra: str) -> dict:
    r = run_tri("suggest", str(root), "--write", str(out), *PROOF_TIME, "--format", "json", *extra)
    assert r.returncode == 0, r.stderr
    assert "tri: wrote the building after the moves to" in r.stderr
    return json.loads(r.stdout)


def _check_written(data: dict, written_root: Path) -> None:
    """The written building, read and rolled up again, is the plan's after-state."""
    tree = load_tree(written_root)
    by_name = {p.schedule.panel.name: (i, p) for i, p in enumerate(tree.panels)}
    result = analyse_building(tree)
    assert len(data["panels"]) == len(tree.panels)
    for plan in data["panels"]:
        i, panel = by_name[plan["panel"]]
        dev = result.nodes[i].analysis.current_unbalance.max_deviation_pct
        # rel 1e-8: the JSON rounds to 9 significant digits
        assert dev == pytest.approx(plan["after"]["max_deviation_pct"], rel=1e-8, abs=1e-9)
        slots = {c.name: c.slot for c in panel.schedule.circuits}
        for m in plan["moves"]:
            assert slots[m["circuit"]] == m["to_slot"]


def test_brewery_written_into_a_new_folder(brewery: Path, tmp_path: Path) -> None:
    before = _snapshot(brewery)
    out = tmp_path / "after"
    data = _suggest_write(brewery / "mdp_480.toml", out)
    assert data["relocations"] == 6 and data["status"] == "optimal"
    assert _snapshot(brewery) == before  # the inputs untouched
    assert sorted(_snapshot(out)) == sorted(before)
    _check_written(data, out / "mdp_480.toml")
    moved = {p["file"] for p in data["panels"] if p["moves"]}
    for name in before:
        text = (out / name).read_text(encoding="utf-8")
        original = (brewery / name).read_text(encoding="utf-8")
        comments = [x for x in original.splitlines() if x.lstrip().startswith("#")]
        assert comments and all(c in text.splitlines() for c in comments), name
        if not any(f.endswith(name) for f in moved):
            assert text == original  # an unchanged panel is copied as it is
    # tri report on the written top panel gives the plan's after-figures
    r = run_tri("report", str(out / "mdp_480.toml"), "--format", "json")
    assert r.returncode == 0, r.stderr
    report = {n["name"]: n["report"] for n in json.loads(r.stdout)["building"]["panels"]}
    assert len(report) == len(data["panels"])
    for plan in data["panels"]:
        got = report[plan["panel"]]["current_unbalance"]["max_deviation_pct"]
        # both sides rounded to 9 significant digits
        assert got == pytest.approx(plan["after"]["max_deviation_pct"], rel=1e-8)
        assert got <= plan["target_pct"]


def test_subfolders_and_parent_folders_keep_their_feeds(tmp_path: Path) -> None:
    # the top panel in top/, one child beside it in a subfolder, two in ../panels/
    src = tmp_path / "site"
    (src / "top" / "kitchen").mkdir(parents=True)
    (src / "panels").mkdir()
    text = (BREWERY / "mdp_480.toml").read_text(encoding="utf-8")
    text = text.replace('feeds = "hp1_480.toml"', 'feeds = "../panels/hp1_480.toml"')
    text = text.replace('feeds = "lp1_208.toml"', 'feeds = "../panels/lp1_208.toml"')
    text = text.replace('feeds = "lp2_208.toml"', 'feeds = "kitchen/lp2_208.toml"')
    (src / "top" / "mdp_480.toml").write_text(text, encoding="utf-8")
    for name in ("hp1_480.toml", "lp1_208.toml"):
        shutil.copy(BREWERY / name, src / "panels" / name)
    shutil.copy(BREWERY / "lp2_208.toml", src / "top" / "kitchen" / "lp2_208.toml")
    before = _snapshot(src)
    out = tmp_path / "out"
    out.mkdir()  # an empty folder is accepted
    data = _suggest_write(src / "top" / "mdp_480.toml", out)
    assert _snapshot(src) == before
    assert sorted(_snapshot(out)) == sorted(before)
    _check_written(data, out / "top" / "mdp_480.toml")


def test_at_a_lower_panel_writes_the_whole_building(brewery: Path, tmp_path: Path) -> None:
    out = tmp_path / "after"
    data = _suggest_write(brewery / "mdp_480.toml", out, "--at", "LP-1 taproom", "--target", "5")
    assert [p["panel"] for p in data["panels"]] == ["LP-1 taproom"]
    assert sorted(_snapshot(out)) == sorted(_snapshot(brewery))
    tree = load_tree(out / "mdp_480.toml")
    lp1 = next(p for p in tree.panels if p.schedule.panel.name == "LP-1 taproom")
    slots = {c.name: c.slot for c in lp1.schedule.circuits}
    for m in data["panels"][0]["moves"]:
        assert slots[m["circuit"]] == m["to_slot"]
    for name in ("mdp_480.toml", "hp1_480.toml", "lp2_208.toml"):
        assert (out / name).read_bytes() == (brewery / name).read_bytes()


def test_bad_write_targets_are_refused_before_the_search(brewery: Path, tmp_path: Path) -> None:
    before = _snapshot(brewery)
    root = str(brewery / "mdp_480.toml")
    full = tmp_path / "full"
    full.mkdir()
    (full / "notes.txt").write_text("x", encoding="utf-8")
    cases = [
        (str(brewery), "folder is not empty"),  # the inputs' own folder
        (str(full), "folder is not empty"),
        (root, "one file per panel"),  # an input file
        (str(tmp_path / "out.toml"), "one file per panel"),
        (str(full / "notes.txt"), "exists and is not a folder"),
        (str(tmp_path / "no" / "such"), "does not exist"),
    ]
    for target, message in cases:
        r = run_tri("suggest", root, "--write", target)
        assert r.returncode == 2, (target, r.stdout)
        assert f"tri: error: --write {target}: " in r.stderr and message in r.stderr, r.stderr
        assert "Traceback" not in r.stderr and r.stdout == ""
    assert _snapshot(brewery) == before
    assert sorted(p.name for p in full.iterdir()) == ["notes.txt"]


def test_a_panels_logger_export_is_copied_with_it(brewery: Path, tmp_path: Path) -> None:
    # LP-1's place taken by the logged garage, its week of readings beside it in garage/
    demo = ROOT / "tri" / "panels_demo"
    (brewery / "garage").mkdir()
    for name in ("garage_logged_208.toml", "garage_logged_week.csv"):
        shutil.copy(demo / name, brewery / "garage" / name)
    (brewery / "lp1_208.toml").unlink()
    mdp = brewery / "mdp_480.toml"
    text = mdp.read_text(encoding="utf-8")
    mdp.write_text(text.replace('"lp1_208.toml"', '"garage/garage_logged_208.toml"'), "utf-8")
    out = tmp_path / "after"
    data = _suggest_write(mdp, out, "--target", "20")
    assert data["panels"][2]["moves"]  # the garage is saved, not copied
    csv = "garage/garage_logged_week.csv"
    assert (out / csv).read_bytes() == (brewery / csv).read_bytes()
    _check_written(data, out / "mdp_480.toml")
    r = run_tri("report", str(out / "mdp_480.toml"))
    assert r.returncode == 0, r.stderr


def test_a_feeds_through_a_symbolic_link_is_refused(brewery: Path, tmp_path: Path) -> None:
    # feeds = "link/lp2_208.toml" with link -> kitchen: a copy cannot keep both names
    (brewery / "kitchen").mkdir()
    (brewery / "lp2_208.toml").rename(brewery / "kitchen" / "lp2_208.toml")
    (brewery / "link").symlink_to("kitchen", target_is_directory=True)
    mdp = brewery / "mdp_480.toml"
    text = mdp.read_text(encoding="utf-8")
    mdp.write_text(text.replace('"lp2_208.toml"', '"link/lp2_208.toml"'), "utf-8")
    out = tmp_path / "after"
    r = run_tri("suggest", str(mdp), "--write", str(out), *PROOF_TIME)
    assert r.returncode == 2, r.stderr
    assert "feeds link/lp2_208.toml reaches" in r.stderr and "symbolic link" in r.stderr
    assert "Traceback" not in r.stderr
    assert not out.exists()  # refused before anything is written
