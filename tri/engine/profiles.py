"""Harmonic profiles of load types (built-in and user-defined).

STUB: the engine owner fills this in. The contract the schedule layer relies on:

- ``BUILTIN_PROFILES``: mapping name -> description (str); the names are what
  a schedule's ``profile = "..."`` may use besides its own ``[profiles.*]``.
- ``profile_matrix(...)`` turns one profile name per circuit into the
  ``harmonics``/``orders`` arrays of ``CircuitArrays``.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

BUILTIN_PROFILES: dict[str, str] = {
    "linear": "Linear load: no harmonic current.",
    "led-driver": "LED lighting drivers.",
    "electronics": "Single-phase switch-mode electronics (PCs, monitors, chargers).",
    "ev-charger": "EV charger (on-board charger with active front end).",
    "vfd": "Variable-speed drive, six-pulse diode front end.",
    "class-d-limit": "Worst case allowed by IEC 61000-3-2 Class D.",
}


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
        Built-in or user profile name per circuit.
    power_factor : ndarray, shape (n,)
        Displacement power factor of each circuit [-] (Class C limits use it).
    circuit_v : ndarray, shape (n,)
        Voltage across each circuit [V] (Class D limits are in mA/W).
    user_profiles : mapping
        Name -> sequence of ``(order, magnitude_per_unit, angle_deg)``.

    Returns
    -------
    harmonics : complex ndarray, shape (n, h)
        ``m_h * exp(j * delta_h)`` per circuit and order [pu, rad].
    orders : int ndarray, shape (h,)
        Orders of the columns (sorted, all > 1).
    """
    n = len(profile_names)
    return np.zeros((n, 0), dtype=complex), np.zeros(0, dtype=int)
