"""The demo panels the start screen offers: where they are and how each is named."""

from __future__ import annotations

from pathlib import Path

from tri.schedule.errors import ScheduleError
from tri.schedule.load import load_schedule


def demo_folder() -> Path:
    """Where the demo panels live: ``tri/panels_demo/``, shipped inside the package.

    The same folder in a source checkout and in an installed wheel (it is
    package data, see ``pyproject.toml``).
    """
    return Path(__file__).resolve().parents[1] / "panels_demo"


def demo_files() -> list[Path]:
    """Demo schedules in :func:`demo_folder`, sorted by name."""
    folder = demo_folder()
    return sorted(folder.glob("*.toml")) if folder.is_dir() else []


def demo_labels(paths: list[Path]) -> list[str]:
    """:func:`demo_label` of each path; two alike each gain their file stem.

    Two demos of one panel (say, as scheduled and with a week's log) would
    otherwise be told apart only by their place in the list.
    """
    labels = [demo_label(p) for p in paths]
    return [
        f"{label} · {p.stem}" if labels.count(label) > 1 else label
        for p, label in zip(paths, labels, strict=True)
    ]


def demo_label(path: Path) -> str:
    """``"Panel name · system · N circuits"`` for a demo file (its stem if unreadable)."""
    from tri.tui.wording import plural

    try:
        s = load_schedule(path).schedule
    except ScheduleError:
        return path.stem
    return f"{s.panel.name} · {s.panel.system} · {plural(len(s.circuits), 'circuit')}"
