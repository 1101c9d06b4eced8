"""How wide the slow exhaustive sweeps run: a sample in the suite, all of it on request.

``TRI_FULL_SWEEP=1 pytest tests/test_rebalance_*.py`` runs every seed, chunk and
building of the sweeps that check the rebalancer's claims against every
arrangement (about 100 s on two cores); ``.ci/run`` runs it after the suite on
every landing. The suite runs a small first part of each sweep (that it still
runs and its reference still agrees), so that it stays under two minutes
(issue 11; DEVELOPERS.md, Tests). Run the whole sweep before landing a change
to the rebalancer.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from typing import TypeVar

T = TypeVar("T")

#: True when the whole sweep was asked for.
FULL_SWEEP = os.environ.get("TRI_FULL_SWEEP") == "1"


def sweep(every: Sequence[T], in_suite: int) -> list[T]:
    """``every`` under TRI_FULL_SWEEP=1, else its first ``in_suite`` entries."""
    return list(every) if FULL_SWEEP else list(every)[:in_suite]


def seed_chunks(
    first: int, count: int, size: int, in_suite: int, suite_size: int | None = None
) -> list[range]:
    """``count`` seeds from ``first`` in chunks of ``size`` (one test each).

    All the chunks under TRI_FULL_SWEEP=1, else the first ``in_suite``, each cut
    to its first ``suite_size`` seeds when given (for the slow programs-alone sweeps).
    """
    chunks = [range(s, min(s + size, first + count)) for s in range(first, first + count, size)]
    if FULL_SWEEP:
        return chunks
    cut = size if suite_size is None else suite_size
    return [range(c.start, min(c.stop, c.start + cut)) for c in chunks[:in_suite]]


def seed_ids(seeds: range) -> str:
    """A chunk's test id: its first and last seed."""
    return f"seeds{seeds.start}-{seeds.stop - 1}"
