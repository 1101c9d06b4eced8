"""SVG snapshots of a building in the UI, at 80×24 (what a wider terminal adds:
test_tui_wide.py).

The demo brewery, copied to the test's folder so edits touch nothing else:
the tree of panels; the tree after a child is edited (the parent's new
figures, the child marked modified); a fed panel in the main view; a
feeder circuit's form; the quit question with a modified child; an edit
refused because it would break the building. Files are named by their name
only; the theme is fixed. Regenerate with ``pytest
tests/test_tui_snapshot_building.py --snapshot-update`` and look at the
pictures before committing them.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from tui_support import keys

from tri.tui.app import TriApp

BREWERY = Path(__file__).parents[1] / "tri" / "panels_demo" / "brewery"
sizes = pytest.mark.parametrize("size", [(80, 24)], ids=["80x24"])


@pytest.fixture
def brewery(tmp_path: Path) -> TriApp:
    shutil.copytree(BREWERY, tmp_path / "brewery")
    return TriApp(tmp_path / "brewery" / "mdp_480.toml", journal=False, theme="textual-dark")


@sizes
def test_building_tree(snap_compare, size, brewery) -> None:
    assert snap_compare(brewery, terminal_size=size, run_before=keys("T", "down", "down"))


@sizes
def test_building_tree_after_editing_a_child(snap_compare, size, brewery) -> None:
    before = keys("T", "down", "down", "enter", "x", "T")
    assert snap_compare(brewery, terminal_size=size, run_before=before)


@sizes
def test_fed_panel_in_the_main_view(snap_compare, size, brewery) -> None:
    before = keys("T", "down", "down", "down", "enter")
    assert snap_compare(brewery, terminal_size=size, run_before=before)


@sizes
def test_feeder_circuit_form(snap_compare, size, brewery) -> None:
    assert snap_compare(brewery, terminal_size=size, run_before=keys("e"))


@sizes
def test_quit_with_a_modified_child(snap_compare, size, brewery) -> None:
    before = keys("T", "end", "enter", "x", "T", "home", "enter", "ctrl+q")
    assert snap_compare(brewery, terminal_size=size, run_before=before)


@sizes
def test_edit_that_would_break_the_building(snap_compare, size, brewery) -> None:
    assert snap_compare(brewery, terminal_size=size, run_before=keys("x"))
