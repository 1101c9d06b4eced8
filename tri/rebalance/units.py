"""What the rebalancer moves: units (a breaker, or a shared-neutral group as one block).

A *unit* is what one relocation moves. Most units are one breaker. Two
kinds are *wired* (their loads sit on their poles one by one, so the order
of their poles' phases matters, not only the set):

* a 2- or 3-pole breaker with per-leg loads (``neutral = true``: one load
  to neutral per pole; a 3-pole ``load_va = [x, y, z]`` without a neutral:
  one line-to-line load per pole pair), pole order as in
  :func:`tri.schedule.wiring.legs_of`;
* the 1-pole breakers of one ``shared_neutral`` group, which move as one
  block: its breakers keep their order (top to bottom on a two-column
  panel, file order on a rail board) and, on a two-column panel, go to
  ``k`` adjacent slots of one column (``n, n + 2, n + 4``), where the
  loader's adjacency check wants them; so their phases stay distinct. A
  group moved is **one relocation** in every count, the work order's
  included: one step names its breakers ("move shared-neutral group N1
  (slots 3, 5, 7) to slots 9, 11, 13"), as for a 3-pole breaker with a
  neutral. Reordering the breakers inside a group is not offered.

Options of a wired unit (:func:`wired_orders`): every order of its poles'
phases the panel can give. On a two-column panel those of its windows: the
cyclic orders (A-B-C, B-C-A, C-A-B and their 2-pole prefixes) in a column
read A-B-C, and with ``right_column = "CBA"`` also the reversed ones (the
right column). On a rail board every order of distinct phases.

Why the floor still holds (:mod:`tri.rebalance.problem`): each *leg* of a
wired unit is a line-to-neutral or a line-to-line element on its own, and
every option puts each leg on some phase (pair); the order-h sequence share
of one element is the same on every phase (pair) it may take, whatever the
other legs do. So ``J_h`` is the same for every plan, with wired units
moved to any of their options, and every bound built on it (the floor
``F``, the crossing and budget floors of :mod:`tri.rebalance.crossing`,
the triangle of :mod:`tri.rebalance.halves`, the triplen neutral) holds on
a wye or 3-wire system. A unit changes option only by leaving its slots,
and counts one relocation, so "a relocation changes at most one unit's
option" holds too. On a high-leg delta the phasors are not 120° apart and
none of this holds (:mod:`tri.rebalance.problem`, High leg).

Units with a locked member do not move (every member stays). A new
(unplaced) circuit that names a ``shared_neutral`` is not placed by the
rebalancer (it is left unplaced, with a note).

High leg (``system = "240/120D"``). A load to neutral on the high leg
would see 208 V: a 1-pole circuit, a leg to neutral of a breaker with a
neutral, a shared-neutral group's breaker. Such units are offered only
the orders of phases that keep every leg to neutral off the high leg (a
1-pole circuit: the two low phases; a 2-pole breaker with a neutral: the
low pair, in the orders the panel gives); 2- and 3-pole loads without a
neutral keep every option. The phasors of a high-leg delta are not 120°
apart (the low phases are 180° apart to neutral), so the sequence share of
a load changes with its phase and none of the bounds built on ``J_h`` is
used there (:mod:`tri.rebalance.problem`, High leg).

RCD groups (rail boards, ``[[rcd]]`` and ``rcd = "R1"``). A move on a rail
board reconnects a circuit to other phases *behind its own RCD*: no option
changes the RCD a circuit sits behind, so circuits always stay behind
their RCD. A 4-pole RCD feeds every phase, so its circuits may take any
option. A 2-pole RCD feeds one phase and neutral: a circuit behind it has
one option, that phase (a unit whose ``orders`` say so), so it never
moves, and a new one is placed there. Moving a whole 2-pole RCD group to
another phase (reconnecting the RCD's supply) is not offered; the claims
are about plans that leave every 2-pole RCD where it is, and the output
says so.
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence
from dataclasses import dataclass, replace

from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import PHASES, pole_phases
from tri.schedule.wiring import circuit_pole_phases

#: The three phase pairs of 2-pole options, in row order of a two-column panel [-].
PAIRS: tuple[tuple[int, int], ...] = ((0, 1), (1, 2), (2, 0))


#: Words of the note on a new circuit of a shared-neutral group, which is not placed
#: (the status words name such circuits as left out of the claim).
GROUP_NOT_PLACED = "does not place circuits of a shared-neutral group"


def pair_index(phases: Sequence[int]) -> int:
    """Index in :data:`PAIRS` of an (unordered) pair of phases."""
    s = set(phases)
    for k, pair in enumerate(PAIRS):
        if set(pair) == s:
            return k
    raise ValueError(f"not a pair of distinct phases: {phases!r}")


@dataclass(frozen=True)
class Unit:
    """One thing a relocation moves (module notes).

    Attributes
    ----------
    members : tuple of int
        Schedule indices of its breakers, in pole order (one for a breaker).
    poles : int
        Poles it takes [-].
    wired : bool
        Its poles' order matters (per-leg loads, or a shared-neutral group).
    group : str or None
        The ``shared_neutral`` name of a group; None for a breaker.
    orders : tuple of tuple of int, or None
        The orders of phases it may take when the panel restricts them (a
        circuit behind a 2-pole RCD: its RCD's phase only); None: every
        order the panel gives (:func:`wired_orders`).
    """

    members: tuple[int, ...]
    poles: int
    wired: bool
    group: str | None = None
    orders: tuple[tuple[int, ...], ...] | None = None

    @property
    def lead(self) -> int:
        """Schedule index that stands for the unit (its first breaker)."""
        return self.members[0]


def _group_order(schedule: Schedule, members: Sequence[int]) -> tuple[int, ...]:
    circuits = schedule.circuits
    if schedule.panel.layout == PHASES:
        return tuple(members)
    return tuple(sorted(members, key=lambda i: circuits[i].slot or 0))


def free_units(schedule: Schedule, free: Sequence[int]) -> tuple[list[Unit], list[str]]:
    """The units among the circuits ``free`` (module notes), in order of their lead, and notes.

    A group is a unit only when every breaker of it is free; otherwise none
    of it moves.
    """
    circuits = schedule.circuits
    free_set = {int(i) for i in free}
    groups: dict[str, list[int]] = {}
    for i, c in enumerate(circuits):
        if c.poles == 1 and c.shared_neutral is not None and c.is_placed:
            groups.setdefault(c.shared_neutral, []).append(i)
    units: list[Unit] = []
    notes: list[str] = []
    for i in sorted(free_set):
        c = circuits[i]
        if c.poles == 1 and c.shared_neutral is not None:
            if not c.is_placed:
                notes.append(
                    f'the new circuit "{c.name}" names shared neutral {c.shared_neutral!r}: '
                    f"the rebalancer {GROUP_NOT_PLACED} (left without a slot)"
                )
                continue
            members = groups[c.shared_neutral]
            if i != min(members):
                continue
            if not free_set.issuperset(members):
                notes.append(
                    f"shared-neutral group {c.shared_neutral} stays where it is: "
                    "one of its breakers is locked"
                )
                continue
            order = _group_order(schedule, members)
            units.append(Unit(order, len(order), True, c.shared_neutral))
            continue
        phase = _rcd_phase(schedule, c.rcd)
        if phase is not None:
            units.append(Unit((i,), c.poles, True, orders=((phase,),)))
            continue
        units.append(Unit((i,), c.poles, c.has_legs))
    high = schedule.panel.effective_high_leg
    if high is not None:
        units = [_off_the_high_leg(schedule, u, high) for u in units]
    return units, notes


def _off_the_high_leg(schedule: Schedule, unit: Unit, high: int) -> Unit:
    """A unit whose loads to neutral may not take the high leg (module notes, High leg)."""
    c = schedule.circuits[unit.lead]
    to_neutral = unit.poles == 1 or unit.group is not None or c.neutral
    if not to_neutral:
        return unit  # line-to-line and balanced loads may take any phases
    orders = unit.orders or tuple(wired_orders(schedule, unit.poles))
    return replace(unit, wired=True, orders=tuple(o for o in orders if high not in o))


def _rcd_phase(schedule: Schedule, name: str | None) -> int | None:
    """Phase of the 2-pole RCD ``name`` (None for no RCD or a 4-pole one)."""
    if name is None:
        return None
    for r in schedule.rcds:
        if r.name == name and r.poles == 2:
            return r.phase
    return None


def rcd_note(schedule: Schedule, units: Sequence[Unit]) -> str | None:
    """The note on 2-pole RCD groups kept on their phase (module notes), or None."""
    names = sorted(
        {schedule.circuits[u.lead].rcd or "" for u in units if u.orders is not None} - {""}
    )
    if not names:
        return None
    return (
        f"circuits behind the 2-pole RCD{'s' if len(names) > 1 else ''} {', '.join(names)} "
        "stay on its phase (an RCD group is not moved to another phase); circuits behind "
        "4-pole RCDs move among the phases behind their own RCD"
    )


def current_order(schedule: Schedule, unit: Unit) -> tuple[int, ...] | None:
    """Phase of each pole of a placed wired unit, first pole first (None if unplaced)."""
    circuits = schedule.circuits
    if unit.group is None:
        return circuit_pole_phases(circuits[unit.lead], schedule)
    out: list[int] = []
    for i in unit.members:
        ph = circuits[i].phases
        if ph is None:
            return None
        out.append(ph[0])
    return tuple(out)


def wired_orders(schedule: Schedule, poles: int) -> list[tuple[int, ...]]:
    """Every order of phases a wired unit of ``poles`` poles may take (module notes)."""
    if schedule.panel.layout == PHASES:
        return list(itertools.permutations(range(3), poles))
    rc = schedule.panel.right_column
    out: list[tuple[int, ...]] = []
    for first in range(1, 13):  # rows cycle every 3, columns every 2: 12 slots show all
        order = pole_phases(first, poles, rc)
        if order not in out:
            out.append(order)
    return out


def _options(c: Circuit, slots: bool) -> list[tuple[int, tuple[int, ...]]]:
    """``(kind, phases)`` of every option of a plain breaker."""
    if c.poles == 1:
        return [(p, (p,)) for p in range(3)]
    if c.poles == 2:
        out = []
        for k, pair in enumerate(PAIRS):
            keep = not slots and c.phases is not None and set(c.phases) == set(pair)
            out.append((k, tuple(c.phases) if keep and c.phases else pair))
        return out
    return [(0, (0, 1, 2))]


def _current_kind(c: Circuit) -> int:
    if c.phases is None:
        return -1
    if c.poles == 1:
        return c.phases[0]
    if c.poles == 2:
        return pair_index(c.phases)
    return 0


def unit_options(schedule: Schedule, unit: Unit) -> tuple[list[tuple[int, ...]], int]:
    """Phases of every option of a unit and the index of its option now (-1: new)."""
    c = schedule.circuits[unit.lead]
    if not unit.wired:
        opts = _options(c, schedule.panel.uses_slots)
        now = _current_kind(c)
        return [ph for _, ph in opts], next((k for k, _ in opts if k == now), -1)
    orders = list(unit.orders) if unit.orders else wired_orders(schedule, unit.poles)
    order = current_order(schedule, unit)
    return orders, (orders.index(order) if order in orders else -1)
