"""How a move in one panel reaches every panel above it: transfer matrices read off the engine.

At nominal voltage the engine's roll-up (:func:`tri.engine.tree.roll_up`)
is linear and acts order by order, so node j's own line currents reach
node k's totals through a complex 3×3 matrix per order, and its own line
and neutral currents reach node k's neutral through a 1×3 row and a
factor per order. They are read off the engine itself: the roll-up of a
unit current on one phase (or on the neutral) of panel j, at every order
at once (:func:`transfer_matrices`). A child's neutral current returns on
its parent's neutral without a transformer; through one, the primary's
neutral carries the sum of the primary line currents (so a delta keeps the
zero sequence out of it). :func:`rolled_up` then gives every
node's fixed currents and what each option adds there, in one case
(:mod:`tri.rebalance.tree_problem`, module notes).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from tri.engine.tree import Spectra, roll_up
from tri.rebalance.problem import Problem


def _embed(spectrum: np.ndarray, orders: np.ndarray, into: np.ndarray) -> np.ndarray:
    """A spectrum on ``orders`` placed on the columns of the larger set ``into``."""
    out = np.zeros((*spectrum.shape[:-1], into.size), dtype=complex)
    out[..., np.searchsorted(into, orders)] = spectrum
    return out


def transfer_matrices(
    packed, nodes: Sequence[int], orders: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Node j's own currents to node k's totals (module notes), read off the engine's roll-up.

    Returns ``M`` (P, P, H, 3, 3): own line currents to line currents;
    ``NP`` (P, P, H, 3): own line currents to the neutral; ``NN`` (P, P, H):
    own neutral current to the neutral. Four roll-ups per node, each a unit
    current on one phase (or the neutral) at every order.
    """
    n_all, h = packed.size, orders.size
    pos = np.asarray(nodes, dtype=int)
    out = np.zeros((len(nodes), len(nodes), h, 3, 3), dtype=complex)
    to_n = np.zeros((len(nodes), len(nodes), h, 3), dtype=complex)
    n_to_n = np.zeros((len(nodes), len(nodes), h), dtype=complex)
    zero_n = np.zeros((n_all, h), dtype=complex)
    for j, node in enumerate(nodes):
        for p in range(3):
            phase = np.zeros((n_all, 3, h), dtype=complex)
            phase[node, p, :] = 1.0
            total, _ = roll_up(packed, Spectra(phase, zero_n, phase), orders)
            out[j, :, :, :, p] = np.swapaxes(total.phase[pos], -1, -2)
            to_n[j, :, :, p] = total.neutral[pos]
        neutral = np.zeros((n_all, h), dtype=complex)
        neutral[node, :] = 1.0
        no_lines = np.zeros((n_all, 3, h), dtype=complex)
        total, _ = roll_up(packed, Spectra(no_lines, neutral, no_lines), orders)
        n_to_n[j] = total.neutral[pos]
    return out, to_n, n_to_n


def rolled_up(
    problems: Sequence[Problem], matrices, orders: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """``B_k`` (P, 3, H), ``C_ok`` (O, P, 3, H), ``NB_k`` (P, H) and ``NC_ok`` (O, P, H) of one
    case, from every node's own currents [A]."""
    lines, to_n, n_to_n = matrices
    p_count = len(problems)
    n_opt = sum(pr.n_options for pr in problems)
    base = np.zeros((p_count, 3, orders.size), dtype=complex)
    contrib = np.zeros((n_opt, p_count, 3, orders.size), dtype=complex)
    nbase = np.zeros((p_count, orders.size), dtype=complex)
    ncontrib = np.zeros((n_opt, p_count, orders.size), dtype=complex)
    o = 0
    for j, pr in enumerate(problems):
        own = _embed(pr.base, pr.orders, orders)  # (3, H)
        own_n = _embed(pr.nbase, pr.orders, orders)  # (H,)
        base += np.einsum("khpq,qh->kph", lines[j], own)
        nbase += np.einsum("khq,qh->kh", to_n[j], own) + n_to_n[j] * own_n[None, :]
        opts = _embed(pr.contrib, pr.orders, orders)  # (O_j, 3, H)
        opts_n = _embed(pr.ncontrib, pr.orders, orders)  # (O_j, H)
        sl = slice(o, o + pr.n_options)
        contrib[sl] = np.einsum("khpq,oqh->okph", lines[j], opts)
        ncontrib[sl] = np.einsum("khq,oqh->okh", to_n[j], opts) + n_to_n[j][None] * opts_n[:, None]
        o += pr.n_options
    return base, contrib, nbase, ncontrib
