"""Checks of a tree of panels before it is packed: links, feeder rows, systems, windings.

:func:`check_tree` raises ``ValueError`` for a tree the engine cannot
analyse (:func:`tri.engine.tree_inputs.pack_tree` calls it first).
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np

from tri.engine.inputs import THREE_PHASE, UNPLACED, SystemVoltages

if TYPE_CHECKING:
    from tri.engine.tree_inputs import TreeInputs

#: Nominal voltages of parent and child (no transformer) agree within this [-].
SAME_SYSTEM_RTOL = 1e-9


def _same_voltages(a: SystemVoltages, b: SystemVoltages) -> bool:
    close = math.isclose(a.v_ll, b.v_ll, rel_tol=SAME_SYSTEM_RTOL)
    if a.v_ln is None or b.v_ln is None:
        return close and a.v_ln is None and b.v_ln is None
    return close and math.isclose(a.v_ln, b.v_ln, rel_tol=SAME_SYSTEM_RTOL)


def check_tree(tree: TreeInputs) -> None:
    """Raise ``ValueError`` for a tree the engine cannot analyse.

    Parameters
    ----------
    tree : TreeInputs

    Notes
    -----
    Checked: the root has no link and every other node has one to an
    earlier node; a high-leg delta root has no supply (its voltages behind a
    supply are not modelled, as for a panel alone); a transformer to a
    high-leg delta has a delta secondary (the centre tap
    gives the neutral) and one fed from it no YN primary, and a feeder keeps
    the high leg's phase;
    feeder rows exist, are 3-pole rows of zero load and feed one child each;
    frequencies agree; without a transformer the child's nominal voltages
    are the parent's; with one, a ``yn`` secondary feeds a 4-wire child and
    ``d``/``y`` a 3-wire one (or a high-leg delta), and a ``YN`` primary needs a 4-wire parent.
    Each node's circuits are checked by :func:`tri.engine.analysis.check_inputs`.
    """
    from tri.engine.analysis import check_inputs

    if not tree.nodes:
        raise ValueError("a tree needs at least its root panel")
    if tree.nodes[0].link is not None:
        raise ValueError("the first node is the root and has no feeder")
    if tree.supply is not None and tree.nodes[0].system.high_leg is not None:
        raise ValueError(
            "voltages at the panel are not modelled for a high-leg delta behind a supply (the "
            "supply model is a wye source)"
        )
    used: set[tuple[int, int]] = set()
    for i, node in enumerate(tree.nodes):
        check_inputs(node.circuits, node.system, node.ratings)
        if np.ndim(node.circuits.s_va) != 1:
            raise ValueError(f"node {i}: circuit arrays of one panel, shape (n,)")
        if i == 0:
            continue
        link = node.link
        if link is None:
            raise ValueError(f"node {i} has no feeder; only the root may be unfed")
        if not 0 <= link.parent < i:
            raise ValueError(f"node {i}: its parent must come before it")
        parent = tree.nodes[link.parent]
        rows = parent.circuits.n_circuits
        if not 0 <= link.feeder_row < rows:
            raise ValueError(f"node {i}: feeder row {link.feeder_row} not in its parent")
        if (link.parent, link.feeder_row) in used:
            raise ValueError(f"node {i}: its feeder row already feeds another panel")
        used.add((link.parent, link.feeder_row))
        row = link.feeder_row
        if parent.circuits.connection[row] not in (THREE_PHASE, UNPLACED) or abs(
            parent.circuits.s_va[row]
        ):
            raise ValueError(f"node {i}: the feeder row must be a 3-pole row of zero load")
        if not math.isclose(node.system.frequency_hz, parent.system.frequency_hz):
            raise ValueError(f"node {i}: frequency differs from its parent's")
        tx = link.transformer
        if tx is not None and node.system.high_leg is not None and tx.group.secondary != "d":
            raise ValueError(
                f"node {i}: a high-leg delta secondary is a centre-tapped delta (a d winding)"
            )
        if tx is not None and parent.system.high_leg is not None and tx.group.primary == "YN":
            raise ValueError(f"node {i}: a YN primary on a high-leg delta is not modelled")
        if tx is None:
            if node.system.high_leg != parent.system.high_leg:
                raise ValueError(f"node {i}: without a transformer its high leg is its parent's")
            if not _same_voltages(node.system, parent.system):
                raise ValueError(f"node {i}: without a transformer its system is its parent's")
            continue
        centre_tap = node.system.high_leg is not None  # its neutral is the winding's tap
        if tx.group.secondary_has_neutral != node.system.has_neutral and not centre_tap:
            raise ValueError(f"node {i}: the transformer secondary and the panel's wiring differ")
        if tx.group.primary_needs_neutral and not parent.system.has_neutral:
            raise ValueError(f"node {i}: a YN primary needs a 4-wire parent")
