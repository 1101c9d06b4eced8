"""A yes/no field that says its state in words: ``[x] yes`` or ``[ ] no``."""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.binding import Binding, BindingType
from textual.message import Message
from textual.reactive import reactive
from textual.widget import Widget

from tri.tui.widgets.in_order import KeysInOrder


class Toggle(KeysInOrder, Widget, can_focus=True):
    """Space toggles; y / n set it."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("space", "flip", "Toggle", show=False),
        Binding("y", "set(True)", "Yes", show=False),
        Binding("n", "set(False)", "No", show=False),
    ]
    DEFAULT_CSS = """
    Toggle { height: 1; width: 1fr; }
    Toggle:focus { background: $accent 30%; text-style: bold; }
    Toggle:disabled { color: $text-disabled; }
    """

    value: reactive[bool] = reactive(False, init=False)

    class Changed(Message):
        """The value changed."""

        def __init__(self, toggle: Toggle, value: bool) -> None:
            self.toggle = toggle
            self.value = value
            super().__init__()

    def __init__(self, value: bool = False, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.set_reactive(Toggle.value, bool(value))

    def render(self) -> Text:
        return Text("[x] yes" if self.value else "[ ] no")

    def watch_value(self, value: bool) -> None:
        self.post_message(self.Changed(self, value))

    def action_flip(self) -> None:
        self.value = not self.value

    def action_set(self, value: bool) -> None:
        self.value = value
