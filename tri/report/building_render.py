"""Text, Markdown and CSV of a building (data from :func:`tri.report.building.building_data`).

Text and Markdown: the root panel's report as for one panel (its figures
include everything it feeds), then a table of every panel of the building,
then each fed panel's own report under a heading that says where it is fed
from; with scenarios, each panel's report is followed by its figures in
every case of the building (the worst deciding). CSV: one row per circuit
of every panel, the columns of the one-panel CSV with ``panel_file`` first
and ``feeds`` last.
"""

from __future__ import annotations

import csv
import io
from typing import Any

from tri.report.csv_report import COLUMNS, csv_rows
from tri.report.markdown_report import md_escape, render_markdown
from tri.report.text_report import render_text, to_ascii

#: Width of the panel-name, system and figure columns of the text table [columns].
NAME_WIDTH = 22
SYSTEM_WIDTH = 8
FIGURE_WIDTH = 5


def _f(x: float | None, digits: int = 1) -> str:
    return "-" if x is None else f"{x:.{digits}f}"


def _supply_text(p: dict[str, Any]) -> str:
    f = p["feeder"]
    if f is None:
        return "service"
    tx = f["transformer"]
    if tx is None:
        return "feeder"
    return f"{tx['vector_group']} {_f(tx['loading_pct'], 0)}%"


def summary_rows(data: dict[str, Any]) -> list[list[str]]:
    """One row per panel: name (indented by depth), system, phase/neutral RMS, dev, VUF, supply."""
    rows = []
    for p in data["building"]["panels"]:
        r = p["report"]
        rms = [r["phases"][lab]["rms_a"] for lab in r["phase_order"]]
        v = r["voltage"]
        rows.append(
            [
                "  " * p["depth"] + p["name"],
                r["panel"]["system"],
                *(_f(x) for x in rms),
                _f(r["neutral"]["rms_a"]) if r["neutral"]["present"] else "-",
                _f(r["current_unbalance"]["max_deviation_pct"]),
                "-" if v is None else _f(v["vuf_pct"], 2),
                _supply_text(p),
            ]
        )
    return rows


HEAD = ["panel", "system", "A", "B", "C", "N", "dev%", "VUF%", "fed by"]


def _fed_from(p: dict[str, Any]) -> str:
    f = p["feeder"]
    c = f["circuit"]
    where = f"slot {c['slot']}" if c["slot"] is not None else "not placed"
    text = f'Fed from {p["parent"]}, circuit "{c["name"]}" ({where})'
    tx = f["transformer"]
    if tx is not None:
        text += (
            f", through a {tx['kva']:g} kVA {tx['vector_group']} transformer to "
            f"{tx['secondary']}, loaded {_f(tx['loading_pct'])} % of its {_f(tx['rated_a'])} A"
        )
        if tx["delta_circulating_a"] is not None:
            text += f"; {_f(tx['delta_circulating_a'])} A circulates in its delta winding"
    cur = f["current"]
    at_parent = ", ".join(f"{lab} {_f(x['rms_a'])} A" for lab, x in cur.items())
    return (
        f"{text}. Draws at the parent: {at_parent} RMS; feeder neutral {_f(f['neutral_rms_a'])} A."
    )


def _cases_text(report: dict[str, Any]) -> str:
    """A panel's scenario table (empty without scenarios), led by a newline."""
    if not report.get("scenarios"):
        return ""
    from tri.report.over_time_text import render_over_time_text

    return "\n" + render_over_time_text(report).rstrip("\n")


def _cases_markdown(report: dict[str, Any]) -> str:
    """A panel's scenario section in Markdown (empty without scenarios), led by a newline."""
    if not report.get("scenarios"):
        return ""
    from tri.report.over_time_text import render_over_time_markdown

    return "\n" + render_over_time_markdown(report).rstrip("\n")


def render_building_text(data: dict[str, Any], *, ascii_only: bool = False) -> str:
    """The building as plain text, 80 columns.

    Parameters
    ----------
    data : dict
        From :func:`tri.report.building.building_data` ([A], [%]).
    ascii_only : bool
        Avoid non-ASCII characters.

    Returns
    -------
    str
        Ends with a newline.
    """
    import textwrap

    out = [render_text(data, ascii_only=ascii_only).rstrip("\n") + _cases_text(data), ""]
    out.append("Panels in this building (each panel's figures include what it feeds), RMS A")
    cut = "..." if ascii_only else "…"
    for row in [HEAD, *summary_rows(data)]:
        name = row[0] if len(row[0]) <= NAME_WIDTH else row[0][: NAME_WIDTH - len(cut)] + cut
        cells = [name.ljust(NAME_WIDTH), row[1].ljust(SYSTEM_WIDTH)]
        cells += [x.rjust(FIGURE_WIDTH) for x in row[2:8]]
        out.append(" ".join(cells) + "  " + row[8])
    for p in data["building"]["panels"][1:]:
        out += ["", "=" * 78, f"{p['name']} ({p['file']})"]
        out += textwrap.wrap(_fed_from(p), width=78)
        body = render_text(p["report"], ascii_only=ascii_only).rstrip("\n")
        out += ["=" * 78, body + _cases_text(p["report"])]
    text = "\n".join(out) + "\n"
    return to_ascii(text) if ascii_only else text


def render_building_markdown(data: dict[str, Any]) -> str:
    """The building as Markdown: root directory and results, the panel table, each fed panel."""
    out = [render_markdown(data).rstrip("\n") + _cases_markdown(data)]
    out += ["", "## Panels in this building", ""]
    out.append("Each panel's figures include what it feeds (RMS amperes).")
    out.append("")
    out.append("| " + " | ".join(HEAD) + " |")
    out.append("|" + "|".join(["---"] * 2 + ["---:"] * 6 + ["---"]) + "|")
    for row in summary_rows(data):
        name = md_escape(row[0].strip())
        depth = (len(row[0]) - len(row[0].lstrip())) // 2
        cells = [("↳ " * depth) + name, *(md_escape(x) for x in row[1:])]
        out.append("| " + " | ".join(cells) + " |")
    for p in data["building"]["panels"][1:]:
        out += ["", "---", "", md_escape(_fed_from(p)), ""]
        # each fed panel's own directory, one heading level down
        body = render_markdown(p["report"]).rstrip("\n") + _cases_markdown(p["report"])
        body = body.replace("\n#", "\n##")
        out.append("#" + body)
    return "\n".join(out) + "\n"


BUILDING_COLUMNS = ["panel_file", *COLUMNS, "feeds"]


def render_building_csv(data: dict[str, Any]) -> str:
    """Every circuit of every panel as RFC 4180 CSV (CRLF), ``panel_file`` first, ``feeds`` last."""
    buf = io.StringIO(newline="")
    writer = csv.DictWriter(buf, fieldnames=BUILDING_COLUMNS, lineterminator="\r\n")
    writer.writeheader()
    for p in data["building"]["panels"]:
        feeds = [c["feeds"] or "" for c in p["report"]["circuits"]]
        for row, target in zip(csv_rows(p["report"]), feeds, strict=True):
            writer.writerow({"panel_file": p["file"], **row, "feeds": target})
    return buf.getvalue()
