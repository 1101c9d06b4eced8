"""Frozen results of a panel's wiring: the line currents each breaker carries
(:class:`BreakerCurrents`) and the current in each shared neutral
(:class:`SharedNeutralResult`); computed by :mod:`tri.engine.legs`."""

from __future__ import annotations

from dataclasses import dataclass

from tri.engine.result_basics import Phasor


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
