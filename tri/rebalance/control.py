"""Time limit, progress reports and cancellation for an anytime search.

The search calls :meth:`Control.stop` between steps (local-search moves,
solver calls); a user interface sets a :class:`threading.Event` (or passes
any callable returning True) from another thread to stop it early, and
receives progress as ``(fraction or None, message)``.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from typing import Protocol


class _EventLike(Protocol):
    def is_set(self) -> bool: ...


#: A progress callback: ``(fraction of the time limit used or None, message)``.
ProgressCallback = Callable[[float | None, str], None]
#: A cancel hook: an object with ``is_set()`` (``threading.Event``) or a callable.
CancelHook = _EventLike | Callable[[], bool]


#: Longest single solver call when the search can be cancelled [s]. HiGHS cannot be
#: interrupted inside a call, so a cancel (Ctrl+C, the UI's Cancel) waits at most about
#: this long. Slices start shorter and double while calls end without an answer.
MAX_SLICE_S = 4.0


def longer_slice(slice_s: float) -> float:
    """The next solver slice after a call that ran out of time: twice as long, at most
    :data:`MAX_SLICE_S` [s]."""
    return min(2.0 * slice_s, MAX_SLICE_S)


class Cancelled(Exception):
    """Raised inside the search when the cancel hook fires."""


class Control:
    """Deadline, cancel hook and progress callback of one search.

    Parameters
    ----------
    time_limit_s : float
        Wall-clock budget [s].
    progress : callable, optional
        Called as ``progress(fraction, message)``; fraction in [0, 1] or None.
    cancel : threading.Event or callable, optional
        Stop as soon as ``cancel.is_set()`` (or ``cancel()``) is true.
    """

    def __init__(
        self,
        time_limit_s: float,
        progress: ProgressCallback | None = None,
        cancel: CancelHook | None = None,
    ) -> None:
        self.start = time.perf_counter()
        self.time_limit_s = float(time_limit_s)
        self.deadline = self.start + self.time_limit_s
        self._progress = progress
        self._cancel = cancel

    @property
    def can_cancel(self) -> bool:
        """True when a cancel hook was given (solver calls are then cut into slices)."""
        return self._cancel is not None

    def elapsed(self) -> float:
        """Seconds since the start [s]."""
        return time.perf_counter() - self.start

    def remaining(self) -> float:
        """Seconds left before the deadline (may be negative) [s]."""
        return self.deadline - time.perf_counter()

    def solver_span(self, slice_s: float) -> float:
        """Seconds to give the next solver call [s].

        When the search can be cancelled: ``slice_s``, at most :data:`MAX_SLICE_S`
        and what is left. Otherwise all that is left (nobody waits to stop it).
        """
        left = self.remaining()
        return min(slice_s, MAX_SLICE_S, left) if self.can_cancel else left

    def cancelled(self) -> bool:
        """True once the cancel hook has fired."""
        hook = self._cancel
        if hook is None:
            return False
        is_set = getattr(hook, "is_set", None)
        if callable(is_set):
            return bool(is_set())
        return bool(hook())  # type: ignore[operator]

    def stop(self) -> bool:
        """True when the search must stop: cancelled or out of time."""
        return self.cancelled() or self.remaining() <= 0

    def check(self) -> None:
        """Raise :class:`Cancelled` if the cancel hook has fired."""
        if self.cancelled():
            raise Cancelled

    def report(self, message: str, fraction: float | None = -1.0) -> None:
        """Send a progress message; the fraction defaults to the share of time used."""
        if self._progress is None:
            return
        if fraction is not None and fraction < 0:
            fraction = min(1.0, self.elapsed() / self.time_limit_s) if self.time_limit_s else None
        self._progress(fraction, message)
