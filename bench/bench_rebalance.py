"""Benchmark of the rebalancer: time to a proven optimum and quality against the greedy start.

Random two-column panels (fixed seeds) of 42, 84 and 168 circuits, and 500
for the fewest-moves mode; 5 panels per size; medians printed. Beside each
figure, the greedy start and local search alone (no solver) show what the
mixed-integer program adds.

Targets on a 2-core machine (issue 4): fewest moves proven optimal in
< 0.1 s at 84 circuits and < 1 s at 500; best balance under K moves within
0.1 % of the |I1| floor (or proven) in < 1 s at 168 circuits.

Run: ``python bench/bench_rebalance.py`` (``--quick`` for CI: fewer sizes
and panels). Printed, never asserted.
"""

from __future__ import annotations

import argparse
import statistics
import time

import numpy as np

from tri.cli.suggest import native_stdout_to_devnull
from tri.rebalance import SuggestOptions, suggest
from tri.schedule.model import Circuit, PanelInfo, Schedule
from tri.schedule.slots import slot_phases

PROFILES = ("linear",) * 6 + ("electronics", "led-driver")


def random_panel(n: int, seed: int, nonlinear: bool = True) -> Schedule:
    """A panel of ``n`` breakers, heavier loads crowded on phase A (deviation 15-40 %).

    Mix: 70 % 1-pole, 20 % 2-pole, 10 % 3-pole; 300-4000 VA; power factor
    0.75-1 lagging; with ``nonlinear`` one circuit in four carries harmonics
    (electronics or LED drivers), else all are linear; 5 % locked. Spaces:
    the poles plus 25 % spare, rounded up to a multiple of 6 (whole rows of
    A, B, C in both columns).
    """
    rng = np.random.default_rng(seed)
    poles = rng.choice([1, 2, 3], size=n, p=[0.7, 0.2, 0.1])
    spaces = int(np.ceil(poles.sum() * 1.25 / 6) * 6)
    used: set[int] = set()
    circuits = []
    order = np.lexsort((rng.uniform(size=n), -poles))  # multi-pole breakers first
    for k in order:
        p = int(poles[k])
        va = float(rng.uniform(300, 4000))
        starts = [
            s
            for s in range(1, spaces + 1)
            if s + 2 * (p - 1) <= spaces and not used.intersection(range(s, s + 2 * p, 2))
        ]
        if p == 1 and rng.random() < 0.55:  # crowd phase A
            on_a = [s for s in starts if slot_phases(s, 1)[0] == 0]
            starts = on_a or starts
        s = int(rng.choice(starts))
        used.update(range(s, s + 2 * p, 2))
        circuits.append(
            Circuit(
                name=f"C{k + 1}",
                poles=p,
                slot=s,
                phases=slot_phases(s, p),
                load_value=va,
                pf=float(rng.uniform(0.75, 1.0)),
                profile=str(rng.choice(PROFILES)) if p < 3 and nonlinear else "linear",
                locked=bool(rng.random() < 0.05),
            )
        )
    info = PanelInfo(
        name=f"bench-{n}-{seed}",
        system="208Y/120",
        frequency_hz=60.0,
        spaces=spaces,
        bus_a=max(225.0, 10.0 * n),
    )
    return Schedule(panel=info, circuits=tuple(circuits))


def run(schedule: Schedule, options: SuggestOptions):
    t = time.perf_counter()
    with native_stdout_to_devnull():
        s = suggest(schedule, options)
    return s, time.perf_counter() - t


def bench_fewest(
    sizes: list[int], seeds: range, target: float, limit: float, nonlinear: bool
) -> None:
    kind = "25 % non-linear circuits" if nonlinear else "linear loads only"
    print(f"\nFewest moves to a {target:g} % target, {kind} (time limit {limit:g} s)")
    head = (
        f"{'n':>4} {'dev now':>8} {'time':>8} {'proven':>7} {'moves':>6} "
        f"{'greedy':>7} {'g.time':>8} {'moves/greedy':>13}"
    )
    print(head)
    print("-" * len(head))
    for n in sizes:
        rows = []
        for seed in seeds:
            sch = random_panel(n, seed, nonlinear)
            s, t = run(sch, SuggestOptions(target_pct=target, time_limit_s=limit))
            g, tg = run(
                sch, SuggestOptions(target_pct=target, time_limit_s=limit, use_solver=False)
            )
            gm = g.relocations if g.target_met else float("nan")
            rows.append(
                (
                    s.before.max_deviation_pct,
                    t,
                    s.status in ("optimal", "already-balanced"),
                    s.relocations,
                    gm,
                    tg,
                )
            )
        med = [statistics.median(r[k] for r in rows) for k in (0, 1, 3, 5)]
        greedy = [r[4] for r in rows if r[4] == r[4]]
        gmed = statistics.median(greedy) if greedy else float("nan")
        proven = sum(r[2] for r in rows)
        print(
            f"{n:>4} {med[0]:>7.1f}% {med[1]:>7.3f}s {proven:>3}/{len(rows):<3} {med[2]:>6.0f} "
            f"{gmed:>7.0f} {med[3]:>7.3f}s {med[2] / gmed if gmed else float('nan'):>13.2f}"
        )


def bench_balance(sizes: list[int], seeds: range, limit: float) -> None:
    print(
        f"\nBest balance with at most K = n/7 moves, 25 % non-linear circuits (time limit "
        f"{limit:g} s; stops within 0.1 % of F)"
    )
    head = (
        f"{'n':>4} {'K':>3} {'time':>8} {'gap to F':>9} {'ok':>6} {'greedy gap':>11} "
        f"{'g.time':>8} {'gap/greedy':>11}"
    )
    print(head)
    print("-" * len(head))
    for n in sizes:
        rows = []
        k = max(4, n // 7)
        for seed in seeds:
            sch = random_panel(n, seed)
            s, t = run(sch, SuggestOptions(max_moves=k, time_limit_s=limit))
            g, tg = run(sch, SuggestOptions(max_moves=k, time_limit_s=limit, use_solver=False))
            gap = 100 * (s.after.max_phase_rms_a / s.floor_a - 1)
            ggap = 100 * (g.after.max_phase_rms_a / g.floor_a - 1)
            ok = s.status in ("optimal", "already-balanced") or gap <= 0.1
            rows.append((t, gap, ok, ggap, tg))
        med = [statistics.median(r[i] for r in rows) for i in (0, 1, 3, 4)]
        ok = sum(r[2] for r in rows)
        ratio = med[1] / med[2] if med[2] > 0 else float("nan")
        print(
            f"{n:>4} {k:>3} {med[0]:>7.3f}s {med[1]:>8.3f}% {ok:>2}/{len(rows):<3} "
            f"{med[2]:>10.3f}% {med[3]:>7.3f}s {ratio:>11.2f}"
        )


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="small sizes, two panels each (CI)")
    args = parser.parse_args()
    if args.quick:
        seeds, few, bal, limit = range(2), [42, 84], [42, 84], 2.0
    else:
        seeds, few, bal, limit = range(5), [42, 84, 168, 500], [42, 84, 168], 10.0
    print("tri rebalancer benchmark: medians over", len(seeds), "panels per size (fixed seeds)")
    print("'ok' = proven optimal or within 0.1 % of the floor F; 'greedy' = greedy start and")
    print("local search alone (no solver); time = wall clock per panel, median.")
    bench_fewest(few, seeds, target=5.0, limit=limit, nonlinear=False)
    bench_fewest(few, seeds, target=5.0, limit=limit, nonlinear=True)
    bench_balance(bal, seeds, limit=limit)


if __name__ == "__main__":
    main()
