"""Form widgets whose keys act in the order they were typed.

Over SSH, keystrokes often arrive in bursts. Textual hands each key to the
widget that has focus when the key arrives, but a widget's key *bindings*
(Backspace, arrows, Enter in an input; ← → in a choice) are looked up only
after the key has bubbled up to the app, along the chain of whatever has
focus *then*. In a burst such as Backspace, Backspace, "2", "5" the digits
land before the deletions, and a → meant for one field can act on the next
("Input/Textarea action synchronization bug", Textualize/textual issue 6605).
A load typed as 2500 must never be read as 2.

:class:`KeysInOrder` runs a widget's own bindings directly in its key
handler, so every key takes effect in arrival order on the widget it was
meant for. Keys that move between fields are priority bindings of the form,
acted on before later keys are handed out.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual import events
from textual.widgets import Input

if TYPE_CHECKING:  # typed as the widget it is mixed into; at run time a plain mixin
    from textual.widget import Widget as _MixedInto
else:  # a Widget base here would cut the widget's own COMPONENT_CLASSES out of the MRO
    _MixedInto = object


class KeysInOrder(_MixedInto):
    """Mixin for focusable widgets (put it before the widget class): their own key
    bindings act in arrival order."""

    async def _on_key(self, event: events.Key) -> None:
        bindings = self._bindings.key_to_bindings.get(event.key)
        if bindings:
            event.stop()
            event.prevent_default()
            await self.run_action(bindings[0].action)
            return
        await super()._on_key(event)


class OrderedInput(KeysInOrder, Input):
    """``Input`` whose editing keys (Backspace, Delete, arrows, Enter ...) act in order."""
