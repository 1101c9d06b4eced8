"""The `tri` command: help, version, new, report on demos, no tracebacks (issues 2 and 10).

Most cases run the command in-process (``cli_support.run_tri``); the version,
one help, one report, the UI without a terminal and a full standard output
run the real command.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest
from cli_support import assert_clean_error, control_chars, run_tri, spawn_tri

from tri import __version__
from tri.schedule.load import load_schedule

ROOT = Path(__file__).parents[1]
DEMOS = sorted((ROOT / "tri" / "panels_demo").glob("*.toml"))


def test_version_from_the_real_command() -> None:
    r = spawn_tri("--version")
    assert r.returncode == 0
    assert r.stdout.strip() == f"tri {__version__}"


def test_help_from_the_real_command_carries_the_caution() -> None:
    r = spawn_tri("--help")
    assert r.returncode == 0
    assert "usage: tri" in r.stdout
    assert "de-energise" in r.stdout and "qualified person" in r.stdout


@pytest.mark.parametrize("command", ["new", "report", "check", "suggest", "open"])
def test_help_on_every_command(command: str) -> None:
    r = run_tri(command, "--help")
    assert r.returncode == 0
    assert f"usage: tri {command}" in r.stdout


def test_new_creates_a_loadable_schedule(tmp_path: Path) -> None:
    target = tmp_path / "kitchen.toml"
    r = run_tri("new", str(target), "--system", "208Y/120", "--spaces", "42")
    assert r.returncode == 0, r.stderr
    s = load_schedule(target).schedule
    assert (s.panel.system, s.panel.spaces, s.circuits) == ("208Y/120", 42, ())
    again = run_tri("new", str(target), "--system", "208Y/120")
    assert again.returncode == 2
    assert "already exists" in again.stderr


def test_new_rail_board_defaults_to_iec_labels(tmp_path: Path) -> None:
    target = tmp_path / "board.toml"
    assert run_tri("new", str(target), "--system", "400Y/230", "--spaces", "24").returncode == 0
    panel = load_schedule(target).schedule.panel
    assert panel.phase_labels == ("L1", "L2", "L3")
    assert panel.layout == "phases"
    assert panel.frequency_hz == 50


def test_new_keeps_the_given_ratings(tmp_path: Path) -> None:
    target = tmp_path / "p.toml"
    r = run_tri(
        "new", str(target), "--system", "480Y/277", "--bus-a", "400", "--main-a", "350",
        "--neutral-a", "800", "--labels", "L1,L2,L3", "--name", "MDP",
    )  # fmt: skip
    assert r.returncode == 0, r.stderr
    p = load_schedule(target).schedule.panel
    assert (p.name, p.bus_a, p.main_a, p.neutral_a) == ("MDP", 400, 350, 800)
    assert p.phase_labels == ("L1", "L2", "L3")


# Each: option values, and the words the error must hold (naming the option).
NEW_REFUSALS = [
    (["--spaces", "0"], "--spaces 0: found 0, expected 1 to 420"),
    (["--spaces", "1e3"], "--spaces 1e3: found 1000.0 (number), expected a whole number"),
    (["--bus-a", "-5"], "--bus-a -5: found -5, expected 1 to 10 000 A"),
    (["--bus-a", "inf"], "--bus-a inf: found inf, expected a finite number"),
    (["--bus-a", "1e309"], "--bus-a 1e309: found inf, expected a finite number"),
    (["--bus-a", "nan"], "--bus-a nan: found nan, expected a finite number"),
    (["--bus-a", "lots"], "--bus-a lots: found 'lots' (text), expected a number"),
    (["--main-a", "1e-320"], "--main-a 1e-320: found 1e-320, expected 1 to 10 000 A"),
    (["--neutral-a", "0.01"], "--neutral-a 0.01: found 0.01, expected 1 to 10 000 A"),
    (["--labels", "A,B"], "--labels A,B: found ['A', 'B'] (array), expected three labels"),
    (["--labels", "AAB"], "--labels AAB: found ('A', 'A', 'B'), expected three distinct"),
    (["--labels", "L1,L2,L3,L4"], "--labels L1,L2,L3,L4: found ['L1', 'L2', 'L3', 'L4']"),
    (["--labels", "a-b,c,d"], "expected labels of 1 to 3 letters or digits"),
    (["--labels", "A,N,C"], "'N' names the neutral"),
    (["--name", "Panel\x1b]0;owned\x07"], "which holds control characters (\\x1b, \\x07)"),
    (["--name", "x" * 201], "201 characters, expected at most 200"),
]


@pytest.mark.parametrize(("options", "words"), NEW_REFUSALS, ids=lambda v: str(v)[:30])
def test_new_checks_its_options_with_the_loader_rules(
    options: list[str], words: str, tmp_path: Path
) -> None:
    target = tmp_path / "x.toml"
    r = run_tri("new", str(target), "--system", "208Y/120", *options)
    assert_clean_error(r)
    assert words in r.stderr
    assert not target.exists()


@pytest.mark.parametrize(
    "args",
    [
        ["new", "x.txt", "--system", "208Y/120"],
        ["new", "x.toml", "--system", "999Y/1"],
        ["report"],
        ["report", "missing.toml"],
        ["report", "x.toml", "--format", "pdf"],
        ["frobnicate", "x.toml"],
        ["report", "x.toml", "--format", "\x1b[2J"],
    ],
)
def test_bad_command_lines_exit_2_cleanly(
    args: list[str], tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.chdir(tmp_path)
    r = run_tri(*args)
    assert r.returncode == 2, (r.stdout, r.stderr)
    assert "Traceback" not in r.stderr
    assert control_chars(r.stderr) == [], "argparse's messages are escaped too"
    assert not (tmp_path / "x.toml").exists()


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.name)
def test_report_works_on_every_demo(path: Path) -> None:
    r = run_tri("report", str(path))
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip()


def test_report_from_the_real_command() -> None:
    r = spawn_tri("report", str(DEMOS[0]), "--format", "json")
    assert r.returncode == 0, r.stderr
    assert r.stdout.startswith("{")


def test_ui_refuses_to_start_without_a_terminal() -> None:
    # [issue 10] standard input and output are pipes here: one sentence, exit 2,
    # and not one escape code drawn into the pipe.
    r = spawn_tri(str(DEMOS[0]), stdin=subprocess.DEVNULL)
    assert_clean_error(r)
    assert r.stderr.count("\n") == 1 and "needs a terminal" in r.stderr
    assert "\x1b" not in r.stdout + r.stderr


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="needs /dev/full")
def test_a_full_standard_output_is_a_clean_error() -> None:
    with open("/dev/full", "w") as full:
        r = subprocess.run(
            [sys.executable, "-m", "tri", "report", str(DEMOS[0])],
            stdout=full,
            stderr=subprocess.PIPE,
            text=True,
            timeout=120,
        )
    assert r.returncode == 2
    assert r.stderr.startswith("tri: error: cannot write the output: No space left")
    assert "Traceback" not in r.stderr and "Exception ignored" not in r.stderr
