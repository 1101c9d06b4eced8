"""The editing session behind the UI: the current schedule, undo/redo, saving, journal.

Every edit replaces the immutable :class:`~tri.schedule.model.Schedule` with a
new one and pushes the old one on the undo stack, so undo and redo are exact
and cheap. Nothing here imports textual; the UI calls these methods and
renders what they return.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path

from tomlkit.toml_document import TOMLDocument

from tri.schedule.errors import ScheduleError, ScheduleIssue
from tri.schedule.journal import (
    JournalChoice,
    alternate_path,
    choose_journal,
    discard_journal,
    file_digest,
    journal_owner_running,
    read_journal,
    write_journal,
)
from tri.schedule.load import ScheduleFile, build_schedule
from tri.schedule.model import Schedule
from tri.schedule.save import save_schedule
from tri.schedule.validate import check_schedule

UNDO_LIMIT = 500


class FileChangedOnDisk(ScheduleError):
    """The file changed on disk (another editor, ``git pull``) since it was opened or saved.

    Nothing was written. :meth:`Session.accept_disk_version` and saving again
    overwrites it; the UI asks first (:mod:`tri.tui.screens.changed_on_disk`).
    """


@dataclass
class Session:
    """One open schedule.

    Attributes
    ----------
    schedule : Schedule
        What the user sees now.
    path : Path or None
        Where it is saved; ``None`` for an untitled copy (demo or new panel).
    document : TOMLDocument or None
        The document last read or written, kept so saving keeps comments.
    saved : Schedule or None
        The schedule as last read or written (``None`` if never saved).
    source_name : str
        What to call the schedule in the title when it has no path.
    """

    schedule: Schedule
    path: Path | None = None
    document: TOMLDocument | None = None
    saved: Schedule | None = None
    source_name: str = ""
    undo_stack: list[tuple[Schedule, str]] = field(default_factory=list)
    redo_stack: list[tuple[Schedule, str]] = field(default_factory=list)
    edits: int = 0
    base_digest: str | None = None
    journal_enabled: bool = True
    journal_error: str | None = None
    _journal: JournalChoice | None = field(default=None, repr=False, compare=False)
    _journal_key: tuple[str | None, str] | None = field(default=None, repr=False, compare=False)
    _inherit_open: bool = field(default=True, repr=False, compare=False)
    _notice: str | None = field(default=None, repr=False, compare=False)

    @classmethod
    def from_file(cls, loaded: ScheduleFile) -> Session:
        """A session on a schedule just loaded from disk."""
        return cls(
            schedule=loaded.schedule,
            path=loaded.path,
            document=loaded.document,
            saved=loaded.schedule,
            base_digest=file_digest(loaded.path),
        )

    @classmethod
    def untitled(cls, loaded: ScheduleFile, name: str) -> Session:
        """A session on an unsaved copy (a demo panel): saving asks for a file name."""
        return cls(
            schedule=loaded.schedule,
            path=None,
            document=loaded.document,
            saved=None,
            source_name=name,
        )

    # ------------------------------------------------------------ state

    @property
    def dirty(self) -> bool:
        """True when there is something to save."""
        return self.saved is None or self.schedule != self.saved

    @property
    def title_name(self) -> str:
        """File name (never a full path) or the untitled copy's name."""
        if self.path is not None:
            return self.path.name
        return f"{self.source_name or 'untitled'} (unsaved copy)"

    def _journal_choice(self) -> JournalChoice:
        """This session's journal files, chosen again when the file (or untitled name) changes."""
        untitled = self.schedule.panel.name if self.path is None else ""
        key = (None if self.path is None else str(self.path.expanduser().resolve()), untitled)
        if self._journal is None or self._journal_key != key:
            previous = self._journal
            choice = choose_journal(self.path, self.schedule.panel.name)
            if previous is not None:
                # After a save under another name (or an untitled rename) there is
                # nothing to inherit; the old journal was this session's own.
                choice = replace(choice, inherited=None)
                discard_journal(previous.path)
            if choice.other_editor:
                self._notice = (
                    f"{self.title_name} is also open in another tri ({choice.other_editor}); "
                    "each keeps its own autosave journal"
                )
            self._journal, self._journal_key = choice, key
        return self._journal

    @property
    def journal_file(self) -> Path:
        """This session's journal: at first a journal left by a tri that stopped, if any
        (the UI offers to recover it), then the session's own."""
        choice = self._journal_choice()
        if choice.inherited is not None and self._inherit_open:
            return choice.inherited
        return choice.path

    def _settle_inherited(self, choice: JournalChoice) -> bool:
        """Decide, at the first journal write, what becomes of an inherited journal.

        Recovered (the schedule is the journal's): carry on writing it.
        Discarded, or no different from the file: remove it. Kept for later
        (the user edited instead): leave it alone and write a journal of our own.
        Returns False when there is nothing more to write.
        """
        self._inherit_open = False
        inherited = choice.inherited
        assert inherited is not None
        entry = read_journal(inherited)
        if not self.dirty or (entry is not None and entry.schedule == self.saved):
            discard_journal(inherited)
            return self.dirty
        if entry is not None and entry.schedule == self.schedule:
            self._journal = replace(choice, path=inherited)
        return True

    # ------------------------------------------------------------ edits

    def apply(self, new: Schedule, label: str) -> None:
        """Make ``new`` current; the old schedule goes on the undo stack."""
        if new == self.schedule:
            return
        self.undo_stack.append((self.schedule, label))
        del self.undo_stack[:-UNDO_LIMIT]
        self.redo_stack.clear()
        self.schedule = new
        self.edits += 1
        self.journal()

    def undo(self) -> str | None:
        """Step back one edit; returns its label, or ``None`` when there is nothing to undo."""
        if not self.undo_stack:
            return None
        previous, label = self.undo_stack.pop()
        self.redo_stack.append((self.schedule, label))
        self.schedule = previous
        self.edits += 1
        self.journal()
        return label

    def redo(self) -> str | None:
        """Redo the last undone edit; returns its label, or ``None``."""
        if not self.redo_stack:
            return None
        following, label = self.redo_stack.pop()
        self.undo_stack.append((self.schedule, label))
        self.schedule = following
        self.edits += 1
        self.journal()
        return label

    # ------------------------------------------------------------ disk

    def journal(self) -> None:
        """Write (or clear) the autosave journal; never raises."""
        if not self.journal_enabled:
            return
        try:
            choice = self._journal_choice()
            if choice.inherited is not None and self._inherit_open:
                if not self._settle_inherited(choice):
                    return
                choice = self._journal_choice()
            target = choice.path
            if self.dirty:
                if target.exists() and journal_owner_running(target):
                    # Another tri started writing this name since: never overwrite it.
                    target = alternate_path(target)
                    self._journal = replace(choice, path=target)
                write_journal(target, self.schedule, self.path, self.base_digest, self.edits)
            else:
                discard_journal(target)
            self.journal_error, self._notice = self._notice, None
        except OSError as exc:
            self.journal_error = f"autosave journal not written: {exc.strerror or exc}"

    def _is_own_file(self, target: Path) -> bool:
        if self.path is None:
            return False
        return target.expanduser().resolve() == self.path.expanduser().resolve()

    def changed_on_disk(self) -> bool:
        """True when the session's file is no longer what was opened or last saved."""
        if self.path is None or self.base_digest is None:
            return False
        now = file_digest(self.path)
        return now is not None and now != self.base_digest

    def accept_disk_version(self) -> None:
        """Take the file as it is on disk now as the base, so that saving overwrites it."""
        self.base_digest = file_digest(self.path)

    def save(self, path: Path | None = None, *, overwrite_changed: bool = False) -> Path:
        """Save to ``path`` (default: the session's own path), atomically, keeping comments.

        Raises
        ------
        FileChangedOnDisk
            When saving over the session's own file and it changed on disk
            since it was opened or saved (unless ``overwrite_changed``).
        ScheduleError
            When there is no path, the schedule has problems, or the disk refuses.
        """
        target = path or self.path
        if target is None:
            raise ScheduleError([ScheduleIssue("no file name yet; use save as")])
        problems = check_schedule(self.schedule)
        if problems:
            raise ScheduleError([replace(p, file=str(target)) for p in problems])
        if not overwrite_changed and self._is_own_file(target) and self.changed_on_disk():
            raise FileChangedOnDisk(
                [
                    ScheduleIssue(
                        "changed on disk since it was opened (another editor, a git pull?); "
                        "nothing was written. Save your edits under another name, or "
                        "reopen the file to see the change (your edits stay in the journal)",
                        file=str(target),
                    )
                ]
            )
        # Only this session's own journal goes; one kept for later stays.
        old_journal = self._journal_choice().path if self.journal_enabled else None
        document = save_schedule(target, self.schedule, self.document)
        # Re-read what was written so every circuit knows its table in the new
        # document (new circuits must not be appended a second time next save).
        written = build_schedule(document.unwrap())
        self.document = document
        self.path = target
        self.schedule = written
        self.saved = written
        self.base_digest = file_digest(target)
        self.edits = 0
        if old_journal is not None:
            discard_journal(old_journal)
            discard_journal(self._journal_choice().path)
        return target
