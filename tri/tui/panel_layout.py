"""Where every breaker sits on the physical panel, position by position (no textual).

Two-column panels: rows from the top, odd slots on the left and even on the
right, each position with its phase and the breaker occupying it (which of
its poles sits there). Rail boards: the circuits grouped by the phase they
take, a multi-pole circuit under each of its phases. Phases come from the
schedule's own slot geometry (:mod:`tri.schedule.slots`); nothing here
works them out a second time.
"""

from __future__ import annotations

from dataclasses import dataclass

from tri.schedule import slots as geometry
from tri.schedule.model import Circuit, Schedule


@dataclass(frozen=True)
class Position:
    """One position of the panel.

    Attributes
    ----------
    slot : int
        Slot number (two-column); 0 on a rail board.
    phase : int
        Phase index 0..2 of this position.
    circuit : int or None
        Index in ``schedule.circuits`` of the breaker here; ``None`` for a space.
    pole : int
        Which pole of that breaker sits here (1-based); 0 for a space.
    poles : int
        The breaker's pole count; 0 for a space.
    """

    slot: int
    phase: int
    circuit: int | None = None
    pole: int = 0
    poles: int = 0

    @property
    def is_space(self) -> bool:
        """True when no breaker sits here."""
        return self.circuit is None

    @property
    def continues(self) -> bool:
        """True on the second or third pole of a multi-pole breaker."""
        return self.pole > 1


def position_phase(schedule: Schedule, slot: int) -> int:
    """Phase index of ``slot``, as the schedule's slot geometry gives it for this panel.

    The right column's order counts: on a ``right_column = "CBA"`` panel the
    even slots read C, B, A from the top.
    """
    return geometry.slot_phase(slot, schedule.panel.right_column)


def slot_owners(schedule: Schedule) -> dict[int, tuple[int, int]]:
    """Slot -> (circuit index, pole number) for every pole of every placed breaker."""
    owners: dict[int, tuple[int, int]] = {}
    for i, c in enumerate(schedule.circuits):
        if c.slot is None:
            continue
        for k, s in enumerate(geometry.occupied_slots(c.slot, c.poles), start=1):
            owners.setdefault(s, (i, k))
    return owners


def position(schedule: Schedule, slot: int, owners: dict[int, tuple[int, int]]) -> Position:
    """The position ``slot`` of a two-column panel."""
    phase = position_phase(schedule, slot)
    if slot not in owners:
        return Position(slot, phase)
    i, k = owners[slot]
    return Position(slot, phase, i, k, schedule.circuits[i].poles)


def two_column_rows(schedule: Schedule) -> list[tuple[Position, Position | None]]:
    """Rows of a two-column panel from the top: (left, right); right is None past the last space."""
    owners = slot_owners(schedule)
    spaces = schedule.panel.spaces
    rows = []
    for row in range(1, (spaces + 1) // 2 + 1):
        left = position(schedule, 2 * row - 1, owners)
        right = position(schedule, 2 * row, owners) if 2 * row <= spaces else None
        rows.append((left, right))
    return rows


def rail_groups(schedule: Schedule) -> list[tuple[int, list[Position]]]:
    """For each phase 0..2, the circuits on it (a 2-pole circuit appears under both phases)."""
    groups: list[tuple[int, list[Position]]] = [(p, []) for p in range(3)]
    for i, c in enumerate(schedule.circuits):
        if c.phases is None:
            continue
        for k, p in enumerate(c.phases, start=1):
            groups[p][1].append(Position(0, p, i, k, c.poles))
    return groups


def unplaced(schedule: Schedule) -> list[int]:
    """Indices of the circuits not on the panel yet (new circuits)."""
    return [i for i, c in enumerate(schedule.circuits) if not c.is_placed]


def rail_target(circuit: Circuit, phase: int) -> tuple[int, ...] | None:
    """Phases a rail-board circuit takes when its first pole goes to ``phase``.

    A 1-pole circuit takes that phase; a 2-pole circuit that phase and the
    next one in the sequence (L1-L2, L2-L3, L3-L1); a 3-pole circuit takes
    every phase wherever it is, so it has no other place (``None``).
    """
    if circuit.poles == 1:
        return (phase,)
    if circuit.poles == 2:
        return (phase, (phase + 1) % 3)
    return None


def is_spare(circuit: Circuit) -> bool:
    """True for a breaker installed with nothing connected (the ``spare`` key)."""
    return bool(getattr(circuit, "spare", False))
