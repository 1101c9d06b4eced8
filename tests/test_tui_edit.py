"""Pilot tests of the main view: open, edit by keys, validation, undo/redo, figures = engine's.

Every figure asserted is taken from the engine itself (``analyse_schedule`` on
the schedule the UI holds), so these tests check that the UI shows the
engine's numbers for the schedule it shows, and that keys edit the right thing.
"""

from __future__ import annotations

from pathlib import Path

from tui_support import burst, settle

from tri.schedule.load import load_schedule
from tri.schedule.to_engine import analyse_schedule
from tri.tui.app import TriApp
from tri.tui.screens.form import FormScreen
from tri.tui.screens.main import MainScreen
from tri.tui.widgets.circuit_table import CircuitTable
from tri.tui.widgets.results_panel import ResultsPanel

DATA = Path(__file__).parent / "data" / "tui"


def results_text(app: TriApp) -> str:
    return str(app.screen.query_one(ResultsPanel).render())


def row_of(app: TriApp, name: str) -> int:
    table = app.screen.query_one(CircuitTable)
    s = app.session.schedule
    return table._order.index(next(i for i, c in enumerate(s.circuits) if c.name == name))


async def goto(pilot, name: str) -> None:
    table = pilot.app.screen.query_one(CircuitTable)
    table.move_cursor(row=row_of(pilot.app, name))
    await pilot.pause()


async def test_open_shows_engine_figures(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        expected = analyse_schedule(load_schedule(small).schedule)
        assert app.analysis == expected
        text = results_text(app)
        for ph in expected.phases:
            assert f"{ph.rms_a:.1f} A" in text
            assert f"{ph.loading_pct:.0f} %" in text
        assert f"{expected.neutral.rms_a:.1f} A" in text
        assert f"fund. {expected.neutral.current_a:.1f} A" in text
        assert f"I2/I1 {expected.current_unbalance.negative_sequence_pct:.1f} %" in text
        table = app.screen.query_one(CircuitTable)
        assert table.row_count == len(expected.circuit_rms_a)


async def test_edit_load_by_keys_updates_results(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await goto(pilot, "Dishwasher")
        await pilot.press("enter")
        assert isinstance(app.screen, FormScreen)
        await pilot.press("down", "down", "down")  # name, slot, poles -> load
        await pilot.press(*["backspace"] * 6, "3", "6", "0", "0")
        await pilot.press("enter")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        c = next(c for c in app.session.schedule.circuits if c.name == "Dishwasher")
        assert c.load_value == 3600
        expected = analyse_schedule(app.session.schedule)
        assert app.analysis == expected
        before = analyse_schedule(load_schedule(small).schedule)
        b = expected.phase_labels.index("B")
        assert expected.phases[b].rms_a > before.phases[b].rms_a
        assert f"{expected.phases[b].rms_a:.1f} A" in results_text(app)
        assert app.session.dirty


async def test_invalid_input_is_refused_and_kept(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await goto(pilot, "Dishwasher")
        await pilot.press("enter", "down", "down", "down", *["backspace"] * 6, "1", "2", "x")
        await pilot.press("enter")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FormScreen), "an invalid form must stay open"
        assert "load" in form.problems
        assert "expected a number" in form.problems["load"]
        assert form.values()["load"] == "12x", "what was typed is kept"
        await pilot.press("backspace", "enter")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        c = next(c for c in app.session.schedule.circuits if c.name == "Dishwasher")
        assert c.load_value == 12


async def test_slot_overlap_refused_with_the_loaders_message(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await goto(pilot, "Signage")
        await pilot.press("enter", "down", *["backspace"] * 3, "2")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FormScreen)
        # Named by slot and name, as the screen shows it (not by its place in the file).
        assert form.problems["slot"] == 'slot 2 is taken by slot 2 "Receptacles bar"'
        await pilot.press("enter")
        assert isinstance(app.screen, FormScreen)
        await pilot.press("escape")
        await settle(pilot)
        assert not app.session.dirty


async def test_undo_redo_delete_and_lock(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        original = app.session.schedule
        await goto(pilot, "Oven")
        await pilot.press("x")
        await settle(pilot)
        assert len(app.session.schedule.circuits) == len(original.circuits) - 1
        assert app.analysis == analyse_schedule(app.session.schedule)
        await pilot.press("u")
        await settle(pilot)
        assert app.session.schedule == original
        assert app.analysis == analyse_schedule(original)
        await pilot.press("r")
        await settle(pilot)
        assert "Oven" not in [c.name for c in app.session.schedule.circuits]
        await pilot.press("u")
        await goto(pilot, "Signage")
        await pilot.press("l")
        await settle(pilot)
        assert next(c for c in app.session.schedule.circuits if c.name == "Signage").locked
        await pilot.press("m")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen), "a locked circuit is not moved"
        await pilot.press("l", "m", "backspace", "1", "1", "enter")
        await settle(pilot)
        moved = next(c for c in app.session.schedule.circuits if c.name == "Signage")
        assert moved.slot == 11
        assert moved.phases == (2,)  # slot 11 is in row 6: phase C [common practice]
        await pilot.press("ctrl+z", "ctrl+z", "ctrl+z")
        await settle(pilot)
        assert app.session.schedule == original
        assert not app.session.dirty


async def test_add_and_duplicate(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        n = len(app.session.schedule.circuits)
        await pilot.press("a")
        form = app.screen
        assert isinstance(form, FormScreen)
        free_slot = form.values()["slot"]
        assert free_slot == "11"  # first free slot: the 3-pole oven takes 6, 8, 10
        await pilot.press(*"Kettle", "down", "down", "down", "1", "5", "0", "0", "enter")
        await settle(pilot)
        added = app.session.schedule.circuits[-1]
        assert (added.name, added.slot, added.load_value) == ("Kettle", 11, 1500)
        assert app.analysis == analyse_schedule(app.session.schedule)
        await pilot.press("c")
        assert isinstance(app.screen, FormScreen)
        await pilot.press("enter")
        await settle(pilot)
        copy = app.session.schedule.circuits[-1]
        assert copy.name == "Kettle (copy)"
        assert len(app.session.schedule.circuits) == n + 2


async def test_panel_supply_and_readings_forms(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        # Panel: main breaker 100 A -> 200 A halves the loading percent.
        await pilot.press("p", "down", "down", "down", "down", "down")
        await pilot.press(*["backspace"] * 4, "2", "0", "0", "enter")
        await settle(pilot)
        assert app.session.schedule.panel.main_a == 200
        assert app.analysis.rating_a == 200
        # Supply: 75 kVA, 4.5 %, X/R 2.5 gives a VUF in the results.
        await pilot.press("s", "7", "5", "down", "4", ".", "5", "down", "2", ".", "5", "enter")
        await settle(pilot)
        assert app.session.schedule.supply is not None
        assert app.analysis.voltage is not None
        assert f"VUF {app.analysis.voltage.vuf_pct:.2f} %" in results_text(app)
        # Readings: a voltage far from nominal is refused with the loader's message.
        await pilot.press("i", "down", "down", "down", "down", "9", "9", "9")
        form = app.screen
        assert isinstance(form, FormScreen)
        assert any("near the nominal" in m for m in form.problems.values())
        await pilot.press("escape")
        await settle(pilot)
        assert app.session.schedule.readings is None


async def test_keys_arriving_in_a_burst_act_in_order(small: Path) -> None:
    """Backspaces before digits, and field changes before typing, act in arrival order
    (works around Textualize/textual issue 6605: bindings used to run after later
    characters, turning a typed 3600 into 3, or typing into the wrong field)."""
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await goto(pilot, "Dishwasher")
        await pilot.press("enter")
        assert isinstance(app.screen, FormScreen)
        burst(app, ["down", "down", "down", "ctrl+u", "a", "b", "c"])
        burst(app, ["backspace"] * 3 + ["3", "6", "0", "0", "enter"])
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        c = next(c for c in app.session.schedule.circuits if c.name == "Dishwasher")
        assert c.load_value == 3600


async def test_choices_and_toggles_in_a_burst_land_on_their_own_field(small: Path) -> None:
    """→ on the poles choice and Space on the continuous toggle, typed in one burst with
    the field changes around them, change those fields and no other; Enter on a toggle
    accepts the form."""
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("a")
        assert isinstance(app.screen, FormScreen)
        keys = [*"Kiln", "down", "down", "right", "down", "ctrl+u", *"16", "down", "right"]
        keys += ["right", "down", "down", "down", "down", "space", "enter"]
        burst(app, keys)
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)
        c = next(c for c in app.session.schedule.circuits if c.name == "Kiln")
        assert (c.poles, c.load_value, c.load_kind, c.continuous) == (2, 16, "a", True)
