"""Read the bytes of an input file safely: regular files only, never without bound.

A schedule is a few kilobytes. Whatever path a user (or a script, or a glob)
hands over, reading it must end promptly: a device such as ``/dev/zero``
would never end, a FIFO with no writer would wait for ever, and a huge file
would fill memory. So the file is opened without blocking, must be a
regular file, and is read up to a cap.
"""

from __future__ import annotations

import os
import stat
from pathlib import Path

from tri.schedule.errors import ScheduleError, ScheduleIssue

#: Largest schedule file read [bytes]. A 420-space panel with a comment on
#: every circuit is under 100 kB; 1 MiB leaves ten times that.
MAX_SCHEDULE_BYTES = 1 << 20

_OPEN_FLAGS = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)


def _kind_of(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "is a folder, expected a .toml file"
    if stat.S_ISFIFO(mode):
        return "is a pipe (FIFO), expected a regular file"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "is a device, expected a regular file"
    if stat.S_ISSOCK(mode):
        return "is a socket, expected a regular file"
    return "is not a regular file"


def _os_problem(exc: OSError) -> str:
    if isinstance(exc, FileNotFoundError):
        return "no such file"
    if isinstance(exc, IsADirectoryError):
        return "is a folder, expected a .toml file"
    if isinstance(exc, PermissionError):
        return "permission denied reading the file"
    return f"cannot read: {exc.strerror or exc}"


def _size_text(n: int) -> str:
    """``1 MiB``, ``16 MiB``, ``512 KiB``, else bytes."""
    for unit, size in (("MiB", 1 << 20), ("KiB", 1 << 10)):
        if n % size == 0:
            return f"{n // size} {unit}"
    return f"{n:,} bytes".replace(",", " ")


def read_limited(
    path: str | Path, limit: int = MAX_SCHEDULE_BYTES, what: str = "schedule"
) -> bytes:
    """The bytes of the regular file at ``path``, at most ``limit`` of them.

    Raises
    ------
    ScheduleError
        When the path is missing, not a regular file (folder, device, FIFO,
        socket), unreadable, or larger than ``limit``. Opening never blocks.
    """
    name = str(path)
    try:
        # Look first (a socket cannot even be opened), then check again what was opened.
        if not stat.S_ISREG(mode := os.stat(path).st_mode):
            raise ScheduleError([ScheduleIssue(_kind_of(mode), file=name)])
        fd = os.open(path, _OPEN_FLAGS)
    except OSError as exc:
        raise ScheduleError([ScheduleIssue(_os_problem(exc), file=name)]) from None
    try:
        info = os.fstat(fd)
        if not stat.S_ISREG(info.st_mode):
            raise ScheduleError([ScheduleIssue(_kind_of(info.st_mode), file=name)])
        too_big = ScheduleIssue(
            f"is larger than {_size_text(limit)}, the most a {what} file may be "
            "(is it the right file?)",
            file=name,
        )
        if info.st_size > limit:
            raise ScheduleError([too_big])
        chunks: list[bytes] = []
        size = 0
        while size <= limit:
            chunk = os.read(fd, min(1 << 16, limit + 1 - size))
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
        if size > limit:
            raise ScheduleError([too_big])
        return b"".join(chunks)
    except OSError as exc:
        raise ScheduleError([ScheduleIssue(_os_problem(exc), file=name)]) from None
    finally:
        os.close(fd)
