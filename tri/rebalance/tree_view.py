"""A panel of a building seen as one panel: every free circuit below it, its currents at it.

The *node view* of node ``k`` of a :class:`~tri.rebalance.tree_problem.TreeProblem`
is a :class:`~tri.rebalance.problem.Problem` whose free circuits are every
free circuit of the panels at and below ``k`` (in the global numbering's
order) and whose currents are ``B_k`` and ``C_ok``, what they make at ``k``
(:mod:`tri.rebalance.tree_problem`, module notes). It has no slot geometry
(capacities unlimited, so option changes count, never more than
relocations) and no neutral quantities. The single-panel bounds and programs
then apply to it unchanged, with two facts carried from the panels below:

* which free circuits are *wired* units (:mod:`tri.rebalance.units`: their
  options are orders of phases, not kinds; a shared-neutral group is one),
  so that nothing treats their options as interchangeable kinds;
* whether every panel at and below ``k`` has its phases 120° apart. A
  high-leg delta panel below makes ``J_h`` at ``k`` change with the plan
  (its 120 V loads reverse rather than rotate), so the view is not
  ``symmetric`` and its floor is 0 (:mod:`tri.rebalance.problem`, High leg).
  A transformer passes every sequence by a fixed factor (or blocks it), so
  it keeps ``J_h`` fixed when the panel below does.
"""

from __future__ import annotations

from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np

from tri.rebalance.plan_currents import floor_of
from tri.rebalance.problem import WINDOW_TYPES, Problem

if TYPE_CHECKING:
    from tri.rebalance.tree_problem import TreeProblem

#: "No limit" in the capacity arrays of a node view [-].
_UNLIMITED = np.iinfo(np.int32).max // 4


def node_view(tp: TreeProblem, k: int) -> Problem:
    """Node ``k`` of ``tp`` as one panel (module notes), in every case of ``tp``."""
    end = int(tp.ends[k])
    o0, o1 = int(tp.offsets[k]), int(tp.offsets[end])
    c0, c1 = int(tp.circuit_offsets[k]), int(tp.circuit_offsets[end])
    probs = tp.problems[k:end]
    current = np.concatenate([pr.current for pr in probs])
    offs = np.repeat(tp.offsets[k:end] - o0, [pr.n_free for pr in probs])
    h = tp.orders.size
    n_opt = o1 - o0
    symmetric = all(pr.symmetric for pr in probs)
    view = Problem(
        schedule=tp.tree.panels[tp.nodes[k]].schedule,
        free=np.arange(c1 - c0),
        movable=np.concatenate([pr.movable for pr in probs]).astype(bool),
        poles=np.concatenate([pr.poles for pr in probs]).astype(int),
        starts=(tp.starts[c0 : c1 + 1] - o0).astype(int),
        owner=(tp.owner[o0:o1] - c0).astype(int),
        kind=np.concatenate([pr.kind for pr in probs]).astype(int),
        phases=tuple(ph for pr in probs for ph in pr.phases),
        current=np.where(current >= 0, current + offs, -1).astype(int),
        orders=tp.orders,
        contrib=tp.contrib[o0:o1, k],
        ncontrib=np.zeros((n_opt, h), dtype=complex),
        base=tp.base[k],
        nbase=np.zeros(h, dtype=complex),
        has_neutral=False,
        geometry=None,
        use_cells=np.concatenate([pr.use_cells for pr in probs]).astype(int),
        use_window=np.zeros((n_opt, WINDOW_TYPES), dtype=int),
        cap_phase=np.full(3, _UNLIMITED, dtype=int),
        cap_window=np.full(WINDOW_TYPES, _UNLIMITED, dtype=int),
        symmetric=symmetric,
        wired_mask=np.concatenate([pr.wired for pr in probs]).astype(bool),
    )
    floor = 0.0
    if symmetric:
        floor = floor_of(view.base + view.contrib[view.current_assignment()].sum(axis=0), tp.orders)
    view = replace(view, floor_a=floor, case_names=tp.case_names[:1])
    if not tp.others:
        return view
    return replace(view, case_names=tp.case_names, others=tuple(node_view(o, k) for o in tp.others))
