"""A transformer next to a high-leg delta (issue 13): the centre-tapped secondary, the frames.

Sources, each beside its check:

* ampere-turn balance of the tapped limb **[computed]**, the ideal
  transformer of the textbooks (from memory): a 120 V load on the
  centre-tapped winding of a delta secondary is carried by that winding
  alone, so behind a Dd0 transformer it shows on the two primary lines of
  that winding only, in phase with their line-to-line voltage;
* an ideal transformer conserves complex power **[computed]**: at the
  fundamental, what the primary lines draw at the parent's nominal
  voltages equals what the child's lines and neutral draw at its own,
  whatever the loads and the vector group;
* at no load the child's voltages are its nominal ones **[computed]** (the
  transfer maps nominal to nominal).

Before :mod:`tri.engine.centre_tap` the building was refused: the sequence
transfer alone put the 10 A load below as 6.67 / 3.33 / 3.33 A (its zero
sequence removed) on the wrong primary lines, and a transformer fed from a
high-leg panel 30° off its voltage. Tolerances: 1e-9 relative (round-off).
"""

from __future__ import annotations

import cmath
import math

import numpy as np
import pytest
from tree_support import SYS_208Y, SYS_480Y, arrays, feeder_only, polar, two_level

from tri.engine.high_leg import supply_phase_voltages
from tri.engine.inputs import LINE_TO_LINE, LINE_TO_NEUTRAL, THREE_PHASE, SystemVoltages
from tri.engine.tree_results import analyse_tree

#: 480Y/277 with its exact phase voltage, so that the ratio is 2 exactly (tree_support's
#: SYS_480Y writes 277 V, a ratio of 1.9993).
SYS_480 = SystemVoltages(v_ll=480.0, v_ln=480.0 / math.sqrt(3.0))
SYS_240B = SystemVoltages(v_ll=240.0, v_ln=120.0, high_leg=1)
SYS_240C = SystemVoltages(v_ll=240.0, v_ln=120.0, high_leg=2)


def _solve(inputs):
    return analyse_tree(inputs).solution


def test_a_120_v_load_hangs_on_the_tapped_winding_alone() -> None:
    """10 A at unity on A to neutral of a 240/120D (high leg B) behind a 480:240 V Dd0.

    Ampere-turns of the tapped limb A-C: it works as a whole winding with
    5 A, so the primary's A-C winding carries 5/2 = 2.5 A, in lines A and C,
    in phase with ``V_AC = 480∠−30°`` of the 480Y/277 frame; none in B
    **[computed]**.
    """
    child = arrays([(1200.0, LINE_TO_NEUTRAL, 0, 0)])
    sol = _solve(two_level(child, SYS_480, SYS_240B, "Dd0"))
    fed = sol.fed.phase[1][:, 0]
    np.testing.assert_allclose(fed, [polar(2.5, -30), 0, polar(2.5, 150)], atol=1e-9)
    # the high leg on C: the tapped winding joins A and B
    sol = _solve(two_level(child, SYS_480, SYS_240C, "Dd0"))
    fed = sol.fed.phase[1][:, 0]
    np.testing.assert_allclose(np.abs(fed), [2.5, 2.5, 0.0], atol=1e-9)


def test_a_balanced_load_fed_from_a_high_leg_panel_is_in_phase_with_its_voltage() -> None:
    """30 A per phase at unity behind a 240:208 V Dyn1 on a 240/120D panel.

    10.8 kW at unity power factor: the primary lines carry
    10 800 / (√3·240) = 25.98 A each, and their complex power at the
    parent's own phasors is 10 800 + 0j **[computed]** (the sequence
    transfer alone gave 10 800∠−30°).
    """
    child = arrays([(3 * 30.0 * 120.0, THREE_PHASE, 0, 0)])
    sol = _solve(two_level(child, SYS_240B, SYS_208Y, "Dyn1"))
    fed = sol.fed.phase[1][:, 0]
    s = np.sum(supply_phase_voltages(SYS_240B) * np.conj(fed))
    assert s == pytest.approx(10_800.0, rel=1e-9, abs=1e-6)
    np.testing.assert_allclose(np.abs(fed), 10_800 / (math.sqrt(3) * 240), rtol=1e-9)


def _random_loads(rng: np.random.Generator, system: SystemVoltages):
    """Loads of every connection on ``system``, none to neutral on a high leg."""
    rows = [(0.0, THREE_PHASE, 0, 0)]  # the feeder row of a parent (unused here)
    low = [p for p in range(3) if p != system.high_leg]
    for _ in range(6):
        va = cmath.rect(float(rng.uniform(300, 3000)), math.acos(float(rng.uniform(0.7, 1))))
        kind = int(rng.integers(0, 3))
        if kind == 0 and system.has_neutral:
            p = int(rng.choice(low))
            rows.append((va, LINE_TO_NEUTRAL, p, p))
        elif kind == 1:
            p = int(rng.integers(0, 3))
            rows.append((va, LINE_TO_LINE, p, (p + 1) % 3))
        else:
            rows.append((va, THREE_PHASE, 0, 0))
    return arrays(rows[1:])


@pytest.mark.parametrize(
    ("primary", "secondary", "groups"),
    [
        (SYS_480Y, SYS_240B, ("Dd0", "Dd6", "Yd1", "Yd11")),
        (SYS_480Y, SYS_240C, ("Dd0", "Yd1")),
        (SYS_240B, SYS_208Y, ("Dyn1", "Dyn11", "Yyn0")),
        (SYS_240C, SYS_208Y, ("Dyn1", "Dd0")),
    ],
    ids=["to-B-high", "to-C-high", "from-B-high", "from-C-high"],
)
def test_complex_power_passes_whole_and_no_load_voltages_are_nominal(primary, secondary, groups):
    rng = np.random.default_rng(11)
    for group in groups:
        child_system = secondary
        if group == "Dd0" and secondary is SYS_208Y:
            child_system = SystemVoltages(v_ll=208.0, v_ln=None)  # a 3-wire secondary
        for _ in range(4):
            child = _random_loads(rng, child_system)
            sol = _solve(two_level(child, primary, child_system, group))
            e_child = supply_phase_voltages(child_system)
            s_child = np.sum(e_child * np.conj(sol.total.phase[1][:, 0]))
            s_fed = np.sum(supply_phase_voltages(primary) * np.conj(sol.fed.phase[1][:, 0]))
            assert s_fed == pytest.approx(s_child, rel=1e-9), group
        idle = _solve(two_level(feeder_only(), primary, child_system, group))
        np.testing.assert_allclose(idle.v_phase[1], supply_phase_voltages(child_system), atol=1e-9)
