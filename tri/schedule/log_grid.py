"""Place a log's rows on a regular grid: interval, order, duplicates, gaps.

The interval is the most common step between consecutive times. Every row
goes to the nearest grid point from the first time (a logger's clock that
wanders by a few seconds stays on its interval; the largest shift is
reported); a second row on the same grid point is a duplicate (the first
is kept); grid points with no row are gaps. Times that go backwards are an
error naming the line.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from tri.schedule.errors import ScheduleError
from tri.schedule.log_spec import log_issue

#: A grid longer than this many intervals beyond the rows read is refused:
#: it means a wrong date in one row, not a real logger [-].
MAX_EXTRA_INTERVALS = 20_000_000


@dataclass(frozen=True)
class Gap:
    """A run of grid intervals with no row.

    Attributes
    ----------
    start_index : int
        First missing grid position.
    intervals : int
        How many are missing.
    after_line : int
        File line of the last row before the gap.
    """

    start_index: int
    intervals: int
    after_line: int


@dataclass(frozen=True, eq=False)
class GridPlacement:
    """Where each row sits on the grid.

    Attributes
    ----------
    start_s : float
        Time of the first row [s].
    interval_s : float
        Detected interval [s].
    n_intervals : int
        Grid positions from the first row to the last.
    index : int ndarray
        Grid position of each kept row.
    keep : bool ndarray
        Rows kept (false for the later of two rows on one position).
    duplicates : int
        Rows dropped as duplicates of an earlier row's position.
    first_duplicate_line : int or None
        File line of the first one.
    gaps : tuple of Gap
    max_shift_s : float
        Largest distance of a row's time from its grid position [s].
    regular_share : float
        Share of steps between rows equal to the interval [-].
    """

    start_s: float
    interval_s: float
    n_intervals: int
    index: np.ndarray
    keep: np.ndarray
    duplicates: int
    first_duplicate_line: int | None
    gaps: tuple[Gap, ...]
    max_shift_s: float
    regular_share: float

    @property
    def missing_intervals(self) -> int:
        """Grid positions with no row."""
        return sum(g.intervals for g in self.gaps)

    def scatter(self, values: np.ndarray) -> np.ndarray:
        """One value per row to one per grid position (``NaN`` where none)."""
        out = np.full(self.n_intervals, np.nan)
        out[self.index] = np.asarray(values, dtype=float)[self.keep]
        return out


def detect_interval(times_s: np.ndarray) -> tuple[float, float]:
    """The most common positive step between consecutive times, and its share of the steps.

    Parameters
    ----------
    times_s : float ndarray
        Non-decreasing times [s].

    Returns
    -------
    interval_s : float
        [s], rounded to the millisecond (a clock's resolution, not a figure).
    share : float
        Steps equal to it over all positive steps [-].
    """
    steps = np.round(np.diff(times_s), 3)
    steps = steps[steps > 0]
    if steps.size == 0:
        return float("nan"), 0.0
    values, counts = np.unique(steps, return_counts=True)
    k = int(np.argmax(counts))
    return float(values[k]), float(counts[k] / steps.size)


def _check_time_order(
    t: np.ndarray, lines: np.ndarray, shown: str, show: Callable[[int], str], zoned: bool
) -> None:
    """Raise ``ScheduleError`` at the first time [s] earlier than the row before it."""
    step = np.diff(t)
    back = np.flatnonzero(step < 0)
    if not back.size:
        return
    i = int(back[0]) + 1
    more = f" ({back.size - 1} more places)" if back.size > 1 else ""
    if not zoned and 0 < -step[i - 1] <= 3600.0:
        more += "; if the logger's clock follows daylight saving, name its zone in [log] timezone"
    raise ScheduleError(
        [
            log_issue(
                shown,
                f"times out of order: {show(i)} comes after {show(i - 1)} (line "
                f"{int(lines[i - 1])}); rows must be in time order{more}",
                int(lines[i]),
            )
        ]
    )


def place_on_grid(
    times_s: np.ndarray,
    lines: np.ndarray,
    shown: str,
    describe: Callable[[int], str] | None = None,
    *,
    zoned: bool = True,
) -> GridPlacement:
    """Check the order of the times and place every row on the interval grid.

    Parameters
    ----------
    times_s : float ndarray
        Time of each row [s].
    lines : int ndarray
        File line of each row.
    shown : str
        The file's name in messages.
    describe : callable, optional
        The time of row ``i`` as written (for messages).
    zoned : bool
        False for times without an offset or zone (a step back by about an
        hour then suggests a clock set back for daylight saving).

    Returns
    -------
    GridPlacement

    Raises
    ------
    ScheduleError
        Fewer than two distinct times, a time earlier than the row before it,
        or a grid absurdly longer than the rows (a wrong date).
    """
    t = np.asarray(times_s, dtype=float)
    show = describe or (lambda i: f"{t[i]:.0f} s")
    _check_time_order(t, lines, shown, show, zoned)
    interval, share = detect_interval(t)
    if not np.isfinite(interval):
        raise ScheduleError(
            [log_issue(shown, "needs at least two rows with different times to find the interval")]
        )
    rel = (t - t[0]) / interval
    index = np.rint(rel).astype(np.int64)
    shift = float(np.max(np.abs(rel - index))) * interval
    keep = np.ones(t.size, dtype=bool)
    keep[1:] = np.diff(index) > 0
    n = int(index[-1]) + 1
    if n > t.size + MAX_EXTRA_INTERVALS:
        big = int(np.argmax(np.diff(index))) + 1
        raise ScheduleError(
            [
                log_issue(
                    shown,
                    f"the times jump from {show(big - 1)} to {show(big)}, {n - t.size} "
                    f"intervals of {interval:g} s with no rows; check the date",
                    int(lines[big]),
                )
            ]
        )
    dup = np.flatnonzero(~keep)
    kept = index[keep]
    kept_lines = lines[keep]
    jumps = np.flatnonzero(np.diff(kept) > 1)
    gaps = tuple(
        Gap(int(kept[j]) + 1, int(kept[j + 1] - kept[j] - 1), int(kept_lines[j])) for j in jumps
    )
    return GridPlacement(
        start_s=float(t[0]),
        interval_s=interval,
        n_intervals=n,
        index=kept,
        keep=keep,
        duplicates=int(dup.size),
        first_duplicate_line=int(lines[dup[0]]) if dup.size else None,
        gaps=gaps,
        max_shift_s=shift,
        regular_share=share,
    )
