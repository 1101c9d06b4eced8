"""Run the `tri` command in-process (fast) or as a real process (true end-to-end).

Most command-line tests call :func:`run_tri`, which runs ``tri.cli.main`` with
standard output and error captured: the same code path as the installed
command minus interpreter start-up (about half a second each, which used to
dominate the suite). A few tests per command keep :func:`spawn_tri`, which
runs ``python -m tri`` in a subprocess, so the entry point itself stays tested.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import pty
import select
import signal
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from tri.cli import main
from tri.schedule.text import is_refused_char


@dataclass(frozen=True)
class Result:
    """What a `tri` run gave: exit status and the two output streams."""

    returncode: int
    stdout: str
    stderr: str


def run_tri(*args: str, cwd: Path | None = None) -> Result:
    """``tri ARGS...`` in this process (in folder ``cwd`` when given)."""
    out, err = io.StringIO(), io.StringIO()
    with contextlib.ExitStack() as stack:
        if cwd is not None:
            stack.enter_context(contextlib.chdir(cwd))
        stack.enter_context(contextlib.redirect_stdout(out))
        stack.enter_context(contextlib.redirect_stderr(err))
        code = main(list(args))
    return Result(code, out.getvalue(), err.getvalue())


def spawn_tri(*args: str, cwd: Path | None = None, stdin: int | None = None) -> Result:
    """``python -m tri ARGS...`` as a real process."""
    r = subprocess.run(
        [sys.executable, "-m", "tri", *args],
        capture_output=True,
        text=True,
        timeout=120,
        cwd=cwd,
        stdin=stdin,
    )
    return Result(r.returncode, r.stdout, r.stderr)


def control_chars(text: str) -> list[str]:
    """Characters of ``text`` that must never reach a terminal (line ends allowed)."""
    return [ch for ch in text if is_refused_char(ch) and ch not in "\r\n"]


def assert_clean_error(r: Result) -> None:
    """Exit 2, one ``tri: error:`` on standard error, nothing on standard output."""
    assert r.returncode == 2, (r.stdout, r.stderr)
    assert r.stdout == ""
    assert r.stderr.startswith("tri: error:"), r.stderr
    assert "Traceback" not in r.stderr
    assert control_chars(r.stderr) == [], r.stderr


def read_until(fd: int, word: bytes, limit_s: float) -> bytes:
    """Bytes read from ``fd`` until ``word`` appears (or ``limit_s`` passes, or it closes)."""
    seen, end = b"", time.monotonic() + limit_s
    while word not in seen and time.monotonic() < end:
        ready, _, _ = select.select([fd], [], [], 0.5)
        if ready:
            try:
                seen += os.read(fd, 4096)
            except OSError:  # the child closed its terminal
                break
    return seen


def ctrl_c_tri(*args: str, once: bytes, cwd: Path | None = None) -> Result:
    """``python -m tri ARGS...`` with standard error on a terminal (so progress shows),
    sent Ctrl+C (SIGINT) once ``once`` appears in its progress.

    Standard error is read all along, so the child never blocks writing to it; when
    the child does not end 150 s after the signal, the test fails showing its last
    words. ``stderr`` is everything it wrote there.
    """
    import pytest

    master, slave = pty.openpty()
    proc = subprocess.Popen(
        [sys.executable, "-m", "tri", *args], stdout=subprocess.PIPE, stderr=slave, cwd=cwd
    )
    os.close(slave)
    try:
        seen = read_until(master, once, 120)
        assert once in seen, seen  # the search is under way
        proc.send_signal(signal.SIGINT)
        seen += read_until(master, b"best plan so far", 120)
        try:
            out, _ = proc.communicate(timeout=30)
        except subprocess.TimeoutExpired:
            pytest.fail(f"still running 150 s after Ctrl+C; its standard error: {seen[-600:]!r}")
    finally:
        os.close(master)
        proc.kill()
    return Result(proc.returncode, out.decode(), seen.decode(errors="replace"))


def stopped_plan(r: Result) -> dict[str, Any] | None:
    """The JSON of a search stopped by :func:`ctrl_c_tri`, checked for what every such run
    shows (best plan so far, said on standard error and in the status, exit as for the
    time limit); None when the search had settled before the signal came."""
    d = json.loads(r.stdout)
    if d["stopped"] is None:  # settled first: a proven answer
        assert d["status"] in ("optimal", "infeasible")
        return None
    assert d["stopped"] == "cancelled"
    assert "stopped by Ctrl+C" in r.stderr and "Traceback" not in r.stderr
    assert r.returncode == (0 if d["status"] != "infeasible" and d["target_met"] else 1)
    if d["status"] == "best-found":
        assert "stopped by the user" in d["status_text"]
    return d
