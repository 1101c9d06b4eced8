"""Roll-up of a tree of panels: currents up, voltages down, every harmonic order.

Every panel's own circuits are computed as in :mod:`tri.engine.analysis`
(one batch for the whole tree). Then, deepest level first, each child's
total line currents (its own plus its children's) become the currents of
its parent's feeder circuit: unchanged without a transformer (the child's
neutral current returns on the parent's neutral), or through the
transformer sequence by sequence (:mod:`tri.engine.transformer`; a
high-leg delta on either side by :mod:`tri.engine.centre_tap`: its frame,
and a centre-tapped secondary as the plain delta it works as). Voltages
go the other way, root first: the root's from its supply (or nominal), each
child's from its parent's panel voltage less the feeder and transformer
drops,

``V_child = T·V_parent − z1·I_p − zn·I_N``

with ``T`` the transformer's open-circuit voltage transfer (identity
without one) and ``z1, zn`` the link's impedance referred to the child
(:class:`~tri.engine.tree_inputs.PackedTree`). Only the fundamental is
solved for voltages, as for one panel.

Unless iterated, every current is at nominal voltage (the schedule
convention) and the voltages follow in one pass. Iterated, every load in
the tree draws its scheduled power at its own panel's voltage, and the
whole tree is solved as one fixed point (a forward-backward sweep [1]),
fundamental only until it converges; the harmonics then follow from the
final currents.

References
----------
1. W. H. Kersting, *Distribution System Modeling and Analysis*, ch. 10
   (the ladder iterative technique: currents backward, voltages forward)
   (from memory).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from tri.engine.centre_tap import (
    shifted_current_factors,
    shifted_voltage_factors,
    tap_equivalent,
    tapped_voltages,
)
from tri.engine.harmonics import order_currents, rms
from tri.engine.inputs import THREE_PHASE, UNPLACED, CircuitArrays
from tri.engine.phasors import PHASE_UNIT, connection_masks, element_currents, incidence
from tri.engine.supply import panel_voltages
from tri.engine.transformer import (
    current_factors,
    delta_circulating_a,
    transfer_currents,
    transfer_voltages,
    voltage_factors,
)
from tri.engine.tree_inputs import PackedTree
from tri.engine.tree_rows import tree_wiring
from tri.engine.tree_solution import Spectra, TreeSolution
from tri.engine.tree_va import roll_up_phase_va

#: Called after each iteration with (iteration, largest voltage change [pu]).
Progress = Callable[[int, float], None]


def nominal_voltages(tree: PackedTree) -> np.ndarray:
    """Each node's nominal phase voltages in its own frame, shape (N, 3) [V].

    Balanced on a wye; the high-leg set on a high-leg delta
    (:mod:`tri.engine.high_leg`), as the panel alone is computed.
    """
    return np.array(tree.e_nominal, dtype=complex, copy=True)


def own_fundamental(circuits: CircuitArrays, v_phase: np.ndarray) -> Spectra:
    """Fundamental currents of each node's own circuits at ``v_phase``.

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (N, n).
    v_phase : complex ndarray, shape (N, 3)
        Panel voltages [V].

    Returns
    -------
    Spectra
        One order (H = 1): lines (N, 3, 1), neutral (N, 1), and the lines
        again as the sizing spectrum [A].
    """
    i_e = element_currents(circuits, v_phase)
    ln, _, tp = connection_masks(circuits)
    lines = (incidence(circuits) @ i_e[..., None])[..., 0]
    lines = lines + np.sum(np.where(tp, i_e, 0), axis=-1)[..., None] * PHASE_UNIT
    neutral = np.sum(np.where(ln, i_e, 0), axis=-1)
    return Spectra(lines[..., None], neutral[..., None], lines[..., None])


def _frame_shift(tree: PackedTree) -> np.ndarray:
    """``Δ = θ_parent − θ_node`` of every node's link (:mod:`tri.engine.centre_tap`) [rad]."""
    parent = np.maximum(tree.parent, 0)
    return np.where(tree.parent >= 0, tree.frame_rad[parent] - tree.frame_rad, 0.0)


def roll_up(tree: PackedTree, own: Spectra, orders_all: np.ndarray) -> tuple[Spectra, Spectra]:
    """Totals and feeder currents of every node, deepest level first.

    Parameters
    ----------
    tree : PackedTree
    own : Spectra
        Own-circuit spectra on ``orders_all`` (may be the fundamental only).
    orders_all : int ndarray, shape (H,)

    Returns
    -------
    total, fed : Spectra
        See :class:`TreeSolution`.
    """
    total = [own.phase.copy(), own.neutral.copy(), own.design.copy()]
    fed = [np.zeros_like(own.phase), np.zeros_like(own.neutral), np.zeros_like(own.design)]
    factors = shifted_current_factors(
        current_factors(tree.lag_rad, tree.ratio, tree.zero_pass, orders_all),
        _frame_shift(tree),
        orders_all,
    )
    for idx in reversed(tree.levels[1:]):
        tx = tree.has_tx[idx]
        parents = tree.parent[idx]
        tapped = tx & tree.high_leg[idx]
        for phase_k, neutral_k in ((0, 1), (2, None)):
            child = total[phase_k][idx]
            winding = tap_equivalent(child, tapped, tree.tap[idx])  # a centre-tapped secondary
            through = transfer_currents(winding, factors[idx])
            lines = np.where(tx[:, None, None], through, child)
            fed[phase_k][idx] = lines
            np.add.at(total[phase_k], parents, lines)
            if neutral_k is not None:
                # KCL at the primary: its neutral carries the sum of its lines
                neutral = np.where(tx[:, None], np.sum(through, axis=1), total[1][idx])
                fed[1][idx] = neutral
                np.add.at(total[1], parents, neutral)
    return Spectra(*total), Spectra(*fed)


def voltages_down(
    tree: PackedTree, total_fundamental: np.ndarray, neutral: np.ndarray
) -> np.ndarray:
    """Panel voltages, root first.

    Parameters
    ----------
    tree : PackedTree
    total_fundamental : complex ndarray, shape (N, 3)
        Each node's total fundamental line currents [A].
    neutral : complex ndarray, shape (N,)
        Each node's total fundamental neutral current [A].

    Returns
    -------
    complex ndarray, shape (N, 3)
        Phase-to-neutral voltages, each in its node's frame [V].
    """
    v = nominal_voltages(tree)
    if tree.root_z is not None:
        z_ph, z_n = tree.root_z
        v[0] = panel_voltages(tree.root_e, total_fundamental[0], neutral[0], z_ph, z_n)
    vfac = shifted_voltage_factors(
        voltage_factors(tree.lag_rad, tree.ratio, tree.zero_pass), _frame_shift(tree)
    )
    for idx in tree.levels[1:]:
        vp = v[tree.parent[idx]]
        tx = tree.has_tx[idx]
        secondary = tapped_voltages(
            transfer_voltages(vp, vfac[idx]), tx & tree.high_leg[idx], tree.tap[idx]
        )
        source = np.where(tx[:, None], secondary, vp)
        v[idx] = panel_voltages(
            source,
            total_fundamental[idx],
            neutral[idx],
            tree.z1_ohm[idx, None],
            tree.zn_ohm[idx, None],
        )
    return v


def _iterate(
    tree: PackedTree, tol: float, max_iter: int, progress: Progress | None
) -> tuple[np.ndarray, int, bool]:
    """Fixed point of the whole tree on the fundamental: (voltages, sweeps, converged)."""
    orders1 = np.array([1])
    # start from the voltages of the currents at nominal voltage (the
    # non-iterated solution), as the single-panel solver does
    total, _ = roll_up(tree, own_fundamental(tree.circuits, nominal_voltages(tree)), orders1)
    v = voltages_down(tree, total.phase[..., 0], total.neutral[..., 0])
    converged = False
    sweeps = 0
    for sweeps in range(1, max_iter + 1):
        total, _ = roll_up(tree, own_fundamental(tree.circuits, v), orders1)
        v_new = voltages_down(tree, total.phase[..., 0], total.neutral[..., 0])
        step = float(np.max(np.abs(v_new - v) / tree.v_ln[:, None]))
        v = v_new
        if progress is not None:
            progress(sweeps, step)
        if step < tol:
            converged = True
            break
    return v, sweeps, converged


def _bookkeeping(tree: PackedTree, oc_rms: np.ndarray, oc, fed: Spectra, va: np.ndarray):
    """Per-circuit figures with feeder rows filled, and the VA roll-up."""
    circuits = tree.circuits
    conn = np.asarray(circuits.connection)
    placed = conn != UNPLACED
    s_abs = np.abs(np.asarray(circuits.s_va))
    total_va = np.sum(np.where(placed, s_abs, 0.0), axis=-1)
    nl_va = np.sum(np.where((oc.harmonic_power_pu > 0) & placed, s_abs, 0.0), axis=-1)
    triplens = np.any((conn == THREE_PHASE) & (oc.triplen_power_pu > 0), axis=-1)
    scale = np.sum(oc_rms, axis=-1)
    cur = oc.circuit_fundamental_a.copy()
    cur_rms = oc_rms.copy()
    fed_fund = np.abs(fed.phase[..., 0])
    fed_rms = rms(fed.phase)
    phase_va, _ = roll_up_phase_va(tree, va, fed_fund)
    for idx in reversed(tree.levels[1:]):
        parents, rows = tree.parent[idx], tree.feeder_row[idx]
        cur[parents, rows] = np.max(fed_fund[idx], axis=-1)
        cur_rms[parents, rows] = np.max(fed_rms[idx], axis=-1)
        np.add.at(total_va, parents, total_va[idx])
        np.add.at(nl_va, parents, nl_va[idx])
        np.add.at(scale, parents, scale[idx])
        np.logical_or.at(triplens, parents, triplens[idx])
    unplaced = np.sum((conn == UNPLACED) & (s_abs > 0), axis=-1)
    return cur, cur_rms, phase_va, total_va, nl_va, triplens, scale, unplaced


def solve_tree(
    tree: PackedTree,
    *,
    iterate: bool = False,
    tol: float = 1e-9,
    max_iter: int = 100,
    progress: Progress | None = None,
) -> TreeSolution:
    """Currents and voltages of every panel of a tree.

    Parameters
    ----------
    tree : PackedTree
        From :func:`tri.engine.tree_inputs.pack_tree`.
    iterate : bool
        Solve every load as constant power at its panel's voltage.
    tol : float
        Convergence: largest voltage change between sweeps [pu of V_LN].
    max_iter : int
        Sweep limit [-].
    progress : callable, optional
        ``progress(sweep, step)`` after each sweep of the iteration.

    Returns
    -------
    TreeSolution
    """
    from tri.engine.phasors import schedule_va

    circuits = tree.circuits
    iterations, converged = 0, True
    v_load = nominal_voltages(tree)
    v = None
    if iterate:
        v, iterations, converged = _iterate(tree, tol, max_iter, progress)
        v_load = v
    i_e = element_currents(circuits, v_load)
    weights = None
    if np.any(circuits.continuous):
        weights = np.where(circuits.continuous, tree.continuous_factor[:, None], 1.0)
    oc = order_currents(circuits, i_e, weights)
    if not (np.all(np.isfinite(oc.phase)) and np.all(np.isfinite(oc.circuit_rms_a))):
        raise ValueError("harmonics must be finite numbers")
    weighted = oc.phase if oc.phase_weighted is None else oc.phase_weighted  # None: no weights
    own = Spectra(oc.phase, oc.neutral, weighted)
    total, fed = roll_up(tree, own, oc.orders)
    if v is None:
        v = voltages_down(tree, total.phase[..., 0], total.neutral[..., 0])
    cur, cur_rms, phase_va, total_va, nl_va, triplens, scale, unplaced = _bookkeeping(
        tree, oc.circuit_rms_a, oc, fed, schedule_va(circuits)
    )
    wiring = tree_wiring(tree, i_e, oc.circuit_rms_a, fed.phase)
    circulating = np.where(
        tree.delta_primary,
        delta_circulating_a(
            tap_equivalent(total.phase, tree.has_tx & tree.high_leg, tree.tap),
            np.where(tree.has_tx, tree.winding_ratio, 1.0),
        ),
        0.0,
    )
    return TreeSolution(
        orders=oc.orders,
        own=own,
        total=total,
        fed=fed,
        v_phase=v,
        circuit_current_a=cur,
        circuit_rms_a=cur_rms,
        phase_va=phase_va,
        total_va=total_va,
        nonlinear_va=nl_va,
        three_pole_triplens=triplens,
        scale=scale,
        unplaced_count=unplaced,
        delta_circulating_a=circulating,
        iterations=iterations,
        converged=converged,
        **wiring,
    )
