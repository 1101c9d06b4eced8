"""A logged series analysed: demand, unbalance over time, durations.

:func:`analyse_log` takes plain arrays on a regular grid
(:class:`LogArrays`, built by the file layer from a logger's export) and
returns frozen figures (:class:`LogAnalysis`). Times here are seconds; the
report turns grid indices into clock times.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.demand import (
    WindowMode,
    block_aggregate,
    block_phase,
    peak_demand,
)
from tri.engine.over_time import (
    WEEK_S,
    Envelope,
    deviation_series_pct,
    envelope,
    hours_above,
    percentiles,
    vuf_series_pct,
    weekly_percentile,
)

#: Percentiles reported for figures over time [%].
PERCENTILES: tuple[float, ...] = (50.0, 95.0, 99.0, 100.0)
#: Aggregation interval of the EN 50160 assessment [s] (10-minute values).
AGGREGATE_S = 600.0
#: Buckets kept for a picture of the whole log [-].
PICTURE_BUCKETS = 720
#: Levels of the demand-duration view [-].
DURATION_LEVELS = 64


@dataclass(frozen=True, eq=False)
class LogArrays:
    """A logger's series on a regular grid.

    Attributes
    ----------
    interval_s : float
        Grid interval [s]; sample ``k`` is the average over
        ``[k·interval_s, (k+1)·interval_s)`` from the first interval's start.
    clock_start_s : float
        The first interval's start on the local clock, seconds after a local
        midnight [s] (aligns blocks and 10-minute values to the clock).
    phase_a : float ndarray, shape (3, T)
        Phase currents in phase order [A]; ``NaN`` where missing.
    neutral_a : float ndarray, shape (T,) or None
        Neutral current [A].
    volts_ll : float ndarray, shape (3, T) or None
        Line-voltage magnitudes AB, BC, CA [V].
    """

    interval_s: float
    clock_start_s: float
    phase_a: np.ndarray
    neutral_a: np.ndarray | None = None
    volts_ll: np.ndarray | None = None

    @property
    def n_intervals(self) -> int:
        """Intervals on the grid."""
        return int(np.shape(self.phase_a)[-1])


@dataclass(frozen=True, eq=False)
class ChannelDemand:
    """Peak demand of one current channel.

    Attributes
    ----------
    value_a : float
        Highest window average [A] (``NaN`` when no window is complete).
    start_index : int
        Grid index of the window's first interval (-1 when none).
    mean_a : float
        Average over every recorded interval [A].
    max_interval_a : float
        Largest single interval value [A].
    """

    value_a: float
    start_index: int
    mean_a: float
    max_interval_a: float


@dataclass(frozen=True, eq=False)
class OverTime:
    """A figure aggregated to fixed intervals and its percentiles.

    Attributes
    ----------
    aggregate_s : float
        Length of each aggregated value [s] (600 for 10-minute values).
    values : float ndarray, shape (K,)
        The aggregated values [%].
    percentiles : dict of float to float
        Percentile [%] -> value [%] over the whole log.
    weekly_95 : float ndarray, shape (P,)
        95th percentile of each week from the log's start [%] (last period
        possibly shorter).
    weekly_counts : int ndarray, shape (P,)
        Values present in each week.
    """

    aggregate_s: float
    values: np.ndarray
    percentiles: dict[float, float]
    weekly_95: np.ndarray
    weekly_counts: np.ndarray


@dataclass(frozen=True, eq=False)
class LogAnalysis:
    """Everything computed from a log.

    Attributes
    ----------
    interval_s : float
        Grid interval [s].
    n_intervals : int
        Intervals on the grid (first to last recorded time).
    recorded_intervals : int
        Intervals with every phase current present.
    demand_minutes : float
        Demand window [min].
    window : {"sliding", "block"}
    window_intervals : int
        Intervals per demand window.
    phases : tuple of 3 ChannelDemand
    neutral : ChannelDemand or None
    deviation : OverTime
        Largest deviation of a phase current from the mean of the three [%].
    vuf : OverTime or None
        Voltage unbalance factor from the logged line voltages [%].
    duration_levels_a : float ndarray, shape (L,)
        Current levels of the demand-duration view [A].
    hours_above : float ndarray, shape (4, L)
        Hours above each level for A, B, C and the neutral (``NaN`` row
        without a neutral) [h].
    picture : Envelope
        The phase and neutral currents (rows A, B, C, N) reduced for a picture.
    """

    interval_s: float
    n_intervals: int
    recorded_intervals: int
    demand_minutes: float
    window: WindowMode
    window_intervals: int
    phases: tuple[ChannelDemand, ChannelDemand, ChannelDemand]
    neutral: ChannelDemand | None
    deviation: OverTime
    vuf: OverTime | None
    duration_levels_a: np.ndarray
    hours_above: np.ndarray
    picture: Envelope

    @property
    def recorded_days(self) -> float:
        """Time covered by recorded intervals [days]."""
        return self.recorded_intervals * self.interval_s / 86400.0

    @property
    def span_days(self) -> float:
        """Time from the first interval's start to the last one's end [days]."""
        return self.n_intervals * self.interval_s / 86400.0


def intervals_per(length_s: float, interval_s: float) -> int | None:
    """Whole number of grid intervals in ``length_s``, or ``None`` when it does not divide."""
    ratio = length_s / interval_s
    k = round(ratio)
    if k >= 1 and abs(ratio - k) <= 1e-9 * max(1.0, ratio):
        return int(k)
    return None


def _channel(values: np.ndarray, width: int, window: WindowMode, phase: int) -> ChannelDemand:
    peak = peak_demand(values, width, window, phase)
    present = values[np.isfinite(values)]
    return ChannelDemand(
        value_a=float(peak.value),
        start_index=int(peak.start_index),
        mean_a=float(np.mean(present)) if present.size else float("nan"),
        max_interval_a=float(np.max(present)) if present.size else float("nan"),
    )


def _over_time(series: np.ndarray, log: LogArrays, how: str) -> OverTime:
    """Aggregate a per-interval figure to 10-minute values (or keep the log's own)."""
    per = intervals_per(AGGREGATE_S, log.interval_s)
    if per is None:
        values, length = series, log.interval_s
    else:
        phase = block_phase(log.clock_start_s, AGGREGATE_S, log.interval_s)
        values, length = block_aggregate(series, per, phase, how).means, AGGREGATE_S  # type: ignore[arg-type]
    q = percentiles(values, PERCENTILES)
    per_week = max(1, round(WEEK_S / length))
    weekly = weekly_percentile(values, per_week, 95.0)
    return OverTime(
        aggregate_s=float(length),
        values=values,
        percentiles={p: float(v) for p, v in zip(PERCENTILES, q, strict=True)},
        weekly_95=weekly.value,
        weekly_counts=weekly.counts,
    )


def analyse_log(
    log: LogArrays, *, demand_minutes: float = 15.0, window: WindowMode = "sliding"
) -> LogAnalysis:
    """Demand, unbalance over time and durations of a logged panel.

    Parameters
    ----------
    log : LogArrays
        The series on a regular grid.
    demand_minutes : float
        Demand window [min]; must be a whole number of grid intervals.
    window : {"sliding", "block"}
        Sliding windows (the conservative figure) or clock-aligned blocks.

    Returns
    -------
    LogAnalysis

    Raises
    ------
    ValueError
        When the window is not a whole number of intervals, or shapes disagree.
    """
    phase_a = np.asarray(log.phase_a, dtype=float)
    if phase_a.ndim != 2 or phase_a.shape[0] != 3:
        raise ValueError(f"phase currents must have shape (3, T), got {phase_a.shape}")
    if not log.interval_s > 0:
        raise ValueError(f"interval must be > 0 s, got {log.interval_s!r}")
    width = intervals_per(60.0 * demand_minutes, log.interval_s)
    if width is None:
        raise ValueError(
            f"a {demand_minutes:g}-minute demand window is not a whole number of "
            f"{log.interval_s:g}-second intervals"
        )
    phase = block_phase(log.clock_start_s, 60.0 * demand_minutes, log.interval_s)
    phases = tuple(_channel(phase_a[k], width, window, phase) for k in range(3))
    rows = [phase_a[0], phase_a[1], phase_a[2]]
    neutral = None
    if log.neutral_a is not None:
        n = np.asarray(log.neutral_a, dtype=float)
        neutral = _channel(n, width, window, phase)
        rows.append(n)
    else:
        rows.append(np.full(phase_a.shape[1], np.nan))
    stack = np.stack(rows)
    top = np.nanmax(stack) if np.any(np.isfinite(stack)) else 0.0
    levels = np.linspace(0.0, max(float(top), 1e-9), DURATION_LEVELS)
    vuf = None
    if log.volts_ll is not None:
        vuf = _over_time(vuf_series_pct(log.volts_ll), log, "rms")
    return LogAnalysis(
        interval_s=float(log.interval_s),
        n_intervals=log.n_intervals,
        recorded_intervals=int(np.sum(np.all(np.isfinite(phase_a), axis=0))),
        demand_minutes=float(demand_minutes),
        window=window,
        window_intervals=width,
        phases=phases,  # type: ignore[arg-type]
        neutral=neutral,
        deviation=_deviation_over_time(phase_a, log),
        vuf=vuf,
        duration_levels_a=levels,
        hours_above=hours_above(stack, levels, log.interval_s / 3600.0),
        picture=envelope(stack, PICTURE_BUCKETS),
    )


def _deviation_over_time(phase_a: np.ndarray, log: LogArrays) -> OverTime:
    """Deviation of 10-minute mean phase currents (EN 50160's form applied to currents)."""
    per = intervals_per(AGGREGATE_S, log.interval_s)
    if per is None:
        return _over_time(deviation_series_pct(phase_a), log, "mean")
    phase = block_phase(log.clock_start_s, AGGREGATE_S, log.interval_s)
    means = block_aggregate(phase_a, per, phase, "mean").means
    series = deviation_series_pct(means)
    q = percentiles(series, PERCENTILES)
    weekly = weekly_percentile(series, round(WEEK_S / AGGREGATE_S), 95.0)
    return OverTime(
        aggregate_s=AGGREGATE_S,
        values=series,
        percentiles={p: float(v) for p, v in zip(PERCENTILES, q, strict=True)},
        weekly_95=weekly.value,
        weekly_counts=weekly.counts,
    )
