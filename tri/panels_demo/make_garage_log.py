"""Generate an invented logger export for the garage_logged_208 demo.

    python tri/panels_demo/make_garage_log.py                       # a week of 1-minute rows
    python tri/panels_demo/make_garage_log.py --minutes 5 -o tri/panels_demo/garage_logged_week.csv

The committed demo log (``garage_logged_week.csv``) is a week at 5-minute
intervals written by the second command; the first writes the week of
1-minute data the tests and the benchmark use (``--days`` and ``--start``
change the span). Everything is invented and deterministic (a fixed
random seed): a four-bay shop open 07:00-18:00 on weekdays and Saturday
mornings, EV chargers on phases A-B charging in the evening, and a space
heater nobody put in the schedule plugged into a phase-A receptacle on
cold mornings (the log shows phase A carrying more than the schedule
explains). Times are US Central daylight time with offsets, stamped at
the end of each interval.
"""

from __future__ import annotations

import argparse
import datetime as dt
import sys
from pathlib import Path

import numpy as np

V_LN = 120.0
A = np.exp(-2j * np.pi / 3)  # phase B at -120 deg
PHASOR = {0: 1.0 + 0j, 1: A, 2: A.conjugate()}

#: (name, phases, amps, daily pattern) - pattern names below.
LOADS = (
    ("shop lighting", (0,), 15.0, "open"),
    ("office lighting", (1,), 5.0, "open"),
    ("office receptacles", (2,), 10.0, "office"),
    ("lift 1", (0, 1), 16.0, "lifts"),
    ("compressor", (0, 1, 2), 15.2, "compressor"),
    ("tire changer", (2,), 8.0, "lifts"),
    ("EV charger 1", (0, 1), 32.0, "evening"),
    ("heat pump", (0, 1), 14.0, "heat pump"),
    ("bay receptacles", (0,), 12.0, "office"),
    ("parts washer", (1,), 10.0, "lifts"),
    ("water heater", (2, 0), 21.65, "water"),
    ("lift 2", (1, 2), 16.0, "lifts"),
    ("exterior lighting", (0,), 7.5, "dark"),
    ("break room", (1,), 12.5, "meals"),
    ("EV charger 2", (0, 1), 32.0, "evening-late"),
    ("door operators", (2,), 6.0, "lifts"),
    ("unscheduled heater", (0,), 12.5, "cold mornings"),
)


def duty(
    pattern: str, hour: np.ndarray, weekday: np.ndarray, rng: np.random.Generator
) -> np.ndarray:
    """Share of the load on in each interval [-]."""
    work = (weekday < 5) & (hour >= 7) & (hour < 18) | (weekday == 5) & (hour >= 8) & (hour < 12)
    n = hour.size
    if pattern == "open":
        return work * 1.0
    if pattern == "office":
        return work * rng.uniform(0.4, 0.9, n) + (~work) * 0.1
    if pattern == "lifts":
        return work * (rng.random(n) < 0.25)
    if pattern == "compressor":
        return (rng.random(n) < np.where(work, 0.45, 0.05)) * 1.0
    if pattern == "evening":
        return ((hour >= 17) & (hour < 23)) * 1.0 + work * 0.2 * (rng.random(n) < 0.5)
    if pattern == "evening-late":
        return ((hour >= 18) | (hour < 1)) * 1.0 * (weekday < 6)
    if pattern == "heat pump":
        return (rng.random(n) < np.where(hour < 9, 0.8, 0.35)) * 1.0
    if pattern == "water":
        return (rng.random(n) < np.where(work, 0.3, 0.08)) * 1.0
    if pattern == "dark":
        return ((hour >= 20) | (hour < 6)) * 1.0
    if pattern == "meals":
        return ((hour == 12) | (hour == 7)) * (rng.random(n) < 0.5) + 0.1
    if pattern == "cold mornings":
        return ((hour >= 6) & (hour < 11) & (weekday < 5)) * 1.0
    raise ValueError(pattern)


def series(
    start: dt.datetime, intervals: int, minutes: int, seed: int = 14
) -> dict[str, np.ndarray]:
    """Phase and neutral currents [A] and line voltages [V], one row per interval."""
    rng = np.random.default_rng(seed)
    ends = [start + dt.timedelta(minutes=minutes * (k + 1)) for k in range(intervals)]
    mid = [e - dt.timedelta(minutes=minutes / 2) for e in ends]
    hour = np.array([t.hour for t in mid])
    weekday = np.array([t.weekday() for t in mid])
    line = np.zeros((3, intervals), dtype=complex)
    for _name, phases, amps, pattern in LOADS:
        on = duty(pattern, hour, weekday, rng) * amps
        if len(phases) == 1:
            line[phases[0]] += on * PHASOR[phases[0]]
        elif len(phases) == 2:
            p, q = phases
            i_pq = on * (PHASOR[p] - PHASOR[q]) / abs(PHASOR[p] - PHASOR[q])
            line[p] += i_pq
            line[q] -= i_pq
        else:
            for p in phases:
                line[p] += on * PHASOR[p]
    line += rng.normal(0, 0.4, line.shape) * np.array([[PHASOR[k]] for k in range(3)])
    neutral = np.abs(line.sum(axis=0)) * 1.05  # a little triplen current from the LED drivers
    mags = np.abs(line)
    v_ph = V_LN * np.array([[PHASOR[k]] for k in range(3)]) - 0.035 * line  # source 0.035 ohm
    v_ll = np.abs(np.stack([v_ph[0] - v_ph[1], v_ph[1] - v_ph[2], v_ph[2] - v_ph[0]]))
    v_ll += rng.normal(0, 0.15, v_ll.shape)
    return {"ends": np.array(ends), "amps": mags, "neutral": neutral, "volts": v_ll}


def write_csv(path: Path, data: dict[str, np.ndarray]) -> None:
    """Write the logger's export: ISO 8601 end-of-interval times with offsets."""
    with open(path, "w", encoding="utf-8", newline="\n") as fh:
        fh.write("Timestamp,I1,I2,I3,IN,U12,U23,U31\n")
        amps, n, v = data["amps"], data["neutral"], data["volts"]
        for k, t in enumerate(data["ends"]):
            fh.write(
                f"{t.isoformat(timespec='seconds')},{amps[0, k]:.1f},{amps[1, k]:.1f},"
                f"{amps[2, k]:.1f},{n[k]:.1f},{v[0, k]:.1f},{v[1, k]:.1f},{v[2, k]:.1f}\n"
            )


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--days", type=float, default=7.0)
    parser.add_argument("--minutes", type=int, default=1, help="logging interval [min]")
    parser.add_argument("--start", default="2024-05-06T00:00:00-05:00")
    parser.add_argument("-o", "--output", default="garage_logged_week_1min.csv")
    args = parser.parse_args(argv)
    start = dt.datetime.fromisoformat(args.start)
    intervals = round(args.days * 1440 / args.minutes)
    write_csv(Path(args.output), series(start, intervals, args.minutes))
    print(f"wrote {intervals} rows to {args.output}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
