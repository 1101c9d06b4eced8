"""The `tri` command: help, version, new, report on demos, no tracebacks (issue 2)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from tri import __version__
from tri.schedule.load import load_schedule

ROOT = Path(__file__).parents[1]
DEMOS = sorted((ROOT / "panels_demo").glob("*.toml"))


def tri(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "tri", *args],
        capture_output=True,
        text=True,
        timeout=120,
        cwd=cwd,
    )


def test_version() -> None:
    r = tri("--version")
    assert r.returncode == 0
    assert r.stdout.strip() == f"tri {__version__}"


@pytest.mark.parametrize("command", ["", "new", "report", "check", "suggest", "open"])
def test_help_on_every_command(command: str) -> None:
    r = tri(*([command] if command else []), "--help")
    assert r.returncode == 0
    assert "usage: tri" in r.stdout


def test_top_level_help_carries_the_caution() -> None:
    out = tri("--help").stdout
    assert "de-energise" in out and "qualified person" in out


def test_new_creates_a_loadable_schedule(tmp_path: Path) -> None:
    target = tmp_path / "kitchen.toml"
    r = tri("new", str(target), "--system", "208Y/120", "--spaces", "42")
    assert r.returncode == 0, r.stderr
    s = load_schedule(target).schedule
    assert (s.panel.system, s.panel.spaces, s.circuits) == ("208Y/120", 42, ())
    again = tri("new", str(target), "--system", "208Y/120")
    assert again.returncode == 2
    assert "already exists" in again.stderr


def test_new_rail_board_defaults_to_iec_labels(tmp_path: Path) -> None:
    target = tmp_path / "board.toml"
    assert tri("new", str(target), "--system", "400Y/230", "--spaces", "24").returncode == 0
    panel = load_schedule(target).schedule.panel
    assert panel.phase_labels == ("L1", "L2", "L3")
    assert panel.layout == "phases"
    assert panel.frequency_hz == 50


@pytest.mark.parametrize(
    "args",
    [
        ["new", "x.toml", "--system", "999Y/1"],
        ["new", "x.toml", "--system", "208Y/120", "--spaces", "0"],
        ["new", "x.toml", "--system", "208Y/120", "--bus-a", "-5"],
        ["new", "x.txt", "--system", "208Y/120"],
        ["report"],
        ["report", "missing.toml"],
        ["report", "x.toml", "--format", "pdf"],
        ["frobnicate", "x.toml"],
    ],
)
def test_bad_command_lines_exit_2_cleanly(args: list[str], tmp_path: Path) -> None:
    r = tri(*args, cwd=tmp_path)
    assert r.returncode == 2, (r.stdout, r.stderr)
    assert "Traceback" not in r.stderr
    assert not (tmp_path / "x.toml").exists()


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.name)
def test_report_works_on_every_demo(path: Path) -> None:
    r = tri("report", str(path))
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip()
