"""The building rebalancer's entry point: :func:`suggest_tree`.

The fewest breaker relocations, anywhere in the service panel and the
panels below it, after which the service's phase RMS currents are within
its target of their mean and every panel below it within its own target.
A panel's figures include everything it feeds, rolled up by the engine
(feeders and transformers, every harmonic order; :mod:`tri.rebalance.tree_problem`).
With ``use`` factors in any panel the targets hold in every case at once:
the connected load and each of the building's scenarios (each step works
over every case; the engine re-checks the plan in each).

1. the building is turned into arrays (one single-panel problem per panel
   and the engine's transfer of currents up the tree);
2. the search of :mod:`tri.rebalance.tree_loop` (a beam search, plans
   listed by number of changes, the program of
   :mod:`tri.rebalance.tree_model`) finds the plan and its proof;
3. the plan is carried out on every panel's schedule and the engine is run
   on the building before and after
   (:func:`tri.schedule.tree_to_engine.analyse_building`), in every case:
   those are the figures reported.

The status is a claim about relocations over the panels searched, as the
work order counts them: ``optimal`` only when proven, ``best-found`` with
a proven lower bound, ``infeasible`` only when proven. Panels above a
service named lower in the tree are not searched (their figures are shown).

Anytime: ``progress(fraction, message)`` reports along the way; ``cancel``
(a ``threading.Event`` or a callable) ends the search early, and the best
plan so far is returned with its honest status (``stopped = "cancelled"``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tri.rebalance.control import CancelHook, Control, ProgressCallback
from tri.rebalance.moves import unit_notes
from tri.rebalance.options import DEFAULT_TARGET_PCT, DEFAULT_TIME_LIMIT_S, cases_text
from tri.rebalance.tree_finish import analyse_cases, finish
from tri.rebalance.tree_loop import TreeSearch
from tri.rebalance.tree_model import TreeModelParts
from tri.rebalance.tree_problem import (
    TreeProblem,
    build_tree_problem,
    subtree,
    tree_free_indices,
)
from tri.rebalance.tree_results import TreeStatus, TreeSuggestion
from tri.schedule.tree import ScheduleTree
from tri.words import plural


@dataclass(frozen=True)
class TreeOptions:
    """What to ask the building rebalancer.

    Attributes
    ----------
    target_pct : float or None
        Largest deviation of a phase RMS current from the mean at the
        service [%]; default :data:`~tri.rebalance.options.DEFAULT_TARGET_PCT`.
    child_target_pct : float or None
        The same at every panel below the service [%]; default: the service's.
    max_moves : int or None
        Largest number of relocations in all [-].
    service : str or None
        The panel to balance (its ``[panel] name`` or its file); None: the root.
    neutral_max_a : float or None
        Largest neutral RMS current at the service after the moves, in
        every case, everything it feeds included [A]; None: no limit.
    time_limit_s : float
        Wall-clock budget [s].
    use_solver : bool
        False: the beam search and the listing only (for comparisons).
    list_plans : bool
        False: no listing of plans (for tests of the other steps).
    decompose : bool
        False: no bounds of the subtrees from the single-panel search
        (for tests of the other steps).
    """

    target_pct: float | None = None
    child_target_pct: float | None = None
    max_moves: int | None = None
    service: str | None = None
    neutral_max_a: float | None = None
    time_limit_s: float = DEFAULT_TIME_LIMIT_S
    use_solver: bool = True
    list_plans: bool = True
    decompose: bool = True

    def __post_init__(self) -> None:
        problems = []
        for what, v in (("target", self.target_pct), ("child target", self.child_target_pct)):
            if v is not None and not (math.isfinite(v) and 0 <= v <= 200):
                problems.append(f"the {what} must be a percentage from 0 to 200")
        lim = self.neutral_max_a
        if lim is not None and not (math.isfinite(lim) and lim > 0):
            problems.append("the neutral limit must be a current above 0 A")
        if self.max_moves is not None and self.max_moves < 0:
            problems.append("the number of moves must be 0 or more")
        if not (math.isfinite(self.time_limit_s) and self.time_limit_s > 0):
            problems.append("the time limit must be above 0 s")
        if problems:
            raise ValueError("; ".join(problems))

    @property
    def service_target_pct(self) -> float:
        """Target at the service [%]."""
        return DEFAULT_TARGET_PCT if self.target_pct is None else self.target_pct

    @property
    def below_target_pct(self) -> float:
        """Target at every panel below the service [%]."""
        return self.service_target_pct if self.child_target_pct is None else self.child_target_pct


def find_service(tree: ScheduleTree, name: str | None) -> int:
    """Index of the panel named ``name`` (``[panel] name`` or file); 0 for None.

    Raises
    ------
    ValueError
        No panel, or more than one, answers to the name; the message lists them.
    """
    if name is None:
        return 0
    wanted = name.strip().casefold()
    hits = [
        i
        for i, p in enumerate(tree.panels)
        if wanted
        in (
            p.schedule.panel.name.casefold(),
            p.shown.casefold(),
            p.path.name.casefold(),
            p.path.stem.casefold(),
        )
    ]
    listed = "; ".join(f"{p.schedule.panel.name} ({p.shown})" for p in tree.panels)
    if not hits:
        raise ValueError(f"no panel of the building is named '{name}' (panels: {listed})")
    if len(hits) > 1:
        raise ValueError(f"more than one panel answers to '{name}' (panels: {listed})")
    return hits[0]


def reach_notes(tree: ScheduleTree, nodes: list[int]) -> list[str]:
    """One note per panel of the search with a reach limit: the claims are within it."""
    out = []
    for i in nodes:
        p = tree.panels[i]
        reach = p.schedule.panel.max_row_shift if p.schedule.panel.uses_slots else None
        if reach is not None:
            out.append(
                f"reach limit honoured in {p.schedule.panel.name} ({p.shown}): no breaker is "
                f"offered a slot more than {plural(reach, 'row')} from where it is "
                "([panel] max_row_shift); every claim here is about plans within that limit"
            )
    return out


def wiring_notes(tp: TreeProblem) -> list[str]:
    """What the output must say about each panel's units, naming the panel (its wiring:
    shared-neutral groups, RCD groups, a high leg; :func:`tri.rebalance.moves.unit_notes`)."""
    out: list[str] = []
    for k, node in enumerate(tp.nodes):
        p, pr = tp.tree.panels[node], tp.problems[k]
        free = tree_free_indices(p.schedule)
        out.extend(
            f"{p.schedule.panel.name} ({p.shown}): {n}" for n in unit_notes(p.schedule, free, pr)
        )
    return out


def has_groups(tp: TreeProblem) -> bool:
    """Some panel of the search has a shared-neutral group: its move counts once."""
    return any(u.group is not None for pr in tp.problems for u in pr.units)


def objective_words(
    tree: ScheduleTree,
    nodes: list[int],
    opts: TreeOptions,
    case_names: tuple[str, ...] = (),
    groups: bool = False,
) -> str:
    """What the building search minimises, in words (``case_names``: every case judged;
    ``groups``: some panel has a shared-neutral group, whose move counts once)."""
    service = tree.panels[nodes[0]]
    cap = f" (at most {opts.max_moves})" if opts.max_moves is not None else ""
    below = len(nodes) - 1
    count = "number of relocations" if groups else "number of breakers relocated"
    text = f"{count}{cap} in {service.schedule.panel.name} ({service.shown})"
    if below:
        text += f" and the {plural(below, 'panel')} below it"
    text += (
        f", so that every phase RMS current of {service.schedule.panel.name} is within "
        f"{opts.service_target_pct:g} % of the mean of the three"
    )
    if below:
        text += f" and that of every panel below it within {opts.below_target_pct:g} %"
    cases = cases_text(case_names)
    if opts.neutral_max_a is not None:
        text += (
            f", with the neutral RMS current of {service.schedule.panel.name} at most "
            f"{opts.neutral_max_a:g} A"
        )
    if cases:
        text += f", in every case ({cases})"
    if groups:
        text += "; a shared-neutral group moved as one block counts as one relocation"
    return (
        text + "; each panel's currents include what it feeds, through feeders and "
        "transformers, every harmonic order, at nominal voltage"
    )


def suggest_tree(
    tree: ScheduleTree,
    options: TreeOptions | None = None,
    *,
    progress: ProgressCallback | None = None,
    cancel: CancelHook | None = None,
) -> TreeSuggestion:
    """Propose breaker moves across a building (module notes).

    Parameters
    ----------
    tree : ScheduleTree
        The building, from :func:`tri.schedule.tree.load_tree`.
    options : TreeOptions, optional
    progress : callable, optional
        ``progress(fraction or None, message)`` during the search.
    cancel : threading.Event or callable, optional
        Ends the search early; the best plan so far is returned.

    Returns
    -------
    TreeSuggestion

    Raises
    ------
    ValueError
        An unknown service panel, or a neutral limit on a 3-wire service.
    """
    opts = options or TreeOptions()
    service = find_service(tree, opts.service)
    nodes = subtree(tree, service)
    top = tree.panels[service]
    if opts.neutral_max_a is not None and not top.schedule.system.has_neutral:
        raise ValueError(
            f"{top.shown}: a neutral limit needs a system with a neutral "
            f"({top.schedule.panel.system} is 3-wire)"
        )
    control = Control(opts.time_limit_s, progress, cancel)
    control.report("analysing the building as it is", 0.0)
    tp = build_tree_problem(
        tree,
        service,
        opts.service_target_pct / 100.0,
        opts.below_target_pct / 100.0,
        opts.neutral_max_a,
    )
    before = analyse_cases(tree, tp.case_names)
    movable = int(np.sum(tp.movable)) if tp.n_free else 0
    cap = movable if opts.max_moves is None else min(opts.max_moves, movable)
    search = TreeSearch(tp, control, cap, cancel=cancel)
    search.notes.extend(reach_notes(tree, nodes))
    search.notes.extend(wiring_notes(tp))
    status = _search(search, tp, opts)
    final, bound = _status(search, status)
    words = objective_words(tree, nodes, opts, tp.case_names, has_groups(tp))
    asked = (opts.service_target_pct, opts.below_target_pct, opts.max_moves, opts.neutral_max_a)
    return finish(tree, tp, search, asked, (final, bound), before, words)


def _fixed_failure(tp: TreeProblem) -> list[int]:
    """Nodes that miss their target (in some case) whatever moves: nothing below them can move."""
    dev = tp.case_deviations_pct(tp.current_assignment()).max(axis=0)
    return [
        k
        for k in range(tp.size)
        if tp.circuit_offsets[tp.ends[k]] == tp.circuit_offsets[k]
        and dev[k] > 100.0 * tp.targets[k] * (1 + 1e-9) + 1e-12
    ]


def _search(search: TreeSearch, tp: TreeProblem, opts: TreeOptions) -> TreeStatus | None:
    """Run the steps; returns ``already-balanced`` or None (the status follows from the search)."""
    if tp.meets(tp.current_assignment()):
        return "already-balanced"
    stuck = _fixed_failure(tp)
    if stuck:
        search.lower = search.cap + 1
        for k in stuck:
            p = tp.tree.panels[tp.nodes[k]]
            search.notes.append(
                f"{p.schedule.panel.name} ({p.shown}) misses its target and nothing at or "
                "below it can move"
            )
        return None
    search.heuristic()
    # without a first plan the subtree bounds go first: they may prove that none exists
    # (a panel that cannot meet its target alone) before a long listing of plans
    early = opts.decompose and opts.use_solver and search.best is None
    if early:
        search.decomposed_bound()
        if search.proven or search.control.stop():
            return None
    if opts.list_plans:
        search.listing()
    if search.proven or search.control.stop() or not opts.use_solver:
        return None
    if opts.decompose and not early:
        search.decomposed_bound()
        if search.proven or search.control.stop():
            return None
    search.control.report("preparing the program for the building")
    parts = TreeModelParts(tp)
    if not parts.fits():
        search.notes.append(
            "the building is too large for the exact program; the bound comes from listing "
            "plans with few changes"
        )
        return None
    search.model_loop(parts)
    return None


def _status(search: TreeSearch, status: TreeStatus | None) -> tuple[TreeStatus, int | None]:
    """The status the search proved, and the bound to show with it."""
    if status is not None:
        return status, None
    if search.best is not None:
        return ("optimal", None) if search.proven else ("best-found", search.lower)
    return ("infeasible", None) if search.proven else ("best-found", search.lower)
