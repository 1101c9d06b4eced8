"""SVG snapshots of a panel as it is wired (issue 12), at 80×24 (what a wider terminal adds:
test_tui_wide.py).

The demo woodshop (240/120 V high-leg delta): the list with its Wiring
column and a breaker with legs described on the status line; the panel view
scrolled to the shared-neutral pair; the circuit form of a breaker with a
neutral and a load per leg; the panel form's wiring keys; the move dialog
refusing slot 4 on the high leg; and a panel whose right column reads C-B-A.
Regenerate with ``pytest tests/test_tui_snapshot_wiring.py --snapshot-update``
and look at the pictures before committing them.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from tui_support import keys

from tri.tui.app import TriApp

WOODSHOP = Path(__file__).parents[1] / "tri" / "panels_demo" / "woodshop_240d.toml"
sizes = pytest.mark.parametrize("size", [(80, 24)], ids=["80x24"])


def shop() -> TriApp:
    return TriApp(WOODSHOP, journal=False, theme="textual-dark")


BENCH = "Bench receptacles, chargers and hand tools"


@sizes
def test_wired_list(snap_compare, size) -> None:
    assert snap_compare(shop(), terminal_size=size, run_before=keys("down", "up", select=BENCH))


@sizes
def test_wired_panel_view_at_the_shared_neutral(snap_compare, size) -> None:
    before = keys("tab", "end", select="Shop lights south")
    assert snap_compare(shop(), terminal_size=size, run_before=before)


@sizes
def test_wired_circuit_form(snap_compare, size) -> None:
    assert snap_compare(shop(), terminal_size=size, run_before=keys("e", select=BENCH))


@sizes
def test_wired_panel_form(snap_compare, size) -> None:
    assert snap_compare(shop(), terminal_size=size, run_before=keys("p"))


@sizes
def test_move_refused_on_the_high_leg(snap_compare, size) -> None:
    before = keys("m", "ctrl+u", "4", select="Office lights and receptacles")
    assert snap_compare(shop(), terminal_size=size, run_before=before)


@sizes
def test_right_column_c_b_a(snap_compare, size, tmp_path) -> None:
    from test_tui_wiring import CBA

    path = tmp_path / "cba.toml"
    path.write_text(CBA)
    app = TriApp(path, journal=False, theme="textual-dark")
    assert snap_compare(app, terminal_size=size, run_before=keys("tab"))
