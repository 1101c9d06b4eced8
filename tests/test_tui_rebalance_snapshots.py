"""SVG snapshots of the rebalance screen: before a run, the work order, and the unproven states.

A fixed terminal size (80×24, the smallest supported; what a wider one adds is in
test_tui_wide.py), a fixed
theme, the state folder in a temporary directory, the small schedule of
tests/data/tui (settled exactly by the rebalancer, so the plan does not
depend on timing), no clock and no blinking cursor. The best-found state
is a hand-made suggestion (a proof that does not close cannot be produced
on a panel this small). Regenerate with
``pytest tests/test_tui_rebalance_snapshots.py --snapshot-update`` and look
at the pictures before committing them.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest
from test_tui_rebalance import _swap_suggestion, search_done
from tui_support import settle

from tri.tui.app import TriApp
from tri.tui.messages import RebalanceDone

DATA = Path(__file__).parent / "data" / "tui"
SIZES = [(80, 24)]


def make_app() -> TriApp:
    return TriApp(DATA / "small.toml", journal=False, theme="textual-dark")


def _run_with(target: str):
    async def before(pilot) -> None:
        await settle(pilot)
        await pilot.press("b")
        pilot.app.screen.query_one("#rb-target").value = target
        await pilot.press("enter")
        await search_done(pilot)

    return before


@pytest.mark.parametrize("size", SIZES, ids=lambda s: f"{s[0]}x{s[1]}")
def test_before_a_run(snap_compare, size: tuple[int, int]) -> None:
    async def before(pilot) -> None:
        await settle(pilot)
        await pilot.press("b")
        await settle(pilot)

    assert snap_compare(make_app(), terminal_size=size, run_before=before)


@pytest.mark.parametrize("size", SIZES, ids=lambda s: f"{s[0]}x{s[1]}")
def test_work_order(snap_compare, size: tuple[int, int]) -> None:
    # target 3 %: two relocations and the new circuit placed, proven optimal
    assert snap_compare(make_app(), terminal_size=size, run_before=_run_with("3"))


@pytest.mark.parametrize("size", SIZES[:1], ids=lambda s: f"{s[0]}x{s[1]}")
def test_target_out_of_reach(snap_compare, size: tuple[int, int]) -> None:
    assert snap_compare(make_app(), terminal_size=size, run_before=_run_with("0.5"))


@pytest.mark.parametrize("size", SIZES[:1], ids=lambda s: f"{s[0]}x{s[1]}")
def test_best_found_with_its_bound(snap_compare, size: tuple[int, int]) -> None:
    async def before(pilot) -> None:
        await settle(pilot)
        await pilot.press("b")
        await settle(pilot)
        sched = pilot.app.session.schedule
        s = replace(_swap_suggestion(sched), status="best-found", bound=1.0)
        pilot.app.screen.post_message(RebalanceDone((sched, s), None))
        await settle(pilot)

    assert snap_compare(make_app(), terminal_size=size, run_before=before)
