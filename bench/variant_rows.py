"""One table row of a rebalancer benchmark that compares variants of the bench panels
(scenarios, wiring) with the plain panels of the same seeds: used by
``bench_scenarios.py`` and ``bench_wired.py``."""

from __future__ import annotations

import statistics
from collections.abc import Callable, Sequence
from dataclasses import replace

from bench_rebalance import run

from tri.rebalance import Suggestion, SuggestOptions
from tri.schedule.model import Schedule
from tri.schedule.validate import check_schedule

PROVEN = ("optimal", "infeasible", "already-balanced")


def proven(s: Suggestion, options: SuggestOptions) -> bool:
    """Ended proven; in the balance modes also within 0.1 % of the proven bound."""
    if s.status in PROVEN:
        return True
    balance = options.mode != "fewest-moves"
    return balance and s.bound is not None and s.after.max_phase_rms_a <= s.bound * 1.001


#: ``pair(n, label, seed)``: the plain panel and its variant.
Pair = Callable[[int, str, int], tuple[Schedule, Schedule]]


def variant_row(n: int, label: str, seeds: range, options: SuggestOptions, pair: Pair) -> str:
    """``n``, the label, median and largest time [s], proven count, and the median time
    as a ratio of the plain panels'. A budget in ``options`` becomes ``n/7`` moves (at
    least 2)."""
    if options.max_moves is not None:
        options = replace(options, max_moves=max(2, n // 7))
    times, plain, done = [], [], 0
    for seed in seeds:
        base, variant = pair(n, label, seed)
        issues = check_schedule(variant)
        assert not issues, issues[0].message  # a bench panel that tri would refuse
        s, t = run(variant, options)
        times.append(t)
        done += proven(s, options)
        plain.append(run(base, options)[1])
    ratio = statistics.median(times) / max(statistics.median(plain), 1e-9)
    return (
        f"{n:>5} {label:<11} {statistics.median(times):8.3f} {max(times):8.3f}"
        f" {done:>3}/{len(times):<3} {ratio:8.2f}x"
    )


def print_tables(
    modes: Sequence[tuple[str, SuggestOptions]],
    labels: Sequence[str],
    header: str,
    pair: Pair,
    quick: bool,
) -> float:
    """One table per mode: a row per size and label (:func:`variant_row`); ``--quick`` is one
    panel of 42 circuits and a 0.5 s limit, else 5 panels of 42 and 84 and 10 s. Returns
    the time limit used [s]."""
    seeds = range(1) if quick else range(5)
    sizes = [42] if quick else [42, 84]
    limit = 0.5 if quick else 10.0
    for title, options in modes:
        print(f"{title} (time limit {limit:g} s)")
        print(header)
        for n in sizes:
            for label in labels:
                opts = replace(options, time_limit_s=limit)
                print(variant_row(n, label, seeds, opts, pair))
    return limit
