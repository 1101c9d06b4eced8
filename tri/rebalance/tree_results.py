"""Frozen results of the building rebalancer: one work order per panel, one status for the tree."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from tri.rebalance.results import Figures, Move
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
        feeds included), before and after every move of the plan.
    schedule : Schedule
        The panel's schedule after its moves.
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

    @property
    def target_met(self) -> bool:
        """The engine's deviation after the moves is within the target (to round-off)."""
        return self.after.max_deviation_pct <= self.target_pct * (1 + 1e-9) + 1e-12

    @property
    def relocations(self) -> int:
        """Breakers relocated in this panel [-]."""
        return sum(1 for m in self.moves if not m.is_placement)


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

    @property
    def relocations(self) -> int:
        """Breakers relocated in all the panels [-]."""
        return sum(p.relocations for p in self.panels)

    @property
    def target_met(self) -> bool:
        """Every panel searched meets its target after the moves (the engine's figures)."""
        return all(p.target_met for p in self.panels)

    @property
    def service(self) -> PanelPlan:
        """The service panel's entry."""
        return self.panels[0]
