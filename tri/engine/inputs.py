"""Plain-data inputs to the engine.

This module is the contract between the schedule layer (which reads files)
and the engine (which computes). Everything here is plain numbers and numpy
arrays; nothing here knows about TOML, slots or labels.

Phase indices are 0, 1, 2 for the phases labelled A, B, C (or L1, L2, L3),
in positive sequence A-B-C with ``V_A`` at 0 deg.

Arrays may carry leading batch dimensions: a single panel has shape ``(n,)``
per-circuit arrays; a batch of panels has ``(b, n)`` (shorter panels padded
with ``connection == UNPLACED`` rows, which contribute nothing).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

#: Connection codes of a circuit (``CircuitArrays.connection``).
UNPLACED = 0  #: not on any phase yet (new circuit); contributes nothing
LINE_TO_NEUTRAL = 1  #: 1-pole, phase ``phase_p`` to neutral
LINE_TO_LINE = 2  #: 2-pole, phases ``phase_p`` and ``phase_q`` (current p -> q)
THREE_PHASE = 3  #: 3-pole balanced, no neutral


@dataclass(frozen=True)
class SystemVoltages:
    """Nominal voltages of the supply system.

    Attributes
    ----------
    v_ll : float
        Nominal line-to-line voltage [V].
    v_ln : float or None
        Nominal line-to-neutral voltage [V]; ``None`` on a 3-wire system with
        no neutral (line-to-neutral circuits are then impossible).
    frequency_hz : float
        System frequency [Hz].
    high_leg : int or None
        On a high-leg delta (240/120 V, 4-wire, centre-tapped winding): the
        phase index (1 = B or 2 = C) of the high leg, whose voltage to
        neutral is ``sqrt(3)/2·v_ll``; ``v_ln`` is then half the winding
        (120 V). ``None`` on a wye or 3-wire system. See
        :mod:`tri.engine.high_leg`.
    """

    v_ll: float
    v_ln: float | None
    frequency_hz: float = 60.0
    high_leg: int | None = None

    @property
    def has_neutral(self) -> bool:
        """True on a 4-wire system."""
        return self.v_ln is not None

    @property
    def v_ln_or_derived(self) -> float:
        """Line-to-neutral voltage [V], ``v_ll / sqrt(3)`` on a 3-wire system."""
        return self.v_ln if self.v_ln is not None else self.v_ll / np.sqrt(3.0)


@dataclass(frozen=True, eq=False)
class CircuitArrays:
    """Every circuit of one panel (or a batch of panels) as parallel arrays.

    Attributes
    ----------
    s_va : complex ndarray, shape (..., n)
        Complex power ``S = P + jQ`` of each circuit, whole circuit [VA];
        ``Q > 0`` lagging, ``Q < 0`` leading.
    connection : int ndarray, shape (..., n)
        One of ``UNPLACED``, ``LINE_TO_NEUTRAL``, ``LINE_TO_LINE``, ``THREE_PHASE``.
    phase_p : int ndarray, shape (..., n)
        First (or only) phase index 0..2. Ignored for ``THREE_PHASE``/``UNPLACED``.
    phase_q : int ndarray, shape (..., n)
        Second phase index 0..2 of a line-to-line circuit (``I_pq`` leaves by q);
        equal to ``phase_p`` otherwise.
    harmonics : complex ndarray, shape (..., n, h)
        Harmonic current of each circuit at each order of ``orders``, relative
        to the circuit's fundamental current: ``m_h * exp(j * delta_h)``
        [per unit of fundamental, angle in rad].
    orders : int ndarray, shape (h,)
        Harmonic orders (all > 1) that the columns of ``harmonics`` refer to.
    continuous : bool ndarray, shape (..., n)
        True for continuous loads (3 h or more), counted at the continuous
        factor in the sizing check.
    breaker : int ndarray, shape (..., n), optional
        Breaker of each row, 0..nb-1: rows with the same number are the legs
        of one breaker (a breaker with a neutral and one load per leg, or a
        3-pole breaker with three line-to-line loads). When given, the
        analysis adds each breaker's line currents on every phase
        (:mod:`tri.engine.legs`). ``None``: every row its own breaker.
    neutral_group : int ndarray, shape (..., n), optional
        Neutral conductor of each line-to-neutral row, 0..G-1, or -1 for the
        panel neutral alone: rows with the same number share one neutral
        conductor (a multi-wire branch circuit), whose current the analysis
        adds at every order. ``None``: no shared neutrals.
    breaker_a : float ndarray, shape (..., n)
        Rating of each circuit's breaker [A]; NaN where none is given (the
        circuit is then not checked against its breaker). The legs of one
        breaker carry the same rating.
    """

    s_va: np.ndarray
    connection: np.ndarray
    phase_p: np.ndarray
    phase_q: np.ndarray
    harmonics: np.ndarray
    orders: np.ndarray
    continuous: np.ndarray = field(default=None)  # type: ignore[arg-type]  # set in __post_init__
    breaker: np.ndarray | None = None
    neutral_group: np.ndarray | None = None
    breaker_a: np.ndarray = field(default=None)  # type: ignore[arg-type]  # set in __post_init__

    def __post_init__(self) -> None:
        if self.continuous is None:
            object.__setattr__(self, "continuous", np.zeros(np.shape(self.s_va), dtype=bool))
        if self.breaker_a is None:
            object.__setattr__(self, "breaker_a", np.full(np.shape(self.s_va), np.nan))

    @property
    def n_circuits(self) -> int:
        """Number of circuit rows (last axis)."""
        return int(np.shape(self.s_va)[-1])


@dataclass(frozen=True)
class Ratings:
    """Ratings the loading is judged against.

    Attributes
    ----------
    bus_a : float
        Bus rating [A].
    main_a : float or None
        Main breaker rating [A]; ``None`` for main-lug-only panels (the bus
        rating is then used).
    neutral_a : float or None
        Neutral rating [A]; ``None`` means equal to the bus rating.
    continuous_factor : float
        Multiplier on continuous loads for the sizing check [-]; 1.25 is
        common North American practice (NEC 210.20(A), 215.2(A), from memory).
    """

    bus_a: float
    main_a: float | None = None
    neutral_a: float | None = None
    continuous_factor: float = 1.25


@dataclass(frozen=True)
class SupplyImpedance:
    """Source behind the panel: a transformer and a feeder.

    Attributes
    ----------
    transformer_kva : float
        Transformer rating, three-phase [kVA].
    transformer_z_pct : float
        Percent impedance on the transformer's own base [%].
    transformer_x_r : float
        X/R ratio of the transformer impedance [-].
    feeder_length_m : float
        One-way feeder length from transformer to panel [m].
    feeder_r_ohm_per_km, feeder_x_ohm_per_km : float
        Phase conductor resistance and reactance [ohm/km].
    neutral_r_ohm_per_km, neutral_x_ohm_per_km : float
        Neutral conductor resistance and reactance [ohm/km].
    """

    transformer_kva: float
    transformer_z_pct: float
    transformer_x_r: float
    feeder_length_m: float = 0.0
    feeder_r_ohm_per_km: float = 0.0
    feeder_x_ohm_per_km: float = 0.0
    neutral_r_ohm_per_km: float = 0.0
    neutral_x_ohm_per_km: float = 0.0


@dataclass(frozen=True)
class MeasuredReadings:
    """What was measured on site (any value may be missing).

    Attributes
    ----------
    phase_amps : tuple of 3 (float or None)
        True-RMS phase currents in phase order [A].
    neutral_amps : float or None
        True-RMS neutral current [A].
    volts_ll : tuple of 3 (float or None)
        Line-to-line voltage magnitudes, order AB, BC, CA [V].
    volts_ln : tuple of 3 (float or None)
        Line-to-neutral voltage magnitudes in phase order [V].
    """

    phase_amps: tuple[float | None, float | None, float | None] = (None, None, None)
    neutral_amps: float | None = None
    volts_ll: tuple[float | None, float | None, float | None] = (None, None, None)
    volts_ln: tuple[float | None, float | None, float | None] = (None, None, None)
