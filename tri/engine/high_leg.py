"""Phase-to-neutral voltages of the supply: balanced wye, or a high-leg delta.

A high-leg delta (240/120 V, 3-phase 4-wire) is a delta of three 240 V
windings, one of them centre-tapped to make the neutral. The two lines at
the ends of that winding are 120 V to neutral and in opposition; the third
line, the *high leg*, sits at the far corner of the delta,
``√3/2 · 240 = 207.8 V`` from the neutral. With the high leg on B (the
usual North American marking) and ``V_A`` at 0°:

``V_AN = 120∠0°``, ``V_CN = 120∠180°``, ``V_BN = 207.8∠−90°``;

with the high leg on C: ``V_AN = 120∠0°``, ``V_BN = 120∠180°``,
``V_CN = 207.8∠+90°``. Either way every line-to-line voltage is 240 V and
the set ``V_AB, V_BC, V_CA`` is in positive sequence A-B-C (120° apart), so
3-pole loads see a normal 240 V three-phase supply [computed; the geometry
is that of the textbook high-leg delta, from memory].

Line-to-neutral loads on the two low legs draw currents in opposition:
10 A on A and 10 A on C return 0 A in the neutral (on 208Y/120 the same
loads would return 10 A) [computed].

References
----------
1. NEC 110.15 (the high leg marked orange) and 408.3(E) (the high leg on
   the B phase of a panelboard) (from memory; local code governs).
"""

from __future__ import annotations

import numpy as np

from tri.engine.inputs import SystemVoltages
from tri.engine.phasors import nominal_phase_voltages
from tri.engine.results import Finding

#: Sources of the high-leg caution.
HIGH_LEG_SOURCE = (
    "NEC 110.15 (high leg marked orange) and 408.3(E) (high leg on the B phase), from "
    "memory; local code governs"
)


def high_leg_phase_voltages(v_ll: float, high_leg: int) -> np.ndarray:
    """Phase-to-neutral voltages of a high-leg delta.

    Parameters
    ----------
    v_ll : float
        Line-to-line voltage, the voltage of each winding [V].
    high_leg : int
        Phase index of the high leg: 1 (B) or 2 (C).

    Returns
    -------
    complex ndarray, shape (3,)
        ``V_AN, V_BN, V_CN`` [V].

    Notes
    -----
    The centre-tapped winding joins phase A and the other low leg:
    ``V_A = V_LL/2``, ``V_low = −V_LL/2``; the high leg is
    ``∓j·(√3/2)·V_LL`` (``−j`` for B, ``+j`` for C), the sign that keeps
    ``V_AB, V_BC, V_CA`` in positive sequence.
    """
    if high_leg not in (1, 2):
        raise ValueError(f"the high leg is phase 1 (B) or 2 (C), not {high_leg!r}")
    half = float(v_ll) / 2.0
    v = np.empty(3, dtype=complex)
    low = 3 - high_leg  # the other end of the centre-tapped winding
    v[0], v[low] = half, -half
    v[high_leg] = (-1j if high_leg == 1 else 1j) * np.sqrt(3.0) * half
    return v


def supply_phase_voltages(system: SystemVoltages) -> np.ndarray:
    """Nominal phase-to-neutral voltages of ``system`` [V], shape (3,).

    Balanced ``V_LN∠0°, ∠−120°, ∠+120°`` on a wye (or ``V_LL/√3`` on a 3-wire
    delta); the high-leg set above on a high-leg delta.
    """
    if system.high_leg is not None:
        return high_leg_phase_voltages(system.v_ll, system.high_leg)
    return nominal_phase_voltages(system.v_ln_or_derived)


def high_leg_caution(label: str, v_ll: float) -> Finding:
    """The caution every report of a high-leg delta carries.

    Parameters
    ----------
    label : str
        Label of the high-leg phase.
    v_ll : float
        Line-to-line voltage [V].
    """
    v = np.sqrt(3.0) / 2.0 * v_ll
    return Finding(
        "warning",
        f"High-leg delta: phase {label} (the high leg, marked orange) reads {v:.0f} V to "
        f"neutral, not {v_ll / 2:.0f} V. Never connect a 120 V load to it; test before "
        "touching and confirm which bus it is on.",
        HIGH_LEG_SOURCE,
    )
