"""The building reference's batched figures against the engine's whole analysis, one by one.

:func:`tree_rebalance_reference.tree_cases` computes each panel's own
currents once per case and rolls every combination up at once
(:func:`tree_rebalance_reference.rolled_up`). Here, for a sample of
combinations of several buildings (every case of every panel at least
once, and random others), its figures are checked against
:func:`tri.schedule.tree_to_engine.analyse_building` of that combination
written into the building, as the reference computed them before it was
batched: every panel's deviation and the root's neutral RMS, to 1e-9
relative **[computed: the engine's whole analysis]**, and the relocations.
Buildings: a transformer fed from a high-leg delta, a transformer feeding
one, a shared-neutral group read C-B-A, a rail board with RCDs, two
children (one behind a ``YNyn0`` transformer), a reach limit with a C-B-A
child, and ``use`` scenarios. The comparison is shown to catch a swapped
phase in one panel's currents.
"""

from __future__ import annotations

import numpy as np
import pytest
from test_rebalance_tree_scenarios import add_use_factors
from tree_rebalance_reference import (
    own_currents,
    panel_cases,
    rolled_up,
    tree_cases,
    write_building,
)
from tree_wired_buildings import write_wired_building

from tri.schedule.tree import load_tree, with_schedules
from tri.schedule.tree_scenarios import case_names
from tri.schedule.tree_to_engine import analyse_building

#: Relative (and, for figures that are exactly 0, absolute) agreement [-], [% or A].
RTOL, ATOL = 1e-9, 1e-12
#: Random combinations checked beyond those that take every case of every panel once.
EXTRA = 10

BUILDINGS = {
    "transformer-fed-from-high-leg": lambda d: write_wired_building(d, "high-leg-tx", 2),
    "transformer-feeding-high-leg": lambda d: write_wired_building(d, "high-leg-tx", 3),
    "group-read-cba": lambda d: write_wired_building(d, "groups", 2),
    "rail-board-rcds": lambda d: write_wired_building(d, "rcd", 1),
    "two-children-ynyn0": lambda d: write_building(d, 4, 2),
    "reach-cba-child": lambda d: write_building(d, 6, 1, cba_child=True, reach=1),
}


def _sample(per_panel, seed: int) -> np.ndarray:
    """Combinations (B, N): every case of every panel at least once, then ``EXTRA`` at random."""
    sizes = [len(c.schedules) for c in per_panel]
    every = [[i % n for n in sizes] for i in range(max(sizes))]
    rng = np.random.default_rng(seed)
    return np.array(every + [[int(rng.integers(n)) for n in sizes] for _ in range(EXTRA)])


def _differences(tree, per_panel, combos, deviation, neutral, scenario=None) -> list[str]:
    """Where the batched figures of ``combos`` differ from analyse_building of each."""
    out = []
    for combo, dev, root_neutral in zip(combos, deviation, neutral, strict=True):
        built = with_schedules(tree, [per_panel[k].schedules[j] for k, j in enumerate(combo)])
        nodes = analyse_building(built, scenario=scenario).nodes
        want = np.array([n.analysis.current_unbalance.max_deviation_pct for n in nodes])
        want_neutral = nodes[0].analysis.neutral.rms_a
        if not np.allclose(dev, want, rtol=RTOL, atol=ATOL):
            out.append(f"{combo.tolist()}: deviations {dev.tolist()}, engine {want.tolist()}")
        if not np.isclose(root_neutral, want_neutral, rtol=RTOL, atol=ATOL):
            out.append(f"{combo.tolist()}: neutral {root_neutral}, engine {want_neutral}")
    return out


def _checked(tree, scenario: str | None, seed: int) -> list[str]:
    """tree_cases against analyse_building on a sample (figures and relocations)."""
    cases = tree_cases(tree, scenario)
    per_panel = [panel_cases(p.schedule) for p in tree.panels]
    combos = _sample(per_panel, seed)
    rows = np.ravel_multi_index(combos.T, [len(c.schedules) for c in per_panel])
    assert len(cases.relocations) == np.prod([len(c.schedules) for c in per_panel])
    reloc = [sum(per_panel[k].relocations[j] for k, j in enumerate(c)) for c in combos]
    assert cases.relocations[rows].tolist() == reloc
    dev, neutral = cases.deviation_pct[rows], cases.service_neutral_a[rows]
    return _differences(tree, per_panel, combos, dev, neutral, scenario)


@pytest.mark.parametrize("name", sorted(BUILDINGS))
def test_batched_figures_equal_the_whole_analysis(tmp_path, name):
    tree = load_tree(BUILDINGS[name](tmp_path))
    assert not _checked(tree, None, seed=len(name))


def test_batched_figures_equal_the_whole_analysis_in_every_scenario(tmp_path):
    write_building(tmp_path, 3, 2)
    add_use_factors(tmp_path, 3)
    tree = load_tree(tmp_path / "main.toml")
    names = case_names(tree)
    assert len(names) == 3
    for c, name in enumerate(names):
        assert not _checked(tree, None if c == 0 else name, seed=c)


def test_a_swapped_phase_is_caught(tmp_path):
    """The child's own A and B currents exchanged in the batch: the comparison fails."""
    tree = load_tree(write_wired_building(tmp_path, "high-leg-tx", 2))
    per_panel = [panel_cases(p.schedule) for p in tree.panels]
    own = own_currents(tree, per_panel)
    combos = _sample(per_panel, 0)
    dev, neutral = rolled_up(own, combos)
    assert not _differences(tree, per_panel, combos, dev, neutral)
    own.phase[1][:] = own.phase[1][:, [1, 0, 2]]
    dev, neutral = rolled_up(own, combos)
    assert len(_differences(tree, per_panel, combos, dev, neutral)) > len(combos) // 2
