"""SVG snapshots of the building rebalance screen, at 80×24 (what a wider terminal adds:
test_tui_wide.py).

Opened from the tree (r) on the MDP of the demo brewery (copied to the
test's folder), with 30 % allowed below the MDP: the status, every panel's
deviation before and after, and the work order by panel. The search
settles in well under its time limit, so the picture is the proven plan.
Regenerate with ``pytest tests/test_tui_snapshot_tree_rebalance.py
--snapshot-update`` and look at the pictures before committing them.
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
def brewery(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> TriApp:
    # a finished search whatever the machine's load (the screen's own limit is 5 s)
    monkeypatch.setattr("tri.tui.screens.tree_rebalance.TIME_LIMIT_S", 60.0)
    shutil.copytree(BREWERY, tmp_path / "brewery")
    return TriApp(tmp_path / "brewery" / "mdp_480.toml", journal=False, theme="textual-dark")


@sizes
def test_building_rebalance_result(snap_compare, size, brewery) -> None:
    before = keys("T", "r", "tab", "3", "0", "enter")
    assert snap_compare(brewery, terminal_size=size, run_before=before)
