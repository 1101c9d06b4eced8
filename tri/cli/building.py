"""The building side of ``tri report`` and ``tri check``: a schedule whose circuits feed others.

When the file given has feeder circuits (``feeds``), the commands read the
whole building below it (:func:`tri.schedule.tree.load_tree`), analyse it
as one tree and report or check every panel. Reading many files shows a
progress line on a terminal's standard error.
"""

from __future__ import annotations

import dataclasses
import sys
import time
from dataclasses import dataclass
from typing import Any

from tri.cli.common import SAFETY_CAUTION, CliError
from tri.schedule.load import ScheduleFile
from tri.schedule.tree import feeder_circuits, load_tree

#: Show progress when reading the building takes longer than this [s].
PROGRESS_AFTER_S = 0.5


def is_building_root(loaded: ScheduleFile) -> bool:
    """True when the schedule feeds other panels."""
    return bool(feeder_circuits(loaded.schedule))


class _Progress:
    """A one-line progress count on standard error (a terminal only, after a delay)."""

    def __init__(self) -> None:
        self.start = time.monotonic()
        self.shown = False
        self.live = sys.stderr.isatty()

    def __call__(self, count: int, name: str) -> None:
        if not self.live or time.monotonic() - self.start < PROGRESS_AFTER_S:
            return
        self.shown = True
        print(
            f"\rtri: reading the building: {count} panels ({name[-40:]})\x1b[K",
            end="",
            file=sys.stderr,
        )

    def done(self) -> None:
        if self.shown:
            print("\r\x1b[K", end="", file=sys.stderr)


@dataclass(frozen=True, eq=False)
class BuildingParts:
    """What ``tri check`` needs beyond a building's report dict.

    Attributes
    ----------
    tree : ScheduleTree
        The panels as loaded.
    scenarios : tuple of (name, TreeAnalysis)
        The building in each named scenario (empty without ``use``).
    cases, log, figures
        Empty, as :class:`tri.report.over_time_data.OverTimeParts` of a
        panel without scenarios or log (those of a building are above).
    """

    tree: Any
    scenarios: tuple[tuple[str, Any], ...] = ()
    cases: tuple = ()
    log: Any = None
    figures: Any = None


def building_report_all(
    path: str, *, iterate: bool, continuous_factor: float | None, limits: Any = None
) -> tuple[dict[str, Any], BuildingParts]:
    """The building's report data (every scenario's figures included) and its parts.

    ``limits`` (:class:`tri.engine.limits.FindingLimits`, None: the defaults)
    sets every panel's findings, as for one panel.

    The connected load and each scenario of the building
    (:mod:`tri.schedule.tree_scenarios`) are analysed over the whole tree.
    """
    from tri.report.building import building_data
    from tri.schedule.tree_scenarios import building_scenario_names
    from tri.schedule.tree_to_engine import analyse_building

    progress = _Progress()
    try:
        tree = load_tree(path, progress=progress)
    finally:
        progress.done()
    names = building_scenario_names(tree)
    try:
        result = analyse_building(
            tree, iterate_voltage=iterate, continuous_factor=continuous_factor, limits=limits
        )
        scenarios = tuple(
            (
                name,
                analyse_building(
                    tree,
                    iterate_voltage=iterate,
                    continuous_factor=continuous_factor,
                    limits=limits,
                    scenario=name,
                ),
            )
            for name in names
        )
    except ValueError as exc:
        raise CliError(f"{path}: cannot analyse this building: {exc}") from None
    for name, r in (("connected", result), *scenarios):
        if iterate and not r.solution.converged:
            case = "" if name == "connected" else f" (scenario {name})"
            print(
                f"tri: warning: the voltage iteration did not converge in "
                f"{r.solution.iterations} sweeps{case}; voltages are unreliable.",
                file=sys.stderr,
            )
    headroom = {} if limits is None else {"headroom_pct": limits.headroom_pct}
    data = building_data(result, tree, caution=SAFETY_CAUTION, scenarios=scenarios, **headroom)
    return data, BuildingParts(tree, scenarios)


def check_entries(
    data: dict[str, Any],
    maxima: dict[str, float | None],
    *,
    light_load_pct: float,
    parts: BuildingParts | None = None,
) -> list[dict[str, Any]]:
    """One ``tri check`` entry per panel of a building (the service first).

    With scenarios (``parts.scenarios``) each limit of each panel is judged
    in the connected load and in every scenario of the building, and the
    worst case decides (:func:`tri.report.scenario_check.evaluate_cases`).
    """
    from tri.report.building import building_data
    from tri.report.check_report import panel_status
    from tri.report.scenario_check import evaluate_cases

    case_panels = []
    if parts is not None:
        for name, result in parts.scenarios:
            case = building_data(result, parts.tree, caution=SAFETY_CAUTION)
            case_panels.append((name, case["building"]["panels"]))
    entries = []
    for i, p in enumerate(data["building"]["panels"]):
        report = p["report"]
        reports = [(name, panels[i]["report"]) for name, panels in case_panels]
        results = evaluate_cases(report, reports, maxima, light_load_pct=light_load_pct)
        if p["depth"]:  # a fed panel's voltage comes through its feeder, not a [supply]
            results = [
                dataclasses.replace(r, where=r.where.replace("from [supply]", "through its feeder"))
                for r in results
            ]
        role = "service" if p["depth"] == 0 else f"fed from {p['parent']}"
        entries.append(
            {
                "file": p["file"],
                "panel": f"{report['panel']['name']}; {role}",
                "status": panel_status(results),
                "error": None,
                "basis": report["basis"]["currents"],
                "results": results,
            }
        )
    return entries
