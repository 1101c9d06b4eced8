"""Small builders for tree tests: panels as engine arrays, and two-level trees."""

from __future__ import annotations

import cmath
import math

import numpy as np

from tri.engine.inputs import (
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    CircuitArrays,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)
from tri.engine.transformer import TransformerLink, parse_vector_group
from tri.engine.tree_inputs import FeederImpedance, PanelLink, TreeInputs, TreeNode

SYS_480D = SystemVoltages(v_ll=480.0, v_ln=None)
SYS_480Y = SystemVoltages(v_ll=480.0, v_ln=277.0)
SYS_208Y = SystemVoltages(v_ll=208.0, v_ln=120.0)
BIG = Ratings(bus_a=2000.0)


def arrays(rows: list[tuple], orders: tuple[int, ...] = ()) -> CircuitArrays:
    """Circuits from rows ``(s_va, connection, p, q[, harmonics])``."""
    n = len(rows)
    harm = np.zeros((n, len(orders)), dtype=complex)
    for k, row in enumerate(rows):
        if len(row) > 4:
            harm[k] = row[4]
    return CircuitArrays(
        s_va=np.array([r[0] for r in rows], dtype=complex).reshape(n),
        connection=np.array([r[1] for r in rows], dtype=int).reshape(n),
        phase_p=np.array([r[2] for r in rows], dtype=int).reshape(n),
        phase_q=np.array([r[3] for r in rows], dtype=int).reshape(n),
        harmonics=harm,
        orders=np.array(orders, dtype=int),
    )


def feeder_only() -> CircuitArrays:
    """A parent whose only circuit is an empty 3-pole feeder row."""
    return arrays([(0, THREE_PHASE, 0, 0)])


def one_phase_amps(amps: float, v_ln: float, phase: int = 0) -> CircuitArrays:
    """One unity-power-factor 1-pole load of ``amps`` on ``phase`` at nominal voltage."""
    return arrays([(amps * v_ln, LINE_TO_NEUTRAL, phase, phase)])


def transformer(group: str, kva: float = 45.0, z_pct: float = 3.5, x_r: float = 2.0):
    """A transformer link with the given vector group."""
    return TransformerLink(kva, z_pct, x_r, parse_vector_group(group))


def two_level(
    child: CircuitArrays,
    parent_system: SystemVoltages,
    child_system: SystemVoltages,
    group: str | None,
    *,
    parent: CircuitArrays | None = None,
    feeder: FeederImpedance | None = None,
    supply: SupplyImpedance | None = None,
    kva: float = 45.0,
) -> TreeInputs:
    """A parent (its feeder in row 0) feeding one child, optionally through a transformer."""
    parent = feeder_only() if parent is None else parent
    tx = None if group is None else transformer(group, kva)
    link = PanelLink(0, 0, feeder or FeederImpedance(), tx)
    return TreeInputs(
        (TreeNode(parent, parent_system, BIG), TreeNode(child, child_system, BIG, link)),
        supply=supply,
    )


def polar(mag: float, deg: float) -> complex:
    """``mag∠deg`` [A or V]."""
    return cmath.rect(mag, math.radians(deg))
