"""Save a building into a new folder: one file per panel, laid out as the inputs are.

A building's panels are separate files whose ``feeds`` keys name each
other by paths relative to the file that holds them. :func:`save_tree`
writes every panel into one new (or empty) folder at the same path relative
to the folder common to every input, so each ``feeds`` (and each relative
``[log] file``) written resolves to the written copy exactly as it did to
the input: the folder is a building of its own, and ``diff -r`` against the
inputs shows only what changed. A panel whose schedule changed is saved
through the round-trip saver (:func:`tri.schedule.save.save_schedule`,
comments and untouched text kept); every other file (unchanged panels,
logger exports) is copied byte for byte. The inputs are never written:
the folder must be new or empty.
"""

from __future__ import annotations

import os
import shutil
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

from tri.schedule.errors import ScheduleError, ScheduleIssue
from tri.schedule.model import Schedule
from tri.schedule.save import save_schedule
from tri.schedule.tree import ScheduleTree


@dataclass(frozen=True)
class WrittenPanel:
    """One panel as written.

    Attributes
    ----------
    source : str
        The input file as the building names it.
    written : Path
        The file written.
    changed : bool
        True when its schedule changed (saved through the saver), False when
        copied as it is.
    """

    source: str
    written: Path
    changed: bool


def _fail(folder: str, message: str) -> ScheduleError:
    return ScheduleError([ScheduleIssue(message, folder)])


def check_tree_folder(folder: str) -> None:
    """Refuse a folder the building cannot be written into (a :class:`ValueError` saying why).

    Accepted: a folder that does not exist yet in an existing folder, or an
    empty folder. Refused: a file, a folder with anything in it (which is
    where the inputs' own folders end: their files are never overwritten),
    a missing parent folder, a name ending in ``.toml`` (a building is one
    file per panel).
    """
    out = Path(folder)
    if folder.lower().endswith(".toml") and not out.is_dir():
        raise ValueError(
            "a building is written as one file per panel; give a new or empty folder, "
            "not a file name",
        )
    if out.exists() and not out.is_dir():
        raise ValueError("exists and is not a folder; give a new or empty folder")
    if out.is_dir():
        try:
            entries = next(os.scandir(out), None)
        except OSError as exc:
            raise ValueError(f"cannot read the folder: {exc.strerror or exc}") from None
        if entries is not None:
            raise ValueError(
                "folder is not empty; give a new or empty folder (a building's files, "
                "its inputs included, are never overwritten)",
            )
        return
    parent = out.parent if str(out.parent) else Path(".")
    if not parent.is_dir():
        raise ValueError(f"folder {parent} does not exist")


def _log_file(path: Path, schedule: Schedule) -> Path | None:
    """The panel's logger export when named by a relative path (it is copied with it)."""
    if schedule.log is None or os.path.isabs(schedule.log.file):
        return None
    return Path(os.path.normpath(path.parent / schedule.log.file))


def _layout(tree: ScheduleTree, schedules: Sequence[Schedule]) -> tuple[Path, list[Path]]:
    """The folder common to every input and each panel's (and log's) path below it."""
    logs = [
        log
        for p, s in zip(tree.panels, schedules, strict=True)
        if (log := _log_file(p.path, s)) is not None
    ]
    files = [p.path for p in tree.panels] + logs
    common = Path(os.path.commonpath([str(f.parent) for f in files]))
    return common, files


def _check_links(tree: ScheduleTree, common: Path, folder: Path) -> None:
    """Every ``feeds`` written must name the written child (not so through a symbolic link)."""
    for j, child in enumerate(tree.panels):
        feeder = tree.feeder_circuit(j)
        if feeder is None or feeder.feed is None or child.parent is None:
            continue
        parent = tree.panels[child.parent]
        written_parent = folder / parent.path.relative_to(common)
        via_feeds = os.path.normpath(written_parent.parent / feeder.feed.path)
        if via_feeds != os.path.normpath(folder / child.path.relative_to(common)):
            raise _fail(
                parent.shown,
                f"feeds {feeder.feed.path} reaches {child.shown} through a symbolic link; "
                "the building cannot be written into another folder with its feeds unchanged",
            )


def save_tree(
    tree: ScheduleTree, schedules: Sequence[Schedule], folder: str | Path
) -> tuple[WrittenPanel, ...]:
    """Write the building with each panel's schedule replaced into ``folder``.

    Parameters
    ----------
    tree : ScheduleTree
        The building as read (its files, documents and links).
    schedules : sequence of Schedule
        One per panel of ``tree``, in its order (after the edits).
    folder : str or Path
        A new or empty folder (:func:`check_tree_folder`); created if needed.

    Returns
    -------
    tuple of WrittenPanel
        One per panel, in the building's order.

    Raises
    ------
    ValueError
        A folder refused (:func:`check_tree_folder`).
    ScheduleError
        A link that cannot be kept (located at the parent), or the disk refusing.
    """
    check_tree_folder(str(folder))
    out = Path(folder)
    common, files = _layout(tree, schedules)
    _check_links(tree, common, out)
    try:
        out.mkdir(exist_ok=True)
        for f in files:
            (out / f.relative_to(common)).parent.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise _fail(str(folder), f"cannot create the folder: {exc.strerror or exc}") from None
    written = []
    for p, schedule in zip(tree.panels, schedules, strict=True):
        target = out / p.path.relative_to(common)
        changed = schedule != p.schedule
        if changed:
            save_schedule(target, schedule, p.loaded.document)
        else:
            _copy(p.path, target, p.shown)
        written.append(WrittenPanel(p.shown, target, changed))
    for log in files[len(tree.panels) :]:
        if log.is_file():  # a missing export is reported when the copy is analysed
            _copy(log, out / log.relative_to(common), str(log))
    return tuple(written)


def _copy(source: Path, target: Path, shown: str) -> None:
    try:
        shutil.copyfile(source, target)
    except OSError as exc:
        raise _fail(shown, f"cannot copy to {target}: {exc.strerror or exc}") from None
