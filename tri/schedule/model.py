"""Typed, immutable model of a panel schedule.

Every object here is a frozen dataclass. Edits produce new objects with
:func:`dataclasses.replace` or the ``with_*`` helpers; the file layer keeps
the TOML document beside the model so that saving keeps comments. The
circuit is :mod:`tri.schedule.circuit` (re-exported here).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from tri.engine.inputs import SupplyImpedance
from tri.schedule.circuit import LOAD_KEYS, Circuit, LoadKind
from tri.schedule.log_spec import LogSpec
from tri.schedule.slots import RIGHT_ABC, TWO_COLUMN, slot_phases
from tri.schedule.systems import SYSTEMS, SupplySystem

FORMAT_VERSION = 1
DEFAULT_LABELS = ("A", "B", "C")

#: Re-exported: the circuit (:mod:`tri.schedule.circuit`) is imported from here.
__all__ = [
    "DEFAULT_LABELS",
    "FORMAT_VERSION",
    "LOAD_KEYS",
    "Circuit",
    "LoadKind",
    "PanelInfo",
    "Rcd",
    "Readings",
    "Schedule",
    "Supply",
    "UserProfile",
    "parse_phase_text",
]


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
