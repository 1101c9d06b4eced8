"""Array figures of a batch of panels from its spectra: phase, neutral and
sequence currents (:func:`current_figures`), voltage unbalance at the panel
(:func:`voltage_figures`), the code's calculated loads (:func:`code_figures`),
and the round-off snap every phasor passes through (:func:`snap_roundoff`).

Each returns a dict of :class:`~tri.engine.results.BatchAnalysis` fields with
the batch's leading shape; :mod:`tri.engine.analysis` and the building roll-up
(:mod:`tri.engine.tree_results`) assemble them.
"""

from __future__ import annotations

import numpy as np

from tri.engine.harmonics import rms, thd_pct
from tri.engine.high_leg import supply_phase_voltages
from tri.engine.inputs import LINE_TO_NEUTRAL, CircuitArrays, Ratings, SystemVoltages
from tri.engine.legs import breaker_calculated_a
from tri.engine.loading import (
    calculated_load_a,
    circuit_calculated_a,
    loading_pct,
    neutral_calculated_load_a,
)
from tri.engine.phasors import line_voltages
from tri.engine.sequence import sequence_components, unbalance_pct
from tri.engine.unbalance import deviation_rate_pct, max_minus_min_pct, nema_derating, vuf_pct

#: Phasors smaller than this fraction of the panel's total circuit current are
#: round-off and are set to exactly 0 (so a balanced neutral reads 0∠0°) [-].
SNAP_RELATIVE = 1e-12


def snap_roundoff(x: np.ndarray, scale: np.ndarray, extra_dims: int) -> np.ndarray:
    """``x`` with phasors at or below ``SNAP_RELATIVE·scale`` set to 0.

    ``scale`` [A] has the batch shape (one value per panel or node); ``x`` has
    ``extra_dims`` more trailing axes.
    """
    s = np.reshape(scale, np.shape(scale) + (1,) * extra_dims)
    return np.where(np.abs(x) <= SNAP_RELATIVE * s, 0, x)


def code_figures(
    circuits: CircuitArrays,
    system: SystemVoltages,
    ratings: Ratings,
    rating: float,
    nonlinear: np.ndarray,
    total_va: np.ndarray,
) -> dict[str, np.ndarray]:
    """The figures of the code's calculation (scheduled loads) and the non-linear
    line-to-neutral share, as :class:`BatchAnalysis` fields."""
    factor = ratings.continuous_factor
    e = supply_phase_voltages(system)
    calculated = calculated_load_a(circuits, factor, e)
    s_abs = np.abs(np.asarray(circuits.s_va))
    ln = np.asarray(circuits.connection) == LINE_TO_NEUTRAL
    nl_ln_va = np.sum(np.where(nonlinear & ln, s_abs, 0.0), axis=-1)
    safe = np.where(total_va > 0, total_va, 1.0)
    return {
        "phase_calculated_a": calculated,
        "phase_calculated_pct": loading_pct(calculated, rating),
        "neutral_calculated_a": neutral_calculated_load_a(circuits, e),
        "circuit_calculated_a": breaker_calculated_a(
            circuits, circuit_calculated_a(circuits, factor, e), factor, e
        ),
        "nonlinear_ln_share_pct": np.where(total_va > 0, 100.0 * nl_ln_va / safe, 0.0),
    }


def current_figures(
    phase: np.ndarray,
    neutral: np.ndarray,
    phase_weighted: np.ndarray | None,
    scale: np.ndarray,
    rating_a: float | np.ndarray,
    neutral_rating_a: float | np.ndarray,
) -> dict[str, np.ndarray]:
    """Phase, neutral and sequence figures from line and neutral spectra.

    Parameters
    ----------
    phase : complex ndarray, shape (B..., 3, H)
        Line currents at each order, the fundamental first [A].
    neutral : complex ndarray, shape (B..., H)
        Neutral current at each order [A].
    phase_weighted : complex ndarray, shape (B..., 3, H), or None
        Line currents with continuous loads at the continuous factor [A]
        (None: the same as ``phase``).
    scale : float ndarray, shape (B...)
        Sum of the circuits' RMS currents [A]; phasors below
        ``SNAP_RELATIVE·scale`` are round-off and set to 0.
    rating_a, neutral_rating_a : float or ndarray of shape (B...)
        Phase rating (main, else bus) and neutral rating [A].

    Returns
    -------
    dict
        The :class:`~tri.engine.results.BatchAnalysis` fields ``phase_spectrum``
        to ``max_deviation_fundamental_pct`` and ``max_minus_min_pct`` [A], [%].
    """
    phase_spec = snap_roundoff(phase, scale, 2)
    neutral_spec = snap_roundoff(neutral, scale, 1)
    design_spec = phase_spec if phase_weighted is None else phase_weighted
    rating = np.asarray(rating_a, dtype=float)[..., None]
    phase_rms = rms(phase_spec)
    design_rms = rms(design_spec)
    neutral_rms = rms(neutral_spec)
    fund = phase_spec[..., 0]
    seq = snap_roundoff(sequence_components(fund), scale, 1)
    return {
        "phase_spectrum": phase_spec,
        "phase_rms_a": phase_rms,
        "phase_thd_pct": thd_pct(phase_spec),
        "phase_loading_pct": 100.0 * phase_rms / rating,
        "phase_design_a": design_rms,
        "phase_design_loading_pct": 100.0 * design_rms / rating,
        "neutral_spectrum": neutral_spec,
        "neutral_rms_a": neutral_rms,
        "neutral_loading_pct": 100.0 * neutral_rms / np.asarray(neutral_rating_a, dtype=float),
        "sequence": seq,
        "negative_sequence_pct": unbalance_pct(seq, 2),
        "zero_sequence_pct": unbalance_pct(seq, 0),
        "max_deviation_pct": deviation_rate_pct(phase_rms),
        "max_deviation_fundamental_pct": deviation_rate_pct(np.abs(fund)),
        "max_minus_min_pct": max_minus_min_pct(phase_rms),
    }


def voltage_figures(v_phase: np.ndarray, has_neutral: bool | np.ndarray) -> dict[str, np.ndarray]:
    """Voltage unbalance figures from panel phase voltages.

    Parameters
    ----------
    v_phase : complex ndarray, shape (B..., 3)
        Phase-to-neutral voltages at the panel [V].
    has_neutral : bool or bool ndarray of shape (B...)
        4-wire panels (the phase deviation is NaN on 3-wire ones).

    Returns
    -------
    dict
        The :class:`~tri.engine.results.BatchAnalysis` fields ``v_phase``,
        ``v_line``, ``vuf_pct``, ``line_deviation_pct``,
        ``phase_deviation_pct`` and ``motor_derating``.
    """
    v_line = line_voltages(v_phase)
    line_dev = deviation_rate_pct(np.abs(v_line))
    return {
        "v_phase": v_phase,
        "v_line": v_line,
        "vuf_pct": vuf_pct(v_line),
        "line_deviation_pct": line_dev,
        "phase_deviation_pct": np.where(has_neutral, deviation_rate_pct(np.abs(v_phase)), np.nan),
        "motor_derating": nema_derating(line_dev),
    }
