"""Typed, immutable model of a panel schedule.

Every object here is a frozen dataclass. Edits produce new objects with
:func:`dataclasses.replace` or the ``with_*`` helpers; the file layer keeps
the TOML document beside the model so that saving keeps comments.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Literal

from tri.engine.inputs import SupplyImpedance
from tri.schedule.feeds import Feed
from tri.schedule.log_spec import LogSpec
from tri.schedule.slots import RIGHT_ABC, TWO_COLUMN, slot_phases
from tri.schedule.systems import SYSTEMS, SupplySystem

FORMAT_VERSION = 1
LoadKind = Literal["va", "w", "a"]
LOAD_KEYS: dict[str, LoadKind] = {"load_va": "va", "load_w": "w", "load_a": "a"}
DEFAULT_LABELS = ("A", "B", "C")


@dataclass(frozen=True)
class PanelInfo:
    """The ``[panel]`` table.

    Attributes
    ----------
    name : str
        Panel name as on its door.
    system : str
        Key of :data:`tri.schedule.systems.SYSTEMS`.
    frequency_hz : float
        System frequency [Hz].
    spaces : int
        Number of circuit positions (slots).
    bus_a : float
        Bus rating [A].
    main_a : float or None
        Main breaker rating [A]; ``None`` for main-lug-only.
    neutral_a : float or None
        Neutral rating [A]; ``None`` means equal to ``bus_a``.
    phase_labels : tuple of 3 str
        Labels of the phases, e.g. ``("A", "B", "C")`` or ``("L1", "L2", "L3")``.
    layout : str
        ``"two-column"`` (slots) or ``"phases"`` (each circuit names its phases).
    high_leg : int or None
        Phase index (1 = B, 2 = C) of the high leg on a high-leg delta
        (``240/120D``); ``None`` on every other system.
    right_column : str
        ``"ABC"`` or ``"CBA"``: the phase order of the right (even) column's
        rows from the top.
    fed_from : str or None
        Source marking for the directory, e.g. ``"MDP-1, circuit 7"``
        (NEC 408.4(B), from memory).
    max_row_shift : int or None
        How many rows a breaker may move before its conductors no longer
        reach; ``None``: no limit given.
    """

    name: str
    system: str
    frequency_hz: float
    spaces: int
    bus_a: float
    main_a: float | None = None
    neutral_a: float | None = None
    phase_labels: tuple[str, str, str] = DEFAULT_LABELS
    layout: str = TWO_COLUMN
    high_leg: int | None = None
    right_column: str = RIGHT_ABC
    fed_from: str | None = None
    max_row_shift: int | None = None

    @property
    def supply_system(self) -> SupplySystem:
        """The catalogue entry for ``system``."""
        return SYSTEMS[self.system]

    @property
    def effective_neutral_a(self) -> float:
        """Neutral rating [A], defaulting to the bus rating."""
        return self.bus_a if self.neutral_a is None else self.neutral_a

    @property
    def effective_high_leg(self) -> int | None:
        """Phase index of the high leg: ``high_leg``, else B (1) on a high-leg delta, else None."""
        if not self.supply_system.high_leg_delta:
            return None
        return 1 if self.high_leg is None else self.high_leg

    @property
    def uses_slots(self) -> bool:
        """True for two-column panels whose circuits sit in numbered slots."""
        return self.layout == TWO_COLUMN


#: The optional ``[supply]`` table: transformer and feeder behind the panel.
#: The file's keys are exactly the engine's input fields (kVA, %, -, m, ohm/km),
#: so the model uses the engine's frozen dataclass as it is.
Supply = SupplyImpedance


Triple = tuple[float | None, float | None, float | None]


@dataclass(frozen=True)
class Readings:
    """The optional ``[readings]`` table: what was measured on site.

    Attributes
    ----------
    phase_amps : tuple of 3
        True-RMS phase currents in phase order [A] (``None`` where not measured).
    neutral_amps : float or None
        True-RMS neutral current [A].
    volts_ll : tuple of 3
        Line-to-line voltages AB, BC, CA [V].
    volts_ln : tuple of 3
        Line-to-neutral voltages in phase order [V].
    taken : str or None
        When or by whom, free text (a TOML date is kept as its ISO text).
    """

    phase_amps: Triple = (None, None, None)
    neutral_amps: float | None = None
    volts_ll: Triple = (None, None, None)
    volts_ln: Triple = (None, None, None)
    taken: str | None = None

    @property
    def is_empty(self) -> bool:
        """True when nothing was measured."""
        values = (*self.phase_amps, self.neutral_amps, *self.volts_ll, *self.volts_ln)
        return all(v is None for v in values)


@dataclass(frozen=True)
class UserProfile:
    """A harmonic profile defined in the file under ``[profiles.NAME]``.

    Attributes
    ----------
    name : str
        Profile name used by circuits.
    harmonics : tuple of (int, float, float)
        ``(order, magnitude relative to the fundamental [pu], angle [deg])``.
    description : str
        Free text (for example where the spectrum came from).
    """

    name: str
    harmonics: tuple[tuple[int, float, float], ...]
    description: str = ""


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


@dataclass(frozen=True)
class Rcd:
    """One ``[[rcd]]`` table: a residual-current device ahead of a group of circuits.

    Attributes
    ----------
    name : str
        Name the circuits give in ``rcd``.
    poles : int
        2 (one phase and neutral) or 4 (three phases and neutral).
    phase : int or None
        Phase index of a 2-pole RCD; ``None`` for a 4-pole one.
    """

    name: str
    poles: int = 2
    phase: int | None = None


@dataclass(frozen=True)
class Schedule:
    """A whole panel schedule.

    ``circuits`` keep the order of the file; new circuits are appended.
    ``log`` is the ``[log]`` table (:mod:`tri.schedule.log_spec`), or ``None``.
    """

    panel: PanelInfo
    circuits: tuple[Circuit, ...] = ()
    supply: Supply | None = None
    readings: Readings | None = None
    profiles: tuple[UserProfile, ...] = ()
    format: int = FORMAT_VERSION
    rcds: tuple[Rcd, ...] = ()
    log: LogSpec | None = None

    @property
    def system(self) -> SupplySystem:
        """Supply-system catalogue entry of the panel."""
        return self.panel.supply_system

    @property
    def labels(self) -> tuple[str, str, str]:
        """Phase labels of the panel."""
        return self.panel.phase_labels

    def phase_text(self, phases: tuple[int, ...] | None) -> str:
        """Phases as label text, e.g. ``"A"``, ``"BC"``, ``"L1-L2"``; ``"-"`` if unplaced."""
        if phases is None:
            return "-"
        names = [self.labels[p] for p in phases]
        joiner = "-" if any(len(n) > 1 for n in names) else ""
        return joiner.join(names)

    def profile_map(self) -> dict[str, UserProfile]:
        """User profiles by name."""
        return {p.name: p for p in self.profiles}

    def placed(self, circuit: Circuit) -> Circuit:
        """``circuit`` with its phases worked out from its slot by this panel's geometry.

        :meth:`Circuit.at_slot` assumes a right column read A-B-C; on a
        ``right_column = "CBA"`` panel this gives the phases as built.
        """
        if not self.panel.uses_slots or circuit.slot is None:
            return circuit
        phases = slot_phases(circuit.slot, circuit.poles, self.panel.right_column)
        return circuit if phases == circuit.phases else replace(circuit, phases=phases)

    def with_circuit(self, index: int, circuit: Circuit) -> Schedule:
        """A copy with circuit ``index`` replaced (source position kept)."""
        old = self.circuits[index]
        new = self.placed(replace(circuit, source_index=old.source_index))
        return replace(self, circuits=(*self.circuits[:index], new, *self.circuits[index + 1 :]))

    def with_added(self, circuit: Circuit) -> Schedule:
        """A copy with ``circuit`` appended as a new circuit."""
        new = self.placed(replace(circuit, source_index=None))
        return replace(self, circuits=(*self.circuits, new))

    def without(self, index: int) -> Schedule:
        """A copy with circuit ``index`` removed."""
        return replace(self, circuits=self.circuits[:index] + self.circuits[index + 1 :])

    def circuit_at_slot(self, slot: int) -> int | None:
        """Index of the circuit whose breaker occupies ``slot``, or ``None``."""
        for i, c in enumerate(self.circuits):
            if c.slot is not None and slot in range(c.slot, c.slot + 2 * c.poles, 2):
                return i
        return None


def parse_phase_text(text: str, labels: tuple[str, str, str]) -> tuple[int, ...] | None:
    """Phase indices from text such as ``"A"``, ``"BC"``, ``"L1-L2"``, ``"l2 l3"``.

    Labels match case-insensitively, longest first; ``-``, ``,``, ``/`` and
    spaces separate. Returns ``None`` when the text is not made of labels.
    """
    rest = "".join(ch for ch in text.upper() if ch not in "-,/ _")
    if not rest:
        return None
    order = sorted(range(3), key=lambda i: -len(labels[i]))
    out: list[int] = []
    while rest:
        for i in order:
            lab = labels[i].upper()
            if lab and rest.startswith(lab):
                out.append(i)
                rest = rest[len(lab) :]
                break
        else:
            return None
    return tuple(out)
