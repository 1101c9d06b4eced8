"""Write a file so that nothing is ever lost: temporary file, sync, rename, backup.

The new text goes to a temporary file beside the target, is synced to disk,
and is renamed over the target, so a crash, a kill or a full disk leaves
either the old file or the new one, never half of one. The previous version
is kept as ``FILE.bak`` (a hard link to the old file where the file system
allows, else a copy made the same careful way). The saved file keeps the
target's mode bits (and owner where allowed); a new file gets the usual
``0666`` less the umask. A target that is not a regular file (a folder, a
device such as ``/dev/full``) is refused, and a symbolic link is followed
to the file it names.

Temporary files are named ``.FILE.<random>.tmp`` and locked while written;
one left behind by a save that was killed is removed by the next save.
"""

from __future__ import annotations

import contextlib
import os
import secrets
import stat
import time
from pathlib import Path

from tri.schedule.errors import ScheduleError, ScheduleIssue

try:
    import fcntl
except ImportError:  # pragma: no cover - not on POSIX
    fcntl = None  # type: ignore[assignment]

BACKUP_SUFFIX = ".bak"
#: A temporary file younger than this may still be being written [s].
STALE_AFTER_S = 2.0
#: Without file locks, a temporary file is only taken as stale after this long [s].
STALE_UNLOCKED_AFTER_S = 3600.0


def _problem(exc: OSError) -> str:
    reason = exc.strerror or str(exc)
    if exc.errno is not None and exc.errno in (13, 30):  # EACCES, EROFS
        reason += " (the folder cannot be written)"
    return reason


def _fail(path: str | Path, message: str, outcome: str = "") -> ScheduleError:
    outcome = outcome or f"{Path(path).name} was not changed"
    return ScheduleError([ScheduleIssue(f"{message}; {outcome}", file=str(path))])


def _real_target(path: Path) -> Path:
    """The file a save writes: ``path``, or the file a symbolic link there names."""
    return Path(os.path.realpath(path)) if path.is_symlink() else path


def _existing_mode(target: Path, shown: str | Path) -> os.stat_result | None:
    """The target's status (``None`` if absent); refuses anything but a regular file."""
    try:
        info = os.stat(target)
    except FileNotFoundError:
        return None
    except OSError as exc:
        raise _fail(shown, f"cannot save: {_problem(exc)}") from None
    if stat.S_ISDIR(info.st_mode):
        raise _fail(shown, "cannot save: it is a folder, expected a file", "nothing was written")
    if not stat.S_ISREG(info.st_mode):
        raise _fail(
            shown, "cannot save: it is a device or pipe, not a regular file", "nothing was written"
        )
    return info


def _temp_name(target: Path, kind: str = "") -> Path:
    return target.with_name(f".{target.name}.{kind}{secrets.token_hex(4)}.tmp")


def remove_stale_temps(target: Path) -> list[Path]:
    """Remove temporary files left beside ``target`` by saves that were interrupted.

    A temporary file is stale when no save holds its lock (or, where there
    are no locks, when it is an hour old) and it is a few seconds old.
    Returns what was removed; never raises.
    """
    removed: list[Path] = []
    try:
        candidates = list(target.parent.glob(f".{target.name}.*.tmp"))
    except OSError:
        return removed
    for tmp in candidates:
        with contextlib.suppress(OSError):
            if _is_stale(tmp):
                tmp.unlink()
                removed.append(tmp)
    return removed


def _is_stale(tmp: Path) -> bool:
    info = os.lstat(tmp)
    age = time.time() - info.st_mtime
    if not stat.S_ISREG(info.st_mode) or age < STALE_AFTER_S:
        return False
    if fcntl is None:
        return age >= STALE_UNLOCKED_AFTER_S
    fd = os.open(tmp, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        return False  # a save in progress holds it
    finally:
        os.close(fd)
    return True


def _open_locked(path: Path, mode: int) -> int:
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, mode)
    if fcntl is not None:
        with contextlib.suppress(OSError):
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    return fd


def _write_all(fd: int, data: bytes) -> None:
    view = memoryview(data)
    while view:
        written = os.write(fd, view)
        view = view[written:]
    os.fsync(fd)


def _match_target(fd: int, info: os.stat_result | None) -> None:
    """Give the new file the old one's mode bits, and its owner where allowed."""
    if info is None:
        return
    os.fchmod(fd, stat.S_IMODE(info.st_mode))
    if hasattr(os, "fchown"):
        with contextlib.suppress(OSError):
            os.fchown(fd, info.st_uid, info.st_gid)


def _keep_backup(target: Path, info: os.stat_result, shown: str | Path) -> Path:
    """``target`` as ``target.bak`` (atomically: link or copy to a temporary, then rename)."""
    bak = target.with_name(target.name + BACKUP_SUFFIX)
    with contextlib.suppress(FileNotFoundError):
        if not stat.S_ISREG(os.lstat(bak).st_mode):
            raise _fail(shown, f"cannot keep the previous version as {bak.name}: not a file there")
    tmp = _temp_name(target, "bak-")
    try:
        try:
            os.link(target, tmp)
        except OSError:
            fd = _open_locked(tmp, 0o600)
            try:
                _write_all(fd, target.read_bytes())
                _match_target(fd, info)
            finally:
                os.close(fd)
        os.replace(tmp, bak)
    finally:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
    return bak


def _sync_folder(folder: Path) -> None:
    with contextlib.suppress(OSError, AttributeError):
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


def write_atomic(path: str | Path, text: str, *, backup: bool = True) -> Path | None:
    """Write ``text`` (UTF-8) to ``path`` atomically; keep the previous file as ``path.bak``.

    Returns the backup path, if one was made.

    Raises
    ------
    ScheduleError
        When the target is not a regular file or the disk refuses (full,
        read-only, permission); the original file is untouched and no
        temporary file is left behind.
    """
    target = _real_target(Path(path))
    info = _existing_mode(target, path)
    remove_stale_temps(target)
    tmp = _temp_name(target)
    bak: Path | None = None
    fd = -1
    renamed = False
    try:
        fd = _open_locked(tmp, 0o600 if info is not None else 0o666)
        _write_all(fd, text.encode("utf-8"))
        _match_target(fd, info)
        if info is not None and backup:
            bak = _keep_backup(target, info, path)
        os.replace(tmp, target)
        renamed = True
        _sync_folder(target.parent)
    except OSError as exc:
        raise _fail(path, f"cannot save: {_problem(exc)}") from None
    finally:
        if fd >= 0:
            os.close(fd)
        if not renamed:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
    return bak
