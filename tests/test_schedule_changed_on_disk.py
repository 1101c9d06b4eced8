"""Saving never silently replaces a file that changed on disk since it was opened (issue 10).

The session refuses (nothing written); the dialog offers overwrite (the
version on disk kept as the backup), save under another name, or reopen
(the edits stay in the journal, which the reopened file offers back).
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest
from tui_support import settle

from tri.schedule.load import load_schedule
from tri.tui.app import TriApp
from tri.tui.screens.changed_on_disk import ask_about_changed_file
from tri.tui.screens.choice import ChoiceScreen
from tri.tui.screens.form import FormScreen
from tri.tui.screens.main import MainScreen
from tri.tui.session import FileChangedOnDisk, Session

OTHER_EDITOR = "\n# a line another editor added\n"


def _rename_first(session: Session, name: str = "Edited in tri") -> None:
    s = session.schedule
    session.apply(s.with_circuit(0, replace(s.circuits[0], name=name)), "rename")


def test_the_session_refuses_to_save_over_a_changed_file(small: Path) -> None:
    session = Session.from_file(load_schedule(small))
    _rename_first(session)
    with small.open("a") as fh:
        fh.write(OTHER_EDITOR)
    changed = small.read_bytes()
    with pytest.raises(FileChangedOnDisk, match="changed on disk since it was opened"):
        session.save()
    assert small.read_bytes() == changed, "nothing was written"
    assert session.dirty
    session.accept_disk_version()
    session.save()
    assert load_schedule(small).schedule.circuits[0].name == "Edited in tri"
    assert (small.parent / "small.toml.bak").read_bytes() == changed


def test_an_unchanged_file_and_save_as_are_not_questioned(small: Path, tmp_path: Path) -> None:
    session = Session.from_file(load_schedule(small))
    _rename_first(session)
    session.save()
    _rename_first(session, "Again")
    session.save()  # our own save is the new base
    with small.open("a") as fh:
        fh.write(OTHER_EDITOR)
    session.save(tmp_path / "elsewhere.toml")  # another file: the save-as form asks
    assert load_schedule(tmp_path / "elsewhere.toml").schedule.circuits[0].name == "Again"


async def _open_edited_and_changed(pilot: object, app: TriApp, small: Path) -> bytes:
    await settle(pilot)
    assert app.session is not None
    app.apply(
        app.session.schedule.with_circuit(
            0, replace(app.session.schedule.circuits[0], name="Edited in tri")
        ),
        "rename",
    )
    await settle(pilot)
    with small.open("a") as fh:
        fh.write(OTHER_EDITOR)
    return small.read_bytes()


async def _ask(pilot: object, app: TriApp, small: Path, key: str) -> None:
    """Ask about the changed file, then answer with ``key``."""
    ask_about_changed_file(app, small)
    await settle(pilot)
    assert isinstance(app.screen, ChoiceScreen)
    assert "small.toml changed on disk" in app.screen.title_text
    await pilot.press(key)  # type: ignore[attr-defined]
    await settle(pilot)


async def test_ctrl_s_on_a_changed_file_writes_nothing(small: Path) -> None:
    app = TriApp(small)
    async with app.run_test(size=(80, 24)) as pilot:
        changed = await _open_edited_and_changed(pilot, app, small)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert small.read_bytes() == changed
        assert app.session is not None and app.session.dirty
        # Ctrl+S itself asks what to do (the dialog, not only a status line).
        assert isinstance(app.screen, ChoiceScreen)
        assert "small.toml changed on disk" in app.screen.title_text
        await pilot.press("o")  # overwrite: the disk version is kept as the backup
        await settle(pilot)
    assert load_schedule(small).schedule.circuits[0].name == "Edited in tri"
    assert (small.parent / "small.toml.bak").read_bytes() == changed


async def test_dialog_overwrite_keeps_the_disk_version_as_backup(small: Path) -> None:
    app = TriApp(small)
    async with app.run_test(size=(80, 24)) as pilot:
        changed = await _open_edited_and_changed(pilot, app, small)
        await _ask(pilot, app, small, "o")
        assert isinstance(app.screen, MainScreen)
    assert load_schedule(small).schedule.circuits[0].name == "Edited in tri"
    assert (small.parent / "small.toml.bak").read_bytes() == changed


async def test_dialog_escape_saves_nothing(small: Path) -> None:
    app = TriApp(small)
    async with app.run_test(size=(80, 24)) as pilot:
        changed = await _open_edited_and_changed(pilot, app, small)
        await _ask(pilot, app, small, "escape")
        assert small.read_bytes() == changed
        assert app.session is not None and app.session.dirty


async def test_dialog_save_as_opens_the_save_as_form(small: Path) -> None:
    app = TriApp(small)
    async with app.run_test(size=(80, 24)) as pilot:
        changed = await _open_edited_and_changed(pilot, app, small)
        await _ask(pilot, app, small, "a")
        assert isinstance(app.screen, FormScreen)
        assert small.read_bytes() == changed


async def test_dialog_reopen_offers_the_edits_back(small: Path) -> None:
    app = TriApp(small)
    async with app.run_test(size=(80, 24)) as pilot:
        await _open_edited_and_changed(pilot, app, small)
        edited = app.session.schedule if app.session else None
        await _ask(pilot, app, small, "r")
        # The file is shown as it is on disk now, and the journal offers the edits.
        assert isinstance(app.screen, ChoiceScreen)
        assert "Recover unsaved edits?" in app.screen.title_text
        assert "changed on disk since" in app.screen.message
        await pilot.press("r")
        await settle(pilot)
        assert app.session is not None and app.session.schedule == edited
