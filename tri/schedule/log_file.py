"""Read a logger's CSV export into the engine's regular-grid arrays.

pandas does the reading (its C parser reads a million rows in about a
second) and the timestamps (ISO 8601 with or without offsets, time zones
and daylight-saving changes from the IANA database). It is imported only
here and only when a log is read, so start-up and schedules without a log
never load it. The rest is plain numpy: every row is placed on a regular
grid of the detected interval, and the engine receives arrays with ``NaN``
where nothing was recorded.

Problems are :class:`~tri.schedule.errors.ScheduleIssue` items naming the
log file and its line (the header is line 1): a missing or unreadable file,
a column that is not there, a cell that is not a number, a time that cannot
be read or that goes backwards. All of them are collected and raised
together as :class:`~tri.schedule.errors.ScheduleError`.
"""

from __future__ import annotations

import csv
import datetime as dt
import difflib
import zoneinfo
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from tri.engine.log_analysis import LogArrays
from tri.schedule.errors import ScheduleError
from tri.schedule.log_cells import check_cell_counts
from tri.schedule.log_grid import Gap, GridPlacement, place_on_grid
from tri.schedule.log_spec import LogSpec, log_issue
from tri.schedule.log_times import parse_times

#: Rows read per chunk (progress is reported between chunks) [-].
CHUNK_ROWS = 250_000

Progress = Callable[[float, str], None]


@dataclass(frozen=True, eq=False)
class LoadedLog:
    """A log read and placed on its grid.

    Attributes
    ----------
    path : str
        The file as named in messages.
    arrays : LogArrays
        The series for the engine.
    start_s : float
        Start of the grid's first interval, seconds since 1970-01-01 UTC (for
        times without a zone: since 1970-01-01 on the logger's own clock) [s].
    zone : str or None
        IANA zone the times are shown in.
    offset_s : float or None
        Fixed offset from UTC the times are shown in when there is no zone
        name (the first row's offset) [s]; ``None`` for times without a zone.
    rows : int
        Data rows read.
    placement : GridPlacement
        Interval, gaps, duplicate times and shifted rows.
    empty_cells : dict of str to int
        Empty cells per column (read as not recorded).
    """

    path: str
    arrays: LogArrays
    start_s: float
    zone: str | None
    offset_s: float | None
    rows: int
    placement: GridPlacement
    empty_cells: dict[str, int] = field(default_factory=dict)

    @property
    def interval_s(self) -> float:
        """Grid interval [s]."""
        return self.arrays.interval_s

    @property
    def gaps(self) -> tuple[Gap, ...]:
        """Runs of intervals with no row."""
        return self.placement.gaps

    def time_at(self, index: float) -> dt.datetime:
        """Clock time of a grid position (``index`` intervals after the first start)."""
        t = self.start_s + index * self.interval_s
        if self.zone is not None:
            return dt.datetime.fromtimestamp(t, zoneinfo.ZoneInfo(self.zone))
        if self.offset_s is not None:
            return dt.datetime.fromtimestamp(t, dt.timezone(dt.timedelta(seconds=self.offset_s)))
        return dt.datetime(1970, 1, 1) + dt.timedelta(seconds=t)

    def time_text(self, index: float) -> str:
        """``time_at`` as ISO 8601 text to the minute (seconds when not whole)."""
        t = self.time_at(index)
        spec = "minutes" if t.second == 0 and t.microsecond == 0 else "seconds"
        return t.isoformat(sep=" ", timespec=spec)


def _not_utf8(path: Path, shown: str) -> ScheduleError:
    """The error for a file that is not UTF-8, at the line of its first bad byte."""
    line = None
    with open(path, "rb") as fh:
        for number, raw in enumerate(fh, start=1):
            try:
                raw.decode("utf-8")
            except UnicodeDecodeError:
                line = number
                break
    return ScheduleError(
        [log_issue(shown, "is not UTF-8 text; export the log as CSV in UTF-8", line)]
    )


def _sniff(header: str, decimal: str) -> str:
    """The delimiter: the most frequent of , ; tab in the header line."""
    counts = {d: header.count(d) for d in (",", ";", "\t")}
    if decimal == ",":
        counts[","] = 0
    best = max(counts, key=lambda d: counts[d])
    return best if counts[best] else ","


def _read_header(path: Path, shown: str) -> str:
    try:
        with open(path, encoding="utf-8-sig", newline="") as fh:
            return fh.readline()
    except FileNotFoundError:
        raise ScheduleError([log_issue(shown, "log file not found")]) from None
    except IsADirectoryError:
        raise ScheduleError([log_issue(shown, "is a folder, expected a CSV file")]) from None
    except UnicodeDecodeError:
        raise _not_utf8(path, shown) from None
    except OSError as exc:
        raise ScheduleError(
            [log_issue(shown, f"cannot read the log: {exc.strerror or exc}")]
        ) from None


def _check_columns(header: str, sep: str, spec: LogSpec, shown: str) -> list[str]:
    names = [c.strip() for c in next(csv.reader([header], delimiter=sep), [])]
    if not any(names):
        raise ScheduleError(
            [log_issue(shown, "is empty; expected a header line of column names", 1)]
        )
    issues = []
    for col in spec.columns():
        n = names.count(col)
        if n == 1:
            continue
        if n > 1:
            issues.append(log_issue(shown, f"column '{col}' appears {n} times", 1, col))
            continue
        close = difflib.get_close_matches(col, names, n=1, cutoff=0.6)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        listed = ", ".join(f"'{c}'" for c in names[:12]) + (" ..." if len(names) > 12 else "")
        issues.append(
            log_issue(
                shown,
                f"no column '{col}' (named in the schedule's [log]){hint} The header has {listed}.",
                1,
                col,
            )
        )
    if issues:
        raise ScheduleError(issues)
    return names


def read_log(
    spec: LogSpec,
    base_dir: Path | str | None = None,
    *,
    progress: Progress | None = None,
) -> LoadedLog:
    """Read, check and place a logger's export on its regular grid.

    Parameters
    ----------
    spec : LogSpec
        The schedule's ``[log]`` table.
    base_dir : path, optional
        Folder of the schedule (``spec.file`` is relative to it).
    progress : callable, optional
        Called as ``progress(fraction, what)`` between steps; it may raise to
        cancel.

    Returns
    -------
    LoadedLog

    Raises
    ------
    ScheduleError
        Every problem found, located by file and line.
    """
    path = Path(base_dir or ".") / spec.file
    shown = str(path)
    report = progress or (lambda _f, _w: None)
    header = _read_header(path, shown)
    sep = _sniff(header, spec.decimal)
    _check_columns(header, sep, spec, shown)
    check_cell_counts(path, shown, sep)
    report(0.0, "reading the log")
    frame, lines = _read_frame(path, shown, spec, sep, report)
    values = {c: frame[c].to_numpy(dtype=float) for c in spec.columns()[1:]}
    _check_values(values, lines, spec, shown)
    report(0.8, "reading the times")
    times, zone, offset = parse_times(frame[spec.time], lines, shown, spec)
    report(0.9, "placing rows on the interval grid")
    text = frame[spec.time]
    placement = place_on_grid(
        times,
        lines,
        shown,
        describe=lambda i: str(text.iloc[i]),
        zoned=zone is not None or offset is not None,
    )
    start = placement.start_s - (placement.interval_s if spec.stamp == "end" else 0.0)
    arrays = LogArrays(
        interval_s=placement.interval_s,
        clock_start_s=_clock_seconds(start, zone, offset),
        phase_a=np.stack([placement.scatter(values[c]) for c in spec.amps]),
        neutral_a=None if spec.neutral is None else placement.scatter(values[spec.neutral]),
        volts_ll=(
            None
            if spec.volts_ll is None
            else np.stack([placement.scatter(values[c]) for c in spec.volts_ll])
        ),
    )
    report(1.0, "log read")
    return LoadedLog(
        path=shown,
        arrays=arrays,
        start_s=start,
        zone=zone,
        offset_s=offset,
        rows=int(times.size),
        placement=placement,
        empty_cells={c: int(np.sum(np.isnan(v))) for c, v in values.items()},
    )


def _read_frame(
    path: Path, shown: str, spec: LogSpec, sep: str, report: Progress
) -> tuple[Any, np.ndarray]:
    """The needed columns (times as text, numbers as float, empty cells NaN) and their lines.

    Numbers are parsed by the C reader directly; only when that fails is the
    file read again as text to name every column's first bad cell.
    """
    import pandas as pd

    cols = list(spec.columns())
    numeric = cols[1:]
    options: dict[str, Any] = {
        "sep": sep,
        "usecols": lambda c: c.strip() in cols,
        "decimal": spec.decimal,
        "na_values": [""],
        "keep_default_na": False,
        "skip_blank_lines": False,
        "skipinitialspace": True,
        "encoding": "utf-8-sig",
        "engine": "c",
        "chunksize": CHUNK_ROWS,
    }
    try:
        try:
            frame = _read_chunks(pd, path, options, cols, False, report)
        except ValueError:
            frame = _read_chunks(pd, path, options, cols, True, report)
            _locate_bad_numbers(pd, frame, numeric, shown, spec.decimal)
    except UnicodeDecodeError:
        raise _not_utf8(path, shown) from None
    except pd.errors.ParserError as exc:
        raise ScheduleError([log_issue(shown, f"is not a readable CSV file: {exc}")]) from None
    except OSError as exc:
        raise ScheduleError(
            [log_issue(shown, f"cannot read the log: {exc.strerror or exc}")]
        ) from None
    if len(frame) == 0:
        raise ScheduleError([log_issue(shown, "has a header but no rows of data", 2)])
    times = frame[spec.time].fillna("").astype(str).str.strip()
    frame[spec.time] = times
    blank = (times == "") & frame[numeric].isna().all(axis=1)
    if bool(blank.any()):
        frame = frame.loc[~blank]
    if len(frame) == 0:
        raise ScheduleError([log_issue(shown, "has a header but no rows of data", 2)])
    return frame, frame.index.to_numpy(dtype=np.int64) + 2


def _read_chunks(
    pd: Any,
    path: Path,
    options: dict[str, Any],
    columns: list[str],
    as_text: bool,
    report: Progress,
) -> Any:
    """Read in chunks, reporting progress; number columns as float unless ``as_text``.

    Raises ``ValueError`` when a number column holds something else (the
    caller then reads the file as text to say where).
    """
    size = max(path.stat().st_size, 1)
    chunks = []
    dtype = str if as_text else {columns[0]: str}
    with pd.read_csv(path, dtype=dtype, **options) as reader:
        for chunk in reader:
            chunk.columns = [c.strip() for c in chunk.columns]
            chunks.append(chunk)
            report(min(0.8, 0.8 * reader.handles.handle.tell() / size), "reading the log")
    if not chunks:
        return pd.DataFrame({c: np.array([], dtype=float) for c in columns})
    frame = pd.concat(chunks, ignore_index=True) if len(chunks) > 1 else chunks[0]
    if not as_text and len(frame):
        for col in columns[1:]:
            if frame[col].dtype.kind not in "fiu":
                raise ValueError(col)
            frame[col] = frame[col].astype(float)
    return frame


def _locate_bad_numbers(pd: Any, frame: Any, numeric: list[str], shown: str, decimal: str) -> None:
    """Raise naming the first cell of each number column that is not a number."""
    issues = []
    for col in numeric:
        text = frame[col].fillna("").astype(str).str.strip()
        plain = text.str.replace(",", ".", regex=False) if decimal == "," else text
        values = pd.to_numeric(plain.where(plain != "", None), errors="coerce")
        bad = np.flatnonzero((values.isna() & (text != "")).to_numpy())
        if bad.size:
            row = int(bad[0])
            more = f" ({bad.size - 1} more in this column)" if bad.size > 1 else ""
            issues.append(
                log_issue(
                    shown,
                    f"'{text.iloc[row]}' in column '{col}' is not a number{more}",
                    int(frame.index[row]) + 2,
                    col,
                )
            )
    if issues:
        raise ScheduleError(issues)
    raise ScheduleError([log_issue(shown, "a number column could not be read")])


def _check_values(
    values: dict[str, np.ndarray], lines: np.ndarray, spec: LogSpec, shown: str
) -> None:
    """Currents must be 0 A or more, voltages above 0 V (RMS magnitudes)."""
    issues = []
    volts = set(spec.volts_ll or ())
    for col, x in values.items():
        bad = np.flatnonzero(x <= 0) if col in volts else np.flatnonzero(x < 0)
        if bad.size:
            what = "a voltage of 0 V or less" if col in volts else "a current below 0 A"
            more = f" ({bad.size - 1} more in this column)" if bad.size > 1 else ""
            issues.append(
                log_issue(
                    shown,
                    f"{x[bad[0]]:g} in column '{col}' is {what}; expected RMS magnitudes{more}",
                    int(lines[bad[0]]),
                    col,
                )
            )
    if issues:
        raise ScheduleError(issues)


def _clock_seconds(t: float, zone: str | None, offset: float | None) -> float:
    """Seconds after the local midnight at instant ``t`` (aligns blocks to the clock)."""
    if zone is not None:
        local = dt.datetime.fromtimestamp(t, zoneinfo.ZoneInfo(zone))
        return local.hour * 3600.0 + local.minute * 60.0 + local.second + local.microsecond / 1e6
    return float((t + (offset or 0.0)) % 86400.0)
