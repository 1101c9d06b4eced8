"""Autosave journal: unsaved edits kept on disk so a crash or a dropped session loses nothing.

After every edit the terminal UI writes the whole current schedule model
here (plain JSON, a few kilobytes). Saving the schedule deletes the journal.
When a file is opened and a journal for it exists whose schedule differs from
the file, the UI offers to recover it.

Where it lives
--------------
``$XDG_STATE_HOME/tri/journal/`` (default ``~/.local/state/tri/journal/``),
one file per schedule, named after the schedule's file name and a short hash
of its absolute path, so a read-only folder or a version-controlled folder
is never touched. An untitled schedule (a demo copy, a new panel not yet
saved) has its own journal named ``untitled-<panel name>``. The folders are
created private (0700) and every journal file is 0600.

Two UIs on one file
-------------------
Each journal records its owner (process id and host). A tri that opens a
file whose journal belongs to another running tri writes its own journal
beside it (``NAME-HASH.<random>.tri-journal``) instead of overwriting it;
:func:`choose_journal` makes that choice and finds a journal left by a tri
that stopped, to be offered for recovery.

What it holds
-------------
The model (:mod:`tri.schedule.journal_data`), the SHA-256 of the file as it
was when editing began (to tell whether the file changed on disk since), a
UTC time stamp, the number of edits and the owner.

This module does file I/O but imports nothing from the engine's internals or
from any UI library.
"""

from __future__ import annotations

import contextlib
import datetime as _dt
import glob
import hashlib
import json
import os
import re
import secrets
import socket
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from tri.schedule.errors import ScheduleError
from tri.schedule.journal_data import schedule_from_data, schedule_to_data
from tri.schedule.model import Schedule
from tri.schedule.source import MAX_SCHEDULE_BYTES, read_limited

__all__ = [
    "JournalChoice",
    "JournalEntry",
    "choose_journal",
    "discard_journal",
    "file_digest",
    "journal_path",
    "read_journal",
    "schedule_from_data",
    "schedule_to_data",
    "state_dir",
    "write_journal",
]

JOURNAL_VERSION = 1
JOURNAL_SUFFIX = ".tri-journal"
#: Largest journal read back [bytes] (a 1000-circuit schedule is under 1 MiB).
MAX_JOURNAL_BYTES = 16 << 20
#: A journal from another host is taken as its owner's for this long [s].
OTHER_HOST_FRESH_S = 12 * 3600


def state_dir() -> Path:
    """``$XDG_STATE_HOME/tri`` (default ``~/.local/state/tri``)."""
    base = os.environ.get("XDG_STATE_HOME")
    root = Path(base) if base else Path.home() / ".local" / "state"
    return root / "tri"


def journal_path(path: str | Path | None, panel_name: str = "") -> Path:
    """Where the journal of the schedule at ``path`` lives (``None``: untitled)."""
    folder = state_dir() / "journal"
    if path is None:
        slug = re.sub(r"[^A-Za-z0-9._-]+", "-", panel_name).strip("-")[:40] or "panel"
        return folder / f"untitled-{slug}{JOURNAL_SUFFIX}"
    absolute = str(Path(path).expanduser().resolve())
    digest = hashlib.sha256(absolute.encode("utf-8")).hexdigest()[:12]
    return folder / f"{Path(path).name}-{digest}{JOURNAL_SUFFIX}"


def file_digest(path: str | Path | None) -> str | None:
    """SHA-256 of a regular file's bytes; ``None`` when there is none (or it is huge)."""
    if path is None:
        return None
    try:
        return hashlib.sha256(read_limited(path, 16 * MAX_SCHEDULE_BYTES)).hexdigest()
    except ScheduleError:
        return None


# ---------------------------------------------------------------- owners


def _this_owner() -> dict[str, Any]:
    return {"pid": os.getpid(), "host": socket.gethostname()}


def _owner_running(owner: Any, written: float) -> bool:
    """True when the tri that wrote a journal may still be running (so it is not ours to take).

    A journal written by this very process counts as not running: one
    process shows one UI, so it is a session this process replaced.
    """
    if not isinstance(owner, dict) or not isinstance(owner.get("pid"), int):
        return False
    if owner.get("host") != socket.gethostname():
        return time.time() - written < OTHER_HOST_FRESH_S
    pid = owner["pid"]
    if pid == os.getpid() or pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:
        return True  # exists, owned by someone else
    return True


def _read_payload(target: Path) -> dict[str, Any] | None:
    try:
        payload = json.loads(read_limited(target, MAX_JOURNAL_BYTES, "journal"))
    except (ScheduleError, ValueError):
        return None
    if not isinstance(payload, dict) or payload.get("tri_journal") != JOURNAL_VERSION:
        return None
    return payload


def journal_owner_running(target: Path) -> str | None:
    """``"process 123 on host"`` when the journal at ``target`` belongs to a running tri."""
    payload = _read_payload(target)
    if payload is None:
        return None
    try:
        written = target.stat().st_mtime
    except OSError:
        return None
    owner = payload.get("owner")
    if not isinstance(owner, dict) or not _owner_running(owner, written):
        return None
    return f"process {owner['pid']} on {owner.get('host', '?')}"


@dataclass(frozen=True)
class JournalChoice:
    """Which journal files a session uses.

    Attributes
    ----------
    path : Path
        A journal file no other tri writes: where this session's edits go.
    inherited : Path or None
        A journal left by a tri that stopped, to offer for recovery.
    other_editor : str or None
        ``"process 123 on host"`` when another running tri has the file open.
    """

    path: Path
    inherited: Path | None = None
    other_editor: str | None = None


def alternate_path(primary: Path) -> Path:
    """A journal name of its own beside ``primary`` (for a second tri on one file)."""
    stem = primary.name.removesuffix(JOURNAL_SUFFIX)
    return primary.with_name(f"{stem}.{secrets.token_hex(4)}{JOURNAL_SUFFIX}")


def choose_journal(path: str | Path | None, panel_name: str = "") -> JournalChoice:
    """The journal files for a session on ``path``: its own, and one to recover if any."""
    primary = journal_path(path, panel_name)
    stem = primary.name.removesuffix(JOURNAL_SUFFIX)
    pattern = str(primary.parent / glob.escape(stem)) + f"*{JOURNAL_SUFFIX}"
    found: list[tuple[float, Path]] = []
    for name in glob.glob(pattern):
        with contextlib.suppress(OSError):
            found.append((os.stat(name).st_mtime, Path(name)))
    found.sort(key=lambda item: (item[1] != primary, -item[0]))
    inherited: Path | None = None
    other: str | None = None
    for _, candidate in found:
        running = journal_owner_running(candidate)
        if running is None and inherited is None:
            inherited = candidate
        elif running is not None and other is None:
            other = running
    own = primary if not primary.exists() else alternate_path(primary)
    return JournalChoice(path=own, inherited=inherited, other_editor=other)


# ---------------------------------------------------------------- the journal file


@dataclass(frozen=True)
class JournalEntry:
    """A journal read back from disk.

    Attributes
    ----------
    schedule : Schedule
        The schedule as it was after the last edit.
    path : str or None
        The schedule file it belongs to (absolute), ``None`` for untitled.
    base_digest : str or None
        SHA-256 of the file when editing began.
    written_utc : str
        ISO time stamp (UTC) of the last write.
    edits : int
        Number of edits since the file was opened or saved.
    """

    schedule: Schedule
    path: str | None
    base_digest: str | None
    written_utc: str
    edits: int

    def file_changed_since(self) -> bool:
        """True when the file on disk is no longer the one the edits started from."""
        return self.path is not None and file_digest(self.path) != self.base_digest


def _private_folder(folder: Path) -> None:
    """Create ``folder`` (and the state folder above it) readable by the owner only."""
    for level in (folder.parent, folder):
        if not level.exists():
            level.mkdir(mode=0o700, parents=True, exist_ok=True)


def write_journal(
    target: Path,
    schedule: Schedule,
    path: str | Path | None,
    base_digest: str | None,
    edits: int,
) -> None:
    """Write the journal atomically (temporary file, then rename), mode 0600.

    No fsync: the point is to survive the program dying (crash, dropped SSH
    session), for which the operating system keeps the written data.

    Raises
    ------
    OSError
        When the state folder cannot be written.
    """
    payload = {
        "tri_journal": JOURNAL_VERSION,
        "path": None if path is None else str(Path(path).expanduser().resolve()),
        "base_digest": base_digest,
        "written_utc": _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds"),
        "edits": edits,
        "owner": _this_owner(),
        "schedule": schedule_to_data(schedule),
    }
    _private_folder(target.parent)
    fd, tmp = tempfile.mkstemp(prefix=".journal.", suffix=".tmp", dir=target.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            json.dump(payload, fh)
        os.replace(tmp, target)
        tmp = ""
    finally:
        if tmp:
            with contextlib.suppress(OSError):
                os.unlink(tmp)


def _checked(schedule: Schedule) -> bool:
    """True when ``schedule`` passes the loader's rules (a journal can be damaged by hand)."""
    from tri.schedule.load import parse_schedule  # late: load imports nothing from here
    from tri.schedule.save import schedule_text

    try:
        parse_schedule(schedule_text(schedule))
    except Exception:  # any failure on damaged data means: do not trust it
        return False
    return True


def read_journal(target: Path) -> JournalEntry | None:
    """The journal at ``target``, or ``None`` when absent, unreadable or not a valid schedule."""
    payload = _read_payload(target)
    if payload is None:
        return None
    try:
        schedule = schedule_from_data(payload["schedule"])
        path, digest = payload.get("path"), payload.get("base_digest")
        entry = JournalEntry(
            schedule=schedule,
            path=None if path is None else str(path),
            base_digest=None if digest is None else str(digest),
            written_utc=str(payload.get("written_utc", "")),
            edits=int(payload.get("edits", 0) or 0),
        )
    except (ValueError, KeyError, TypeError):
        return None
    return entry if _checked(schedule) else None


def discard_journal(target: Path) -> None:
    """Delete the journal (after a save, or when the user discards it)."""
    with contextlib.suppress(OSError):
        target.unlink()
