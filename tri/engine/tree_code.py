"""The code's calculated loads of every panel of a tree, children included.

A single panel's calculated load (:func:`tri.engine.loading.calculated_load_a`)
adds the scheduled VA per phase, continuous loads at the continuous factor.
A panel that feeds others carries its children's calculated loads on its
feeder circuits, so its sizing figure must include them: this module rolls
the weighted VA up the tree with the same convention as the schedule VA
(:func:`tri.engine.tree_va.roll_up_phase_va`: phase by phase without a
transformer; through one, the child's total shared among the primary phases
in proportion to their fundamental currents), and the maximum unbalanced
line-to-neutral load (NEC 220.61) phase by phase wherever a neutral carries
it through (no transformer, or ``YNyn``).

Each feeder row's calculated load, for its breaker, is the largest per-phase
calculated load of its child (without a transformer: the same system), or
through a transformer the largest per-phase share its child adds to the
parent, over the parent's ``V_LN``. A breaker with several legs is judged on
its largest pole (:func:`tri.engine.legs.breaker_calculated_a`), and a
high-leg delta divides as :func:`tri.engine.loading.calculated_load_a` does,
so that every panel's figures are those of the panel alone plus what it feeds.

The figures are the same fields :func:`tri.engine.analysis.analyse_batch`
gives a lone panel, so the findings code is shared.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from tri.engine.inputs import LINE_TO_NEUTRAL, UNPLACED
from tri.engine.legs import breaker_calculated_a
from tri.engine.loading import circuit_calculated_a, continuous_weights, phase_voltage_magnitudes
from tri.engine.phasors import schedule_va
from tri.engine.tree import TreeSolution
from tri.engine.tree_inputs import PackedTree
from tri.engine.tree_va import roll_up_phase_va


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
    high = np.asarray(tree.high_leg, dtype=bool)
    e = np.asarray(tree.e_nominal)
    factor = np.asarray(tree.continuous_factor, dtype=float)[:, None]
    s_w = s * continuous_weights(c.continuous, factor)
    fed_fund = np.abs(sol.fed.phase[..., 0])
    calc_va, contribution = roll_up_phase_va(tree, schedule_va(replace(c, s_va=s_w)), fed_fund)

    ln = conn == LINE_TO_NEUTRAL
    ln_va = schedule_va(replace(c, s_va=np.where(ln, s, 0.0)))
    neutral_va, _ = roll_up_phase_va(tree, ln_va, fed_fund, same_phase_only=True)
    to_neutral, equivalent = phase_voltage_magnitudes(e)
    phase_calc = calc_va / v_ln[:, None]
    neutral_calc = np.max(neutral_va, axis=-1) / v_ln
    if np.any(high):
        # as calculated_load_a for a panel alone: 1-pole VA over its phase's voltage to
        # neutral, the share of 2- and 3-pole VA over |V_1| (a high-leg subtree has no
        # transformer, so its line-to-neutral VA adds phase by phase)
        ln_w_va = schedule_va(replace(c, s_va=np.where(ln, s_w, 0.0)))
        ln_calc, _ = roll_up_phase_va(tree, ln_w_va, fed_fund, same_phase_only=True)
        mixed = ln_calc / to_neutral + (calc_va - ln_calc) / equivalent[:, None]
        phase_calc = np.where(high[:, None], mixed, phase_calc)
        neutral_calc = np.where(high, np.max(neutral_va / to_neutral, axis=-1), neutral_calc)

    row_calc = circuit_calculated_a(c, factor, e)
    circuit_calc = breaker_calculated_a(c, row_calc, factor, e)
    for idx in tree.levels[1:]:
        parents = tree.parent[idx]
        through = np.max(contribution[idx], axis=-1) / v_ln[parents]
        circuit_calc[parents, tree.feeder_row[idx]] = np.where(
            tree.has_tx[idx], through, np.max(phase_calc[idx], axis=-1)
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
        "neutral_calculated_a": neutral_calc,
        "circuit_calculated_a": circuit_calc,
        "nonlinear_ln_share_pct": share,
    }
