"""The circuit rows of every panel of a tree as one padded batch, wiring numbers included.

:func:`pad_circuits` stacks the nodes' :class:`~tri.engine.inputs.CircuitArrays`
on the union of their harmonic orders, shorter panels padded with
``UNPLACED`` rows of zero load (which contribute nothing). The wiring
numbers of :mod:`tri.engine.legs` travel with the rows, so that the batch
engine sums each breaker's legs and each shared neutral's currents exactly
as it does for the panel alone:

* ``breaker``: kept where a node numbers its breakers; a node that does
  not (every row its own breaker) gets ``0, 1, 2, ...``; padding rows
  continue the count, each its own breaker of nothing. Given only when some
  node numbers its breakers.
* ``neutral_group``: kept where given, ``-1`` (the panel neutral alone)
  elsewhere and on padding rows. Given only when some node has a group.
* ``breaker_a``: kept, NaN (no rating) on padding rows.

:func:`wiring_counts` says how many breakers and groups each node's own
results have (0 where the node gave no numbers, as a panel alone reports none),
and :func:`tree_wiring` computes every node's breaker and shared-neutral
spectra in one batch.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from tri.engine.batch_figures import snap_roundoff
from tri.engine.inputs import UNPLACED, CircuitArrays
from tri.engine.legs import wiring_spectra


def union_orders(nodes: tuple) -> np.ndarray:
    """Every harmonic order used by any node's circuits, ascending (int ndarray)."""
    orders = [np.asarray(n.circuits.orders, dtype=int) for n in nodes]
    return np.unique(np.concatenate(orders)) if orders else np.zeros(0, dtype=int)


def wiring_counts(nodes: tuple) -> tuple[np.ndarray, np.ndarray]:
    """Breakers and shared-neutral groups of each node's results, int ndarrays of shape (N,).

    A node without ``breaker`` numbers has 0 breakers in its results (the
    panel alone reports none); with them, ``max + 1``. Likewise for groups.
    """

    def count(values: np.ndarray | None) -> int:
        if values is None or not np.size(values):
            return 0
        return int(np.max(values)) + 1

    breakers = np.array([count(n.circuits.breaker) for n in nodes], dtype=int)
    groups = np.array([count(n.circuits.neutral_group) for n in nodes], dtype=int)
    return breakers, groups


def pad_circuits(nodes: tuple, orders: np.ndarray) -> CircuitArrays:
    """The nodes' circuits as one batch (N, n_max) on ``orders`` (module docstring).

    Parameters
    ----------
    nodes : tuple of TreeNode
        Each with ``circuits`` of shape (n_i,).
    orders : int ndarray, shape (H,)
        The union of the nodes' harmonic orders.

    Returns
    -------
    CircuitArrays
        Shape (N, n_max), wiring numbers included where any node gives them.
    """
    n_max = max(1, max(n.circuits.n_circuits for n in nodes))
    count = len(nodes)
    s_va = np.zeros((count, n_max), dtype=complex)
    conn = np.full((count, n_max), UNPLACED, dtype=np.int64)
    p = np.zeros((count, n_max), dtype=np.int64)
    q = np.zeros((count, n_max), dtype=np.int64)
    harm = np.zeros((count, n_max, orders.size), dtype=complex)
    cont = np.zeros((count, n_max), dtype=bool)
    rating = np.full((count, n_max), np.nan)
    numbered = any(n.circuits.breaker is not None for n in nodes)
    grouped = any(n.circuits.neutral_group is not None for n in nodes)
    breaker = np.zeros((count, n_max), dtype=np.int64) if numbered else None
    group = np.full((count, n_max), -1, dtype=np.int64) if grouped else None
    for i, node in enumerate(nodes):
        c = node.circuits
        k = c.n_circuits
        s_va[i, :k] = c.s_va
        conn[i, :k] = c.connection
        p[i, :k] = c.phase_p
        q[i, :k] = c.phase_q
        cont[i, :k] = c.continuous
        rating[i, :k] = c.breaker_a
        if np.size(c.orders):
            harm[i, :k, np.searchsorted(orders, c.orders)] = np.asarray(c.harmonics).T
        if breaker is not None:
            own = np.arange(k) if c.breaker is None else np.asarray(c.breaker)
            first = int(np.max(own)) + 1 if k else 0
            breaker[i, :k] = own
            breaker[i, k:] = first + np.arange(n_max - k)
        if group is not None and c.neutral_group is not None:
            group[i, :k] = c.neutral_group
    return CircuitArrays(s_va, conn, p, q, harm, orders, cont, breaker, group, rating)


def tree_wiring(
    tree: Any, i_e: np.ndarray, circuit_rms: np.ndarray, fed_phase: np.ndarray
) -> dict[str, np.ndarray]:
    """Breaker and shared-neutral spectra of every node's own rows, as for a panel alone.

    Parameters
    ----------
    tree : PackedTree
    i_e : complex ndarray, shape (N, n_max)
        Fundamental element currents [A].
    circuit_rms : float ndarray, shape (N, n_max)
        RMS current of each row [A] (the snapping scale).
    fed_phase : complex ndarray, shape (N, 3, H)
        What each node draws from its parent's feeder row [A].

    Returns
    -------
    dict
        ``breaker_pole_spectrum`` (N, nb, 3, H) and/or
        ``shared_neutral_spectrum`` (N, G, H) [A]; empty when no node asks.

    Notes
    -----
    Snapped with the node's own circuits' scale (as :func:`tri.engine.analysis.analyse_batch`
    snaps a panel's); each feeder row's breaker then carries its child's
    line currents (in the parent's frame), as the feeder row's circuit
    current does.
    """
    out = wiring_spectra(tree.circuits, i_e)
    if not out:
        return out
    scale = np.sum(circuit_rms, axis=-1)
    out = {k: snap_roundoff(v, scale, v.ndim - 1) for k, v in out.items()}
    poles = out.get("breaker_pole_spectrum")
    if poles is not None:
        breaker = np.asarray(tree.circuits.breaker)
        for idx in tree.levels[1:]:
            parents, rows = tree.parent[idx], tree.feeder_row[idx]
            poles[parents, breaker[parents, rows]] = fed_phase[idx]
    return out
