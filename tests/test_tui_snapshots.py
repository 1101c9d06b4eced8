"""SVG snapshots of the main view and the phasor view (the rebalance screen's are in
test_tui_rebalance_snapshots.py).

A fixed terminal size (80×24, the smallest supported; what a wider one adds is in
test_tui_wide.py), a fixed
theme, the state folder in a temporary directory, a schedule file from
tests/data (only its name is shown), no clock and no blinking cursor.
Regenerate with ``pytest tests/test_tui_snapshots.py --snapshot-update`` and
look at the pictures before committing them.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from tui_support import settle

from tri.tui.app import TriApp

DATA = Path(__file__).parent / "data" / "tui"
SIZES = [(80, 24)]


def make_app() -> TriApp:
    return TriApp(DATA / "small.toml", journal=False, theme="textual-dark")


@pytest.mark.parametrize("size", SIZES, ids=lambda s: f"{s[0]}x{s[1]}")
def test_main_view(snap_compare, size: tuple[int, int]) -> None:
    assert snap_compare(make_app(), terminal_size=size, run_before=settle)


@pytest.mark.parametrize("size", SIZES, ids=lambda s: f"{s[0]}x{s[1]}")
def test_phasor_view(snap_compare, size: tuple[int, int]) -> None:
    async def before(pilot) -> None:
        await settle(pilot)
        await pilot.press("v")
        await settle(pilot)

    assert snap_compare(make_app(), terminal_size=size, run_before=before)
