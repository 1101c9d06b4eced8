"""The log's figures in a few lines under the picture, read from the report's ``log`` data.

Every figure here is a value of :func:`tri.report.log_data.log_data` (the
dict ``tri report --format json`` prints under ``log``), worded as the
report words it: demand per phase with its time, the NEC 220.87 capacity
with "NOT a basis" and its reasons when the log cannot be one, the logged
shares against the schedule's, and the percentiles over time. The whole
report text is one Tab away (the figures view). No textual here.
"""

from __future__ import annotations

from typing import Any

from rich.text import Text

from tri.tui.wording import plural


def _clock(text: str | None, year: bool = False) -> str:
    """``"2024-05-10 21:55-05:00"`` shown as ``"05-10 21:55"`` (no zone; the year when asked)."""
    if not text:
        return "-"
    date, _, time = text.partition(" ")
    return f"{date if year else date[5:]} {time[:5]}"


def demand_lines(g: dict[str, Any], labels: list[str], width: int = 78) -> list[Text]:
    """Highest demand of each phase and the neutral, its share of the rating and when.

    As many channels on a line as ``width`` [cells] holds (two at 80 columns).
    """
    dm = g["demand"]
    year = g["span_days"] > 300
    head = f"Demand {dm['minutes']:g} min {dm['window']}: "
    items = []
    channels = [(lab, dm["phases"][lab]) for lab in labels]
    if dm["neutral"] is not None:
        channels.append(("N", dm["neutral"]))
    for name, ch in channels:
        t = Text()
        t.append(name, style="bold")
        if ch["a"] is None:
            t.append(" no complete window")
        else:
            load = f" {ch['loading_pct']:.0f} %" if ch["loading_pct"] is not None else ""
            t.append(f" {ch['a']:.1f} A{load} {_clock(ch['start'], year)}")
        items.append(t)
    per = max(2, (width - len(head)) // (max(i.cell_len for i in items) + 3))
    lines = []
    for k in range(0, len(items), per):
        t = Text(head if k == 0 else " " * len(head), style="bold" if k == 0 else "")
        for j, item in enumerate(items[k : k + per]):
            t.append(" · " if j else "")
            t.append_text(item)
        lines.append(t)
    return lines


def capacity_lines(g: dict[str, Any], labels: list[str]) -> list[Text]:
    """NEC 220.87: a basis or not (with the report's reasons), and each phase's total."""
    c = g["capacity"]
    t = Text("NEC 220.87: ", style="bold")
    if c["is_basis"]:
        t.append("a basis.")
    else:
        t.append("NOT a basis", style="bold")
        t.append(", for information only: " + "; ".join(c["not_basis_reasons"]) + ".")
    totals = " ".join(f"{lab} {c['total_a'][lab]:.1f}" for lab in labels)
    new = c["new_load_a"][labels[0]]
    u = Text(f"  {c['factor']:g}×demand + new {new:.1f} A: {totals} of {c['rating_a']:g} A; ")
    if c["within_rating"]:
        u.append(f"spare {c['spare_a']:.1f} A")
    else:
        u.append(f"OVER the rating on {c['worst_phase']}", style="bold")
    return [t, u]


def shares_line(g: dict[str, Any], labels: list[str]) -> Text:
    """Each phase's share of the logged current against its share in the schedule."""
    sh = g["shares"]
    t = Text("Log/schedule shares: ", style="bold")
    t.append(
        "  ".join(
            f"{lab} {sh['logged_pct'][lab]:.1f}/{sh['scheduled_pct'][lab]:.1f} %" for lab in labels
        )
    )
    t.append(f"; most over: {sh['most_over']}")
    return t


def percentile_line(g: dict[str, Any]) -> Text:
    """The 95th percentiles of the deviation and the VUF over time (EN 50160's form)."""
    o = g["deviation_pct"]
    t = Text(f"95th percentile of {o['aggregate_minutes']:g}-min values: ", style="bold")
    parts = []
    for key, title in (("deviation_pct", "deviation"), ("vuf_pct", "VUF")):
        o = g[key]
        if o is None or o["p95"] is None:
            continue
        limit = f" (limit {o['limit_pct']:g} %)" if o["limit_pct"] else ""
        parts.append(f"{title} {o['p95']:.2f} %{limit}")
    t.append(" · ".join(parts) or "-")
    return t


def summary_lines(d: dict[str, Any], width: int = 78) -> list[Text]:
    """Every line under the picture, from a report dict that has ``log`` (``width`` [cells])."""
    g = d["log"]
    labels = list(d["phase_order"])
    return [
        *demand_lines(g, labels, width),
        *capacity_lines(g, labels),
        shares_line(g, labels),
        percentile_line(g),
    ]


def facts_line(g: dict[str, Any]) -> str:
    """The log file, its rows, interval and span, as the title says it."""
    every = g["interval_s"]
    step = f"{every / 60:g} min" if every >= 60 and every % 60 == 0 else f"{every:g} s"
    gaps = g["gaps"]["count"]
    gap_words = "no gaps" if not gaps else plural(gaps, "gap")
    return f"{g['file']} · {g['rows']} rows · {step} · {g['span_days']:.1f} days · {gap_words}"
