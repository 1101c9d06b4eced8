"""Harmonic profiles of load types (built-in and user-defined).

A profile gives, for each harmonic order ``h > 1``, the magnitude ``m_h`` of
the harmonic current relative to the circuit's fundamental current and an
angle ``δ_h`` [deg]. If the fundamental current is ``|I_1|∠θ``, the h-th
harmonic is ``m_h·|I_1|∠(h·θ + δ_h)`` (``shared/spec/engine.md``). With
``δ_h = 0`` every harmonic peaks together with the fundamental-referred
current pulse, the usual picture of a capacitor-input rectifier drawing its
current at the voltage crest.

Built-in profiles and their sources (tags as in ``shared/spec/check-values.md``):

``linear``
    No harmonic current.
``led-driver``
    Typical small LED driver with passive or no power-factor correction,
    **typical, from memory** (order of magnitude only; drivers over 25 W
    sold in the EU must meet IEC 61000-3-2 Class C, see ``class-c-limit``).
``electronics``
    Single-phase switch-mode power supply spectrum from Dugan et al. [3],
    **from memory**: h3 81 %, h5 60.6 %, h7 37 %, h9 15.7 %, h11 2.4 %,
    h13 6.3 %, h15 7.9 %. Angles 0° up to h11 and 180° from h13 (the pulse
    spectrum changes sign past its first null), **typical, from memory**.
``ev-charger``
    On-board charger with an active power-factor-correcting front end,
    **typical, from memory** (a few percent per order, THD ≈ 5 %).
``vfd``
    Six-pulse diode-bridge drive with DC-link choke, characteristic orders
    ``6k ± 1`` only, magnitudes **typical, from memory**; angles from the
    ideal 120° quasi-square line current, whose Fourier coefficients are
    ``∝ sin(h·60°)/h`` (180° for h = 5, 11, 17, 23; 0° for 7, 13, 19, 25)
    **[computed]** [4].
``class-d-limit``
    The most a Class D device (PCs, monitors, TVs, 75-600 W) may emit under
    IEC 61000-3-2 [1] **[published]**: 3.4, 1.9, 1.0, 0.5, 0.35 mA/W for
    h = 3, 5, 7, 9, 11 and 3.85/h mA/W for odd h = 13..39. Per unit of the
    fundamental this depends on the circuit voltage and power factor, see
    Notes. Angles 0° (all orders crest together: the worst case a pulse
    can take; it does not change the neutral of balanced identical loads).
``class-c-limit``
    The most lighting equipment over 25 W may emit under IEC 61000-3-2
    Class C [1] **[published]**, in percent of the fundamental: h2 2,
    h3 30·λ (λ the circuit power factor), h5 10, h7 7, h9 5, odd h = 11..39
    3. Angles 0°.

References
----------
1. IEC 61000-3-2, *Limits for harmonic current emissions (equipment input
   current ≤ 16 A per phase)*, Tables 2 (Class C) and 3 (Class D) (limits
   published; the table numbers are from memory).
2. IEEE 519, *Recommended Practice and Requirements for Harmonic Control in
   Electric Power Systems* (definitions of harmonic order and THD) (from
   memory).
3. R. C. Dugan, M. F. McGranaghan, S. Santoso, H. W. Beaty, *Electrical
   Power Systems Quality*, ch. 5 (switch-mode power supply spectrum) (from
   memory).
4. N. Mohan, T. M. Undeland, W. P. Robbins, *Power Electronics*, ch. 5
   (line current of a three-phase diode bridge with a large DC inductance)
   (from memory for the book and chapter; the ``sin(h·60°)/h`` coefficients
   are [computed] from the ideal waveform).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

BUILTIN_PROFILES: dict[str, str] = {
    "linear": "Linear load: no harmonic current.",
    "led-driver": "LED lighting drivers (typical, from memory).",
    "electronics": (
        "Single-phase switch-mode electronics (PCs, monitors, chargers); "
        "Dugan et al., Electrical Power Systems Quality (from memory)."
    ),
    "ev-charger": "EV charger (on-board charger with active front end; typical, from memory).",
    "vfd": (
        "Variable-speed drive, six-pulse diode front end with DC choke "
        "(typical, from memory; angles of the ideal quasi-square wave)."
    ),
    "class-d-limit": "Worst case allowed by IEC 61000-3-2 Class D (mA/W limits).",
    "class-c-limit": "Worst case allowed by IEC 61000-3-2 Class C (lighting > 25 W).",
}

# Fixed spectra: name -> ((order, magnitude [pu], angle [deg]), ...)
_FIXED: dict[str, tuple[tuple[int, float, float], ...]] = {
    "linear": (),
    "led-driver": (
        (3, 0.70, 0.0),
        (5, 0.40, 0.0),
        (7, 0.20, 0.0),
        (9, 0.15, 0.0),
        (11, 0.10, 0.0),
        (13, 0.07, 0.0),
        (15, 0.05, 0.0),
    ),
    "electronics": (
        (3, 0.810, 0.0),
        (5, 0.606, 0.0),
        (7, 0.370, 0.0),
        (9, 0.157, 0.0),
        (11, 0.024, 0.0),
        (13, 0.063, 180.0),
        (15, 0.079, 180.0),
    ),
    "ev-charger": (
        (3, 0.040, 0.0),
        (5, 0.025, 0.0),
        (7, 0.015, 0.0),
        (9, 0.010, 0.0),
        (11, 0.008, 0.0),
        (13, 0.006, 0.0),
    ),
    "vfd": (
        (5, 0.35, 180.0),
        (7, 0.12, 0.0),
        (11, 0.07, 180.0),
        (13, 0.05, 0.0),
        (17, 0.03, 180.0),
        (19, 0.025, 0.0),
        (23, 0.02, 180.0),
        (25, 0.015, 0.0),
    ),
}

#: IEC 61000-3-2 Class D limits [mA/W] for h = 3..11; 3.85/h above.
CLASS_D_MA_PER_W: dict[int, float] = {3: 3.4, 5: 1.9, 7: 1.0, 9: 0.5, 11: 0.35}
#: Orders covered by the Class D table [-].
CLASS_D_ORDERS: tuple[int, ...] = tuple(range(3, 40, 2))
#: IEC 61000-3-2 Class C limits [% of fundamental]; h3 is 30·λ.
CLASS_C_PCT: dict[int, float] = {2: 2.0, 5: 10.0, 7: 7.0, 9: 5.0}
#: Orders covered by the Class C table [-].
CLASS_C_ORDERS: tuple[int, ...] = (2, *range(3, 40, 2))


def class_d_ma_per_w(order: int) -> float:
    """IEC 61000-3-2 Class D limit for one odd order.

    Parameters
    ----------
    order : int
        Harmonic order, odd, 3..39.

    Returns
    -------
    float
        Permitted harmonic current per watt of input power [mA/W] [1].
    """
    return CLASS_D_MA_PER_W.get(order, 3.85 / order)


def class_d_per_unit(circuit_v: np.ndarray, power_factor: np.ndarray) -> np.ndarray:
    """Class D limits per unit of the fundamental current.

    Parameters
    ----------
    circuit_v : ndarray, shape (...)
        Voltage across the device [V].
    power_factor : ndarray, shape (...)
        Displacement power factor of the device [-].

    Returns
    -------
    ndarray, shape (..., len(CLASS_D_ORDERS))
        ``m_h`` [pu of fundamental].

    Notes
    -----
    The limit is ``L_h·P`` amperes with ``L_h`` in A/W. The fundamental
    current is ``I_1 = P / (V·cos φ)``, so

    ``m_h = L_h·P / I_1 = L_h·V·cos φ``,

    independent of the power [1]. Example: 230 V, cos φ = 1, h3:
    ``3.4e-3·230 = 0.782``. The standard also caps Class D at the Class A
    amperes; per unit of the fundamental that cap cannot be applied without
    each device's power, and it binds only above about 585 W (h15), so it is
    left out.
    """
    lim = np.array([class_d_ma_per_w(h) for h in CLASS_D_ORDERS]) * 1e-3
    scale = np.asarray(circuit_v, dtype=float) * np.abs(np.asarray(power_factor, dtype=float))
    return scale[..., None] * lim


def class_c_per_unit(power_factor: np.ndarray) -> np.ndarray:
    """Class C limits per unit of the fundamental current.

    Parameters
    ----------
    power_factor : ndarray, shape (...)
        Circuit power factor λ [-].

    Returns
    -------
    ndarray, shape (..., len(CLASS_C_ORDERS))
        ``m_h`` [pu of fundamental]: h2 0.02, h3 0.30·λ, h5 0.10, h7 0.07,
        h9 0.05, odd h 11..39 0.03 [1].
    """
    lam = np.abs(np.asarray(power_factor, dtype=float))
    fixed = np.array([CLASS_C_PCT.get(h, 3.0) for h in CLASS_C_ORDERS]) / 100.0
    out = np.broadcast_to(fixed, (*lam.shape, len(CLASS_C_ORDERS))).copy()
    out[..., CLASS_C_ORDERS.index(3)] = 0.30 * lam
    return out


def validate_profile(name: str, harmonics: Sequence[tuple[int, float, float]]) -> None:
    """Raise ``ValueError`` unless a user profile is well formed.

    Parameters
    ----------
    name : str
        Profile name (for the message).
    harmonics : sequence of (order, magnitude, angle_deg)
        Orders integer > 1 and distinct; magnitudes finite and ≥ 0 [pu];
        angles finite [deg].
    """
    seen: set[int] = set()
    for row in harmonics:
        if len(row) != 3:
            raise ValueError(f"profile {name!r}: each harmonic is [order, magnitude, angle_deg]")
        order, mag, ang = row
        if int(order) != order or order < 2:
            raise ValueError(f"profile {name!r}: order {order!r} must be an integer above 1")
        if order in seen:
            raise ValueError(f"profile {name!r}: order {order} given twice")
        seen.add(int(order))
        if not np.isfinite(mag) or mag < 0:
            raise ValueError(f"profile {name!r}: magnitude {mag!r} must be a number ≥ 0")
        if not np.isfinite(ang):
            raise ValueError(f"profile {name!r}: angle {ang!r} must be a number")


def profile_matrix(
    profile_names: Sequence[str],
    power_factor: np.ndarray,
    circuit_v: np.ndarray,
    user_profiles: Mapping[str, Sequence[tuple[int, float, float]]],
) -> tuple[np.ndarray, np.ndarray]:
    """Harmonic matrix for circuits, one profile name each.

    Parameters
    ----------
    profile_names : sequence of str, length n
        Built-in or user profile name per circuit. A user profile with the
        name of a built-in one replaces it.
    power_factor : ndarray, shape (n,)
        Displacement power factor of each circuit [-] (Class C and D use it).
    circuit_v : ndarray, shape (n,)
        Voltage across each circuit [V] (Class D limits are in mA/W).
    user_profiles : mapping
        Name -> sequence of ``(order, magnitude_per_unit, angle_deg)``.

    Returns
    -------
    harmonics : complex ndarray, shape (n, h)
        ``m_h * exp(j * delta_h)`` per circuit and order [pu, rad].
    orders : int ndarray, shape (h,)
        Orders of the columns: the sorted union of the orders of the profiles
        used (all > 1).

    Raises
    ------
    ValueError
        For an unknown profile name or a malformed user profile.
    """
    n = len(profile_names)
    pf = np.broadcast_to(np.asarray(power_factor, dtype=float), (n,))
    cv = np.broadcast_to(np.asarray(circuit_v, dtype=float), (n,))
    for name, rows in user_profiles.items():
        validate_profile(name, rows)

    used = sorted(set(profile_names))
    orders_set: set[int] = set()
    for name in used:
        if name in user_profiles:
            orders_set.update(int(r[0]) for r in user_profiles[name])
        elif name in _FIXED:
            orders_set.update(r[0] for r in _FIXED[name])
        elif name == "class-d-limit":
            orders_set.update(CLASS_D_ORDERS)
        elif name == "class-c-limit":
            orders_set.update(CLASS_C_ORDERS)
        else:
            known = sorted(set(BUILTIN_PROFILES) | set(user_profiles))
            raise ValueError(f"unknown harmonic profile {name!r}; known: {', '.join(known)}")
    orders = np.array(sorted(orders_set), dtype=int)
    col = {int(h): i for i, h in enumerate(orders)}
    out = np.zeros((n, len(orders)), dtype=complex)
    names = np.asarray(list(profile_names), dtype=object)
    for name in used:
        rows_mask = names == name
        if name in user_profiles or name in _FIXED:
            spec = user_profiles[name] if name in user_profiles else _FIXED[name]
            for order, mag, ang in spec:
                out[rows_mask, col[int(order)]] = mag * np.exp(1j * np.deg2rad(ang))
        elif name == "class-d-limit":
            m = class_d_per_unit(cv[rows_mask], pf[rows_mask])
            out[np.ix_(rows_mask, [col[h] for h in CLASS_D_ORDERS])] = m
        else:  # class-c-limit
            m = class_c_per_unit(pf[rows_mask])
            out[np.ix_(rows_mask, [col[h] for h in CLASS_C_ORDERS])] = m
    return out, orders


def align_orders(
    harmonics: np.ndarray, orders: np.ndarray, target_orders: np.ndarray
) -> np.ndarray:
    """Re-index a harmonic matrix onto a wider set of orders.

    Parameters
    ----------
    harmonics : complex ndarray, shape (..., n, h)
        Per-unit harmonics on ``orders``.
    orders : int ndarray, shape (h,)
        Their orders.
    target_orders : int ndarray, shape (H,)
        A superset of ``orders`` (used to stack panels into one batch).

    Returns
    -------
    complex ndarray, shape (..., n, H)
        Zero in the columns of orders the panel does not use.
    """
    target = [int(h) for h in target_orders]
    missing = set(int(h) for h in orders) - set(target)
    if missing:
        raise ValueError(f"target orders lack {sorted(missing)}")
    out = np.zeros((*np.shape(harmonics)[:-1], len(target)), dtype=complex)
    out[..., [target.index(int(h)) for h in orders]] = harmonics
    return out
