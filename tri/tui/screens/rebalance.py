"""Rebalance screen (waiting for the rebalancer)."""

from __future__ import annotations

from typing import ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.screen import Screen
from textual.widgets import Footer, Static

from tri.cli.common import SAFETY_CAUTION

REBALANCE_HELP = "Finds the fewest breaker moves that even out the phases."


class RebalanceScreen(Screen[None]):
    """Placeholder until ``tri.rebalance`` lands."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "app.pop_screen", "Back", id="rebalance.back"),
    ]

    def compose(self) -> ComposeResult:
        yield Static(" Rebalance", classes="title-bar")
        yield Static("Waiting for the rebalancer (tri.rebalance) to be built.\n\n" + SAFETY_CAUTION)
        yield Footer(show_command_palette=False)
