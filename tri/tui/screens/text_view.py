"""A scrolling page of text (help, findings, the report), closed with Escape or q.

A page may have several views (findings, checks, the full report): Tab and
← → switch between them, and the title names every view with the current
one marked.
"""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static


class TextScreen(ModalScreen[None]):
    """Full-height page of text; ↑↓ PgUp PgDn Home End scroll, Tab switches views."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,q", "close", "Close", id="text.close"),
        Binding("down,j", "scroll(1)", "Down", show=False),
        Binding("up,k", "scroll(-1)", "Up", show=False),
        Binding("pagedown,space", "scroll(10)", "Page down", show=False),
        Binding("pageup", "scroll(-10)", "Page up", show=False),
        Binding("home,g", "edge(0)", "Top", show=False),
        Binding("end,G", "edge(1)", "Bottom", show=False),
        Binding("tab,right", "view(1)", "Next view", show=False),
        Binding("shift+tab,left", "view(-1)", "Previous view", show=False),
    ]

    def __init__(self, title: str, body: Any, views: list[tuple[str, Any]] | None = None) -> None:
        super().__init__()
        self.page_title = title
        self.views = views or [("", body)]
        self.current = 0

    @property
    def body(self) -> Any:
        """What the current view shows."""
        return self.views[self.current][1]

    def compose(self) -> ComposeResult:
        with Vertical(classes="page"):
            yield Static(self._title(), classes="dialog-title", id="page-title")
            with VerticalScroll(id="page-scroll"):
                yield Static(self.body, id="page-body")
            more = " · Tab next view" if len(self.views) > 1 else ""
            yield Static(f"↑↓ PgUp PgDn Home End scroll{more} · Esc close", classes="dialog-keys")

    def _title(self) -> Text:
        t = Text(self.page_title)
        if len(self.views) > 1:
            t.append("  ")
            for k, (name, _) in enumerate(self.views):
                t.append(" ")
                here = k == self.current
                t.append(f"[{name}]" if here else name, style="reverse" if here else "")
        return t

    def action_view(self, step: int) -> None:
        if len(self.views) < 2:
            return
        self.current = (self.current + step) % len(self.views)
        self.query_one("#page-body", Static).update(self.body)
        self.query_one("#page-title", Static).update(self._title())
        self.query_one("#page-scroll", VerticalScroll).scroll_home(animate=False)

    def action_scroll(self, lines: int) -> None:
        self.query_one("#page-scroll", VerticalScroll).scroll_relative(y=lines, animate=False)

    def action_edge(self, end: int) -> None:
        scroll = self.query_one("#page-scroll", VerticalScroll)
        if end:
            scroll.scroll_end(animate=False)
        else:
            scroll.scroll_home(animate=False)

    def action_close(self) -> None:
        self.dismiss(None)
