"""The app's saving and quitting: Ctrl+S, save as, and the question before quitting.

A mixin of :class:`~tri.tui.app.TriApp`. Saving goes through the panel's
:class:`~tri.tui.session.Session` (comments kept, written atomically, the
changed-on-disk check first); a problem is shown naming the file, never a
traceback. Quitting asks first when any open panel (every panel of a
building) has unsaved edits.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any, Protocol

from tri.schedule.errors import ScheduleError
from tri.schedule.model import Schedule
from tri.tui import recent
from tri.tui.session import FileChangedOnDisk
from tri.tui.wording import issue_text


class _App(Protocol):
    """What the mixin uses of :class:`~tri.tui.app.TriApp` (its own and textual's App)."""

    session: Any
    quitting: bool

    def set_status(self, text: str, error: bool = False) -> None: ...
    def show_problems(
        self, title: str, exc: ScheduleError, file_name: str = "", schedule: Schedule | None = None
    ) -> None: ...
    def refresh_screens(self, title_only: bool = False) -> None: ...
    def unsaved_sessions(self) -> list[Any]: ...
    def save_all_then_quit(self) -> None: ...
    def exit(self, *args: Any, **kwargs: Any) -> None: ...
    def push_screen(self, *args: Any, **kwargs: Any) -> Any: ...
    def action_save_as(self: _App, then_quit: bool = False) -> None: ...
    def _save_to(self: _App, path: Path, then_quit: bool = False) -> bool: ...


class SavingActions:
    """Save, save as and quit (``session``, ``set_status`` ... are the app's, see :class:`_App`)."""

    session: Any
    quitting: bool

    def action_save(self: _App) -> None:
        """Save to the file (asks for a name for an untitled copy)."""
        if self.session is None:
            return
        if self.session.path is None:
            self.action_save_as()
            return
        self._save_to(self.session.path)

    def _save_to(self: _App, path: Path, then_quit: bool = False) -> bool:
        assert self.session is not None
        try:
            self.session.save(path)
        except FileChangedOnDisk:
            from tri.tui.screens.changed_on_disk import ask_about_changed_file

            self.set_status(f"{path.name} changed on disk since it was opened; nothing written.")
            ask_about_changed_file(self, path, then_quit)
            return False
        except ScheduleError as exc:
            shown = self.session.schedule
            first = issue_text(exc.issues[0], path.name, shown) if exc.issues else str(exc)
            self.set_status(f"{path.name} not saved: {first}", error=True)
            self.show_problems(f"{path.name} not saved", exc, path.name, shown)
            return False
        recent.remember(path)
        self.set_status(f"Saved {path.name} (previous version kept as {path.name}.bak).")
        self.refresh_screens()
        if then_quit:
            self.exit(0)
        return True

    def action_save_as(self: _App, then_quit: bool = False) -> None:
        """Ask for a file name, then save there."""
        from tri.tui.screens.save_as import save_as_form

        if self.session is None:
            return

        def chosen(path: Path | None) -> None:
            if path is not None:
                self._save_to(path, then_quit=then_quit)

        self.push_screen(save_as_form(self.session), chosen)

    async def action_quit(self: _App) -> None:
        """Ctrl+Q from anywhere: asks first when any open panel has unsaved edits."""
        from tri.tui.screens.choice import ChoiceScreen

        if self.quitting:
            return
        dirty = self.unsaved_sessions()
        if not dirty:
            self.exit(0)
            return
        self.quitting = True
        s = self.session
        several = len(dirty) > 1 or dirty[0] is not s

        def answer(value: str | None) -> None:
            self.quitting = False
            if value == "save" and several:
                self.save_all_then_quit()
            elif value == "save":
                self.action_save_as(then_quit=True) if s.path is None else self._save_to(
                    s.path, then_quit=True
                )
            elif value == "discard":
                for d in dirty:
                    d.saved = d.schedule
                    d.journal()  # nothing to keep: removes the journal
                self.exit(0)

        names = ", ".join(d.title_name for d in dirty)
        message = f"{names} {'have' if len(dirty) > 1 else 'has'} unsaved edits."
        save = "save every panel, then quit" if several else "save, then quit"
        self.push_screen(
            ChoiceScreen(
                "Quit tri?",
                message,
                [("s", save, "save"), ("d", "discard the edits and quit", "discard")],
                cancel=None,
            ),
            answer,
        )
