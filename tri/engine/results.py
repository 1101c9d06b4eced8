"""Frozen result objects of the engine.

:class:`PanelAnalysis` is what the report, the UI and the rebalancer read for
one panel: plain Python numbers and tuples, no arrays, so it renders to JSON
directly. :class:`BatchAnalysis` holds the same figures as numpy arrays with
leading batch dimensions; ``BatchAnalysis.panel(i)`` gives one panel's
:class:`PanelAnalysis`. Angles are degrees here (the edge of the engine).
"""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass
from typing import Literal

import numpy as np

Level = Literal["info", "warning", "limit"]


@dataclass(frozen=True)
class Phasor:
    """A phasor in polar form.

    Attributes
    ----------
    magnitude : float
        RMS magnitude [A or V].
    deg : float
        Angle, A-B-C sequence with ``V_A`` at 0° [deg], in (−180, 180].
    """

    magnitude: float
    deg: float

    @classmethod
    def of(cls, value: complex) -> Phasor:
        """Polar form of a complex phasor [A or V]."""
        value = complex(value)
        return cls(abs(value), math.degrees(cmath.phase(value)) if value != 0 else 0.0)

    @property
    def complex(self) -> complex:
        """Rectangular form [A or V]."""
        return cmath.rect(self.magnitude, math.radians(self.deg))


@dataclass(frozen=True)
class Finding:
    """One observation about the panel.

    Attributes
    ----------
    level : {"info", "warning", "limit"}
        ``limit``: a rating or published limit is exceeded; ``warning``: near
        one, or a rule applies; ``info``: context.
    message : str
        Plain sentence, using the panel's phase labels.
    source : str
        Where the rule comes from (code section, standard, or "common
        practice"), with the reminder that local code governs.
    """

    level: Level
    message: str
    source: str


@dataclass(frozen=True)
class PhaseResult:
    """Figures for one phase (line) of the panel.

    Attributes
    ----------
    label : str
        Phase label (from ``phase_labels``).
    va : float
        Connected apparent power the schedule attributes to the phase: all of
        each 1-pole circuit, half of each 2-pole, a third of each 3-pole [VA].
    current : Phasor
        Fundamental line current [A, deg].
    rms_a : float
        True-RMS line current including harmonics [A].
    thd_pct : float
        Current THD, percent of the fundamental [%].
    loading_pct : float
        ``rms_a`` / main rating (bus rating without a main) [%].
    design_a : float
        RMS line current with continuous loads counted at the continuous
        factor (the sizing check) [A].
    design_loading_pct : float
        ``design_a`` / main rating [%].
    calculated_a : float
        The code's calculated load on the phase: the scheduled noncontinuous
        load plus the continuous factor times the scheduled continuous load,
        added as panel schedules add it (all of each 1-pole circuit's VA,
        half of each 2-pole's, a third of each 3-pole's, over ``V_LN``) [A].
        For 1- and 3-pole circuits that is their line current; for a 2-pole
        circuit ``I·V_LL/(2·V_LN)``. Harmonics and ``--iterate`` do not
        change it (see :func:`tri.engine.loading.calculated_load_a`).
    calculated_pct : float
        ``calculated_a`` / main rating (bus without a main) [%].
    harmonic_a : tuple of float
        Magnitude at each order of ``PanelAnalysis.orders`` [A].
    """

    label: str
    va: float
    current: Phasor
    rms_a: float
    thd_pct: float
    loading_pct: float
    design_a: float
    design_loading_pct: float
    calculated_a: float
    calculated_pct: float
    harmonic_a: tuple[float, ...]

    @property
    def current_a(self) -> float:
        """Fundamental magnitude [A]."""
        return self.current.magnitude

    @property
    def current_deg(self) -> float:
        """Fundamental angle [deg]."""
        return self.current.deg


@dataclass(frozen=True)
class NeutralResult:
    """Neutral conductor figures.

    Attributes
    ----------
    present : bool
        False on a 3-wire system (all figures are then 0 and loading None).
    current : Phasor
        Fundamental neutral current ``I_A + I_B + I_C`` of the
        line-to-neutral loads (``= 3·I_0``) [A, deg].
    rms_a : float
        True-RMS neutral current including harmonics [A].
    rating_a : float or None
        Neutral rating used [A].
    loading_pct : float or None
        ``rms_a / rating_a`` [%].
    ratio_to_max_phase : float
        ``rms_a`` / the largest phase ``rms_a`` [-] (0 with no load).
    harmonic_a : tuple of float
        Magnitude at each order of ``PanelAnalysis.orders`` [A].
    calculated_a : float or None
        The neutral load of the code's calculation: the maximum unbalanced
        load, the largest scheduled line-to-neutral load on any one phase,
        at 100 % (NEC 220.61) [A]; None on a 3-wire system.
    """

    present: bool
    current: Phasor
    rms_a: float
    rating_a: float | None
    loading_pct: float | None
    ratio_to_max_phase: float
    harmonic_a: tuple[float, ...]
    calculated_a: float | None = None

    @property
    def current_a(self) -> float:
        """Fundamental magnitude [A]."""
        return self.current.magnitude

    @property
    def current_deg(self) -> float:
        """Fundamental angle [deg]."""
        return self.current.deg


@dataclass(frozen=True)
class SequenceResult:
    """Symmetrical components of the fundamental line currents, phase A reference.

    Attributes
    ----------
    i0, i1, i2 : Phasor
        Zero, positive and negative sequence currents [A, deg].
    """

    i0: Phasor
    i1: Phasor
    i2: Phasor


@dataclass(frozen=True)
class CurrentUnbalance:
    """Current unbalance figures.

    Attributes
    ----------
    negative_sequence_pct : float
        ``|I_2| / |I_1|`` of the fundamental [%].
    zero_sequence_pct : float
        ``|I_0| / |I_1|`` of the fundamental [%].
    max_deviation_pct : float
        Largest deviation of a phase's RMS current from the mean of the three,
        percent of the mean (what a clamp meter shows) [%].
    max_deviation_fundamental_pct : float
        The same on the fundamental magnitudes [%].
    max_minus_min_pct : float
        ``(max − min) / mean`` of the phase RMS currents, the figure many
        meters show (about twice the deviation from the mean) [%].
    """

    negative_sequence_pct: float
    zero_sequence_pct: float
    max_deviation_pct: float
    max_deviation_fundamental_pct: float
    max_minus_min_pct: float = 0.0


@dataclass(frozen=True)
class VoltageResult:
    """Fundamental voltages at the panel (only when a supply is described).

    Attributes
    ----------
    phase_v : tuple of 3 Phasor
        Phase-to-neutral voltages in phase order [V, deg] (to the source
        neutral on a 3-wire system).
    line_v : tuple of 3 Phasor
        ``V_AB, V_BC, V_CA`` (by label: first-second, second-third,
        third-first) [V, deg].
    vuf_pct : float
        ``|V_2| / |V_1|`` of the line voltages (IEC 61000-4-30) [%].
    line_deviation_pct : float
        Max deviation of line-voltage magnitudes from their mean / mean
        (NEMA MG 1 percent unbalance) [%].
    phase_deviation_pct : float or None
        The same on phase-to-neutral magnitudes [%]; None without a neutral.
    motor_derating : float or None
        NEMA MG 1 derating factor at ``line_deviation_pct`` [-]; None above
        5 % (operation not recommended).
    drop_pct : tuple of 3 float
        ``(V_LN,nominal − |V_p|) / V_LN,nominal`` per phase [%].
    z_phase_ohm, z_neutral_ohm : complex
        Supply impedance of a phase path and of the neutral path [Ω].
    transformer_full_load_a : float
        Transformer rated secondary current [A].
    iterated : bool
        True if loads were iterated as constant power at the panel voltage.
    iterations : int
        Iterations used (0 when not iterated).
    converged : bool
        False if the iteration hit its limit.
    """

    phase_v: tuple[Phasor, Phasor, Phasor]
    line_v: tuple[Phasor, Phasor, Phasor]
    vuf_pct: float
    line_deviation_pct: float
    phase_deviation_pct: float | None
    motor_derating: float | None
    drop_pct: tuple[float, float, float]
    z_phase_ohm: complex
    z_neutral_ohm: complex
    transformer_full_load_a: float
    iterated: bool
    iterations: int
    converged: bool


@dataclass(frozen=True)
class PhaseReading:
    """Measured against computed current of one phase.

    Attributes
    ----------
    label : str
        Phase label.
    measured_a : float or None
        Measured true-RMS current [A].
    computed_rms_a : float
        Computed true-RMS current [A].
    difference_pct : float or None
        ``(measured − computed) / computed`` [%]; None if not measured or
        nothing computed.
    """

    label: str
    measured_a: float | None
    computed_rms_a: float
    difference_pct: float | None


@dataclass(frozen=True)
class ReadingsComparison:
    """What was measured on site, beside what the schedule predicts.

    Attributes
    ----------
    phases : tuple of 3 PhaseReading
        Per-phase currents.
    neutral_measured_a : float or None
        Measured neutral current [A].
    neutral_computed_fundamental_a : float
        Computed fundamental neutral current [A].
    neutral_computed_rms_a : float
        Computed true-RMS neutral current [A].
    volts_ll : tuple of 3 (float or None)
        Measured line voltages AB, BC, CA [V].
    vuf_pct : float or None
        VUF from the three measured line magnitudes by the β formula
        (IEC 61000-4-30) [%].
    line_deviation_pct : float or None
        NEMA percent unbalance of the measured line voltages [%].
    motor_derating : float or None
        NEMA MG 1 derating at the measured unbalance [-].
    volts_ln : tuple of 3 (float or None)
        Measured phase-to-neutral voltages [V].
    phase_deviation_pct : float or None
        Deviation rate of the measured phase voltages [%].
    computed_vuf_pct : float or None
        VUF the supply model predicts, when a supply is described [%].
    """

    phases: tuple[PhaseReading, PhaseReading, PhaseReading]
    neutral_measured_a: float | None
    neutral_computed_fundamental_a: float
    neutral_computed_rms_a: float
    volts_ll: tuple[float | None, float | None, float | None]
    vuf_pct: float | None
    line_deviation_pct: float | None
    motor_derating: float | None
    volts_ln: tuple[float | None, float | None, float | None]
    phase_deviation_pct: float | None
    computed_vuf_pct: float | None


@dataclass(frozen=True)
class BreakerCurrents:
    """Line currents one breaker carries (its legs summed), per phase in phase order.

    Attributes
    ----------
    current : tuple of 3 Phasor
        Fundamental line current on each phase [A, deg]; 0 on a phase the
        breaker does not touch.
    rms_a : tuple of 3 float
        True-RMS line current on each phase [A].
    leg_current_a : tuple of float
        Fundamental current of each of the breaker's rows (its legs), in
        input order [A].
    leg_rms_a : tuple of float
        True-RMS current of each leg [A].
    """

    current: tuple[Phasor, Phasor, Phasor]
    rms_a: tuple[float, float, float]
    leg_current_a: tuple[float, ...] = ()
    leg_rms_a: tuple[float, ...] = ()

    @property
    def max_current_a(self) -> float:
        """Largest fundamental line current over the phases [A]."""
        return max(p.magnitude for p in self.current)

    @property
    def max_rms_a(self) -> float:
        """Largest true-RMS line current over the phases [A]."""
        return max(self.rms_a)


@dataclass(frozen=True)
class SharedNeutralResult:
    """Current in one neutral conductor shared by a group of legs.

    Attributes
    ----------
    current : Phasor
        Fundamental: the phasor sum of the legs' currents [A, deg].
    rms_a : float
        True RMS over every order [A].
    harmonic_a : tuple of float
        Magnitude at each order of ``PanelAnalysis.orders`` [A].
    """

    current: Phasor
    rms_a: float
    harmonic_a: tuple[float, ...]

    @property
    def current_a(self) -> float:
        """Fundamental magnitude [A]."""
        return self.current.magnitude


@dataclass(frozen=True)
class PanelAnalysis:
    """Everything the engine computes for one panel.

    Attributes
    ----------
    phase_labels : tuple of 3 str
        Labels used in ``phases`` and in messages.
    v_ll : float
        Nominal line-to-line voltage [V].
    v_ln : float or None
        Nominal line-to-neutral voltage [V]; None on a 3-wire system.
    frequency_hz : float
        System frequency [Hz].
    currents_basis : str
        ``"nominal voltage"`` (the schedule convention) or ``"panel voltage
        (iterated constant power)"``.
    orders : tuple of int
        Orders of every ``harmonic_a`` tuple; ``orders[0] == 1``.
    rating_a : float
        Rating the phase loading is judged against (main, else bus) [A].
    continuous_factor : float
        Multiplier on continuous loads in ``design_a`` [-].
    phases : tuple of 3 PhaseResult
        Per-phase figures in phase order.
    neutral : NeutralResult
    sequence : SequenceResult
    current_unbalance : CurrentUnbalance
    voltage : VoltageResult or None
        None without a supply description.
    readings : ReadingsComparison or None
        None without readings.
    findings : tuple of Finding
    circuit_current_a : tuple of float
        Fundamental line current of each circuit row, in input order [A]
        (0 for unplaced rows).
    circuit_rms_a : tuple of float
        True-RMS line current of each circuit row [A] (3-pole rows without
        triplens).
    nonlinear_share_pct : float
        Share of the placed connected VA on circuits with a harmonic profile
        [%].
    unplaced_count : int
        Circuit rows not on any phase (left out of every figure).
    breakers : tuple of BreakerCurrents
        Per breaker number (``CircuitArrays.breaker``), when the input gave
        them; empty otherwise.
    shared_neutrals : tuple of SharedNeutralResult
        Per shared neutral (``CircuitArrays.neutral_group``); empty when
        none was given.
    nonlinear_ln_share_pct : float
        Share of the placed connected VA on line-to-neutral circuits with a
        harmonic profile [%]: the non-linear load whose harmonics reach the
        neutral (a 3-wire load's cannot).
    circuit_calculated_a : tuple of float
        Each circuit's calculated load: its scheduled line current at nominal
        voltage, times the continuous factor when continuous [A] (0 for
        unplaced rows).
    """

    phase_labels: tuple[str, str, str]
    v_ll: float
    v_ln: float | None
    frequency_hz: float
    currents_basis: str
    orders: tuple[int, ...]
    rating_a: float
    continuous_factor: float
    phases: tuple[PhaseResult, PhaseResult, PhaseResult]
    neutral: NeutralResult
    sequence: SequenceResult
    current_unbalance: CurrentUnbalance
    voltage: VoltageResult | None
    readings: ReadingsComparison | None
    findings: tuple[Finding, ...]
    circuit_current_a: tuple[float, ...]
    circuit_rms_a: tuple[float, ...]
    nonlinear_share_pct: float
    unplaced_count: int
    breakers: tuple[BreakerCurrents, ...] = ()
    shared_neutrals: tuple[SharedNeutralResult, ...] = ()
    nonlinear_ln_share_pct: float = 0.0
    circuit_calculated_a: tuple[float, ...] = ()

    def phase(self, label: str) -> PhaseResult:
        """The phase with this label.

        Parameters
        ----------
        label : str
            One of ``phase_labels``.

        Returns
        -------
        PhaseResult
        """
        return self.phases[self.phase_labels.index(label)]


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
