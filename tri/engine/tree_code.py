"""The code's calculated loads of every panel of a tree, children included.

A single panel's calculated load (:func:`tri.engine.loading.calculated_load_a`)
adds the scheduled VA per phase, continuous loads at the continuous factor.
A panel that feeds others carries its children's calculated loads on its
feeder circuits, so its sizing figure must include them: this module rolls
the weighted VA up the tree with the same convention as the schedule VA
(:func:`tri.engine.tree.roll_up_phase_va`: phase by phase without a
transformer; through one, the child's total shared among the primary phases
in proportion to their fundamental currents), and the maximum unbalanced
line-to-neutral load (NEC 220.61) phase by phase wherever a neutral carries
it through (no transformer, or ``YNyn``).

Each feeder row's calculated load, for its breaker, is the largest per-phase
share its child adds to the parent, over the parent's ``V_LN``.

The figures are the same fields :func:`tri.engine.analysis.analyse_batch`
gives a lone panel, so the findings code is shared.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from tri.engine.inputs import LINE_TO_NEUTRAL, UNPLACED
from tri.engine.loading import circuit_calculated_a, continuous_weights
from tri.engine.phasors import PHASE_UNIT, schedule_va
from tri.engine.tree import TreeSolution, roll_up_phase_va
from tri.engine.tree_inputs import PackedTree


def tree_code_figures(tree: PackedTree, sol: TreeSolution) -> dict[str, np.ndarray]:
    """Calculated-load fields of every node (as :class:`~tri.engine.results.BatchAnalysis`).

    Parameters
    ----------
    tree : PackedTree
        The packed tree (circuits of shape (N, n_max)).
    sol : TreeSolution
        Its solution (feeder currents give the split through transformers).

    Returns
    -------
    dict
        ``phase_calculated_a`` (N, 3) [A], ``phase_calculated_pct`` (N, 3) [%],
        ``neutral_calculated_a`` (N,) [A], ``circuit_calculated_a`` (N, n_max) [A],
        ``nonlinear_ln_share_pct`` (N,) [%].
    """
    c = tree.circuits
    s = np.asarray(c.s_va)
    conn = np.asarray(c.connection)
    v_ln = np.asarray(tree.v_ln, dtype=float)
    factor = np.asarray(tree.continuous_factor, dtype=float)[:, None]
    weighted = replace(c, s_va=s * continuous_weights(c.continuous, factor))
    fed_fund = np.abs(sol.fed.phase[..., 0])
    calc_va, contribution = roll_up_phase_va(tree, schedule_va(weighted), fed_fund)
    phase_calc = calc_va / v_ln[:, None]

    ln = conn == LINE_TO_NEUTRAL
    ln_va = schedule_va(replace(c, s_va=np.where(ln, s, 0.0)))
    neutral_va, _ = roll_up_phase_va(tree, ln_va, fed_fund, same_phase_only=True)

    circuit_calc = circuit_calculated_a(c, factor, v_ln[:, None] * PHASE_UNIT)
    for idx in tree.levels[1:]:
        parents = tree.parent[idx]
        circuit_calc[parents, tree.feeder_row[idx]] = (
            np.max(contribution[idx], axis=-1) / v_ln[parents]
        )

    harmonic = np.any(np.abs(np.asarray(c.harmonics)) > 0, axis=-1)
    nonlinear_ln = np.where(harmonic & ln & (conn != UNPLACED), s, 0.0)
    nl_ln_va, _ = roll_up_phase_va(
        tree, schedule_va(replace(c, s_va=nonlinear_ln)), fed_fund, same_phase_only=True
    )
    total = np.asarray(sol.total_va, dtype=float)
    nl_sum = np.sum(nl_ln_va, axis=-1)
    share = np.where(total > 0, 100.0 * nl_sum / np.where(total > 0, total, 1.0), 0.0)
    rating = np.asarray(tree.rating_a, dtype=float)[:, None]
    return {
        "phase_calculated_a": phase_calc,
        "phase_calculated_pct": 100.0 * phase_calc / rating,
        "neutral_calculated_a": np.max(neutral_va, axis=-1) / v_ln,
        "circuit_calculated_a": circuit_calc,
        "nonlinear_ln_share_pct": share,
    }
