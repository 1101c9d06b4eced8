"""Supply impedance and the voltage at the panel.

Model (``shared/spec/engine.md``): an ideal balanced source ``E_p`` behind
the transformer's per-phase impedance, a phase conductor ``R + jX`` per
length and a neutral conductor impedance. Only the fundamental is solved;
harmonic voltage drops are not modelled.

References
----------
1. J. D. Glover, M. S. Sarma, T. J. Overbye, *Power System Analysis and
   Design*, ch. 3 (per-unit impedance, ``Z_base = V_LL² / S_3φ``) (from
   memory; the formulas are checked [computed] in the tests).
2. W. H. Kersting, *Distribution System Modeling and Analysis*, ch. 6 and 10
   (forward sweep of constant-power loads) (from memory).
3. NFPA 70 (NEC) Chapter 9 Table 9 (conductor R and X per length, and its
   "effective Z" at 0.85 PF) (published).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.inputs import CircuitArrays, SupplyImpedance, SystemVoltages
from tri.engine.phasors import (
    PHASE_UNIT,
    connection_masks,
    element_currents,
    incidence,
    nominal_phase_voltages,
)


@dataclass(frozen=True)
class TransformerImpedance:
    """Per-phase (wye-equivalent) impedance of a transformer.

    Attributes
    ----------
    z_base_ohm : float
        Base impedance ``V_LL² / S`` [Ω].
    z_ohm : complex
        ``R + jX`` [Ω].
    full_load_a : float
        Rated secondary line current ``S / (√3·V_LL)`` [A].
    """

    z_base_ohm: float
    z_ohm: complex
    full_load_a: float

    @property
    def r_ohm(self) -> float:
        """Resistance [Ω]."""
        return float(self.z_ohm.real)

    @property
    def x_ohm(self) -> float:
        """Reactance [Ω]."""
        return float(self.z_ohm.imag)


def transformer_impedance(
    kva: float, z_pct: float, x_r: float, v_ll: float
) -> TransformerImpedance:
    """Transformer percent impedance to ohms on the secondary.

    Parameters
    ----------
    kva : float
        Three-phase rating [kVA], > 0.
    z_pct : float
        Percent impedance on its own base [%], ≥ 0.
    x_r : float
        X/R ratio [-], ≥ 0.
    v_ll : float
        Secondary line-to-line voltage [V].

    Returns
    -------
    TransformerImpedance

    Notes
    -----
    ``Z_base = V_LL² / (1000·kVA)``, ``|Z| = z%/100·Z_base``,
    ``R = |Z| / sqrt(1 + (X/R)²)``, ``X = R·(X/R)``,
    ``I_FL = 1000·kVA / (√3·V_LL)`` [1].
    """
    if not kva > 0:
        raise ValueError(f"transformer_kva must be > 0, got {kva!r}")
    if z_pct < 0 or x_r < 0:
        raise ValueError("transformer_z_pct and transformer_x_r must be ≥ 0")
    z_base = v_ll**2 / (1000.0 * kva)
    z = z_pct / 100.0 * z_base
    r = z / np.sqrt(1.0 + x_r**2)
    return TransformerImpedance(
        z_base_ohm=float(z_base),
        z_ohm=complex(r, r * x_r),
        full_load_a=float(1000.0 * kva / (np.sqrt(3.0) * v_ll)),
    )


def supply_impedances(supply: SupplyImpedance, system: SystemVoltages) -> tuple[complex, complex]:
    """Phase-path and neutral-path impedance from source to panel.

    Parameters
    ----------
    supply : SupplyImpedance
        Transformer and feeder data.
    system : SystemVoltages
        Nominal voltages (the transformer secondary).

    Returns
    -------
    z_phase : complex
        Transformer plus phase conductor, per phase [Ω].
    z_neutral : complex
        Neutral conductor [Ω] (0 on a 3-wire system).

    Notes
    -----
    ``Z_phase = Z_T + (r + jx)·L/1000``, ``Z_N = (r_N + jx_N)·L/1000`` with
    ``L`` in metres and ``r, x`` in Ω/km.
    """
    tx = transformer_impedance(
        supply.transformer_kva, supply.transformer_z_pct, supply.transformer_x_r, system.v_ll
    )
    km = supply.feeder_length_m / 1000.0
    z_feeder = complex(supply.feeder_r_ohm_per_km, supply.feeder_x_ohm_per_km) * km
    z_n = complex(supply.neutral_r_ohm_per_km, supply.neutral_x_ohm_per_km) * km
    return tx.z_ohm + z_feeder, (z_n if system.has_neutral else 0j)


def panel_voltages(
    e_phase: np.ndarray,
    i_phase: np.ndarray,
    i_neutral: np.ndarray,
    z_phase: complex | np.ndarray,
    z_neutral: complex | np.ndarray,
) -> np.ndarray:
    """Phase-to-neutral voltages at the panel.

    Parameters
    ----------
    e_phase : complex ndarray, shape (3,) or (..., 3)
        Source phase voltages [V].
    i_phase : complex ndarray, shape (..., 3)
        Fundamental line currents [A].
    i_neutral : complex ndarray, shape (...)
        Fundamental neutral current ``I_A + I_B + I_C`` of the
        line-to-neutral loads [A].
    z_phase, z_neutral : complex, or complex ndarray broadcastable to (..., 3)
        Phase-path and neutral-path impedance [Ω] (an array: one per panel
        of a batch, shape (..., 1)).

    Returns
    -------
    complex ndarray, shape (..., 3)
        ``V_p' = E_p − Z_phase·I_p − Z_neutral·I_N`` [V].
    """
    return (
        np.asarray(e_phase)
        - z_phase * np.asarray(i_phase)
        - z_neutral * np.asarray(i_neutral)[..., None]
    )


@dataclass(frozen=True, eq=False)
class VoltageSolution:
    """Fundamental panel voltages and the currents that produced them (arrays).

    Attributes
    ----------
    v_phase : complex ndarray, shape (..., 3)
        Panel phase-to-neutral voltages [V].
    i_element : complex ndarray, shape (..., n)
        Element currents at those voltages (iterated) or at nominal [A].
    iterations : int ndarray, shape (...)
        Fixed-point iterations used (0 when not iterated) [-].
    converged : bool ndarray, shape (...)
        False if the iteration stopped at its limit.
    """

    v_phase: np.ndarray
    i_element: np.ndarray
    iterations: np.ndarray
    converged: np.ndarray


def _fundamental(circuits: CircuitArrays, i_e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Fundamental line currents (..., 3) and neutral (...) from element currents."""
    ln, _, tp = connection_masks(circuits)
    i_line = (incidence(circuits) @ i_e[..., None])[..., 0]
    i_line = i_line + np.sum(np.where(tp, i_e, 0), axis=-1)[..., None] * PHASE_UNIT
    return i_line, np.sum(np.where(ln, i_e, 0), axis=-1)


def solve_voltages(
    circuits: CircuitArrays,
    system: SystemVoltages,
    supply: SupplyImpedance,
    *,
    iterate: bool = False,
    tol: float = 1e-9,
    max_iter: int = 100,
) -> VoltageSolution:
    """Panel voltages, optionally with constant-power loads iterated.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n).
    system : SystemVoltages
        Nominal voltages; the source is balanced at these.
    supply : SupplyImpedance
        Transformer and feeder.
    iterate : bool
        False: currents at nominal voltage (the schedule convention), one
        voltage-drop evaluation. True: every load draws its scheduled
        ``S`` at the panel voltage; iterate to a fixed point.
    tol : float
        Convergence: largest voltage change between iterations, per unit of
        ``V_LN`` [-].
    max_iter : int
        Iteration limit [-].

    Returns
    -------
    VoltageSolution

    Notes
    -----
    Fixed point (a forward sweep [2]): ``I^(k) = I(V^(k))``,
    ``V^(k+1) = E − Z_phase·I^(k) − Z_N·I_N^(k)``, starting at ``V^(0) = E``.
    It converges quickly while the supply drop is a modest fraction of the
    voltage (each step contracts by about the per-unit drop). Panels of a
    batch that have converged are held fixed.
    """
    e = nominal_phase_voltages(system.v_ln_or_derived)
    z_ph, z_n = supply_impedances(supply, system)
    i_e = element_currents(circuits, e)
    batch = np.shape(circuits.s_va)[:-1]
    i_line, i_n = _fundamental(circuits, i_e)
    v = panel_voltages(e, i_line, i_n, z_ph, z_n)
    iterations = np.zeros(batch, dtype=int)
    converged = np.ones(batch, dtype=bool)
    if not iterate:
        return VoltageSolution(v, i_e, iterations, converged)
    converged = np.zeros(batch, dtype=bool)
    v_base = system.v_ln_or_derived
    for _ in range(max_iter):
        i_e = element_currents(circuits, v)
        i_line, i_n = _fundamental(circuits, i_e)
        v_new = panel_voltages(e, i_line, i_n, z_ph, z_n)
        step = np.max(np.abs(v_new - v), axis=-1) / v_base
        active = ~converged
        iterations = iterations + active
        v = np.where(active[..., None], v_new, v)
        converged = converged | (step < tol)
        if np.all(converged):
            break
    # currents consistent with the final voltages
    return VoltageSolution(v, element_currents(circuits, v), iterations, converged)


def effective_z_ohm(r: float | np.ndarray, x: float | np.ndarray, pf: float) -> np.ndarray:
    """Effective impedance of a conductor for voltage-drop estimates.

    Parameters
    ----------
    r, x : float or ndarray
        Conductor resistance and reactance per length [Ω per unit length].
    pf : float
        Load power factor ``cos θ`` [-] (lagging).

    Returns
    -------
    ndarray
        ``Z_eff = R·cos θ + X·sin θ`` [Ω per unit length].

    Notes
    -----
    The approximation behind NEC Chapter 9 Table 9's "effective Z" [3]: the
    in-phase component of ``(R + jX)·I`` for a current lagging by θ.
    """
    theta = np.arccos(np.clip(pf, -1.0, 1.0))
    return np.asarray(r) * np.cos(theta) + np.asarray(x) * np.sin(theta)
