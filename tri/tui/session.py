"""The editing session behind the UI: the current schedule, undo/redo, saving, journal.

Every edit replaces the immutable :class:`~tri.schedule.model.Schedule` with a
new one and pushes the old one on the undo stack, so undo and redo are exact
and cheap. Nothing here imports textual; the UI calls these methods and
renders what they return.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from tomlkit.toml_document import TOMLDocument

from tri.schedule.errors import ScheduleError, ScheduleIssue
from tri.schedule.journal import (
    discard_journal,
    file_digest,
    journal_path,
    write_journal,
)
from tri.schedule.load import ScheduleFile, build_schedule
from tri.schedule.model import Schedule
from tri.schedule.save import save_schedule
from tri.schedule.validate import check_schedule

UNDO_LIMIT = 500


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

    @property
    def journal_file(self) -> Path:
        """Where this session's journal lives."""
        return journal_path(self.path, self.schedule.panel.name)

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
            if self.dirty:
                write_journal(
                    self.journal_file, self.schedule, self.path, self.base_digest, self.edits
                )
            else:
                discard_journal(self.journal_file)
            self.journal_error = None
        except OSError as exc:
            self.journal_error = f"autosave journal not written: {exc.strerror or exc}"

    def save(self, path: Path | None = None) -> Path:
        """Save to ``path`` (default: the session's own path), atomically, keeping comments.

        Raises
        ------
        ScheduleError
            When there is no path, the schedule has problems, or the disk refuses.
        """
        target = path or self.path
        if target is None:
            raise ScheduleError([ScheduleIssue("no file name yet; use save as")])
        problems = check_schedule(self.schedule)
        if problems:
            raise ScheduleError(problems)
        old_journal = self.journal_file
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
        discard_journal(old_journal)
        discard_journal(self.journal_file)
        return target
