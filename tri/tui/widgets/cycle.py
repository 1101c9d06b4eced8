"""A choice among a few values, changed with ← → (or space), shown as ``‹ value ›``."""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.binding import Binding, BindingType
from textual.message import Message
from textual.reactive import reactive
from textual.widget import Widget

from tri.tui.widgets.in_order import KeysInOrder


class Cycle(KeysInOrder, Widget, can_focus=True):
    """``choices`` are ``(label, value)``; ``value`` is the chosen value."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("right,space", "step(1)", "Next", show=False),
        Binding("left", "step(-1)", "Previous", show=False),
    ]
    DEFAULT_CSS = """
    Cycle { height: 1; width: 1fr; }
    Cycle:focus { background: $accent 30%; text-style: bold; }
    Cycle:disabled { color: $text-disabled; }
    """

    index: reactive[int] = reactive(0, init=False)

    class Changed(Message):
        """The choice changed."""

        def __init__(self, cycle: Cycle, value: str) -> None:
            self.cycle = cycle
            self.value = value
            super().__init__()

    def __init__(self, choices: tuple[tuple[str, str], ...], value: str, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.choices = choices
        values = [v for _, v in choices]
        self.set_reactive(Cycle.index, values.index(value) if value in values else 0)

    @property
    def value(self) -> str:
        """The chosen value."""
        return self.choices[self.index][1]

    def render(self) -> Text:
        """The choice, and where it is among them in the longest form that fits."""
        shown = f"‹ {self.choices[self.index][0]} ›"
        if self.disabled:
            return Text(shown)
        at, n = self.index + 1, len(self.choices)
        width = self.size.width or 10_000
        for hint in (f"   ({at} of {n}, ← →)", f"  ({at}/{n})", ""):
            if len(shown) + len(hint) <= width:
                break
        return Text(shown + hint)

    def watch_index(self, index: int) -> None:
        self.post_message(self.Changed(self, self.choices[index][1]))

    def action_step(self, step: int) -> None:
        self.index = (self.index + step) % len(self.choices)

    def on_key(self, event: Any) -> None:
        ch = event.character
        if ch and ch.isprintable() and ch not in " ":
            n = len(self.choices)
            for k in range(1, n + 1):
                j = (self.index + k) % n
                if self.choices[j][0].lower().startswith(ch.lower()):
                    self.index = j
                    event.stop()
                    return
