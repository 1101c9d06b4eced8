"""Terminal report section for panels as they are wired (issue 12).

Shared neutrals with their current, breakers with one load per leg with
each leg and each pole's current, the high leg, spares and spaces, and RCD
groups. Drawn from :mod:`tri.report.wiring_data`'s keys of the report
dict; fits 80 columns. :func:`wiring_section` returns ``None`` for a panel
that uses none of these features, so other reports are unchanged.
"""

from __future__ import annotations

from typing import Any

from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text


def _amps(x: float | None) -> str:
    return "–" if x is None else f"{x:.1f}"


def _where(c: dict[str, Any]) -> str:
    return f"slot {c['slot']}" if c["slot"] is not None else f"no. {c['number']}"


def has_wiring(d: dict[str, Any]) -> bool:
    """True when the report has shared neutrals, multi-leg breakers, a high leg, spares or RCDs."""
    return bool(
        d["shared_neutrals"]
        or d["panel"]["high_leg"]
        or d["directory"]["spares"]
        or d["directory"]["fed_from"]
        or d["rcds"]
        or any(c["pole_currents"] for c in d["circuits"])
    )


def _neutrals(d: dict[str, Any], g: Any) -> Table:
    t = Table(box=g.box, show_edge=False, pad_edge=False, padding=(0, 1))
    t.add_column("Shared neutral", max_width=30)
    t.add_column("Legs")
    t.add_column("Trip")
    t.add_column("Fund. A", justify="right")
    t.add_column("RMS A", justify="right")
    for n in d["shared_neutrals"]:
        where = ", ".join(str(s) for s in n["slots"]) or ", ".join(map(str, n["circuits"]))
        t.add_row(
            n["name"],
            f"{n['phases']} ({'slots ' if n['slots'] else 'no. '}{where})",
            "common" if n["common_trip"] else "SEPARATE",
            _amps(n["current_a"]),
            _amps(n["rms_a"]),
        )
    return t


def _legs(d: dict[str, Any], g: Any) -> Table:
    """One row per leg: the breaker, the leg's phases, VA and current, and each pole's current."""
    t = Table(box=g.box, show_edge=False, pad_edge=False, padding=(0, 1))
    t.add_column("Breaker with a load per leg", max_width=34)
    t.add_column("Leg")
    t.add_column("VA", justify="right")
    t.add_column("RMS A", justify="right")
    t.add_column("Pole")
    t.add_column("RMS A", justify="right")
    for c in d["circuits"]:
        if not c["pole_currents"]:
            continue
        poles = list(c["pole_currents"].items())
        for k in range(max(len(c["legs"]), len(poles))):
            leg = c["legs"][k] if k < len(c["legs"]) else None
            pole = poles[k] if k < len(poles) else None
            t.add_row(
                f"{c['name']} ({_where(c)})" if k == 0 else "",
                leg["phases"] if leg else "",
                f"{leg['va']:,.0f}" if leg else "",
                _amps(leg["rms_a"]) if leg else "",
                pole[0] if pole else "",
                _amps(pole[1]["rms_a"]) if pole else "",
            )
    return t


def _directory(d: dict[str, Any]) -> Text:
    p = d["panel"]
    out = Text()
    if p["high_leg"]:
        out.append(
            f"High leg: {p['high_leg']}, {p['high_leg_to_neutral_v']:.0f} V to neutral "
            "(no 120 V loads on it).\n",
            style="bold",
        )
    if d["directory"]["fed_from"]:
        out.append(f"Fed from: {d['directory']['fed_from']}.\n")
    spares = d["directory"]["spares"]
    if spares:
        out.append(
            "Spares (breaker, nothing connected): "
            + ", ".join(f"slot {s['slot']}" if s["slot"] is not None else s["name"] for s in spares)
            + ".\n"
        )
    spaces = d["directory"]["spaces"]
    if spaces:
        out.append(f"Spaces (no breaker): {', '.join(map(str, spaces))}.\n")
    for r in d["rcds"]:
        on = f" on {r['phase']}" if r["phase"] else ""
        names = ", ".join(str(n) for n in r["circuits"]) or "none"
        out.append(f"RCD {r['name']} ({r['poles']}-pole{on}): circuits no. {names}.\n")
    out.rstrip()
    return out


def wiring_section(d: dict[str, Any], g: Any) -> RenderableType | None:
    """The "Panel as wired" section, or ``None`` when nothing in it applies.

    Parameters
    ----------
    d : dict
        The report dict (:func:`tri.report.data.report_data`), [A], [VA].
    g : object
        The text report's glyphs (``box`` for tables).
    """
    if not has_wiring(d):
        return None
    parts: list[RenderableType] = [_directory(d)]
    if d["shared_neutrals"]:
        parts += [Text(""), _neutrals(d, g)]
    if any(c["pole_currents"] for c in d["circuits"]):
        parts += [Text(""), _legs(d, g)]
    return Group(*parts)
