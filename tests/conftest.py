"""Shared fixtures: a private state folder for every test, and the UI tests' small panel."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

TUI_DATA = Path(__file__).parent / "data" / "tui"


@pytest.fixture(autouse=True)
def _state(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """Journal and recent files go to the test's own folder, never the user's."""
    monkeypatch.setenv("XDG_STATE_HOME", str(tmp_path / "state"))


@pytest.fixture
def small(tmp_path: Path) -> Path:
    """A writable copy of the UI tests' small 208Y/120 panel."""
    target = tmp_path / "small.toml"
    shutil.copy(TUI_DATA / "small.toml", target)
    return target
