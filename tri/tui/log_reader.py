"""Read a schedule's log away from the UI: in a thread for small files, in a process for big ones.

The file layer's reader (:func:`tri.schedule.log_file.read_log`) and the
report's analysis (:func:`tri.report.over_time_data.analyse_logged`) do the
work; this module only decides where they run. Parsing a million times
can hold Python's interpreter lock for seconds (pandas turns times whose
UTC offsets change within the log into Python objects), which would freeze
the screen and delay Esc if it ran in a thread of the UI's process. A file
above :data:`PROCESS_ABOVE_BYTES` is therefore read in a child process: the
screen stays live, progress arrives through a pipe, and cancelling ends
the child at once. No textual here.
"""

from __future__ import annotations

import contextlib
import multiprocessing
import os
import threading
from collections.abc import Callable
from pathlib import Path
from typing import Any

from tri.schedule.errors import ScheduleError

#: Files larger than this are read in a child process [bytes] (about 100 000 rows).
PROCESS_ABOVE_BYTES = 4_000_000
#: How often the waiting thread looks at the pipe and the cancel flag [s].
POLL_S = 0.05

Progress = Callable[[float, str], None]
ANALYSING = "working out demand, percentiles and durations"


class LogCancelled(Exception):
    """The user cancelled reading the log."""


def _read_here(spec: Any, base: Path | None, progress: Progress) -> tuple[Any, Any]:
    from tri.report.over_time_data import analyse_logged
    from tri.schedule.log_file import read_log

    log = read_log(spec, base, progress=progress)
    progress(1.0, ANALYSING)
    return log, analyse_logged(log, spec)


def _child(spec: Any, base: str | None, conn: Any) -> None:
    """The child process: read, analyse, send the result (or the problems) and end."""
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, 1)  # nothing the libraries print may reach the UI's terminal
    os.dup2(devnull, 2)
    try:
        result = _read_here(spec, None if base is None else Path(base), _sender(conn))
        conn.send(("done", result))
    except ScheduleError as exc:
        conn.send(("problems", list(exc.issues)))
    except Exception as exc:  # sent as words; the UI shows them
        conn.send(("failed", f"{type(exc).__name__}: {exc}"))
    finally:
        conn.close()


def _sender(conn: Any) -> Progress:
    def send(fraction: float, what: str) -> None:
        conn.send(("progress", (fraction, what)))

    return send


def _read_in_child(
    spec: Any, base: Path | None, progress: Progress, cancel: threading.Event
) -> tuple[Any, Any]:
    ctx = multiprocessing.get_context("spawn")
    receive, send = ctx.Pipe(duplex=False)
    child = ctx.Process(
        target=_child, args=(spec, None if base is None else str(base), send), daemon=True
    )
    progress(0.0, "starting the reader")
    # Starting a process hands it this process's standard error; under the UI
    # that is a capture with no file behind it, so a real one (nowhere) is lent.
    with open(os.devnull, "w") as quiet, contextlib.redirect_stderr(quiet):
        from multiprocessing import resource_tracker

        resource_tracker.ensure_running()
        child.start()
    send.close()
    try:
        while True:
            if cancel.is_set():
                raise LogCancelled
            if receive.poll(POLL_S):
                try:
                    kind, payload = receive.recv()
                except EOFError:
                    raise RuntimeError("the log reader stopped without an answer") from None
                if kind == "progress":
                    progress(*payload)
                elif kind == "done":
                    return payload
                elif kind == "problems":
                    raise ScheduleError(payload)
                else:
                    raise RuntimeError(payload)
            elif not child.is_alive() and not receive.poll(0):
                raise RuntimeError("the log reader stopped without an answer")
    finally:
        if child.is_alive():
            child.terminate()
        child.join(2.0)
        with contextlib.suppress(OSError):
            receive.close()


def read_and_analyse(
    spec: Any, base: Path | None, progress: Progress, cancel: threading.Event
) -> tuple[Any, Any]:
    """The log of ``[log]`` ``spec`` read and analysed: ``(LoadedLog, LogAnalysis)``.

    Parameters
    ----------
    spec : LogSpec
        The schedule's ``[log]``.
    base : Path or None
        The schedule's folder (``spec.file`` is relative to it).
    progress : callable
        ``progress(fraction, what)`` as the reading goes on.
    cancel : threading.Event
        Set to stop: the reading ends at its next step (small files) or at
        once (big ones), raising :class:`LogCancelled`.

    Raises
    ------
    ScheduleError
        The log's problems, located by file and line.
    LogCancelled
        When ``cancel`` was set.
    """
    path = Path(base or ".") / spec.file
    try:
        big = path.stat().st_size > PROCESS_ABOVE_BYTES
    except OSError:
        big = False  # the reader says what is wrong with it
    if big:
        return _read_in_child(spec, base, progress, cancel)

    def checked(fraction: float, what: str) -> None:
        if cancel.is_set():
            raise LogCancelled
        progress(fraction, what)

    return _read_here(spec, base, checked)
