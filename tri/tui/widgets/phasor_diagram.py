"""Phasor diagram widget: lines from the origin drawn in braille dots, tips labelled.

The widget draws what it is given (label, complex value, style); the phasor
screen takes every value from the engine's result.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from rich.text import Text
from textual.widget import Widget

from tri.tui.widgets.braille import BrailleCanvas


@dataclass(frozen=True)
class Arrow:
    """One phasor to draw."""

    label: str
    value: complex
    style: str
    dotted: bool = False


def draw(arrows: list[Arrow], cols: int, rows: int, title: str = "") -> Text:
    """Render ``arrows`` on one common scale (the largest magnitude reaches the edge)."""
    canvas = BrailleCanvas(cols, rows)
    cx, cy = canvas.width / 2, canvas.height / 2
    # Cells are about twice as tall as wide, braille dots 2x4 per cell: dots are square.
    radius = min(cx, cy) - 5
    canvas.line(0, round(cy), canvas.width - 1, round(cy), "dim", step=3)
    canvas.line(round(cx), 0, round(cx), canvas.height - 1, "dim", step=3)
    biggest = max((abs(a.value) for a in arrows), default=0.0)
    if title:
        canvas.label(0, 0, title, "bold")
    if biggest <= 0:
        canvas.label(max(cols // 2 - 6, 0), rows // 2 - 1, "no current", "dim")
        return canvas.render()
    scale = radius / biggest
    for a in arrows:
        if abs(a.value) <= biggest * 1e-6:
            continue
        x = cx + a.value.real * scale
        y = cy - a.value.imag * scale
        canvas.line(cx, cy, x, y, a.style, step=2 if a.dotted else 1)
        # Label just beyond the tip, in cell coordinates.
        ang = math.atan2(-(y - cy), x - cx)
        lx = (x + 5 * math.cos(ang)) / 2
        ly = (y - 6 * math.sin(ang)) / 4
        col = round(lx - (len(a.label) / 2))
        col = min(max(col, 0), cols - len(a.label))
        row = min(max(round(ly), 0), rows - 1)
        canvas.label(col, row, a.label, f"bold {a.style}".strip())
    return canvas.render()


class PhasorDiagram(Widget):
    """Draws a list of :class:`Arrow` to fill its size."""

    DEFAULT_CSS = """
    PhasorDiagram { width: 1fr; height: 1fr; }
    """

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.arrows: list[Arrow] = []
        self.title = ""

    def show(self, arrows: list[Arrow], title: str = "") -> None:
        """Replace what is drawn."""
        self.arrows = arrows
        self.title = title
        self.refresh()

    def render(self) -> Text:
        size = self.content_size
        return draw(self.arrows, size.width or 40, size.height or 20, self.title)
