"""Circuits to line currents at the fundamental frequency.

Every function is a pure function of arrays and accepts any number of
leading batch dimensions (a batch of panels padded with ``UNPLACED`` rows).
Angles are radians inside the engine; degrees only at the edges.

Conventions (``shared/spec/engine.md``): positive sequence A-B-C,
``V_A = V_LN∠0°``, ``V_B = V_LN∠-120°``, ``V_C = V_LN∠+120°``;
``S = P + jQ`` with ``Q > 0`` lagging; ``I = conj(S / V)``.

All currents follow from the phase-to-neutral voltage phasors; line
voltages are their differences. A "208Y/120" system therefore has
``|V_AB| = 120·√3 = 207.85 V`` in the engine (the nameplate 208 is rounded);
the nominal ``v_ll`` is used only for the transformer's impedance base and on
3-wire systems (``V_LN = V_LL/√3``).

Each placed circuit is reduced to one *element current* ``I_e``:

========================  ===============================  ===========================
connection                element current                  what the lines carry
========================  ===============================  ===========================
``LINE_TO_NEUTRAL`` (p)   ``conj(S / V_p)``                ``+I_e`` on line p, returns
                                                           in the neutral
``LINE_TO_LINE`` (p, q)   ``conj(S / V_pq)``, ``V_pq =     ``+I_e`` on p, ``-I_e`` on q
                          V_p - V_q``
``THREE_PHASE``           ``conj((S/3) / V_1)`` (line A    ``I_e·1∠φ_k`` on line k,
                          reference; ``V_1`` the positive  ``φ = (0, -120°, +120°)``
                          sequence phase-A voltage)
========================  ===============================  ===========================

At nominal (balanced) voltage ``V_1 = V_A`` and the three-phase rule is the
spec's ``conj((S/3) / V_p)`` on each line. With iterated, unbalanced panel
voltages a 3-pole load is still taken as a balanced set drawing ``S`` at the
positive-sequence voltage; the extra negative-sequence current a motor draws
from an unbalanced supply is not modelled.

References
----------
1. H. Saadat, *Power System Analysis*, ch. 10 (phasor and sequence
   conventions) (from memory for the chapter).
2. W. H. Kersting, *Distribution System Modeling and Analysis*, ch. 9
   (line-to-line loads on a four-wire wye) (from memory for the chapter).
"""

from __future__ import annotations

import numpy as np

from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    UNPLACED,
    CircuitArrays,
)
from tri.engine.sequence import sequence_components

#: Phase angles of the positive-sequence set A, B, C [rad].
PHASE_ANGLES = np.deg2rad(np.array([0.0, -120.0, 120.0]))
#: Unit phasors ``1∠φ_k`` of phases A, B, C [-].
PHASE_UNIT = np.exp(1j * PHASE_ANGLES)


def nominal_phase_voltages(v_ln: float) -> np.ndarray:
    """Balanced positive-sequence phase-to-neutral voltages.

    Parameters
    ----------
    v_ln : float
        Line-to-neutral magnitude [V].

    Returns
    -------
    complex ndarray, shape (3,)
        ``V_A, V_B, V_C`` [V].
    """
    return float(v_ln) * PHASE_UNIT


def line_voltages(v_phase: np.ndarray) -> np.ndarray:
    """Line-to-line voltages from phase-to-neutral voltages.

    Parameters
    ----------
    v_phase : complex ndarray, shape (..., 3)
        ``V_A, V_B, V_C`` [V].

    Returns
    -------
    complex ndarray, shape (..., 3)
        ``V_AB, V_BC, V_CA`` [V].

    Notes
    -----
    ``V_AB = V_A - V_B``, ``V_BC = V_B - V_C``, ``V_CA = V_C - V_A``; for a
    balanced set ``V_AB = √3·V_A∠30°`` [1].
    """
    v = np.asarray(v_phase, dtype=complex)
    return v - np.roll(v, -1, axis=-1)


def connection_masks(circuits: CircuitArrays) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Boolean masks of line-to-neutral, line-to-line and three-phase rows.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n).

    Returns
    -------
    ln, ll, tp : bool ndarray, shape (..., n)
        Rows that are 1-pole, 2-pole and 3-pole. ``UNPLACED`` rows are in none.
    """
    conn = np.asarray(circuits.connection)
    return conn == LINE_TO_NEUTRAL, conn == LINE_TO_LINE, conn == THREE_PHASE


def line_masks(circuits: CircuitArrays) -> tuple[np.ndarray, np.ndarray]:
    """Which lines each 1- or 2-pole circuit feeds and returns by.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n).

    Returns
    -------
    out_on, back_on : bool ndarray, shape (..., 3, n)
        ``out_on[k, c]``: circuit c is 1- or 2-pole with ``phase_p == k``;
        ``back_on[k, c]``: circuit c is 2-pole with ``phase_q == k``.
    """
    ln, ll, _ = connection_masks(circuits)
    k = np.arange(3)[:, None]
    out_on = (np.asarray(circuits.phase_p)[..., None, :] == k) & (ln | ll)[..., None, :]
    back_on = (np.asarray(circuits.phase_q)[..., None, :] == k) & ll[..., None, :]
    return out_on, back_on


def incidence(circuits: CircuitArrays) -> np.ndarray:
    """Line incidence of 1-pole and 2-pole circuits.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n).

    Returns
    -------
    float ndarray, shape (..., 3, n)
        ``+1`` on line p, ``-1`` on line q of a 2-pole circuit, 0 elsewhere
        [-] (lines × circuits). Three-phase and unplaced columns are all zero
        (three-phase circuits are added by rotation, see
        :mod:`tri.engine.harmonics`).
    """
    out_on, back_on = line_masks(circuits)
    return out_on.astype(float) - back_on


def _take(v_phase: np.ndarray, index: np.ndarray) -> np.ndarray:
    """``v_phase[..., index]`` with ``v_phase`` broadcast to the batch shape."""
    index = np.clip(np.asarray(index, dtype=np.intp), 0, 2)
    if v_phase.ndim == 1:
        return v_phase[index]
    v = np.broadcast_to(v_phase, (*index.shape[:-1], 3))
    return np.take_along_axis(v, index, axis=-1)


def element_voltages(circuits: CircuitArrays, v_phase: np.ndarray) -> np.ndarray:
    """Voltage across each circuit's element.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n).
    v_phase : complex ndarray, shape (3,) or (..., 3)
        Phase-to-neutral voltages at the panel [V].

    Returns
    -------
    complex ndarray, shape (..., n)
        ``V_p`` (1-pole), ``V_p - V_q`` (2-pole), positive-sequence ``V_1``
        (3-pole, the element is one third of the load referred to line A);
        0 for unplaced rows [V].
    """
    v_phase = np.asarray(v_phase, dtype=complex)
    ln, ll, tp = connection_masks(circuits)
    vp = _take(v_phase, circuits.phase_p)
    vq = _take(v_phase, circuits.phase_q)
    v1 = sequence_components(v_phase)[..., 1]  # (V_A + a V_B + a² V_C) / 3
    v1 = np.broadcast_to(np.asarray(v1)[..., None], vp.shape)
    return np.where(ln, vp, 0) + np.where(ll, vp - vq, 0) + np.where(tp, v1, 0)


def element_currents(circuits: CircuitArrays, v_phase: np.ndarray) -> np.ndarray:
    """Fundamental element current of each circuit at the given voltages.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n); ``s_va`` is the whole circuit's ``P + jQ`` [VA].
    v_phase : complex ndarray, shape (3,) or (..., 3)
        Phase-to-neutral voltages at the panel [V].

    Returns
    -------
    complex ndarray, shape (..., n)
        ``I_e`` [A]; see the module table. Unplaced rows, and rows whose
        element voltage is zero, give 0 (never a division by zero).

    Notes
    -----
    ``I_e = conj(S_e / V_e)`` with ``S_e = S`` (1- and 2-pole) or ``S/3``
    (3-pole) [1].
    """
    _, _, tp = connection_masks(circuits)
    v_e = element_voltages(circuits, v_phase)
    s_e = np.asarray(circuits.s_va, dtype=complex) * np.where(tp, 1.0 / 3.0, 1.0)
    ok = (np.abs(v_e) > 0) & (np.asarray(circuits.connection) != UNPLACED)
    return np.where(ok, np.conj(s_e / np.where(ok, v_e, 1.0)), 0)


def schedule_va(circuits: CircuitArrays) -> np.ndarray:
    """Apparent power the schedule attributes to each phase.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n).

    Returns
    -------
    float ndarray, shape (..., 3)
        ``Σ |S|`` of 1-pole circuits on the phase, half of each 2-pole and a
        third of each 3-pole circuit touching it [VA] (the panel-schedule
        bookkeeping, not ``|I_p|·V_p``).
    """
    _, ll, tp = connection_masks(circuits)
    s = np.abs(np.asarray(circuits.s_va, dtype=complex))
    out_on, back_on = line_masks(circuits)
    share = (out_on | back_on) * (1.0 - 0.5 * ll)[..., None, :] + (tp / 3.0)[..., None, :]
    return (share @ s[..., None])[..., 0]
