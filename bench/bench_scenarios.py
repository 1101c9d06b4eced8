"""Benchmark of the rebalancer with ``use`` scenarios: what meeting a target in every case costs.

The panels of :mod:`bench_rebalance` (same seeds, two-column and rail
board), each circuit given use factors in two scenarios, ``day`` and
``night``: some circuits run by day only, some by night only and the rest
at part load in both (an invented pattern, for timing only). A plan must
then hold in three cases at once (the connected load and the two
scenarios).

Printed per size and layout, for fewest moves to 20 % in every case (10 %
is seldom reachable in three cases at once on these panels) and for the
best balance with ``n/7`` moves: median and largest wall-clock time, how
many panels ended proven (``optimal``, ``infeasible`` or
``already-balanced``; balance: within 0.1 % of the proven bound) out of
how many, and the median time as a ratio of the same panels without
scenarios (what the cases cost). Then the logged garage demo at 10 % in
every case (proven out of reach by its evening case alone). Never asserted.

Run: ``python bench/bench_scenarios.py`` (``--quick`` for CI: one panel per
size, a 0.5 s limit).
"""

from __future__ import annotations

import argparse
from dataclasses import replace
from pathlib import Path

import numpy as np
from bench_rebalance import random_panel, run
from variant_rows import print_tables

from tri.rebalance import SuggestOptions
from tri.schedule.load import load_schedule
from tri.schedule.model import Schedule

DEMO = Path(__file__).parents[1] / "tri" / "panels_demo" / "garage_logged_208.toml"


def with_day_and_night(schedule: Schedule, seed: int) -> Schedule:
    """Each circuit: day only (30 %), night only (20 %) or part load in both (module notes)."""
    rng = np.random.default_rng(seed + 7_000)
    circuits = []
    for c in schedule.circuits:
        kind = int(rng.choice(3, p=[0.3, 0.2, 0.5]))
        if kind == 0:
            use = (("day", 1.0), ("night", 0.0))
        elif kind == 1:
            use = (("day", 0.0), ("night", 1.0))
        else:
            day, night = rng.uniform(0.3, 1.0), rng.uniform(0.1, 0.6)
            use = (("day", round(float(day), 2)), ("night", round(float(night), 2)))
        circuits.append(replace(c, use=use))
    return replace(schedule, circuits=tuple(circuits))


def _pair(n: int, layout: str, seed: int) -> tuple[Schedule, Schedule]:
    base = random_panel(n, seed, layout)
    return base, with_day_and_night(base, seed)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--quick", action="store_true", help="one panel per size, 0.5 s limit")
    args = ap.parse_args()
    modes = (
        ("fewest moves to 20 % in every case", SuggestOptions(target_pct=20.0)),
        ("best balance with n/7 moves (at least 2), every case", SuggestOptions(max_moves=1)),
    )
    header = "    n layout      median s    max s  proven  vs no scenarios"
    limit = print_tables(modes, ("two-column", "phases"), header, _pair, args.quick)
    garage = load_schedule(DEMO).schedule
    s, t = run(garage, SuggestOptions(target_pct=10.0, time_limit_s=max(limit, 5.0)))
    print(f"logged garage demo, 10 % in every case: {s.status} in {t:.2f} s")


if __name__ == "__main__":
    main()
