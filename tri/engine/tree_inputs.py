"""Plain-data inputs for a tree of panels (a building) and their packed array form.

A tree is a tuple of :class:`TreeNode`, the root (the service panel) first
and every parent before its children. Each node but the root has a
:class:`PanelLink`: which parent and which of the parent's circuit rows (the
feeder circuit) feeds it, the feeder conductors, and optionally a
transformer. :func:`pack_tree` turns the nodes into one padded batch of
circuit arrays (every node on the union of the harmonic orders) and
per-node arrays for :mod:`tri.engine.tree`.

Where the feeder sits: the feeder conductors run from the parent's breaker
to the child, in the parent's system; with a transformer they are its
primary conductors (the secondary conductors are taken as short, their
impedance left out). The child's phases A, B, C are the parent's A, B, C.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from tri.engine.centre_tap import frame_angle, tap_phases
from tri.engine.high_leg import supply_phase_voltages
from tri.engine.inputs import (
    CircuitArrays,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)
from tri.engine.supply import supply_impedances, transformer_impedance
from tri.engine.transformer import TransformerLink
from tri.engine.tree_rows import pad_circuits, union_orders, wiring_counts


@dataclass(frozen=True)
class FeederImpedance:
    """Feeder conductors from a parent's breaker to the panel (or transformer) it feeds.

    Attributes
    ----------
    length_m : float
        One-way length [m].
    r_ohm_per_km, x_ohm_per_km : float
        Phase conductor resistance and reactance [Ω/km].
    neutral_r_ohm_per_km, neutral_x_ohm_per_km : float
        Neutral conductor resistance and reactance [Ω/km].
    """

    length_m: float = 0.0
    r_ohm_per_km: float = 0.0
    x_ohm_per_km: float = 0.0
    neutral_r_ohm_per_km: float = 0.0
    neutral_x_ohm_per_km: float = 0.0

    @property
    def z_phase_ohm(self) -> complex:
        """Phase conductor impedance ``(r + jx)·L/1000`` [Ω]."""
        return complex(self.r_ohm_per_km, self.x_ohm_per_km) * self.length_m / 1000.0

    @property
    def z_neutral_ohm(self) -> complex:
        """Neutral conductor impedance [Ω]."""
        return (
            complex(self.neutral_r_ohm_per_km, self.neutral_x_ohm_per_km) * self.length_m / 1000.0
        )


@dataclass(frozen=True)
class PanelLink:
    """How a panel is fed from its parent.

    Attributes
    ----------
    parent : int
        Index of the parent node (smaller than the child's own index).
    feeder_row : int
        Row of the parent's circuit arrays that is the feeder circuit (its
        own load must be zero; it carries the child's currents).
    feeder : FeederImpedance
        Feeder conductors (in the parent's system).
    transformer : TransformerLink or None
        A transformer between the feeder and the child.
    """

    parent: int
    feeder_row: int
    feeder: FeederImpedance = field(default_factory=FeederImpedance)
    transformer: TransformerLink | None = None


@dataclass(frozen=True, eq=False)
class TreeNode:
    """One panel of a tree.

    Attributes
    ----------
    circuits : CircuitArrays
        The panel's own circuits, shape (n,).
    system : SystemVoltages
        Its nominal voltages [V].
    ratings : Ratings
        Its bus, main and neutral ratings [A].
    link : PanelLink or None
        How it is fed; None for the root.
    """

    circuits: CircuitArrays
    system: SystemVoltages
    ratings: Ratings
    link: PanelLink | None = None


@dataclass(frozen=True, eq=False)
class TreeInputs:
    """A whole tree: nodes (root first) and the supply behind the root.

    Attributes
    ----------
    nodes : tuple of TreeNode
        Root first; every parent before its children.
    supply : SupplyImpedance or None
        Transformer and feeder behind the root (its ``[supply]``); without
        one the root's voltage is taken as nominal and balanced.
    """

    nodes: tuple[TreeNode, ...]
    supply: SupplyImpedance | None = None

    def with_circuits(self, index: int, circuits: CircuitArrays) -> TreeInputs:
        """The same tree with node ``index``'s own circuits replaced (re-run the roll-up)."""
        nodes = list(self.nodes)
        nodes[index] = replace(nodes[index], circuits=circuits)
        return replace(self, nodes=tuple(nodes))

    def children(self, index: int) -> tuple[int, ...]:
        """Indices of the nodes fed directly from node ``index``."""
        return tuple(
            i for i, n in enumerate(self.nodes) if n.link is not None and n.link.parent == index
        )


def line_voltage(system: SystemVoltages) -> float:
    """Line-to-line magnitude of the engine's nominal phasors [V] (``√3·V_LN`` on wye; the
    winding voltage ``V_LL`` on a high-leg delta, whose ``V_LN`` is half of it)."""
    if system.v_ln is None or system.high_leg is not None:
        return system.v_ll
    return math.sqrt(3.0) * system.v_ln


@dataclass(frozen=True, eq=False)
class PackedTree:
    """A tree as arrays over its N nodes (see :func:`pack_tree`).

    Attributes
    ----------
    circuits : CircuitArrays
        Shape (N, n_max), on the union of the orders.
    n_rows : int ndarray, shape (N,)
        Real circuit rows of each node (the rest is padding).
    parent, feeder_row : int ndarray, shape (N,)
        -1 for the root.
    levels : tuple of int ndarray
        Node indices at depth 0, 1, 2, ...
    v_ln, v_ll : float ndarray, shape (N,)
        Nominal phase voltage (``V_LL/√3`` on 3-wire; the low legs' 120 V on a
        high-leg delta) and line voltage [V].
    e_nominal : complex ndarray, shape (N, 3)
        Nominal phase-to-neutral phasors of each node
        (:func:`tri.engine.high_leg.supply_phase_voltages`: balanced on a wye,
        the high-leg set on a high-leg delta) [V].
    high_leg : bool ndarray, shape (N,)
        The node is a high-leg delta.
    frame_rad : float ndarray, shape (N,)
        Angle of the node's nominal positive-sequence phase voltage in its
        own frame (0 on a wye, ±30° on a high-leg delta:
        :func:`tri.engine.centre_tap.frame_angle`) [rad].
    tap : int ndarray, shape (N, 2)
        The phases at the ends of a high-leg delta's centre-tapped winding
        (:func:`tri.engine.centre_tap.tap_phases`); 0, 0 elsewhere.
    n_breakers, n_groups : int ndarray, shape (N,)
        Breakers and shared neutrals in each node's own results
        (:func:`tri.engine.tree_rows.wiring_counts`).
    has_neutral : bool ndarray, shape (N,)
    rating_a, neutral_rating_a, continuous_factor : float ndarray, shape (N,)
        [A], [A], [-].
    has_tx, zero_pass, delta_primary, open_zero : bool ndarray, shape (N,)
        A transformer feeds the node; zero sequence passes it (YNyn); its
        primary is delta; a wye secondary with no zero-sequence path to
        the source (Yyn).
    lag_rad, ratio : float ndarray, shape (N,)
        Secondary lag [rad] and line-voltage ratio [-] (0 and 1 without).
    z1_ohm, zn_ohm : complex ndarray, shape (N,)
        Link impedance referred to the child, in the form
        ``V = E − z1·I_p − zn·I_N`` (positive sequence ``z1``,
        ``zn = (Z_0 − Z_1)/3``) [Ω].
    tx_rated_a, winding_ratio : float ndarray, shape (N,)
        Transformer rated secondary current [A] and primary turns per
        secondary turn [-] (NaN without a transformer).
    has_voltage : bool ndarray, shape (N,)
        Some impedance lies between the node and an ideal source.
    root_e : complex ndarray, shape (3,)
        Source behind the root [V].
    root_z : tuple of complex or None
        ``(z_phase, z_neutral)`` of the root's supply [Ω], None without one.
    root_full_load_a : float
        Rated current of the root's supply transformer [A] (NaN without).
    """

    circuits: CircuitArrays
    n_rows: np.ndarray
    parent: np.ndarray
    feeder_row: np.ndarray
    levels: tuple[np.ndarray, ...]
    v_ln: np.ndarray
    v_ll: np.ndarray
    e_nominal: np.ndarray
    high_leg: np.ndarray
    frame_rad: np.ndarray
    tap: np.ndarray
    n_breakers: np.ndarray
    n_groups: np.ndarray
    has_neutral: np.ndarray
    rating_a: np.ndarray
    neutral_rating_a: np.ndarray
    continuous_factor: np.ndarray
    has_tx: np.ndarray
    zero_pass: np.ndarray
    delta_primary: np.ndarray
    open_zero: np.ndarray
    lag_rad: np.ndarray
    ratio: np.ndarray
    z1_ohm: np.ndarray
    zn_ohm: np.ndarray
    tx_rated_a: np.ndarray
    winding_ratio: np.ndarray
    has_voltage: np.ndarray
    root_e: np.ndarray
    root_z: tuple[complex, complex] | None
    root_full_load_a: float

    @property
    def size(self) -> int:
        """Number of nodes N."""
        return int(self.parent.size)


def _link_arrays(nodes: tuple[TreeNode, ...]) -> dict[str, np.ndarray]:
    """Per-node transformer and link-impedance arrays (module docstring)."""
    count = len(nodes)
    out = {
        "has_tx": np.zeros(count, bool),
        "zero_pass": np.ones(count, bool),
        "delta_primary": np.zeros(count, bool),
        "open_zero": np.zeros(count, bool),
        "lag_rad": np.zeros(count),
        "ratio": np.ones(count),
        "z1_ohm": np.zeros(count, complex),
        "zn_ohm": np.zeros(count, complex),
        "tx_rated_a": np.full(count, np.nan),
        "winding_ratio": np.full(count, np.nan),
    }
    for i, node in enumerate(nodes):
        link = node.link
        if link is None:
            continue
        zf, zfn = link.feeder.z_phase_ohm, link.feeder.z_neutral_ohm
        tx = link.transformer
        if tx is None:
            z1, z0 = zf, zf + 3.0 * zfn
        else:
            g = tx.group
            v_sec = line_voltage(node.system)
            n = line_voltage(nodes[link.parent].system) / v_sec
            zt = tx.impedance_ohm(node.system.v_ll)
            z1 = zt + zf / n**2
            z0 = zt + ((zf + 3.0 * zfn) / n**2 if g.zero_sequence_passes else 0.0)
            out["has_tx"][i] = True
            out["zero_pass"][i] = g.zero_sequence_passes
            out["delta_primary"][i] = g.delta_primary
            out["open_zero"][i] = g.secondary_has_neutral and g.primary == "Y"
            out["lag_rad"][i] = g.lag_rad
            out["ratio"][i] = n
            out["tx_rated_a"][i] = tx.rated_current_a(node.system.v_ll)
            winding_sec = v_sec / math.sqrt(3.0) if g.secondary != "d" else v_sec
            winding_pri = line_voltage(nodes[link.parent].system)
            if g.primary != "D":
                winding_pri /= math.sqrt(3.0)
            out["winding_ratio"][i] = winding_pri / winding_sec
        out["z1_ohm"][i] = z1
        out["zn_ohm"][i] = (z0 - z1) / 3.0
    return out


def _voltage_arrays(nodes: tuple[TreeNode, ...]) -> dict[str, np.ndarray]:
    """Per-node nominal voltages, high leg, frame and centre tap (:class:`PackedTree`)."""
    e_nominal = np.array([supply_phase_voltages(n.system) for n in nodes], dtype=complex)
    return {
        "v_ln": np.array([n.system.v_ln_or_derived for n in nodes], dtype=float),
        "v_ll": np.array([n.system.v_ll for n in nodes], dtype=float),
        "e_nominal": e_nominal,
        "high_leg": np.array([n.system.high_leg is not None for n in nodes], dtype=bool),
        "frame_rad": frame_angle(e_nominal),
        "tap": np.array([tap_phases(n.system.high_leg) or (0, 0) for n in nodes], dtype=int),
    }


def pack_tree(tree: TreeInputs) -> PackedTree:
    """Check a tree and turn it into arrays.

    Parameters
    ----------
    tree : TreeInputs

    Returns
    -------
    PackedTree

    Raises
    ------
    ValueError
        From :func:`tri.engine.tree_checks.check_tree`.
    """
    from tri.engine.tree_checks import check_tree

    check_tree(tree)
    nodes = tree.nodes
    count = len(nodes)
    orders = union_orders(nodes)
    parent = np.array([-1 if n.link is None else n.link.parent for n in nodes], dtype=np.intp)
    depth = np.zeros(count, dtype=int)
    for i in range(1, count):
        depth[i] = depth[parent[i]] + 1
    levels = tuple(np.flatnonzero(depth == d) for d in range(int(depth.max()) + 1))
    links = _link_arrays(nodes)
    has_impedance = np.array(
        [
            n.link is not None
            and (n.link.transformer is not None or abs(n.link.feeder.z_phase_ohm))
            for n in nodes
        ]
    )
    has_voltage = np.zeros(count, bool)
    has_voltage[0] = tree.supply is not None
    for i in range(1, count):
        has_voltage[i] = has_voltage[parent[i]] or has_impedance[i]
    root_sys = nodes[0].system
    n_breakers, n_groups = wiring_counts(nodes)
    root_z, root_fl = None, math.nan
    if tree.supply is not None:
        z_ph, z_n = supply_impedances(tree.supply, root_sys)
        root_z = (complex(z_ph), complex(z_n))
        s = tree.supply
        root_fl = transformer_impedance(
            s.transformer_kva, s.transformer_z_pct, s.transformer_x_r, root_sys.v_ll
        ).full_load_a

    def rating(n: TreeNode) -> float:
        return n.ratings.main_a if n.ratings.main_a is not None else n.ratings.bus_a

    def neutral_rating(n: TreeNode) -> float:
        return n.ratings.neutral_a if n.ratings.neutral_a is not None else n.ratings.bus_a

    return PackedTree(
        circuits=pad_circuits(nodes, orders),
        n_rows=np.array([n.circuits.n_circuits for n in nodes], dtype=int),
        parent=parent,
        feeder_row=np.array([-1 if n.link is None else n.link.feeder_row for n in nodes]),
        levels=levels,
        **_voltage_arrays(nodes),
        n_breakers=n_breakers,
        n_groups=n_groups,
        has_neutral=np.array([n.system.has_neutral for n in nodes], dtype=bool),
        rating_a=np.array([rating(n) for n in nodes], dtype=float),
        neutral_rating_a=np.array([neutral_rating(n) for n in nodes], dtype=float),
        continuous_factor=np.array([n.ratings.continuous_factor for n in nodes], dtype=float),
        has_voltage=has_voltage,
        root_e=supply_phase_voltages(root_sys),
        root_z=root_z,
        root_full_load_a=float(root_fl),
        **links,
    )
