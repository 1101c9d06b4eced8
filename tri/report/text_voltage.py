"""Terminal report sections on voltages and site readings: the voltage at the
panel with its unbalance and motor derating (or why it is not computed), and
the measured readings against the computed figures ([V], [A], [deg], [%])."""

from __future__ import annotations

from typing import Any

from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from tri.report.data import line_labels
from tri.report.numbers import fixed
from tri.report.text_glyphs import Glyphs
from tri.report.text_glyphs import figure_text as _f


def voltage_section(d: dict[str, Any], g: Glyphs) -> RenderableType:
    """Voltages at the panel [V], their unbalance [%] and derating, or why there are none."""
    v = d["voltage"]
    s = d["supply"]
    if v is None:
        return Text(
            "Not computed: the schedule has no [supply] table (transformer and feeder). "
            "Add one to estimate phase and line voltages, VUF and motor derating."
        )
    labels = d["phase_order"]
    lines = line_labels(tuple(labels))
    source = (
        f"Estimate from the [supply] table: transformer {s['transformer_kva']:g} kVA, "
        f"{s['transformer_z_pct']:g} % impedance, X/R {s['transformer_x_r']:g}; feeder "
        f"{s['feeder_length_m']:g} m. "
        if s is not None
        else f"Estimate through what feeds it: {v.get('source')}. "  # a panel of a building
    )
    head = Text(
        source
        + (
            f"Loads iterated at the panel voltage ({v['iterations']} iterations"
            + ("" if v["converged"] else ", NOT converged")
            + ")."
            if v["iterated"]
            else "Currents at nominal voltage (use --iterate to solve at the panel voltage)."
        )
    )
    t = Table(box=g.box, show_edge=False, pad_edge=False, padding=(0, 1))
    t.add_column("Phase")
    t.add_column("V", justify="right")
    t.add_column(g.angle_head, justify="right")
    t.add_column("Drop %", justify="right")
    t.add_column("Line")
    t.add_column("V", justify="right")
    t.add_column(g.angle_head, justify="right")
    for lab, ll in zip(labels, lines, strict=True):
        pv, lv = v["phase_v"][lab], v["line_v"][ll]
        t.add_row(
            lab,
            _f(pv["v"]),
            _f(pv["deg"]),
            _f(v["drop_pct"][lab], 2),
            ll,
            _f(lv["v"]),
            _f(lv["deg"]),
        )
    facts = Table(box=None, show_header=False, pad_edge=False, padding=(0, 1))
    facts.add_column()
    facts.add_column(justify="right")
    facts.add_column()
    facts.add_row(
        "VUF |V2|/|V1|, line voltages",
        f"{v['vuf_pct']:.2f} %",
        "IEC 61000-4-30; EN 50160 2 % (weekly)",
    )
    facts.add_row(
        "Line-voltage deviation rate", f"{v['line_deviation_pct']:.2f} %", "NEMA MG 1 definition"
    )
    facts.add_row(
        "Phase-voltage deviation rate",
        g.none if v["phase_deviation_pct"] is None else f"{v['phase_deviation_pct']:.2f} %",
        "same, on line-to-neutral voltages",
    )
    facts.add_row(
        "Motor derating factor",
        "not rec." if v["motor_derating"] is None else f"{v['motor_derating']:.2f}",
        "NEMA MG 1 Part 14 curve (published)",
    )
    context = Text(
        "EN 50160's 2 % is a weekly statistic of 10-minute values at the supply terminals, "
        "and ANSI C84.1's 3 % and voltage ranges apply at the service: these figures, "
        "computed at the panel, are indicative.",
        style="dim",
    )
    return Group(head, t, facts, context)


def readings_section(d: dict[str, Any], g: Glyphs) -> RenderableType | None:
    """Site readings against the computed figures (None without readings)."""
    r = d["readings"]
    if r is None:
        return None
    t = Table(box=g.box, show_edge=False, pad_edge=False, padding=(0, 1))
    t.add_column("Conductor")
    t.add_column("Measured A", justify="right")
    t.add_column("Computed RMS A", justify="right")
    t.add_column("Difference", justify="right")
    for lab in d["phase_order"]:
        ph = r["phases"][lab]
        diff = ph["difference_pct"]
        t.add_row(
            lab,
            _f(ph["measured_a"], g=g),
            _f(ph["computed_rms_a"]),
            g.none if diff is None else f"{fixed(diff, 1, signed=True)} %",
        )
    n = r["neutral"]
    if d["neutral"]["present"]:
        diff = n["difference_pct"]
        t.add_row(
            "N",
            _f(n["measured_a"], g=g),
            _f(n["computed_rms_a"]),
            g.none if diff is None else f"{fixed(diff, 1, signed=True)} %",
        )
    parts: list[RenderableType] = []
    if r["taken"]:
        parts.append(Text(f"Taken: {r['taken']}"))
    parts.append(t)
    if d["neutral"]["present"]:
        parts.append(
            Text(
                f"Neutral fundamental estimate {_f(n['computed_current_a'])} A; a measured "
                "neutral far above it points to triplen harmonics."
            )
        )
    parts += _measured_voltages(r, g)
    parts.append(
        Text(
            "Clamp readings are one moment; the schedule is connected load. A large gap "
            "means diversity, a stale schedule or unlisted loads.",
            style="dim",
        )
    )
    return Group(*parts)


def _measured_voltages(r: dict[str, Any], g: Glyphs) -> list[RenderableType]:
    """The measured line and phase voltages [V] and their unbalance [%], when given."""
    parts: list[RenderableType] = []
    vll = r["volts_ll"]
    if any(x is not None for x in vll.values()):
        parts.append(
            Text(
                "Measured line voltages: "
                + ", ".join(f"{k} {_f(x, g=g)} V" for k, x in vll.items())
                + "."
            )
        )
    vln = r["volts_ln"]
    if any(x is not None for x in vln.values()):
        dev = r["phase_deviation_pct"]
        parts.append(
            Text(
                "Measured phase voltages: "
                + ", ".join(f"{k} {_f(x, g=g)} V" for k, x in vln.items())
                + ("" if dev is None else f"; phase-voltage deviation rate {dev:.2f} %")
                + "."
            )
        )
    if r["vuf_pct"] is not None:
        comp = r["computed_vuf_pct"]
        der = r["motor_derating"]
        parts.append(
            Text(
                f"Measured VUF {r['vuf_pct']:.2f} % (from the three magnitudes, IEC 61000-4-30 "
                "formula)"
                + (f"; computed from the supply model {comp:.2f} %" if comp is not None else "")
                + f". Line-voltage deviation rate {r['line_deviation_pct']:.2f} % (NEMA MG 1); "
                + (
                    "motors: operation not recommended above 5 %."
                    if der is None
                    else f"motor derating {der:.2f}."
                )
            )
        )
    return parts
