"""Benchmark of the rebalancer on wired panels: shared neutrals, per-leg loads, high-leg delta.

The two-column panels of :mod:`bench_rebalance` (same seeds), wired as
issue 12 describes (an invented mix, for timing only):

* ``groups``: about a third of the vertically adjacent pairs of 1-pole
  breakers become shared-neutral groups (handle-tied, so they move as one
  unit); half the 2-pole breakers get a neutral and a load per leg
  (unequal legs); a quarter of the 3-pole breakers a wye load per phase
  with a neutral.
* ``high leg``: the same panel on a 240/120 V high-leg delta (high leg B):
  every 120 V breaker that sat on phase B is left out (a 120 V circuit
  cannot sit on the high leg), so the rebalancer must keep the rest off it.

Printed per size and wiring, for fewest moves to 10 %, the best balance
with ``n/7`` moves and a full re-layout: median and largest wall-clock
time, how many panels ended proven (``optimal``, ``infeasible`` or
``already-balanced``; balance modes: within 0.1 % of the proven bound) out
of how many, and the median time as a ratio of the plain panel of the same
seed (what the wiring costs). Never asserted.

Run: ``python bench/bench_wired.py`` (``--quick`` for CI: one panel per size,
a 0.5 s limit).
"""

from __future__ import annotations

import argparse
from dataclasses import replace

import numpy as np
from bench_rebalance import random_panel
from variant_rows import print_tables

from tri.rebalance import SuggestOptions
from tri.schedule.model import Circuit, Schedule

HIGH_LEG = 1  # phase B [index]


def with_groups(schedule: Schedule, seed: int) -> Schedule:
    """Shared-neutral groups, per-leg 2-pole and wye 3-pole loads (module notes)."""
    rng = np.random.default_rng(seed + 9_000)
    by_slot = {c.slot: k for k, c in enumerate(schedule.circuits)}
    circuits = list(schedule.circuits)
    grouped: set[int] = set()
    for k, c in enumerate(circuits):
        if c.poles == 1 and c.slot is not None and k not in grouped:
            j = by_slot.get(c.slot + 2)
            mate = None if j is None else circuits[j]
            if mate is not None and mate.poles == 1 and j not in grouped and rng.random() < 0.33:
                name = f"N{c.slot}"
                circuits[k] = replace(c, shared_neutral=name, handle_tied=True)
                circuits[j] = replace(mate, shared_neutral=name, handle_tied=True)
                grouped |= {k, j}
        elif c.poles == 2 and rng.random() < 0.5:
            share = float(rng.uniform(0.2, 0.8))
            legs = (c.load_value * share, c.load_value * (1 - share))
            circuits[k] = replace(c, neutral=True, leg_values=legs)
        elif c.poles == 3 and rng.random() < 0.25:
            w = rng.dirichlet(np.ones(3))
            legs = tuple(float(c.load_value * x) for x in w)
            circuits[k] = replace(c, neutral=True, leg_values=legs)
    return replace(schedule, circuits=tuple(circuits))


def on_high_leg_delta(schedule: Schedule) -> Schedule:
    """The panel on 240/120 V high-leg delta, the 120 V breakers on B left out."""
    kept: list[Circuit] = [
        c for c in schedule.circuits if not (c.poles == 1 and c.phases == (HIGH_LEG,))
    ]
    panel = replace(schedule.panel, system="240/120D", high_leg=HIGH_LEG)
    return replace(schedule, panel=panel, circuits=tuple(kept))


WIRINGS = {"groups": with_groups, "high leg": lambda s, seed: on_high_leg_delta(s)}


def _pair(n: int, wiring: str, seed: int) -> tuple[Schedule, Schedule]:
    base = random_panel(n, seed)
    return base, WIRINGS[wiring](base, seed)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--quick", action="store_true", help="one panel per size, 0.5 s limit")
    args = ap.parse_args()
    modes = (
        ("fewest moves to 10 %", SuggestOptions(target_pct=10.0)),
        ("best balance with n/7 moves", SuggestOptions(max_moves=2, floor_gap=1e-3)),
        ("full re-layout (stops within 0.1 %)", SuggestOptions(relayout=True, floor_gap=1e-3)),
    )
    header = "    n wiring    median s    max s  proven  vs plain panel"
    print_tables(modes, tuple(WIRINGS), header, _pair, args.quick)


if __name__ == "__main__":
    main()
