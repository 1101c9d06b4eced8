"""What the panel and the building rebalance screens share: number fields, the
neutral-limit field, the keys between fields, and progress posted from the
search's worker thread."""

from __future__ import annotations

import time
from collections.abc import Callable, Iterator
from typing import Any

from textual.binding import Binding
from textual.screen import Screen
from textual.widget import Widget
from textual.widgets import Label

from tri.tui.messages import RebalanceProgress
from tri.tui.widgets.in_order import OrderedInput

#: Shortest interval between two progress messages from the worker [s].
PROGRESS_INTERVAL_S = 0.1

#: Tab and Shift+Tab between the fields, as priority bindings: they act when they
#: arrive, so in a burst over SSH (Tab, Tab, →) the → lands on the field Tab reached,
#: not on the one that had focus (tri.tui.widgets.in_order explains the burst).
FIELD_KEYS = [
    Binding("tab", "app.focus_next", "Next", show=False, priority=True),
    Binding("shift+tab", "app.focus_previous", "Previous", show=False, priority=True),
]


def number_field(
    label: str, field_id: str, value: str = "", placeholder: str = ""
) -> Iterator[Widget]:
    """A label and its compact number input, for a screen's field row."""
    yield Label(label, classes="rb-label")
    yield OrderedInput(value, id=field_id, placeholder=placeholder, compact=True, classes="rb-num")


def neutral_from(neutral: Any) -> float | str | None:
    """The neutral-limit field [A] (blank: no limit), or what is wrong with it."""
    if neutral is not None and (not isinstance(neutral, int | float) or not neutral > 0):
        return "Neutral: expected a current in amperes above 0, or blank for no limit."
    return None if neutral is None else float(neutral)


def progress_poster(screen: Screen[Any]) -> Callable[[float | None, str], None]:
    """A rebalancer ``progress`` callback for a worker thread: posts
    :class:`~tri.tui.messages.RebalanceProgress` to ``screen``, at most every
    :data:`PROGRESS_INTERVAL_S`."""
    last = [0.0]

    def progress(fraction: float | None, text: str) -> None:
        now = time.perf_counter()
        if now - last[0] >= PROGRESS_INTERVAL_S:
            last[0] = now
            screen.app.call_from_thread(screen.post_message, RebalanceProgress(fraction, text))

    return progress
