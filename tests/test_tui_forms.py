"""Pilot tests of every form's rules, pressing real keys at 80×24.

Each form must refuse what the schedule loader refuses, with the reason under
the form, the circuit named by slot and name, and keep what was typed. Slot
facts are the two-column geometry of the schedule format [common practice];
the other limits (0 < pf <= 1, positive ratings, a 3-wire system has no
neutral) are the loader's rules, quoted in its messages.
"""

from __future__ import annotations

from pathlib import Path

from textual.widgets import Label
from tui_support import settle

from tri.schedule.load import load_schedule
from tri.tui.app import TriApp
from tri.tui.screens.choice import ChoiceScreen
from tri.tui.screens.form import FormScreen
from tri.tui.screens.main import MainScreen
from tri.tui.widgets.circuit_table import CircuitTable

TWO_POLE_AT_1 = """\
format = 1

[panel]
name = "Two-pole test"
system = "208Y/120"
spaces = 12
bus_a = 100

[[circuit]]
slot = 1
poles = 2
name = "Heater"
load_va = 2000

[[circuit]]
slot = 5
name = "Lights"
load_va = 500
"""


def index_of(app: TriApp, name: str) -> int:
    return next(i for i, c in enumerate(app.session.schedule.circuits) if c.name == name)


async def open_on(pilot, name: str, key: str) -> FormScreen:
    await settle(pilot)
    pilot.app.screen.query_one(CircuitTable).select_index(index_of(pilot.app, name))
    await pilot.press(key)
    await pilot.pause()
    form = pilot.app.screen
    assert isinstance(form, FormScreen)
    return form


async def open_form(pilot, key: str) -> FormScreen:
    """Press ``key`` in the main view and return the form it opens."""
    await settle(pilot)
    await pilot.press(key)
    await pilot.pause()
    form = pilot.app.screen
    assert isinstance(form, FormScreen)
    return form


async def set_field(pilot, form: FormScreen, key: str, text: str) -> None:
    form.query_one(f"#field-{key}").value = text
    await pilot.pause()


# ---------------------------------------------------------------- move dialog


async def test_move_dialog_starts_at_the_present_position(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Signage", "m")
        assert form.values()["slot"] == "9"
        assert "It is there now" in str(form.query_one("#form-message").render())
        await pilot.press("enter")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen) and not app.session.dirty
        assert "stays where it is" in str(app.screen.query_one("#status").render())


async def test_blank_move_is_refused_not_a_take_off(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Signage", "m")
        await pilot.press("backspace", "enter")
        await pilot.pause()
        assert app.screen is form, "a blank position is refused"
        assert "o in the main view takes it off" in form.problems["slot"]
        await pilot.press("escape")
        await settle(pilot)
        assert app.session.schedule.circuits[index_of(app, "Signage")].slot == 9


async def test_move_dialog_checks_the_second_pole(tmp_path: Path) -> None:
    path = tmp_path / "two_pole.toml"
    path.write_text(TWO_POLE_AT_1, encoding="utf-8")
    app = TriApp(path, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Heater", "m")
        await pilot.press("backspace", "3")
        await pilot.pause()
        assert form.problems["slot"] == (
            'a 2-pole breaker at slot 3 takes slots 3 and 5; slot 5 is taken by slot 5 "Lights"'
        )
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is form
        await pilot.press("backspace", "7", "enter")
        await settle(pilot)
        assert app.session.schedule.circuits[0].slot == 7
        assert app.session.schedule.circuits[0].phases == (0, 1)  # rows 4, 5: A, B


async def test_move_past_the_last_space_is_refused(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Oven", "m")
        await pilot.press("backspace", "2", "1")
        await pilot.pause()
        assert form.problems["slot"].endswith("the panel ends at slot 24")
        await set_field(pilot, form, "slot", "abc")
        assert "expected a whole slot number" in form.problems["slot"]


async def test_take_off_is_its_own_action_and_asks(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        app.screen.query_one(CircuitTable).select_index(index_of(app, "Signage"))
        await pilot.press("o")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("enter")  # a stray Enter takes nothing off
        await pilot.pause()
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("escape")
        await settle(pilot)
        assert not app.session.dirty
        await pilot.press("o", "y")
        await settle(pilot)
        c = app.session.schedule.circuits[index_of(app, "Signage")]
        assert c.slot is None and c.phases is None
        status = str(app.screen.query_one("#status").render())
        assert 'Took slot 9 "Signage" off the panel' in status


# ---------------------------------------------------------------- circuit form


async def test_circuit_form_checks_every_pole_when_poles_change(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Office PCs", "e")  # slot 3
        await pilot.press("down", "down", "right")  # poles 1 -> 2: takes 3 and 5
        await pilot.pause()
        assert form.values()["poles"] == "2"
        assert form.problems["slot"] == (
            "a 2-pole breaker at slot 3 takes slots 3 and 5; "
            'slot 5 is taken by slot 5 "Walk-in cooler"'
        )
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is form


async def test_circuit_form_edits_a_breakers_legs(tmp_path: Path) -> None:
    """The demo heater's three 240 V elements (3000, 3000, 1500 VA) show leg by leg; the form
    edits them, and the loader's own rules judge their count against the poles."""
    demo = Path(__file__).resolve().parents[1] / "tri" / "panels_demo" / "woodshop_240d.toml"
    target = tmp_path / "w.toml"
    target.write_text(demo.read_text())
    app = TriApp(target, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Drying room heater", "e")
        assert form.values()["load"] == "3000/3000/1500" and form.problems == {}
        await set_field(pilot, form, "load", "3000/3000")  # two legs on a 3-pole breaker
        assert "load" in form.problems or "" in form.problems
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is form, "a refused Enter keeps the form open"
        await set_field(pilot, form, "load", "3000/3000/3000")
        await set_field(pilot, form, "breaker_a", "30")
        assert form.problems == {}
        await pilot.press("ctrl+s")
        await settle(pilot)
        c = app.session.schedule.circuits[index_of(app, "Drying room heater")]
        assert (c.leg_values, c.load_value, c.breaker_a) == ((3000.0, 3000.0, 3000.0), 9000.0, 30)


async def test_circuit_form_refuses_bad_values_with_the_loaders_reasons(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Dishwasher", "e")
        await set_field(pilot, form, "pf", "1.2")
        assert "pf" in form.problems
        await set_field(pilot, form, "pf", "0.9")
        assert "pf" not in form.problems
        await set_field(pilot, form, "breaker_a", "-20")
        assert "breaker_a" in form.problems
        await set_field(pilot, form, "breaker_a", "20")
        await set_field(pilot, form, "load", "")
        assert "load" in form.problems
        await set_field(pilot, form, "load", "2.4k")
        await set_field(pilot, form, "name", "")
        assert "name" in form.problems
        await set_field(pilot, form, "name", "Dishwasher")
        await set_field(pilot, form, "slot", "30")
        assert "expected 1 to 24" in form.problems["slot"]
        await set_field(pilot, form, "slot", "4")
        assert form.problems == {}
        await pilot.press("ctrl+s")
        await settle(pilot)
        c = app.session.schedule.circuits[index_of(app, "Dishwasher")]
        assert (c.pf, c.breaker_a, c.load_value) == (0.9, 20, 2400)


async def test_three_wire_system_refuses_a_one_pole_circuit(tmp_path: Path) -> None:
    path = tmp_path / "delta.toml"
    path.write_text(
        'format = 1\n[panel]\nname = "Delta"\nsystem = "480D"\nspaces = 12\nbus_a = 100\n',
        encoding="utf-8",
    )
    app = TriApp(path, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_form(pilot, "a")
        assert isinstance(form, FormScreen)
        await set_field(pilot, form, "name", "Pump")
        await set_field(pilot, form, "load", "5000")
        assert "no neutral" in form.problems["poles"]
        await pilot.press("down", "down", "right")  # 2 poles
        await pilot.pause()
        assert "poles" not in form.problems


async def test_focus_is_marked_and_a_rejected_enter_says_where_the_cursor_went(
    small: Path,
) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Dishwasher", "e")
        assert str(form.query_one("#focus-name", Label).render()) == "▶"
        assert form.query_one("#row-name").has_class("-focused")
        await set_field(pilot, form, "load", "12x")
        await pilot.press("enter")
        await pilot.pause()
        assert form.query_one("#field-load").has_focus
        assert str(form.query_one("#focus-load", Label).render()) == "▶"
        assert str(form.query_one("#focus-name", Label).render()) == " "
        assert "The cursor is on Load now" in str(form.query_one("#form-message").render())


# ---------------------------------------------------------------- panel, supply, readings


async def test_panel_form_refuses_fewer_spaces_than_the_breakers_use(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_form(pilot, "p")
        await set_field(pilot, form, "spaces", "8")
        problem = form.problems["spaces"]
        assert problem.startswith('slot 6 "Oven": a 3-pole breaker in slot 6 needs slot 10')
        assert "circuit 6" not in problem
        await set_field(pilot, form, "spaces", "30")
        assert form.problems == {}


async def test_panel_form_keeps_the_wiring_keys_it_does_not_show(tmp_path: Path) -> None:
    """A panel edit keeps fed_from, right_column, max_row_shift and a high leg on C (a high
    leg silently back on B would put the orange bus on the wrong phase)."""
    target = tmp_path / "d.toml"
    target.write_text(
        'format = 1\n[panel]\nname = "Shop"\nsystem = "240/120D"\nspaces = 12\nbus_a = 100\n'
        'high_leg = "C"\nright_column = "CBA"\nmax_row_shift = 2\nfed_from = "MDP, 7"\n'
        '[[circuit]]\nslot = 1\nname = "Lights"\nload_va = 600\n'
    )
    app = TriApp(target, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_form(pilot, "p")
        await set_field(pilot, form, "bus_a", "125")
        assert form.problems == {}
        await pilot.press("ctrl+s")
        await settle(pilot)
        p = app.session.schedule.panel
        assert (p.bus_a, p.high_leg, p.effective_high_leg) == (125, 2, 2)
        assert (p.right_column, p.max_row_shift, p.fed_from) == ("CBA", 2, "MDP, 7")


async def test_panel_form_refuses_a_three_wire_system_under_one_pole_circuits(
    small: Path,
) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_form(pilot, "p")
        form.query_one("#field-system").index = [k for _, k in form.fields[1].choices].index("480D")
        await pilot.pause()
        assert "no neutral" in form.problems["system"]
        assert "other problem" in form.problems["system"]


async def test_supply_form_rules(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_form(pilot, "s")
        await set_field(pilot, form, "transformer_kva", "-75")
        assert "transformer_kva" in form.problems
        await set_field(pilot, form, "transformer_kva", "75")
        assert form.problems, "a transformer needs its impedance too"
        await set_field(pilot, form, "transformer_z_pct", "4.5")
        await set_field(pilot, form, "transformer_x_r", "2.5")
        assert form.problems == {}
        await pilot.press("enter")
        await settle(pilot)
        assert app.session.schedule.supply.transformer_kva == 75
        assert app.analysis.voltage is not None


async def test_readings_form_rules(small: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_form(pilot, "i")
        await set_field(pilot, form, "amps_0", "lots")
        assert "amps_0" in form.problems
        await set_field(pilot, form, "amps_0", "52.5")
        assert form.problems == {}
        await pilot.press("enter")
        await settle(pilot)
        assert app.session.schedule.readings.phase_amps[0] == 52.5


async def test_save_as_form_rules(small: Path, tmp_path: Path) -> None:
    app = TriApp(small, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_form(pilot, "w")
        await set_field(pilot, form, "path", str(tmp_path / "x.txt"))
        assert "ending in .toml" in form.problems["path"]
        await set_field(pilot, form, "path", str(tmp_path / "nowhere" / "x.toml"))
        assert "no folder" in form.problems["path"]
        await set_field(pilot, form, "path", str(tmp_path))
        assert form.problems
        await set_field(pilot, form, "path", str(tmp_path / "copy.toml"))
        assert form.problems == {}
        await pilot.press("enter")
        await settle(pilot)
    assert load_schedule(tmp_path / "copy.toml").schedule == app.session.schedule


async def test_open_path_form_rules(tmp_path: Path) -> None:
    from tri.tui.screens.picker import PickerScreen

    app = TriApp(None, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert isinstance(app.screen, PickerScreen)
        await pilot.press("o")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FormScreen)
        await set_field(pilot, form, "path", "")
        assert "type the path" in form.problems["path"]
        await set_field(pilot, form, "path", str(tmp_path))
        assert "folder" in form.problems["path"]
        await set_field(pilot, form, "path", str(tmp_path / "new.txt"))
        assert "must end in .toml" in form.problems["path"]
        await set_field(pilot, form, "path", str(tmp_path / "new.toml"))
        assert form.problems == {}
