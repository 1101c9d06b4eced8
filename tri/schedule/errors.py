"""Problems found in a schedule, each located for a person to fix."""

from __future__ import annotations

from dataclasses import dataclass

from tri.schedule.text import escaped


@dataclass(frozen=True)
class ScheduleIssue:
    """One problem in a schedule file.

    Attributes
    ----------
    message : str
        What was found and what was expected.
    file : str or None
        File name as given by the user.
    line : int or None
        1-based line number, where it can be found.
    where : str or None
        The table or circuit, e.g. ``"[panel]"`` or ``'circuit "Fryer" in slot 5'``
        (see :func:`name_circuit`).
    key : str or None
        The key at fault.
    circuit_index : int or None
        0-based position of the circuit concerned in the schedule, if any.
    """

    message: str
    file: str | None = None
    line: int | None = None
    where: str | None = None
    key: str | None = None
    circuit_index: int | None = None

    def __post_init__(self) -> None:
        # Text quoted from a file (a key, a name, a parser's message) is shown
        # escaped, so no message can carry a control character to a terminal.
        for name in ("message", "file", "where", "key"):
            value = getattr(self, name)
            if isinstance(value, str):
                object.__setattr__(self, name, escaped(value))

    def __str__(self) -> str:
        head = self.file or "<schedule>"
        if self.line is not None:
            head += f":{self.line}"
        parts = [head]
        if self.where:
            parts.append(self.where)
        if self.key:
            parts.append(f"key '{self.key}'")
        return ": ".join(parts) + ": " + self.message


def name_circuit(name: str | None, place: str | None) -> str:
    """How every message names a circuit: by its name and where it sits, never by a number.

    Parameters
    ----------
    name : str or None
        The circuit's name (``None`` or blank: unnamed).
    place : str or None
        ``"slot 5"``, ``"phases BC"``, or ``None`` for a circuit not placed yet.

    Examples
    --------
    ``circuit "Fryer" in slot 5``, ``circuit "Sheeter" on phases BC``,
    ``unnamed circuit in slot 7``, ``circuit "EV charger" (not placed)``.
    """
    who = f'circuit "{name}"' if name and name.strip() else "unnamed circuit"
    if place is None:
        return f"{who} (not placed)"
    return f"{who} {'on' if place.startswith('phases') else 'in'} {place}"


class ScheduleError(Exception):
    """A schedule could not be loaded or saved; ``issues`` lists every problem."""

    def __init__(self, issues: list[ScheduleIssue] | tuple[ScheduleIssue, ...]) -> None:
        self.issues = tuple(issues)
        super().__init__(self.summary())

    def summary(self) -> str:
        """All issues, one per line, preceded by a count."""
        n = len(self.issues)
        head = f"{n} problem{'s' if n != 1 else ''} in the schedule:"
        return "\n".join([head, *(f"  {issue}" for issue in self.issues)])
