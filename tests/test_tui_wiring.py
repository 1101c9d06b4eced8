"""Pilot tests of panels as they are wired in the UI (issue 12), pressing real keys at 80×24.

The demo woodshop (a 240/120 V high-leg delta, high leg B) has a 2-pole
breaker with a neutral and one load per leg, an unbalanced delta heater, a
spare and two 1-pole breakers on one shared neutral. The forms must show and
edit every wiring key with the loader's own rules, keep the file byte for
byte where nothing was edited, refuse a 120 V circuit on the high leg with
the loader's words, and place phases as the panel is built (a right column
reading C-B-A). Slot facts are the two-column geometry of the schedule
format [common practice]: slot n is in row (n + 1) // 2, and the rows read
A, B, C from the top (the right column C, B, A with right_column = "CBA").
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from tui_support import settle

from tri.schedule.load import load_schedule
from tri.tui.app import TriApp
from tri.tui.panel_layout import position_phase, two_column_rows
from tri.tui.screens.form import FormScreen
from tri.tui.widgets.circuit_table import CircuitTable
from tri.tui.widgets.panel_view import PanelView

WOODSHOP = Path(__file__).parents[1] / "tri" / "panels_demo" / "woodshop_240d.toml"
CBA = """\
format = 1

[panel]
name = "Right column C-B-A"
system = "208Y/120"
spaces = 12
bus_a = 100
right_column = "CBA"

[[circuit]]
slot = 1
name = "Left top"
load_va = 500

[[circuit]]
slot = 2
name = "Right top"
load_va = 700

[[circuit]]
slot = 4
poles = 2
name = "Right 2-pole"
load_va = 2000
"""


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    target = tmp_path / WOODSHOP.name
    shutil.copy(WOODSHOP, target)
    return target


def index_of(app: TriApp, name: str) -> int:
    return next(i for i, c in enumerate(app.session.schedule.circuits) if c.name == name)


async def open_on(pilot, name: str, key: str = "e") -> FormScreen:
    await settle(pilot)
    pilot.app.screen.query_one(CircuitTable).select_index(index_of(pilot.app, name))
    await pilot.press(key)
    await pilot.pause()
    assert isinstance(pilot.app.screen, FormScreen)
    return pilot.app.screen


async def type_in(pilot, form: FormScreen, key: str, *keys: str) -> None:
    """Focus field ``key`` and press ``keys`` there (ctrl+u clears a text field)."""
    form.query_one(f"#field-{key}").focus()
    await pilot.pause()
    await pilot.press(*keys)
    await pilot.pause()


def status(app) -> str:
    return str(app.screen.query_one("#status").render())


async def test_the_form_shows_every_wiring_key(shop: Path) -> None:
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Bench receptacles, chargers and hand tools")
        values = form.values()
        assert values["load"] == "1440/1080" and values["neutral"] is True
        await pilot.press("escape")
        form = await open_on(pilot, "Shop lights south")
        assert form.values()["shared_neutral"] == "N23" and form.values()["handle_tied"] is False
        await pilot.press("escape")
        form = await open_on(pilot, "Spare")
        assert form.values()["spare"] is True and form.values()["load"] == ""
        await pilot.press("escape")
        await pilot.press("p")
        await pilot.pause()
        panel = app.screen.values()
        assert panel["fed_from"].startswith("Utility meter") and panel["high_leg"] == ""
        assert panel["right_column"] == "ABC"


async def test_an_edit_keeps_the_wiring_byte_for_byte(shop: Path) -> None:
    before = shop.read_text().splitlines()
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Bench receptacles, chargers and hand tools")
        await type_in(pilot, form, "name", "ctrl+u", *"Bench receptacles")
        assert form.problems == {}
        await pilot.press("enter", "ctrl+s")
        await settle(pilot)
        c = app.session.schedule.circuits[index_of(app, "Bench receptacles")]
        assert (c.neutral, c.leg_values) == (True, (1440.0, 1080.0))
    after = shop.read_text().splitlines()
    changed = [(a, b) for a, b in zip(before, after, strict=True) if a != b]
    assert changed == [
        ('name = "Bench receptacles, chargers and hand tools"', 'name = "Bench receptacles"')
    ]
    assert "load_va = [1440, 1080]          # one load per leg, in pole order" in after


async def test_editing_legs_and_tying_handles(shop: Path) -> None:
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        form = await open_on(pilot, "Bench receptacles, chargers and hand tools")
        await type_in(pilot, form, "load", "ctrl+u", *"1440/1440")
        assert form.problems == {}
        await pilot.press("enter")
        await settle(pilot)
        for name in ("Shop lights south", "Shop lights north"):
            form = await open_on(pilot, name)
            await type_in(pilot, form, "handle_tied", "space")
            assert form.values()["handle_tied"] is True and form.problems == {}
            await pilot.press("ctrl+s")
            await settle(pilot)
        await pilot.press("ctrl+s")
        await settle(pilot)
    saved = load_schedule(shop).schedule
    bench = next(c for c in saved.circuits if c.name.startswith("Bench"))
    assert bench.leg_values == (1440.0, 1440.0)
    assert all(c.handle_tied for c in saved.circuits if c.shared_neutral == "N23")


async def test_the_loaders_wiring_rules_refuse_as_you_type(shop: Path) -> None:
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        # A neutral on a 1-pole breaker: it already has one.
        form = await open_on(pilot, "Exterior sign")
        await type_in(pilot, form, "neutral", "space")
        assert "neutral" in form.problems
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is form, "a refused Enter keeps the form open"
        await type_in(pilot, form, "neutral", "space")
        # A load with a spare: a spare has nothing connected (the load is then not used).
        await type_in(pilot, form, "spare", "space")
        assert form.problems == {}
        await pilot.press("enter")
        await settle(pilot)
        sign = app.session.schedule.circuits[index_of(app, "Exterior sign")]
        assert sign.spare and sign.load_value == 0
        # Three legs on a 2-pole breaker: the loader counts them against the poles.
        form = await open_on(pilot, "Bench receptacles, chargers and hand tools")
        await type_in(pilot, form, "load", "ctrl+u", *"1440/1080/500")
        assert form.problems
        assert form.result is None


async def test_a_120_v_circuit_is_refused_on_the_high_leg(shop: Path) -> None:
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        # Slot 4 is in row 2, phase B: the high leg of this panel.
        assert position_phase(app.session.schedule, 4) == 1
        form = await open_on(pilot, "Office lights and receptacles", "m")
        await type_in(pilot, form, "slot", "ctrl+u", "4")
        words = form.problems["slot"]
        assert "high leg B" in words and "208 V to neutral" in words
        await pilot.press("escape")
        # The add form starts off the high leg: the first free slot on A or C.
        await pilot.press("a")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FormScreen)
        slot = int(form.values()["slot"])
        assert position_phase(app.session.schedule, slot) != 1


async def test_the_list_and_the_status_line_say_how_it_is_wired(shop: Path) -> None:
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        table = app.screen.query_one(CircuitTable)
        assert "wiring" in [c.key for c in table.columns_shown]
        cells = {row[1].strip(): row for row in table._rows}
        wiring = [c.key for c in table.columns_shown].index("wiring")

        def cell(name_start: str) -> str:
            return next(r for n, r in cells.items() if n.startswith(name_start))[wiring].strip()

        assert cell("Bench") == "+N legs"
        assert cell("Drying") == "Δ legs"
        assert cell("Spare") == "spare"
        assert cell("Shop lights s") == "N:N23"
        table.select_index(index_of(app, "Bench receptacles, chargers and hand tools"))
        await pilot.press("down", "up")
        words = status(app)
        assert "one load per leg to neutral: C 1440 VA, A 1080 VA" in words
        table.select_index(index_of(app, "Shop lights south"))
        await pilot.press("down", "up")
        assert "shares neutral N23 with slot 25 (NOT handle-tied)" in status(app)


async def test_the_panel_view_marks_the_high_leg_and_the_neutral_groups(shop: Path) -> None:
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("tab")
        await settle(pilot)
        view = app.screen.query_one(PanelView)
        frame = view.frame()
        lines = [str(frame.line_text(r)) for r in range(len(frame.lines))]
        assert "▲B│B▲" in lines[1], "row 2 is on B, the high leg"
        assert "A│A" in lines[0] and "▲" not in lines[0]
        assert "╓Shop lights south" in lines[11] and "╙Shop lights north" in lines[12]
        assert "╓Bench" in lines[2] and "╙Bench" in lines[3]


async def test_a_right_column_read_c_b_a(tmp_path: Path) -> None:
    path = tmp_path / "cba.toml"
    path.write_text(CBA)
    app = TriApp(path, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        s = app.session.schedule
        rows = two_column_rows(s)
        # Left column A, B, C from the top; right column C, B, A [common practice for CBA].
        assert [(left.phase, right.phase) for left, right in rows[:3]] == [(0, 2), (1, 1), (2, 0)]
        c = s.circuits[index_of(app, "Right 2-pole")]
        assert c.phases == (1, 0)  # slots 4 and 6: B and A
        await pilot.press("tab")
        await settle(pilot)
        frame = app.screen.query_one(PanelView).frame()
        assert "A│C" in str(frame.line_text(0))
        # Moving "Left top" to slot 8 (row 4, right) puts it on C, as built, and says so.
        form = await open_on_list(pilot, "Left top")
        await type_in(pilot, form, "slot", "ctrl+u", "8")
        assert "slot 8 (C)" in str(form.query_one("#form-message").render())


async def open_on_list(pilot, name: str) -> FormScreen:
    """The move dialog of ``name`` from the list."""
    await pilot.press("tab")
    await settle(pilot)
    return await open_on(pilot, name, "m")


async def test_the_panel_form_edits_the_wiring_keys(shop: Path) -> None:
    app = TriApp(shop, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("p")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FormScreen)
        await type_in(pilot, form, "high_leg", *"A")
        assert "high_leg" in form.problems  # A is not a high leg: B or C
        await type_in(pilot, form, "high_leg", "ctrl+u")
        await type_in(pilot, form, "max_row_shift", *"3")
        await type_in(pilot, form, "fed_from", "ctrl+u", *"MDP-2, circuit 7")
        assert form.problems == {}
        await pilot.press("enter", "ctrl+s")
        await settle(pilot)
    saved = load_schedule(shop).schedule.panel
    assert (saved.max_row_shift, saved.fed_from, saved.high_leg) == (3, "MDP-2, circuit 7", 1)
    assert 'high_leg = "B"' in shop.read_text(), "the key the form did not change stays"
