"""SVG snapshots of every screen and dialog of the terminal UI, at 80×24.

What a wider terminal adds is checked in test_tui_wide.py.

The panel view of each demo; the circuit, move, panel, supply, readings and
save-as forms (valid and refusing); taking a breaker off; a move picked on
the panel view; the recovery prompt; the findings page's three views; the
phasor views; help; the start screen; the quit question; the form focus in
the three themes (16 colours included).

No clock and no machine-dependent path reaches a picture: files are named by
their name only, the journal's time stamp is fixed, the state folder is the
test's own, the theme is fixed and the cursor does not blink. Regenerate
with ``pytest tests/test_tui_snapshot_screens.py --snapshot-update`` and look
at the pictures before committing them.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from tui_support import keys, settle

from tri.schedule.journal import file_digest, journal_path, write_journal
from tri.schedule.load import load_schedule
from tri.tui.app import TriApp

DATA = Path(__file__).parent / "data" / "tui"
DEMOS = Path(__file__).parents[1] / "tri" / "panels_demo"
SIZES = [(80, 24)]
SIZE_IDS = ["80x24"]


def small_app(theme: str = "textual-dark", journal: bool = False) -> TriApp:
    return TriApp(DATA / "small.toml", journal=journal, theme=theme)


sizes = pytest.mark.parametrize("size", SIZES, ids=SIZE_IDS)


# ---------------------------------------------------------------- the panel view


@sizes
@pytest.mark.parametrize("demo", sorted(DEMOS.glob("*.toml")), ids=lambda p: p.stem)
def test_panel_view_of_each_demo(snap_compare, size, demo: Path) -> None:
    app = TriApp(demo, journal=False, theme="textual-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys("tab"))


@sizes
def test_panel_view_move_refused(snap_compare, size) -> None:
    # The walk-in cooler (2-pole, slots 5 and 7) picked up and held over slot 3:
    # it would take 3 and 5, and 3 is taken.
    before = keys("l", "tab", "m", "k", select="Walk-in cooler")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_panel_view_move_free(snap_compare, size) -> None:
    before = keys("tab", "m", "j", "j", select="Signage")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


def test_panel_view_in_16_colours(snap_compare) -> None:
    app = TriApp(DEMOS / "garage_ev_208.toml", journal=False, theme="ansi-dark")
    assert snap_compare(app, terminal_size=(80, 24), run_before=keys("tab", "j", "j"))


@sizes
def test_list_with_a_selected_circuit_in_full(snap_compare, size) -> None:
    app = TriApp(DEMOS / "machine_shop_480.toml", journal=False, theme="textual-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys("down"))


# ---------------------------------------------------------------- forms


@sizes
def test_circuit_form(snap_compare, size) -> None:
    assert snap_compare(small_app(), terminal_size=size, run_before=keys("e", select="Dishwasher"))


@sizes
def test_circuit_form_refusing(snap_compare, size) -> None:
    # Office PCs (slot 3) made 2-pole: it would take 3 and 5, and 5 is taken.
    before = keys("e", "down", "down", "right", select="Office PCs")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_circuit_form_after_a_refused_enter(snap_compare, size) -> None:
    before = keys("e", "down", "down", "down", "x", "up", "up", "enter", select="Dishwasher")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_move_dialog(snap_compare, size) -> None:
    assert snap_compare(small_app(), terminal_size=size, run_before=keys("m", select="Signage"))


@sizes
def test_move_dialog_refusing(snap_compare, size) -> None:
    before = keys("m", "backspace", "2", select="Signage")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_take_off_question(snap_compare, size) -> None:
    assert snap_compare(small_app(), terminal_size=size, run_before=keys("o", select="Signage"))


@sizes
def test_panel_form_refusing(snap_compare, size) -> None:
    before = keys("p", "down", "down", "down", *["backspace"] * 2, "8")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_supply_form(snap_compare, size) -> None:
    before = keys("s", "7", "5")  # kVA without impedance: refused
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_readings_form(snap_compare, size) -> None:
    before = keys("i", "5", "2", "x")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_save_as_form(snap_compare, size) -> None:
    # An unsaved copy (as a demo opens): the name offered has no folder in it.
    async def before(pilot) -> None:
        await settle(pilot)
        pilot.app.open_copy(load_schedule(DATA / "small.toml"), "small")
        await settle(pilot)
        await pilot.press("w")
        await settle(pilot)

    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@pytest.mark.parametrize("theme", ["textual-dark", "textual-light", "ansi-dark", "ansi-light"])
def test_form_focus_in_every_theme(snap_compare, theme: str) -> None:
    before = keys("e", "down", "down", "down", select="Dishwasher")
    assert snap_compare(small_app(theme), terminal_size=(80, 24), run_before=before)


# ---------------------------------------------------------------- other screens


@sizes
@pytest.mark.parametrize("view", [0, 1, 2], ids=["findings", "checks", "report"])
def test_findings_page(snap_compare, size, view: int) -> None:
    app = TriApp(DEMOS / "garage_ev_208.toml", journal=False, theme="textual-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys("f", *["tab"] * view))


@sizes
def test_phasor_sequence_view(snap_compare, size) -> None:
    app = TriApp(DEMOS / "garage_ev_208.toml", journal=False, theme="textual-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys("v", "tab"))


@sizes
def test_phasor_voltages_in_16_colours(snap_compare, size) -> None:
    app = TriApp(DEMOS / "machine_shop_480.toml", journal=False, theme="ansi-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys("v", "tab", "tab"))


@sizes
def test_help(snap_compare, size) -> None:
    assert snap_compare(small_app(), terminal_size=size, run_before=keys("question_mark"))


@sizes
def test_start_screen(snap_compare, size) -> None:
    assert snap_compare(TriApp(None, journal=False, theme="textual-dark"), terminal_size=size)


@sizes
def test_quit_question(snap_compare, size) -> None:
    before = keys("l", "ctrl+q", select="Signage")
    assert snap_compare(small_app(), terminal_size=size, run_before=before)


@sizes
def test_recovery_question(snap_compare, size, small: Path) -> None:
    s = load_schedule(small).schedule
    edited = s.with_circuit(0, s.circuits[0].at_slot(11))
    target = journal_path(small, s.panel.name)
    write_journal(target, edited, small, file_digest(small), 2)
    data = json.loads(target.read_text(encoding="utf-8"))
    data["written_utc"] = "2025-01-06T07:30:00+00:00"  # a fixed time: no clock in the picture
    target.write_text(json.dumps(data), encoding="utf-8")
    app = TriApp(small, journal=True, theme="textual-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys())
