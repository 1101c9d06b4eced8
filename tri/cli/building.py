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


def building_report_data(
    path: str, *, iterate: bool, continuous_factor: float | None
) -> dict[str, Any]:
    """Load, analyse and turn a building into report data (:mod:`tri.report.building`).

    ``continuous_factor`` None: each panel's own practice (:func:`analyse_building`).
    """
    from tri.report.building import building_data
    from tri.schedule.tree_to_engine import analyse_building

    progress = _Progress()
    try:
        tree = load_tree(path, progress=progress)
    finally:
        progress.done()
    try:
        result = analyse_building(
            tree, iterate_voltage=iterate, continuous_factor=continuous_factor
        )
    except ValueError as exc:
        raise CliError(f"{path}: cannot analyse this building: {exc}") from None
    if iterate and not result.solution.converged:
        print(
            f"tri: warning: the voltage iteration did not converge in "
            f"{result.solution.iterations} sweeps; voltages are unreliable.",
            file=sys.stderr,
        )
    return building_data(result, tree, caution=SAFETY_CAUTION)


def check_entries(
    data: dict[str, Any], maxima: dict[str, float | None], *, light_load_pct: float
) -> list[dict[str, Any]]:
    """One ``tri check`` entry per panel of a building (the service first)."""
    from tri.report.check_report import evaluate, panel_status

    entries = []
    for p in data["building"]["panels"]:
        report = p["report"]
        results = evaluate(report, maxima, light_load_pct=light_load_pct)
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
