"""The code's load calculation as arrays: scheduled loads at nominal voltage,
noncontinuous plus the continuous factor times the continuous load, per
phase (:func:`calculated_load_a`), per circuit (:func:`circuit_calculated_a`)
and on the neutral (:func:`neutral_calculated_load_a`), and loading against a
rating (:func:`loading_pct`). :mod:`tri.engine.loading` judges the results.

References
----------
1. NFPA 70 (NEC) 210.20(A), 215.2(A)(1), 230.42(A)(1) (published,
   secondary); see :mod:`tri.engine.limits`.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from tri.engine.inputs import CircuitArrays
from tri.engine.phasors import connection_masks, element_currents, schedule_va
from tri.engine.sequence import sequence_components


def loading_pct(current_a: np.ndarray, rating_a: float) -> np.ndarray:
    """Current as a percent of a rating.

    Parameters
    ----------
    current_a : ndarray
        Current [A].
    rating_a : float
        Rating [A], > 0.

    Returns
    -------
    ndarray
        ``100·I / rating`` [%].
    """
    return 100.0 * np.asarray(current_a, dtype=float) / float(rating_a)


def continuous_weights(continuous: np.ndarray, factor: float | np.ndarray) -> np.ndarray:
    """Multiplier on each circuit for the sizing rule.

    Parameters
    ----------
    continuous : bool ndarray, shape (..., n)
        Continuous loads (3 h or more).
    factor : float or float ndarray broadcastable to (..., n)
        Continuous factor [-] (1.25, :data:`tri.engine.limits.CONTINUOUS_FACTOR`);
        an array gives each panel of a batch its own (shape (..., 1)).

    Returns
    -------
    float ndarray, shape (..., n)
        ``factor`` on continuous rows, 1 elsewhere [-].
    """
    return np.where(np.asarray(continuous, dtype=bool), np.asarray(factor, dtype=float), 1.0)


def scheduled_current_a(circuits: CircuitArrays, v_phase: np.ndarray) -> np.ndarray:
    """Each circuit's line current from its scheduled load at nominal voltage [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    v_phase : complex ndarray, shape (3,) or (..., 3)
        Nominal phase-to-neutral phasors [V]: balanced ``V_LN∠0°, ∠−120°,
        ∠+120°`` on a wye (``V_LL/√3`` on a 3-wire system), the high-leg set
        on a high-leg delta (:func:`tri.engine.high_leg.supply_phase_voltages`).

    Returns
    -------
    ndarray, shape (..., n)
        ``|S|/|V_p|`` (1 pole), ``|S|/|V_p − V_q|`` (2 poles),
        ``|S|/(3·|V_1|)`` (3 poles, ``V_1`` the positive-sequence voltage), 0
        unplaced [A]. On a wye that is ``|S|/V_LN``, ``|S|/V_LL`` and
        ``|S|/(√3·V_LL)`` with ``V_LL = √3·V_LN``, the magnitude of the
        engine's nominal ``V_A − V_B`` (so a load given in amperes comes back
        unchanged); on a 240/120 V high-leg delta every line pair is 240 V and
        ``|V_1| = 240/√3``. The load as the schedule states it, the figure the
        code's calculations use (nameplate loads, nominal voltage), without
        the harmonic profile and whatever ``--iterate``.
    """
    return np.abs(element_currents(circuits, np.asarray(v_phase, dtype=complex)))


def phase_voltage_magnitudes(v_phase: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``|V_p|`` of each phase and ``|V_1|``, the voltage the code divides VA shares by.

    Parameters
    ----------
    v_phase : complex ndarray, shape (..., 3)
        Nominal phase-to-neutral phasors [V].

    Returns
    -------
    to_neutral : ndarray, shape (..., 3)
        Each phase's voltage to neutral [V] (the divisor of 1-pole VA).
    equivalent : ndarray, shape (...)
        ``|V_1| = V_LL/√3`` for a symmetric line-voltage set [V] (the divisor
        of the per-phase share of 2- and 3-pole VA); ``V_LN`` on a wye.
    """
    v = np.asarray(v_phase, dtype=complex)
    return np.abs(v), np.abs(sequence_components(v)[..., 1])


def circuit_calculated_a(
    circuits: CircuitArrays, factor: float | np.ndarray, v_phase: np.ndarray
) -> np.ndarray:
    """Each circuit's calculated load for its breaker: continuous ones at the factor.

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    factor : float or float ndarray broadcastable to (..., n)
        Continuous factor [-].
    v_phase : complex ndarray, shape (3,) or (..., 3)
        Nominal phase-to-neutral phasors [V] (:func:`scheduled_current_a`).

    Returns
    -------
    ndarray, shape (..., n)
        ``factor·I`` for continuous circuits, ``I`` otherwise, with ``I`` the
        scheduled line current [A] (NEC 210.20(A): a circuit is either
        continuous or not, so its "noncontinuous plus 125 % of continuous" is
        one of the two).
    """
    weights = continuous_weights(circuits.continuous, factor)
    return weights * scheduled_current_a(circuits, v_phase)


def calculated_load_a(circuits: CircuitArrays, factor: float, v_phase: np.ndarray) -> np.ndarray:
    """The code's calculated load on each phase [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    factor : float
        Continuous factor [-].
    v_phase : complex ndarray, shape (3,)
        Nominal phase-to-neutral phasors [V] (:func:`scheduled_current_a`).

    Returns
    -------
    ndarray, shape (..., 3)
        ``Σ_c w_c·VA_c,p / V_c,p`` [A]: the scheduled VA on each phase, with
        ``w_c`` the continuous factor on continuous circuits and 1 on the
        others, and ``V_c,p`` the phase's voltage to neutral for a 1-pole
        row, ``|V_1|`` for the share of a 2- or 3-pole row
        (:func:`phase_voltage_magnitudes`). On a wye both are ``V_LN``.

    Notes
    -----
    The code's load calculation adds VA per phase (NEC Article 220), as a
    panel schedule does: all of a 1-pole circuit's VA on its phase, half of
    a 2-pole's on each of its two, a third of a 3-pole's on each
    (:func:`tri.engine.phasors.schedule_va`); dividing by ``V_LN`` gives
    amperes. For a circuit of scheduled line current ``I`` that is ``I`` (1
    pole; 3 poles on a wye, ``√3·V_LL·I/3/V_LN = I``) and ``I·V_LL/(2·V_LN)``
    for 2 poles (``√3/2·I`` on a wye). Loads add arithmetically, as the
    code's calculation does; the physical current (phasors, harmonics) is
    the RMS phase current, judged separately against the rating.

    On a 240/120 V high-leg delta a 1-pole row is on a 120 V low leg
    (``|V_p| = 120``) and 2- and 3-pole shares are over ``|V_1| = 240/√3``,
    so a balanced 3-pole load of ``S`` gives ``S/(√3·240)`` on each phase,
    its line current [computed].
    """
    weights = continuous_weights(circuits.continuous, factor)
    s = np.asarray(circuits.s_va) * weights
    ln, _, _ = connection_masks(circuits)
    to_neutral, equivalent = phase_voltage_magnitudes(v_phase)
    ln_va = schedule_va(replace(circuits, s_va=np.where(ln, s, 0.0)))
    multi_va = schedule_va(replace(circuits, s_va=np.where(ln, 0.0, s)))
    return ln_va / to_neutral + multi_va / equivalent


def neutral_calculated_load_a(circuits: CircuitArrays, v_phase: np.ndarray) -> np.ndarray:
    """The neutral load of the code's calculation: the maximum unbalanced load [A].

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (..., n).
    v_phase : complex ndarray, shape (3,)
        Nominal phase-to-neutral phasors [V] (:func:`scheduled_current_a`).

    Returns
    -------
    ndarray, shape (...)
        ``max_p Σ_{1-pole c on p} |S_c| / |V_p|`` [A]: the largest scheduled
        line-to-neutral load on any one phase, at 100 % (NEC 220.61(A); a
        neutral not connected to an overcurrent device takes no 125 %,
        215.2(A)(1) Exception No. 2). 2- and 3-pole circuits put no load on
        the neutral; each leg to neutral of a breaker with a neutral or of a
        shared neutral is a 1-pole row on its own phase and counts there. On
        a wye ``|V_p| = V_LN``. On a high-leg delta the schedule refuses any
        load to neutral on the high leg, so only the 120 V loads of the two
        low legs count (a row to neutral on the high leg, which the engine
        can still be given, would count at its own 207.8 V).
    """
    ln, _, _ = connection_masks(circuits)
    line_to_neutral = replace(circuits, s_va=np.where(ln, np.asarray(circuits.s_va), 0.0))
    to_neutral, _ = phase_voltage_magnitudes(v_phase)
    return np.max(schedule_va(line_to_neutral) / to_neutral, axis=-1)
