"""The autosave journal: private, owned, never overwritten by a second tri (issue 10).

A second running tri is simulated by a journal whose owner is another live
process on this host (this test's parent process); a tri that stopped, by
the process id of a child that has exited.
"""

from __future__ import annotations

import json
import os
import stat
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import pytest

from tri.schedule.journal import (
    choose_journal,
    journal_path,
    read_journal,
    state_dir,
    write_journal,
)
from tri.schedule.load import ScheduleFile, load_schedule
from tri.schedule.model import Schedule
from tri.tui.session import Session

SMALL = Path(__file__).parent / "data" / "tui" / "small.toml"


def _dead_pid() -> int:
    child = subprocess.Popen([sys.executable, "-c", "pass"])
    child.wait()
    return child.pid


def _write_owned_by(target: Path, schedule: object, pid: int) -> None:
    write_journal(target, schedule, SMALL, None, 1)  # type: ignore[arg-type]
    payload = json.loads(target.read_text())
    payload["owner"]["pid"] = pid
    target.write_text(json.dumps(payload))


@pytest.fixture
def panel(tmp_path: Path) -> Path:
    path = tmp_path / "small.toml"
    path.write_bytes(SMALL.read_bytes())
    return path


def _edited(session: Session) -> None:
    s = session.schedule
    session.apply(s.with_circuit(0, replace(s.circuits[0], name="Edited here")), "rename")


def test_journal_files_and_folders_are_private(panel: Path) -> None:
    session = Session.from_file(load_schedule(panel))
    _edited(session)
    journal = session.journal_file
    assert stat.S_IMODE(journal.stat().st_mode) == 0o600
    assert stat.S_IMODE(journal.parent.stat().st_mode) == 0o700
    assert stat.S_IMODE(state_dir().stat().st_mode) == 0o700
    assert json.loads(journal.read_text())["owner"]["pid"] == os.getpid()


def test_a_second_tri_keeps_its_own_journal(panel: Path) -> None:
    loaded = load_schedule(panel)
    primary = journal_path(panel)
    other = replace(loaded.schedule, panel=replace(loaded.schedule.panel, name="Theirs"))
    _write_owned_by(primary, other, os.getppid())  # a live tri that is not us
    before = primary.read_bytes()

    choice = choose_journal(panel)
    assert choice.path != primary and choice.inherited is None
    assert choice.other_editor == f"process {os.getppid()} on {os.uname().nodename}"

    session = Session.from_file(loaded)
    _edited(session)
    assert session.journal_file != primary and session.journal_file.exists()
    assert primary.read_bytes() == before, "the other tri's journal is untouched"
    assert session.journal_error is not None and "also open in another tri" in (
        session.journal_error
    )
    session.save()
    assert primary.read_bytes() == before, "saving removes only our own journal"
    assert not any(p != primary for p in primary.parent.glob("*.tri-journal"))


def _crashed(panel: Path) -> tuple[ScheduleFile, Path, Schedule]:
    """A journal of other edits of ``panel`` left by a tri that has stopped."""
    loaded = load_schedule(panel)
    primary = journal_path(panel)
    theirs = replace(loaded.schedule, panel=replace(loaded.schedule.panel, name="Crashed"))
    _write_owned_by(primary, theirs, _dead_pid())
    return loaded, primary, theirs


def test_a_journal_left_by_a_tri_that_stopped_is_offered(panel: Path) -> None:
    loaded, primary, theirs = _crashed(panel)
    session = Session.from_file(loaded)
    assert session.journal_file == primary  # what the UI reads to offer recovery
    entry = read_journal(session.journal_file)
    assert entry is not None and entry.schedule == theirs


def test_a_journal_kept_for_later_is_not_overwritten_by_new_edits(panel: Path) -> None:
    loaded, primary, _ = _crashed(panel)
    before = primary.read_bytes()
    session = Session.from_file(loaded)
    _edited(session)  # the user chose "decide later" and edited instead
    assert primary.read_bytes() == before
    assert session.journal_file != primary
    session.save()
    assert primary.read_bytes() == before, "still there to recover later"


def test_recovering_carries_on_in_the_recovered_journal(panel: Path) -> None:
    loaded, primary, theirs = _crashed(panel)
    session = Session.from_file(loaded)
    session.apply(theirs, "recover unsaved edits")
    assert session.journal_file == primary
    assert json.loads(primary.read_text())["owner"]["pid"] == os.getpid()
    session.save()
    assert not primary.exists()


def test_a_damaged_journal_is_not_trusted(panel: Path) -> None:
    target = journal_path(panel)
    write_journal(target, load_schedule(panel).schedule, panel, None, 1)
    payload = json.loads(target.read_text())
    payload["schedule"]["circuits"][0]["name"] = "Fryer\x1b[2J"
    target.write_text(json.dumps(payload))
    assert read_journal(target) is None
    payload["schedule"]["circuits"][0]["name"] = "Fryer"
    payload["schedule"]["circuits"][0]["load_value"] = 1e308
    target.write_text(json.dumps(payload))
    assert read_journal(target) is None


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs FIFOs")
def test_a_journal_replaced_by_a_fifo_is_ignored_at_once(panel: Path) -> None:
    target = journal_path(panel)
    target.parent.mkdir(parents=True, exist_ok=True)
    os.mkfifo(target)
    assert read_journal(target) is None
