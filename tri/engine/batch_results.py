"""The numeric figures of many panels as arrays: :class:`BatchAnalysis`, what
:func:`tri.engine.analysis.analyse_batch` and the building roll-up return
before :func:`tri.engine.describe.describe_panel` makes one panel's plain
:class:`~tri.engine.results.PanelAnalysis`."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True, eq=False)
class BatchAnalysis:
    """The numeric figures of many panels as arrays (leading shape ``B``).

    Attributes
    ----------
    orders : int ndarray, shape (H,)
        Orders, ``orders[0] == 1``.
    phase_va : ndarray, shape (B..., 3)
        Schedule VA per phase [VA].
    phase_spectrum : complex ndarray, shape (B..., 3, H)
        Line current at each order [A].
    phase_rms_a, phase_thd_pct, phase_loading_pct : ndarray, shape (B..., 3)
        [A], [%], [%].
    phase_design_a, phase_design_loading_pct : ndarray, shape (B..., 3)
        With continuous loads at the continuous factor [A], [%].
    phase_calculated_a, phase_calculated_pct : ndarray, shape (B..., 3)
        The code's calculated load per phase (``PhaseResult.calculated_a``)
        [A], [%].
    neutral_spectrum : complex ndarray, shape (B..., H)
        Neutral current at each order [A].
    neutral_rms_a : ndarray, shape (B...)
        [A].
    neutral_loading_pct : ndarray, shape (B...)
        [%] (0 on a 3-wire system).
    sequence : complex ndarray, shape (B..., 3)
        ``I_0, I_1, I_2`` of the fundamental [A].
    negative_sequence_pct, zero_sequence_pct : ndarray, shape (B...)
        [%].
    max_deviation_pct, max_deviation_fundamental_pct : ndarray, shape (B...)
        On RMS and on fundamental magnitudes [%].
    circuit_current_a, circuit_rms_a : ndarray, shape (B..., n)
        Per circuit row [A].
    nonlinear_share_pct : ndarray, shape (B...)
        [%].
    unplaced_count : int ndarray, shape (B...)
    three_pole_triplens : bool ndarray, shape (B...)
        True where a 3-pole circuit's profile had triplen orders (removed).
    neutral_calculated_a : ndarray, shape (B...)
        Maximum unbalanced load (``NeutralResult.calculated_a``) [A].
    circuit_calculated_a : ndarray, shape (B..., n)
        Per circuit row, continuous ones at the factor [A].
    nonlinear_ln_share_pct, max_minus_min_pct : ndarray, shape (B...)
        [%], [%].
    v_phase, v_line : complex ndarray, shape (B..., 3) or None
        Panel voltages [V]; None without a supply.
    vuf_pct, line_deviation_pct, phase_deviation_pct, motor_derating : ndarray or None
        Shape (B...); [%], [%], [%] (NaN without a neutral), [-] (NaN above 5 %).
    iterations : int ndarray or None
    converged : bool ndarray or None
    breaker_pole_spectrum : complex ndarray, shape (B..., nb, 3, H), or None
        Line current of each breaker on each phase at each order [A]; None
        unless the input numbered breakers (:mod:`tri.engine.legs`).
    shared_neutral_spectrum : complex ndarray, shape (B..., G, H), or None
        Current in each shared neutral at each order [A]; None unless the
        input gave neutral groups.
    """

    orders: np.ndarray
    phase_va: np.ndarray
    phase_spectrum: np.ndarray
    phase_rms_a: np.ndarray
    phase_thd_pct: np.ndarray
    phase_loading_pct: np.ndarray
    phase_design_a: np.ndarray
    phase_design_loading_pct: np.ndarray
    neutral_spectrum: np.ndarray
    neutral_rms_a: np.ndarray
    neutral_loading_pct: np.ndarray
    sequence: np.ndarray
    negative_sequence_pct: np.ndarray
    zero_sequence_pct: np.ndarray
    max_deviation_pct: np.ndarray
    max_deviation_fundamental_pct: np.ndarray
    circuit_current_a: np.ndarray
    circuit_rms_a: np.ndarray
    nonlinear_share_pct: np.ndarray
    unplaced_count: np.ndarray
    three_pole_triplens: np.ndarray
    phase_calculated_a: np.ndarray
    phase_calculated_pct: np.ndarray
    neutral_calculated_a: np.ndarray
    circuit_calculated_a: np.ndarray
    nonlinear_ln_share_pct: np.ndarray
    max_minus_min_pct: np.ndarray
    v_phase: np.ndarray | None = None
    v_line: np.ndarray | None = None
    vuf_pct: np.ndarray | None = None
    line_deviation_pct: np.ndarray | None = None
    phase_deviation_pct: np.ndarray | None = None
    motor_derating: np.ndarray | None = None
    iterations: np.ndarray | None = None
    converged: np.ndarray | None = None
    breaker_pole_spectrum: np.ndarray | None = None
    shared_neutral_spectrum: np.ndarray | None = None

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Leading shape ``B``."""
        return tuple(np.shape(self.neutral_rms_a))

    def take(self, index: int | tuple[int, ...]) -> BatchAnalysis:
        """The figures of one panel.

        Parameters
        ----------
        index : int or tuple of int
            Position in the batch shape ``B``.

        Returns
        -------
        BatchAnalysis
            The same fields without the batch dimensions (``orders`` shared).
        """
        idx = index if isinstance(index, tuple) else (index,)
        values = {}
        for name in self.__dataclass_fields__:
            value = getattr(self, name)
            if name == "orders" or value is None:
                values[name] = value
            else:
                values[name] = np.asarray(value)[idx]
        return BatchAnalysis(**values)
