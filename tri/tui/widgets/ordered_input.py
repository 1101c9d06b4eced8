"""A text input whose editing keys act in the order they were typed.

Over SSH, keystrokes often arrive in bursts. Textual's ``Input`` inserts
printable characters in its own key handler but leaves editing keys
(Backspace, Delete, arrows, Enter ...) to key bindings, which are reached
only after the key event has bubbled up through the widget tree, so in a
burst such as Backspace, Backspace, "2", "5" the digits can land before the
deletions ("Input/Textarea action synchronization bug", Textualize/textual
issue 6605). Typing a load of 2500 must never be read as 2. This input runs
its own editing bindings directly in its key handler, so every key takes
effect in arrival order. (Keys that move between fields are priority
bindings of the form, acted on before later keys are handed out.)
"""

from __future__ import annotations

from typing import ClassVar

from textual import events
from textual.binding import Binding
from textual.widgets import Input


def _key_actions() -> dict[str, str]:
    out: dict[str, str] = {}
    for b in Input.BINDINGS:
        if isinstance(b, Binding):
            for key in b.key.split(","):
                out[key.strip()] = b.action
    return out


class OrderedInput(Input):
    """``Input`` that applies editing and focus keys in arrival order."""

    EDIT_KEYS: ClassVar[dict[str, str]] = _key_actions()

    async def _on_key(self, event: events.Key) -> None:
        action = self.EDIT_KEYS.get(event.key)
        if action is not None:
            event.stop()
            event.prevent_default()
            await self.run_action(action)
            return
        await super()._on_key(event)
