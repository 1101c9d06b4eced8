"""Figures of a logged series over time: unbalance per interval, percentiles, durations.

Pure numpy on the regular grid of :mod:`tri.engine.demand` (time axis last,
``NaN`` where the logger recorded nothing).

References
----------
1. EN 50160, *Voltage characteristics of electricity supplied by public
   distribution networks*: supply voltage unbalance assessed on the
   10-minute mean values over each period of one week, 95 % of them within
   the limit (published).
2. IEC 61000-4-30: the unbalance ``u2`` from three line-voltage magnitudes,
   and 10-minute aggregation (see :mod:`tri.engine.unbalance`; the
   aggregation rule is from memory).
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from tri.engine.unbalance import deviation_rate_pct, vuf_from_line_magnitudes

#: One week [s] (the EN 50160 assessment period).
WEEK_S = 7 * 24 * 3600.0


def deviation_series_pct(phase_a: np.ndarray) -> np.ndarray:
    """Largest deviation of a phase current from the mean of the three, per interval.

    Parameters
    ----------
    phase_a : float ndarray, shape (3, T)
        Phase currents in phase order [A], ``NaN`` where missing.

    Returns
    -------
    float ndarray, shape (T,)
        ``100·max|I_k − Ī| / Ī`` [%]; ``NaN`` where a phase is missing.
    """
    x = np.moveaxis(np.asarray(phase_a, dtype=float), 0, -1)
    out = deviation_rate_pct(np.where(np.isfinite(x), x, 0.0))
    return np.where(np.all(np.isfinite(x), axis=-1), out, np.nan)


def vuf_series_pct(volts_ll: np.ndarray) -> np.ndarray:
    """Voltage unbalance factor from line-voltage magnitudes, per interval.

    Parameters
    ----------
    volts_ll : float ndarray, shape (3, T)
        Line-voltage magnitudes ``U_AB, U_BC, U_CA`` [V], ``NaN`` where missing.

    Returns
    -------
    float ndarray, shape (T,)
        ``u2`` by the IEC 61000-4-30 β formula [%]; ``NaN`` where a voltage is
        missing.
    """
    v = np.asarray(volts_ll, dtype=float)
    ok = np.all(np.isfinite(v), axis=0)
    filled = np.where(ok, v, 1.0)
    return np.where(ok, vuf_from_line_magnitudes(filled[0], filled[1], filled[2]), np.nan)


def percentiles(values: np.ndarray, q: tuple[float, ...]) -> np.ndarray:
    """Percentiles of the present values (``NaN`` left out).

    Parameters
    ----------
    values : float ndarray, shape (..., K)
    q : tuple of float
        Percentiles, 0 to 100 [%].

    Returns
    -------
    float ndarray, shape (..., len(q))
        ``NaN`` where no value is present.

    Notes
    -----
    The inverted empirical distribution is used (numpy's ``inverted_cdf``):
    the 95th percentile is the smallest recorded value that at least 95 % of
    the values do not exceed, which is how "95 % of the 10-minute values
    within the limit" reads [1]. It is always a recorded value, never an
    interpolation between two.
    """
    x = np.asarray(values, dtype=float)
    if x.shape[-1] == 0 or not np.any(np.isfinite(x)):
        return np.full((*x.shape[:-1], len(q)), np.nan)
    with np.errstate(all="ignore"), warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        out = np.nanpercentile(x, q, axis=-1, method="inverted_cdf")
    return np.moveaxis(np.asarray(out, dtype=float), 0, -1)


@dataclass(frozen=True, eq=False)
class WeeklyPercentile:
    """A percentile of each one-week period of values.

    Attributes
    ----------
    period_start_index : int ndarray, shape (P,)
        Index (into the values) of each period's first value.
    counts : int ndarray, shape (P,)
        Values present in each period.
    value : float ndarray, shape (P,)
        The percentile of each period [same unit as the values].
    """

    period_start_index: np.ndarray
    counts: np.ndarray
    value: np.ndarray


def weekly_percentile(values: np.ndarray, per_week: int, q: float = 95.0) -> WeeklyPercentile:
    """The ``q`` percentile of each consecutive week of values, from the first one.

    Parameters
    ----------
    values : float ndarray, shape (K,)
        One value per aggregation interval (``NaN`` where missing).
    per_week : int
        Values in a week (1008 ten-minute values).
    q : float
        Percentile [%].

    Returns
    -------
    WeeklyPercentile
        One row per period; the last period may be shorter than a week.
    """
    x = np.asarray(values, dtype=float)
    starts = np.arange(0, x.size, max(per_week, 1), dtype=np.int64)
    rows = [x[s : s + per_week] for s in starts]
    counts = np.array([int(np.sum(np.isfinite(r))) for r in rows], dtype=np.int64)
    value = np.array([percentiles(r, (q,))[0] for r in rows], dtype=float)
    return WeeklyPercentile(starts, counts, value)


def hours_above(values: np.ndarray, levels: np.ndarray, interval_h: float) -> np.ndarray:
    """Demand-duration figures: hours the series spent above each level.

    Parameters
    ----------
    values : float ndarray, shape (..., T)
        Interval averages [A], ``NaN`` where missing (not counted).
    levels : float ndarray, shape (L,)
        Current levels [A].
    interval_h : float
        Length of one interval [h].

    Returns
    -------
    float ndarray, shape (..., L)
        ``interval_h · #{k : x_k > level}`` [h].
    """
    x = np.asarray(values, dtype=float)
    lv = np.asarray(levels, dtype=float)
    flat = x.reshape(-1, x.shape[-1])
    out = np.empty((flat.shape[0], lv.size))
    for i, row in enumerate(flat):
        s = np.sort(row[np.isfinite(row)])
        out[i] = (s.size - np.searchsorted(s, lv, side="right")) * interval_h
    return out.reshape((*x.shape[:-1], lv.size))


@dataclass(frozen=True, eq=False)
class Envelope:
    """A long series reduced to buckets for a picture.

    Attributes
    ----------
    start_index : int ndarray, shape (B,)
        First grid index of each bucket.
    low, mean, high : float ndarray, shape (..., B)
        Smallest, average and largest present value in each bucket; ``NaN``
        for an empty bucket.
    """

    start_index: np.ndarray
    low: np.ndarray
    mean: np.ndarray
    high: np.ndarray


def envelope(values: np.ndarray, buckets: int) -> Envelope:
    """Reduce a series to at most ``buckets`` equal buckets (low, mean, high).

    Parameters
    ----------
    values : float ndarray, shape (..., T)
    buckets : int
        Largest number of buckets wanted (>= 1).

    Returns
    -------
    Envelope
        Buckets of ``ceil(T / buckets)`` intervals each, the last one possibly
        shorter; peaks survive in ``high``.
    """
    x = np.asarray(values, dtype=float)
    t = x.shape[-1]
    size = max(1, -(-t // max(buckets, 1)))
    n = -(-t // size) if t else 0
    pad = n * size - t
    padded = np.concatenate([x, np.full((*x.shape[:-1], pad), np.nan)], axis=-1)
    blocks = padded.reshape((*x.shape[:-1], n, size))
    with np.errstate(all="ignore"), warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        low = np.nanmin(blocks, axis=-1) if n else np.empty((*x.shape[:-1], 0))
        high = np.nanmax(blocks, axis=-1) if n else np.empty((*x.shape[:-1], 0))
        mean = np.nanmean(blocks, axis=-1) if n else np.empty((*x.shape[:-1], 0))
    return Envelope(np.arange(n, dtype=np.int64) * size, low, mean, high)
