"""The building plan carried out: every panel's moves and work order, the engine before and after.

The plan of :mod:`tri.rebalance.tree_loop` is turned into moves in each
panel by the single-panel rebalancer's own :func:`tri.rebalance.moves.moves_for`
(a shared-neutral group's breakers in one step, a wired breaker's phases in
pole order; the work order of :func:`tri.rebalance.workorder.order_work`),
carried out on every panel's schedule, and the engine is run on the
building after the moves (:func:`tri.schedule.tree_to_engine.analyse_building`),
in every case (the connected load and each scenario of the building): those
figures are reported, and compared with the optimiser's; a panel meets its
target only when the engine finds it within in every case.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from tri.rebalance.moves import moves_for
from tri.rebalance.results import CaseResult, Figures, Move, apply_moves
from tri.rebalance.tree_loop import TreePlan, TreeSearch
from tri.rebalance.tree_problem import TreeProblem
from tri.rebalance.tree_results import (
    OutsideFigures,
    PanelPlan,
    Stopped,
    TreeStatus,
    TreeSuggestion,
)
from tri.rebalance.workorder import WorkStep
from tri.schedule.model import Schedule
from tri.schedule.tree import ScheduleTree, with_schedules
from tri.schedule.tree_to_engine import analyse_building
from tri.words import plural

Work = dict[int, tuple[list[Move], list[WorkStep]]]


def analyse_cases(tree: ScheduleTree, case_names: tuple[str, ...]) -> tuple[Any, ...]:
    """The engine's building analysis in every case (the connected load first)."""
    return tuple(
        analyse_building(tree, scenario=None if c == 0 else name)
        for c, name in enumerate(case_names)
    )


def _carry_out(
    tree: ScheduleTree, tp: TreeProblem, plan: TreePlan | None
) -> tuple[list[Schedule], Work]:
    """Every panel's schedule after its moves, and the moves by panel index."""
    schedules = [p.schedule for p in tree.panels]
    work: Work = {}
    if plan is not None:
        for k, node in enumerate(tp.nodes):
            local = plan.plans[k]
            if local is not None:
                mv, st = moves_for(tp.problems[k], local)
                if mv:
                    work[node] = (mv, st)
                    schedules[node] = apply_moves(schedules[node], mv)
    return schedules, work


def _depth(tp: TreeProblem, k: int) -> int:
    d = 0
    while tp.parent[k] >= 0:
        k = int(tp.parent[k])
        d += 1
    return d


def _panel_plans(tree, tp, schedules, work: Work, before, after) -> list[PanelPlan]:
    """Every panel's entry; ``before``/``after``: the engine's analyses, one per case."""
    out = []
    scenarios = tp.n_cases > 1
    for k, node in enumerate(tp.nodes):
        p = tree.panels[node]
        mv, st = work.get(node, ([], []))
        cases = tuple(
            CaseResult(
                name,
                Figures.of(before[c].nodes[node].analysis),
                Figures.of(after[c].nodes[node].analysis),
            )
            for c, name in enumerate(tp.case_names)
        )
        out.append(
            PanelPlan(
                index=node,
                file=p.shown,
                panel=p.schedule.panel.name,
                depth=_depth(tp, k),
                parent_file=None if k == 0 else tree.panels[p.parent or 0].shown,
                target_pct=100.0 * float(tp.targets[k]),
                moves=tuple(mv),
                steps=tuple(st),
                before=cases[0].before,
                after=cases[0].after,
                schedule=schedules[node],
                cases=cases if scenarios else (),
            )
        )
    return out


def _above(tree: ScheduleTree, tp: TreeProblem, before, after) -> tuple[OutsideFigures, ...]:
    """The panels above the service, root first."""
    out = []
    i = tree.panels[tp.nodes[0]].parent
    while i is not None:
        p = tree.panels[i]
        out.append(
            OutsideFigures(
                p.shown,
                p.schedule.panel.name,
                Figures.of(before.nodes[i].analysis),
                Figures.of(after.nodes[i].analysis),
            )
        )
        i = p.parent
    return tuple(out[::-1])


def _neutral_met(service: PanelPlan, limit: float | None) -> bool:
    """The engine's service neutral after the moves within ``limit`` in every case (round-off)."""
    if limit is None:
        return True
    cases = service.cases or ()
    values = [c.after.neutral_rms_a for c in cases] or [service.after.neutral_rms_a]
    return all(v <= limit * (1 + 1e-9) for v in values)


def finish(
    tree: ScheduleTree,
    tp: TreeProblem,
    search: TreeSearch,
    asked: tuple[float, float, int | None, float | None],
    status: tuple[TreeStatus, int | None],
    before: Any,
    objective: str,
) -> TreeSuggestion:
    """The suggestion of the module notes.

    ``asked``: service and child targets [%], the cap on relocations and the
    neutral limit at the service [A];
    ``status``: what the search proved and its bound; ``before``: the
    engine's building analysis as it is, one per case (:func:`analyse_cases`).
    """
    control = search.control
    final, bound = status
    plan = search.best if final != "already-balanced" else None
    schedules, work = _carry_out(tree, tp, plan)
    after_tree = with_schedules(tree, schedules) if work else tree
    after = analyse_cases(after_tree, tp.case_names) if work else before
    notes = list(search.notes)
    if plan is not None and work:
        mine = tp.case_deviations_pct(plan.assign)
        engine = np.array(
            [
                [a.nodes[n].analysis.current_unbalance.max_deviation_pct for n in tp.nodes]
                for a in after
            ]
        )
        if np.max(np.abs(mine - engine)) > 1e-6 * max(1.0, float(np.max(engine))):
            notes.append("engine and optimiser figures differ (please report this)")
        if asked[3] is not None:
            mine_n = tp.case_service_neutral_a(plan.assign)
            engine_n = np.array(
                [Figures.of(a.nodes[tp.nodes[0]].analysis).neutral_rms_a for a in after]
            )
            if np.max(np.abs(mine_n - engine_n)) > 1e-6 * max(1.0, float(np.max(engine_n))):
                notes.append("engine and optimiser neutral currents differ (please report this)")
    panels = _panel_plans(tree, tp, schedules, work, before, after)
    met = all(p.target_met for p in panels) and _neutral_met(panels[0], asked[3])
    if final in ("optimal", "already-balanced") and not met:
        final, bound = "best-found", search.lower
    stopped: Stopped | None = None
    if not search.proven and final != "already-balanced":
        stopped = "cancelled" if control.cancelled() else ("time limit" if control.stop() else None)
    unplaced = sum(1 for n in tp.nodes for c in tree.panels[n].schedule.circuits if not c.is_placed)
    if unplaced:
        notes.append(f"{plural(unplaced, 'circuit')} without a slot left as they are")
    control.report("done", 1.0)
    return TreeSuggestion(
        status=final,
        objective=objective,
        panels=tuple(panels),
        above=_above(tree, tp, before[0], after[0]),
        bound=bound,
        target_pct=asked[0],
        child_target_pct=asked[1],
        max_moves=asked[2],
        neutral_max_a=asked[3],
        notes=tuple(dict.fromkeys(notes)),
        stopped=stopped,
        solver_calls=search.calls,
        elapsed_s=control.elapsed(),
        tree=after_tree,
        case_names=tp.case_names,
    )
