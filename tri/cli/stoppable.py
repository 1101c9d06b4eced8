"""A search on the command line that Ctrl+C stops cleanly, keeping the best plan so far.

The search runs in a worker thread with a cancel event; the main thread
waits for it. The first Ctrl+C only sets the event, from a signal handler: no
exception is raised in the waiting main thread, where one landing inside the
wait's own locking could leave a lock held and both threads waiting for ever.
The search then ends at its next step (at most one solver slice,
:data:`tri.rebalance.control.MAX_SLICE_S`) and returns what it has. A second
Ctrl+C aborts (``KeyboardInterrupt``, exit 130, nothing shown).
"""

from __future__ import annotations

import signal
import threading
from collections.abc import Callable
from typing import Any, TypeVar

from tri.cli.common import SearchProgress

T = TypeVar("T")

#: How often the waiting main thread looks at the worker and the cancel event [s].
POLL_S = 0.1


def run_stoppable(search: Callable[[threading.Event], T], progress: SearchProgress) -> T:
    """``search(cancel)`` in a worker thread, Ctrl+C setting ``cancel`` (module notes).

    Returns what ``search`` returned; an exception it raised is raised here.
    """
    cancel, done = threading.Event(), threading.Event()
    out: dict[str, Any] = {}

    def work() -> None:
        try:
            out["result"] = search(cancel)
        except BaseException as exc:  # handed to the main thread
            out["error"] = exc
        finally:
            done.set()

    def on_ctrl_c(signum: int, frame: Any) -> None:
        if cancel.is_set():
            raise KeyboardInterrupt  # a second Ctrl+C: abort
        cancel.set()

    # waiting on an event, not Thread.join: an interrupted join can leave the
    # thread marked as ended while it still runs (CPython gh-90882)
    main = threading.current_thread() is threading.main_thread()  # handlers live there only
    previous = signal.signal(signal.SIGINT, on_ctrl_c) if main else None
    try:
        threading.Thread(target=work, name="tri-search", daemon=True).start()
        told = False
        while not done.wait(POLL_S):
            if cancel.is_set() and not told:
                progress(None, "stopping: finishing the current step (Ctrl+C again to abort)")
                told = True
    finally:
        if main:
            signal.signal(signal.SIGINT, previous)
    if "error" in out:
        raise out["error"]
    return out["result"]
