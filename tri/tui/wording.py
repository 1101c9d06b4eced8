"""How the UI words things: plurals, circuits named by position and name, located problems.

A circuit is always named the way the panel shows it: by its slot (or its
phases on a rail board) and its name, never by its position in the file,
which the screen never shows. A problem names the file it belongs to.
Nothing here imports textual.
"""

from __future__ import annotations

import re

from tri.schedule.errors import ScheduleIssue
from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import occupied_slots
from tri.words import plural as plural  # re-exported


def place_words(circuit: Circuit, schedule: Schedule) -> str:
    """``"slot 5"``, ``"slots 5, 7"`` for a multi-pole breaker, ``"L1-L2"``, or ``"not placed"``."""
    if circuit.slot is not None:
        return f"slot {circuit.slot}"
    if circuit.phases is not None:
        return schedule.phase_text(circuit.phases)
    return "not placed"


def circuit_label(schedule: Schedule, index: int) -> str:
    """A circuit as the screen names it: ``slot 5 "Walk-in cooler"``, ``L1 "Socket ring"``."""
    c = schedule.circuits[index]
    name = c.name or "unnamed"
    if c.slot is None and c.phases is None:
        return f'new circuit "{name}"'
    return f'{place_words(c, schedule)} "{name}"'


def slots_words(slots: tuple[int, ...] | list[int]) -> str:
    """``"slot 3"``, ``"slots 3 and 5"``, ``"slots 3, 5 and 7"``."""
    if len(slots) == 1:
        return f"slot {slots[0]}"
    head = ", ".join(str(s) for s in slots[:-1])
    return f"slots {head} and {slots[-1]}"


_ORDINAL = re.compile(r'circuit (\d+) \((?:([^"()]*), )?"((?:[^"\\]|\\.)*)"\)')


def _name_circuits(text: str, schedule: Schedule | None) -> str:
    """Replace the loader's ``circuit 3 ("Oven")`` by ``slot 6 "Oven"`` (the screen's words).

    Without a schedule (a file that could not be read) the place the loader
    gives is kept: ``circuit 3 (slot 5, "Fryer")`` reads ``slot 5 "Fryer"``.
    """

    def one(match: re.Match[str]) -> str:
        k, place, name = int(match.group(1)) - 1, match.group(2), match.group(3)
        known = schedule is not None and 0 <= k < len(schedule.circuits)
        if known and schedule is not None and schedule.circuits[k].name == name:
            return circuit_label(schedule, k)
        if place:
            return f'{place.removeprefix("phases ")} "{name}"'
        return f'"{name}"'

    return _ORDINAL.sub(one, text)


def issue_text(issue: ScheduleIssue, file_name: str, schedule: Schedule | None = None) -> str:
    """One problem as the UI says it: the file, the line, the circuit by place and name, the key.

    Parameters
    ----------
    issue : ScheduleIssue
        From the loader or :func:`~tri.schedule.validate.check_schedule`.
    file_name : str
        The file it concerns (the issue's own file when it has one).
    schedule : Schedule, optional
        The schedule the issue was found in, to name circuits by slot and name.
    """
    head = issue.file or file_name
    if issue.line is not None:
        head += f":{issue.line}"
    parts = [head]
    if issue.circuit_index is not None and schedule is not None:
        if 0 <= issue.circuit_index < len(schedule.circuits):
            parts.append(circuit_label(schedule, issue.circuit_index))
    elif issue.where:
        parts.append(_name_circuits(issue.where, schedule))
    if issue.key:
        parts.append(f"key '{issue.key}'")
    return ": ".join(parts) + ": " + _name_circuits(issue.message, schedule)


def issue_words(issue: ScheduleIssue, schedule: Schedule) -> str:
    """A problem without the file: ``slot 9 "Signage": slot 9 is not on the panel ...``."""
    text = _name_circuits(issue.message, schedule)
    if issue.circuit_index is not None and 0 <= issue.circuit_index < len(schedule.circuits):
        return f"{circuit_label(schedule, issue.circuit_index)}: {text}"
    return text


def form_problem(issue: ScheduleIssue, candidate: Schedule, edited: int) -> str:
    """A problem of an edit, worded from the edited circuit's side.

    A breaker that lands on another's pole makes the loader report the clash
    against whichever circuit comes later in the file; the form says which of
    the edited breaker's poles is taken, and by which breaker.
    """
    c = candidate.circuits[edited]
    taken = re.match(r"slot (\d+) is already taken", issue.message)
    if taken and c.slot is not None:
        slot = int(taken.group(1))
        poles = occupied_slots(c.slot, c.poles)
        owner = next(
            (
                j
                for j, x in enumerate(candidate.circuits)
                if j != edited and x.slot is not None and slot in occupied_slots(x.slot, x.poles)
            ),
            None,
        )
        if slot in poles and owner is not None:
            lead = (
                f"a {c.poles}-pole breaker at slot {c.slot} takes {slots_words(poles)}; "
                if c.poles > 1
                else ""
            )
            return f"{lead}slot {slot} is taken by {circuit_label(candidate, owner)}"
    text = _name_circuits(issue.message, candidate)
    if issue.circuit_index is not None and issue.circuit_index != edited:
        return f"{circuit_label(candidate, issue.circuit_index)}: {text}"
    return text


def circuit_details(schedule: Schedule, index: int) -> str:
    """Everything about one circuit on one line, its full name first (the status line)."""
    c = schedule.circuits[index]
    parts = [circuit_label(schedule, index)]
    if c.slot is not None and c.poles > 1:
        poles = occupied_slots(c.slot, c.poles)
        listed = ", ".join(str(x) for x in poles)
        parts.append(f"{c.poles}-pole on slots {listed} ({schedule.phase_text(c.phases)})")
    elif c.phases is not None:
        parts.append(f"{c.poles}-pole on {schedule.phase_text(c.phases)}")
    else:
        parts.append(f"{c.poles}-pole, not placed")
    parts.append("no rating given" if c.breaker_a is None else f"{c.breaker_a:g} A breaker")
    from tri.tui.wiring_words import wiring_details

    parts += wiring_details(index, schedule)
    if c.feed is not None:
        tx = c.feed.transformer
        through = "" if tx is None else f" through a {tx.kva:g} kVA {tx.connection} transformer"
        parts.append(f"feeds {c.feed.path}{through}")
    if c.continuous:
        parts.append("continuous (125 % for sizing)")
    if c.locked:
        parts.append("locked")
    if c.note:
        parts.append(f"note: {c.note}")
    return " · ".join(parts)
