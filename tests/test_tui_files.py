"""Pilot tests of saving, reloading, the autosave journal, quitting, the picker and help."""

from __future__ import annotations

import io
from pathlib import Path

import pytest
from rich.console import Console
from tui_support import settle

from tri.schedule.journal import journal_path, read_journal
from tri.schedule.load import load_schedule
from tri.schedule.to_engine import analyse_schedule
from tri.tui import demos
from tri.tui.app import TriApp
from tri.tui.screens.choice import ChoiceScreen
from tri.tui.screens.form import FormScreen
from tri.tui.screens.main import MainScreen
from tri.tui.screens.picker import PickerScreen
from tri.tui.screens.text_view import TextScreen

DATA = Path(__file__).parent / "data" / "tui"


async def delete_first(pilot) -> str:
    """Delete the circuit under the cursor (slot 1); return its name."""
    name = pilot.app.session.schedule.circuits[0].name
    await pilot.press("x")
    await settle(pilot)
    return name


async def test_save_keeps_comments_and_reloads(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        gone = await delete_first(pilot)
        edited = app.session.schedule
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert not app.session.dirty
        assert "Saved small.toml" in str(app.screen.query_one("#status").render())
    text = small.read_text()
    assert "# Kitchen side" in text, "comments survive saving"
    assert gone not in text
    assert (small.parent / "small.toml.bak").exists()
    reloaded = load_schedule(small).schedule
    assert reloaded == edited
    # Reopen: same figures as the engine's on the saved file.
    app2 = TriApp(small, journal=False)
    async with app2.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert app2.analysis == analyse_schedule(reloaded)


async def test_save_twice_does_not_duplicate_new_circuits(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("a", *"Kettle", "down", "down", "down", "9", "0", "0", "enter")
        await settle(pilot)
        await pilot.press("ctrl+s")
        await settle(pilot)
        await pilot.press("l", "ctrl+s")
        await settle(pilot)
    assert small.read_text().count('"Kettle"') == 1
    assert load_schedule(small).schedule == app.session.schedule


async def test_save_as_writes_a_new_file(small: Path, tmp_path: Path) -> None:
    app = TriApp(small, journal=False)
    target = tmp_path / "copy.toml"
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await delete_first(pilot)
        await pilot.press("w")
        assert isinstance(app.screen, FormScreen)
        app.screen.query_one("#field-path").value = str(target)
        await pilot.press("enter")
        await settle(pilot)
        assert app.session.path == target
        assert "copy.toml" in str(app.screen.query_one("#title-bar").render())
    assert load_schedule(target).schedule == app.session.schedule


async def test_journal_recovers_after_a_crash(small: Path) -> None:
    app = TriApp(small)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await delete_first(pilot)
        edited = app.session.schedule
        entry = read_journal(journal_path(small))
        assert entry is not None and entry.schedule == edited
        # Leave without quitting: as if the SSH session dropped.
    assert load_schedule(small).schedule != edited, "the file itself is untouched"
    app2 = TriApp(small)
    async with app2.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert isinstance(app2.screen, ChoiceScreen)
        await pilot.press("r")
        await settle(pilot)
        assert isinstance(app2.screen, MainScreen)
        assert app2.session.schedule == edited
        assert app2.session.dirty
        assert app2.analysis == analyse_schedule(edited)
        await pilot.press("ctrl+s")
        await settle(pilot)
    assert load_schedule(small).schedule == edited
    assert read_journal(journal_path(small)) is None, "saving clears the journal"


async def test_journal_discard(small: Path) -> None:
    app = TriApp(small)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await delete_first(pilot)
    app2 = TriApp(small)
    async with app2.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("d")
        await settle(pilot)
        assert app2.session.schedule == load_schedule(small).schedule
    assert read_journal(journal_path(small)) is None


async def test_quit_asks_when_unsaved_and_ctrl_q_reaches_it_from_a_form(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await delete_first(pilot)
        await pilot.press("e")
        assert isinstance(app.screen, FormScreen)
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceScreen)
        assert "unsaved" in app.screen.message
        await pilot.press("escape")
        await pilot.pause()
        assert app.is_running
        await pilot.press("ctrl+q", "s")
        await settle(pilot)
    assert app.return_code == 0
    assert load_schedule(small).schedule == app.session.schedule


async def test_quit_without_edits_does_not_ask(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert not app.is_running


async def test_picker_opens_a_demo_as_an_unsaved_copy(
    monkeypatch: pytest.MonkeyPatch, tmp_path: Path
) -> None:
    monkeypatch.setattr(demos, "demo_folder", lambda: DATA)
    app = TriApp(None, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert isinstance(app.screen, PickerScreen)
        await pilot.press("enter")  # the first demo
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        assert app.session.path is None
        assert app.session.dirty, "an unsaved copy must be saved under a new name"
        assert app.analysis == analyse_schedule(app.session.schedule)
        await pilot.press("ctrl+s")
        assert isinstance(app.screen, FormScreen), "saving a copy asks for a file name"
        target = tmp_path / "mine.toml"
        app.screen.query_one("#field-path").value = str(target)
        await pilot.press("enter")
        await settle(pilot)
    assert target.exists()


async def test_missing_file_offers_to_create_it(tmp_path: Path) -> None:
    target = tmp_path / "new_panel.toml"
    app = TriApp(target, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert isinstance(app.screen, FormScreen)
        await pilot.press("enter")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
    assert load_schedule(target).schedule.panel.name == "new panel"


async def test_help_lists_keys_and_the_caution(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("question_mark")
        assert isinstance(app.screen, TextScreen)
        body = str(app.screen.body)
        for words in ("Ctrl+Q", "undo", "Rebalance", "nothing here is approval to work"):
            assert words in body
        await pilot.press("escape")
        assert isinstance(app.screen, MainScreen)
        await pilot.press("f")
        assert isinstance(app.screen, TextScreen)
        shown = plain(app.screen.body)
        for finding in app.analysis.findings:
            assert " ".join(finding.message.split()) in shown
        await pilot.press("tab")  # the checks, as tri check words them
        assert "checks" in plain(app.screen.body) and "PASS" in plain(app.screen.body)


def plain(renderable) -> str:
    """What a renderable shows, as one line of words (wrapping undone)."""
    console = Console(width=200, record=True, file=io.StringIO())
    console.print(renderable)
    return " ".join(console.export_text().split())


DEMOS = sorted((Path(__file__).resolve().parents[1] / "tri" / "panels_demo").glob("*.toml"))


@pytest.mark.parametrize("demo", DEMOS, ids=lambda p: p.stem)
async def test_each_demo_opens_with_the_engines_figures(demo: Path) -> None:
    app = TriApp(demo, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        expected = analyse_schedule(load_schedule(demo).schedule)
        assert app.analysis == expected
        await pilot.press("v")
        await settle(pilot)
        legend = str(app.screen.query_one("#phasor-legend").render())
        for ph in expected.phases:
            assert f"{ph.current_a:.1f} A ∠{ph.current_deg:.1f}°" in legend


@pytest.mark.parametrize("demo", [DATA / "small.toml", *DEMOS], ids=lambda p: p.stem)
def test_journal_data_round_trip(demo: Path) -> None:
    from tri.schedule.journal import schedule_from_data, schedule_to_data

    schedule = load_schedule(demo).schedule
    back = schedule_from_data(schedule_to_data(schedule))
    assert back == schedule
    assert [c.source_index for c in back.circuits] == [c.source_index for c in schedule.circuits]


def test_journal_module_stays_headless() -> None:
    import subprocess
    import sys

    code = "import sys, tri.schedule.journal; print('textual' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_unreadable_journal_is_ignored(small: Path) -> None:
    target = journal_path(small)
    target.parent.mkdir(parents=True, exist_ok=True)
    target.write_text("{not json")
    assert read_journal(target) is None


def test_demos_of_one_panel_are_told_apart_by_their_file() -> None:
    """Two demos of the same panel (scheduled, and with its log) get their file names."""
    labels = demos.demo_labels(DEMOS)
    assert len(set(labels)) == len(labels), labels
    garages = [lab for lab, p in zip(labels, DEMOS, strict=True) if p.stem.startswith("garage")]
    assert any(lab.endswith("garage_logged_208") for lab in garages), garages
    # a label that is already unique keeps its short form
    bakery = next(lab for lab, p in zip(labels, DEMOS, strict=True) if p.stem == "bakery_208")
    assert not bakery.endswith("bakery_208")
