"""Frozen results of the rebalancer and the one function that applies a plan."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from tri.engine.results import PanelAnalysis
from tri.rebalance.options import Mode
from tri.rebalance.workorder import WorkStep
from tri.schedule.model import Schedule

Status = Literal["optimal", "best-found", "infeasible", "already-balanced"]


@dataclass(frozen=True)
class Move:
    """One breaker relocated (or a new circuit placed).

    Attributes
    ----------
    circuit_index : int
        Index of the circuit in the schedule.
    circuit : str
        Its name.
    poles : int
        Pole count of the breaker.
    from_slot, to_slot : int or None
        First slot before and after (None on a rail board; ``from_slot`` is
        None for a new circuit).
    from_phases, to_phases : tuple of int or None
        Phases before and after (None: not placed before); in pole order
        for a wired breaker (``ordered``).
    group : str or None
        The shared-neutral group this 1-pole breaker moves with
        (:mod:`tri.rebalance.units`): the group's moves are one relocation.
    ordered : bool
        The order of the phases matters (a breaker with per-leg loads, or a
        group's breaker): a new order is a change of phases.
    """

    circuit_index: int
    circuit: str
    poles: int
    from_slot: int | None
    to_slot: int | None
    from_phases: tuple[int, ...] | None
    to_phases: tuple[int, ...] | None
    group: str | None = None
    ordered: bool = False

    @property
    def is_placement(self) -> bool:
        """True for a new circuit getting its first position."""
        return self.from_phases is None

    @property
    def changes_phase(self) -> bool:
        """True when the breaker ends on other phases (not only another slot)."""
        if self.from_phases is None or self.to_phases is None:
            return True
        if self.ordered:
            return tuple(self.from_phases) != tuple(self.to_phases)
        return set(self.from_phases) != set(self.to_phases)


@dataclass(frozen=True)
class Figures:
    """Phase and neutral figures of a schedule, as the engine computes them.

    Attributes
    ----------
    phases_rms_a : tuple of 3 float
        RMS current of each phase, in phase order [A].
    neutral_rms_a : float
        RMS neutral current [A] (0 on a 3-wire system).
    max_deviation_pct : float
        Largest deviation of a phase RMS current from their mean [%].
    negative_sequence_pct : float
        ``|I_2| / |I_1|`` of the fundamental [%].
    limits : tuple of str
        The engine's findings at level ``limit`` (ratings exceeded), worded
        as in ``tri report``: balancing may leave a phase or the neutral over
        its rating, and a work order must say so.
    """

    phases_rms_a: tuple[float, float, float]
    neutral_rms_a: float
    max_deviation_pct: float
    negative_sequence_pct: float
    limits: tuple[str, ...] = ()

    @property
    def max_phase_rms_a(self) -> float:
        """Largest phase RMS current [A]."""
        return max(self.phases_rms_a)

    @classmethod
    def of(cls, analysis: PanelAnalysis) -> Figures:
        """Figures from an engine result."""
        r = analysis.phases
        return cls(
            phases_rms_a=(r[0].rms_a, r[1].rms_a, r[2].rms_a),
            neutral_rms_a=analysis.neutral.rms_a if analysis.neutral.present else 0.0,
            max_deviation_pct=analysis.current_unbalance.max_deviation_pct,
            negative_sequence_pct=analysis.current_unbalance.negative_sequence_pct,
            limits=tuple(f.message for f in analysis.findings if f.level == "limit"),
        )


@dataclass(frozen=True)
class CaseResult:
    """Engine figures of one case (the connected load or a scenario) before and after.

    Attributes
    ----------
    name : str
        ``"connected"`` or the scenario's name (:mod:`tri.schedule.to_scenarios`).
    before, after : Figures
    """

    name: str
    before: Figures
    after: Figures


@dataclass(frozen=True)
class Suggestion:
    """What the rebalancer proposes, with its proof status.

    Attributes
    ----------
    status : {"optimal", "best-found", "infeasible", "already-balanced"}
        ``optimal``: proven that no plan does better on the objective
        (fewest moves: no plan with fewer relocations meets the target;
        balance modes: no plan within the budget has a largest phase RMS
        current lower by more than the proven gap). ``best-found``: the best
        plan found, with ``bound``. ``infeasible``: proven that no plan
        meets the target (or, in balance modes, that no plan fits at all);
        the moves then give the best balance found instead.
        ``already-balanced``: the schedule meets the target as it is.
    mode : {"fewest-moves", "balance", "place-new", "relayout"}
    objective : str
        What was minimised, in words.
    moves : tuple of Move
        In work order.
    steps : tuple of WorkStep
        The work order (moves, take-out/install pairs for cycles).
    before, after : Figures
        Engine figures of the schedule before and after the moves.
    bound : float or None
        Proven lower bound on the objective when not optimal: relocations
        (fewest-moves) or the largest phase RMS current [A] (other modes).
    floor_a : float
        The order-invariant floor ``F``: no plan's largest phase RMS
        current is below it [A] (``|I_1|`` with linear loads).
    target_pct : float or None
        Target on the deviation [%] (fewest-moves mode).
    target_met : bool
        Whether ``after`` meets the target and the neutral limit.
    neutral_max_a : float or None
        Neutral limit [A].
    max_moves : int or None
        Budget of relocations [-].
    schedule : Schedule
        The schedule after the moves (same ``source_index`` per circuit,
        so saving keeps comments).
    unplaced_left : tuple of str
        New circuits left without a slot (not asked to place them).
    notes : tuple of str
        Plain remarks (approximations, what was skipped).
    solver_calls : int
        HiGHS calls made [-].
    elapsed_s : float
        Wall-clock time [s].
    stop_gap : float
        Balance modes: the search stopped once the plan was within this
        fraction of ``bound`` [-] (0: run to a proof or the time limit).
    cases : tuple of CaseResult
        With ``use`` scenarios: every case the plan was judged in, the
        connected load first (``before``/``after`` are its figures); empty
        without scenarios.
    deciding : str or None
        With scenarios: the case that decides the objective after the
        moves (fewest moves: the largest deviation; otherwise the largest
        phase RMS current).
    floor_case : str or None
        With scenarios: the case whose floor is ``floor_a``.
    stopped : {"cancelled"} or None
        ``cancelled``: the search was stopped from outside before it ended
        (``suggest(keep_best_on_cancel=True)``, the command line's Ctrl+C) and
        this is the best plan so far, its status what was proven by then.
    """

    status: Status
    mode: Mode
    objective: str
    moves: tuple[Move, ...]
    steps: tuple[WorkStep, ...]
    before: Figures
    after: Figures
    bound: float | None
    floor_a: float
    target_pct: float | None
    target_met: bool
    neutral_max_a: float | None
    max_moves: int | None
    schedule: Schedule
    unplaced_left: tuple[str, ...] = ()
    notes: tuple[str, ...] = field(default=())
    solver_calls: int = 0
    elapsed_s: float = 0.0
    stop_gap: float = 0.0
    cases: tuple[CaseResult, ...] = ()
    deciding: str | None = None
    floor_case: str | None = None
    stopped: Literal["cancelled"] | None = None

    @property
    def worst_max_phase_rms_a(self) -> float:
        """Largest phase RMS current after the moves over every case [A]."""
        if not self.cases:
            return self.after.max_phase_rms_a
        return max(c.after.max_phase_rms_a for c in self.cases)

    @property
    def worst_neutral_rms_a(self) -> float:
        """Largest neutral RMS current after the moves over every case [A]."""
        if not self.cases:
            return self.after.neutral_rms_a
        return max(c.after.neutral_rms_a for c in self.cases)

    @property
    def worst_deviation_pct(self) -> float:
        """Largest deviation after the moves over every case [%]."""
        if not self.cases:
            return self.after.max_deviation_pct
        return max(c.after.max_deviation_pct for c in self.cases)

    @property
    def relocations(self) -> int:
        """Relocations (new circuits placed are not counted) [-]: breakers relocated, a
        shared-neutral group moved together counting once (:mod:`tri.rebalance.units`)."""
        return relocation_count(self.moves)


def relocation_count(moves: tuple[Move, ...] | list[Move]) -> int:
    """Relocations among ``moves`` [-]: breakers relocated, a shared-neutral group moved
    together counting once (:mod:`tri.rebalance.units`); placements are not counted."""
    groups = {m.group for m in moves if m.group is not None and not m.is_placement}
    return len(groups) + sum(1 for m in moves if not m.is_placement and m.group is None)


def apply_moves(schedule: Schedule, moves: tuple[Move, ...] | list[Move]) -> Schedule:
    """The schedule with every move carried out.

    Parameters
    ----------
    schedule : Schedule
    moves : sequence of Move

    Returns
    -------
    Schedule
        Moved circuits keep their ``source_index``, so
        :func:`tri.schedule.save.save_schedule` updates their tables in
        place and keeps the file's comments.
    """
    out = schedule
    for m in moves:
        c = out.circuits[m.circuit_index]
        new = c.at_slot(m.to_slot) if schedule.panel.uses_slots else c.on_phases(m.to_phases)
        out = out.with_circuit(m.circuit_index, new)
    return out
