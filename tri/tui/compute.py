"""The UI's only door to the engine and the checks: the same calls the command line makes.

The UI never recomputes a figure: it calls :func:`analyse_schedule` (in a
worker thread) and renders the engine's frozen result, and judges it with
the limits of ``tri check`` through :func:`check_results`.
"""

from __future__ import annotations

from typing import Any

from tri.engine.results import PanelAnalysis
from tri.safety import SAFETY_CAUTION
from tri.schedule import to_engine
from tri.schedule.model import Schedule

ENGINE_MISSING = "The analysis engine is not available in this build; figures will show here."


def analyse_schedule(schedule: Schedule) -> PanelAnalysis:
    """The engine's :class:`~tri.engine.results.PanelAnalysis` of ``schedule``."""
    return to_engine.analyse_schedule(schedule)


def check_results(analysis: PanelAnalysis, schedule: Schedule) -> list[Any]:
    """The limits of ``tri check`` (default maxima) on ``analysis``: PASS, FAIL or skipped."""
    from tri.report.check_report import evaluate
    from tri.report.data import report_data

    return evaluate(report_data(analysis, schedule, caution=SAFETY_CAUTION))
