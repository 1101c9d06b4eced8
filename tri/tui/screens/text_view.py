"""A scrolling page of text (help, findings), closed with Escape or q."""

from __future__ import annotations

from typing import Any, ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static


class TextScreen(ModalScreen[None]):
    """Full-height page of text; ↑↓ PgUp PgDn scroll."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,q", "close", "Close", id="text.close"),
        Binding("down,j", "scroll(1)", "Down", show=False),
        Binding("up,k", "scroll(-1)", "Up", show=False),
        Binding("pagedown,space", "scroll(10)", "Page down", show=False),
        Binding("pageup", "scroll(-10)", "Page up", show=False),
    ]

    def __init__(self, title: str, body: Any) -> None:
        super().__init__()
        self.page_title = title
        self.body = body

    def compose(self) -> ComposeResult:
        with Vertical(classes="page"):
            yield Static(self.page_title, classes="dialog-title")
            with VerticalScroll(id="page-scroll"):
                yield Static(self.body, id="page-body")
            yield Static("↑↓ PgUp PgDn scroll · Esc close", classes="dialog-keys")

    def action_scroll(self, lines: int) -> None:
        self.query_one("#page-scroll", VerticalScroll).scroll_relative(y=lines, animate=False)

    def action_close(self) -> None:
        self.dismiss(None)
