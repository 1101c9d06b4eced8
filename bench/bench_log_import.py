"""Benchmark: read a million-row logger export and analyse it.

    python bench/bench_log_import.py            # 1,000,000 one-minute rows, 3 runs
    python bench/bench_log_import.py --quick    # 100,000 rows, 1 run (CI)

Writes the CSV once to a temporary folder (times with UTC offsets across a
daylight-saving change, 4 currents and 3 line voltages per row), then times
`read_log` (pandas parsing, times, grid) and `analyse_log` (demand, 10-minute
percentiles, durations), printing medians and the rows per second. The
baseline ratio is against reading the same file with Python's csv module and
datetime.fromisoformat (the plain-library way, no numbers checked).
"""

from __future__ import annotations

import argparse
import csv
import datetime as dt
import statistics
import tempfile
import time
from pathlib import Path

import numpy as np

from tri.engine.log_analysis import analyse_log
from tri.schedule.log_file import read_log
from tri.schedule.log_spec import LogSpec


def write_log(path: Path, rows: int) -> None:
    rng = np.random.default_rng(1)
    start = dt.datetime(2024, 3, 1, tzinfo=dt.timezone(dt.timedelta(hours=1)))
    change = dt.datetime(2024, 3, 31, 1, 0, tzinfo=dt.UTC)
    amps = np.round(rng.uniform(50, 150, (4, rows)), 1)
    volts = np.round(rng.uniform(395, 405, (3, rows)), 1)
    summer = dt.timezone(dt.timedelta(hours=2))
    with open(path, "w", encoding="utf-8") as fh:
        fh.write("Timestamp,I1,I2,I3,IN,U12,U23,U31\n")
        for k in range(rows):
            t = start + dt.timedelta(minutes=k + 1)
            if t >= change:
                t = t.astimezone(summer)
            cells = ",".join(f"{x:.1f}" for x in (*amps[:, k], *volts[:, k]))
            fh.write(f"{t.isoformat()},{cells}\n")


def plain_read(path: Path) -> int:
    n = 0
    with open(path, encoding="utf-8") as fh:
        reader = csv.reader(fh)
        next(reader)
        for row in reader:
            dt.datetime.fromisoformat(row[0])
            [float(x) for x in row[1:]]
            n += 1
    return n


def timed(fn, runs: int) -> float:
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--quick", action="store_true", help="100,000 rows, one run")
    parser.add_argument("--rows", type=int, default=None)
    args = parser.parse_args()
    rows = args.rows or (100_000 if args.quick else 1_000_000)
    runs = 1 if args.quick else 3
    spec = LogSpec(
        file="bench.csv",
        time="Timestamp",
        amps=("I1", "I2", "I3"),
        neutral="IN",
        volts_ll=("U12", "U23", "U31"),
    )
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.csv"
        write_log(path, rows)
        size_mb = path.stat().st_size / 1e6
        log = read_log(spec, tmp)
        t_read = timed(lambda: read_log(spec, tmp), runs)
        t_analyse = timed(lambda: analyse_log(log.arrays), runs)
        t_plain = timed(lambda: plain_read(path), 1)
    print(f"log import, {rows:,} rows ({size_mb:.1f} MB), median of {runs} run(s)")
    print(f"{'step':<34}{'seconds':>10}{'rows/s':>14}")
    for name, t in (
        ("read_log (pandas, times, grid)", t_read),
        ("analyse_log (demand, percentiles)", t_analyse),
        ("read + analyse", t_read + t_analyse),
        ("baseline: csv + fromisoformat", t_plain),
    ):
        print(f"{name:<34}{t:>10.2f}{rows / t:>14,.0f}")
    print(f"ratio baseline / read_log: {t_plain / t_read:.1f}x")


if __name__ == "__main__":
    main()
