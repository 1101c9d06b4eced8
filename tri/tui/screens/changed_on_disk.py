"""Ask what to do when the file changed on disk since it was opened (another editor, git pull).

Saving over a file someone else changed would silently throw their change
away, so :meth:`~tri.tui.session.Session.save` refuses with
:class:`~tri.tui.session.FileChangedOnDisk` and the UI asks here:

- ``o`` overwrite it with these edits (the version on disk is kept as ``FILE.bak``);
- ``a`` save these edits under another name;
- ``r`` reopen the file from disk (these edits stay in the autosave journal,
  which the reopened file offers to recover);
- Esc: save nothing and keep editing.

The app calls :func:`ask_about_changed_file` where saving raised
:class:`~tri.tui.session.FileChangedOnDisk`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from tri.tui.screens.choice import ChoiceScreen

OVERWRITE, SAVE_AS, RELOAD = "overwrite", "save-as", "reload"


def changed_on_disk_screen(name: str) -> ChoiceScreen:
    """The question, for the file called ``name``."""
    return ChoiceScreen(
        f"{name} changed on disk",
        f"{name} was changed by another program since you opened it (another editor, "
        "a git pull, a second tri). Saving now would replace that change.",
        [
            (
                "o",
                f"overwrite it with my edits (the version on disk is kept as {name}.bak)",
                OVERWRITE,
            ),
            ("a", "save my edits under another name", SAVE_AS),
            ("r", "reopen it from disk (my edits stay in the autosave journal)", RELOAD),
        ],
        cancel=None,
        cancel_label="save nothing, keep editing",
    )


def ask_about_changed_file(app: Any, path: Path, then_quit: bool = False) -> None:
    """Ask, then do what was chosen, through the app's own save, save-as and open.

    Parameters
    ----------
    app : TriApp
        The running app (its ``session``, ``_save_to``, ``action_save_as``,
        ``open_path`` and ``set_status`` are used).
    path : Path
        The session's file.
    then_quit : bool
        Quit after a successful save (the quit dialog's "save, then quit").
    """

    def chosen(value: str | None) -> None:
        session = app.session
        if session is None:
            return
        if value == OVERWRITE:
            session.accept_disk_version()
            app._save_to(path, then_quit=then_quit)
        elif value == SAVE_AS:
            app.action_save_as(then_quit=then_quit)
        elif value == RELOAD:
            session.journal()
            app.open_path(path)
        else:
            app.set_status(f"Not saved: {path.name} changed on disk. Ctrl+S asks again.")

    app.push_screen(changed_on_disk_screen(path.name), chosen)
