"""Benchmark of command start-up: whole processes, medians of repeated runs (printed, not asserted).

Each command is started as a fresh process, as a user starts it, and timed
from spawn to exit. The yardstick is a bare ``python -c "import numpy"``:
the engine needs numpy, so no command can start faster than that.

Targets (issue 11): ``tri --version`` within 2x the yardstick, ``tri report``
of a demo within 3x (scipy is imported only where the rebalancer runs; the
UI's first frame does not need it). The last column says which heavy
libraries each command imported (from ``python -X importtime``).

Run: ``python bench/bench_startup.py`` (``--quick`` for CI: fewer runs).
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "tri" / "panels_demo" / "garage_ev_208.toml"
HEAVY = ("scipy", "textual", "rich", "pandas", "tomlkit")


def commands() -> list[tuple[str, list[str], float | None]]:
    """(label, argv, target ratio against the yardstick) for each command timed."""
    py = sys.executable
    tri = [py, "-m", "tri"]
    return [
        ("python -c 'import numpy'", [py, "-c", "import numpy"], None),
        ("tri --version", [*tri, "--version"], 2.0),
        ("tri report DEMO", [*tri, "report", str(DEMO)], 3.0),
        ("tri report DEMO --format json", [*tri, "report", str(DEMO), "--format", "json"], 3.0),
        ("tri check DEMO", [*tri, "check", str(DEMO)], 3.0),
    ]


def time_once(argv: list[str]) -> float:
    """Wall time of one run of ``argv`` [s], output discarded."""
    env = {**os.environ, "NO_COLOR": "1"}
    t0 = time.perf_counter()
    subprocess.run(argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, check=False)
    return time.perf_counter() - t0


def heavy_imports(argv: list[str]) -> str:
    """Which of ``HEAVY`` the command imported (top-level packages), from -X importtime."""
    full = [argv[0], "-X", "importtime", *argv[1:]]
    proc = subprocess.run(full, capture_output=True, text=True, check=False)
    seen = set()
    for line in proc.stderr.splitlines():
        name = line.rsplit("|", 1)[-1].strip()
        top = name.split(".", 1)[0]
        if top in HEAVY:
            seen.add(top)
    return ", ".join(sorted(seen)) or "-"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer runs (CI)")
    args = parser.parse_args()
    runs = 3 if args.quick else 15
    rows = []
    for label, argv, target in commands():
        time_once(argv)  # warm the file cache; not counted
        times = [time_once(argv) for _ in range(runs)]
        rows.append((label, statistics.median(times), target, heavy_imports(argv)))
    base = rows[0][1]
    print(f"start-up, median of {runs} runs per command (machine may be shared: ±30 %)")
    print(f"{'command':34} {'median s':>9} {'ratio':>6} {'target':>7}  heavy imports")
    for label, med, target, heavy in rows:
        tgt = f"< {target:.0f}x" if target else "-"
        print(f"{label:34} {med:9.3f} {med / base:6.2f} {tgt:>7}  {heavy}")


if __name__ == "__main__":
    main()
