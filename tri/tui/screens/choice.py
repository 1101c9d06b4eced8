"""A question with a few answers, each on its own key (quit, recover, overwrite ...)."""

from __future__ import annotations

from typing import Any, ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Static


class ChoiceScreen(ModalScreen[Any]):
    """Shows ``message`` and answers; pressing an answer's key dismisses with its value.

    ``answers`` are ``(key, label, value)``; Escape dismisses with ``cancel``.
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel", id="choice.cancel")
    ]

    def __init__(
        self,
        title: str,
        message: str,
        answers: list[tuple[str, str, Any]],
        cancel: Any = None,
        classes: str = "",
        cancel_label: str = "cancel",
    ) -> None:
        super().__init__(classes=classes)
        self.cancel_label = cancel_label
        self.title_text = title
        self.message = message
        self.answers = answers
        self.cancel_value = cancel

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog", id="choice-box"):
            yield Static(self.title_text, classes="dialog-title", markup=False)
            yield Static(self.message, id="choice-message", markup=False)
            for key, label, _ in self.answers:
                yield Static(f"  [{key}] {label}", classes="choice-answer", markup=False)
            yield Static(f"  [Esc] {self.cancel_label}", classes="choice-answer", markup=False)

    def on_key(self, event: Any) -> None:
        for key, _label, value in self.answers:
            if event.key == key or event.character == key:
                event.stop()
                event.prevent_default()
                self.dismiss(value)
                return

    def action_cancel(self) -> None:
        self.dismiss(self.cancel_value)
