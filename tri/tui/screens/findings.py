"""Findings, checks and the full report: what the command line says, on screen.

Three views of one page (Tab switches): every finding of the engine with its
source, most serious first; the limits of ``tri check`` with PASS, FAIL or
skipped and why; and the whole ``tri report`` text. The checks and the
report are rendered by the same functions as the command line, from the
same engine result, so the two faces of ``tri`` say the same things.
"""

from __future__ import annotations

from typing import Any

from rich.console import Group
from rich.table import Table
from rich.text import Text

from tri.safety import SAFETY_CAUTION
from tri.schedule.model import Schedule
from tri.tui.screens.text_view import TextScreen
from tri.tui.widgets.results_panel import LEVEL_WORD, sorted_findings
from tri.tui.wording import plural

PAGE_WIDTH = 100  #: the page's widest (tri.tcss .page max-width)


def findings_text(analysis: Any) -> Group:
    """Every finding, most serious first, each with its source (lines hang under the text)."""
    findings = sorted_findings(analysis)
    counts = ", ".join(
        f"{sum(1 for f in findings if f.level == lv)} {lv}" for lv in ("limit", "warning", "info")
    )
    head = Text(f"{plural(len(findings), 'finding')} ({counts})\n", style="bold")
    grid = Table.grid(padding=(0, 1))
    grid.add_column(width=5, no_wrap=True)
    grid.add_column(ratio=1)
    for f in findings:
        word = LEVEL_WORD.get(f.level, f.level)
        body = Text(f.message + "\n")
        body.append(f"Source: {f.source}\n", style="dim")
        grid.add_row(Text(word, style="bold red" if f.level == "limit" else "bold"), body)
    if not findings:
        return Group(head, Text("No findings."))
    return Group(head, grid)


def _report_data(analysis: Any, schedule: Schedule, file_name: str) -> dict[str, Any]:
    from tri.report.data import report_data

    return report_data(analysis, schedule, caution=SAFETY_CAUTION, file=file_name)


def checks_text(data: dict[str, Any], file_name: str, width: int) -> Text:
    """The limits of ``tri check`` on this panel, worded as ``tri check`` words them."""
    from tri.report.check_report import evaluate, panel_status
    from tri.report.check_text import render_check_text

    results = evaluate(data)
    entry = {
        "file": file_name,
        "panel": data["panel"]["name"],
        "status": panel_status(results),
        "error": None,
        "results": results,
        "basis": None,
    }
    text = render_check_text([entry], caution=SAFETY_CAUTION, width=width)
    return Text("As `tri check` judges this panel (default limits):\n\n", style="bold") + Text(text)


def report_renderable(data: dict[str, Any]) -> Group:
    """The whole ``tri report`` text, as its own renderer lays it out."""
    from tri.report.text_report import text_renderables

    return Group(*text_renderables(data))


def findings_screen(
    analysis: Any, schedule: Schedule, file_name: str, screen_width: int = 80
) -> TextScreen:
    """The page: findings, checks and the report of ``schedule`` (``analysis`` is its result).

    ``screen_width`` [cells] sets where the checks' text wraps (the page's
    border, padding and scroll bar take 6).
    """
    data = _report_data(analysis, schedule, file_name)
    text_width = min(screen_width, PAGE_WIDTH) - 6
    views: list[tuple[str, Any]] = [
        ("findings", findings_text(analysis)),
        ("checks", checks_text(data, file_name, text_width)),
        ("report", report_renderable(data)),
    ]
    n = len(analysis.findings)
    return TextScreen(f"Findings ({n})", views[0][1], views=views)
