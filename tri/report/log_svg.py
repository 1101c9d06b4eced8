"""Pictures of a log as plain SVG: current over time, and a demand-duration view.

Written by hand rather than with a plotting library: the allowed
dependencies hold none, the two pictures are a few polylines, a band and
axes, and plain SVG text is byte-for-byte reproducible (no embedded dates
or ids), small, and opens in any browser or Markdown viewer.

Every curve is labelled in words as well as by colour (a legend naming
phase and neutral), so nothing depends on telling colours apart.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

WIDTH, HEIGHT = 760, 300
LEFT, RIGHT, TOP, BOTTOM = 64, 16, 28, 44
#: Colours by channel (A, B, C, neutral), with dashes so print in grey still tells them apart.
STYLES = (
    ("#1f77b4", ""),
    ("#d62728", "6 3"),
    ("#2ca02c", "2 2"),
    ("#555555", "8 2 2 2"),
)


def _esc(text: str) -> str:
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def nice_ticks(top: float, count: int = 5) -> list[float]:
    """Round tick values from 0 to at least ``top`` [same unit]."""
    if not top > 0 or not math.isfinite(top):
        return [0.0, 1.0]
    raw = top / count
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw)
    n = math.ceil(top / step - 1e-9)
    return [i * step for i in range(n + 1)]


def _frame(title: str, x_label: str, y_label: str, y_ticks: list[float]) -> list[str]:
    w, h = WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{HEIGHT}" '
        f'viewBox="0 0 {WIDTH} {HEIGHT}" font-family="sans-serif" font-size="11">',
        f"<title>{_esc(title)}</title>",
        f'<rect x="0" y="0" width="{WIDTH}" height="{HEIGHT}" fill="white"/>',
        f'<text x="{LEFT}" y="16" font-size="13" font-weight="bold">{_esc(title)}</text>',
    ]
    top = y_ticks[-1]
    for v in y_ticks:
        y = TOP + h - h * v / top
        out.append(
            f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + w}" y2="{y:.1f}" stroke="#e0e0e0"/>'
        )
        out.append(f'<text x="{LEFT - 6}" y="{y + 4:.1f}" text-anchor="end">{v:g}</text>')
    out.append(f'<rect x="{LEFT}" y="{TOP}" width="{w}" height="{h}" fill="none" stroke="#888"/>')
    out.append(
        f'<text x="{LEFT + w / 2}" y="{HEIGHT - 8}" text-anchor="middle">{_esc(x_label)}</text>'
    )
    out.append(
        f'<text x="14" y="{TOP + h / 2}" text-anchor="middle" '
        f'transform="rotate(-90 14 {TOP + h / 2})">{_esc(y_label)}</text>'
    )
    return out


def _polyline(
    xs: np.ndarray, ys: np.ndarray, style: tuple[str, str], width: float = 1.2
) -> list[str]:
    """One polyline per run of finite points (gaps stay gaps)."""
    colour, dash = style
    dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
    out, run = [], []
    for x, y in zip(xs, ys, strict=True):
        if math.isfinite(x) and math.isfinite(y):
            run.append(f"{x:.1f},{y:.1f}")
            continue
        if len(run) > 1:
            out.append(run)
        run = []
    if len(run) > 1:
        out.append(run)
    return [
        f'<polyline fill="none" stroke="{colour}" stroke-width="{width}"{dash_attr} '
        f'points="{" ".join(r)}"/>'
        for r in out
    ]


def _legend(names: list[str]) -> list[str]:
    out = []
    x = WIDTH - RIGHT - 90 * len(names)
    for k, name in enumerate(names):
        colour, dash = STYLES[k]
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        xx = x + 90 * k
        out.append(
            f'<line x1="{xx}" y1="12" x2="{xx + 24}" y2="12" stroke="{colour}" '
            f'stroke-width="2"{dash_attr}/>'
        )
        out.append(f'<text x="{xx + 28}" y="16">{_esc(name)}</text>')
    return out


def current_over_time_svg(
    picture: Any,
    interval_s: float,
    labels: list[str],
    time_text: Any,
    title: str,
) -> str:
    """Phase and neutral current over time: bucket averages as lines.

    Parameters
    ----------
    picture : Envelope
        Rows A, B, C, N (``NaN`` row without a neutral) [A].
    interval_s : float
        Grid interval [s].
    labels : list of str
        Names of the rows shown (phases, then ``N``).
    time_text : callable
        Grid index -> clock text, for the axis ends.
    title : str
    """
    mean = np.asarray(picture.mean, dtype=float)
    starts = np.asarray(picture.start_index, dtype=float)
    rows = [k for k in range(4) if k < 3 or np.any(np.isfinite(mean[3]))]
    top = float(np.nanmax(np.asarray(picture.high)[rows])) if starts.size else 1.0
    ticks = nice_ticks(top)
    out = _frame(title, "time", "current [A], average of each bucket", ticks)
    w, h = WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM
    span = max(float(starts[-1]) if starts.size else 1.0, 1.0)
    xs = LEFT + w * starts / span
    for k in rows:
        ys = TOP + h - h * mean[k] / ticks[-1]
        out += _polyline(xs, ys, STYLES[k])
    out += _legend([labels[k] for k in rows])
    days = span * interval_s / 86400.0
    step = 1 if days <= 10 else 7 if days <= 70 else 30
    per_day = 86400.0 / interval_s
    d = 0
    while d * per_day <= span:
        x = LEFT + w * d * per_day / span
        out.append(
            f'<line x1="{x:.1f}" y1="{TOP + h}" x2="{x:.1f}" y2="{TOP + h + 4}" stroke="#888"/>'
        )
        d += step
    out.append(f'<text x="{LEFT}" y="{TOP + h + 16}">{_esc(time_text(0))}</text>')
    out.append(
        f'<text x="{LEFT + w}" y="{TOP + h + 16}" text-anchor="end">{_esc(time_text(span))}</text>'
    )
    out.append("</svg>")
    return "\n".join(out) + "\n"


def duration_svg(levels_a: list[float], hours: dict[str, list[float]], title: str) -> str:
    """Demand-duration view: hours each channel spent above each current.

    Parameters
    ----------
    levels_a : list of float
        Current levels [A].
    hours : dict of str to list of float
        Channel name -> hours above each level [h].
    title : str
    """
    names = list(hours)
    top_h = max((max(v) for v in hours.values() if v), default=1.0)
    ticks = nice_ticks(max(levels_a) if levels_a else 1.0)
    out = _frame(title, "hours above the current", "current [A]", ticks)
    w, h = WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM
    x_ticks = nice_ticks(top_h, 6)
    for v in x_ticks:
        x = LEFT + w * v / x_ticks[-1]
        out.append(f'<text x="{x:.1f}" y="{TOP + h + 14}" text-anchor="middle">{v:g}</text>')
    lv = np.asarray(levels_a, dtype=float)
    for k, name in enumerate(names):
        hv = np.asarray(hours[name], dtype=float)
        xs = LEFT + w * hv / x_ticks[-1]
        ys = TOP + h - h * lv / ticks[-1]
        out += _polyline(xs, ys, STYLES[min(k, 3)], 1.6)
    out += _legend(names)
    out.append("</svg>")
    return "\n".join(out) + "\n"
