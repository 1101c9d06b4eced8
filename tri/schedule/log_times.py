"""Timestamps of a log: ISO 8601 text to seconds, with offsets and time zones respected.

pandas parses the text (``format="ISO8601"``) and applies the IANA zone
database for times written without an offset when ``[log] timezone`` names a
zone; daylight-saving changes are handled there (a repeated hour in autumn is
resolved from the order of the rows, a skipped hour in spring is an error).

Times written with offsets are instants: they are kept as UTC and shown in
``[log] timezone`` when given, else in the first row's offset. Times without
an offset and without a zone are the logger's own clock, taken as they are.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from tri.schedule.errors import ScheduleError
from tri.schedule.log_spec import LogSpec, log_issue

#: Pattern of a trailing UTC offset or ``Z`` in ISO 8601 text.
OFFSET_PATTERN = r"(?:[zZ]|[+-]\d\d(?::?\d\d)?)$"
#: A clock time followed by a UTC offset (a bare date's "-01" is not an offset).
TIME_WITH_OFFSET = r"\d:\d\d(?::\d\d(?:[.,]\d+)?)?\s*" + OFFSET_PATTERN
EXAMPLE = "2024-03-01T14:05:00 or 2024-03-01 14:05:00-05:00"


def _first_rows(mask: np.ndarray, lines: np.ndarray) -> tuple[int, int, int]:
    """Position of the first true row, its line, and how many rows are true."""
    rows = np.flatnonzero(mask)
    return int(rows[0]), int(lines[rows[0]]), int(rows.size)


def _more(n: int) -> str:
    return f" ({n - 1} more such rows)" if n > 1 else ""


def parse_times(
    text: Any, lines: np.ndarray, shown: str, spec: LogSpec
) -> tuple[np.ndarray, str | None, float | None]:
    """Seconds of every row, the zone to show times in, and the fixed offset shown.

    Parameters
    ----------
    text : pandas Series of str
        The time column, stripped.
    lines : int ndarray
        File line of each row.
    shown : str
        The file's name in messages.
    spec : LogSpec
        ``timezone`` is used for times without an offset.

    Returns
    -------
    seconds : float ndarray
        Seconds since 1970-01-01 UTC (times without a zone and no
        ``timezone``: since 1970-01-01 on the logger's clock) [s].
    zone : str or None
        Zone to show times in.
    offset : float or None
        Offset from UTC to show times in when ``zone`` is None [s].

    Raises
    ------
    ScheduleError
        A time missing, unreadable, mixed with and without offsets, or (with a
        zone) one the clock skipped or repeated without a way to tell.
    """
    import pandas as pd

    aware = _with_offsets(text, lines, shown, spec)
    parsed = pd.to_datetime(text, format="ISO8601", errors="coerce", utc=aware)
    bad = parsed.isna().to_numpy()
    if bad.any():
        row, line, n = _first_rows(bad, lines)
        raise ScheduleError(
            [
                log_issue(
                    shown,
                    f"cannot read the time '{text.iloc[row]}'; expected ISO 8601 such as "
                    f"{EXAMPLE}{_more(n)}",
                    line,
                    spec.time,
                )
            ]
        )
    offset = None
    if aware:
        first = pd.Timestamp(text.iloc[0]).utcoffset()
        offset = None if first is None else first.total_seconds()
        utc = parsed.dt.tz_convert("UTC").dt.tz_localize(None)
        return _seconds(utc), spec.timezone, None if spec.timezone else offset
    if spec.timezone is None:
        return _seconds(parsed), None, None
    local = _localise(parsed, lines, shown, spec)
    return _seconds(local.dt.tz_convert("UTC").dt.tz_localize(None)), spec.timezone, None


def _with_offsets(text: Any, lines: np.ndarray, shown: str, spec: LogSpec) -> bool:
    """True when every time carries a UTC offset, False when none does; ``ScheduleError``
    for a missing time or a mix of both."""
    empty = (text == "").to_numpy()
    if empty.any():
        _, line, n = _first_rows(empty, lines)
        raise ScheduleError(
            [log_issue(shown, f"time missing in column '{spec.time}'{_more(n)}", line, spec.time)]
        )
    # Offsets are looked for first: parsing times whose offsets change within the
    # log (daylight saving) without utc=True makes Python objects of a million rows.
    with_offset = text.str.contains(TIME_WITH_OFFSET, regex=True).to_numpy()
    aware = bool(with_offset.any())
    if aware and not with_offset.all():
        _, line, n = _first_rows(~with_offset, lines)
        raise ScheduleError(
            [
                log_issue(
                    shown,
                    "time without a UTC offset among times with offsets; write every time "
                    f"the same way{_more(n)}",
                    line,
                    spec.time,
                )
            ]
        )
    return aware


def _localise(parsed: Any, lines: np.ndarray, shown: str, spec: LogSpec) -> Any:
    """Clock times in ``spec.timezone`` to instants; located errors where the clock says nothing."""
    zone = spec.timezone
    try:
        return parsed.dt.tz_localize(zone, ambiguous="infer", nonexistent="raise")
    except Exception:  # pandas raises several kinds here; locate the row ourselves
        pass
    probe = parsed.dt.tz_localize(zone, ambiguous="NaT", nonexistent="NaT")
    unknown = probe.isna().to_numpy()
    if not unknown.any():  # pragma: no cover - infer failed for another reason
        raise ScheduleError([log_issue(shown, f"cannot place the times in {zone}")])
    row, line, n = _first_rows(unknown, lines)
    when = parsed.iloc[row]
    skipped = parsed.dt.tz_localize(zone, ambiguous="NaT", nonexistent="shift_forward")
    if bool(skipped.isna().iloc[row]):
        why = (
            "falls in the hour the clocks went back, and the rows around it do not show "
            "which of the two it is"
        )
    else:
        why = "does not exist: the clocks went forward over it"
    return _raise_zone(shown, line, spec, f"the time {when} {why} in {zone}{_more(n)}")


def _raise_zone(shown: str, line: int, spec: LogSpec, message: str) -> Any:
    raise ScheduleError(
        [
            log_issue(
                shown,
                message + "; check the logger's clock setting or [log] timezone",
                line,
                spec.time,
            )
        ]
    )


def _seconds(naive_utc: Any) -> np.ndarray:
    """Seconds since 1970-01-01 of naive datetimes [s]."""
    ns = naive_utc.to_numpy(dtype="datetime64[ns]").astype(np.int64)
    return ns.astype(np.float64) / 1e9
