"""The printable panel directory in Markdown: the panel facts, the circuit
directory drawn as the panel looks (two-column: a row per pair of slots;
rail boards: by phase) and the loads and currents per circuit. See
:mod:`tri.report.markdown_report` for the layout of the whole document.
"""

from __future__ import annotations

from typing import Any

from tri.report import wiring_markdown as wm
from tri.report.data import is_two_column
from tri.report.markdown_parts import md_amps as _amps
from tri.report.markdown_parts import md_escape
from tri.report.markdown_parts import md_figure as _f
from tri.report.markdown_parts import md_table as _table
from tri.report.markdown_parts import md_va as _va
from tri.schedule.slots import slot_phase


def _marks(c: dict[str, Any]) -> str:
    """The circuit's marks (continuous, locked, wiring) in parentheses, or nothing."""
    m = [x for x, on in (("C", c["continuous"]), ("L", c["locked"])) if on]
    m += wm.wiring_marks(c)
    return f" ({md_escape(', '.join(m))})" if m else ""


def _load_text(c: dict[str, Any]) -> str:
    """The load as scheduled, with its unit and power factor."""
    load = c["load"]
    text = f"{load['value']:,g} {load['unit']}"
    legs = wm.leg_load_text(c)
    if legs is not None:
        text = legs
    if load["unit"] != "VA" or c["pf"] != 1:
        text += f", pf {c['pf']:g}" + (" leading" if c["leading"] else "")
    return text


def panel_facts(d: dict[str, Any]) -> list[str]:
    """Supply, ratings, spaces and schedule file, as a two-column table."""
    p = d["panel"]
    main = f"{p['main_a']:g} A main breaker" if p["main_a"] is not None else "main lugs only"
    volts = f"{p['v_ll']:g} V line-to-line"
    if p["v_ln"] is not None:
        volts += f", {p['v_ln']:g} V line-to-neutral"
    rows = [
        ["Supply", f"{md_escape(p['system'])}: {volts}, {p['wiring']}, {p['frequency_hz']:g} Hz"],
        ["Bus rating", f"{p['bus_a']:g} A"],
        ["Main", main],
        ["Neutral", f"{p['neutral_a']:g} A" if p["neutral_a"] is not None else "none (3-wire)"],
        [
            "Spaces",
            f"{p['spaces']} (" + (wm.rows_text(d) if is_two_column(d) else "rail board") + ")",
        ],
        *wm.panel_facts(d, md_escape),
    ]
    if p["file"]:
        rows.append(["Schedule file", f"`{p['file']}`"])
    return _table(["Panel", md_escape(p["name"])], rows)


def _slot_cells(
    d: dict[str, Any], slot: int, owner: dict[int, tuple[dict[str, Any], int]]
) -> list[str]:
    """(circuit, poles, breaker, VA) cells for one slot."""
    if slot > d["panel"]["spaces"]:
        return ["", "", "", ""]
    if slot not in owner:
        return [wm.spare_or_space(None) or "", "", "", ""]
    c, k = owner[slot]
    name = md_escape(c["name"])
    if k == 0:
        name += _marks(c) + (wm.spare_or_space(c) or "")
        return [name, str(c["poles"]), _amps(c["breaker_a"]), _va(c["va"])]
    nth = {1: "2nd", 2: "3rd"}[k]
    return [f"{nth} pole of {name}", "", "", ""]


def _two_column(d: dict[str, Any]) -> list[str]:
    labels = d["phase_order"]
    owner: dict[int, tuple[dict[str, Any], int]] = {}
    for c in d["circuits"]:
        for k, s in enumerate(c["slots"]):
            owner[s] = (c, k)
    rows = []
    spaces = d["panel"]["spaces"]
    for r in range(1, (spaces + 1) // 2 + 1):
        left, right = 2 * r - 1, 2 * r
        lc = _slot_cells(d, left, owner)
        rc = _slot_cells(d, right, owner)
        right_no = str(right) if right <= spaces else ""
        order = d["panel"]["right_column"]
        on_right = labels[slot_phase(right, order)] if right <= spaces else None
        middle = wm.row_phase(labels[slot_phase(left)], on_right, d["panel"]["high_leg"])
        rows.append([str(left), *lc, middle, *reversed(rc), right_no])
    head = ["Slot", "Circuit", "Poles", "Breaker", "VA", "Phase"]
    head += ["VA", "Breaker", "Poles", "Circuit", "Slot"]
    return _table(head, rows, "rlrrrcrrrlr")


def _rail(d: dict[str, Any]) -> list[str]:
    labels = d["phase_order"]
    placed = [c for c in d["circuits"] if c["placed"]]
    groups: list[tuple[str, list[dict[str, Any]]]] = []
    for lab in labels:
        groups.append((f"{lab} to neutral", [c for c in placed if c["phases"] == lab]))
    groups.append(("Line to line (2-pole)", [c for c in placed if c["poles"] == 2]))
    groups.append(("Three-phase (3-pole)", [c for c in placed if c["poles"] == 3]))
    out: list[str] = []
    for title, rows in groups:
        if not rows:
            continue
        out += ["", f"### {md_escape(title)}", ""]
        out += _table(
            ["No.", "Phases", "Circuit", "Poles", "Breaker", "VA"],
            [
                [
                    str(c["number"]),
                    md_escape(c["phases"]),
                    md_escape(c["name"]) + _marks(c),
                    str(c["poles"]),
                    _amps(c["breaker_a"]),
                    _va(c["va"]),
                ]
                for c in rows
            ],
            "rllrrr",
        )
    return out


def directory(d: dict[str, Any]) -> list[str]:
    out = [
        "## Circuit directory",
        "",
        "Each circuit is identified by its purpose (NEC 408.4 asks for such a directory; "
        "from memory, local code governs). VA is the scheduled load of the whole circuit. "
        "Marks: C continuous load (3 h or more), L locked (do not move)."
        + (wm.MARKS_LEGEND if _uses_wiring_marks(d) else ""),
    ]
    if is_two_column(d):
        out += [
            "",
            "Odd slots on the left, even on the right, from the top; each row is on the "
            "phase shown in the middle. A 2-pole breaker takes two rows of one column, a "
            "3-pole three.",
            "",
            *_two_column(d),
        ]
    else:
        out += ["", "Rail board: circuits by the phases they connect to.", *_rail(d)]
        out += wm.rcd_lines(d, md_escape)
    out += wm.shared_neutrals(d, md_escape, _table)
    notes = [c for c in d["circuits"] if c["note"]]
    if notes:
        out += ["", "Notes:", ""]
        for c in notes:
            where = f"slot {c['slot']}" if c["slot"] is not None else f"no. {c['number']}"
            out.append(f"- {where}, {md_escape(c['name'])}: {md_escape(c['note'])}")
    return out


def _uses_wiring_marks(d: dict[str, Any]) -> bool:
    return any(wm.wiring_marks(c) for c in d["circuits"])


def loads_table(d: dict[str, Any]) -> list[str]:
    """Each circuit's load as written, VA and line currents [VA], [A]."""
    rows = []
    order = sorted(d["circuits"], key=lambda c: (c["slot"] is None, c["slot"] or 0, c["number"]))
    for c in order:
        if is_two_column(d):
            where = str(c["slot"]) if c["slot"] is not None else "–"
        else:
            where = str(c["number"])
        rows.append(
            [
                where,
                md_escape(c["name"]),
                md_escape(c["phases"]) if c["phases"] else "unplaced",
                md_escape(_load_text(c)),
                _va(c["va"]),
                _f(c["current_a"]),
                _f(c["rms_a"]),
                md_escape(c["profile"]),
            ]
        )
    head = ["Slot" if is_two_column(d) else "No.", "Circuit", "Phases", "Load as scheduled"]
    head += ["VA", "Line A (fund.)", "RMS A", "Harmonic profile"]
    return [
        "## Loads and currents per circuit",
        "",
        f"Line currents at {d['basis']['currents']}; RMS includes the circuit's harmonic "
        "profile (3-pole circuits without triplen orders). Unplaced circuits carry no current "
        "here.",
        "",
        *_table(head, rows, "rlllrrrl"),
    ]
