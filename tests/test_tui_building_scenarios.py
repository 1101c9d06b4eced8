"""Pilot test of a building with use scenarios: n chooses the case, the tree and main view follow.

The demo brewery is copied and its taproom panel LP-1 given use factors
(a ``closed`` scenario where the taproom draws little). A scenario of the
building scales every panel's loads and rolls the tree up again, as ``tri
report`` does (:mod:`tri.schedule.tree_scenarios`); every figure the UI shows
is checked against the engine's own roll-up of the same files in that
scenario (:func:`tri.schedule.tree_to_engine.analyse_building`).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from tui_support import settle

from tri.schedule.tree import load_tree
from tri.schedule.tree_to_engine import analyse_building
from tri.tui.app import TriApp
from tri.tui.screens.building_tree import BuildingScreen
from tri.tui.screens.choice import ChoiceScreen
from tri.tui.screens.main import MainScreen

BREWERY = Path(__file__).parents[1] / "tri" / "panels_demo" / "brewery"


@pytest.fixture
def brewery(tmp_path: Path) -> Path:
    """The brewery with LP-1's first two circuits at 10 % when the taproom is closed."""
    shutil.copytree(BREWERY, tmp_path / "brewery")
    lp1 = tmp_path / "brewery" / "lp1_208.toml"
    text = lp1.read_text()
    for name in ('"Taproom pendant lights"', '"Bar receptacles"'):
        text = text.replace(f"name = {name}\n", f"name = {name}\nuse = {{ closed = 0.1 }}\n", 1)
    lp1.write_text(text)
    return tmp_path / "brewery" / "mdp_480.toml"


def tree_label(app, index: int) -> str:
    screen = app.screen
    assert isinstance(screen, BuildingScreen)
    return str(screen.nodes[index].label)


async def test_the_case_chosen_in_the_tree_is_the_buildings_scenario(brewery: Path) -> None:
    tree = load_tree(brewery)
    connected = analyse_building(tree)
    closed = analyse_building(tree, scenario="closed")
    # The scenario reaches the service: the MDP's phase A carries less with the taproom closed.
    assert closed.nodes[0].analysis.phases[0].rms_a < connected.nodes[0].analysis.phases[0].rms_a
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert [name for name, _ in app.tree_cases] == ["connected", "closed"]
        assert app.analysis == connected.nodes[0].analysis
        await pilot.press("T")
        await settle(pilot)
        title = str(app.screen.query_one("#tree-title").render())
        assert "connected load" in title and "n: another case" in title
        await pilot.press("n")
        await settle(pilot)
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("1")  # the second answer: scenario closed
        await settle(pilot)
        assert isinstance(app.screen, BuildingScreen)
        assert "scenario closed" in str(app.screen.query_one("#tree-title").render())
        top = max(closed.nodes[0].analysis.phases, key=lambda p: p.rms_a)
        assert f"{top.label} {top.rms_a:.1f} A" in tree_label(app, 0)
        # Open LP-1: the main view shows its closed-taproom figures and names the case.
        await pilot.press("home", "down", "down", "enter")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        assert app.building.current == 2
        assert app.analysis == closed.nodes[2].analysis
        assert "scenario closed" in app.screen.query_one("#results").border_title
        # The checks judge every case; back to the connected load from the main view.
        await pilot.press("n")
        await settle(pilot)
        await pilot.press("0")
        await settle(pilot)
        assert app.analysis == connected.nodes[2].analysis
