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

This module owns the document's order and the results (4, 5); the directory
(1-3) is :mod:`tri.report.markdown_directory`, the escaping and tables
:mod:`tri.report.markdown_parts`, the wiring's words
:mod:`tri.report.wiring_markdown`.
"""

from __future__ import annotations

from typing import Any

from tri.report.data import line_labels
from tri.report.markdown_directory import directory, loads_table, panel_facts
from tri.report.markdown_parts import md_escape
from tri.report.markdown_parts import md_figure as _f
from tri.report.markdown_parts import md_table as _table
from tri.report.markdown_parts import md_va as _va
from tri.report.numbers import fixed
from tri.words import plural

#: Re-exported: the building report and the tests import it here.
__all__ = ["md_escape", "render_markdown"]


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
        *panel_facts(data),
        "",
        *directory(data),
        "",
        *loads_table(data),
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
