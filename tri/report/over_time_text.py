"""Scenario and log sections of the text and Markdown reports.

Both formats are built from the same lines: ``(heading, rows)`` blocks
drawn from the report dict's ``scenarios`` and ``log`` keys
(:mod:`tri.report.over_time_data`, :mod:`tri.report.log_data`).
"""

from __future__ import annotations

from typing import Any

CASE_FIGURES = (
    ("max_phase_rms_a", "largest phase RMS", "A"),
    ("max_loading_pct", "largest phase loading", "%"),
    ("neutral_rms_a", "neutral RMS", "A"),
    ("max_deviation_pct", "deviation from the mean", "%"),
    ("vuf_pct", "VUF at the panel", "%"),
)


def _v(x: Any, unit: str, digits: int = 1) -> str:
    if x is None:
        return "-"
    return f"{x:.{digits}f} {unit}" if unit != "%" else f"{x:.{digits}f} %"


def scenario_table(d: dict[str, Any]) -> tuple[list[str], list[list[str]]] | None:
    """Header and rows: one row per figure, one column per case, then the deciding case."""
    sc = d.get("scenarios")
    if not sc:
        return None
    names = [c["name"] for c in sc["cases"]]
    header = ["figure", *names, "worst"]
    rows = []
    for key, title, unit in CASE_FIGURES:
        if all(c[key] is None for c in sc["cases"]):
            continue
        worst = sc["worst"].get(key)
        rows.append(
            [title, *(_v(c[key], unit) for c in sc["cases"]), worst["case"] if worst else "-"]
        )
    return header, rows


def log_blocks(d: dict[str, Any]) -> list[tuple[str, list[str]]]:
    """The log section as (heading, lines) blocks of plain sentences and figures."""
    g = d.get("log")
    if not g:
        return []
    labels = d["phase_order"]
    zone = f" ({g['zone']})" if g["zone"] else " (logger's clock, no zone)"
    facts = [
        f"{g['file']}: {g['rows']} rows every {g['interval_s']:g} s, {g['start']} to "
        f"{g['end']}{zone}; {g['recorded_days']:.2f} days recorded of {g['span_days']:.2f}.",
    ]
    gaps, dup = g["gaps"], g["duplicates"]
    facts.append(
        f"Gaps: {gaps['count']} ({gaps['missing_intervals']} intervals missing); duplicate "
        f"times: {dup['count']}"
        + (f" (first at line {dup['first_line']})" if dup["first_line"] else "")
        + "."
    )
    dm = g["demand"]
    demand = [f"Highest {dm['minutes']:g}-minute average ({dm['window']} windows):"]
    for lab in labels:
        demand.append(_demand_line(f"phase {lab}", dm["phases"][lab]))
    if dm["neutral"] is not None:
        demand.append(_demand_line("neutral", dm["neutral"]))
    unb = []
    for key, title in (("deviation_pct", "Deviation from the mean"), ("vuf_pct", "VUF")):
        o = g[key]
        if o is None:
            continue
        weeks = ", ".join(f"{w:.2f}" for w in o["weekly_p95"] if w is not None)
        unb.append(
            f"{title}, {o['aggregate_minutes']:g}-minute values: median {o['p50']:.2f} %, "
            f"95th percentile {o['p95']:.2f} %, 99th {o['p99']:.2f} %, highest "
            f"{o['max']:.2f} %; 95th by week: {weeks} %."
            + (f" Limit {o['limit_pct']:g} % ({o['source']})." if o["limit_pct"] else "")
        )
    c = g["capacity"]
    cap = [
        "Room for added load, NEC 220.87 method: "
        + (
            "a basis."
            if c["is_basis"]
            else "NOT a basis: " + "; ".join(c["not_basis_reasons"]) + "."
        )
    ]
    for lab in labels:
        cap.append(
            f"phase {lab}: {c['factor']:g} x {c['demand_a'][lab]:.1f} A + new "
            f"{c['new_load_a'][lab]:.1f} A = {c['total_a'][lab]:.1f} A of {c['rating_a']:g} A"
        )
    new = ", ".join(c["new_circuits"]) or "none"
    cap.append(
        f"Spare on phase {c['worst_phase']}: {c['spare_a']:.1f} A "
        f"({'within' if c['within_rating'] else 'OVER'} the rating). New circuits counted on "
        f"every phase: {new}."
    )
    sh = g["shares"]
    shares = [
        "Phase shares, logged average against the schedule: "
        + "; ".join(
            f"{lab} {sh['logged_pct'][lab]:.1f} % vs {sh['scheduled_pct'][lab]:.1f} % "
            f"({sh['difference_pts'][lab]:+.1f} pts)"
            for lab in labels
        )
        + f". Most over what the schedule explains: phase {sh['most_over']}."
    ]
    findings = [f"{f['level'].upper()}: {f['message']} [{f['source']}]" for f in g["findings"]]
    blocks = [
        ("Log", facts),
        ("Demand", demand),
        ("Unbalance over time", unb),
        ("Capacity for added load", cap),
        ("Log against schedule", shares),
    ]
    if findings:
        blocks.append(("Log findings", findings))
    return blocks


def _demand_line(name: str, ch: dict[str, Any]) -> str:
    if ch["a"] is None:
        return f"{name}: no complete window"
    load = f", {ch['loading_pct']:.1f} % of rating" if ch["loading_pct"] is not None else ""
    return (
        f"{name}: {ch['a']:.1f} A from {ch['start']} to {ch['end']}{load} (average "
        f"{ch['mean_a']:.1f} A, highest interval {ch['max_interval_a']:.1f} A)"
    )


def render_over_time_text(d: dict[str, Any], width: int = 80) -> str:
    """Plain-text sections (empty when there are no scenarios and no log)."""
    import textwrap

    lines: list[str] = []
    table = scenario_table(d)
    if table:
        header, rows = table
        widths = [max(len(r[i]) for r in [header, *rows]) for i in range(len(header))]
        lines += ["", "SCENARIOS (use factors; the worst case decides)"]
        for r in [header, *rows]:
            lines.append("  " + "  ".join(cell.ljust(w) for cell, w in zip(r, widths, strict=True)))
    for heading, body in log_blocks(d):
        lines += ["", heading.upper()]
        for item in body:
            lines += textwrap.wrap(item, width=width, initial_indent="  ", subsequent_indent="    ")
    return "\n".join(lines) + ("\n" if lines else "")


def _md(text: str) -> str:
    return text.replace("|", "\\|").replace("*", "\\*").replace("_", "\\_")


def render_over_time_markdown(d: dict[str, Any], images: dict[str, str] | None = None) -> str:
    """Markdown sections, with the pictures' file names when they were written."""
    out: list[str] = []
    table = scenario_table(d)
    if table:
        header, rows = table
        out += ["", "## Scenarios", "", "Use factors per scenario; the worst case decides.", ""]
        out.append("| " + " | ".join(_md(h) for h in header) + " |")
        out.append("|" + "---|" * len(header))
        out += ["| " + " | ".join(_md(c) for c in r) + " |" for r in rows]
    blocks = log_blocks(d)
    if blocks:
        out += ["", "## Loads over time"]
        if images:
            out += [""]
            out += [f"![{_md(alt)}]({name})" for alt, name in images.items()]
        elif d.get("log"):
            out += ["", "(Pictures are written beside the report with `--output FILE.md`.)"]
        for heading, body in blocks:
            out += ["", f"### {heading}", ""]
            out += [f"- {_md(item)}" for item in body]
    return "\n".join(out) + ("\n" if out else "")
