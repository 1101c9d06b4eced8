"""A tiny braille-dot canvas: 2×4 dots per terminal cell, one style per cell.

Braille patterns (U+2800..U+28FF) give a usable resolution on any UTF-8
terminal over SSH. Pure Python; no textual import.
"""

from __future__ import annotations

from rich.text import Text

# Bit of each dot (column, row) within a cell, per the Unicode braille layout.
_DOT = {(0, 0): 0x01, (0, 1): 0x02, (0, 2): 0x04, (1, 0): 0x08,
        (1, 1): 0x10, (1, 2): 0x20, (0, 3): 0x40, (1, 3): 0x80}  # fmt: skip


class BrailleCanvas:
    """``cols × rows`` cells, i.e. ``2·cols × 4·rows`` dots; (0, 0) is the top left dot."""

    def __init__(self, cols: int, rows: int) -> None:
        self.cols = max(cols, 1)
        self.rows = max(rows, 1)
        self.bits = [[0] * self.cols for _ in range(self.rows)]
        self.styles: list[list[str | None]] = [[None] * self.cols for _ in range(self.rows)]
        self.text: dict[tuple[int, int], tuple[str, str | None]] = {}

    @property
    def width(self) -> int:
        """Width in dots."""
        return 2 * self.cols

    @property
    def height(self) -> int:
        """Height in dots."""
        return 4 * self.rows

    def dot(self, x: int, y: int, style: str | None = None) -> None:
        """Set one dot (ignored off the canvas)."""
        if 0 <= x < self.width and 0 <= y < self.height:
            cx, cy = x // 2, y // 4
            self.bits[cy][cx] |= _DOT[(x % 2, y % 4)]
            if style is not None:
                self.styles[cy][cx] = style

    def line(
        self, x0: float, y0: float, x1: float, y1: float, style: str | None = None, step: int = 1
    ) -> None:
        """A straight line of dots (every ``step``-th dot for a dotted line)."""
        n = int(max(abs(x1 - x0), abs(y1 - y0))) + 1
        for k in range(0, n + 1, step):
            t = k / n if n else 0.0
            self.dot(round(x0 + (x1 - x0) * t), round(y0 + (y1 - y0) * t), style)

    def label(self, col: int, row: int, text: str, style: str | None = None) -> None:
        """Write text over the cells starting at (col, row), clipped to the canvas."""
        for k, ch in enumerate(text):
            c = col + k
            if 0 <= c < self.cols and 0 <= row < self.rows:
                self.text[(c, row)] = (ch, style)

    def render(self) -> Text:
        """The canvas as styled text, one line per cell row."""
        out = Text()
        for r in range(self.rows):
            for c in range(self.cols):
                if (c, r) in self.text:
                    ch, st = self.text[(c, r)]
                    out.append(ch, style=st or "")
                    continue
                bits = self.bits[r][c]
                out.append(chr(0x2800 + bits) if bits else " ", style=self.styles[r][c] or "")
            if r < self.rows - 1:
                out.append("\n")
        return out
