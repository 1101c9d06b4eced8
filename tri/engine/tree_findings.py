"""Findings a tree of panels adds to a node: what it feeds, and its
transformer's loading, delta circulating current and zero-sequence path
(:func:`tree_findings`). The node's own findings come from
:func:`tri.engine.describe.describe_panel`; :func:`tri.engine.tree_results.analyse_tree`
joins both.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from tri.engine.limits import LOCAL, RATING_PCT, FindingLimits, exceeds
from tri.engine.results import Finding
from tri.engine.tree import TreeSolution
from tri.engine.tree_inputs import PackedTree
from tri.words import plural

if TYPE_CHECKING:  # the result types import this module's function
    from tri.engine.tree_results import FeederResult, TransformerResult

#: Zero-sequence current below this fraction of the transformer's rated
#: current is round-off, not worth a finding [-].
ZERO_SEQUENCE_NOTE = 1e-6


def tree_findings(
    tree: PackedTree, sol: TreeSolution, i: int, feeder: FeederResult | None, limits: FindingLimits
) -> list[Finding]:
    """Findings the tree adds to node ``i``: its transformer, and what it feeds.

    Parameters
    ----------
    tree : PackedTree
    sol : TreeSolution
    i : int
        Node index.
    feeder : FeederResult or None
        The node's feeder figures.
    limits : FindingLimits
        ``headroom_pct`` is also the transformer's headroom warning (a design
        margin, not a code rule) [%].

    Returns
    -------
    list of Finding
    """
    out: list[Finding] = []
    fed_count = int(np.sum(tree.parent == i))
    if fed_count:
        out.append(
            Finding(
                "info",
                f"Figures include {plural(fed_count, 'panel')} fed from this one, with every "
                "harmonic order, through their feeders (and transformers).",
                "tri roll-up (phases kept along each feeder)",
            )
        )
    tx = feeder.transformer if feeder is not None else None
    if tx is not None:
        out += _transformer_findings(tree, sol, i, tx, limits)
    return out


def _transformer_findings(
    tree: PackedTree, sol: TreeSolution, i: int, tx: TransformerResult, limits: FindingLimits
) -> list[Finding]:
    """Loading, delta circulation and missing zero-sequence path of node ``i``'s transformer."""
    out: list[Finding] = []
    name = f"The {tx.kva:g} kVA {tx.group} transformer feeding this panel"
    if exceeds(tx.loading_pct, RATING_PCT):
        out.append(
            Finding(
                "limit",
                f"{name} carries {max(tx.secondary_rms_a):.1f} A RMS, {tx.loading_pct:.1f} % "
                f"of its rated {tx.rated_a:.1f} A.",
                f"transformer nameplate rating (common practice); {LOCAL}",
            )
        )
    elif exceeds(tx.loading_pct, limits.headroom_pct):
        out.append(
            Finding(
                "warning",
                f"{name} is at {tx.loading_pct:.1f} % of its rated {tx.rated_a:.1f} A; "
                "harmonic currents heat it more than their RMS share.",
                "common practice; IEEE C57.110 (harmonic derating, from memory); " + LOCAL,
            )
        )
    i0 = float(np.abs(np.mean(sol.total.phase[i, :, 0])))
    noted = ZERO_SEQUENCE_NOTE * tx.rated_a
    if tx.delta_circulating_a is not None and tx.delta_circulating_a > noted:
        out.append(
            Finding(
                "info",
                f"{tx.delta_circulating_a:.1f} A RMS of zero-sequence current (unbalance and "
                "triplen harmonics of this panel's neutral) circulates in the transformer's "
                "delta winding: it heats the winding but reaches no primary line.",
                "ampere-turn balance of a delta winding (circuit theory); Glover et al., "
                "ch. 8 (from memory)",
            )
        )
    if tree.open_zero[i] and i0 > noted:
        out.append(
            Finding(
                "warning",
                f"{name} has no primary neutral, so the {3 * i0:.1f} A of fundamental neutral "
                "current has no zero-sequence path: the secondary neutral shifts by an amount "
                "that depends on the core, larger than the voltages shown (computed with the "
                "series impedance only). A delta primary (Dyn) or a connected primary neutral "
                "(YNyn) provides the path.",
                "zero-sequence equivalent circuits of transformers, Glover et al., ch. 8 "
                f"(from memory); {LOCAL}",
            )
        )
    return out
