"""Phasor diagram widget: arrows from the origin in braille dots, each with a head and a label.

The widget draws what it is given (label, complex value, style); the phasor
screen takes every value from the engine's result. Drawing aids that change
nothing about the values:

- every arrow ends in a head, so direction never depends on colour;
- arrows that point the same way (within :data:`SAME_ANGLE_DEG`) are drawn
  side by side, a few dots apart, so a phasor never hides under another
  (phase C under the neutral, say), and each keeps its own label;
- labels sit beside their tips and never overwrite each other;
- a phasor too short to draw at this scale is named at the origin as such
  (its value is in the legend).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from rich.text import Text
from textual.widget import Widget

from tri.tui.widgets.braille import BrailleCanvas

SAME_ANGLE_DEG = 8.0
#: Perpendicular gap between arrows that share an angle [dots].
SIDE_BY_SIDE_DOTS = 4
HEAD_DOTS = 5
HEAD_SPREAD_DEG = 28.0


@dataclass(frozen=True)
class Arrow:
    """One phasor to draw."""

    label: str
    value: complex
    style: str
    dotted: bool = False


def _offsets(arrows: list[Arrow], drawn: list[bool]) -> list[float]:
    """Perpendicular offset [dots] of each arrow: 0, or ±k·gap within a bundle of one angle."""
    offsets = [0.0] * len(arrows)
    angles = [math.degrees(math.atan2(a.value.imag, a.value.real)) for a in arrows]
    done: set[int] = set()
    for i in range(len(arrows)):
        if i in done or not drawn[i]:
            continue
        bundle = [
            j
            for j in range(len(arrows))
            if drawn[j]
            and j not in done
            and abs((angles[j] - angles[i] + 180.0) % 360.0 - 180.0) < SAME_ANGLE_DEG
        ]
        done.update(bundle)
        for k, j in enumerate(bundle):
            offsets[j] = (k - (len(bundle) - 1) / 2.0) * SIDE_BY_SIDE_DOTS
    return offsets


def _place_label(
    canvas: BrailleCanvas, taken: set[tuple[int, int]], col: int, row: int, text: str
) -> tuple[int, int]:
    """The nearest free spot for ``text`` around (col, row), rows first, then columns."""
    cols, rows = canvas.cols, canvas.rows
    for dr, dc in ((0, 0), (1, 0), (-1, 0), (2, 0), (-2, 0), (0, 2), (0, -2), (1, 2), (-1, -2)):
        c = min(max(col + dc, 0), max(cols - len(text), 0))
        r = min(max(row + dr, 0), rows - 1)
        if not any((c + k, r) in taken for k in range(-1, len(text) + 1)):
            return c, r
    return min(max(col, 0), max(cols - len(text), 0)), min(max(row, 0), rows - 1)


def draw(arrows: list[Arrow], cols: int, rows: int, title: str = "") -> Text:
    """Render ``arrows`` on one common scale (the largest magnitude reaches the edge)."""
    canvas = BrailleCanvas(cols, rows)
    cx, cy = canvas.width / 2, canvas.height / 2
    # Cells are about twice as tall as wide, braille dots 2x4 per cell: dots are square.
    radius = min(cx, cy) - 6
    canvas.line(0, round(cy), canvas.width - 1, round(cy), "dim", step=3)
    canvas.line(round(cx), 0, round(cx), canvas.height - 1, "dim", step=3)
    biggest = max((abs(a.value) for a in arrows), default=0.0)
    taken: set[tuple[int, int]] = set()
    if title:
        canvas.label(0, 0, title, "bold")
        taken.update((k, 0) for k in range(len(title)))
    if biggest <= 0:
        canvas.label(max(cols // 2 - 6, 0), rows // 2 - 1, "no current", "dim")
        return canvas.render()
    scale = radius / biggest
    drawn = [abs(a.value) * scale >= 2.0 for a in arrows]
    offsets = _offsets(arrows, drawn)
    tiny: list[str] = []
    for a, visible, off in zip(arrows, drawn, offsets, strict=True):
        if not visible:
            tiny.append(a.label)
            continue
        ang = math.atan2(a.value.imag, a.value.real)
        # Screen y grows downwards; the perpendicular shifts the whole arrow sideways.
        px, py = -math.sin(ang) * off, -math.cos(ang) * off
        x0, y0 = cx + px, cy + py
        x = x0 + a.value.real * scale
        y = y0 - a.value.imag * scale
        canvas.line(x0, y0, x, y, a.style, step=2 if a.dotted else 1)
        head = min(HEAD_DOTS, max(abs(a.value) * scale / 3.0, 2.0))
        for side in (-1.0, 1.0):
            back = ang + math.pi + side * math.radians(HEAD_SPREAD_DEG)
            canvas.line(x, y, x + head * math.cos(back), y - head * math.sin(back), a.style)
        # Label beside the tip, a little beyond it, in cell coordinates.
        lx = (x + 6 * math.cos(ang)) / 2
        ly = (y - 7 * math.sin(ang)) / 4
        col, row = _place_label(canvas, taken, round(lx - len(a.label) / 2), round(ly), a.label)
        canvas.label(col, row, a.label, f"bold {a.style}".strip())
        taken.update((col + k, row) for k in range(len(a.label)))
    if tiny:
        text = ", ".join(tiny) + ": too short to draw"
        col, row = _place_label(canvas, taken, cols // 2 + 1, min(rows // 2 + 1, rows - 1), text)
        canvas.label(col, row, text, "bold")
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
