"""Where a breaker sits and which phases it takes.

Two-column panels (layout ``"two-column"``): odd slots on the left, even on
the right, numbered from the top; slot ``n`` sits in row ``(n + 1) // 2`` and
the rows cycle A, B, C from the top (slots 1-2 on A, 3-4 on B, 5-6 on C,
7-8 on A ...). A 2-pole breaker in slot ``n`` also takes slot ``n + 2`` (the
next row of the same column), a 3-pole also ``n + 4`` [common practice].

Some panelboards read C-B-A down the right column (``[panel] right_column
= "CBA"``): the even slots then cycle C, B, A from the top while the odd
slots still cycle A, B, C.

Rail-mounted boards (layout ``"phases"``) have no slot geometry: each
circuit names its phases.
"""

from __future__ import annotations

from collections.abc import Iterable

TWO_COLUMN = "two-column"
PHASES = "phases"
LAYOUTS = (TWO_COLUMN, PHASES)
#: Phase orders the right (even) column may read from the top.
RIGHT_ABC = "ABC"
RIGHT_CBA = "CBA"
RIGHT_COLUMN_ORDERS = (RIGHT_ABC, RIGHT_CBA)


def slot_row(slot: int) -> int:
    """Row (1-based, from the top) of a slot in a two-column panel."""
    return (slot + 1) // 2


def slot_phase(slot: int, right_column: str = RIGHT_ABC) -> int:
    """Phase index 0..2 (A, B, C) of a slot in a two-column panel.

    With ``right_column = "CBA"`` the even slots read C, B, A from the top.
    """
    k = (slot_row(slot) - 1) % 3
    return 2 - k if right_column == RIGHT_CBA and slot % 2 == 0 else k


def slot_column(slot: int) -> str:
    """``"left"`` for odd slots, ``"right"`` for even slots."""
    return "left" if slot % 2 == 1 else "right"


def column_index(slot: int) -> int:
    """Column of a slot as a number: 0 left (odd slots), 1 right (even slots)."""
    return 0 if slot % 2 == 1 else 1


def column_rows(spaces: int, column: int) -> int:
    """Number of rows (slots) in a column (0 left, 1 right) of a panel of ``spaces`` slots."""
    return (spaces + 1) // 2 if column == 0 else spaces // 2


def slot_at(row: int, column: int) -> int:
    """Slot number of a row (1-based from the top) in a column (0 left, 1 right)."""
    return 2 * row - 1 if column == 0 else 2 * row


def slot_distance(a: int, b: int) -> int:
    """How far apart two slots are: rows between them, plus 3 when the columns differ [rows].

    A measure of how far a breaker's conductors must reach when it moves
    (the extra 3 rows stand for crossing the panel); used only to prefer
    near positions among equally good ones.
    """
    return abs(slot_row(a) - slot_row(b)) + (3 if column_index(a) != column_index(b) else 0)


def occupied_slots(slot: int, poles: int) -> tuple[int, ...]:
    """Slots taken by a breaker of ``poles`` poles whose first pole is in ``slot``."""
    return tuple(slot + 2 * k for k in range(poles))


def slot_phases(slot: int, poles: int, right_column: str = RIGHT_ABC) -> tuple[int, ...]:
    """Phase indices a breaker in ``slot`` connects to, in pole order.

    A 3-pole breaker is reported as ``(0, 1, 2)`` whatever slot it starts in,
    since it takes one pole on each phase (:func:`pole_phases` gives the
    order of its poles).
    """
    if poles >= 3:
        return (0, 1, 2)
    return pole_phases(slot, poles, right_column)


def pole_phases(slot: int, poles: int, right_column: str = RIGHT_ABC) -> tuple[int, ...]:
    """Phase index of each pole of a breaker in ``slot``, first pole first (3-pole too)."""
    return tuple(slot_phase(s, right_column) for s in occupied_slots(slot, poles))


def fits(slot: int, poles: int, spaces: int) -> bool:
    """True when every pole of the breaker lies on the panel."""
    return slot >= 1 and slot + 2 * (poles - 1) <= spaces


def free_slots(spaces: int, taken: Iterable[int]) -> list[int]:
    """Slots 1..spaces not in ``taken``."""
    used = set(taken)
    return [s for s in range(1, spaces + 1) if s not in used]


def candidate_slots(poles: int, spaces: int, taken: Iterable[int]) -> list[int]:
    """First-pole slots where a breaker of ``poles`` poles fits in free space."""
    used = set(taken)
    return [
        s
        for s in range(1, spaces + 1)
        if fits(s, poles, spaces) and not used.intersection(occupied_slots(s, poles))
    ]
