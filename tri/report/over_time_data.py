"""Report data for loads over time: scenarios and the logged series.

Adds two keys to :func:`tri.report.data.report_data`'s dict, each present
only when the schedule has ``use`` tables / a ``[log]`` (so reports of
other schedules are unchanged):

``scenarios``
    ``cases`` [{name, connected (bool), phases {label: {rms_a,
    loading_pct}}, neutral_rms_a, neutral_loading_pct, max_deviation_pct,
    negative_sequence_pct, vuf_pct}] with the connected load first; ``worst``
    {figure: {case, value}} for each figure (the case that decides).
``log``
    From :mod:`tri.report.log_data` (demand, unbalance over time,
    capacity for added load, log against schedule).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from tri.engine.results import PanelAnalysis
from tri.report.data import num, report_data
from tri.schedule.to_scenarios import Case

#: Figures compared across cases: key -> (label, getter).
FIGURES = ("max_phase_rms_a", "max_loading_pct", "neutral_rms_a", "max_deviation_pct", "vuf_pct")


def case_figures(case: Case) -> dict[str, Any]:
    """The compared figures of one case [A], [%]."""
    a: PanelAnalysis = case.analysis
    phases = {p.label: {"rms_a": num(p.rms_a), "loading_pct": num(p.loading_pct)} for p in a.phases}
    return {
        "name": case.name,
        "connected": case.connected,
        "phases": phases,
        "max_phase_rms_a": num(max(p.rms_a for p in a.phases)),
        "max_loading_pct": num(max(p.loading_pct for p in a.phases)),
        "neutral_rms_a": num(a.neutral.rms_a) if a.neutral.present else None,
        "neutral_loading_pct": num(a.neutral.loading_pct) if a.neutral.present else None,
        "max_deviation_pct": num(a.current_unbalance.max_deviation_pct),
        "negative_sequence_pct": num(a.current_unbalance.negative_sequence_pct),
        "vuf_pct": None if a.voltage is None else num(a.voltage.vuf_pct),
    }


def scenarios_data(cases: tuple[Case, ...]) -> dict[str, Any] | None:
    """The ``scenarios`` key: figures of every case and which case decides each."""
    if len(cases) < 2:
        return None
    rows = [case_figures(c) for c in cases]
    worst: dict[str, Any] = {}
    for key in FIGURES:
        values = [(r[key], r["name"]) for r in rows if r[key] is not None]
        if values:
            value, name = max(values, key=lambda v: v[0])
            worst[key] = {"case": name, "value": value}
    return {
        "basis": "every circuit's scheduled load times its use factor in the scenario (1.0 "
        "where its use names no such scenario); 'connected' is every factor at 1.0",
        "cases": rows,
        "worst": worst,
    }


def case_report(case: Case, schedule: Any, caution: str, file: str) -> dict[str, Any]:
    """A full report dict of one case (for ``tri check``'s limits)."""
    return report_data(case.analysis, schedule, caution=caution, file=file)


@dataclass(frozen=True, eq=False)
class OverTimeParts:
    """What the renderers and ``tri check`` need beyond the report dict.

    Attributes
    ----------
    cases : tuple of Case
        The connected load and every scenario, analysed.
    log : LoadedLog or None
        The log as read.
    figures : LogAnalysis or None
        Its figures (series for the pictures).
    """

    cases: tuple[Case, ...]
    log: Any = None
    figures: Any = None


def add_over_time(
    data: dict[str, Any],
    loaded: Any,
    analysis: PanelAnalysis,
    *,
    iterate: bool = False,
    continuous_factor: float | None = None,
    limits: Any = None,
) -> OverTimeParts:
    """Add ``scenarios`` and ``log`` to ``data`` in place; returns the parts behind them.

    The log is read (pandas imported) only when the schedule has ``[log]``.

    Raises
    ------
    ScheduleError
        When the log cannot be read (located by file and line).
    """
    from tri.schedule.to_scenarios import analyse_cases

    schedule = loaded.schedule
    cases = analyse_cases(
        schedule,
        analysis,
        iterate_voltage=iterate,
        continuous_factor=continuous_factor,
        limits=limits,
    )
    scenarios = scenarios_data(cases)
    if scenarios is not None:
        data["scenarios"] = scenarios
    spec = schedule.log
    if spec is not None:
        from tri.engine.log_analysis import analyse_log
        from tri.report.log_data import log_data
        from tri.schedule.log_file import read_log

        base = loaded.path.parent if loaded.path is not None else None
        log = read_log(spec, base)
        try:
            figures = analyse_log(
                log.arrays, demand_minutes=spec.demand_minutes, window=spec.demand_window
            )
        except ValueError as exc:
            from tri.schedule.errors import ScheduleError
            from tri.schedule.log_spec import log_issue

            raise ScheduleError([log_issue(log.path, f"{exc}; set [log] demand_minutes")]) from None
        data["log"] = log_data(log, figures, analysis, schedule)
        return OverTimeParts(cases, log, figures)
    return OverTimeParts(cases)
