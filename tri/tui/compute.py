"""The UI's only door to the engine and the checks: the same calls the command line makes.

The UI never recomputes a figure: it calls :func:`analyse_schedule` (in a
worker thread) and renders the engine's frozen result, judges it with the
limits of ``tri check`` through :func:`check_results` (every scenario, the
worst deciding, as ``tri check`` does), and builds the log's figures with
the report's own functions (:func:`log_report`).
"""

from __future__ import annotations

from typing import Any

from tri.engine.results import PanelAnalysis
from tri.safety import SAFETY_CAUTION
from tri.schedule import to_engine
from tri.schedule.model import Schedule
from tri.schedule.to_scenarios import Case, scenario_names

ENGINE_MISSING = "The analysis engine is not available in this build; figures will show here."


def analyse_schedule(schedule: Schedule) -> PanelAnalysis:
    """The engine's :class:`~tri.engine.results.PanelAnalysis` of ``schedule``."""
    return to_engine.analyse_schedule(schedule)


def analyse_cases(schedule: Schedule, connected: PanelAnalysis) -> tuple[Case, ...]:
    """The connected load and every ``use`` scenario, analysed (``tri report``'s cases).

    Only the connected load when the schedule names no scenario.
    """
    if not scenario_names(schedule):
        return (Case("connected", True, connected),)
    from tri.schedule.to_scenarios import analyse_cases as cases_of

    return cases_of(schedule, connected)


def check_results(
    analysis: PanelAnalysis, schedule: Schedule, cases: tuple[Case, ...] = ()
) -> list[Any]:
    """The limits of ``tri check`` (default maxima): PASS, FAIL or skipped.

    With scenarios (``cases`` beyond the connected load) every limit is
    judged in every case and the worst decides, its ``where`` naming the
    case, exactly as ``tri check`` does.
    """
    from tri.report.check_report import evaluate
    from tri.report.data import report_data
    from tri.report.scenario_check import worst_results

    per_case = [("connected", evaluate(report_data(analysis, schedule, caution=SAFETY_CAUTION)))]
    for case in cases:
        if not case.connected:
            data = report_data(case.analysis, schedule, caution=SAFETY_CAUTION)
            per_case.append((case.name, evaluate(data)))
    return worst_results(per_case)


def log_report(
    schedule: Schedule,
    connected: PanelAnalysis,
    cases: tuple[Case, ...],
    log: Any,
    figures: Any,
    file_name: str,
) -> dict[str, Any]:
    """The report dict with its ``scenarios`` and ``log`` keys, as ``tri report`` builds them.

    Parameters
    ----------
    schedule : Schedule
    connected : PanelAnalysis
        The connected-load analysis (the log is compared with it).
    cases : tuple of Case
        From :func:`analyse_cases`.
    log : LoadedLog
        From :func:`tri.schedule.log_file.read_log`.
    figures : LogAnalysis
        From :func:`tri.report.over_time_data.analyse_logged`.
    file_name : str
        The schedule's name in the report.
    """
    from tri.report.data import report_data
    from tri.report.log_data import log_data
    from tri.report.over_time_data import scenarios_data

    data = report_data(connected, schedule, caution=SAFETY_CAUTION, file=file_name)
    scenarios = scenarios_data(cases)
    if scenarios is not None:
        data["scenarios"] = scenarios
    data["log"] = log_data(log, figures, connected, schedule)
    return data
