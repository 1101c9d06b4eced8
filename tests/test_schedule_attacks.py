"""Hostile input: every attack class ends as a located error, exit 2, promptly (issue 10).

One fixture per attack class lives in ``tests/data/attack/`` (the large ones
are generated here into a temporary folder). Each is loaded in-process and
run through the command in-process; a few run through the real command.
"""

from __future__ import annotations

import os
import socket
import stat
from pathlib import Path

import pytest
from cli_support import assert_clean_error, control_chars, run_tri, spawn_tri

from tri.schedule.errors import ScheduleError
from tri.schedule.load import load_schedule
from tri.schedule.rules import MAX_CIRCUITS
from tri.schedule.source import MAX_SCHEDULE_BYTES

ATTACK = Path(__file__).parent / "data" / "attack"
BIG = "100000... (401 digits)"  # how 10**400 is quoted

# file -> every (line, words) expected, in order
CASES: dict[str, list[tuple[int | None, str]]] = {
    "huge_integer.toml": [
        (8, f"'bus_a': found {BIG}, expected 1 to 10 000 A"),
        (11, f"'amps': A = {BIG}, expected 0 to 10 000 A"),
        (14, "entry 1: order 100000..., expected 2 to 100"),
        (14, f"entry 2: magnitude {BIG}, expected 0 to 5 times the fundamental"),
        (19, f"'load_va': found {BIG}, expected 0, or 0.001 to 5 000 000 VA"),
        (22, f"'slot': found {BIG}, expected 1 to 420"),
    ],
    "float_overflow.toml": [
        (13, "'load_va': found 1e+308, expected 0, or 0.001 to 5 000 000 VA"),
        (18, "'load_va': found 1.7976931348623157e+308, expected 0, or 0.001"),
        (23, "'load_w': found 1e+300, expected 0, or 0.001 to 5 000 000 W"),
        (30, "'breaker_a': found 1e+308, expected 0.5 to 6 000 A"),
    ],
    "denormal.toml": [
        (8, "'bus_a': found 1e-320, expected 1 to 10 000 A"),
        (14, "'feeder_length_m': found 1e-310, expected 0 or a size of at least 1e-06"),
        (17, "'amps': A = 5e-324, expected 0 or a size of at least 1e-06"),
        (20, "entry 1: magnitude 1e-320, expected 0 or a size of at least 1e-06"),
        (25, "'load_va': found 5e-324, expected 0, or 0.001 to 5 000 000 VA"),
    ],
    "tiny_rating.toml": [
        (9, "'main_a': found 0.001, expected 1 to 10 000 A"),
        (10, "'neutral_a': found 1e-300, expected 1 to 10 000 A"),
        (16, "'breaker_a': found 0.0001, expected 0.5 to 6 000 A"),
    ],
    "out_of_trade_range.toml": [
        (7, "'frequency_hz': found 1000000.0, expected 40 to 70 Hz"),
        (8, "'spaces': found 100000, expected 1 to 420"),
        (9, "'bus_a': found 1000000000.0, expected 1 to 10 000 A"),
        (12, "'transformer_kva': found 1000000000.0, expected 1 to 100 000 kVA"),
        (17, "'amps': A = 10000000.0, expected 0 to 10 000 A"),
        (20, "entry 1: magnitude 1000.0, expected 0 to 5 times the fundamental"),
        (20, "entry 2: angle 1000000000.0, expected -360 to 360 deg"),
        (26, "'pf': found 0.0001, expected a power factor above 0 and at most 1"),
        (31, "'load_a': found 1000000.0, expected 0, or 0.001 to 10 000 A"),
    ],
    "control_characters.toml": [
        (5, "'name': found 'Panel\\x1b]0;owned\\x07', which holds control characters"),
        (9, "'phase_labels': found 'B\\u202e' (text), which holds a control character"),
        (10, "'note': found 'bell\\x07 and delete\\x7f', which holds control characters"),
        (13, "'taken': found 'Monday\\u2028Tuesday', which holds a control character"),
        (15, "profile name: found 'drive\\x9b31m', which holds a control character (\\x9b)"),
        (16, "'description': found 'from the\\x00meter', which holds a control character"),
        (21, "'name': found 'Fryer\\x1b[2J', which holds a control character (\\x1b)"),
        (23, "'note': found 'tab\\there', which holds a control character (\\x09)"),
        (27, "'name': found '\\u202eevil\\u202c', which holds control characters"),
    ],
}


def test_every_attack_fixture_has_a_case() -> None:
    assert sorted(p.name for p in ATTACK.glob("*.toml")) == sorted(CASES)


@pytest.mark.parametrize("name", sorted(CASES))
def test_attack_file_reports_every_problem_located(name: str) -> None:
    with pytest.raises(ScheduleError) as info:
        load_schedule(ATTACK / name)
    issues = info.value.issues
    assert len(issues) == len(CASES[name]), info.value.summary()
    for issue, (line, words) in zip(issues, CASES[name], strict=True):
        assert words in str(issue), str(issue)
        assert issue.line == line, str(issue)
        assert control_chars(str(issue)) == []


@pytest.mark.parametrize("name", sorted(CASES))
@pytest.mark.parametrize("fmt", ["text", "json", "markdown", "csv"])
def test_attack_file_is_a_clean_exit_2_in_every_format(name: str, fmt: str) -> None:
    assert_clean_error(run_tri("report", str(ATTACK / name), "--format", fmt))


@pytest.mark.parametrize("name", ["control_characters.toml", "huge_integer.toml"])
def test_attack_file_through_the_real_command(name: str) -> None:
    r = spawn_tri("report", str(ATTACK / name))
    assert_clean_error(r)
    assert "\x1b" not in r.stderr and "\u202e" not in r.stderr


# ---------------------------------------------------------------- not regular files


def _fifo(tmp_path: Path) -> Path:
    path = tmp_path / "pipe.toml"
    os.mkfifo(path)
    return path


def _socket(tmp_path: Path) -> Path:
    path = tmp_path / "sock.toml"
    s = socket.socket(socket.AF_UNIX)
    s.bind(str(path))
    s.close()
    return path


NOT_REGULAR = {
    "/dev/zero": (lambda tmp: Path("/dev/zero"), "is a device, expected a regular file"),
    "/dev/urandom": (lambda tmp: Path("/dev/urandom"), "is a device, expected a regular file"),
    "fifo": (_fifo, "is a pipe (FIFO), expected a regular file"),
    "socket": (_socket, "is a socket, expected a regular file"),
    "folder": (lambda tmp: tmp, "is a folder, expected a .toml file"),
}


@pytest.mark.parametrize("kind", sorted(NOT_REGULAR))
def test_only_regular_files_are_read(kind: str, tmp_path: Path) -> None:
    make, words = NOT_REGULAR[kind]
    path = make(tmp_path)
    if not os.path.exists(path):
        pytest.skip(f"no {path} here")
    # A FIFO with no writer would block an ordinary open; this must return at once.
    with pytest.raises(ScheduleError, match=words.replace("(", r"\(").replace(")", r"\)")):
        load_schedule(path)
    assert_clean_error(run_tri("report", str(path)))


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs FIFOs")
def test_a_fifo_with_no_writer_ends_promptly_through_the_real_command(tmp_path: Path) -> None:
    r = spawn_tri("report", str(_fifo(tmp_path)))  # spawn_tri's timeout would fail a hang
    assert_clean_error(r)
    assert "is a pipe (FIFO)" in r.stderr


def test_a_file_over_the_size_cap_is_refused_unread(tmp_path: Path) -> None:
    path = tmp_path / "huge.toml"
    with open(path, "wb") as fh:
        fh.write(b"format = 1\n")
        fh.truncate(MAX_SCHEDULE_BYTES + 1)  # sparse: no need to write it all
    assert stat.S_ISREG(path.stat().st_mode)
    with pytest.raises(ScheduleError, match="is larger than 1 MiB, the most a schedule"):
        load_schedule(path)


# ---------------------------------------------------------------- generated: many, long, deep

HEAD = 'format = 1\n[panel]\nname = "Gen"\nsystem = "208Y/120"\nspaces = 42\nbus_a = 225\n'


def _write(tmp_path: Path, body: str) -> Path:
    path = tmp_path / "gen.toml"
    path.write_text(HEAD + body)
    return path


def test_too_many_circuits(tmp_path: Path) -> None:
    body = "".join(f'[[circuit]]\nname = "c{i}"\nload_va = 1\n' for i in range(MAX_CIRCUITS + 1))
    with pytest.raises(ScheduleError) as info:
        load_schedule(_write(tmp_path, body))
    (issue,) = info.value.issues
    assert "1001 [[circuit]] tables, expected at most 1000" in issue.message
    assert issue.line == 7 + 3 * MAX_CIRCUITS  # the header of the 1001st table [computed]


def test_text_longer_than_the_bounds(tmp_path: Path) -> None:
    body = f'[[circuit]]\nname = "{"n" * 201}"\nload_va = 1\nnote = "{"x" * 2001}"\n'
    with pytest.raises(ScheduleError) as info:
        load_schedule(_write(tmp_path, body))
    messages = [i.message for i in info.value.issues]
    assert any("201 characters, expected at most 200" in m for m in messages), messages
    assert any("2001 characters of text, expected at most 2000" in m for m in messages)


def test_deeply_nested_values(tmp_path: Path) -> None:
    path = _write(tmp_path, "x = " + "[" * 5000 + "]" * 5000 + "\n")
    with pytest.raises(ScheduleError, match=r"not valid TOML: .*nested more than"):
        load_schedule(path)


def test_too_many_profiles(tmp_path: Path) -> None:
    body = "".join(f"[profiles.p{i}]\nharmonics = [[3, 0.1, 0.0]]\n" for i in range(101))
    with pytest.raises(ScheduleError, match="101 profiles, expected at most 100"):
        load_schedule(_write(tmp_path, body))


def test_phase_labels_may_not_name_the_neutral(tmp_path: Path) -> None:
    path = tmp_path / "n.toml"
    path.write_text(HEAD + 'phase_labels = ["A", "N", "C"]\n')
    with pytest.raises(ScheduleError, match="'N' names the neutral"):
        load_schedule(path)


def test_a_file_name_with_control_characters_is_refused(tmp_path: Path) -> None:
    # The name is printed in every report's header, so it follows the text rule.
    path = tmp_path / "a\x1b[7mX.toml"
    path.write_text((ATTACK.parent / "tui" / "small.toml").read_text())
    r = run_tri("report", str(path))
    assert_clean_error(r)
    assert "the file name holds control characters (\\x1b); rename it" in r.stderr
