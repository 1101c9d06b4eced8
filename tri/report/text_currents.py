"""Terminal report sections on currents: phase and neutral currents with loading
bars, the neutral in words, the code's sizing rule, and the symmetrical
components with the current unbalance ([A], [VA], [deg], [%])."""

from __future__ import annotations

from typing import Any

from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from tri.engine.limits import NEAR, OVER
from tri.report.text_glyphs import Glyphs, bar, status_style
from tri.report.text_glyphs import figure_text as _f
from tri.report.text_glyphs import va_text as _va
from tri.words import plural


def load_cell(pct: float, word: str, g: Glyphs) -> Text:
    """Loading bar, percentage [%] and status word of one conductor."""
    load = Text(bar(pct, ascii_only=g.ascii))
    load.append(f" {pct:5.1f} % ")
    load.append(word, style=status_style(word))
    return load


def currents_section(d: dict[str, Any], g: Glyphs) -> RenderableType:
    """Phase and neutral currents with loading bars, the neutral and the sizing rule."""
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
            load_cell(ph["loading_pct"], ph["status"], g),
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
            load_cell(n["loading_pct"], n["status"], g),
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


def _neutral_text(d: dict[str, Any], g: Glyphs) -> Text:
    """The neutral in words: fundamental, RMS, the code's neutral load, non-linear share."""
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
    """The code's calculated load per phase against the rating, and the breakers."""
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


def sequence_section(d: dict[str, Any], g: Glyphs) -> RenderableType:
    """Symmetrical components of the fundamental and the current unbalance figures."""
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
