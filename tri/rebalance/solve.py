"""The rebalancer's entry point: :func:`suggest`.

The modes are those of :mod:`tri.rebalance.options`. In every mode:

1. the panel is turned into arrays (:func:`tri.rebalance.problem.build_problem`),
   the engine's own currents for every option of every free breaker;
2. the greedy start and local search (:mod:`tri.rebalance.heuristic`)
   give a plan in milliseconds; its slots are realised with the fewest
   relocations (:mod:`tri.rebalance.realise`);
3. the search with its proof (:mod:`tri.rebalance.target` for fewest
   moves, :mod:`tri.rebalance.balance` otherwise) improves it or proves
   it, with the slot geometry inside the model, until the time limit;
4. the plan is carried out on the schedule and the engine is run on the
   schedule before and after (:func:`tri.schedule.to_engine.analyse_schedule`):
   those are the figures reported.

With ``use`` scenarios every step works in every case at once (the
connected load, as ``tri check`` judges it, and each scenario:
:mod:`tri.rebalance.problem`, Cases): the target and the neutral limit must
hold in every case, and the balance modes minimise the worst case's
largest phase RMS current; the engine runs on every case before and after.

The status is a claim about the objective the output names (relocations
as the work order counts them; the engine's largest phase RMS current):
``optimal`` only when proven, ``best-found`` with a proven bound,
``infeasible`` only when proven.

Anytime: ``progress(fraction, message)`` reports along the way; ``cancel``
(a ``threading.Event`` or a callable) stops the search from another
thread, and :func:`suggest` then raises
:class:`~tri.rebalance.control.Cancelled`.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field, replace
from typing import Literal

import numpy as np

from tri.rebalance.balance import solve_balance
from tri.rebalance.control import CancelHook, Cancelled, Control, ProgressCallback
from tri.rebalance.exhaust import enumeration_fits
from tri.rebalance.first_plan import heuristic_plan
from tri.rebalance.goal import Goal
from tri.rebalance.halves import halves_fit
from tri.rebalance.heuristic import LocalSearch
from tri.rebalance.moves import moves_for, unit_notes
from tri.rebalance.options import SuggestOptions, objective_text
from tri.rebalance.plans import TOL, Evaluator, Plan
from tri.rebalance.problem import Problem, build_problem
from tri.rebalance.results import CaseResult, Figures, Status, Suggestion, apply_moves
from tri.rebalance.target import Outcome, solve_target
from tri.schedule.model import Schedule
from tri.schedule.to_scenarios import analyse_cases
from tri.words import plural


def free_indices(schedule: Schedule, opts: SuggestOptions) -> list[int]:
    """Circuits whose position the mode may choose (:mod:`tri.rebalance.options`)."""
    mode = opts.mode
    out = []
    for i, c in enumerate(schedule.circuits):
        if c.locked and c.is_placed:
            continue
        if c.is_placed:
            if mode != "place-new":
                out.append(i)
        elif opts.place_new or mode in ("place-new", "relayout"):
            out.append(i)
    return out


@dataclass
class _Run:
    """One call of :func:`suggest`: what every step shares."""

    pr: Problem
    opts: SuggestOptions
    control: Control
    before: Figures
    goal: Goal
    notes: list[str] = field(default_factory=list)
    calls: int = 0
    before_cases: list[tuple[str, Figures]] = field(default_factory=list)
    keep_best_on_cancel: bool = False

    @property
    def has_new(self) -> bool:
        return bool(np.any(~self.pr.movable)) if self.pr.n_free else False


def _heuristic(
    run: _Run,
    goal: Goal,
    ev: Evaluator,
    from_scratch: bool = False,
    kicks: bool = True,
    stop_gap: float = 1e-12,
) -> Plan | None:
    """The heuristic's plan, realised in slots and within the budget (fewer changes if needed)."""
    pr, control = run.pr, run.control
    if pr.n_free == 0:
        return None
    budgets = [goal.max_moves] if goal.max_moves is None else range(goal.max_moves, -1, -1)
    for k in budgets:
        if control.stop():
            break
        a = heuristic_plan(
            pr,
            replace(goal, max_moves=k),
            control,
            from_scratch=from_scratch,
            kicks=kicks,
            stop_gap=stop_gap,
        )
        plan = None if a is None else ev.plan(a)
        if ev.good(plan):
            return plan
    return None


def _current_plan(run: _Run, ev: Evaluator) -> Plan | None:
    """The panel as it is, when that is a plan (no new circuit waiting for a slot)."""
    if run.has_new:
        return None
    return ev.plan(run.pr.current_assignment())


def _fewest_moves(run: _Run) -> tuple[Plan | None, Status, float | None]:
    pr, goal = run.pr, run.goal
    ev = Evaluator(pr, goal, run.control)
    now = _current_plan(run, ev)
    if now is not None and ev.good(now):
        return now, "already-balanced", None
    run.control.report("greedy start and local search")
    # descents only: the proof below improves the plan where it can
    plan = _heuristic(run, goal, ev, kicks=False)
    fallback = None
    if plan is None:  # the balance descent, for a start or to show the best balance reached
        balance_goal = replace(goal, target=None)
        balance_ev = Evaluator(pr, balance_goal, run.control)
        fallback = _heuristic(run, balance_goal, balance_ev, kicks=False)
        if ev.good(fallback):
            plan = fallback
    if run.opts.use_solver and pr.n_free:
        out = solve_target(pr, goal, run.control, plan, ev, list_plans=run.opts.list_plans)
    else:
        out = Outcome(plan, proven=pr.n_free == 0, bound=0.0 if run.has_new else 1.0)
    run.calls += out.solver_calls
    run.notes.extend(out.notes)
    if out.plan is not None:
        return (
            out.plan,
            ("optimal" if out.proven else "best-found"),
            (None if out.proven else out.bound),
        )
    shown = fallback if fallback is not None else now
    if shown is None:
        run.notes.append("the new circuits do not fit in the free slots")
    return shown, ("infeasible" if out.proven else "best-found"), out.bound


def _best_balance(run: _Run) -> tuple[Plan | None, Status, float | None]:
    pr, opts, control = run.pr, run.opts, run.control
    goal = replace(run.goal, target=None)
    ev = Evaluator(pr, goal, run.control)
    control.report("greedy start and local search")
    budget = pr.n_movable if goal.max_moves is None else goal.max_moves
    # when every plan that could beat the start will be listed, the descents suffice
    listed = enumeration_fits(pr, budget) or halves_fit(pr, budget)
    kicks = not (opts.list_plans and listed)
    relayout = opts.mode == "relayout"
    plan = _heuristic(run, goal, ev, relayout, kicks, stop_gap=0.5 * opts.floor_gap)
    now = _current_plan(run, ev)
    if plan is None and ev.good(now):
        plan = now
    if pr.n_free == 0:
        run.notes.append(
            "there are no new circuits to place"
            if opts.mode == "place-new"
            else "nothing can move: every circuit is locked"
        )
    if opts.use_solver and pr.n_free:
        out = solve_balance(
            pr, goal, control, plan, ev, stop_gap=opts.floor_gap, list_plans=opts.list_plans
        )
    else:
        out = Outcome(plan, proven=pr.n_free == 0 and plan is not None, bound=pr.worst_floor_a)
    run.calls += out.solver_calls
    run.notes.extend(out.notes)
    if out.plan is None:
        if run.has_new:
            run.notes.append("the new circuits do not fit in the free slots")
        elif opts.neutral_max_a is not None:
            run.notes.append(f"no plan keeps the neutral at or below {opts.neutral_max_a:g} A")
        return None, ("infeasible" if out.proven else "best-found"), out.bound
    best = out.plan
    if opts.mode == "relayout":
        best = _fewer_relocations(run, goal, ev, best)
    status: Status = "optimal" if out.proven else "best-found"
    unchanged = best.relocations == 0 and not run.has_new and pr.n_free > 0
    if status == "optimal" and unchanged and opts.mode == "balance":
        status = "already-balanced"
    return best, status, None if out.proven else out.bound


def _fewer_relocations(run: _Run, goal: Goal, ev: Evaluator, plan: Plan) -> Plan:
    """Undo changes of a re-layout that do not raise the largest phase current."""
    ls = LocalSearch(run.pr, goal, run.control, plan.assign)
    ls.prune()
    cand = ev.plan(ls.assign)
    if (
        ev.good(cand)
        and cand is not None
        and cand.relocations < plan.relocations
        and cand.max_rms_a <= plan.max_rms_a * (1 + TOL)
    ):
        return cand
    return plan


def suggest(
    schedule: Schedule,
    options: SuggestOptions | None = None,
    *,
    progress: ProgressCallback | None = None,
    cancel: CancelHook | None = None,
    keep_best_on_cancel: bool = False,
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
    keep_best_on_cancel : bool
        When the cancel hook fires: return the best plan so far (``stopped =
        "cancelled"``, the status what was proven by then) instead of raising.

    Returns
    -------
    Suggestion

    Raises
    ------
    ValueError
        For options the panel cannot take (a neutral limit on a 3-wire system).
    Cancelled
        When the cancel hook fired (unless ``keep_best_on_cancel``).
    """
    opts = options or SuggestOptions()
    if opts.neutral_max_a is not None and not schedule.system.has_neutral:
        raise ValueError("a neutral limit needs a system with a neutral (this one is 3-wire)")
    control = Control(opts.time_limit_s, progress, cancel)
    control.report("analysing the panel as it is", 0.0)
    before = _case_figures(schedule)
    target_pct = opts.effective_target_pct
    goal = Goal(
        target=None if target_pct is None else target_pct / 100.0,
        neutral_max_a=opts.neutral_max_a,
        max_moves=0 if opts.mode == "place-new" else opts.max_moves,
    )
    free = free_indices(schedule, opts)
    pr = build_problem(schedule, free)
    keep = keep_best_on_cancel
    run = _Run(pr, opts, control, before[0][1], goal, before_cases=before, keep_best_on_cancel=keep)
    run.notes.extend(unit_notes(schedule, free, pr))
    reach = schedule.panel.max_row_shift if schedule.panel.uses_slots else None
    if reach is not None:
        run.notes.append(
            f"reach limit honoured: no breaker is offered a slot more than {reach} "
            f"row{'' if reach == 1 else 's'} from where it is ([panel] max_row_shift); "
            "every claim here is about plans within that limit"
        )
    if opts.mode == "fewest-moves":
        plan, status, bound = _fewest_moves(run)
    else:
        plan, status, bound = _best_balance(run)
    return _finish(run, plan, status, bound)


def _case_figures(schedule: Schedule) -> list[tuple[str, Figures]]:
    """Engine figures of the connected load and of every scenario, in case order."""
    return [(c.name, Figures.of(c.analysis)) for c in analyse_cases(schedule)]


def _met(opts: SuggestOptions, fig: Figures) -> bool:
    """The target and the neutral limit hold in one case's engine figures (to round-off)."""
    target_pct = opts.effective_target_pct
    met = True
    if target_pct is not None:
        met = fig.max_deviation_pct <= target_pct * (1 + TOL) + 1e-12
    if opts.neutral_max_a is not None:
        met = met and fig.neutral_rms_a <= opts.neutral_max_a * (1 + TOL)
    return met


def _check_engine(run: _Run, plan: Plan, after: list[tuple[str, Figures]]) -> None:
    """Every case's engine figures against the optimiser's (a note if they differ)."""
    for fig, (_, eng) in zip(plan.figures.cases, after, strict=True):
        exact = fig.phase_rms_a
        diff = max(abs(a - b) for a, b in zip(exact, eng.phases_rms_a, strict=True))
        if diff > 1e-6 * max(1.0, eng.max_phase_rms_a):
            run.notes.append(
                f"engine and optimiser figures differ by {diff:.3g} A (please report this)"
            )


def _finish(run: _Run, plan: Plan | None, status: Status, bound: float | None) -> Suggestion:
    control, pr, opts = run.control, run.pr, run.opts
    stopped: Literal["cancelled"] | None = None
    if control.cancelled():
        if not run.keep_best_on_cancel:
            raise Cancelled
        stopped = "cancelled"
    moves, steps = moves_for(pr, plan) if plan is not None and pr.n_free else ([], [])
    after_schedule = apply_moves(pr.schedule, moves)
    after_cases = _case_figures(after_schedule) if moves else run.before_cases
    after = after_cases[0][1]
    met = all(_met(opts, fig) for _, fig in after_cases)
    # new circuits asked to be placed but left without a slot: the goal is not met
    new = pr.free[~pr.movable].tolist() if pr.n_free else []
    met = met and all(after_schedule.circuits[i].is_placed for i in new)
    if moves and plan is not None:
        _check_engine(run, plan, after_cases)
    target_pct = opts.effective_target_pct
    if target_pct is not None and status in ("optimal", "already-balanced") and not met:
        status = "best-found"
    control.report("done", 1.0)
    scen = len(after_cases) > 1
    floors = [v.floor_a for v in pr.views()]
    return Suggestion(
        status=status,
        mode=opts.mode,
        objective=_objective(run),
        moves=tuple(moves),
        steps=tuple(steps),
        before=run.before,
        after=after,
        bound=bound,
        floor_a=pr.worst_floor_a,
        target_pct=target_pct,
        target_met=met,
        neutral_max_a=opts.neutral_max_a,
        max_moves=opts.max_moves,
        schedule=after_schedule,
        unplaced_left=tuple(c.name for c in after_schedule.circuits if not c.is_placed),
        notes=tuple(dict.fromkeys(run.notes)),
        solver_calls=run.calls,
        elapsed_s=control.elapsed(),
        stop_gap=opts.floor_gap if opts.mode != "fewest-moves" else 0.0,
        cases=tuple(
            CaseResult(name, b, a)
            for (name, b), (_, a) in zip(run.before_cases, after_cases, strict=True)
        )
        if scen
        else (),
        deciding=_deciding(opts, after_cases) if scen else None,
        floor_case=pr.case_names[int(np.argmax(floors))] if scen else None,
        stopped=stopped,
    )


def _objective(run: _Run) -> str:
    """The objective in words; a group moved as one block counts once (module units)."""
    text = objective_text(run.opts, run.pr.case_names)
    if run.opts.mode in ("fewest-moves", "balance") and any(
        u.group is not None for u in run.pr.units
    ):
        # the count is of relocations, not of breakers: name it so
        text = text.replace("number of breakers relocated", "number of relocations")
        text = re.sub(r"at most (\d+) breakers? relocated", _relocations, text)
        text += "; a shared-neutral group moved as one block counts as one relocation"
    return text


def _relocations(match: re.Match[str]) -> str:
    """``at most 1 breaker relocated`` as ``at most 1 relocation`` (a group counts once)."""
    return f"at most {plural(int(match.group(1)), 'relocation')}"


def _deciding(opts: SuggestOptions, cases: list[tuple[str, Figures]]) -> str:
    """The case that decides after the moves (:attr:`Suggestion.deciding`)."""
    if opts.mode == "fewest-moves":
        return max(cases, key=lambda c: c[1].max_deviation_pct)[0]
    return max(cases, key=lambda c: c[1].max_phase_rms_a)[0]
