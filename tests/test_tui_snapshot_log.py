"""SVG snapshots of the log view and the scenario choice, at 80×24 (what a wider terminal adds:
test_tui_wide.py).

The logged garage demo: current over time (whole week, and zoomed to phase
A's demand peak), the demand-duration view, the report's figures, the
scenario question, and the main view showing the evening scenario. The log
is read from the demo folder (its name only reaches the picture); the theme
is fixed. Regenerate with ``pytest tests/test_tui_snapshot_log.py
--snapshot-update`` and look at the pictures before committing them.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from tui_support import keys

from tri.tui.app import TriApp

DEMO = Path(__file__).parents[1] / "tri" / "panels_demo" / "garage_logged_208.toml"
SIZES = [(80, 24)]
sizes = pytest.mark.parametrize("size", SIZES, ids=["80x24"])


def garage() -> TriApp:
    return TriApp(DEMO, journal=False, theme="textual-dark")


@sizes
def test_log_current_over_time(snap_compare, size) -> None:
    assert snap_compare(garage(), terminal_size=size, run_before=keys("d"))


@sizes
def test_log_zoomed_to_the_demand_peak(snap_compare, size) -> None:
    before = keys("d", "plus", "plus", "plus", "p")
    assert snap_compare(garage(), terminal_size=size, run_before=before)


@sizes
def test_log_duration_view(snap_compare, size) -> None:
    before = keys("d", "tab", "up", "up", "up", "up", "up", "up")
    assert snap_compare(garage(), terminal_size=size, run_before=before)


@sizes
def test_log_figures_view(snap_compare, size) -> None:
    assert snap_compare(garage(), terminal_size=size, run_before=keys("d", "tab", "tab"))


@sizes
def test_log_neutral_only(snap_compare, size) -> None:
    assert snap_compare(garage(), terminal_size=size, run_before=keys("d", "1", "2", "3"))


@sizes
def test_scenario_question(snap_compare, size) -> None:
    assert snap_compare(garage(), terminal_size=size, run_before=keys("n"))


@sizes
def test_main_view_in_the_evening_scenario(snap_compare, size) -> None:
    assert snap_compare(garage(), terminal_size=size, run_before=keys("n", "2"))


@sizes
def test_log_that_cannot_be_read(snap_compare, size, tmp_path) -> None:
    # A cell that is not a number: the reader's located problem, by file and line.
    shutil.copy(DEMO, tmp_path / DEMO.name)
    rows = (DEMO.parent / "garage_logged_week.csv").read_text().splitlines()
    cells = rows[5].split(",")
    cells[2] = "4o.7"  # a letter o typed for a zero, on line 6
    rows[5] = ",".join(cells)
    (tmp_path / "garage_logged_week.csv").write_text("\n".join(rows) + "\n")
    app = TriApp(tmp_path / DEMO.name, journal=False, theme="textual-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys("d"))
