"""What the engine refuses to analyse: :func:`check_inputs` raises ``ValueError``
for circuit arrays, voltages or ratings it cannot compute with (shapes, codes,
phase indices, non-finite loads, non-positive ratings)."""

from __future__ import annotations

import numpy as np

from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    UNPLACED,
    CircuitArrays,
    Ratings,
    SystemVoltages,
)
from tri.engine.legs import check_wiring_inputs


def check_inputs(circuits: CircuitArrays, system: SystemVoltages, ratings: Ratings) -> None:
    """Raise ``ValueError`` for input the engine cannot analyse.

    Parameters
    ----------
    circuits : CircuitArrays
    system : SystemVoltages
    ratings : Ratings

    Notes
    -----
    Checked: array shapes agree; connection codes known; phase indices 0..2
    on placed rows; a 2-pole circuit's phases differ; complex powers finite;
    no line-to-neutral circuit on a 3-wire system; voltages and ratings > 0.
    """
    shape = np.shape(circuits.s_va)
    if not shape:
        raise ValueError("circuit arrays need at least one axis (circuits)")
    for name in ("connection", "phase_p", "phase_q", "continuous", "breaker_a"):
        if np.shape(getattr(circuits, name)) != shape:
            raise ValueError(f"{name} has shape {np.shape(getattr(circuits, name))}, not {shape}")
    h = np.shape(circuits.orders)
    if len(h) != 1 or np.shape(circuits.harmonics) != (*shape, h[0]):
        raise ValueError("harmonics must have shape (..., n, len(orders))")
    if h[0] and np.any(np.asarray(circuits.orders) < 2):
        raise ValueError("harmonic orders must be > 1 (the fundamental is implicit)")
    if np.any(np.diff(np.asarray(circuits.orders)) <= 0):
        raise ValueError("harmonic orders must be strictly increasing")
    conn = np.asarray(circuits.connection)
    if np.any((conn < UNPLACED) | (conn > THREE_PHASE)):
        raise ValueError("unknown connection code")
    placed = (conn == LINE_TO_NEUTRAL) | (conn == LINE_TO_LINE)
    for name in ("phase_p", "phase_q"):
        idx = np.asarray(getattr(circuits, name))
        if np.any(placed & ((idx < 0) | (idx > 2))):
            raise ValueError(f"{name} must be 0, 1 or 2 on placed circuits")
    if np.any((conn == LINE_TO_LINE) & (circuits.phase_p == circuits.phase_q)):
        raise ValueError("a line-to-line circuit needs two different phases")
    if not np.all(np.isfinite(circuits.s_va)):
        raise ValueError("loads must be finite numbers")
    if not system.has_neutral and np.any(conn == LINE_TO_NEUTRAL):
        raise ValueError("line-to-neutral circuit on a 3-wire system (no neutral)")
    if not system.v_ll > 0 or (system.v_ln is not None and not system.v_ln > 0):
        raise ValueError("system voltages must be > 0")
    for name in ("bus_a", "main_a", "neutral_a"):
        value = getattr(ratings, name)
        if value is not None and not value > 0:
            raise ValueError(f"rating {name} must be > 0, got {value!r}")
    if not ratings.continuous_factor > 0:
        raise ValueError("continuous_factor must be > 0")
    breakers = np.asarray(circuits.breaker_a, dtype=float)
    if np.any(~np.isnan(breakers) & ~(breakers > 0)) or np.any(np.isinf(breakers)):
        raise ValueError("breaker ratings must be > 0 and finite (NaN: none)")
    check_wiring_inputs(circuits, system)
