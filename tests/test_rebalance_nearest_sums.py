"""The pruned pair search (tri.rebalance.nearest_sums), against every pair.

For random point sets (a few hundred points, spread along a few directions
as the half-sums of the harmonic floor are, and in every spread), the
result must be exactly ``min(ceiling, min ||x_i + y_j||²)`` over every
pair, computed here pair by pair [computed]; its pair must reach it; and
it must never exceed the true minimum (it is used as a lower bound).
"""

from __future__ import annotations

import numpy as np
import pytest

from tri.rebalance.nearest_sums import least_pair


def _sets(rng: np.random.Generator, dim: int) -> tuple[np.ndarray, np.ndarray]:
    scales = rng.uniform(0.05, 3.0, dim) ** 2
    x = rng.normal(size=(int(rng.integers(1, 400)), dim)) * scales + rng.normal(size=dim)
    y = rng.normal(size=(int(rng.integers(1, 400)), dim)) * scales
    return x, y


@pytest.mark.parametrize("seed", range(40))
def test_least_pair_is_the_minimum_over_every_pair(seed: int) -> None:
    rng = np.random.default_rng(91_000 + seed)
    dim = int(rng.choice([1, 3, 7, 12, 30]))
    x, y = _sets(rng, dim)
    every = np.sum((x[:, None, :] + y[None, :, :]) ** 2, axis=-1)
    least = float(every.min())
    for ceiling in (least * 0.5, least * (1 + 1e-3), least * 4 + 1.0, np.inf):
        got = least_pair(x, y, ceiling, kept=int(rng.integers(1, 8)))
        assert got is not None
        assert got.value <= least * (1 + 1e-12) + 1e-12  # never above the truth
        if ceiling > least:
            assert got.value == pytest.approx(least, rel=1e-12, abs=1e-12)
            assert every[got.i, got.j] == pytest.approx(least, rel=1e-12, abs=1e-12)
        else:
            assert (got.value, got.i, got.j) == (ceiling, -1, -1)


def test_least_pair_stops_when_asked() -> None:
    rng = np.random.default_rng(5)
    x, y = _sets(rng, 4)
    assert least_pair(x, y, np.inf, stop=lambda: True) is None
