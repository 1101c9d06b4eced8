"""Results of a tree of panels: every node's figures (children included) and its feeder.

:func:`analyse_tree` is the entry point: it packs and solves the tree
(:mod:`tri.engine.tree`), turns the arrays into one
:class:`~tri.engine.results.BatchAnalysis` over all nodes
(:func:`tree_batch`, the batch figures), and gives each node a
:class:`~tri.engine.results.PanelAnalysis` made by the same code as a
single panel's (:func:`tri.engine.describe.describe_panel`), plus what the
tree adds: the feeder currents at the parent, the transformer's loading
and the current circulating in a delta winding (its findings:
:mod:`tri.engine.tree_findings`).

A node's figures include everything fed from it: a panel whose only load
is one feeder to a child (without a transformer) shows exactly the child's
currents.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from tri.engine.batch_figures import current_figures, voltage_figures
from tri.engine.describe import SourceFigures, describe_panel
from tri.engine.harmonics import rms
from tri.engine.inputs import MeasuredReadings
from tri.engine.limits import LEVEL_RANK, FindingLimits
from tri.engine.results import BatchAnalysis, PanelAnalysis, Phasor
from tri.engine.tree import Progress, TreeSolution, solve_tree
from tri.engine.tree_code import tree_code_figures
from tri.engine.tree_findings import tree_findings
from tri.engine.tree_inputs import PackedTree, PanelLink, TreeInputs, pack_tree


@dataclass(frozen=True)
class TransformerResult:
    """Figures of the transformer that feeds a panel.

    Attributes
    ----------
    group : str
        Vector group, e.g. ``"Dyn1"``.
    kva : float
        Rating [kVA].
    rated_a : float
        Rated secondary line current [A].
    secondary_rms_a : tuple of 3 float
        Secondary line RMS currents (the child's phases) [A].
    loading_pct : float
        Largest secondary RMS current / rated current [%].
    delta_circulating_a : float or None
        RMS current circulating in the delta primary winding [A]; None
        without a delta primary.
    """

    group: str
    kva: float
    rated_a: float
    secondary_rms_a: tuple[float, float, float]
    loading_pct: float
    delta_circulating_a: float | None


@dataclass(frozen=True)
class FeederResult:
    """What a panel draws from its parent's feeder circuit (in the parent's frame).

    Attributes
    ----------
    parent : int
        Parent node index.
    feeder_row : int
        The parent's circuit row that is the feeder.
    current : tuple of 3 Phasor
        Fundamental line currents at the parent, parent's phase order [A, deg].
    rms_a : tuple of 3 float
        True-RMS line currents at the parent [A].
    neutral_rms_a : float
        True-RMS current in the feeder's neutral [A] (0 through a transformer
        that keeps zero sequence out).
    z_phase_ohm, z_neutral_ohm : complex
        Link impedance referred to the panel, in the form of the panel
        voltage model ``V = E − Z_phase·I_p − Z_neutral·I_N`` [Ω].
    transformer : TransformerResult or None
    """

    parent: int
    feeder_row: int
    current: tuple[Phasor, Phasor, Phasor]
    rms_a: tuple[float, float, float]
    neutral_rms_a: float
    z_phase_ohm: complex
    z_neutral_ohm: complex
    transformer: TransformerResult | None


@dataclass(frozen=True)
class NodeResult:
    """One panel of the tree.

    Attributes
    ----------
    analysis : PanelAnalysis
        Its figures, everything fed from it included, and its findings.
    feeder : FeederResult or None
        How it loads its parent; None for the root.
    children : tuple of int
        Nodes fed directly from it.
    depth : int
        0 for the root.
    """

    analysis: PanelAnalysis
    feeder: FeederResult | None
    children: tuple[int, ...]
    depth: int


@dataclass(frozen=True, eq=False)
class TreeAnalysis:
    """Every node of a tree, root first, and how the tree was solved.

    Attributes
    ----------
    nodes : tuple of NodeResult
        In the order of the inputs.
    batch : BatchAnalysis
        The same figures as arrays over the nodes (leading shape (N,)).
    solution : TreeSolution
        The solved arrays (own, total and feeder spectra, voltages).
    iterated : bool
        Loads were solved as constant power at their panels' voltages.
    """

    nodes: tuple[NodeResult, ...]
    batch: BatchAnalysis
    solution: TreeSolution
    iterated: bool


def tree_batch(tree: PackedTree, sol: TreeSolution) -> BatchAnalysis:
    """Figures of every node from the solved tree, as one batch.

    Parameters
    ----------
    tree : PackedTree
    sol : TreeSolution

    Returns
    -------
    BatchAnalysis
        Leading shape (N,); voltage fields for every node (nominal where
        nothing lies between the node and an ideal source).
    """
    total = sol.total
    currents = current_figures(
        total.phase, total.neutral, total.design, sol.scale, tree.rating_a, tree.neutral_rating_a
    )
    # a high-leg delta's phase voltages differ by design (120, 120, 208 V): no deviation rate
    volt = voltage_figures(sol.v_phase, tree.has_neutral & ~tree.high_leg)
    share = np.where(
        sol.total_va > 0,
        100.0 * sol.nonlinear_va / np.where(sol.total_va > 0, sol.total_va, 1.0),
        0.0,
    )
    count = tree.size
    return BatchAnalysis(
        orders=sol.orders,
        phase_va=sol.phase_va,
        circuit_current_a=sol.circuit_current_a,
        circuit_rms_a=sol.circuit_rms_a,
        nonlinear_share_pct=share,
        unplaced_count=sol.unplaced_count,
        three_pole_triplens=sol.three_pole_triplens,
        iterations=np.full(count, sol.iterations),
        converged=np.full(count, sol.converged),
        breaker_pole_spectrum=sol.breaker_pole_spectrum,
        shared_neutral_spectrum=sol.shared_neutral_spectrum,
        **currents,
        **tree_code_figures(tree, sol),
        **volt,
    )


def _take(b: BatchAnalysis, tree: PackedTree, i: int) -> BatchAnalysis:
    """Node ``i``'s figures on its own rows, breakers and shared neutrals (padding cut)."""
    one = b.take(i)
    n_rows, nb, ng = int(tree.n_rows[i]), int(tree.n_breakers[i]), int(tree.n_groups[i])
    poles, groups = one.breaker_pole_spectrum, one.shared_neutral_spectrum
    return dataclasses.replace(
        one,
        circuit_current_a=one.circuit_current_a[:n_rows],
        circuit_rms_a=one.circuit_rms_a[:n_rows],
        circuit_calculated_a=one.circuit_calculated_a[:n_rows],
        breaker_pole_spectrum=poles[:nb] if poles is not None and nb else None,
        shared_neutral_spectrum=groups[:ng] if groups is not None and ng else None,
    )


def _upstream_full_load(tree: PackedTree, i: int) -> float:
    """Rated current of the nearest transformer at or above node ``i`` in its system [A]."""
    while i > 0 and not tree.has_tx[i]:
        i = int(tree.parent[i])
    return float(tree.tx_rated_a[i]) if i > 0 else tree.root_full_load_a


def _source(tree: PackedTree, i: int) -> SourceFigures | None:
    if not tree.has_voltage[i]:
        return None
    if i == 0:
        assert tree.root_z is not None
        return SourceFigures(*tree.root_z, tree.root_full_load_a)
    return SourceFigures(
        complex(tree.z1_ohm[i]), complex(tree.zn_ohm[i]), _upstream_full_load(tree, i)
    )


def _feeder(tree: PackedTree, sol: TreeSolution, i: int, link: PanelLink) -> FeederResult:
    fed = sol.fed
    sec = rms(sol.total.phase[i])
    transformer = None
    if tree.has_tx[i]:
        rated = float(tree.tx_rated_a[i])
        assert link.transformer is not None
        transformer = TransformerResult(
            group=link.transformer.group.text,
            kva=link.transformer.kva,
            rated_a=rated,
            secondary_rms_a=(float(sec[0]), float(sec[1]), float(sec[2])),
            loading_pct=float(100.0 * np.max(sec) / rated),
            delta_circulating_a=(
                float(sol.delta_circulating_a[i]) if tree.delta_primary[i] else None
            ),
        )
    lines = fed.phase[i, :, 0]
    fed_rms = rms(fed.phase[i])
    return FeederResult(
        parent=int(tree.parent[i]),
        feeder_row=int(tree.feeder_row[i]),
        current=(Phasor.of(lines[0]), Phasor.of(lines[1]), Phasor.of(lines[2])),
        rms_a=(float(fed_rms[0]), float(fed_rms[1]), float(fed_rms[2])),
        neutral_rms_a=float(rms(fed.neutral[i])),
        z_phase_ohm=complex(tree.z1_ohm[i]),
        z_neutral_ohm=complex(tree.zn_ohm[i]),
        transformer=transformer,
    )


def analyse_tree(
    tree: TreeInputs,
    *,
    readings: tuple[MeasuredReadings | None, ...] | None = None,
    phase_labels: tuple[tuple[str, str, str], ...] | None = None,
    circuit_labels: tuple[tuple[str, ...], ...] | None = None,
    iterate_voltage: bool = False,
    limits: FindingLimits | None = None,
    tol: float = 1e-9,
    max_iter: int = 100,
    progress: Progress | None = None,
) -> TreeAnalysis:
    """Analyse every panel of a tree, children included in every figure.

    Parameters
    ----------
    tree : TreeInputs
        Nodes (root first) and the supply behind the root.
    readings : tuple of (MeasuredReadings or None), optional
        Site readings per node.
    phase_labels : tuple of label triples, optional
        Per node (default ``("A", "B", "C")``).
    circuit_labels : tuple of (tuple of str), optional
        Per node, how findings name each circuit row (slot or phases, and
        name); default ``"circuit 1"``, ...
    iterate_voltage : bool
        Solve every load as constant power at its panel's voltage.
    limits : FindingLimits, optional
    tol, max_iter : float, int
        Iteration tolerance [pu of V_LN] and sweep limit.
    progress : callable, optional
        ``progress(sweep, step)`` after each sweep.

    Returns
    -------
    TreeAnalysis

    Raises
    ------
    ValueError
        For a malformed tree (:func:`tri.engine.tree_checks.check_tree`).
    """
    limits = limits or FindingLimits()
    packed = pack_tree(tree)
    sol = solve_tree(packed, iterate=iterate_voltage, tol=tol, max_iter=max_iter, progress=progress)
    batch = tree_batch(packed, sol)
    depth, children = _depths_and_children(packed)
    nodes: list[NodeResult] = []
    for i, node in enumerate(tree.nodes):
        source = _source(packed, i)
        a = describe_panel(
            _take(batch, packed, i),
            node.system,
            node.ratings,
            source,
            None if readings is None else readings[i],
            iterated=iterate_voltage and source is not None,
            iterate_requested=iterate_voltage,
            phase_labels=("A", "B", "C") if phase_labels is None else phase_labels[i],
            limits=limits,
            circuits=node.circuits,
            circuit_labels=None if circuit_labels is None else circuit_labels[i],
        )
        feeder = None if node.link is None else _feeder(packed, sol, i, node.link)
        extra = tree_findings(packed, sol, i, feeder, limits)
        findings = sorted((*a.findings, *extra), key=lambda f: LEVEL_RANK[f.level])
        nodes.append(
            NodeResult(
                analysis=dataclasses.replace(a, findings=tuple(findings)),
                feeder=feeder,
                children=tuple(children[i]),
                depth=int(depth[i]),
            )
        )
    return TreeAnalysis(nodes=tuple(nodes), batch=batch, solution=sol, iterated=iterate_voltage)


def _depths_and_children(packed: PackedTree) -> tuple[np.ndarray, list[list[int]]]:
    """Each node's depth (root 0) and the nodes it feeds directly, in index order."""
    count = packed.size
    depth = np.zeros(count, dtype=int)
    for d, idx in enumerate(packed.levels):
        depth[idx] = d
    children: list[list[int]] = [[] for _ in range(count)]
    for i in range(1, count):
        children[int(packed.parent[i])].append(i)
    return depth, children
