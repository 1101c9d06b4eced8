"""The enumeration check of the tests on many more panels: every claim against every arrangement.

Dense small two-column panels (``tests/rebalance_sweep.py``: all slots but
0-2 taken, 1/2/3-pole breakers, some locked, harmonics, sometimes a new
circuit), every mode, each claim checked against the list of every
physical arrangement (``tests/rebalance_reference.py``). Prints the number
of cases, the statuses, the false claims found (it should be none) and the
median time per call; both paths: the product's (small questions settled by
listing every plan) and the mixed-integer programs alone.

Run: ``python bench/bench_rebalance_sweep.py [--panels N] [--quick]``.
"""

from __future__ import annotations

import argparse
import collections
import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from rebalance_reference import enumerate_panel, free_breakers
from rebalance_sweep import cases_for, check_case, dense_panel

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import suggest


def sweep(panels: int, first_seed: int, **extra) -> None:
    statuses: collections.Counter[str] = collections.Counter()
    false: list[tuple] = []
    times: list[float] = []
    for seed in range(first_seed, first_seed + panels):
        rng = np.random.default_rng(seed)
        sched = dense_panel(rng, int(rng.choice([8, 10, 12])))
        listed: dict[tuple[int, ...], object] = {}
        for case in cases_for(rng, sched):
            t = time.perf_counter()
            with native_stdout_to_devnull():
                s = suggest(sched, case.options(**extra))
            times.append(time.perf_counter() - t)
            statuses[f"{case.mode}: {s.status}"] += 1
            free = tuple(free_breakers(sched, case.mode, case.place_new))
            if free not in listed:
                listed[free] = enumerate_panel(sched, list(free))
            false += [(seed, case.mode, s.status, e) for e in check_case(case, s, listed[free])]
    print(f"  {len(times)} cases on {panels} panels, median {statistics.median(times):.3f} s")
    for key in sorted(statuses):
        print(f"    {key:<32} {statuses[key]}")
    print(f"  false claims: {len(false)}")
    for item in false[:20]:
        print("   ", item)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--panels", type=int, default=1000)
    parser.add_argument("--quick", action="store_true", help="a few panels (CI)")
    args = parser.parse_args()
    n = 10 if args.quick else args.panels
    print(f"Listing path (the product's), {n} panels from seed 100000:")
    sweep(n, 100_000, time_limit_s=10.0, floor_gap=0.0)
    m = max(5, n // 10)
    print(f"Programs alone (time limit 1 s), {m} panels from seed 200000:")
    sweep(m, 200_000, time_limit_s=1.0, floor_gap=0.0, list_plans=False)


if __name__ == "__main__":
    main()
