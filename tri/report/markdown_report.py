"""Markdown report: the printable panel directory, then the figures and the caution.

Layout
------
1. Panel facts (supply, ratings, spaces, schedule file).
2. The circuit directory. Two-column panels are drawn as the panel looks:
   one row per pair of slots, odd slots on the left, even on the right, the
   row's phase in the middle; the second and third poles of a breaker say
   whose pole they are. Rail boards (layout ``phases``) list circuits by
   phase: each phase's line-to-neutral circuits, then line-to-line, then
   three-phase ones. Every circuit shows its purpose (name), poles, breaker
   and scheduled load; marks: ``C`` continuous, ``L`` locked. NEC 408.4
   asks for a directory that identifies each circuit by its purpose (from
   memory; local code governs).
3. Loads and currents per circuit (load as written, VA, line currents).
4. Results: per-phase and neutral currents and loading, unbalance, voltage
   at the panel (when a ``[supply]`` is described), site readings, findings
   with their sources, unplaced circuits.
5. The safety caution and blank "checked by / date" lines for the printout.

All user and engine text is escaped so that it cannot break a table or
start emphasis. Output is deterministic (no date or version) so that golden
files compare byte for byte.
"""

from __future__ import annotations

from typing import Any

from tri.report import wiring_markdown as wm
from tri.report.data import is_two_column, line_labels
from tri.report.numbers import fixed
from tri.schedule.slots import slot_phase
from tri.words import plural

_SPECIAL = "\\`*_[]<>|#~"


def md_escape(text: str) -> str:
    """Text safe inside a Markdown table cell or paragraph (special characters escaped)."""
    out = "".join("\\" + ch if ch in _SPECIAL else ch for ch in text)
    return out.replace("\n", " ").replace("\r", " ")


def _f(x: float | None, digits: int = 1) -> str:
    return fixed(x, digits)


def _va(x: float | None) -> str:
    return "–" if x is None else f"{x:,.0f}"


def _amps(x: float | None) -> str:
    return "" if x is None else f"{x:g} A"


def _table(head: list[str], rows: list[list[str]], align: str | None = None) -> list[str]:
    """A Markdown pipe table; ``align`` gives ``l``/``r``/``c`` per column."""
    align = align or "l" * len(head)
    marks = {"l": "---", "r": "---:", "c": ":---:"}
    out = ["| " + " | ".join(head) + " |", "|" + "|".join(marks[a] for a in align) + "|"]
    out += ["| " + " | ".join(r) + " |" for r in rows]
    return out


def _marks(c: dict[str, Any]) -> str:
    m = [x for x, on in (("C", c["continuous"]), ("L", c["locked"])) if on]
    m += wm.wiring_marks(c)
    return f" ({md_escape(', '.join(m))})" if m else ""


def _load_text(c: dict[str, Any]) -> str:
    load = c["load"]
    text = f"{load['value']:,g} {load['unit']}"
    legs = wm.leg_load_text(c)
    if legs is not None:
        text = legs
    if load["unit"] != "VA" or c["pf"] != 1:
        text += f", pf {c['pf']:g}" + (" leading" if c["leading"] else "")
    return text


def _panel_facts(d: dict[str, Any]) -> list[str]:
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


def _directory(d: dict[str, Any]) -> list[str]:
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


def _loads(d: dict[str, Any]) -> list[str]:
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


def _results(d: dict[str, Any]) -> list[str]:
    p = d["panel"]
    labels = d["phase_order"]
    ph = d["phases"]
    n = d["neutral"]
    cols = [*labels, "N"] if n["present"] else list(labels)

    def row(name: str, key: str, digits: int, neutral: str | None = None) -> list[str]:
        cells = [_f(ph[lab][key], digits) if key != "va" else _va(ph[lab]["va"]) for lab in labels]
        if n["present"]:
            cells.append(neutral if neutral is not None else "–")
        return [name, *cells]

    rating = f"{p['rating_a']:g} A {p['rating_basis']}"
    rows = [
        row("Scheduled VA", "va", 0),
        row("Fundamental current, A", "current_a", 1, _f(n["current_a"])),
        row("Angle, deg", "current_deg", 1, _f(n["current_deg"])),
        row("RMS current, A", "rms_a", 1, _f(n["rms_a"])),
        row("THD, %", "thd_pct", 1),
        row(
            f"Loading, % (phases of {rating}"
            + (f"; N of {n['rating_a']:g} A)" if n["present"] else ")"),
            "loading_pct",
            1,
            _f(n["loading_pct"]),
        ),
        [
            "Status (OVER above 100 %, NEAR above "
            f"{d['basis']['headroom_pct']:g} % design headroom)",
            *[ph[lab]["status"] for lab in labels],
            *([n["status"]] if n["present"] else []),
        ],
        row(
            "Calculated load, A (the code's sizing rule; N: the maximum unbalanced load, "
            "NEC 220.61)",
            "calculated_a",
            1,
            _f(n["calculated_a"]),
        ),
        row(f"Calculated load, % of {p['rating_a']:g} A", "calculated_pct", 1),
    ]
    cu = d["current_unbalance"]
    s = d["sequence"]
    out = [
        "## Results (estimate)",
        "",
        f"Estimates from the schedule, not measurements. Currents at {d['basis']['currents']}. "
        "Scheduled VA: all of each 1-pole circuit, half of each 2-pole, a third of each 3-pole "
        "(schedule bookkeeping, not \\|I\\|·V). RMS includes harmonics; fundamental at "
        f"{p['frequency_hz']:g} Hz.",
        "",
        *_table(["", *cols], rows, "l" + "r" * len(cols)),
        "",
        f"- {_sizing(d)}",
        f"- Symmetrical components of the fundamental (phase {labels[0]} reference): "
        f"I0 {s['i0']['a']:.2f} A ∠{_f(s['i0']['deg'])}°, I1 {s['i1']['a']:.2f} A "
        f"∠{_f(s['i1']['deg'])}°, I2 {s['i2']['a']:.2f} A ∠{_f(s['i2']['deg'])}°.",
        f"- Current unbalance \\|I2\\|/\\|I1\\|: {cu['negative_sequence_pct']:.1f} %; "
        f"\\|I0\\|/\\|I1\\|: {cu['zero_sequence_pct']:.1f} %.",
        f"- Largest deviation of a phase RMS current from the mean of the three: "
        f"{cu['max_deviation_pct']:.1f} % (\\|I − mean\\| / mean, the NEMA definition); "
        f"(max − min) / mean, as many meters show: {cu['max_minus_min_pct']:.1f} %.",
    ]
    if n["present"]:
        out.append(
            f"- Neutral RMS is {n['ratio_to_max_phase']:.2f} × the largest phase; "
            f"{d['nonlinear_share_pct']:.0f} % of the connected VA is non-linear, "
            f"{d['nonlinear_ln_share_pct']:.0f} % line-to-neutral. The code's neutral load "
            f"(NEC 220.61, the largest line-to-neutral load on one phase) is "
            f"{_f(n['calculated_a'])} A: size the neutral from it and the harmonics, not from "
            "the phasor sum."
        )
    return out


def _sizing(d: dict[str, Any]) -> str:
    p = d["panel"]
    z = d["sizing"]
    breakers = (
        f" Breakers: {plural(z['breakers_rated'], 'circuit')} with a rating judged the same way "
        f"({z['breaker_clause']}), {z['breakers_over']} over."
        if z["breakers_rated"]
        else " No circuit gives a breaker rating."
    )
    return (
        f"Sizing rule: the calculated load is the {z['per_phase']}, "
        f"{z['method']}, against the {p['rating_a']:g} A {md_escape(p['rating_basis'])} "
        f"({z['clause']})." + breakers
    )


def _voltage(d: dict[str, Any]) -> list[str]:
    v = d["voltage"]
    out = ["## Voltage at the panel (estimate)", ""]
    if v is None:
        return [*out, "Not computed: the schedule has no `[supply]` table."]
    s = d["supply"]
    labels = d["phase_order"]
    lines = line_labels(tuple(labels))
    rows = []
    for lab, ll in zip(labels, lines, strict=True):
        pv, lv = v["phase_v"][lab], v["line_v"][ll]
        rows.append(
            [
                md_escape(lab),
                f"{pv['v']:.1f} V ∠{_f(pv['deg'])}°",
                f"{_f(v['drop_pct'][lab], 2)} %",
                md_escape(ll),
                f"{lv['v']:.1f} V ∠{_f(lv['deg'])}°",
            ]
        )
    basis = (
        f"loads iterated at the panel voltage ({v['iterations']} iterations)"
        if v["iterated"]
        else "currents at nominal voltage"
    )
    der = v["motor_derating"]
    pdev = v["phase_deviation_pct"]
    return [
        *out,
        (
            f"From the `[supply]` table: transformer {s['transformer_kva']:g} kVA, "
            f"{s['transformer_z_pct']:g} %, X/R {s['transformer_x_r']:g}; feeder "
            f"{s['feeder_length_m']:g} m; {basis}."
            if s is not None
            else f"Through what feeds it: {md_escape(str(v.get('source')))}; {basis}."
        ),
        "",
        *_table(["Phase", "Phase voltage", "Drop", "Line", "Line voltage"], rows, "lrrlr"),
        "",
        f"- VUF \\|V2\\|/\\|V1\\| of the line voltages (IEC 61000-4-30): {v['vuf_pct']:.2f} %. "
        "EN 50160's 2 % is a weekly statistic of 10-minute values at the supply terminals, and "
        "ANSI C84.1's 3 % and voltage ranges apply at the service: figures computed at the "
        "panel are indicative.",
        f"- Line-voltage deviation rate (NEMA MG 1): {v['line_deviation_pct']:.2f} %; "
        "phase-voltage deviation rate: " + ("–" if pdev is None else f"{pdev:.2f} %") + ".",
        "- Motor derating (NEMA MG 1 Part 14 curve): "
        + ("operation not recommended above 5 %" if der is None else f"{der:.2f}")
        + ".",
    ]


def _readings(d: dict[str, Any]) -> list[str]:
    r = d["readings"]
    if r is None:
        return []
    rows = []
    for lab in d["phase_order"]:
        x = r["phases"][lab]
        diff = x["difference_pct"]
        rows.append(
            [
                md_escape(lab),
                _f(x["measured_a"]),
                _f(x["computed_rms_a"]),
                "–" if diff is None else f"{fixed(diff, 1, signed=True)} %",
            ]
        )
    if d["neutral"]["present"]:
        x = r["neutral"]
        diff = x["difference_pct"]
        rows.append(
            [
                "N",
                _f(x["measured_a"]),
                _f(x["computed_rms_a"]) + f" (fund. {_f(x['computed_current_a'])})",
                "–" if diff is None else f"{fixed(diff, 1, signed=True)} %",
            ]
        )
    out = ["## Site readings against the computed figures", ""]
    if r["taken"]:
        out += [f"Taken: {md_escape(r['taken'])}.", ""]
    out += _table(["Conductor", "Measured A", "Computed RMS A", "Difference"], rows, "lrrr")
    vll = {k: x for k, x in r["volts_ll"].items() if x is not None}
    if vll:
        out += [
            "",
            "- Measured line voltages: "
            + ", ".join(f"{md_escape(k)} {x:g} V" for k, x in vll.items())
            + ".",
        ]
    vln = {k: x for k, x in r["volts_ln"].items() if x is not None}
    if vln:
        out.append(
            "- Measured phase voltages: "
            + ", ".join(f"{md_escape(k)} {x:g} V" for k, x in vln.items())
            + (
                ""
                if r["phase_deviation_pct"] is None
                else f" (deviation rate {r['phase_deviation_pct']:.2f} %)"
            )
            + "."
        )
    if r["vuf_pct"] is not None:
        comp = r["computed_vuf_pct"]
        out.append(
            f"- Measured VUF {r['vuf_pct']:.2f} % (from the three magnitudes, IEC 61000-4-30)"
            + ("" if comp is None else f"; computed {comp:.2f} %")
            + f"; line-voltage deviation rate {r['line_deviation_pct']:.2f} % (NEMA MG 1)."
        )
    return ["", *out]


def _findings(d: dict[str, Any]) -> list[str]:
    out = ["## Findings", ""]
    if not d["findings"]:
        return [*out, "None: no rating, balance or voltage rule is crossed at these figures."]
    for f in d["findings"]:
        out.append(
            f"- **{f['level'].upper()}**: {md_escape(f['message'])} "
            f"*Source: {md_escape(f['source'])}.*"
        )
    return out


def _unplaced(d: dict[str, Any]) -> list[str]:
    rows = [c for c in d["circuits"] if not c["placed"]]
    if not rows:
        return []
    out = ["", "## Unplaced circuits", "", "Not on any phase yet; left out of every figure.", ""]
    for c in rows:
        brk = f", breaker {c['breaker_a']:g} A" if c["breaker_a"] is not None else ""
        out.append(f"- {md_escape(c['name'])}: {c['poles']}-pole, {_va(c['va'])} VA{brk}.")
    return out


def render_markdown(data: dict[str, Any]) -> str:
    """The printable panel directory with results and caution, as Markdown.

    Parameters
    ----------
    data : dict
        From :func:`tri.report.data.report_data` ([A], [V], [VA], [deg], [%]).

    Returns
    -------
    str
        CommonMark with pipe tables (GitHub style), ending with a newline.
    """
    lines = [
        f"# Panel directory: {md_escape(data['panel']['name'])}",
        "",
        *_panel_facts(data),
        "",
        *_directory(data),
        "",
        *_loads(data),
        "",
        *_results(data),
        "",
        *_voltage(data),
        *_readings(data),
        "",
        *_findings(data),
        *_unplaced(data),
        "",
        "## Caution",
        "",
        md_escape(data["caution"]),
        "",
        "Directory checked against the panel by: ____________________  Date: ____________",
    ]
    return "\n".join(lines) + "\n"
