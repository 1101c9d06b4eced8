"""Recently opened schedules, kept under ``$XDG_STATE_HOME/tri/recent.json``."""

from __future__ import annotations

import contextlib
import json
import os
import tempfile
from pathlib import Path

from tri.schedule.journal import state_dir

RECENT_LIMIT = 10


def recent_file() -> Path:
    """Where the list is kept."""
    return state_dir() / "recent.json"


def load_recent() -> list[Path]:
    """Recent schedule files, newest first, only those that still exist."""
    try:
        data = json.loads(recent_file().read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return []
    if not isinstance(data, list):
        return []
    out = [Path(x) for x in data if isinstance(x, str)]
    return [p for p in out if p.is_file()][:RECENT_LIMIT]


def remember(path: Path) -> None:
    """Put ``path`` first in the list; never raises (the list is a convenience)."""
    try:
        absolute = path.expanduser().resolve()
        items = [absolute, *[p for p in load_recent() if p != absolute]][:RECENT_LIMIT]
        target = recent_file()
        target.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=".recent.", suffix=".tmp", dir=target.parent)
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            json.dump([str(p) for p in items], fh, indent=1)
        os.replace(tmp, target)
    except OSError:
        with contextlib.suppress(OSError, UnboundLocalError):
            os.unlink(tmp)


def load_settings() -> dict[str, str]:
    """Small UI settings (the theme), ``{}`` when none are stored."""
    try:
        data = json.loads((state_dir() / "settings.json").read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    return {str(k): str(v) for k, v in data.items()} if isinstance(data, dict) else {}


def store_setting(key: str, value: str) -> None:
    """Remember one setting; never raises."""
    settings = load_settings()
    settings[key] = value
    with contextlib.suppress(OSError):
        state_dir().mkdir(parents=True, exist_ok=True)
        (state_dir() / "settings.json").write_text(json.dumps(settings), encoding="utf-8")
