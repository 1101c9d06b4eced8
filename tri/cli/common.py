"""Helpers shared by the commands: exit codes, error printing, loading."""

from __future__ import annotations

import sys

from tri.schedule.load import ScheduleFile, load_schedule
from tri.schedule.text import escaped

EXIT_OK = 0
EXIT_LIMIT = 1  #: ``tri check`` found a limit exceeded
EXIT_ERROR = 2  #: bad input: unreadable or invalid file, bad option
EXIT_INTERNAL = 3  #: a bug in tri

SAFETY_CAUTION = (
    "Figures are engineering estimates from the schedule, not measurements. "
    "Panel work can kill: de-energise and lock out before moving any breaker, "
    "and let a qualified person do the work. The local electrical code and the "
    "authority having jurisdiction decide; nothing here is approval to work."
)


class CliError(Exception):
    """A problem with the command line itself (message shown as is, exit 2)."""


def print_error(message: str) -> None:
    """Print ``tri: error: ...`` to standard error (control characters shown escaped)."""
    print(f"tri: error: {escaped(message, keep_newlines=True)}", file=sys.stderr)


def load(path: str) -> ScheduleFile:
    """Load a schedule, raising :class:`ScheduleError` with every problem."""
    return load_schedule(path)
