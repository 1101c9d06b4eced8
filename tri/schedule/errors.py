"""Problems found in a schedule, each located for a person to fix."""

from __future__ import annotations

from dataclasses import dataclass


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
        The table or circuit, e.g. ``"[panel]"`` or ``'circuit 3 (slot 5, "Fryer")'``.
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
