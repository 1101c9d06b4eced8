"""What a wide terminal adds (120×40), without pictures: snapshots are taken at 80×24 only.

From 110 columns the circuit list shows poles, both flags in words and the
note (:func:`tri.tui.widgets.circuit_table.columns_for`), and the panel view
each breaker's amperes and "pole 2 of 3" (:class:`tri.tui.widgets.panel_rows.Frame`).
The title bar and the log chart draw at the width they are given; the
phasor and rebalance screens open at it. The widths are [computed] from the
layout rules in those modules (column widths plus one cell between columns,
a border cell and the scroll bar).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Static
from tui_support import settle

from tri.schedule.load import load_schedule
from tri.tui.app import TriApp
from tri.tui.screens.log_keys import LogChart
from tri.tui.screens.log_view import LogScreen
from tri.tui.screens.phasor import PhasorScreen
from tri.tui.screens.rebalance import RebalanceScreen
from tri.tui.widgets.circuit_table import SCROLLBAR, WIDE_AT, CircuitTable, columns_for
from tri.tui.widgets.panel_rows import Frame, build_lines
from tri.tui.widgets.panel_view import PanelView

DATA = Path(__file__).parent / "data" / "tui"
DEMOS = Path(__file__).parents[1] / "tri" / "panels_demo"
WIDE = (120, 40)


def _keys(width: int, wiring: bool = False) -> list[str]:
    return [c.key for c in columns_for(width, True, False, 10, wiring=wiring)]


@pytest.mark.parametrize("wiring", [False, True])
def test_the_circuit_list_widens_at_110_columns(wiring: bool) -> None:
    narrow, wide = _keys(WIDE_AT - 1, wiring), _keys(WIDE_AT, wiring)
    assert {"poles", "cont", "lock", "note"} <= set(wide) and "flags" not in wide
    assert "flags" in narrow and not {"poles", "cont", "lock", "note"} & set(narrow)
    cols = {c.key: c for c in columns_for(120, True, False, 10, longest_name=20, wiring=wiring)}
    if wiring:
        assert cols["wiring"].width == 14  # 7 when narrow
        assert {c.key: c for c in columns_for(80, True, False, 10, wiring=True)}[
            "wiring"
        ].width == 7
    # the name gets what the longest needs, the note the rest (more than its least 8),
    # and the columns fit: widths, a cell after each, the first column's extra cell,
    # the scroll bar
    assert cols["name"].width == 20
    assert cols["note"].width > 8
    assert sum(c.width + 1 for c in cols.values()) + 1 + SCROLLBAR <= 120


def _frame(width: int) -> Frame:
    schedule = load_schedule(DATA / "small.toml").schedule
    return Frame(schedule, None, build_lines(schedule), width, {})


def test_the_panel_view_shows_amperes_and_which_pole_when_wide() -> None:
    wide, narrow = _frame(120), _frame(80)
    assert wide.wide and not narrow.wide
    assert "Brkr  Amps" in wide.header().plain and "Amps" not in narrow.header().plain
    # two halves of (120 - 5) // 2 = 57 cells and the 5 of the bus [computed]
    assert len(wide.header().plain) == 119
    second = [wide.line_text(r).plain for r in range(len(wide.lines))]
    second_narrow = [narrow.line_text(r).plain for r in range(len(narrow.lines))]
    # the walk-in cooler is a 2-pole breaker (slots 5 and 7) [tests/data/tui/small.toml]
    assert any("pole 2 of 2" in line for line in second)
    assert not any("pole 2 of 2" in line for line in second_narrow)
    assert any("pole 2" in line for line in second_narrow)


async def test_the_full_screen_views_draw_at_the_width_of_a_wide_terminal() -> None:
    app = TriApp(DATA / "small.toml", journal=False, theme="textual-dark")
    async with app.run_test(size=WIDE) as pilot:
        await settle(pilot)
        table = app.screen.query_one(CircuitTable)
        assert {"poles", "cont", "lock", "note"} <= {c.key for c in table.columns_shown}
        assert len(str(app.screen.query_one("#title-bar", Static).render())) == 120
        await pilot.press("tab")
        await settle(pilot)
        frame = app.screen.query_one(PanelView).frame()
        assert frame.wide and frame.width >= WIDE_AT - 2
        await pilot.press("v")
        await settle(pilot)
        assert isinstance(app.screen, PhasorScreen) and app.screen.size.width == 120
        await pilot.press("escape", "b")
        await settle(pilot)
        assert isinstance(app.screen, RebalanceScreen) and app.screen.size.width == 120


async def test_the_log_chart_takes_the_width_of_a_wide_terminal() -> None:
    app = TriApp(DEMOS / "garage_logged_208.toml", journal=False, theme="textual-dark")
    async with app.run_test(size=WIDE) as pilot:
        await settle(pilot)
        await pilot.press("d")
        await settle(pilot)
        assert isinstance(app.screen, LogScreen)
        chart = app.screen.query_one(LogChart)
        lines = chart.render().plain.split("\n")
        assert chart.content_size.width > 100
        assert max(len(line) for line in lines) == chart.content_size.width
