"""Demand: the highest average current over a window, on a regular time grid.

A logger's series arrives here already on a regular grid (the file layer
puts it there): sample ``k`` is the average current over the interval
``[k·Δt, (k+1)·Δt)`` from the grid's start, and a missing interval is
``NaN``. Everything is vectorised over leading axes (phases, neutral,
scenarios), the time axis last.

Windows
-------
``"sliding"``
    Every window of ``width`` consecutive intervals (start at any interval):
    the conservative figure, the highest average of any stretch of that
    length.
``"block"``
    Fixed, back-to-back windows starting at interval ``phase`` and every
    ``width`` intervals after it, as many demand meters reset on the clock.
    Intervals before ``phase`` and a partial block at the end form no window.

A window with any missing interval has no value (it is skipped): a demand
figure never rests on a guess about what the logger did not record.

References
----------
1. NEC (NFPA 70) 220.87, "Determining existing loads": the maximum demand
   as the highest average over 15-minute intervals (from memory).
2. IEC 61000-4-30, aggregation of measurements over fixed intervals
   (10-minute values aligned to the clock) (from memory).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

WindowMode = Literal["sliding", "block"]
WINDOW_MODES: tuple[WindowMode, ...] = ("sliding", "block")


@dataclass(frozen=True, eq=False)
class WindowMeans:
    """Averages of ``values`` over windows of ``width`` intervals.

    Attributes
    ----------
    means : float ndarray, shape (..., W)
        Average over each window [A, V or %]; ``NaN`` where an interval of the
        window is missing.
    starts : int ndarray, shape (W,)
        Index of each window's first interval on the grid.
    width : int
        Intervals per window.
    """

    means: np.ndarray
    starts: np.ndarray
    width: int


@dataclass(frozen=True, eq=False)
class PeakDemand:
    """The highest window average of each series.

    Attributes
    ----------
    value : float ndarray, shape (...)
        Highest average over a complete window [A]; ``NaN`` when no window is
        complete.
    start_index : int ndarray, shape (...)
        Grid index of that window's first interval; ``-1`` when none.
    width : int
        Intervals per window.
    complete_windows : int ndarray, shape (...)
        Windows with every interval present.
    total_windows : int
        Windows the grid holds in this mode.
    """

    value: np.ndarray
    start_index: np.ndarray
    width: int
    complete_windows: np.ndarray
    total_windows: int


def window_starts(n_intervals: int, width: int, mode: WindowMode, phase: int = 0) -> np.ndarray:
    """First grid index of every window.

    Parameters
    ----------
    n_intervals : int
        Intervals on the grid.
    width : int
        Intervals per window (>= 1).
    mode : {"sliding", "block"}
    phase : int
        Block mode: index of the first block boundary (0 <= phase); ignored
        when sliding.

    Returns
    -------
    int ndarray, shape (W,)
    """
    if width < 1:
        raise ValueError(f"window width must be at least 1 interval, got {width}")
    if mode == "sliding":
        return np.arange(max(n_intervals - width + 1, 0), dtype=np.int64)
    if mode == "block":
        if phase < 0:
            raise ValueError(f"block phase must be >= 0, got {phase}")
        return np.arange(phase, n_intervals - width + 1, width, dtype=np.int64)
    raise ValueError(f"unknown window mode {mode!r}; expected one of {WINDOW_MODES}")


def window_means(
    values: np.ndarray, width: int, mode: WindowMode = "sliding", phase: int = 0
) -> WindowMeans:
    """Average of each series over every window.

    Parameters
    ----------
    values : float ndarray, shape (..., T)
        Interval averages on a regular grid, ``NaN`` where missing [A, V, %].
    width : int
        Intervals per window.
    mode : {"sliding", "block"}
    phase : int
        Block mode: first block boundary (grid index).

    Returns
    -------
    WindowMeans

    Notes
    -----
    With running sums ``S_k = Σ_{i<k} x_i`` (missing as 0) and the running
    count ``C_k`` of present intervals, the window starting at ``s`` has the
    mean ``(S_{s+w} − S_s) / w`` when ``C_{s+w} − C_s = w``. Sums are taken
    relative to the series' own mean, so round-off does not grow with the
    level of the current over a long log.
    """
    x = np.asarray(values, dtype=float)
    t = x.shape[-1]
    starts = window_starts(t, width, mode, phase)
    present = np.isfinite(x)
    centre = np.zeros(x.shape[:-1])
    any_present = np.any(present, axis=-1)
    if np.any(any_present):
        total = np.sum(np.where(present, x, 0.0), axis=-1)
        count = np.sum(present, axis=-1)
        centre = np.where(any_present, total / np.maximum(count, 1), 0.0)
    filled = np.where(present, x - centre[..., None], 0.0)
    zero = np.zeros((*x.shape[:-1], 1))
    sums = np.concatenate([zero, np.cumsum(filled, axis=-1)], axis=-1)
    counts = np.concatenate(
        [zero.astype(np.int64), np.cumsum(present, axis=-1, dtype=np.int64)], axis=-1
    )
    ends = starts + width
    win_sum = sums[..., ends] - sums[..., starts]
    win_count = counts[..., ends] - counts[..., starts]
    means = np.where(win_count == width, win_sum / width + centre[..., None], np.nan)
    return WindowMeans(means=means, starts=starts, width=width)


def peak_demand(
    values: np.ndarray, width: int, mode: WindowMode = "sliding", phase: int = 0
) -> PeakDemand:
    """Highest window average of each series, and where it starts.

    Parameters
    ----------
    values : float ndarray, shape (..., T)
        Interval averages on a regular grid, ``NaN`` where missing [A].
    width : int
        Intervals per window (15 one-minute intervals for a 15-minute demand).
    mode : {"sliding", "block"}
    phase : int
        Block mode: first block boundary (grid index).

    Returns
    -------
    PeakDemand

    Notes
    -----
    Worked case (the test): one-minute data at 150 A with 200 A for ten
    minutes. Sliding, a window holds all ten minutes and five at the base:
    ``(10·200 + 5·150)/15 = 183.33 A``. Blocks that split the peak five and
    five hold ``(5·200 + 10·150)/15 = 166.67 A`` each.
    """
    w = window_means(values, width, mode, phase)
    complete = np.isfinite(w.means)
    n_complete = np.sum(complete, axis=-1)
    if w.means.shape[-1] == 0:
        shape = w.means.shape[:-1]
        return PeakDemand(
            value=np.full(shape, np.nan),
            start_index=np.full(shape, -1, dtype=np.int64),
            width=width,
            complete_windows=np.zeros(shape, dtype=np.int64),
            total_windows=0,
        )
    safe = np.where(complete, w.means, -np.inf)
    best = np.argmax(safe, axis=-1)
    value = np.take_along_axis(safe, best[..., None], axis=-1)[..., 0]
    has = n_complete > 0
    return PeakDemand(
        value=np.where(has, value, np.nan),
        start_index=np.where(has, w.starts[best], -1),
        width=width,
        complete_windows=n_complete,
        total_windows=int(w.starts.size),
    )


def block_phase(first_start_s: float, width_s: float, interval_s: float) -> int:
    """Grid index of the first block boundary on the clock.

    Parameters
    ----------
    first_start_s : float
        Clock time of the grid's first interval start, in seconds on the clock
        the blocks follow (local time since any midnight) [s].
    width_s : float
        Block length [s] (900 for 15-minute blocks).
    interval_s : float
        Grid interval [s].

    Returns
    -------
    int
        Smallest ``k >= 0`` such that ``first_start_s + k·interval_s`` is a
        whole multiple of ``width_s``; when the grid never meets the clock's
        boundaries exactly, the first interval at or after one.
    """
    rest = (-first_start_s) % width_s
    return int(np.ceil(rest / interval_s - 1e-9))


def block_aggregate(
    values: np.ndarray, width: int, phase: int = 0, how: Literal["mean", "rms"] = "mean"
) -> WindowMeans:
    """Values aggregated over fixed blocks (10-minute values from 1-minute data).

    Parameters
    ----------
    values : float ndarray, shape (..., T)
        Interval values on the grid, ``NaN`` where missing.
    width : int
        Intervals per block.
    phase : int
        First block boundary (grid index).
    how : {"mean", "rms"}
        Arithmetic mean, or the square root of the mean of squares (the
        aggregation IEC 61000-4-30 uses for its 10-minute values, from
        memory).

    Returns
    -------
    WindowMeans
        One value per block; ``NaN`` for a block with a missing interval.
    """
    x = np.asarray(values, dtype=float)
    if how == "rms":
        w = window_means(x * x, width, "block", phase)
        return WindowMeans(np.sqrt(w.means), w.starts, w.width)
    if how == "mean":
        return window_means(x, width, "block", phase)
    raise ValueError(f"unknown aggregation {how!r}; expected 'mean' or 'rms'")
