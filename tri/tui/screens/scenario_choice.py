"""Choose the case the main view's figures show: the connected load or a ``use`` scenario.

The cases and their figures are the report's (:func:`tri.report.over_time_data.scenarios_data`
on the engine's :func:`tri.schedule.to_scenarios.analyse_cases`): each
answer gives the case's largest phase current and loading, its neutral and
its deviation, and names the figures in which it is the worst case. ``tri
check`` judges every case whichever is shown, so the checks do not change.
"""

from __future__ import annotations

from typing import Any

from tri.report.over_time_data import scenarios_data
from tri.report.over_time_text import CASE_FIGURES
from tri.tui.screens.choice import ChoiceScreen

SCENARIO_HELP = """\
Scenarios: circuits with use factors (use = { day = 0.2, evening = 1.0 })
make one case per name besides the connected load (every factor 1.0). n
chooses the case whose figures the main view shows (results, amps, panel
view, phasors, findings); the title of the results names it. The checks
line is tri check's: every limit judged in every case, the worst deciding."""

_SHORT = {
    "max_phase_rms_a": "phase",
    "max_loading_pct": "loading",
    "neutral_rms_a": "N",
    "max_deviation_pct": "deviation",
    "vuf_pct": "VUF",
}


def _answer(row: dict[str, Any], worst: dict[str, Any], shown: str, width: int) -> str:
    """One case on one line: its figures, where it is the worst case, whether it is shown."""
    name = ("connected" if row["connected"] else row["name"])[:width].ljust(width)
    text = f"{name} {row['max_phase_rms_a']:6.1f} A {row['max_loading_pct']:3.0f} %"
    neutral = row["neutral_rms_a"]
    text += f" {neutral:6.1f} A" if neutral is not None else "      -"
    text += f" {row['max_deviation_pct']:5.1f} %"
    decides = [
        _SHORT[key] for key, _t, _u in CASE_FIGURES if worst.get(key, {}).get("case") == row["name"]
    ]
    if decides:
        text += " worst: " + ", ".join(decides)
    return ("▶ " if row["name"] == shown else "  ") + text


def scenario_screen(cases: Any, shown: str) -> ChoiceScreen | None:
    """The question; ``None`` when the schedule has no scenario."""
    data = scenarios_data(cases)
    if data is None:
        return None
    rows = data["cases"][:10]
    width = min(max(len(r["name"]) for r in rows), 14)
    answers = [
        (str(k), _answer(row, data["worst"], shown, width), row["name"])
        for k, row in enumerate(rows)
    ]
    head = f"{'case'.ljust(width)}   largest phase  neutral deviation"
    return ChoiceScreen(
        "Which case should the figures show?",
        "The results, amps, panel view, phasors and findings show the case chosen; "
        "tri check judges every case, the worst deciding, so the checks stay.\n\n      " + head,
        answers,
        cancel=None,
        cancel_label="keep the case shown",
        classes="wide",
    )
