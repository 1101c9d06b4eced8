"""The slot model counts relocations exactly: against every arrangement of dense small panels.

For given options (the phases of every free breaker), the fewest
relocations that realise them are [computed] by the reference
(:mod:`rebalance_reference`): the minimum over every arrangement of the
panel whose breakers sit on those phases, each relocation counted as the
work order counts it. :func:`tri.rebalance.realise.realise` (the slot block
of :mod:`tri.rebalance.slot_model` with the options fixed) must find that
number exactly, say so (``proven``), and give an arrangement that is a
valid panel; options no arrangement realises must be proven unfit.
Exact integers: no tolerance.
"""

from __future__ import annotations

import numpy as np
import pytest
from rebalance_reference import arrangements, free_breakers
from rebalance_sweep import dense_panel

from tri.rebalance.problem import build_problem
from tri.rebalance.realise import realise
from tri.schedule.slots import slot_phases
from tri.schedule.validate import check_schedule


def _codes(pr, slots: np.ndarray) -> np.ndarray:
    """Option index of each free breaker in each arrangement."""
    out = np.zeros(slots.shape, dtype=int)
    for k in range(pr.n_free):
        poles = int(pr.poles[k])
        kinds = [0 if poles == 3 else slot_phases(int(s), 1)[0] for s in slots[:, k]]
        out[:, k] = pr.starts[k] + np.array(kinds, dtype=int)
    return out


@pytest.mark.parametrize("seed", range(30))
def test_fewest_relocations_equal_every_arrangement(seed: int) -> None:
    rng = np.random.default_rng(500 + seed)
    sched = dense_panel(rng, int(rng.choice([8, 10, 12])))
    free = free_breakers(sched, "balance", False)  # placed breakers: the panel as it is fits
    pr = build_problem(sched, free)
    slots = arrangements(sched, free)
    codes = _codes(pr, slots)
    moved = np.zeros(slots.shape[0], dtype=int)
    for k, i in enumerate(free):
        if sched.circuits[i].slot is not None:
            moved += slots[:, k] != sched.circuits[i].slot
    uniq, back = np.unique(codes, axis=0, return_inverse=True)
    best = np.full(uniq.shape[0], 10**6)
    np.minimum.at(best, back.ravel(), moved)
    picks = rng.choice(uniq.shape[0], size=min(12, uniq.shape[0]), replace=False)
    for u in picks:
        arr, proven = realise(pr, uniq[u])
        assert proven and arr is not None and arr.fewest
        assert arr.relocations == best[u]
        after = sched
        for idx, s in arr.first_slot.items():
            after = after.with_circuit(idx, after.circuits[idx].at_slot(s))
        assert check_schedule(after) == []
        assert (
            sum(
                1
                for i in free
                if after.circuits[i].slot != sched.circuits[i].slot
                and sched.circuits[i].slot is not None
            )
            == arr.relocations
        )
    # options no arrangement realises: every breaker on phase A, where it does not fit
    single = [k for k in range(pr.n_free) if pr.poles[k] == 1]
    crowded = uniq[0].copy()
    crowded[single] = pr.starts[single]  # option 0 = phase A
    if not np.any(np.all(uniq == crowded, axis=1)):
        arr, proven = realise(pr, crowded)
        assert arr is None and proven
