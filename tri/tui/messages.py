"""Data-only messages posted by workers and widgets of the terminal UI."""

from __future__ import annotations

from typing import Any

from textual.message import Message


class AnalysisDone(Message):
    """The engine finished analysing schedule generation ``generation``.

    ``analysis`` is the engine's :class:`~tri.engine.results.PanelAnalysis`
    (``None`` when it failed or the engine is unavailable, with ``error`` saying why);
    ``checks`` the limits of ``tri check`` judged on it; ``cases`` the
    connected load and each ``use`` scenario (:class:`~tri.schedule.to_scenarios.Case`);
    ``tree`` the building's :class:`~tri.engine.tree_results.TreeAnalysis`
    when a building is open (``analysis`` is then the current panel's node),
    and ``tree_cases`` the building in every case: ``(name, TreeAnalysis)``
    pairs, the connected load first, then each scenario of the building.
    """

    def __init__(
        self,
        generation: int,
        analysis: Any,
        error: str | None,
        checks: Any = (),
        cases: Any = (),
        tree: Any = None,
        tree_cases: Any = (),
    ) -> None:
        self.generation = generation
        self.analysis = analysis
        self.error = error
        self.checks = checks
        self.cases = cases
        self.tree = tree
        self.tree_cases = tree_cases
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
    """The rebalancer finished (``plan`` is ``None`` on error; ``error`` says why). A search
    stopped with Esc still brings its best plan so far (``Suggestion.stopped``)."""

    def __init__(self, plan: Any, error: str | None) -> None:
        self.plan = plan
        self.error = error
        super().__init__()


class LogProgress(Message):
    """Progress of reading a logger's export in a worker thread (``fraction`` 0..1)."""

    def __init__(self, fraction: float, text: str) -> None:
        self.fraction = fraction
        self.text = text
        super().__init__()


class LogRead(Message):
    """Reading the log ended: ``log`` and ``figures`` (``None`` on error or cancel).

    ``problems`` are the located problems (each naming the file and line)
    when it could not be read.
    """

    def __init__(
        self, log: Any, figures: Any, problems: list[str], cancelled: bool = False
    ) -> None:
        self.log = log
        self.figures = figures
        self.problems = problems
        self.cancelled = cancelled
        super().__init__()
