"""The results panel: per-phase bars with the numbers written out, neutral, unbalance, findings.

Everything shown is read from the engine's ``PanelAnalysis``; nothing is
recomputed here. Bars carry their numbers (amperes, percent of the rating)
and the words OVER / NEAR beside them (from :mod:`tri.engine.limits`, the
same words and thresholds as the report), so colour is never the only signal.
"""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.widgets import Static

from tri.engine.limits import LEVEL_RANK, LEVEL_WORD, NEAR, OK, OVER, loading_word
from tri.tui import fmt
from tri.tui.wording import plural

HELP = """\
Results (from the engine, updated after every edit): for each phase its
true-RMS current, a bar of its loading against the main breaker (the bus
rating without a main), the percent, and the current THD. N: the neutral's
true-RMS current against its rating, and its fundamental (50/60 Hz) part.
Unbalance: the negative-sequence factor |I2|/|I1| and the largest deviation
of a phase's RMS current from the mean of the three. VUF (voltage unbalance
factor, IEC) appears when the file describes the supply. Findings follow,
most serious first; press f for the full list."""

_STYLE = {OVER: "bold red", NEAR: "yellow", OK: "green", "": "green"}


def bar(fraction: float, width: int) -> str:
    """A bar of ``width`` cells: full blocks for the fraction, light shade for the rest."""
    width = max(width, 1)
    filled = round(min(max(fraction, 0.0), 1.0) * width)
    return "█" * filled + "░" * (width - filled)


def _load_style(loading: float | None) -> str:
    return _STYLE[loading_word(loading)]


def _flag(loading: float | None) -> str:
    """OVER / NEAR (:func:`tri.engine.limits.loading_word`, as the report), blank when ok."""
    word = loading_word(loading)
    return word if word in (OVER, NEAR) else "    "


def sorted_findings(analysis: Any) -> list[Any]:
    """Findings, most serious first (stable within a level)."""
    return sorted(analysis.findings, key=lambda f: LEVEL_RANK.get(f.level, 3))


def checks_line(checks: Any, width: int) -> Text | None:
    """``tri check``'s verdicts in one line: FAIL and PASS by limit, skipped ones named."""
    if not checks:
        return None
    t = Text()
    t.append("Checks ", style="bold")
    for word, status in (("FAIL", "fail"), ("PASS", "pass"), ("skipped", "skipped")):
        keys = [r.key for r in checks if r.status == status]
        keys = [k if keys.count(k) == 1 else f"{k} ×{keys.count(k)}" for k in dict.fromkeys(keys)]
        if keys:
            if len(t) > 7:
                t.append(" · ")
            t.append(word, style="bold" if status != "skipped" else "")
            t.append(" " + ", ".join(keys))
    tail = " (f: why)"
    if t.cell_len + len(tail) <= width:
        t.append(tail, style="dim")
    return t


def results_lines(
    analysis: Any, width: int, finding_lines: int = 1, checks: Any = ()
) -> list[Text]:
    """The panel's lines for a given width (cells) and room for findings."""
    labels = analysis.phase_labels
    lab_w = max(len(x) for x in (*labels, "N"))
    bar_w = min(max(8, width - lab_w - 36), 50)
    lines: list[Text] = []
    for ph in analysis.phases:
        t = Text()
        t.append(ph.label.ljust(lab_w) + " ", style="bold")
        t.append(bar(ph.loading_pct / 100.0, bar_w), style=_load_style(ph.loading_pct))
        t.append(f" {fmt.amps(ph.rms_a, 8)} {ph.loading_pct:4.0f} % ")
        t.append(_flag(ph.loading_pct), style="bold")
        t.append(f"  THD {ph.thd_pct:4.1f} %")
        lines.append(t)
    n = analysis.neutral
    t = Text()
    t.append("N".ljust(lab_w) + " ", style="bold")
    if n.present:
        loading = n.loading_pct or 0.0
        t.append(bar(loading / 100.0, bar_w), style=_load_style(n.loading_pct))
        t.append(f" {fmt.amps(n.rms_a, 8)} {loading:4.0f} % ")
        t.append(_flag(n.loading_pct), style="bold")
        t.append(f"  fund. {fmt.amps(n.current_a)}")
    else:
        t.append("no neutral (3-wire system)", style="dim")
    lines.append(t)
    cu = analysis.current_unbalance
    t = Text()
    t.append("Unbalance ", style="bold")
    t.append(f"I2/I1 {cu.negative_sequence_pct:.1f} %  deviation {cu.max_deviation_pct:.1f} %")
    v = analysis.voltage
    if v is not None:
        t.append(f"  VUF {v.vuf_pct:.2f} %")
    rating = Text(f"Rating {analysis.rating_a:g} A", style="dim")
    if analysis.unplaced_count:
        rating.append(f"  {plural(analysis.unplaced_count, 'circuit')} not placed", style="")
    if t.cell_len + 2 + rating.cell_len <= width:
        t.append("  ")
        t.append_text(rating)
        lines.append(t)
    else:
        lines += [t, rating]
    verdicts = checks_line(checks, width)
    if verdicts is not None:
        lines.append(verdicts)
    findings = sorted_findings(analysis)
    if not findings:
        lines.append(Text("No findings.", style="dim"))
    shown = findings[:finding_lines]
    for k, f in enumerate(shown):
        t = Text()
        word = LEVEL_WORD.get(f.level, f.level)
        t.append(f"{word:5} ", style="bold red" if f.level == "limit" else "bold")
        more = len(findings) - len(shown)
        tail = f" (+{more}, f)" if more and k == len(shown) - 1 else ""
        room = max(width - 6 - len(tail), 10)
        msg = f.message if len(f.message) <= room else f.message[: room - 1] + "…"
        t.append(msg + tail)
        lines.append(t)
    return lines


class ResultsPanel(Static):
    """Shows the latest ``PanelAnalysis`` (or why there is none)."""

    DEFAULT_CSS = """
    ResultsPanel { height: auto; padding: 0 1; }
    """

    def __init__(self, **kwargs: Any) -> None:
        super().__init__("", **kwargs)
        self.analysis: Any = None
        self.note: str = "Analysing…"
        self.stale = False
        self.checks: Any = ()
        self.drawn: Any = None  #: the analysis last rendered (for the benchmark)

    def show(self, analysis: Any, note: str = "", stale: bool = False, checks: Any = ()) -> None:
        """Display ``analysis`` (None: show ``note`` instead) and ``tri check``'s verdicts."""
        self.analysis = analysis
        self.note = note
        self.stale = stale
        self.checks = checks
        self.refresh(layout=True)

    def render(self) -> Text:
        width = self.content_size.width or 76
        self.drawn = self.analysis
        if self.analysis is None:
            return Text(self.note)
        rows = 3 if self.app.size.height >= 32 else 1
        lines = results_lines(self.analysis, width, finding_lines=rows, checks=self.checks)
        if self.stale:
            lines.append(Text("(updating…)", style="dim"))
        return Text("\n").join(lines)
