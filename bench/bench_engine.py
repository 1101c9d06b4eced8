"""Engine benchmark: vectorised numpy engine against a plain per-circuit loop.

Panels of 42 and 84 circuits with 25 harmonic orders, one at a time and as a
batch of 1,000. Prints µs per panel and the speed-up over
``bench/baseline_loop.py``; asserts nothing (targets from issue 3: ≥ 20×
on the batch, < 1 ms per 84-circuit panel).

Usage::

    .venv/bin/python bench/bench_engine.py          # full run
    .venv/bin/python bench/bench_engine.py --quick  # CI smoke run (seconds)
"""

from __future__ import annotations

import argparse
import pathlib
import platform
import sys
import time

import numpy as np

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent.parent))

from baseline_loop import analyse_loop

from tri.engine import analyse, analyse_batch
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    CircuitArrays,
    Ratings,
    SystemVoltages,
)

ORDERS = np.arange(2, 27)  # 25 harmonic orders, 2..26
SYSTEM = SystemVoltages(v_ll=208.0, v_ln=120.0)
RATINGS = Ratings(bus_a=400.0, main_a=400.0)


def random_panels(rng: np.random.Generator, batch: int, n: int) -> CircuitArrays:
    """A batch of random panels: 70 % 1-pole, 20 % 2-pole, 10 % 3-pole, lagging/leading."""
    conn = rng.choice(
        [LINE_TO_NEUTRAL, LINE_TO_LINE, THREE_PHASE], size=(batch, n), p=[0.7, 0.2, 0.1]
    )
    p = rng.integers(0, 3, size=(batch, n))
    q = np.where(conn == LINE_TO_LINE, (p + rng.integers(1, 3, size=(batch, n))) % 3, p)
    kva = rng.uniform(0.2, 6.0, size=(batch, n))
    pf = rng.uniform(0.7, 1.0, size=(batch, n))
    sign = rng.choice([1.0, -1.0], size=(batch, n), p=[0.9, 0.1])
    s = 1000 * kva * (pf + 1j * sign * np.sqrt(1 - pf**2))
    mags = rng.uniform(0, 0.3, size=(batch, n, ORDERS.size)) / ORDERS
    harm = mags * np.exp(1j * rng.uniform(-np.pi, np.pi, size=mags.shape))
    return CircuitArrays(
        s_va=s,
        connection=conn,
        phase_p=p,
        phase_q=q,
        harmonics=harm,
        orders=ORDERS,
        continuous=rng.random((batch, n)) < 0.3,
    )


def one(c: CircuitArrays, k: int) -> CircuitArrays:
    """Panel k of a batch."""
    return CircuitArrays(
        s_va=c.s_va[k],
        connection=c.connection[k],
        phase_p=c.phase_p[k],
        phase_q=c.phase_q[k],
        harmonics=c.harmonics[k],
        orders=c.orders,
        continuous=c.continuous[k],
    )


def loop_args(c: CircuitArrays, k: int) -> tuple:
    """Plain Python lists for the baseline."""
    return (
        c.s_va[k].tolist(),
        c.connection[k].tolist(),
        c.phase_p[k].tolist(),
        c.phase_q[k].tolist(),
        c.harmonics[k].tolist(),
        c.orders.tolist(),
        SYSTEM.v_ln,
    )


def best_of(fn, repeat: int) -> float:
    """Best wall time of ``repeat`` calls [s]."""
    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="small batch, few repeats (CI smoke)")
    ap.add_argument("--batch", type=int, default=None, help="batch size (default 1000)")
    ap.add_argument("--seed", type=int, default=3)
    args = ap.parse_args(argv)
    batch = args.batch or (100 if args.quick else 1000)
    repeat = 3 if args.quick else 7
    loop_panels = 10 if args.quick else 100  # the baseline is timed on this many panels
    rng = np.random.default_rng(args.seed)

    print(
        f"tri engine benchmark: {ORDERS.size} harmonic orders, numpy {np.__version__}, "
        f"Python {platform.python_version()}, {platform.machine()}"
    )
    print(f"{'case':<34}{'engine µs/panel':>16}{'loop µs/panel':>15}{'ratio':>8}")
    worst = 0.0
    for n in (42, 84):
        panels = random_panels(rng, batch, n)
        # correctness spot check against the loop (printed, not asserted)
        ref = analyse_loop(*loop_args(panels, 0))
        got = analyse_batch(one(panels, 0), SYSTEM, RATINGS)
        worst = max(worst, float(np.max(np.abs(got.phase_spectrum - np.array(ref["lines"])))))

        t_loop = (
            best_of(
                lambda panels=panels: [
                    analyse_loop(*loop_args(panels, k)) for k in range(loop_panels)
                ],
                max(1, repeat // 2),
            )
            / loop_panels
        )
        single = one(panels, 0)
        t_arrays = best_of(lambda s=single: analyse_batch(s, SYSTEM, RATINGS), repeat * 20 // 3)
        t_full = best_of(lambda s=single: analyse(s, SYSTEM, RATINGS), repeat * 20 // 3)
        t_batch = best_of(lambda p=panels: analyse_batch(p, SYSTEM, RATINGS), repeat) / batch
        us = 1e6
        for name, t in (
            (f"{n} circuits, analyse_batch (1 panel)", t_arrays),
            (f"{n} circuits, analyse + findings", t_full),
            (f"{n} circuits, batch of {batch}", t_batch),
        ):
            print(f"{name:<34}{t * us:>16.1f}{t_loop * us:>15.1f}{t_loop / t:>7.1f}×")
    print(f"max |engine − loop| on the line spectra: {worst:.2e} A")
    print("targets (issue 3): ≥ 20× on the batch; < 1000 µs per 84-circuit panel")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
