"""Where the free breakers of a two-column panel can go: free slots, windows, homes.

The geometry is the schedule's (:mod:`tri.schedule.slots`): slot ``n`` is
on the phase of its row as the panel reads it
(:func:`~tri.schedule.slots.slot_phase` with the panel's ``right_column``:
A-B-C or C-B-A down the right column), a breaker of ``k`` poles in slot
``n`` takes ``n, n + 2, ..., n + 2(k - 1)``. Here it is seen from the rebalancer:

* *fixed* slots are taken by breakers that do not move in this search
  (locked ones, and in place-new mode every placed one); every other slot
  of the panel is *open*;
* a *window* is a first slot where a breaker of 2 or 3 poles fits in open
  slots; its *kind* is the option it gives (:mod:`tri.rebalance.problem`):
  the pair of phases its two rows take for 2 poles (the index of A-B, B-C
  or C-A in :data:`tri.rebalance.problem.PAIRS`), 0 for 3 poles; windows
  are listed for the pole counts free breakers have;
* the *home* of a placed free breaker is the slots it takes now;
* the *reach* (``[panel] max_row_shift``, rows) limits where a placed free
  breaker may go: a first slot at most that many rows above or below its
  first slot now, in either column (:meth:`SlotGeometry.allowed`). New
  circuits have no conductors yet and may go anywhere.

Rail boards have no geometry (:func:`slot_geometry` returns None there).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from tri.schedule.model import Schedule
from tri.schedule.slots import (
    RIGHT_ABC,
    fits,
    occupied_slots,
    pole_phases,
    slot_phase,
    slot_row,
)


@dataclass(frozen=True)
class Window:
    """A first slot where a multi-pole breaker fits in open slots.

    Attributes
    ----------
    first : int
        First slot [-].
    poles : int
        2 or 3 [-].
    kind : int
        Option kind it gives: pair index (0, 1, 2) for 2 poles, 0 for 3 [-].
    cells : tuple of int
        Every slot the breaker takes.
    order : tuple of int
        Phase of each of its slots, first first: the option a wired unit
        takes there (:mod:`tri.rebalance.units`).
    """

    first: int
    poles: int
    kind: int
    cells: tuple[int, ...]
    order: tuple[int, ...] = ()


@dataclass(frozen=True, eq=False)
class SlotGeometry:
    """The open slots, windows and homes of one search (module notes).

    Attributes
    ----------
    spaces : int
        Slots of the panel [-].
    open_cells : int ndarray, shape (C,)
        Slots not taken by fixed breakers, increasing.
    open_per_phase : int ndarray, shape (3,)
        Open slots on each phase [-].
    windows : tuple of Window
        Every window (first slot in increasing order, 2 poles before 3).
    homes : tuple of (tuple of int or None)
        Per free breaker (in the problem's order): the slots it takes now,
        None for a new circuit.
    right_column : str
        The right column's phase order (``"ABC"`` or ``"CBA"``).
    reach : int or None
        Rows a placed breaker may shift (``[panel] max_row_shift``); None: no limit.
    """

    spaces: int
    open_cells: np.ndarray
    open_per_phase: np.ndarray
    windows: tuple[Window, ...]
    homes: tuple[tuple[int, ...] | None, ...]
    right_column: str = RIGHT_ABC
    reach: int | None = None

    def allowed(self, i: int, first: int) -> bool:
        """True when free breaker ``i`` may take first slot ``first`` within the reach."""
        home = self.homes[i]
        if self.reach is None or home is None:
            return True
        return abs(slot_row(first) - slot_row(home[0])) <= self.reach

    def phase_of(self, slot: int) -> int:
        """Phase index of ``slot`` as this panel reads it [-]."""
        return slot_phase(slot, self.right_column)

    def occupant(self) -> dict[int, int]:
        """Slot -> free breaker (problem index) that holds it now."""
        out = {}
        for i, home in enumerate(self.homes):
            for s in home or ():
                out[s] = i
        return out

    def home_first(self, i: int) -> int | None:
        """First slot of free breaker ``i`` now (None for a new circuit)."""
        home = self.homes[i]
        return None if home is None else home[0]


def window_kind(first: int, poles: int, right_column: str = RIGHT_ABC) -> int:
    """Option kind of a multi-pole breaker in ``first``: its pair (2 poles), 0 (3 poles).

    The pair index is that of the phases the two poles take (in either
    order: a right column read C-B-A gives C-B, B-A, A-C down the column).
    """
    if poles != 2:
        return 0
    p, q = pole_phases(first, 2, right_column)
    return {frozenset((0, 1)): 0, frozenset((1, 2)): 1, frozenset((2, 0)): 2}[frozenset((p, q))]


def slot_geometry(schedule: Schedule, free: Sequence[int | Sequence[int]]) -> SlotGeometry | None:
    """The geometry of a search in which the circuits ``free`` may move (module notes).

    Parameters
    ----------
    schedule : Schedule
    free : sequence of int or of tuples of int
        The free units in the problem's order: a schedule index each, or
        the schedule indices of a unit's breakers (a shared-neutral group,
        :mod:`tri.rebalance.units`), whose home is every slot they take.

    Returns
    -------
    SlotGeometry or None
        None on a rail board.
    """
    if not schedule.panel.uses_slots:
        return None
    spaces = schedule.panel.spaces
    rc = schedule.panel.right_column
    units = [(int(u),) if isinstance(u, (int, np.integer)) else tuple(u) for u in free]
    free_set = {int(i) for u in units for i in u}
    fixed: set[int] = set()
    for idx, c in enumerate(schedule.circuits):
        if c.slot is not None and idx not in free_set:
            fixed.update(occupied_slots(c.slot, c.poles))
    open_cells = np.array([s for s in range(1, spaces + 1) if s not in fixed], dtype=int)
    per_phase = np.bincount([slot_phase(int(s), rc) for s in open_cells], minlength=3)
    unit_poles = [sum(schedule.circuits[i].poles for i in u) for u in units]
    pole_counts = sorted(set(unit_poles) - {1})
    windows = []
    for poles in pole_counts:
        for first in range(1, spaces + 1):
            cells = occupied_slots(first, poles)
            if fits(first, poles, spaces) and not fixed.intersection(cells):
                kind = window_kind(first, poles, rc)
                windows.append(Window(first, poles, kind, cells, pole_phases(first, poles, rc)))
    homes: list[tuple[int, ...] | None] = []
    for u in units:
        firsts = [(schedule.circuits[i].slot, schedule.circuits[i].poles) for i in u]
        if any(f is None for f, _ in firsts):
            homes.append(None)
            continue
        homes.append(tuple(sorted(s for f, k in firsts for s in occupied_slots(f or 0, k))))
    return SlotGeometry(
        spaces=spaces,
        open_cells=open_cells,
        open_per_phase=per_phase.astype(int),
        windows=tuple(windows),
        homes=tuple(homes),
        right_column=rc,
        reach=schedule.panel.max_row_shift,
    )


def disjoint_window_counts(geo: SlotGeometry) -> np.ndarray:
    """Most windows of each type that fit side by side in the open slots (int ndarray, (4,)).

    Types: 2 poles on the pair A-B, B-C, C-A (:func:`window_kind`), and 3 poles. Windows of one
    type in one column never overlap when their first rows are 3 apart,
    so per column and type the count is found by a greedy scan of runs of
    open rows. A bound used by the heuristic's capacity test only.
    """
    out = np.zeros(4, dtype=int)
    open_set = set(geo.open_cells.tolist())
    for column_first in (1, 2):
        slots = list(range(column_first, geo.spaces + 1, 2))
        free = [s in open_set for s in slots]
        for r in range(len(slots) - 1):
            if free[r] and free[r + 1]:
                out[window_kind(slots[r], 2, geo.right_column)] += 1
        run = 0
        for f in [*free, False]:
            if f:
                run += 1
            else:
                out[3] += run // 3
                run = 0
    return out
