"""The building search: a beam search, plans listed by number of changes, then the program.

State of one search for the fewest relocations over the panels of a
:class:`~tri.rebalance.tree_problem.TreeProblem` that bring every panel
within its target. Four steps, each improving the best plan or the proven
lower bound on the relocations (``lower``):

1. the beam search (:func:`tri.rebalance.tree_search.beam_plans`) gives a
   first plan;
2. levels of ``j = 0, 1, 2, ...`` changes are listed in full while they are
   small (:func:`tri.rebalance.tree_search.listed_plans`); every plan found
   is realised in every panel's slots with its fewest relocations. A plan
   with at most ``j`` relocations has at most ``j`` changes, so once levels
   ``0..j`` are listed and every listed plan's realisation is proven, no
   plan with at most ``j`` relocations was missed: ``lower ≥ min(j + 1, best)``;
3. every panel's target holds with the breakers of its own subtree alone,
   and sibling subtrees share no breaker: so the single-panel search
   (:func:`tri.rebalance.target.solve_target`) on each leaf (its own slots)
   and on each other panel's node view (phase changes, which never exceed
   relocations) proves a lower bound ``L_k`` for that subtree, and
   ``lower ≥ D_root`` with ``D_k = max(L_k, Σ_children D_c)`` (a neutral
   limit at the service is left out of these searches: a bound proven
   with fewer conditions is still a bound);
4. the program (:mod:`tri.rebalance.tree_model`) asks for a plan with one
   relocation fewer than the best: infeasible proves the best optimal (or,
   without a plan, none within the cap); its bound raises ``lower``; a
   solution is checked exactly and kept, or teaches the program.

When step 1 finds no plan, step 3 runs before step 2: it may prove at once
that none exists (a panel that cannot meet its target with its own
breakers), where the listing would run to its limit. The order changes
only which step proves what, never a claim.

Every plan kept passed the exact check: every node's deviation from the
superposition of the engine's currents, within its target.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from tri.rebalance.control import CancelHook, Control, longer_slice
from tri.rebalance.electrical import decode_options
from tri.rebalance.goal import Goal
from tri.rebalance.lower_bounds import RESOLUTIONS
from tri.rebalance.plans import Evaluator, Plan
from tri.rebalance.tree_model import (
    TreeLearnt,
    TreeModelParts,
    build_tree_model,
    relocations_bound,
)
from tri.rebalance.tree_problem import TreeProblem
from tri.rebalance.tree_search import beam_plans, changes_of, listed_plans
from tri.words import plural

#: Largest number of plans realised at one listed level before the level is left unsettled [-].
REALISE_LIMIT = 400


@dataclass(frozen=True, eq=False)
class TreePlan:
    """Options and slots of every panel of one plan.

    Attributes
    ----------
    assign : int ndarray, shape (F,)
        Global option of every free circuit.
    plans : list of Plan or None
        Per node (None: no free circuit there).
    relocations : int
        Sum over the panels [-].
    fewest : bool
        Every panel's count is proven the fewest for these options.
    """

    assign: np.ndarray
    plans: list[Plan | None]
    relocations: int
    fewest: bool


@dataclass
class TreeSearch:
    """One search (module notes)."""

    tp: TreeProblem
    control: Control
    cap: int
    best: TreePlan | None = None
    lower: int = 0
    calls: int = 0
    notes: list[str] = field(default_factory=list)
    cancel: CancelHook | None = None

    def __post_init__(self) -> None:
        self.evs = [Evaluator(pr, Goal(), self.control) for pr in self.tp.problems]
        self.changes = changes_of(self.tp)
        self.slice_s = 0.5

    @property
    def best_k(self) -> int | None:
        return None if self.best is None else self.best.relocations

    @property
    def proven(self) -> bool:
        """The best plan is proven fewest (or, without one, none exists within the cap)."""
        if self.best is None:
            return self.lower > self.cap
        return self.lower >= self.best.relocations

    def realise(self, assign: np.ndarray) -> tuple[TreePlan | None, bool]:
        """The plan of these options in every panel's slots, and whether that is proven."""
        plans: list[Plan | None] = []
        total, fewest = 0, True
        for k, a in enumerate(self.tp.split(assign)):
            ev = self.evs[k]
            if not self.tp.problems[k].n_free:
                plans.append(None)
                continue
            plan = ev.plan(a)
            if plan is None:
                return None, ev.proven(a)
            plans.append(plan)
            total += plan.relocations
            fewest = fewest and ev.proven(a)
        return TreePlan(np.asarray(assign, dtype=int).copy(), plans, total, fewest), fewest

    def offer(self, plan: TreePlan | None) -> bool:
        """Keep ``plan`` when it meets every target with fewer relocations than the best."""
        if plan is None or plan.relocations > self.cap or not self.tp.meets(plan.assign):
            return False
        if self.best is None or plan.relocations < self.best.relocations:
            self.best = plan
            return True
        return False

    def heuristic(self) -> None:
        """Step 1: the beam search's plans, realised."""
        self.control.report("searching the building for a first plan")
        for rows in beam_plans(self.changes, self.cap, self.control.stop):
            plan, _ = self.realise(self.changes.plan(self.tp, rows))
            self.offer(plan)

    def listing(self) -> None:
        """Step 2: levels listed in full while they are small (module notes)."""
        j = 0
        while not self.control.stop() and j <= self.cap:
            if self.best_k is not None and j >= self.best_k:
                return
            what = plural(j, "phase change")
            self.control.report(f"checking every plan with {what} in the building")
            batches = listed_plans(self.changes, j, self.control.stop)
            if batches is None:
                return
            sure, realised = True, 0
            for rows in batches:
                for r in rows:
                    if self.best_k is not None and self.best_k <= j:
                        break
                    realised += 1
                    if realised > REALISE_LIMIT or self.control.stop():
                        return
                    plan, proven = self.realise(self.changes.plan(self.tp, r))
                    sure = sure and (proven or (plan is not None and plan.relocations == j))
                    self.offer(plan)
            if self.control.stop() or not sure:
                return
            self.lower = max(
                self.lower, min(j + 1, self.best_k if self.best_k is not None else j + 1)
            )
            j += 1

    def decomposed_bound(self) -> None:
        """Step 3: lower bounds of the subtrees from the single-panel search (module notes)."""
        from tri.rebalance.target import solve_target

        tp = self.tp
        bound = [0] * tp.size
        for k in range(tp.size - 1, -1, -1):
            leaf = int(tp.ends[k]) == k + 1
            pr = tp.problems[k] if leaf else tp.node_view(k)
            own = 0
            if pr.n_free and not self.control.stop():
                share = self.control.remaining() / (k + 2)
                control = Control(max(0.05, share), None, self.cancel)
                goal = Goal(float(tp.targets[k]), None, None)
                what = tp.tree.panels[tp.nodes[k]].schedule.panel.name
                self.control.report(f"bounding the relocations below {what}")
                out = solve_target(pr, goal, control, None, Evaluator(pr, goal, control))
                self.calls += out.solver_calls
                if out.plan is None and out.proven:
                    own = self.cap + 1  # no plan even for this panel alone
                elif out.plan is not None and out.proven:
                    own = out.plan.relocations
                else:
                    own = int(out.bound or 0)
            kids = sum(bound[c] for c in range(k + 1, int(tp.ends[k])) if tp.parent[c] == k)
            bound[k] = max(own, kids)
        self.lower = max(self.lower, min(bound[0], self.cap + 1))

    def model_loop(self, parts: TreeModelParts) -> None:
        """Step 4: the program, round after round (module notes)."""
        learnt = TreeLearnt(self.tp.size, self.tp.n_cases)
        while not self.control.stop():
            budget = self.cap if self.best_k is None else min(self.cap, self.best_k - 1)
            if budget < self.lower:
                return
            if not self._round(parts, learnt, budget):
                return

    def _round(self, parts: TreeModelParts, learnt: TreeLearnt, budget: int) -> bool:
        tm = build_tree_model(parts, budget, learnt)
        what = f"at most {plural(budget, 'relocation')}"
        self.control.report(f"solver: looking for a plan with {what} in the building")
        c = self.control
        span = c.solver_span(self.slice_s)
        sol = tm.model.solve(tm.cost, span, gap=0.0, heuristics=self.best is None)
        self.calls += 1
        if sol.status == "error":
            self.notes.append(f"the solver stopped: {sol.message}")
            return False
        if sol.status == "infeasible":
            self.lower = max(self.lower, budget + 1)
            return False
        lb = sol.lower_bound()
        if lb is not None:
            self.lower = max(self.lower, min(budget + 1, relocations_bound(lb, tm.offset)))
        if sol.x is None:
            self.slice_s = longer_slice(self.slice_s)
            return True
        assign = decode_options(parts.views[0], sol.x, tm.x)
        plan = self._from_solution(tm, sol.x, assign)
        if plan is not None and plan.relocations <= budget and self.offer(plan):
            return True
        learnt.learn(self.tp, assign)
        if learnt.level + 1 < len(RESOLUTIONS):
            learnt.level += 1
        else:
            learnt.nogoods.append(assign)
        return True

    def _from_solution(self, tm, x: np.ndarray, assign: np.ndarray) -> TreePlan | None:
        """The plan a solution describes: its options, stayers and windows in every panel."""
        plans: list[Plan | None] = []
        total = 0
        for k, a in enumerate(self.tp.split(assign)):
            pr, sc = self.tp.problems[k], tm.slots[k]
            if sc is None:
                plans.append(None)
                continue
            stays = np.zeros(pr.n_free, dtype=bool)
            stays[sc.placed] = sc.stays(x)
            plan = self.evs[k].from_solution(a, stays, sc.used_windows(x))
            if plan is None:  # the slot block is exact: this would be a bug
                plan = self.evs[k].plan(a)
                self.notes.append("a solution's slots did not fit and were found again")
                if plan is None:
                    return None
            plans.append(plan)
            total += plan.relocations
        return TreePlan(np.asarray(assign, dtype=int).copy(), plans, total, False)
