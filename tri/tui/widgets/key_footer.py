"""The key footer: Textual's footer, rebuilt only when the keys it shows change.

Textual's :class:`~textual.widgets.Footer` throws away and re-mounts every key
of the footer (a dozen widgets, each styled anew) whenever the screen's
bindings are refreshed: on each focus change, screen switch and, in the main
view, each redraw after an edit. Almost always the keys shown are the same.
:class:`KeyFooter` remembers what it last drew (every field its compose reads:
key, key shown, words, action, enabled, tooltip, group) and skips the rebuild
when that is unchanged, so an edit redraws the figures without restyling the
footer. What is drawn is exactly the parent's.
"""

from __future__ import annotations

from typing import Any

from textual.screen import Screen
from textual.widgets import Footer


def shown_keys(footer: Footer) -> tuple[Any, ...]:
    """Everything :meth:`Footer.compose` reads from the bindings, as one comparable value."""
    app = footer.app
    keys = tuple(
        (
            binding.key,
            app.get_key_display(binding),
            binding.description,
            binding.action,
            enabled,
            tooltip,
            binding.tooltip,
            None if binding.group is None else (binding.group.description, binding.group.compact),
        )
        for (_, binding, enabled, tooltip) in footer.screen.active_bindings.values()
        if binding.show
    )
    return keys, footer.show_command_palette, footer.combine_groups


class KeyFooter(Footer):
    """A :class:`~textual.widgets.Footer` that recomposes only when its keys change."""

    _drawn: tuple[Any, ...] | None = None

    def compose(self) -> Any:
        self._drawn = shown_keys(self) if self._bindings_ready else None
        yield from super().compose()

    def bindings_changed(self, screen: Screen[Any]) -> None:
        if (
            self._bindings_ready
            and self._drawn is not None
            and self.is_attached
            and screen is self.screen
            and shown_keys(self) == self._drawn
        ):
            return
        super().bindings_changed(screen)
