"""One circuit of a panel schedule: :class:`Circuit` (frozen), its load as
written (VA, W or A; :data:`LOAD_KEYS`), its placement (slot or phases),
wiring (legs, shared neutral, RCD), use factors and feed, with the power it
draws on a given supply system. The schedule around it is
:mod:`tri.schedule.model`."""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Literal

from tri.schedule.feeds import Feed
from tri.schedule.slots import slot_phases
from tri.schedule.systems import SupplySystem

LoadKind = Literal["va", "w", "a"]


LOAD_KEYS: dict[str, LoadKind] = {"load_va": "va", "load_w": "w", "load_a": "a"}


@dataclass(frozen=True)
class Circuit:
    """One ``[[circuit]]`` entry.

    Attributes
    ----------
    name : str
        Purpose of the circuit, as in the panel directory.
    poles : int
        1 (line-to-neutral), 2 (line-to-line) or 3 (three-phase).
    slot : int or None
        First slot of the breaker (two-column panels); ``None`` otherwise.
    phases : tuple of int or None
        Phase indices 0..2 it connects to, in pole order; ``None`` when the
        circuit is not placed yet (a new circuit).
    load_kind : {"va", "w", "a"}
        How the load was given: apparent power, real power, or line current.
    load_value : float
        The load in the unit of ``load_kind`` [VA], [W] or [A].
    pf : float
        Displacement power factor, 0 < pf <= 1 [-].
    leading : bool
        True when the power factor is leading (capacitive).
    profile : str
        Harmonic profile name (built-in or user).
    continuous : bool
        Continuous load (3 h or more).
    locked : bool
        The rebalancer must not move it.
    breaker_a : float or None
        Breaker rating [A].
    note : str
        Free text.
    neutral : bool
        A 2- or 3-pole breaker with a neutral: one line-to-neutral load per
        leg (a multi-wire branch circuit or an unbalanced wye load).
    leg_values : tuple of float or None
        One load per leg in pole order, in the unit of ``load_kind``; for a
        3-pole breaker without a neutral the line-to-line loads between
        poles 1-2, 2-3 and 3-1 (a delta load). ``None``: one value,
        ``load_value`` (the same on each leg of a breaker with a neutral).
    shared_neutral : str or None
        Name of the neutral conductor this 1-pole circuit shares with others.
    handle_tied : bool
        This 1-pole breaker's handle is tied to the others of its
        shared-neutral group (or they trip in common).
    spare : bool
        A breaker installed with nothing connected (no load).
    rcd : str or None
        Name of the ``[[rcd]]`` the circuit sits behind (rail boards).
    use : tuple of (str, float)
        Share of the load in each named scenario [-] (``use = { day = 0.2 }``);
        empty: 1.0 in every scenario (see :mod:`tri.schedule.use_factors`).
    source_index : int or None
        Position of the circuit's table in the file it was loaded from; lets
        saving update that table in place. Not part of equality.
    feed : Feed or None
        For a feeder circuit: the panel it feeds, the feeder conductors and
        any transformer (its load is that panel's; ``load_value`` is 0).
    """

    name: str
    poles: int = 1
    slot: int | None = None
    phases: tuple[int, ...] | None = None
    load_kind: LoadKind = "va"
    load_value: float = 0.0
    pf: float = 1.0
    leading: bool = False
    profile: str = "linear"
    continuous: bool = False
    locked: bool = False
    breaker_a: float | None = None
    note: str = ""
    neutral: bool = False
    leg_values: tuple[float, ...] | None = None
    shared_neutral: str | None = None
    handle_tied: bool = False
    spare: bool = False
    rcd: str | None = None
    use: tuple[tuple[str, float], ...] = ()
    source_index: int | None = field(default=None, compare=False)
    feed: Feed | None = None

    @property
    def is_placed(self) -> bool:
        """True when the circuit is connected to phases."""
        return self.phases is not None

    @property
    def has_legs(self) -> bool:
        """True when the breaker carries one load per leg (a neutral, or per-leg values)."""
        return self.poles > 1 and (self.neutral or self.leg_values is not None)

    def leg_va(self, system: SupplySystem) -> tuple[float, ...]:
        """Apparent power |S| of each leg, in pole order [VA] (see ``leg_values``).

        A leg load in amperes is the current of that leg's element: ``I*V_LN``
        for a leg to neutral, ``I*V_LL`` for a line-to-line leg of a delta load.
        """
        values = self.leg_values if self.leg_values is not None else (self.load_value,) * self.poles
        v = system.circuit_voltage(1 if self.neutral else 2)
        return tuple(self._va_of(x, v) for x in values)

    def _va_of(self, value: float, volts: float) -> float:
        if self.load_kind == "va":
            return value
        if self.load_kind == "w":
            return value / self.pf
        return value * volts

    def apparent_power_va(self, system: SupplySystem) -> float:
        """Apparent power |S| of the whole circuit [VA].

        A load in amperes is the line current: ``|S| = I*V_LN`` for 1 pole,
        ``I*V_LL`` for 2 poles and ``sqrt(3)*I*V_LL`` for 3 poles. A breaker
        with legs (:attr:`has_legs`) is the sum of its legs (:meth:`leg_va`).
        """
        if self.has_legs:
            return sum(self.leg_va(system))
        if self.load_kind == "va":
            return self.load_value
        if self.load_kind == "w":
            return self.load_value / self.pf
        v = system.circuit_voltage(self.poles)
        return self.load_value * v * (math.sqrt(3.0) if self.poles == 3 else 1.0)

    def complex_power_va(self, system: SupplySystem) -> complex:
        """Complex power ``S = P + jQ`` [VA], ``Q > 0`` lagging."""
        s = self.apparent_power_va(system)
        q_sign = -1.0 if self.leading else 1.0
        sin_phi = math.sqrt(max(0.0, 1.0 - self.pf * self.pf))
        return complex(s * self.pf, q_sign * s * sin_phi)

    def real_power_w(self, system: SupplySystem) -> float:
        """Real power P [W]."""
        return self.apparent_power_va(system) * self.pf

    def at_slot(self, slot: int | None) -> Circuit:
        """This circuit moved to ``slot`` of a two-column panel (``None`` = unplaced)."""
        if slot is None:
            return replace(self, slot=None, phases=None)
        return replace(self, slot=slot, phases=slot_phases(slot, self.poles))

    def on_phases(self, phases: tuple[int, ...] | None) -> Circuit:
        """This circuit connected to ``phases`` of a rail board (``None`` = unplaced)."""
        return replace(self, slot=None, phases=None if phases is None else tuple(phases))
