"""Pilot tests of the panel view: Tab switches, keys move the cursor, moves picked on the panel.

Slot facts are the two-column geometry of the schedule format [common
practice]: slot n in row (n + 1) // 2, rows cycling A, B, C, an n-pole
breaker in slot s also taking s + 2 (and s + 4).
"""

from __future__ import annotations

from pathlib import Path

from tui_support import settle

from tri.tui.app import TriApp
from tri.tui.screens.form import FormScreen
from tri.tui.screens.main import MainScreen
from tri.tui.widgets.circuit_table import CircuitTable
from tri.tui.widgets.panel_view import PanelView

DEMOS = Path(__file__).parents[1] / "tri" / "panels_demo"


def index_of(app: TriApp, name: str) -> int:
    return next(i for i, c in enumerate(app.session.schedule.circuits) if c.name == name)


def status(app: TriApp) -> str:
    return str(app.screen.query_one("#status").render())


async def panel(pilot) -> PanelView:
    await settle(pilot)
    await pilot.press("tab")
    await settle(pilot)
    view = pilot.app.screen.query_one(PanelView)
    assert view.display and view.has_focus
    return view


async def test_tab_switches_views_and_keeps_the_circuit(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        table = app.screen.query_one(CircuitTable)
        table.select_index(index_of(app, "Dishwasher"))
        view = await panel(pilot)
        assert not table.display
        assert view.current_index == index_of(app, "Dishwasher")
        assert view.current.position.slot == 4
        await pilot.press("down")
        await pilot.press("tab")
        await settle(pilot)
        assert table.display and table.has_focus
        assert table.current_index == index_of(app, "Oven")  # slot 6, under slot 4


async def test_cursor_keys_home_end_and_vi_keys(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        view = await panel(pilot)
        assert view.current.position.slot == 1
        await pilot.press("j", "j")
        assert view.current.position.slot == 5
        await pilot.press("right")
        assert view.current.position.slot == 6
        await pilot.press("k")
        assert view.current.position.slot == 4
        await pilot.press("G")
        assert view.current.kind == "new"  # the unplaced circuit, last
        await pilot.press("g")
        assert view.current.position.slot == 2
        await pilot.press("end")
        await pilot.press("home")
        assert view.current.position.slot == 2
        await pilot.press("pagedown")
        assert view.current.position.slot > 2
        await pilot.press("pageup")
        assert view.current.position.slot == 2


async def test_every_pole_shows_its_breaker_and_the_status_line_names_it(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        view = await panel(pilot)
        view.select_slot(10)  # third pole of the 3-pole oven in slot 6
        await pilot.press("k", "j")
        await pilot.pause()
        cell = view.current
        assert cell.position.slot == 10
        assert cell.circuit == index_of(app, "Oven")
        assert cell.position.pole == 3
        assert status(app).startswith('slot 6 "Oven" · 3-pole on slots 6, 8, 10 (ABC)')
        assert "20 A breaker" in status(app)
        await pilot.press("j")
        await pilot.pause()
        assert view.current.circuit is None
        assert "is a space" in status(app)


async def test_move_picked_on_the_panel_checks_every_pole(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        view = await panel(pilot)
        cooler = index_of(app, "Walk-in cooler")  # 2-pole in slot 5 (5 and 7), locked
        view.select_index(cooler)
        await pilot.press("m")
        assert app.screen.picking is None, "a locked breaker is not picked up"
        assert "locked" in status(app)
        await pilot.press("l", "m")
        await pilot.pause()
        assert app.screen.picking == cooler
        await pilot.press("k")  # first pole to slot 3: takes 3 and 5; 3 is "Office PCs"
        await pilot.pause()
        assert 'slot 3 is taken by slot 3 "Office PCs"' in status(app)
        before = app.session.schedule
        await pilot.press("enter")
        await settle(pilot)
        assert app.session.schedule == before, "a refused move changes nothing"
        assert app.screen.picking == cooler
        await pilot.press("x", "a")  # other keys do nothing while a breaker is held
        await settle(pilot)
        assert app.session.schedule == before and isinstance(app.screen, MainScreen)
        await pilot.press("j", "j", "j", "j", "enter")  # 3 -> 11: takes 11 and 13, both spaces
        await settle(pilot)
        moved = app.session.schedule.circuits[cooler]
        assert moved.slot == 11
        assert moved.phases == (2, 0)  # rows 6 and 7: phases C and A [common practice]
        assert app.screen.picking is None
        assert 'Moved slot 5 "Walk-in cooler" to slots 11 and 13' in status(app)
        await pilot.press("u")
        await settle(pilot)
        assert app.session.schedule.circuits[cooler].slot == 5


async def test_escape_puts_the_breaker_back(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        view = await panel(pilot)
        view.select_index(index_of(app, "Signage"))
        await pilot.press("m", "down", "escape")
        await settle(pilot)
        assert app.screen.picking is None
        assert not app.session.dirty
        assert 'slot 9 "Signage" stays where it was' in status(app)


async def test_new_circuit_is_placed_from_the_panel_view(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        view = await panel(pilot)
        espresso = index_of(app, "Future espresso")
        view.select_index(espresso)
        await pilot.press("m")
        await pilot.pause()
        assert view.pick_target() is None
        assert "choose a position" in status(app)
        view.select_slot(12)
        await pilot.press("up", "down", "enter")
        await settle(pilot)
        assert app.session.schedule.circuits[espresso].slot == 12


async def test_enter_on_a_space_adds_a_circuit_there(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        view = await panel(pilot)
        view.select_slot(14)
        await pilot.press("enter")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FormScreen)
        assert form.values()["slot"] == "14"
        await pilot.press(*"Bench grinder", "down", "down", "down", *"600", "enter")
        await settle(pilot)
        added = app.session.schedule.circuits[-1]
        assert (added.name, added.slot, added.load_value) == ("Bench grinder", 14, 600)


async def test_rail_board_groups_by_phase_and_moves_to_a_phase() -> None:
    app = TriApp(DEMOS / "studio_400_rail.toml", journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        view = await panel(pilot)
        s = app.session.schedule
        kettle = next(i for i, c in enumerate(s.circuits) if c.name.startswith("Kitchenette"))
        assert s.circuits[kettle].phases == (2,)
        assert view.select_index(kettle)
        await pilot.press("m", "g")  # the L1 group heads the view
        await pilot.pause()
        assert view.pick_target() == (0,)
        assert "to L1" in status(app)
        await pilot.press("enter")
        await settle(pilot)
        assert app.session.schedule.circuits[kettle].phases == (0,)
        heat_pump = next(i for i, c in enumerate(s.circuits) if c.poles == 3)
        view.select_index(heat_pump)
        await pilot.press("m")
        assert app.screen.picking is None
        assert "takes every phase" in status(app)


async def test_panel_view_is_remembered(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await panel(pilot)
    again = TriApp(small, journal=False)
    async with again.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert again.screen.query_one(PanelView).display
