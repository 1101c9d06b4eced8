"""Frozen results of the building rebalancer: one work order per panel, one status for the tree."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from tri.rebalance.results import CaseResult, Figures, Move, relocation_count
from tri.rebalance.workorder import WorkStep
from tri.schedule.model import Schedule
from tri.schedule.tree import ScheduleTree

TreeStatus = Literal["optimal", "best-found", "infeasible", "already-balanced"]
#: Why a search ended before its proof: the time limit, or the user.
Stopped = Literal["time limit", "cancelled"]


@dataclass(frozen=True)
class PanelPlan:
    """One panel of the search: its moves and its figures in the building.

    Attributes
    ----------
    index : int
        Index of the panel in the building (``ScheduleTree.panels``).
    file : str
        The file as the building names it.
    panel : str
        ``[panel] name``.
    depth : int
        0 for the service, 1 for a panel it feeds, ...
    parent_file : str or None
        The file of the panel that feeds it (None for the service).
    target_pct : float
        Its target on the deviation [%].
    moves : tuple of Move
        In work order.
    steps : tuple of WorkStep
        The panel's work order.
    before, after : Figures
        The engine's figures of the panel in the building (everything it
        feeds included), before and after every move of the plan; the
        connected load's with scenarios.
    schedule : Schedule
        The panel's schedule after its moves.
    cases : tuple of CaseResult
        With ``use`` scenarios in the building: the engine's figures of the
        panel in every case (the connected load first), before and after;
        empty without.
    """

    index: int
    file: str
    panel: str
    depth: int
    parent_file: str | None
    target_pct: float
    moves: tuple[Move, ...]
    steps: tuple[WorkStep, ...]
    before: Figures
    after: Figures
    schedule: Schedule
    cases: tuple[CaseResult, ...] = ()

    @property
    def worst_after_pct(self) -> float:
        """The engine's largest deviation after the moves over every case [%]."""
        if not self.cases:
            return self.after.max_deviation_pct
        return max(c.after.max_deviation_pct for c in self.cases)

    @property
    def worst_before_pct(self) -> float:
        """The engine's largest deviation before the moves over every case [%]."""
        if not self.cases:
            return self.before.max_deviation_pct
        return max(c.before.max_deviation_pct for c in self.cases)

    @property
    def deciding(self) -> str | None:
        """With scenarios, the case of the largest deviation after the moves (the first if tied)."""
        if not self.cases:
            return None
        return max(self.cases, key=lambda c: c.after.max_deviation_pct).name

    @property
    def target_met(self) -> bool:
        """The engine's deviation after the moves is within the target in every case (round-off)."""
        return self.worst_after_pct <= self.target_pct * (1 + 1e-9) + 1e-12

    @property
    def relocations(self) -> int:
        """Relocations in this panel [-]: a shared-neutral group moved as one counts once."""
        return relocation_count(self.moves)


@dataclass(frozen=True)
class OutsideFigures:
    """A panel above the service: not searched, but its currents change with the plan.

    Attributes
    ----------
    file, panel : str
    before, after : Figures
    """

    file: str
    panel: str
    before: Figures
    after: Figures


@dataclass(frozen=True)
class TreeSuggestion:
    """What the building rebalancer proposes, with its proof status.

    Attributes
    ----------
    status : {"optimal", "best-found", "infeasible", "already-balanced"}
        ``optimal``: proven that no plan with fewer relocations in all the
        panels searched meets every target; ``best-found``: the best plan
        found, with ``bound``; ``infeasible``: proven that no plan (within
        ``max_moves``) meets every target; ``already-balanced``: every panel
        meets its target as it is.
    objective : str
        What was minimised, in words.
    panels : tuple of PanelPlan
        The service first, then every panel below it (depth first).
    above : tuple of OutsideFigures
        Panels above the service (root first), when the service is not the root.
    bound : int or None
        Proven lower bound on the relocations when not proven optimal.
    target_pct, child_target_pct : float
        Targets at the service and at every other panel searched [%].
    max_moves : int or None
    notes : tuple of str
    stopped : {"time limit", "cancelled"} or None
        Why the search ended before settling the question, if it did.
    solver_calls : int
    elapsed_s : float
    tree : ScheduleTree
        The building after the moves (every panel's schedule).
    case_names : tuple of str
        Every case judged: ``("connected",)`` without scenarios, else the
        connected load then each of the building's scenarios.
    neutral_max_a : float or None
        Largest neutral RMS current asked at the service, in every case [A].
    """

    status: TreeStatus
    objective: str
    panels: tuple[PanelPlan, ...]
    above: tuple[OutsideFigures, ...]
    bound: int | None
    target_pct: float
    child_target_pct: float
    max_moves: int | None
    notes: tuple[str, ...]
    stopped: Stopped | None
    solver_calls: int
    elapsed_s: float
    tree: ScheduleTree
    case_names: tuple[str, ...] = ("connected",)
    neutral_max_a: float | None = None

    @property
    def deciding(self) -> tuple[str, PanelPlan] | None:
        """With scenarios, the case and panel nearest to (or furthest over) its target, after.

        The largest ``deviation - target`` over every panel and case (the
        first if tied); None without scenarios.
        """
        if len(self.case_names) <= 1:
            return None
        rows = [
            (c.after.max_deviation_pct - p.target_pct, -i, c.name, p)
            for i, p in enumerate(self.panels)
            for c in p.cases
        ]
        if not rows:
            return None
        _, _, name, panel = max(rows, key=lambda r: (r[0], r[1]))
        return name, panel

    @property
    def relocations(self) -> int:
        """Relocations in all the panels (a shared-neutral group moved as one counts once) [-]."""
        return sum(p.relocations for p in self.panels)

    @property
    def neutral_met(self) -> bool:
        """The service's neutral RMS after the moves within the limit in every case (the
        engine's figures; True without a limit)."""
        lim = self.neutral_max_a
        if lim is None:
            return True
        s = self.service
        values = [c.after.neutral_rms_a for c in s.cases] or [s.after.neutral_rms_a]
        return all(v <= lim * (1 + 1e-9) for v in values)

    @property
    def target_met(self) -> bool:
        """Every panel searched meets its target after the moves, and the service's neutral
        its limit (the engine's figures)."""
        return all(p.target_met for p in self.panels) and self.neutral_met

    @property
    def service(self) -> PanelPlan:
        """The service panel's entry."""
        return self.panels[0]
