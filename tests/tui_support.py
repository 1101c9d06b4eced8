"""Helpers shared by the UI pilot tests."""

from __future__ import annotations

from typing import Any


async def settle(pilot: Any) -> None:
    """Let key handlers run, wait for the workers (engine, rebalancer), then their messages."""
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()
