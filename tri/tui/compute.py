"""The UI's only door to the engine: run the same analysis the command line runs.

The UI never recomputes a figure: it calls :func:`analyse_schedule` (in a
worker thread) and renders the engine's frozen result.
"""

from __future__ import annotations

from tri.engine.results import PanelAnalysis
from tri.schedule import to_engine
from tri.schedule.model import Schedule

ENGINE_MISSING = "The analysis engine is not available in this build; figures will show here."


def analyse_schedule(schedule: Schedule) -> PanelAnalysis:
    """The engine's :class:`~tri.engine.results.PanelAnalysis` of ``schedule``."""
    return to_engine.analyse_schedule(schedule)
