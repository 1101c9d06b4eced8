"""Data-only messages posted by workers and widgets of the terminal UI."""

from __future__ import annotations

from typing import Any

from textual.message import Message


class AnalysisDone(Message):
    """The engine finished analysing schedule generation ``generation``.

    ``analysis`` is the engine's :class:`~tri.engine.results.PanelAnalysis`
    (``None`` when it failed or the engine is unavailable, with ``error`` saying why);
    ``checks`` the limits of ``tri check`` judged on it.
    """

    def __init__(self, generation: int, analysis: Any, error: str | None, checks: Any = ()) -> None:
        self.generation = generation
        self.analysis = analysis
        self.error = error
        self.checks = checks
        super().__init__()


class ScheduleChanged(Message):
    """The current schedule changed (an edit, undo, redo, load or save)."""

    def __init__(self, label: str) -> None:
        self.label = label
        super().__init__()


class RebalanceProgress(Message):
    """Progress of the rebalancer running in a worker thread."""

    def __init__(self, fraction: float | None, text: str) -> None:
        self.fraction = fraction
        self.text = text
        super().__init__()


class RebalanceDone(Message):
    """The rebalancer finished (``plan`` is ``None`` on error or cancel; ``error`` says why)."""

    def __init__(self, plan: Any, error: str | None, cancelled: bool = False) -> None:
        self.plan = plan
        self.error = error
        self.cancelled = cancelled
        super().__init__()
