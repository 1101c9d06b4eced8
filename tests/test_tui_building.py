"""Pilot tests of a building in the UI: the tree, moving between panels, editing and saving them.

The demo brewery (an MDP feeding a motor panel directly and two 208Y/120
panels through delta-wye transformers) is copied to a folder of the test's
own. Every figure is checked against the engine's building analysis of the
same files (:func:`tri.schedule.tree_to_engine.analyse_building`, what ``tri
report`` on the top panel gives), before and after a child is edited.
"""

from __future__ import annotations

import dataclasses
import shutil
from pathlib import Path

import pytest
from tui_support import settle

from tri.schedule.load import load_schedule
from tri.schedule.to_engine import analyse_schedule
from tri.schedule.tree import load_tree, with_schedules
from tri.schedule.tree_to_engine import analyse_building
from tri.tui.app import TriApp
from tri.tui.screens.building_tree import BuildingScreen
from tri.tui.screens.choice import ChoiceScreen
from tri.tui.screens.form import FormScreen
from tri.tui.screens.main import MainScreen

BREWERY = Path(__file__).parents[1] / "tri" / "panels_demo" / "brewery"
#: Panels in the tree's order (depth first, children in the order of the feeders).
ORDER = ["mdp_480.toml", "hp1_480.toml", "lp1_208.toml", "lp2_208.toml"]


@pytest.fixture
def brewery(tmp_path: Path) -> Path:
    shutil.copytree(BREWERY, tmp_path / "brewery")
    return tmp_path / "brewery" / "mdp_480.toml"


def status(app) -> str:
    return str(app.screen.query_one("#status").render())


async def open_panel(pilot, index: int) -> None:
    """T, the cursor down to panel ``index``, Enter."""
    await pilot.press("T")
    await settle(pilot)
    assert isinstance(pilot.app.screen, BuildingScreen)
    await pilot.press("home", *["down"] * index, "enter")
    await settle(pilot)
    assert isinstance(pilot.app.screen, MainScreen)


async def test_the_top_panel_shows_the_whole_building(brewery: Path) -> None:
    expected = analyse_building(load_tree(brewery))
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert app.building is not None
        assert [app.building.name(i) for i in range(4)] == ORDER
        assert app.analysis == expected.nodes[0].analysis
        # The MDP's own circuits alone draw far less: its figures include what it feeds.
        alone = analyse_schedule(load_schedule(brewery).schedule)
        assert app.analysis.phases[0].rms_a > alone.phases[0].rms_a
        assert "everything it feeds" in app.screen.query_one("#results").border_title
        assert "A building of 4 panels" in status(app)


async def test_moving_between_panels_with_the_keyboard(brewery: Path) -> None:
    expected = analyse_building(load_tree(brewery))
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        for index in (2, 1, 3, 0):
            await open_panel(pilot, index)
            assert app.building.current == index
            assert app.session.path.name == ORDER[index]
            assert app.analysis == expected.nodes[index].analysis
            # The tree opens on the panel shown, described under it.
            await pilot.press("T")
            await settle(pilot)
            assert app.screen.query_one("Tree").cursor_node.data == index
            assert ORDER[index] in str(app.screen.query_one("#tree-details").render())
            await pilot.press("escape")
            await settle(pilot)
        await pilot.press("T")
        await settle(pilot)
        await pilot.press("escape")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen) and app.building.current == 0


async def test_editing_a_child_changes_the_parent(brewery: Path) -> None:
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        before = app.tree_result.nodes[0].analysis.phases[0].rms_a
        await open_panel(pilot, 2)  # LP-1, the taproom
        gone = app.session.schedule.circuits[0]
        await pilot.press("x")  # delete the circuit under the cursor
        await settle(pilot)
        assert gone not in app.session.schedule.circuits
        # The parent's figures are the engine's on the tree as edited (nothing saved yet).
        tree = load_tree(brewery)
        schedules = [p.schedule for p in tree.panels]
        schedules[2] = app.session.schedule
        expected = analyse_building(with_schedules(tree, schedules))
        root = app.tree_result.nodes[0].analysis
        assert root == expected.nodes[0].analysis
        assert root.phases[0].rms_a != pytest.approx(before)
        # The tree shows it: the MDP's new current, LP-1 marked as modified.
        await pilot.press("T")
        await settle(pilot)
        labels = {i: str(n.label) for i, n in app.screen.nodes.items()}
        top = max(root.phases, key=lambda p: p.rms_a)
        assert f"{top.label} {top.rms_a:.1f} A" in labels[0]
        assert "● modified" in labels[2] and "modified" not in labels[0]
        # Moving to the parent keeps the child's edit; the parent shows the roll-up.
        await pilot.press("home", "enter")
        await settle(pilot)
        assert app.analysis == expected.nodes[0].analysis
        assert app.building.sessions[2].dirty
        assert "(+1 panel)" in str(app.screen.query_one("#title-bar").render())


async def test_saving_a_child_writes_only_the_child(brewery: Path) -> None:
    folder = brewery.parent
    untouched = {n: (folder / n).read_bytes() for n in ORDER if n != "lp1_208.toml"}
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await open_panel(pilot, 2)
        await pilot.press("x", "ctrl+s")
        await settle(pilot)
        assert "Saved lp1_208.toml" in status(app)
        assert not app.building.sessions[2].dirty
        shown = app.tree_result.nodes[0].analysis
    for name, data in untouched.items():
        assert (folder / name).read_bytes() == data, f"{name} was not edited and stays as it was"
    assert (folder / "lp1_208.toml.bak").exists()
    text = (folder / "lp1_208.toml").read_text()
    assert text.startswith("# "), "the child's comments survive saving"
    # tri report on the top panel now gives what the UI showed.
    assert analyse_building(load_tree(brewery)).nodes[0].analysis == shown


async def test_quitting_asks_about_every_modified_panel(brewery: Path) -> None:
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await open_panel(pilot, 3)
        await pilot.press("x")
        await settle(pilot)
        await open_panel(pilot, 0)  # the top panel itself is not modified
        await pilot.press("ctrl+q")
        await settle(pilot)
        assert isinstance(app.screen, ChoiceScreen)
        message = str(app.screen.query_one("#choice-message").render())
        assert "lp2_208.toml has unsaved edits" in message
        await pilot.press("s")
        await settle(pilot)
    assert app.return_code == 0
    saved = load_schedule(brewery.parent / "lp2_208.toml").schedule
    assert len(saved.circuits) == len(load_schedule(BREWERY / "lp2_208.toml").schedule.circuits) - 1


async def test_deleting_a_feeder_circuit_is_refused(brewery: Path) -> None:
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        before = app.session.schedule
        assert before.circuits[0].feed is not None  # slot 1 feeds HP-1
        await pilot.press("x")
        await settle(pilot)
        assert app.session.schedule == before and not app.session.dirty
        words = status(app)
        assert "the building would break" in words and "hp1_480.toml" in words
        assert str(brewery.parent) not in words, "files are named by their name"


async def test_a_childs_system_must_stay_its_transformers_secondary(brewery: Path) -> None:
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await open_panel(pilot, 2)
        await pilot.press("p")
        await settle(pilot)
        form = app.screen
        assert isinstance(form, FormScreen)
        await pilot.press("down", "right")  # the system field: the next system of the list
        await settle(pilot)
        message = str(form.query_one(".form-message").render())
        assert "secondary 208Y/120" in message and "lp1_208.toml" in message
        await pilot.press("enter")
        await settle(pilot)
        assert isinstance(app.screen, FormScreen), "a refused Enter keeps the form open"


async def test_a_feeder_circuit_form_keeps_its_feed(brewery: Path) -> None:
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        feeder = app.session.schedule.circuits[0]
        await pilot.press("e")
        await settle(pilot)
        labels = [str(w.render()) for w in app.screen.query(".form-label")]
        assert "Feeds" in labels and "Load" not in labels
        # Rename it: the feed (file, conductors, transformer) stays as it was.
        await pilot.press("end", "!", "enter")
        await settle(pilot)
        edited = app.session.schedule.circuits[0]
        assert edited.name == feeder.name + "!"
        assert edited.feed == feeder.feed and edited.poles == 3


async def test_a_child_opened_alone_is_one_panel(brewery: Path) -> None:
    child = brewery.parent / "lp1_208.toml"
    app = TriApp(child, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert app.building is None
        assert app.analysis == analyse_schedule(load_schedule(child).schedule)
        await pilot.press("T")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)


async def test_a_child_changed_on_disk_is_not_overwritten(brewery: Path) -> None:
    child = brewery.parent / "lp2_208.toml"
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await open_panel(pilot, 3)
        child.write_text(child.read_text() + "\n# edited elsewhere\n")
        await pilot.press("x", "ctrl+s")
        await settle(pilot)
        assert isinstance(app.screen, ChoiceScreen)
        assert "changed on disk" in app.screen.title_text
    assert child.read_text().endswith("# edited elsewhere\n")


def test_with_schedules_relinks_a_moved_feeder(brewery: Path) -> None:
    # The file layer's relinking: moving the LP-1 feeder from slot 7 to slot 25
    # keeps LP-1 fed from it, and the roll-up is the same (the child's A, B, C
    # are the parent's whatever the feeder's slot [computed: README, Buildings]).
    tree = load_tree(brewery)
    top = tree.panels[0].schedule
    k = next(i for i, c in enumerate(top.circuits) if c.feed and "lp1" in c.feed.path)
    moved = top.with_circuit(k, top.circuits[k].at_slot(25))
    again = with_schedules(tree, [moved, *(p.schedule for p in tree.panels[1:])])
    assert again.panels[2].parent == 0 and again.panels[2].feeder_index == k
    a, b = analyse_building(tree), analyse_building(again)
    assert b.nodes[0].analysis.phases[0].rms_a == pytest.approx(a.nodes[0].analysis.phases[0].rms_a)
    renamed = dataclasses.replace(moved, circuits=moved.circuits[:k] + moved.circuits[k + 1 :])
    with pytest.raises(Exception, match="no circuit feeds"):
        with_schedules(tree, [renamed, *(p.schedule for p in tree.panels[1:])])


async def test_reopening_a_changed_child_keeps_the_building(brewery: Path) -> None:
    child = brewery.parent / "lp2_208.toml"
    app = TriApp(brewery, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await open_panel(pilot, 1)
        await pilot.press("x")  # an unsaved edit elsewhere in the building
        await settle(pilot)
        await open_panel(pilot, 3)
        child.write_text(child.read_text().replace("LP-2 kitchen", "LP-2 kitchen (renamed)"))
        await pilot.press("x", "ctrl+s")
        await settle(pilot)
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("r")  # reopen it from disk
        await settle(pilot)
        assert app.building is not None and app.building.current == 3
        assert app.session.schedule.panel.name == "LP-2 kitchen (renamed)"
        assert not app.session.dirty
        assert app.building.sessions[1].dirty, "the other panel's edit is still there"
