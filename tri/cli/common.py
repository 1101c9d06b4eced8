"""Helpers shared by the commands: exit codes, error printing, loading."""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING

from tri.safety import SAFETY_CAUTION as SAFETY_CAUTION  # its home; re-exported for the commands
from tri.schedule.text import escaped

if TYPE_CHECKING:
    from tri.schedule.load import ScheduleFile

EXIT_OK = 0
EXIT_LIMIT = 1  #: ``tri check`` found a limit exceeded
EXIT_ERROR = 2  #: bad input: unreadable or invalid file, bad option
EXIT_INTERNAL = 3  #: a bug in tri


class CliError(Exception):
    """A problem with the command line itself (message shown as is, exit 2)."""


def print_error(message: str) -> None:
    """Print ``tri: error: ...`` to standard error (control characters shown escaped)."""
    print(f"tri: error: {escaped(message, keep_newlines=True)}", file=sys.stderr)


def load(path: str) -> ScheduleFile:
    """Load a schedule, raising :class:`ScheduleError` with every problem."""
    from tri.schedule.load import load_schedule  # tomlkit and numpy, only when a file is read

    return load_schedule(path)


class SearchProgress:
    """The search's progress as one line on a terminal's standard error, rewritten in place.

    Called as ``progress(fraction or None, message)`` (the rebalancer's progress
    callback); silent when standard error is not a terminal.
    """

    def __init__(self) -> None:
        self.active = sys.stderr.isatty()
        self.shown = False

    def __call__(self, fraction: float | None, message: str) -> None:
        if not self.active:
            return
        pct = "" if fraction is None else f"{100 * fraction:3.0f}% "
        sys.stderr.write("\r" + f"tri: {pct}{message}"[:78].ljust(78))
        sys.stderr.flush()
        self.shown = True

    def clear(self) -> None:
        """Blank the line, if one was written."""
        if self.shown:
            sys.stderr.write("\r" + " " * 78 + "\r")
            sys.stderr.flush()
