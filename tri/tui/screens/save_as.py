"""Save as: ask for a file name, validated as you type."""

from __future__ import annotations

from pathlib import Path

from tri.tui.screens.form import Field, FormScreen, Values
from tri.tui.session import Session


def save_as_form(session: Session) -> FormScreen:
    """A one-field form returning the chosen :class:`Path`."""
    if session.path is not None:
        initial = str(session.path)
    else:
        stem = session.source_name or session.schedule.panel.name or "panel"
        initial = stem.replace(" ", "_").lower() + ".toml"

    def validate(values: Values) -> tuple[Path | None, dict[str, str]]:
        text = values["path"].strip()
        if not text:
            return None, {"path": "type a file name ending in .toml"}
        path = Path(text).expanduser()
        if path.suffix.lower() != ".toml":
            return None, {"path": "expected a name ending in .toml"}
        if path.is_dir():
            return None, {"path": "that is a folder; add a file name"}
        folder = path.parent if str(path.parent) else Path(".")
        if not folder.is_dir():
            return None, {"path": f"no folder {folder}"}
        if path.exists() and path != session.path:
            return path, {}
        return path, {}

    return FormScreen(
        "Save as",
        [Field("path", "File", initial, hint="name.toml")],
        validate,
        help_text="Saving over an existing file keeps the old one as NAME.toml.bak.",
    )
