"""The code's calculated loads of a building: a parent's sizing figures include its children.

Check values are worked by hand from the definitions in
:mod:`tri.engine.loading` [computed]: the calculated load adds scheduled VA
per phase (continuous loads at the continuous factor, 1.25 here, NEC
215.2(A)(1) [published, secondary]) over ``V_LN``; the neutral's is the
largest line-to-neutral load on one phase at 100 % (NEC 220.61 [published,
secondary]). Tolerances: 1e-9 relative, round-off of a few products.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from tree_support import BIG, SYS_208Y, SYS_480Y, arrays, two_level

from tri.engine import analyse
from tri.engine.inputs import LINE_TO_NEUTRAL, THREE_PHASE
from tri.engine.tree_results import analyse_tree


def _continuous(c, flags):
    return dataclasses.replace(c, continuous=np.array(flags, dtype=bool))


def test_a_parent_counts_its_childs_calculated_load_phase_by_phase():
    # Parent: its feeder in row 0, and 1200 VA continuous on A: 10 A x 1.25 = 12.5 A.
    parent = _continuous(
        arrays([(0, THREE_PHASE, 0, 0), (1200, LINE_TO_NEUTRAL, 0, 0)]), [False, True]
    )
    # Child: 2400 VA on B, not continuous: 20 A; 600 VA on A, continuous: 5 x 1.25 = 6.25 A.
    child = _continuous(
        arrays([(2400, LINE_TO_NEUTRAL, 1, 1), (600, LINE_TO_NEUTRAL, 0, 0)]), [False, True]
    )
    result = analyse_tree(two_level(child, SYS_208Y, SYS_208Y, None, parent=parent))
    root, fed = result.nodes[0].analysis, result.nodes[1].analysis
    # The child alone, as a single panel, gives the same calculated figures [computed].
    alone = analyse(child, SYS_208Y, BIG)
    for k in range(3):
        assert fed.phases[k].calculated_a == pytest.approx(alone.phases[k].calculated_a, rel=1e-9)
    # Parent: A = 12.5 + 6.25 = 18.75 A; B = 20 A; C = 0 [computed].
    assert [p.calculated_a for p in root.phases] == pytest.approx([18.75, 20.0, 0.0], rel=1e-9)
    # Neutral (220.61): line-to-neutral VA per phase at 100 %: A (1200 + 600)/120 = 15 A,
    # B 2400/120 = 20 A, so 20 A [computed].
    assert root.neutral.calculated_a == pytest.approx(20.0, rel=1e-9)
    # The feeder breaker carries the child's largest phase: B, 20 A [computed].
    assert root.circuit_calculated_a[0] == pytest.approx(20.0, rel=1e-9)


def test_through_a_delta_wye_transformer_the_neutral_load_stays_below():
    # A 480Y/277 parent feeds a 208Y/120 child through Dyn1: the child's line-to-neutral
    # load cannot reach the parent's neutral (a delta primary has none) [common practice].
    child = arrays([(2400, LINE_TO_NEUTRAL, 0, 0)])
    result = analyse_tree(two_level(child, SYS_480Y, SYS_208Y, "Dyn1"))
    root = result.nodes[0].analysis
    assert root.neutral.calculated_a == 0.0
    # The child's 2400 VA still counts on the primary: shared among the phases that carry
    # it (a 1-pole secondary load appears on two primary lines through Dyn1), in total
    # 2400 VA over 277 V = 8.66 A summed over the phases [computed].
    total_a = sum(p.calculated_a for p in root.phases)
    assert total_a == pytest.approx(2400.0 / SYS_480Y.v_ln, rel=1e-9)
