"""How wide the slow exhaustive sweeps run: a sample in the suite, all of it on request.

``TRI_FULL_SWEEP=1 pytest tests/test_rebalance_tree.py tests/test_rebalance_squares.py
tests/test_rebalance_halves.py`` runs every seed and chunk (several minutes); the suite
runs the first of each list so that CI stays within its time (DEVELOPERS.md, Tests).
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
