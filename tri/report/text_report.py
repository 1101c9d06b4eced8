"""Terminal report: a Rich layout that fits an 80-column terminal.

Sections, in order: heading and basis (what the figures are and that they
are estimates), phase and neutral currents with loading bars, the sizing
check with continuous loads, symmetrical components and current unbalance,
voltage at the panel (or why there is none), site readings against the
computed figures, findings with their sources, the panel as wired (shared
neutrals, legs, high leg, spares and spaces, when any apply), unplaced
circuits, and the safety caution.

Nothing is said by colour alone: every bar has its number written beside
it and a status word (``OVER`` above 100 %, ``NEAR`` above the 80 % design
headroom, else ``ok``: :func:`tri.engine.limits.loading_word`, the same
words the UI shows); finding levels are written out. With ``NO_COLOR`` set,
or when the output is piped, the same text appears without colour. An ASCII
mode replaces the block characters, the angle sign and box lines for
terminals without UTF-8.

This module owns the order of the sections, the heading, findings and
unplaced circuits, and the rendering to a console or a string; the
sections on currents are in :mod:`tri.report.text_currents`, on voltages and
readings in :mod:`tri.report.text_voltage`, the wiring in
:mod:`tri.report.wiring_text`, the glyphs, bars and status words in
:mod:`tri.report.text_glyphs`.
"""

from __future__ import annotations

import io
from collections.abc import Iterable
from typing import Any

from rich.console import Console, Group, RenderableType
from rich.table import Table
from rich.text import Text

from tri.report.text_currents import currents_section, sequence_section
from tri.report.text_glyphs import (
    BAR_CELLS,
    Glyphs,
    ascii_data,
    bar,
    section,
    status_word,
    to_ascii,
)
from tri.report.text_glyphs import va_text as _va
from tri.report.text_voltage import readings_section, voltage_section
from tri.report.wiring_text import wiring_section
from tri.words import plural

#: Re-exported: the tests, the building and rebalancing reports import these here.
__all__ = [
    "BAR_CELLS",
    "WIDTH",
    "bar",
    "print_text",
    "render_text",
    "status_word",
    "text_renderables",
    "to_ascii",
]

#: Default width of rendered text [columns].
WIDTH = 80


def _heading(d: dict[str, Any], g: Glyphs) -> RenderableType:
    p = d["panel"]
    b = d["basis"]
    main = (
        f"main breaker {p['main_a']:g} A, bus {p['bus_a']:g} A"
        if p["main_a"] is not None
        else f"main lugs only, bus {p['bus_a']:g} A"
    )
    neutral = f", neutral {p['neutral_a']:g} A" if p["neutral_a"] is not None else ", no neutral"
    placed = sum(1 for c in d["circuits"] if c["placed"])
    lines = Text()
    lines.append(p["name"], style="bold")
    if p["file"]:
        lines.append(f"  ({p['file']})")
    lines.append(
        f"\n{p['system']} {p['wiring']}, {p['frequency_hz']:g} Hz; {main}{neutral}; "
        f"{plural(placed, 'circuit')} placed, {len(d['unplaced'])} unplaced."
    )
    if b["iterated"]:
        basis = (
            "Currents are solved at the computed panel voltage (constant-power loads, "
            f"{d['voltage']['iterations']} iterations)."
        )
    else:
        vln = p["v_ln"]
        at = f"{vln:g} V line-to-neutral, " if vln is not None else ""
        basis = (
            f"Currents at nominal voltage ({at}{p['v_ll']:g} V line-to-line), as panel "
            "schedules are."
        )
    lines.append("\nESTIMATE from the schedule, not a measurement. ", style="bold")
    practice = "NEC" if b["practice"] == "NEC" else "IEC 60364"
    factor = (
        "no continuous-load factor"
        if b["continuous_factor"] == 1
        else f"continuous loads at {b['continuous_factor'] * 100:g} % in the sizing rule only"
    )
    lines.append(f"{basis} Findings cite {practice} practice; {factor}.")
    return lines


def _findings(d: dict[str, Any], g: Glyphs) -> RenderableType:
    f = d["findings"]
    if not f:
        return Text("None: no rating, balance or voltage rule is crossed at these figures.")
    t = Table(box=None, show_header=False, pad_edge=False, padding=(0, 1))
    t.add_column(no_wrap=True)
    t.add_column(ratio=1)
    style = {"limit": "bold red", "warning": "yellow", "info": ""}
    for item in f:
        body = Text(item["message"])
        body.append(f"\nSource: {item['source']}", style="dim")
        t.add_row(Text(item["level"].upper(), style=style[item["level"]]), body)
    return t


def _unplaced(d: dict[str, Any], g: Glyphs) -> RenderableType | None:
    rows = [c for c in d["circuits"] if not c["placed"]]
    if not rows:
        return None
    t = Table(box=None, show_header=False, pad_edge=False, padding=(0, 1))
    t.add_column()
    t.add_column(justify="right")
    t.add_column(justify="right")
    t.add_column()
    for c in rows:
        brk = f"breaker {c['breaker_a']:g} A" if c["breaker_a"] is not None else ""
        t.add_row(c["name"], f"{c['poles']}-pole", f"{_va(c['va'])} VA", brk)
    return Group(Text("Not on any phase yet; left out of every figure above."), t)


def text_renderables(data: dict[str, Any], *, ascii_only: bool = False) -> list[RenderableType]:
    """The report's sections as Rich renderables.

    Parameters
    ----------
    data : dict
        From :func:`tri.report.data.report_data` ([A], [V], [VA], [deg], [%]).
    ascii_only : bool
        Avoid non-ASCII characters (bars, angle sign, box lines).

    Returns
    -------
    list of RenderableType
        Print them in order on one console.
    """
    g = Glyphs(ascii_only)
    if ascii_only:
        data = ascii_data(data)
    out: list[RenderableType] = [_heading(data, g)]
    out += [section("Phase and neutral currents (estimate)", g), currents_section(data, g)]
    out += [section("Symmetrical components and current unbalance", g), sequence_section(data, g)]
    out += [section("Voltage at the panel (estimate)", g), voltage_section(data, g)]
    readings = readings_section(data, g)
    if readings is not None:
        out += [section("Site readings against the computed figures", g), readings]
    n = len(data["findings"])
    counts = ", ".join(
        f"{sum(1 for f in data['findings'] if f['level'] == lv)} {lv}"
        for lv in ("limit", "warning", "info")
    )
    out += [section(f"Findings ({n}: {counts})", g), _findings(data, g)]
    wiring = wiring_section(data, g)
    if wiring is not None:
        out += [section("Panel as wired", g), wiring]
    unplaced = _unplaced(data, g)
    if unplaced is not None:
        out += [section("Unplaced circuits", g), unplaced]
    out += [
        section("Caution", g),
        Text(
            data["caution"] + " Limits quoted are common practice or the standards named "
            "beside them."
        ),
    ]
    return out


def print_text(data: dict[str, Any], console: Console) -> None:
    """Print the report on a Rich console (its width, colour and encoding decide the look)."""
    ascii_only = not console.encoding.lower().startswith("utf")
    for item in text_renderables(data, ascii_only=ascii_only):
        console.print(item)


def plain_text(items: Iterable[RenderableType], width: int = WIDTH) -> str:
    """Renderables printed without colour: lines without trailing spaces, ending with a newline."""
    buf = io.StringIO()
    console = Console(
        file=buf, width=width, color_system=None, highlight=False, emoji=False, markup=False
    )
    for item in items:
        console.print(item)
    return "\n".join(line.rstrip() for line in buf.getvalue().splitlines()) + "\n"


def render_text(
    data: dict[str, Any], *, width: int = WIDTH, color: bool = False, ascii_only: bool = False
) -> str:
    """The report as a string.

    Parameters
    ----------
    data : dict
        From :func:`tri.report.data.report_data`.
    width : int
        Line width [columns]; 80 for goldens and files.
    color : bool
        Include ANSI colour and bold codes.
    ascii_only : bool
        Avoid non-ASCII characters.

    Returns
    -------
    str
        Lines without trailing spaces, ending with a newline.
    """
    buf = io.StringIO()
    console = Console(
        file=buf,
        width=width,
        color_system="standard" if color else None,
        force_terminal=color,
        no_color=not color,
        highlight=False,
        emoji=False,
        markup=False,
        legacy_windows=False,
        soft_wrap=False,
    )
    for item in text_renderables(data, ascii_only=ascii_only):
        console.print(item)
    text = buf.getvalue()
    if ascii_only:
        text = to_ascii(text)
    if not color:
        text = "\n".join(line.rstrip() for line in text.splitlines()) + "\n"
    return text
