"""Write failures lose nothing; a saved file keeps its mode; stale temporary files go (issue 10).

Each failure is checked the same way: a located error (exit 2 from the
command line), the target's bytes unchanged, the backup unchanged, and no
temporary file left behind.
"""

from __future__ import annotations

import errno
import os
import re
import shutil
import signal
import stat
import subprocess
import sys
import time
from pathlib import Path

import pytest
from cli_support import assert_clean_error, run_tri

from tri.schedule import atomic
from tri.schedule.atomic import STALE_AFTER_S, remove_stale_temps, write_atomic
from tri.schedule.errors import ScheduleError

DEMO = Path(__file__).parents[1] / "tri" / "panels_demo" / "bakery_208.toml"
OLD = "old contents\n"


def _temps(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


@pytest.fixture
def target(tmp_path: Path) -> Path:
    path = tmp_path / "p.toml"
    path.write_text(OLD)
    (tmp_path / "p.toml.bak").write_text("older backup\n")
    return path


def _assert_nothing_lost_but_temps(target: Path) -> None:
    assert target.read_text() == OLD
    assert (target.parent / "p.toml.bak").read_text() == "older backup\n"


def _assert_nothing_lost(target: Path) -> None:
    assert target.read_text() == OLD
    assert (target.parent / "p.toml.bak").read_text() == "older backup\n"
    assert _temps(target.parent) == []


def test_a_full_disk_loses_nothing(target: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    def full(fd: int, data: object) -> int:
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(atomic.os, "write", full)
    with pytest.raises(
        ScheduleError, match=re.escape("No space left on device; p.toml was not changed")
    ):
        write_atomic(target, "new contents\n")
    monkeypatch.undo()
    _assert_nothing_lost(target)


@pytest.mark.parametrize("code", [errno.EROFS, errno.EACCES])
def test_a_folder_that_cannot_be_written_loses_nothing(
    target: Path, monkeypatch: pytest.MonkeyPatch, code: int
) -> None:
    real_open = os.open

    def refuse(path: object, flags: int, mode: int = 0o777) -> int:
        if flags & os.O_CREAT:
            raise OSError(code, os.strerror(code))
        return real_open(path, flags, mode)

    monkeypatch.setattr(atomic.os, "open", refuse)
    with pytest.raises(
        ScheduleError, match=re.escape("(the folder cannot be written); p.toml was not changed")
    ):
        write_atomic(target, "new contents\n")
    monkeypatch.undo()
    _assert_nothing_lost(target)


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes into read-only folders")
def test_a_really_read_only_folder(target: Path) -> None:
    target.parent.chmod(0o555)
    try:
        with pytest.raises(ScheduleError, match="cannot save"):
            write_atomic(target, "new contents\n")
    finally:
        target.parent.chmod(0o755)
    _assert_nothing_lost(target)


def test_a_target_replaced_by_a_folder(tmp_path: Path) -> None:
    folder = tmp_path / "p.toml"
    folder.mkdir()
    with pytest.raises(
        ScheduleError, match=re.escape("it is a folder, expected a file; nothing was")
    ):
        write_atomic(folder, "new\n")
    assert folder.is_dir() and list(folder.iterdir()) == []
    assert _temps(tmp_path) == []


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="needs /dev/full")
def test_dev_full_as_the_target_is_refused_and_kept_a_device() -> None:
    with pytest.raises(ScheduleError, match=re.escape("a device or pipe, not a regular file")):
        write_atomic("/dev/full", "new\n")
    assert stat.S_ISCHR(os.stat("/dev/full").st_mode)


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="needs /dev/full")
def test_suggest_write_to_dev_full_exits_2(tmp_path: Path) -> None:
    r = run_tri("suggest", str(DEMO), "--write", "/dev/full", "--time-limit", "2")
    assert r.returncode == 2, r.stderr
    assert "not a regular file" in r.stderr
    assert stat.S_ISCHR(os.stat("/dev/full").st_mode)


def test_a_backup_that_is_a_folder_stops_the_save(target: Path) -> None:
    bak = target.parent / "p.toml.bak"
    bak.unlink()
    bak.mkdir()
    with pytest.raises(
        ScheduleError, match=re.escape("cannot keep the previous version as p.toml.bak")
    ):
        write_atomic(target, "new\n")
    assert target.read_text() == OLD and bak.is_dir()
    assert _temps(target.parent) == []


def test_tri_new_into_a_missing_folder_exits_2(tmp_path: Path) -> None:
    r = run_tri("new", str(tmp_path / "no" / "such" / "p.toml"), "--system", "208Y/120")
    assert_clean_error(r)
    assert "No such file or directory" in r.stderr


# ---------------------------------------------------------------- modes and links


def test_a_saved_file_keeps_its_mode_and_the_backup_its_own(target: Path) -> None:
    target.chmod(0o640)
    bak = write_atomic(target, "new\n")
    assert stat.S_IMODE(target.stat().st_mode) == 0o640
    assert bak is not None and stat.S_IMODE(bak.stat().st_mode) == 0o640
    assert bak.read_text() == OLD


def test_a_private_file_stays_private(target: Path) -> None:
    target.chmod(0o600)
    write_atomic(target, "new\n")
    assert stat.S_IMODE(target.stat().st_mode) == 0o600
    assert stat.S_IMODE((target.parent / "p.toml.bak").stat().st_mode) == 0o600


def test_a_new_file_follows_the_umask(tmp_path: Path) -> None:
    old = os.umask(0o027)
    try:
        write_atomic(tmp_path / "fresh.toml", "x\n")
    finally:
        os.umask(old)
    assert stat.S_IMODE((tmp_path / "fresh.toml").stat().st_mode) == 0o640  # 0666 & ~0027


def test_a_symbolic_link_is_followed_and_kept(tmp_path: Path) -> None:
    real = tmp_path / "real.toml"
    real.write_text(OLD)
    link = tmp_path / "link.toml"
    link.symlink_to(real)
    write_atomic(link, "new\n")
    assert link.is_symlink() and real.read_text() == "new\n"
    assert (tmp_path / "real.toml.bak").read_text() == OLD


# ---------------------------------------------------------------- interrupted saves


def _age(path: Path, seconds: float) -> None:
    then = time.time() - seconds
    os.utime(path, (then, then))


def test_a_stale_temporary_file_is_removed_by_the_next_save(target: Path) -> None:
    stale = target.parent / ".p.toml.0badf00d.tmp"
    stale.write_text("half a save")
    _age(stale, STALE_AFTER_S + 5)
    other = target.parent / ".q.toml.0badf00d.tmp"  # another file's: not ours to remove
    other.write_text("x")
    _age(other, STALE_AFTER_S + 5)
    write_atomic(target, "new\n")
    assert not stale.exists() and other.exists()


@pytest.mark.skipif(atomic.fcntl is None, reason="needs file locks")
def test_a_temporary_file_being_written_is_left_alone(target: Path) -> None:
    import fcntl

    busy = target.parent / ".p.toml.feedbeef.tmp"
    with open(busy, "w") as fh:
        fcntl.flock(fh.fileno(), fcntl.LOCK_EX)
        _age(busy, STALE_AFTER_S + 5)
        assert remove_stale_temps(target) == []
        assert busy.exists()


KILLED_SAVE = """
import os, signal, sys
from tri.schedule import atomic
atomic.os.replace = lambda *a: os.kill(os.getpid(), signal.SIGKILL)
atomic.write_atomic(sys.argv[1], "new contents\\n")
"""


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL")
def test_a_save_killed_before_the_rename_leaves_the_file_whole(target: Path) -> None:
    # A real process is killed between writing the temporary file and renaming it.
    r = subprocess.run([sys.executable, "-c", KILLED_SAVE, str(target)], timeout=60)
    assert r.returncode == -signal.SIGKILL
    _assert_nothing_lost_but_temps(target)
    left = [target.parent / n for n in _temps(target.parent)]
    assert "new contents\n" in [p.read_text() for p in left]
    for p in left:
        _age(p, STALE_AFTER_S + 5)
    write_atomic(target, "next\n")
    assert _temps(target.parent) == [] and target.read_text() == "next\n"


def test_a_demo_saved_over_a_copy_keeps_its_bytes(tmp_path: Path) -> None:
    copy = tmp_path / DEMO.name
    shutil.copy(DEMO, copy)
    r = run_tri("suggest", str(copy), "--write", str(copy), "--time-limit", "2")
    assert r.returncode in (0, 1), r.stderr
    assert (tmp_path / f"{DEMO.name}.bak").read_bytes() == DEMO.read_bytes()
    assert _temps(tmp_path) == []
