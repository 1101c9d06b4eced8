"""Markdown pieces for panels as they are wired (issue 12): marks, facts, shared neutrals.

The printable directory names spares and spaces, marks circuits that share
a neutral (``N``), carry a neutral on a multi-pole breaker (``N``) or sit on
the high leg (``H``), prints the source marking (``fed_from``, NEC 408.4(B),
from memory) and the high leg among the panel facts, and lists each shared
neutral with its current. The functions take the report dict of
:func:`tri.report.data.report_data` and return Markdown lines or cells.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from tri.words import plural

#: Legend of the wiring marks, appended to the directory's note.
MARKS_LEGEND = (
    " N shares a neutral (a multi-wire branch circuit: a breaker with a neutral, or "
    "single-pole breakers named in one shared neutral), H a pole on the high leg."
)


def wiring_marks(c: dict[str, Any]) -> list[str]:
    """Extra directory marks of one circuit: ``N NAME``, ``N``, ``H``, ``spare``."""
    m = []
    if c["shared_neutral"]:
        m.append(f"N {c['shared_neutral']}")
    elif c["neutral"]:
        m.append("N")
    if c["on_high_leg"]:
        m.append("H")
    return m


def panel_facts(d: dict[str, Any], esc: Callable[[str], str]) -> list[list[str]]:
    """Rows for the panel-facts table: high leg, column order, source, reach limit."""
    p = d["panel"]
    rows = []
    if p["high_leg"]:
        rows.append(
            [
                "High leg",
                f"{esc(p['high_leg'])}, {p['high_leg_to_neutral_v']:.0f} V to neutral "
                "(marked orange; no 120 V loads on it)",
            ]
        )
    if p["fed_from"]:
        rows.append(["Fed from", esc(p["fed_from"])])
    if p["max_row_shift"] is not None:
        rows.append(["Reach", f"a breaker's conductors reach {plural(p['max_row_shift'], 'row')}"])
    return rows


def rows_text(d: dict[str, Any]) -> str:
    """How the rows read: ``rows A-B-C from the top`` or the C-B-A right column."""
    if d["panel"]["right_column"] == "CBA":
        return "left column rows A-B-C, right column C-B-A, from the top"
    return "two columns, rows A-B-C from the top"


def row_phase(left: str, right: str | None, high_leg: str | None = None) -> str:
    """The middle cell of a directory row: one phase, or both when the columns differ.

    The high leg of a high-leg delta is written ``B (high)``.
    """

    def mark(label: str) -> str:
        return f"{label} (high)" if label == high_leg else label

    return mark(left) if right is None or right == left else f"{mark(left)} / {mark(right)}"


def spare_or_space(c: dict[str, Any] | None) -> str | None:
    """``(space)`` for an empty slot, ``spare`` suffix text for a spare, else ``None``."""
    if c is None:
        return "(space)"
    return " (spare)" if c["spare"] else None


def leg_load_text(c: dict[str, Any]) -> str | None:
    """``1,920 + 800 VA per leg (A, B)`` for a breaker with a load per leg, else ``None``."""
    if not c["pole_currents"]:
        return None
    load = c["load"]
    values = load["legs"] or [load["value"]] * len(c["legs"])
    phases = ", ".join(x["phases"] for x in c["legs"])
    return " + ".join(f"{v:,g}" for v in values) + f" {load['unit']} per leg ({phases})"


def shared_neutrals(
    d: dict[str, Any], esc: Callable[[str], str], table: Callable[..., list[str]]
) -> list[str]:
    """The "Shared neutrals" section (empty when the panel has none)."""
    groups = d["shared_neutrals"]
    if not groups:
        return []
    rows = []
    for n in groups:
        where = (
            ", ".join(map(str, n["slots"])) if n["slots"] else ", ".join(map(str, n["circuits"]))
        )
        rows.append(
            [
                esc(n["name"]),
                esc(n["phases"]),
                ("slots " if n["slots"] else "no. ") + where,
                "common trip" if n["common_trip"] else "**separate** (NEC 210.4(B))",
                f"{n['current_a']:.1f}",
                f"{n['rms_a']:.1f}",
            ]
        )
    return [
        "",
        "## Shared neutrals",
        "",
        "Each neutral shared by several legs, with the current it carries (the phasor sum "
        "of its legs at every harmonic order; legs on distinct phases).",
        "",
        *table(["Neutral", "Phases", "Where", "Trip", "Fund. A", "RMS A"], rows, "llllrr"),
    ]


def rcd_lines(d: dict[str, Any], esc: Callable[[str], str]) -> list[str]:
    """RCD groups of a rail board, one bullet each."""
    out = []
    for r in d["rcds"]:
        on = f" on {esc(r['phase'])}" if r["phase"] else ""
        names = ", ".join(str(n) for n in r["circuits"]) or "none"
        out.append(f"- RCD {esc(r['name'])} ({r['poles']}-pole{on}): circuits no. {names}.")
    return ["", "RCD groups:", "", *out] if out else []
