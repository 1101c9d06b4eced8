"""Helpers shared by the UI pilot tests."""

from __future__ import annotations

from typing import Any


def burst(app: Any, keys: list[str]) -> None:
    """Post keys at once, as a laggy SSH link delivers them (no waiting between keys)."""
    from textual import events

    for key in keys:
        app.post_message(events.Key(key, key if len(key) == 1 else None))


async def settle(pilot: Any) -> None:
    """Let key handlers run, wait for the workers (engine, rebalancer), then their messages."""
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


def keys(*pressed: str, select: str | None = None) -> Any:
    """A snapshot's ``run_before``: settle, put the list cursor on ``select``, press ``pressed``."""

    async def before(pilot: Any) -> None:
        await settle(pilot)
        if select is not None:
            from tri.tui.widgets.circuit_table import CircuitTable

            app = pilot.app
            index = next(i for i, c in enumerate(app.session.schedule.circuits) if c.name == select)
            app.screen.query_one(CircuitTable).select_index(index)
            await pilot.pause()
        for key in pressed:
            await pilot.press(key)
            await settle(pilot)

    return before
