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
"""

from __future__ import annotations

import io
import unicodedata
from typing import Any

from rich import box
from rich.console import Console, Group, RenderableType
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from tri.engine.limits import DESIGN_HEADROOM_PCT, NEAR, OVER, loading_word
from tri.report.data import line_labels
from tri.report.numbers import fixed
from tri.report.wiring_text import wiring_section
from tri.words import plural

#: Width of the loading bar [cells]; a full bar is 100 % of the rating.
BAR_CELLS = 10
#: Default width of rendered text [columns].
WIDTH = 80

_EIGHTHS = " ▏▎▍▌▋▊▉"
#: Like ``box.SIMPLE_HEAD`` (a rule under the header only), in ASCII.
_ASCII_SIMPLE_HEAD = box.Box("    \n    \n -- \n    \n    \n    \n    \n    \n", ascii=True)


class _Glyphs:
    def __init__(self, ascii_only: bool) -> None:
        self.ascii = ascii_only
        self.angle = "@" if ascii_only else "∠"
        self.deg = " deg" if ascii_only else "°"
        self.none = "-" if ascii_only else "–"
        self.times = "x" if ascii_only else "×"
        self.box = _ASCII_SIMPLE_HEAD if ascii_only else box.SIMPLE_HEAD
        self.angle_head = "Deg" if ascii_only else "Angle°"
        self.dot = "*" if ascii_only else "·"
        self.rule = "-" if ascii_only else "─"


def _f(x: float | None, digits: int = 1, g: _Glyphs | None = None) -> str:
    return fixed(x, digits, none=g.none if g else "-")


def _va(x: float | None) -> str:
    return "-" if x is None else f"{x:,.0f}"


def bar(pct: float | None, *, ascii_only: bool = False, cells: int = BAR_CELLS) -> str:
    """A loading bar of ``cells`` characters, full at 100 %.

    Parameters
    ----------
    pct : float or None
        Loading [%]; above 100 the bar is full and ends with ``>``.
    ascii_only : bool
        Use ``#`` and ``.`` instead of block characters.
    cells : int
        Bar width [characters].

    Returns
    -------
    str
        Exactly ``cells`` characters.
    """
    if pct is None:
        return " " * cells
    frac = max(0.0, min(pct, 100.0)) / 100.0
    if ascii_only:
        full = round(frac * cells)
        out = "#" * full + "." * (cells - full)
    else:
        eighths = round(frac * cells * 8)
        full, part = divmod(eighths, 8)
        out = "█" * full
        if full < cells:
            out += (_EIGHTHS[part] if part else "░") + "░" * (cells - full - 1)
    if pct > 100.0:
        out = out[:-1] + ">"
    return out


def status_word(pct: float | None, headroom_pct: float = DESIGN_HEADROOM_PCT) -> str:
    """``OVER`` above 100 %, ``NEAR`` above the headroom, else ``ok`` (blank for None).

    The words and thresholds are :func:`tri.engine.limits.loading_word`'s.
    """
    return loading_word(pct, headroom_pct)


def _status_style(word: str) -> str:
    return {OVER: "bold red", NEAR: "yellow"}.get(word, "")


def _section(title: str, g: _Glyphs) -> Group:
    return Group(
        Text(""), Rule(Text(title, style="bold"), characters=g.rule, align="left", style="")
    )


def _heading(d: dict[str, Any], g: _Glyphs) -> RenderableType:
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


def _load_cell(pct: float, word: str, g: _Glyphs) -> Text:
    load = Text(bar(pct, ascii_only=g.ascii))
    load.append(f" {pct:5.1f} % ")
    load.append(word, style=_status_style(word))
    return load


def _currents(d: dict[str, Any], g: _Glyphs) -> RenderableType:
    p = d["panel"]
    t = Table(box=g.box, show_edge=False, pad_edge=False, padding=(0, 1))
    t.add_column("Phase")
    t.add_column("Sched. VA", justify="right")
    t.add_column("Fund. A", justify="right")
    t.add_column(g.angle_head, justify="right")
    t.add_column("RMS A", justify="right")
    t.add_column("THD %", justify="right")
    t.add_column("Loading (RMS / rating)", no_wrap=True)
    for lab in d["phase_order"]:
        ph = d["phases"][lab]
        t.add_row(
            lab,
            _va(ph["va"]),
            _f(ph["current_a"]),
            _f(ph["current_deg"]),
            _f(ph["rms_a"]),
            _f(ph["thd_pct"]),
            _load_cell(ph["loading_pct"], ph["status"], g),
        )
    n = d["neutral"]
    if n["present"]:
        t.add_row(
            "N",
            g.none,
            _f(n["current_a"]),
            _f(n["current_deg"]),
            _f(n["rms_a"]),
            g.none,
            _load_cell(n["loading_pct"], n["status"], g),
        )
    rating = f"{p['rating_a']:g} A {p['rating_basis']}"
    notes = Text(
        f"Loading: phase RMS / {rating}"
        + (f"; neutral RMS / {n['rating_a']:g} A neutral rating" if n["present"] else "")
        + f". Bar full = 100 %; {OVER} above 100 %, {NEAR} above "
        f"{d['basis']['headroom_pct']:g} % (design headroom, not a code rule). Sched. VA: all "
        "of each 1-pole circuit, half of each 2-pole, a third of each 3-pole (schedule "
        f"bookkeeping, not |I|{g.dot}V). Fund. A: {p['frequency_hz']:g} Hz component; RMS A "
        "includes harmonics.",
        style="dim",
    )
    parts: list[RenderableType] = [t, notes, _neutral_text(d, g), _sizing_text(d)]
    return Group(*parts)


def _neutral_text(d: dict[str, Any], g: _Glyphs) -> Text:
    n = d["neutral"]
    if not n["present"]:
        return Text("No neutral: 3-wire system.")
    i_sum = " + ".join(f"I_{lab}" for lab in d["phase_order"])
    return Text(
        f"Neutral: fundamental {_f(n['current_a'])} A {g.angle}{_f(n['current_deg'])}"
        f"{g.deg} (the phasor sum {i_sum} = 3{g.times}I0); true RMS "
        f"{_f(n['rms_a'])} A with harmonics, {n['ratio_to_max_phase']:.2f} {g.times} "
        f"the largest phase. The code's neutral load (NEC 220.61, the maximum unbalanced "
        f"load: the largest line-to-neutral load on one phase) is {_f(n['calculated_a'])} A; "
        "size the neutral from it and the harmonics, not from the phasor sum. Non-linear "
        f"load: {d['nonlinear_share_pct']:.0f} % of the connected VA, "
        f"{d['nonlinear_ln_share_pct']:.0f} % line-to-neutral."
    )


def _sizing_text(d: dict[str, Any]) -> Text:
    p = d["panel"]
    z = d["sizing"]
    phases = []
    for lab in d["phase_order"]:
        ph = d["phases"][lab]
        over = f" {OVER}" if lab in z["over"] else ""
        phases.append(f"{lab} {_f(ph['calculated_a'])} A ({_f(ph['calculated_pct'])} %{over})")
    breakers = (
        f" Breakers: {plural(z['breakers_rated'], 'circuit')} with a rating, each judged the "
        "same way "
        f"({z['breaker_clause']}): "
        + (f"{z['breakers_over']} over (see the findings)." if z["breakers_over"] else "none over.")
        if z["breakers_rated"]
        else " No circuit gives a breaker rating, so no breaker was checked."
    )
    return Text(
        f"Sizing rule, the code's calculated load ({z['per_phase']}, "
        f"{z['method']}): {'; '.join(phases)} of the {p['rating_a']:g} A {p['rating_basis']} "
        f"({z['clause']})." + breakers
    )


def _sequence(d: dict[str, Any], g: _Glyphs) -> RenderableType:
    s = d["sequence"]
    cu = d["current_unbalance"]
    first = d["phase_order"][0]
    t = Table(box=None, show_header=False, pad_edge=False, padding=(0, 1))
    t.add_column()
    t.add_column(justify="right")
    t.add_column()
    t.add_column()
    rows = (
        ("I0 zero", s["i0"], f"|I0|/|I1| {cu['zero_sequence_pct']:.1f} %"),
        ("I1 positive", s["i1"], ""),
        (
            "I2 negative",
            s["i2"],
            f"|I2|/|I1| {cu['negative_sequence_pct']:.1f} % (current unbalance factor)",
        ),
    )
    for name, ph, note in rows:
        t.add_row(name, f"{ph['a']:.2f} A", f"{g.angle}{_f(ph['deg'])}{g.deg}", note)
    text = Text(
        f"Max deviation of the phase RMS currents from their mean: "
        f"{cu['max_deviation_pct']:.1f} % (the largest |I - mean| / mean, NEMA definition; "
        f"on fundamental magnitudes {cu['max_deviation_fundamental_pct']:.1f} %). "
        f"(max - min) / mean, as many meters show: {cu['max_minus_min_pct']:.1f} %. "
        f"Fortescue components of the fundamental line currents, phase {first} reference."
    )
    return Group(t, text)


def _voltage(d: dict[str, Any], g: _Glyphs) -> RenderableType:
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


def _readings(d: dict[str, Any], g: _Glyphs) -> RenderableType | None:
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
    parts.append(
        Text(
            "Clamp readings are one moment; the schedule is connected load. A large gap "
            "means diversity, a stale schedule or unlisted loads.",
            style="dim",
        )
    )
    return Group(*parts)


def _findings(d: dict[str, Any], g: _Glyphs) -> RenderableType:
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


def _unplaced(d: dict[str, Any], g: _Glyphs) -> RenderableType | None:
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
    g = _Glyphs(ascii_only)
    if ascii_only:
        data = _ascii_data(data)
    out: list[RenderableType] = [_heading(data, g)]
    out += [_section("Phase and neutral currents (estimate)", g), _currents(data, g)]
    out += [_section("Symmetrical components and current unbalance", g), _sequence(data, g)]
    out += [_section("Voltage at the panel (estimate)", g), _voltage(data, g)]
    readings = _readings(data, g)
    if readings is not None:
        out += [_section("Site readings against the computed figures", g), readings]
    n = len(data["findings"])
    counts = ", ".join(
        f"{sum(1 for f in data['findings'] if f['level'] == lv)} {lv}"
        for lv in ("limit", "warning", "info")
    )
    out += [_section(f"Findings ({n}: {counts})", g), _findings(data, g)]
    wiring = wiring_section(data, g)
    if wiring is not None:
        out += [_section("Panel as wired", g), wiring]
    unplaced = _unplaced(data, g)
    if unplaced is not None:
        out += [_section("Unplaced circuits", g), unplaced]
    out += [
        _section("Caution", g),
        Text(
            data["caution"] + " Limits quoted are common practice or the standards named "
            "beside them."
        ),
    ]
    return out


_ASCII = str.maketrans(
    {
        "…": "...",
        "–": "-",
        "—": "-",
        "−": "-",
        "·": "*",
        "∠": "@",
        "°": " deg",
        "×": "x",
        "≤": "<=",
        "≥": ">=",
        "±": "+/-",
        "’": "'",
        "“": '"',
        "”": '"',
    }
)


def to_ascii(text: str) -> str:
    """``text`` with the report's symbols spelled in ASCII and accents dropped."""
    text = unicodedata.normalize("NFKD", text.translate(_ASCII))
    return (
        "".join(ch for ch in text if not unicodedata.combining(ch))
        .encode("ascii", "replace")
        .decode("ascii")
    )


def _ascii_data(x: Any) -> Any:
    if isinstance(x, str):
        return to_ascii(x)
    if isinstance(x, dict):
        return {k: _ascii_data(v) for k, v in x.items()}
    if isinstance(x, list):
        return [_ascii_data(v) for v in x]
    return x


def print_text(data: dict[str, Any], console: Console) -> None:
    """Print the report on a Rich console (its width, colour and encoding decide the look)."""
    ascii_only = not console.encoding.lower().startswith("utf")
    for item in text_renderables(data, ascii_only=ascii_only):
        console.print(item)


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
