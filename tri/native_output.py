"""Keep native libraries' stray prints off standard output.

HiGHS (the MILP solver behind ``scipy.optimize.milp``) is native code and
can print a line to file descriptor 1 outside Python's control. The command
line must keep JSON on standard output clean, and the terminal UI must not
get stray text on the screen (Textual draws on standard error, so sending
descriptor 1 to the null device while solving is safe there).
"""

from __future__ import annotations

import contextlib
import os
import sys
from collections.abc import Iterator

STDOUT_FD = 1  #: native code writes here whatever Python's sys.stdout is


@contextlib.contextmanager
def native_stdout_to_devnull() -> Iterator[None]:
    """Send the process's standard output (file descriptor 1) to the null device.

    Python's own ``sys.stdout`` is flushed before and after. Process-wide:
    use it only around work that prints nothing wanted.
    """
    with contextlib.suppress(Exception):
        sys.stdout.flush()
    try:
        saved = os.dup(STDOUT_FD)
    except OSError:  # no standard output to protect
        yield
        return
    devnull = os.open(os.devnull, os.O_WRONLY)
    try:
        os.dup2(devnull, STDOUT_FD)
        yield
    finally:
        with contextlib.suppress(Exception):
            sys.stdout.flush()
        os.dup2(saved, STDOUT_FD)
        os.close(saved)
        os.close(devnull)
