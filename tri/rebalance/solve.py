"""The rebalancer's entry point: :func:`suggest`.

Modes
-----
``fewest-moves`` (``target_pct``)
    The fewest breaker moves after which every phase RMS current is within
    ``target_pct`` of the mean of the three (the deviation the report
    shows), and the neutral RMS current at most ``neutral_max_a`` if given;
    at most ``max_moves`` if given.
``balance`` (``max_moves`` without a target)
    The smallest largest-phase RMS current reachable with at most
    ``max_moves`` moves. The largest phase is what limits a panel, and no
    plan can go below the floor ``F`` (:mod:`tri.rebalance.problem`), so
    the result is also reported against ``F``.
``place-new``
    Circuits without a slot get the best free slots; nothing else moves
    (combine with a target or a budget to allow moves as well).
``relayout``
    Every unlocked circuit may go anywhere (design work): the smallest
    largest-phase current, then the fewest relocations for it.

Harmonics
---------
A phase's RMS current is ``R = sqrt(|I_1|² + Σ_h |I_h|²)``, each order a
phasor sum over the circuits on the phase (triplen orders of 1-pole
circuits add in phase on the neutral whatever the phase; moves cannot
change them). The greedy start, the local search and every acceptance test
use this exact RMS, by superposition of the engine's per-circuit currents.
The approximation is only inside the mixed-integer programs
(:mod:`tri.rebalance.milp`): there ``R`` is bounded from below order by
order (exact at every plan visited) and from above by a sector bound on
the fundamental plus a bound on the harmonic part's square, and for small
budgets by the whole square centred on the current plan
(:mod:`tri.rebalance.squares`: products of options bounded linearly, and
exactly for the options of every plan visited). Small budgets are proven
by checking every plan (:mod:`tri.rebalance.exhaust`). Every proposal is
re-checked with the exact RMS, and the before/after figures reported come
from the engine run on the schedules themselves
(:func:`tri.schedule.to_engine.analyse_schedule`). On
large panels with many non-linear circuits the upper bound can stay loose,
so a proof may not close in the time limit: the plan is still exact and
verified, and the status says ``best-found`` with the proven bound.

Anytime
-------
A plan exists after the greedy start (milliseconds); the solver then
improves or proves it until the time limit. ``progress(fraction, message)``
reports along the way; ``cancel`` (a ``threading.Event`` or a callable)
stops the search from another thread, and :func:`suggest` then raises
:class:`~tri.rebalance.control.Cancelled`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from tri.engine.loading import FindingLimits
from tri.rebalance.control import CancelHook, Cancelled, Control, ProgressCallback
from tri.rebalance.heuristic import Goal, LocalSearch, heuristic_plan
from tri.rebalance.milp import Outcome, solve_balance, solve_target
from tri.rebalance.problem import Problem, assess, build_problem
from tri.rebalance.realise import WorkStep, order_work, rail_steps, realise_slots
from tri.rebalance.results import Figures, Mode, Move, Status, Suggestion, apply_moves
from tri.schedule.model import Schedule
from tri.schedule.to_engine import analyse_schedule
from tri.schedule.wiring import rebalancer_refusal

#: Default target on the deviation [%]: the engine's warning level, so that
#: ``tri suggest`` aims where ``tri report`` starts to warn.
DEFAULT_TARGET_PCT = FindingLimits().deviation_warn_pct
#: Default time limit [s].
DEFAULT_TIME_LIMIT_S = 5.0
#: Relative tolerance on the target check (round-off only) [-].
_TOL = 1e-9


@dataclass(frozen=True)
class SuggestOptions:
    """What to ask the rebalancer.

    Attributes
    ----------
    target_pct : float or None
        Largest deviation of a phase RMS current from the mean [%]; selects
        the fewest-moves mode. Default (no mode option at all):
        :data:`DEFAULT_TARGET_PCT`.
    max_moves : int or None
        Largest number of breaker moves [-]; alone it selects the balance mode.
    place_new : bool
        Place circuits that have no slot yet.
    relayout : bool
        Full re-layout of every unlocked circuit (no target, no budget).
    neutral_max_a : float or None
        Largest neutral RMS current [A].
    time_limit_s : float
        Wall-clock budget [s].
    floor_gap : float
        Balance modes stop once the largest phase current is within this
        fraction of the floor ``F`` [-].
    use_solver : bool
        False: greedy start and local search only (for comparisons).
    """

    target_pct: float | None = None
    max_moves: int | None = None
    place_new: bool = False
    relayout: bool = False
    neutral_max_a: float | None = None
    time_limit_s: float = DEFAULT_TIME_LIMIT_S
    floor_gap: float = 1e-3
    use_solver: bool = True

    def __post_init__(self) -> None:
        problems = []
        if self.target_pct is not None and not (
            math.isfinite(self.target_pct) and 0 <= self.target_pct <= 200
        ):
            problems.append("the target must be a percentage from 0 to 200")
        if self.max_moves is not None and self.max_moves < 0:
            problems.append("the number of moves must be 0 or more")
        if self.neutral_max_a is not None and not (
            math.isfinite(self.neutral_max_a) and self.neutral_max_a > 0
        ):
            problems.append("the neutral limit must be a current above 0 A")
        if not (math.isfinite(self.time_limit_s) and self.time_limit_s > 0):
            problems.append("the time limit must be above 0 s")
        if self.relayout and (self.target_pct is not None or self.max_moves is not None):
            problems.append("a full re-layout takes neither a target nor a move limit")
        if problems:
            raise ValueError("; ".join(problems))

    @property
    def mode(self) -> Mode:
        """The mode these options select."""
        if self.relayout:
            return "relayout"
        if self.target_pct is not None:
            return "fewest-moves"
        if self.max_moves is not None:
            return "balance"
        if self.place_new:
            return "place-new"
        return "fewest-moves"

    @property
    def effective_target_pct(self) -> float | None:
        """Target used [%] (the default in fewest-moves mode without one)."""
        if self.mode != "fewest-moves":
            return None
        return DEFAULT_TARGET_PCT if self.target_pct is None else self.target_pct


def _free_indices(schedule: Schedule, opts: SuggestOptions) -> list[int]:
    mode = opts.mode
    out = []
    for i, c in enumerate(schedule.circuits):
        if c.locked:
            continue
        if c.is_placed:
            if mode == "place-new":
                continue
            if c.poles < 3 or mode == "relayout":
                out.append(i)
        elif opts.place_new or mode == "relayout":
            out.append(i)
    return out


def _objective_text(opts: SuggestOptions, labels_target: str) -> str:
    mode = opts.mode
    neutral = (
        f", with the neutral RMS current at most {opts.neutral_max_a:g} A"
        if opts.neutral_max_a is not None
        else ""
    )
    if mode == "fewest-moves":
        cap = f" (at most {opts.max_moves})" if opts.max_moves is not None else ""
        return (
            f"number of breaker moves{cap} so that every phase RMS current is within "
            f"{labels_target} of the mean of the three{neutral}"
        )
    if mode == "balance":
        return f"largest phase RMS current [A] with at most {opts.max_moves} moves{neutral}"
    if mode == "place-new":
        return f"largest phase RMS current [A], placing new circuits without moving others{neutral}"
    return f"largest phase RMS current [A] over a full re-layout, then relocations{neutral}"


class _Checker:
    """Exact checks of plans, with slot realisations cached."""

    def __init__(self, pr: Problem, goal: Goal):
        self.pr = pr
        self.goal = goal
        self.slots: dict[bytes, dict[int, int] | None] = {}

    def meets(self, assign: np.ndarray) -> bool:
        a = assess(self.pr, assign)
        if self.goal.target is not None and a.deviation_pct > 100 * self.goal.target * (1 + _TOL):
            return False
        lim = self.goal.neutral_max_a
        return not (lim is not None and self.pr.has_neutral and a.neutral_rms_a > lim * (1 + _TOL))

    def realise(self, assign: np.ndarray) -> dict[int, int] | None:
        key = np.asarray(assign, dtype=np.int64).tobytes()
        if key not in self.slots:
            self.slots[key] = realise_slots(self.pr, assign) if self.pr.slots else {}
        return self.slots[key]

    def relocations(self, assign: np.ndarray) -> int:
        if not self.pr.slots:
            return self.pr.moves(assign)
        slots = self.realise(assign)
        if slots is None:
            return 10**9
        old = self.pr.schedule.circuits
        return sum(1 for i, s in slots.items() if old[i].slot is not None and old[i].slot != s)

    def within_budget(self, assign: np.ndarray) -> bool:
        k = self.goal.max_moves
        return k is None or self.relocations(assign) <= k

    def verify(self, assign: np.ndarray) -> tuple[bool, bool]:
        realisable = self.realise(assign) is not None
        return self.meets(assign) and realisable and self.within_budget(assign), realisable

    def good(self, assign: np.ndarray | None) -> bool:
        return assign is not None and self.verify(assign)[0]


def _heuristic(
    pr: Problem,
    goal: Goal,
    control: Control,
    checker: _Checker,
    from_scratch: bool = False,
    kicks: bool = True,
) -> np.ndarray | None:
    """The heuristic plan, within the budget once slots are fitted (fewer moves if needed)."""
    plan = heuristic_plan(pr, goal, control, from_scratch=from_scratch, kicks=kicks)
    if plan is None or checker.good(plan) or goal.max_moves is None:
        return plan if checker.good(plan) else None
    for k in range(goal.max_moves - 1, -1, -1):
        if control.stop():
            break
        plan = heuristic_plan(
            pr, replace(goal, max_moves=k), control, from_scratch=from_scratch, kicks=kicks
        )
        if checker.good(plan):
            return plan
    return None


def _moves_for(
    pr: Problem, assign: np.ndarray, checker: _Checker
) -> tuple[list[Move], list[WorkStep]]:
    sched = pr.schedule
    circuits = sched.circuits
    moves: dict[int, Move] = {}
    if pr.slots:
        slots = checker.realise(assign)
        assert slots is not None
        changing = {}
        for idx, slot in slots.items():
            c = circuits[idx]
            if c.slot != slot:
                new = c.at_slot(slot)
                changing[idx] = slot
                moves[idx] = Move(idx, c.name, c.poles, c.slot, slot, c.phases, new.phases)
        steps = order_work(sched, changing)
    else:
        changed = []
        for i, idx in enumerate(pr.free.tolist()):
            c = circuits[idx]
            ph = pr.phases[int(assign[i])]
            if c.phases is None or set(c.phases) != set(ph):
                changed.append(idx)
                moves[idx] = Move(idx, c.name, c.poles, None, None, c.phases, tuple(ph))
        steps = rail_steps(sched, changed)
    ordered = [moves[s.circuit_index] for s in steps if s.action not in ("take-out",)]
    return ordered, steps


def suggest(
    schedule: Schedule,
    options: SuggestOptions | None = None,
    *,
    progress: ProgressCallback | None = None,
    cancel: CancelHook | None = None,
) -> Suggestion:
    """Propose breaker moves for a panel (module notes).

    Parameters
    ----------
    schedule : Schedule
        The panel as it is.
    options : SuggestOptions, optional
        Mode, target, budget, limits, time limit.
    progress : callable, optional
        ``progress(fraction or None, message)`` during the search.
    cancel : threading.Event or callable, optional
        Stops the search from another thread.

    Returns
    -------
    Suggestion

    Raises
    ------
    ValueError
        For options the panel cannot take (a neutral limit on a 3-wire system), or
        wiring it cannot honour yet (shared neutrals, breakers with a load per leg,
        a high leg, a C-B-A right column, a reach limit, RCD groups:
        :func:`tri.schedule.wiring.rebalancer_refusal`).
    Cancelled
        When the cancel hook fired.
    """
    opts = options or SuggestOptions()
    refusal = rebalancer_refusal(schedule)  # wiring it cannot honour yet (issue 12)
    if refusal:
        raise ValueError("; ".join(refusal))
    if opts.neutral_max_a is not None and not schedule.system.has_neutral:
        raise ValueError("a neutral limit needs a system with a neutral (this one is 3-wire)")
    control = Control(opts.time_limit_s, progress, cancel)
    control.report("analysing the panel as it is", 0.0)
    before = Figures.of(analyse_schedule(schedule))
    mode = opts.mode
    target_pct = opts.effective_target_pct
    goal_target = Goal(
        target=None if target_pct is None else target_pct / 100.0,
        neutral_max_a=opts.neutral_max_a,
        max_moves=0 if mode == "place-new" else opts.max_moves,
    )
    goal_balance = replace(goal_target, target=None)
    free = _free_indices(schedule, opts)
    pr = build_problem(schedule, free)
    notes: list[str] = []
    unplaced_left = tuple(
        c.name for i, c in enumerate(schedule.circuits) if not c.is_placed and i not in set(free)
    )
    has_new = bool(np.any(~pr.movable)) if pr.n_free else False
    checker_t = _Checker(pr, goal_target)
    checker_b = _Checker(pr, goal_balance)
    current = pr.current_assignment()

    outcome: Outcome
    plan: np.ndarray | None
    status: Status
    calls = 0
    if mode == "fewest-moves":
        assert goal_target.target is not None
        if not has_new and checker_t.meets(current):
            return _finish(
                pr,
                opts,
                control,
                before,
                current,
                checker_t,
                "already-balanced",
                None,
                notes,
                unplaced_left,
                0,
            )
        control.report("greedy start and local search")
        plan = _heuristic(pr, goal_target, control, checker_t)
        # the balance heuristic often reaches tight targets too, and is the
        # fallback when the target cannot be met
        fallback = _heuristic(pr, goal_balance, control, checker_b, kicks=False)
        if (
            fallback is not None
            and checker_t.good(fallback)
            and (plan is None or checker_t.relocations(fallback) < checker_t.relocations(plan))
        ):
            plan = fallback
        if plan is not None:
            control.report(f"greedy start: {checker_t.relocations(plan)} moves meet the target")

        def repair(a: np.ndarray, k: int) -> np.ndarray | None:
            ls = LocalSearch(pr, replace(goal_target, max_moves=k), control, a)
            ls.descend(max_steps=4 * max(1, k) + 10)
            ls.prune()
            cand = ls.assign
            return cand.copy() if checker_t.good(cand) else None

        if opts.use_solver and pr.n_free:
            outcome = solve_target(
                pr, goal_target, control, plan, checker_t.verify, checker_t.relocations, repair
            )
        else:
            outcome = Outcome(assign=plan, proven=pr.n_free == 0, bound=None)
            if pr.n_free == 0:
                notes.append("nothing can move: every circuit is locked or fixed")
        calls += outcome.solver_calls
        notes.extend(outcome.notes)
        plan = outcome.assign
        if plan is not None:
            relocs = checker_t.relocations(plan)
            proven = outcome.proven and outcome.bound is not None and outcome.bound >= relocs
            status = "optimal" if proven else "best-found"
            bound = None if proven else outcome.bound
        else:
            # the target cannot be met (proven) or was not met in time: best balance instead
            status = "infeasible" if outcome.proven else "best-found"
            bound = outcome.bound if not outcome.proven else None
            control.report("target out of reach: the best balance instead")
            plan = fallback
            if plan is None:
                plan = current if not has_new else None
            if plan is None:
                notes.append("the new circuits do not fit in the free slots")
                plan = current
            pct = f"{target_pct:g} %"
            if outcome.proven:
                notes.append(f"no plan reaches the target of {pct}; shown: the best balance found")
            else:
                notes.append(
                    f"no plan reaching {pct} was found in the time limit (not proven impossible); "
                    "shown: the best balance found"
                )
        return _finish(
            pr, opts, control, before, plan, checker_t, status, bound, notes, unplaced_left, calls
        )

    # balance, place-new, relayout
    control.report("greedy start and local search")
    plan = _heuristic(pr, goal_balance, control, checker_b, from_scratch=(mode == "relayout"))
    if plan is None and not has_new and checker_b.good(current):
        plan = current
    outcome = Outcome(assign=plan, proven=pr.n_free == 0, bound=pr.floor_a)
    if pr.n_free == 0:
        notes.append(
            "there are no new circuits to place"
            if mode == "place-new"
            else "nothing can move: every circuit is locked or fixed"
        )
    if opts.use_solver and pr.n_free:
        outcome = solve_balance(
            pr, goal_balance, control, plan, checker_b.verify, stop_gap=opts.floor_gap
        )
        calls += outcome.solver_calls
        notes.extend(outcome.notes)
    if outcome.assign is None:
        if has_new:
            notes.append("the new circuits do not fit in the free slots")
        elif opts.neutral_max_a is not None:
            notes.append(f"no plan keeps the neutral at or below {opts.neutral_max_a:g} A")
        status = "infeasible" if outcome.proven else "best-found"
        return _finish(
            pr,
            opts,
            control,
            before,
            current,
            checker_b,
            status,
            None,
            notes,
            unplaced_left,
            calls,
            placed=False,
        )
    plan = outcome.assign
    if mode == "relayout":
        plan = _fewer_relocations(pr, goal_balance, control, plan, checker_b)
    status = "optimal" if outcome.proven else "best-found"
    if (
        status == "optimal"
        and checker_b.relocations(plan) == 0
        and not has_new
        and mode != "place-new"
        and pr.n_free > 0
    ):
        status = "already-balanced"
    bound = None if outcome.proven else outcome.bound
    return _finish(
        pr, opts, control, before, plan, checker_b, status, bound, notes, unplaced_left, calls
    )


def _fewer_relocations(
    pr: Problem, goal: Goal, control: Control, plan: np.ndarray, checker: _Checker
) -> np.ndarray:
    """Undo moves of a re-layout that do not raise the largest phase current."""
    ls = LocalSearch(pr, goal, control, plan)
    ls.prune()
    cand = ls.assign.copy()
    if checker.good(cand) and checker.relocations(cand) <= checker.relocations(plan):
        return cand
    return plan


def _finish(
    pr: Problem,
    opts: SuggestOptions,
    control: Control,
    before: Figures,
    plan: np.ndarray,
    checker: _Checker,
    status: Status,
    bound: float | None,
    notes: list[str],
    unplaced_left: tuple[str, ...],
    calls: int,
    placed: bool = True,
) -> Suggestion:
    if control.cancelled():
        raise Cancelled
    schedule = pr.schedule
    if placed and pr.n_free:
        moves, steps = _moves_for(pr, plan, checker)
    else:
        moves, steps = [], []
    after_schedule = apply_moves(schedule, moves)
    after = Figures.of(analyse_schedule(after_schedule)) if moves else before
    target_pct = opts.effective_target_pct
    met = True
    if target_pct is not None:
        met = after.max_deviation_pct <= target_pct * (1 + _TOL) + 1e-12
    if opts.neutral_max_a is not None:
        met = met and after.neutral_rms_a <= opts.neutral_max_a * (1 + _TOL)
    if moves and placed:
        exact = assess(pr, plan)
        diff = max(abs(a - b) for a, b in zip(exact.phase_rms_a, after.phases_rms_a, strict=True))
        if diff > 1e-6 * max(1.0, after.max_phase_rms_a):
            notes.append(
                f"engine and optimiser figures differ by {diff:.3g} A (please report this)"
            )
    if target_pct is not None and status in ("optimal", "best-found") and not met:
        status = "best-found"
    shown_target = "" if target_pct is None else f"{target_pct:g} %"
    objective = _objective_text(opts, shown_target)
    control.report("done", 1.0)
    return Suggestion(
        status=status,
        mode=opts.mode,
        objective=objective,
        moves=tuple(moves),
        steps=tuple(steps),
        before=before,
        after=after,
        bound=bound,
        floor_a=pr.floor_a,
        target_pct=target_pct,
        target_met=met,
        neutral_max_a=opts.neutral_max_a,
        max_moves=opts.max_moves,
        schedule=after_schedule,
        unplaced_left=unplaced_left,
        notes=tuple(dict.fromkeys(notes)),
        solver_calls=calls,
        elapsed_s=control.elapsed(),
    )
