"""Pictures of a log in braille dots: current over time and the demand-duration view (no textual).

The figures drawn are the engine's: the series are reduced to one bucket
per dot column by :func:`tri.engine.over_time.envelope` (the same reduction
the report's picture uses), and the duration curves are the report's
``duration`` levels and hours. Nothing here computes a figure; it places
dots, axes, markers and labels.

Every curve is named in a legend and by its values at the cursor, the
neutral is dotted, and each channel can be hidden, so nothing depends on
telling colours apart.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
from rich.text import Text

from tri.engine.over_time import envelope
from tri.report.log_svg import nice_ticks
from tri.tui.widgets.braille import BrailleCanvas

#: Styles of A, B, C and the neutral (the phasor view's phase colours).
CHANNEL_STYLES = ("magenta", "cyan", "green", "bold")
#: Cells left of the plot for the current axis ("150 A┤").
GUTTER = 7


@dataclass(frozen=True)
class Window:
    """The part of the log on screen: grid intervals ``start`` to ``stop`` (not included)."""

    start: int
    stop: int

    @property
    def length(self) -> int:
        """Intervals shown."""
        return self.stop - self.start


@dataclass(frozen=True)
class Plot:
    """What a drawing needs besides the data.

    Attributes
    ----------
    cols, rows : int
        Size of the whole picture in cells (axis labels included).
    shown : tuple of 4 bool
        Which of A, B, C, N are drawn.
    names : tuple of 4 str
        Their names (the panel's phase labels and ``N``).
    cursor : int
        Cursor column within the plot area (cells from its left edge).
    """

    cols: int
    rows: int
    shown: tuple[bool, bool, bool, bool]
    names: tuple[str, str, str, str]
    cursor: int = 0

    @property
    def plot_cols(self) -> int:
        """Cells of the plot area, the axis gutter excluded."""
        return max(self.cols - GUTTER, 4)

    @property
    def plot_rows(self) -> int:
        """Rows of dots (cells), the marker row and the time axis excluded."""
        return max(self.rows - 2, 2)


def column_range(window: Window, plot_cols: int, col: int) -> tuple[int, int]:
    """Grid intervals under plot column ``col``: ``[first, last)`` (at least one)."""
    first = window.start + col * window.length // plot_cols
    last = window.start + (col + 1) * window.length // plot_cols
    return first, max(last, first + 1)


def index_column(window: Window, plot_cols: int, index: float) -> int | None:
    """Plot column of grid interval ``index``, ``None`` outside the window."""
    if not window.start <= index < window.stop:
        return None
    return min(int((index - window.start) * plot_cols // window.length), plot_cols - 1)


def _y(value: float, top: float, height: int) -> float:
    """Canvas row (dots, 0 at the top) of ``value`` on an axis from 0 to ``top``."""
    return (height - 1) - value / top * (height - 1)


def _ys(values: np.ndarray, top: float, height: int) -> np.ndarray:
    """:func:`_y` of every value (NaN stays NaN: a gap)."""
    return (height - 1) - np.asarray(values, dtype=float) / top * (height - 1)


def _curve(canvas: BrailleCanvas, xs: np.ndarray, ys: np.ndarray, style: str, dotted: bool) -> None:
    """Join consecutive finite points; a missing value leaves a gap."""
    step = 2 if dotted else 1
    prev: tuple[float, float] | None = None
    for x, y in zip(xs, ys, strict=True):
        if not (math.isfinite(x) and math.isfinite(y)):
            prev = None
            continue
        if prev is None:
            canvas.dot(round(x), round(y), style)
        else:
            canvas.line(prev[0], prev[1], x, y, style, step=step)
        prev = (float(x), float(y))


def _axis(top: float, rows: int, unit: str) -> dict[int, str]:
    """Row -> label of the current axis: round ticks that fall on distinct rows."""
    height = 4 * rows
    labels: dict[int, str] = {}
    for v in nice_ticks(top, max(2, min(5, rows // 2))):
        row = int(_y(v, top, height)) // 4
        labels.setdefault(row, f"{v:g} {unit}")
    return labels


def _framed(
    canvas: BrailleCanvas, plot: Plot, axis: dict[int, str], highlight: int | None
) -> list[Text]:
    """The canvas rows with the axis gutter, the cursor column in reverse video."""
    body = canvas.render().split()
    out = []
    for r, line in enumerate(body):
        label = axis.get(r, "")
        t = Text(label.rjust(GUTTER - 1)[-(GUTTER - 1) :] + ("┤" if label else "│"), style="dim")
        if highlight is not None and 0 <= highlight < line.cell_len:
            line.stylize("reverse", highlight, highlight + 1)
        t.append_text(line)
        out.append(t)
    return out


def time_picture(
    stack: np.ndarray,
    window: Window,
    plot: Plot,
    *,
    rating_a: float | None,
    peaks: Sequence[tuple[int, int]],
    time_label: Callable[[int], str],
) -> list[Text]:
    """Current over time: marker row, plot rows with the current axis, the time axis.

    Parameters
    ----------
    stack : float ndarray, shape (4, T)
        A, B, C and neutral currents on the log's grid [A] (``NaN`` where missing).
    window : Window
        The intervals shown.
    plot : Plot
    rating_a : float or None
        Drawn as a dim dotted line when it falls within the picture [A].
    peaks : sequence of (channel, grid index)
        Start of each channel's highest demand window (marked above the plot).
    time_label : callable
        Grid index -> short clock text for the time axis.
    """
    canvas = BrailleCanvas(plot.plot_cols, plot.plot_rows)
    env = envelope(stack[:, window.start : window.stop], canvas.width)
    drawn = [k for k in range(4) if plot.shown[k] and np.any(np.isfinite(env.mean[k]))]
    finite = env.mean[drawn][np.isfinite(env.mean[drawn])] if drawn else np.array([])
    top = nice_ticks(float(finite.max()) if finite.size else 1.0)[-1]
    n = env.mean.shape[-1]
    xs = np.arange(n) * canvas.width / max(n, 1)
    if rating_a is not None and rating_a <= top:
        y = _y(rating_a, top, canvas.height)
        canvas.line(0, y, canvas.width - 1, y, "dim", step=3)
        canvas.label(max(plot.plot_cols - 12, 0), int(y) // 4, f"rating {rating_a:g} A", "dim")
    for k in drawn:
        ys = _ys(env.mean[k], top, canvas.height)
        _curve(canvas, xs, ys, CHANNEL_STYLES[k], dotted=k == 3)
    rows = [_markers(window, plot, peaks)]
    rows += _framed(canvas, plot, _axis(top, plot.plot_rows, "A"), plot.cursor)
    rows.append(_time_axis(window, plot, time_label))
    return rows


def _markers(window: Window, plot: Plot, peaks: Sequence[tuple[int, int]]) -> Text:
    """``▼A`` above the column where each channel's demand peak starts."""
    at: dict[int, str] = {}
    for k, index in peaks:
        col = index_column(window, plot.plot_cols, index)
        if col is not None and plot.shown[k]:
            at[col] = at.get(col, "") + plot.names[k]
    t = Text(" " * GUTTER)
    line = [" "] * (plot.plot_cols + 8)
    for col, names in sorted(at.items()):
        for j, ch in enumerate("▼" + names):
            if col + j < len(line):
                line[col + j] = ch
    t.append("".join(line[: plot.plot_cols]), style="bold")
    return t


def _time_axis(window: Window, plot: Plot, time_label: Callable[[int], str]) -> Text:
    """Clock times at the left, middle and right of the plot."""
    width = plot.plot_cols
    left = time_label(window.start)
    right = time_label(window.stop)
    middle = time_label(window.start + window.length // 2)
    line = [" "] * width
    spots = [(0, left), ((width - len(middle)) // 2, middle), (width - len(right), right)]
    if width < len(left) + len(middle) + len(right) + 4:
        spots = [spots[0], spots[2]]
    for at, text in spots:
        for j, ch in enumerate(text):
            if 0 <= at + j < width:
                line[at + j] = ch
    return Text(" " * GUTTER + "".join(line), style="dim")


def duration_picture(
    levels_a: Sequence[float],
    hours: Sequence[Sequence[float] | None],
    plot: Plot,
    *,
    level_cursor: int,
) -> list[Text]:
    """Hours above each current: a curve per channel, current up, hours across.

    Parameters
    ----------
    levels_a : sequence of float
        Current levels [A] (the report's ``duration.levels_a``).
    hours : sequence of 4 (sequence of float or None)
        Hours above each level for A, B, C and the neutral [h].
    plot : Plot
    level_cursor : int
        Index of the level marked (a dim line across and ``▶`` on the axis).
    """
    canvas = BrailleCanvas(plot.plot_cols, plot.plot_rows)
    lv = np.asarray(levels_a, dtype=float)
    rows = [np.asarray(h, dtype=float) for h in hours if h is not None]
    top_h = max((float(np.nanmax(h)) for h in rows if h.size), default=1.0)
    top_h = max(top_h, 1e-9)
    top = nice_ticks(float(lv.max()) if lv.size else 1.0)[-1]
    if 0 <= level_cursor < lv.size:
        y = _y(lv[level_cursor], top, canvas.height)
        canvas.line(0, y, canvas.width - 1, y, "dim", step=3)
    for k, h in enumerate(hours):
        if h is None or not plot.shown[k]:
            continue
        xs = np.asarray(h, dtype=float) / top_h * (canvas.width - 1)
        _curve(canvas, xs, _ys(lv, top, canvas.height), CHANNEL_STYLES[k], dotted=k == 3)
    axis = _axis(top, plot.plot_rows, "A")
    if 0 <= level_cursor < lv.size:
        row = int(_y(lv[level_cursor], top, canvas.height)) // 4
        axis[row] = "▶" + axis.get(row, "").rjust(GUTTER - 2)
    out = [Text(" " * GUTTER + "current [A] against the hours it was exceeded", style="dim")]
    out += _framed(canvas, plot, axis, None)
    width = plot.plot_cols
    right = f"{top_h:.0f} h"
    middle = f"{top_h / 2:.0f} h"
    line = "0 h".ljust((width - len(middle)) // 2) + middle
    out.append(Text(" " * GUTTER + line.ljust(width - len(right)) + right, style="dim"))
    return out


def legend(plot: Plot, present: Sequence[bool]) -> Text:
    """``1 ■A  2 ■B  3 ■C  4 ┄N``: the key that hides each channel and its style."""
    t = Text()
    for k in range(4):
        if not present[k]:
            continue
        mark = "┄" if k == 3 else "■"
        t.append(f"{k + 1}", style="bold")
        style = CHANNEL_STYLES[k] if plot.shown[k] else "dim"
        t.append(f"{mark}{plot.names[k]}", style=style)
        t.append("" if plot.shown[k] else " (hidden)", style="dim")
        t.append("  ")
    return t
