"""A transformer next to a high-leg delta: the frame of each side, and the centre-tapped winding.

:mod:`tri.engine.transformer` transfers currents and voltages sequence by
sequence between two *wye frames*: each side's frame has its nominal
positive-sequence phase voltage at 0°. A panel's own frame is its nominal
``V_AN`` at 0°, which is that wye frame on a wye system but not on a
high-leg delta (:mod:`tri.engine.high_leg`): there ``V_AN`` is half the
centre-tapped winding's voltage, and the positive-sequence phase voltage

``V_1 = (V_AN + a·V_BN + a²·V_CN)/3 = (V_LL/√3)∠θ``

sits at ``θ = +30°`` with the high leg on B, ``−30°`` with it on C
(:func:`frame_angle`, [computed] from the phasors). So a transformer
between two panels whose frames are ``θ_p`` (primary) and ``θ_s``
(secondary) ahead of their wye frames transfers, with ``Δ = θ_p − θ_s``,

* currents: the wye-frame factors times ``e^{+j·h·Δ}`` at order ``h`` (a
  frame rotation is a time shift, ``h`` times the angle at order ``h``);
* open-circuit voltages: the wye-frame factors times ``e^{−j·Δ}``
  (fundamental).

Without a high leg on either side ``Δ = 0`` and nothing changes.

The centre-tapped secondary
---------------------------
A high-leg delta secondary is a delta whose winding between A and the
other low leg (:func:`tap_phases`) is centre-tapped for the neutral. Let
the neutral return ``I_N`` enter the tap, and the tapped winding's two
halves (``N/2`` turns each, one limb) carry ``i₁`` (from the low-leg end to
the tap) and ``i₂ = i₁ + I_N`` (from the tap to A). Their ampere-turns are
``(N/2)(i₁ + i₂) = N·(i₁ + I_N/2)``: the limb works as a whole winding
carrying ``i₁ + I_N/2``, with ``I_N/2`` entering at each end. So, for the
ideal transformer, the secondary is a plain delta whose line currents are

``I'_A = I_A − I_N/2``, ``I'_low = I_low − I_N/2``, ``I'_high = I_high``

(:func:`tap_equivalent`), with ``I_N = I_A + I_B + I_C`` (KCL at the panel:
the lines carry out what the neutral brings back). They sum to zero, so
no zero sequence reaches any primary, and the delta transfers them as any
3-wire currents [computed; ampere-turn balance of one limb, the textbook
ideal-transformer model, from memory]. 10 A at unity on A to neutral of a
240/120D secondary behind a 480:240 V Dd0 transformer: ``I' = (5, 0, −5)``
A, so 2.5 A in primary lines A and C and none in B: the load hangs on the
tapped winding alone.

Its voltages to neutral are the delta's line voltages from the tap,
``V_pN = V_p − (V_A + V_low)/2`` for the wye-frame phase voltages ``V_p``
of a zero-sequence-free set (:func:`tapped_voltages`): at no load exactly
the high-leg set. Under load the drop is taken as on a wye (the link's
``z1`` on every line; the tapped halves' own impedances are not modelled).
"""

from __future__ import annotations

import numpy as np

from tri.engine.sequence import sequence_components


def frame_angle(e_nominal: np.ndarray) -> np.ndarray:
    """Angle of each node's nominal positive-sequence phase voltage in its own frame [rad].

    Parameters
    ----------
    e_nominal : complex ndarray, shape (N, 3)
        Nominal phase-to-neutral phasors [V].

    Returns
    -------
    float ndarray, shape (N,)
        0 on a wye, ``±π/6`` on a high-leg delta (module notes).
    """
    return np.angle(sequence_components(np.asarray(e_nominal, dtype=complex))[..., 1])


def tap_phases(high_leg: int | None) -> tuple[int, int] | None:
    """The two ends of the centre-tapped winding: A and the other low leg (None on a wye)."""
    if high_leg is None:
        return None
    return 0, 3 - int(high_leg)


def tap_equivalent(lines: np.ndarray, tapped: np.ndarray, taps: np.ndarray) -> np.ndarray:
    """The plain-delta line currents of centre-tapped secondaries (module notes) [A].

    Parameters
    ----------
    lines : complex ndarray, shape (L, 3, H)
        Secondary line currents, phases × orders [A].
    tapped : bool ndarray, shape (L,)
        Rows whose secondary is a high-leg delta.
    taps : int ndarray, shape (L, 2)
        Their tapped winding's phases (ignored on other rows).

    Returns
    -------
    complex ndarray, shape (L, 3, H)
        ``lines`` with ``I_N/2`` taken from each end of the tapped winding on
        the rows ``tapped``; the other rows unchanged.
    """
    out = np.array(lines, dtype=complex, copy=True)
    rows = np.flatnonzero(np.asarray(tapped, dtype=bool))
    if rows.size:
        half = 0.5 * out[rows].sum(axis=1)  # I_N / 2, (R, H)
        for end in (0, 1):
            out[rows, taps[rows, end]] -= half
    return out


def tapped_voltages(v_phase: np.ndarray, tapped: np.ndarray, taps: np.ndarray) -> np.ndarray:
    """Phase-to-neutral voltages of centre-tapped secondaries from their wye-frame set [V].

    Parameters
    ----------
    v_phase : complex ndarray, shape (L, 3)
        Zero-sequence-free phase voltages [V].
    tapped, taps : as for :func:`tap_equivalent`.

    Returns
    -------
    complex ndarray, shape (L, 3)
        ``V_p − (V_A + V_low)/2`` on the rows ``tapped`` (module notes), else ``v_phase``.
    """
    out = np.array(v_phase, dtype=complex, copy=True)
    rows = np.flatnonzero(np.asarray(tapped, dtype=bool))
    if rows.size:
        ends = np.take_along_axis(out[rows], taps[rows], axis=1)  # (R, 2)
        out[rows] -= 0.5 * ends.sum(axis=1, keepdims=True)
    return out


def shifted_current_factors(factors: np.ndarray, shift_rad: np.ndarray, orders: np.ndarray):
    """Wye-frame current factors (L, H, 3) times ``e^{+j·h·Δ}`` (module notes)."""
    h = np.asarray(orders, dtype=float)[None, :, None]
    return factors * np.exp(1j * h * np.asarray(shift_rad, dtype=float)[:, None, None])


def shifted_voltage_factors(factors: np.ndarray, shift_rad: np.ndarray) -> np.ndarray:
    """Wye-frame voltage factors (L, 3) times ``e^{−j·Δ}`` (module notes)."""
    return factors * np.exp(-1j * np.asarray(shift_rad, dtype=float))[:, None]
