"""Frozen result objects of the engine: one panel's analysis and its parts.

:class:`PanelAnalysis` is what the report, the UI and the rebalancer read for
one panel: plain Python numbers and tuples, no arrays, so it renders to JSON
directly. Its per-phase, neutral, sequence, unbalance and voltage parts live
here; the readings comparison (:mod:`tri.engine.reading_results`), the
wiring results (:mod:`tri.engine.wiring_results`) and the basic values
(:mod:`tri.engine.result_basics`) in their own modules, re-exported here.
:class:`BatchAnalysis` (:mod:`tri.engine.batch_results`) holds the same
figures as numpy arrays with leading batch dimensions;
``BatchAnalysis.take(i)`` gives one panel's arrays and
:func:`tri.engine.describe.describe_panel` its :class:`PanelAnalysis`.
Angles are degrees here (the edge of the engine).
"""

from __future__ import annotations

from dataclasses import dataclass

from tri.engine.batch_results import BatchAnalysis
from tri.engine.reading_results import PhaseReading, ReadingsComparison
from tri.engine.result_basics import Finding, Level, Phasor
from tri.engine.wiring_results import BreakerCurrents, SharedNeutralResult

#: Re-exported: the rest of the code imports every result type from here.
__all__ = [
    "BatchAnalysis",
    "BreakerCurrents",
    "CurrentUnbalance",
    "Finding",
    "Level",
    "NeutralResult",
    "PanelAnalysis",
    "PhaseReading",
    "PhaseResult",
    "Phasor",
    "ReadingsComparison",
    "SequenceResult",
    "SharedNeutralResult",
    "VoltageResult",
]


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
