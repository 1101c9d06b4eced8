"""Reading a logger's CSV export: grid, gaps, duplicates, zones, and located errors.

Bad logs live in tests/data/bad_log/, one file per kind of problem, each
with the line and the words its message must hold. Times here are exact
(whole minutes), so placements are compared exactly.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from tri.schedule.errors import ScheduleError
from tri.schedule.log_file import read_log
from tri.schedule.log_spec import LogSpec

BAD = Path(__file__).parent / "data" / "bad_log"
SPEC = LogSpec(file="log.csv", time="Timestamp", amps=("I1", "I2", "I3"), neutral="IN")


def write(tmp_path: Path, text: str, name: str = "log.csv") -> Path:
    (tmp_path / name).write_text(text, encoding="utf-8")
    return tmp_path


def minutes(start: dt.datetime, n: int, fmt: str = "%Y-%m-%dT%H:%M:%S") -> list[str]:
    return [(start + dt.timedelta(minutes=k)).strftime(fmt) for k in range(n)]


def csv_of(times: list[str], amps: float = 10.0) -> str:
    rows = [f"{t},{amps},{amps + 1},{amps + 2},1" for t in times]
    return "Timestamp,I1,I2,I3,IN\n" + "\n".join(rows) + "\n"


BAD_CASES = [
    ("not_a_number.csv", 4, ["'OL'", "column 'I2'", "not a number"]),
    ("bad_time.csv", 4, ["yesterday noon", "ISO 8601"]),
    ("out_of_order.csv", 5, ["out of order", "2024-03-01T00:03:00", "line 4"]),
    ("missing_column.csv", 1, ["no column 'I1'", "'IA'"]),
    ("time_missing.csv", 3, ["time missing"]),
    ("mixed_offsets.csv", 4, ["without a UTC offset"]),
    ("negative_current.csv", 3, ["-11", "below 0 A"]),
    ("header_only.csv", 2, ["no rows"]),
    ("one_time.csv", None, ["at least two rows"]),
    ("repeated_hour_no_zone.csv", 5, ["out of order", "[log] timezone"]),
    ("not_utf8.csv", 2, ["UTF-8"]),
    ("wrong_year.csv", 4, ["jump", "check the date"]),
    # A decimal comma in a comma-separated file splits a cell in two: the row would be
    # read shifted into the wrong columns (pandas drops extra cells with usecols).
    ("extra_cell.csv", 3, ["6 cells where the header has 5", "decimal"]),
    # On the first data row pandas would even take the time column as the index.
    ("extra_cell_first_row.csv", 2, ["6 cells where the header has 5"]),
]


@pytest.mark.parametrize(("name", "line", "words"), BAD_CASES)
def test_bad_logs_are_located(name, line, words):
    """Every bad log gives a ScheduleError naming the file, the line and the problem."""
    spec = LogSpec(file=name, time="Timestamp", amps=("I1", "I2", "I3"), neutral="IN")
    with pytest.raises(ScheduleError) as info:
        read_log(spec, BAD)
    issue = info.value.issues[0]
    assert issue.file is not None and issue.file.endswith(name)
    assert issue.line == line
    text = str(issue)
    for word in words:
        assert word in text, text


def test_missing_file(tmp_path):
    with pytest.raises(ScheduleError, match="log file not found"):
        read_log(SPEC, tmp_path)


def test_skipped_hour_with_a_zone():
    """[common practice: EU clocks go forward at 02:00 on 2024-03-31] 02:30 never
    happened in Europe/Berlin that night."""
    spec = LogSpec(
        file="skipped_hour.csv",
        time="Timestamp",
        amps=("I1", "I2", "I3"),
        timezone="Europe/Berlin",
    )
    with pytest.raises(ScheduleError, match="does not exist") as info:
        read_log(spec, BAD)
    assert info.value.issues[0].line == 2


def test_grid_gaps_and_duplicates(tmp_path):
    """[computed] Ten minutes with 00:04-00:05 missing and 00:07 written twice:
    one gap of two intervals after line 5, one duplicate at line 10 (kept first)."""
    times = minutes(dt.datetime(2024, 3, 1, 0, 1), 10)
    times = [*times[:3], *times[5:7], times[6], *times[7:]]
    log = read_log(SPEC, write(tmp_path, csv_of(times)))
    p = log.placement
    assert log.interval_s == 60.0 and log.rows == 9
    assert p.n_intervals == 10
    assert [(g.start_index, g.intervals, g.after_line) for g in p.gaps] == [(3, 2, 4)]
    assert p.duplicates == 1 and p.first_duplicate_line == 7
    assert np.isnan(log.arrays.phase_a[0, 3:5]).all()
    assert np.sum(np.isfinite(log.arrays.phase_a[0])) == 8


def test_end_stamps_put_the_grid_a_minute_earlier(tmp_path):
    """[convention] With stamp = "end" (default) the row at 00:01 is the minute
    00:00-00:01; with "start" it is 00:01-00:02."""
    times = minutes(dt.datetime(2024, 3, 1, 0, 1), 5)
    base = write(tmp_path, csv_of(times))
    end = read_log(SPEC, base)
    start = read_log(LogSpec(**{**SPEC.__dict__, "stamp": "start"}), base)
    assert end.time_text(0) == "2024-03-01 00:00"
    assert start.time_text(0) == "2024-03-01 00:01"
    assert end.arrays.clock_start_s == 0.0 and start.arrays.clock_start_s == 60.0


def test_offsets_across_daylight_saving(tmp_path):
    """[common practice: EU clocks go forward 02:00 -> 03:00 on 2024-03-31] Times
    written with offsets, 01:58+01:00 ... 03:02+02:00, are consecutive minutes:
    no gap, and the times are shown in the first row's offset."""
    times = [
        "2024-03-31T01:58:00+01:00",
        "2024-03-31T01:59:00+01:00",
        "2024-03-31T03:00:00+02:00",
        "2024-03-31T03:01:00+02:00",
    ]
    log = read_log(SPEC, write(tmp_path, csv_of(times)))
    assert log.interval_s == 60.0 and log.gaps == ()
    assert log.offset_s == 3600.0 and log.zone is None


def test_zone_for_times_without_offsets(tmp_path):
    """[common practice: EU clocks go back 03:00 -> 02:00 on 2024-10-27] Naive local
    times with [log] timezone: the repeated hour is read in order (02:00-02:59
    twice), so 3 h of wall-clock rows are 4 h of one-minute intervals, no gap,
    no duplicate."""
    first = minutes(dt.datetime(2024, 10, 27, 1, 0), 120)  # 01:00 .. 02:59 (summer)
    again = minutes(dt.datetime(2024, 10, 27, 2, 0), 120)  # 02:00 .. 03:59 (winter)
    spec = LogSpec(**{**SPEC.__dict__, "timezone": "Europe/Berlin"})
    log = read_log(spec, write(tmp_path, csv_of(first + again)))
    assert log.arrays.n_intervals == 240 and log.gaps == () and log.placement.duplicates == 0
    assert log.time_text(0) == "2024-10-27 00:59+02:00"
    assert log.time_text(240) == "2024-10-27 03:59+01:00"


def test_decimal_comma_and_semicolons(tmp_path):
    """A European export: ; between cells and , as the decimal mark."""
    text = (
        "Timestamp;I1;I2;I3;IN\n"
        "2024-03-01T00:01:00;10,5;11;12;1\n"
        "2024-03-01T00:02:00;10,5;11;12;1\n"
    )
    spec = LogSpec(**{**SPEC.__dict__, "decimal": ","})
    log = read_log(spec, write(tmp_path, text))
    assert log.arrays.phase_a[0, 0] == 10.5


def test_empty_cells_are_not_recorded(tmp_path):
    """An empty cell is a missing value for that column only (counted, not an error)."""
    text = "Timestamp,I1,I2,I3,IN\n2024-03-01T00:01:00,10,,12,1\n2024-03-01T00:02:00,10,11,12,1\n"
    log = read_log(SPEC, write(tmp_path, text))
    assert log.empty_cells["I2"] == 1
    assert np.isnan(log.arrays.phase_a[1, 0]) and log.arrays.phase_a[1, 1] == 11.0


def test_bad_number_in_a_later_chunk(tmp_path, monkeypatch):
    """The line is right when the bad cell is past the first chunk of rows."""
    monkeypatch.setattr("tri.schedule.log_file.CHUNK_ROWS", 4)
    times = minutes(dt.datetime(2024, 3, 1, 0, 1), 10)
    text = csv_of(times).replace(f"{times[8]},10.0", f"{times[8]},x")
    with pytest.raises(ScheduleError) as info:
        read_log(SPEC, write(tmp_path, text))
    assert info.value.issues[0].line == 10


@given(
    st.lists(st.lists(st.sampled_from(["", "1", "2.5", "x"]), max_size=6), max_size=20),
    st.sampled_from([",", ";", "\t"]),
    st.sampled_from(["\n", "\r\n"]),
    st.booleans(),
)
def test_cell_counts_equal_splitting_each_line(rows, sep, end, final_newline):
    # Invariant: the numpy count equals Python's own lines of the text, split at the
    # separator (0 for an empty line).
    from tri.schedule.log_cells import line_cell_counts

    lines = [sep.join(r) for r in rows]
    text = end.join(lines) + (end if final_newline and lines else "")
    expected = [0 if line == "" else line.count(sep) + 1 for line in text.splitlines()]
    assert line_cell_counts(text.encode(), sep).tolist() == expected
