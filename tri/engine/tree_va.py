"""Per-phase VA figures of a tree: each node's own figure with its whole subtree added.

The schedule convention of :class:`tri.engine.tree.TreeSolution` ``phase_va``
and of the code's calculated loads (:mod:`tri.engine.tree_code`).
"""

from __future__ import annotations

import numpy as np

from tri.engine.tree_inputs import PackedTree


def roll_up_phase_va(
    tree: PackedTree, own_va: np.ndarray, fed_fund: np.ndarray, *, same_phase_only: bool = False
) -> tuple[np.ndarray, np.ndarray]:
    """A per-phase VA figure of every node with its whole subtree added.

    Parameters
    ----------
    tree : PackedTree
    own_va : float ndarray, shape (N, 3)
        Each node's own figure per phase [VA].
    fed_fund : float ndarray, shape (N, 3)
        Magnitude of each node's fundamental feeder currents in its parent's
        frame [A] (the weights of the split through a transformer).
    same_phase_only : bool
        For a figure that follows the neutral (line-to-neutral load): a child
        adds phase by phase where zero sequence passes (no transformer, or
        ``YNyn``) and nothing through any other transformer.

    Returns
    -------
    total : float ndarray, shape (N, 3)
        Own plus subtree [VA].
    contribution : float ndarray, shape (N, 3)
        What each node adds to its parent, per parent phase [VA] (0 for the
        root).

    Notes
    -----
    The schedule convention of ``TreeSolution.phase_va``: a child without a
    transformer adds its phase VA phase by phase; through a transformer its
    total is shared among the primary phases in proportion to their
    fundamental currents.
    """
    total = np.array(own_va, dtype=float, copy=True)
    contribution = np.zeros_like(total)
    for idx in reversed(tree.levels[1:]):
        parents = tree.parent[idx]
        if same_phase_only:
            passes = ~tree.has_tx[idx] | tree.zero_pass[idx]
            child = np.where(passes[:, None], total[idx], 0.0)
        else:
            share = np.sum(total[idx], axis=-1, keepdims=True)
            weight = np.sum(fed_fund[idx], axis=-1, keepdims=True)
            split = np.where(weight > 0, fed_fund[idx] / np.where(weight > 0, weight, 1.0), 1 / 3)
            child = np.where(tree.has_tx[idx, None], share * split, total[idx])
        contribution[idx] = child
        np.add.at(total, parents, child)
    return total, contribution
