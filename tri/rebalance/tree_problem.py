"""Rebalancing a building: every panel's options, and each panel's currents as a function of all.

A building is a tree of panels (:mod:`tri.schedule.tree`); the *service* is
the panel whose balance is asked for (the root, or a panel named by the
user) and the search covers it and every panel below it. Each panel is
turned into the single-panel arrays (:func:`tri.rebalance.problem.build_problem`):
its free circuits (placed and not locked; a feeder breaker is one of them,
with no load of its own), gathered into the single panel's units
(:mod:`tri.rebalance.units`: a shared-neutral group is one, a breaker with
one load per leg takes orders of phases, nothing to neutral on a high leg,
a circuit behind a 2-pole RCD on its phase), their options and what each
option adds to the panel's own line currents, order by order.

How a panel's own currents reach the panels above it is the engine's
roll-up (:func:`tri.engine.tree.roll_up`): unchanged along a feeder, or
through a transformer sequence by sequence (zero sequence and balanced
triplens kept in a delta, the other sequences shifted by the vector group
and divided by the ratio). At nominal voltage it is linear and acts order by
order, so for every pair (panel j, panel k above it or k = j) there is a
complex 3×3 matrix ``M_jk[h]`` per order with

``V_k = Σ_j M_jk · (own currents of j)``  (phases × orders).

The matrices are read off the engine's roll-up of unit currents
(:mod:`tri.rebalance.tree_transfer`). So a plan's phase currents at every
panel of the search, in that panel's own frame, are

``V_k = B_k + Σ_o x_o·C_ok``

with ``B_k`` the fixed circuits' currents rolled up, and ``C_ok`` what
option ``o`` (of any panel at or below k) adds at k. Figures here are at
nominal voltage, the schedule convention of every report; the work order's
figures are the engine's run on the building before and after.

Options are numbered across the search in panel order (the service first,
depth first), so every panel's subtree holds one contiguous block of
options: the block of a *node view* (:meth:`TreeProblem.node_view`), a
:class:`~tri.rebalance.problem.Problem` whose free circuits are every free
circuit below that panel and whose currents are ``B_k`` and ``C_ok``; the
single-panel bounds then apply to it unchanged. Every node's neutral
current is linear too, ``N_k = NB_k + Σ_o x_o·NC_ok`` (the same roll-ups);
a neutral limit (:attr:`TreeProblem.neutral_max_a`) bounds its RMS at the
service, in every case.

Cases
-----
With ``use`` factors anywhere in the building, every panel is judged in
every *case*: the connected load (every factor 1.0) and each of the
building's scenarios (:func:`tri.schedule.tree_scenarios.building_scenario_names`;
a circuit whose ``use`` does not name one is at 1.0 in it). The options,
slots and transfer matrices are the same in every case; only each panel's
own currents differ (its loads scaled, by the engine:
:func:`tri.rebalance.cases.with_cases` with the building's names), so
``B_k`` and ``C_ok`` are computed once per case. As for one panel
(:mod:`tri.rebalance.cases`), the problem's own arrays are the connected
load's and :attr:`TreeProblem.others` holds the search in each further
case; a plan is good only when every node meets its target in every case,
so a bound proven in one case is a bound. Node views carry every case too.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import cached_property

import numpy as np

from tri.engine.harmonics import rms
from tri.engine.tree_inputs import pack_tree
from tri.engine.unbalance import deviation_rate_pct
from tri.rebalance.problem import Problem, build_problem
from tri.rebalance.tree_transfer import rolled_up, transfer_matrices
from tri.schedule.model import Schedule
from tri.schedule.to_scenarios import CONNECTED
from tri.schedule.tree import ScheduleTree
from tri.schedule.tree_scenarios import building_scenario_names
from tri.schedule.tree_to_engine import tree_inputs
from tri.words import plural

#: Largest size of the option-by-panel current table (complex numbers) [-].
MAX_TABLE = 20_000_000


def subtree(tree: ScheduleTree, top: int) -> list[int]:
    """Panel indices of ``top`` and every panel below it, in the tree's (depth-first) order."""
    inside = {top}
    out = [top]
    for i in range(top + 1, len(tree.panels)):
        parent = tree.panels[i].parent
        if parent in inside:
            inside.add(i)
            out.append(i)
    return out


def tree_free_indices(schedule: Schedule) -> list[int]:
    """Circuits the tree search may move: placed and not locked (feeder breakers included)."""
    return [i for i, c in enumerate(schedule.circuits) if c.is_placed and not c.locked]


@dataclass(frozen=True, eq=False)
class TreeProblem:
    """The search over a building's panels as arrays (module notes).

    Attributes
    ----------
    tree : ScheduleTree
        The whole building as read.
    nodes : tuple of int
        Panel indices of the search (the service first, depth first).
    parent : int ndarray, shape (P,)
        Position in ``nodes`` of each node's parent; -1 for the service.
    problems : tuple of Problem
        Each node's own single-panel problem.
    offsets : int ndarray, shape (P + 1,)
        Options of node ``k`` are ``offsets[k]:offsets[k+1]`` in the global numbering.
    circuit_offsets : int ndarray, shape (P + 1,)
        Free circuits of node ``k``, likewise.
    ends : int ndarray, shape (P,)
        Node ``k``'s subtree is ``nodes[k:ends[k]]``.
    orders : int ndarray, shape (H,)
        Orders of the building, the fundamental first.
    base : complex ndarray, shape (P, 3, H)
        Line currents of the fixed circuits at every node, rolled up [A].
    contrib : complex ndarray, shape (O, P, 3, H)
        What each option adds at every node (zero outside its ancestors) [A].
    targets : float ndarray, shape (P,)
        Largest deviation from the mean allowed at each node, a fraction [-].
    nbase : complex ndarray, shape (P, H)
        Neutral current of the fixed circuits at every node, rolled up [A].
    ncontrib : complex ndarray, shape (O, P, H)
        What each option adds to every node's neutral current [A].
    neutral_max_a : float or None
        Largest neutral RMS current allowed at the service (node 0), in
        every case [A]; None: no limit.
    case_names : tuple of str
        The cases, this problem's own first (module notes, Cases).
    others : tuple of TreeProblem
        The search in each further case: the same options, other currents
        (empty without scenarios).
    """

    tree: ScheduleTree
    nodes: tuple[int, ...]
    parent: np.ndarray
    problems: tuple[Problem, ...]
    offsets: np.ndarray
    circuit_offsets: np.ndarray
    ends: np.ndarray
    orders: np.ndarray
    base: np.ndarray
    contrib: np.ndarray
    targets: np.ndarray
    nbase: np.ndarray
    ncontrib: np.ndarray
    neutral_max_a: float | None = None
    case_names: tuple[str, ...] = (CONNECTED,)
    others: tuple[TreeProblem, ...] = ()

    @property
    def n_cases(self) -> int:
        """Number of cases ``S`` (1 without scenarios) [-]."""
        return 1 + len(self.others)

    def views(self) -> tuple[TreeProblem, ...]:
        """The search in each case, in :attr:`case_names` order (each with no others)."""
        if not self.others:
            return (self,)
        return (self._own, *self.others)

    @cached_property
    def _own(self) -> TreeProblem:
        return replace(self, others=(), case_names=self.case_names[:1])

    @property
    def size(self) -> int:
        """Panels in the search ``P`` [-]."""
        return len(self.nodes)

    @property
    def n_free(self) -> int:
        """Free circuits of the whole search [-]."""
        return int(self.circuit_offsets[-1])

    @property
    def n_options(self) -> int:
        """Options of the whole search [-]."""
        return int(self.offsets[-1])

    @property
    def starts(self) -> np.ndarray:
        """Global option starts of every free circuit (int ndarray, shape (F + 1,))."""
        parts = [pr.starts[:-1] + off for pr, off in zip(self.problems, self.offsets, strict=False)]
        return np.concatenate([*parts, [self.n_options]]).astype(int)

    @property
    def owner(self) -> np.ndarray:
        """Global free circuit of every option (int ndarray, shape (O,))."""
        parts = [pr.owner + c for pr, c in zip(self.problems, self.circuit_offsets, strict=False)]
        return np.concatenate(parts).astype(int) if parts else np.zeros(0, int)

    @property
    def movable(self) -> np.ndarray:
        """Placed free circuits (all of them in this search) (bool ndarray, shape (F,))."""
        return np.concatenate([pr.movable for pr in self.problems]).astype(bool)

    def current_assignment(self) -> np.ndarray:
        """Every free circuit's option now, global numbering (int ndarray, shape (F,))."""
        parts = [
            pr.current_assignment() + off
            for pr, off in zip(self.problems, self.offsets, strict=False)
        ]
        return np.concatenate(parts).astype(int) if parts else np.zeros(0, int)

    def split(self, assign: np.ndarray) -> list[np.ndarray]:
        """A global plan as each node's own options (local numbering)."""
        a = np.asarray(assign, dtype=int)
        return [
            a[self.circuit_offsets[k] : self.circuit_offsets[k + 1]] - self.offsets[k]
            for k in range(self.size)
        ]

    def spectra(self, assign: np.ndarray) -> np.ndarray:
        """Line currents at every node of a plan (complex ndarray, shape (P, 3, H)) [A]."""
        a = np.asarray(assign, dtype=int)
        return self.base + self.contrib[a].sum(axis=0)

    def deviations_pct(self, assign: np.ndarray) -> np.ndarray:
        """Largest deviation of a phase RMS current from the mean, every node [%] (shape (P,)).

        In this problem's own case (the connected load); every case:
        :meth:`case_deviations_pct`.
        """
        return deviation_rate_pct(rms(self.spectra(assign)))

    def case_deviations_pct(self, assign: np.ndarray) -> np.ndarray:
        """:meth:`deviations_pct` in every case (shape (S, P)) [%]."""
        return np.array([v.deviations_pct(assign) for v in self.views()])

    def neutral_spectra(self, assign: np.ndarray) -> np.ndarray:
        """Neutral current at every node of a plan (complex ndarray, shape (P, H)) [A]."""
        a = np.asarray(assign, dtype=int)
        return self.nbase + self.ncontrib[a].sum(axis=0)

    def case_service_neutral_a(self, assign: np.ndarray) -> np.ndarray:
        """Neutral RMS current at the service in every case (shape (S,)) [A]."""
        return np.array([float(rms(v.neutral_spectra(assign)[0])) for v in self.views()])

    def meets(self, assign: np.ndarray, tol: float = 1e-9) -> bool:
        """Every node within its target, and the service's neutral within its limit, in every
        case (to round-off ``tol``)."""
        dev = self.case_deviations_pct(assign)
        if not np.all(dev <= 100.0 * self.targets[None, :] * (1 + tol) + 1e-12):
            return False
        lim = self.neutral_max_a
        return lim is None or bool(np.all(self.case_service_neutral_a(assign) <= lim * (1 + tol)))

    def node_view(self, k: int) -> Problem:
        """Node ``k`` as one panel whose free circuits are every free circuit below it
        (:func:`tri.rebalance.tree_view.node_view`)."""
        from tri.rebalance.tree_view import node_view

        return node_view(self, k)


def _shape(tree: ScheduleTree, nodes: list[int]) -> tuple[np.ndarray, np.ndarray]:
    """Each node's parent (position in ``nodes``, -1 for the service) and subtree end."""
    position = {n: k for k, n in enumerate(nodes)}
    parents = (tree.panels[n].parent for n in nodes)
    parent = np.array([-1 if p is None else position.get(p, -1) for p in parents], dtype=int)
    parent[0] = -1
    ends = np.zeros(len(nodes), dtype=int)
    for k in range(len(nodes) - 1, -1, -1):
        ends[k] = max([k + 1, *[ends[c] for c in range(k + 1, len(nodes)) if parent[c] == k]])
    return parent, ends


def build_tree_problem(
    tree: ScheduleTree,
    service: int,
    service_target: float,
    child_target: float,
    neutral_max_a: float | None = None,
) -> TreeProblem:
    """Arrays of the search for the panel ``service`` and every panel below it.

    Parameters
    ----------
    tree : ScheduleTree
        The building.
    service : int
        Index of the service panel in ``tree.panels``.
    service_target, child_target : float
        Largest deviation from the mean at the service and at every other
        panel of the search, fractions [-].
    neutral_max_a : float, optional
        Largest neutral RMS current at the service [A].

    Returns
    -------
    TreeProblem

    Raises
    ------
    ValueError
        A search too large for the current table.
    """
    nodes = subtree(tree, service)
    parent, ends = _shape(tree, nodes)
    names = building_scenario_names(tree)
    problems = tuple(
        build_problem(
            tree.panels[n].schedule, tree_free_indices(tree.panels[n].schedule), case_names=names
        )
        for n in nodes
    )
    packed = pack_tree(tree_inputs(tree))
    orders = np.concatenate([[1], np.asarray(packed.circuits.orders, dtype=int)])
    n_opt = sum(pr.n_options for pr in problems)
    if n_opt * len(nodes) * 3 * orders.size * (1 + len(names)) > MAX_TABLE:
        raise ValueError(
            f"the building is too large to rebalance as one search ({len(nodes)} panels, "
            f"{n_opt} options, {plural(1 + len(names), 'case')}); name a panel lower in the "
            "tree with --at"
        )
    matrices = transfer_matrices(packed, nodes, orders)
    offsets = np.concatenate([[0], np.cumsum([pr.n_options for pr in problems])]).astype(int)
    circuit_offsets = np.concatenate([[0], np.cumsum([pr.n_free for pr in problems])]).astype(int)
    targets = np.full(len(nodes), float(child_target))
    targets[0] = float(service_target)
    cases = []
    for c, name in enumerate((CONNECTED, *names)):
        base, contrib, nbase, ncontrib = rolled_up(
            [pr.views()[c] for pr in problems], matrices, orders
        )
        cases.append(
            TreeProblem(
                tree=tree,
                nodes=tuple(nodes),
                parent=parent,
                problems=problems,
                offsets=offsets,
                circuit_offsets=circuit_offsets,
                ends=ends,
                orders=orders,
                base=base,
                contrib=contrib,
                targets=targets,
                nbase=nbase,
                ncontrib=ncontrib,
                neutral_max_a=neutral_max_a,
                case_names=(name,),
            )
        )
    if not names:
        return cases[0]
    return replace(cases[0], case_names=(CONNECTED, *names), others=tuple(cases[1:]))
