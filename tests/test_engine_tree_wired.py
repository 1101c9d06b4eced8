"""Roll-up of panels as they are wired: breakers with legs, shared neutrals, high-leg deltas.

Sources: every expectation is worked from the phasors in the comments
[computed]: a 1-pole load of S at unity power factor on a phase at ``V∠θ``
draws ``conj(S/V) = (S/|V|)∠θ``; a line-to-line load on ``V_pq`` draws
``conj(S/V_pq)`` out of p and into q; the shared neutral of a group carries
the phasor sum of its legs at every order, and order h of a leg at angle θ
sits at ``h·θ`` (its harmonic angle 0 here). The high-leg phasors are those
of ``tri.engine.high_leg`` (``V_AN = 120∠0°``, ``V_BN = 207.8∠−90°``,
``V_CN = 120∠180°``, line voltages 240 V) [textbook high-leg delta geometry,
from memory]. A feeder without a transformer carries its child's line and
neutral currents unchanged (Kirchhoff's current law), so the roll-up of a
child equals the child analysed alone. Tolerances: 1e-9 relative.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from tree_support import BIG, SYS_208Y, polar

from tri.engine import analyse
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    CircuitArrays,
    SystemVoltages,
)
from tri.engine.transformer import TransformerLink, parse_vector_group
from tri.engine.tree_inputs import FeederImpedance, PanelLink, TreeInputs, TreeNode, pack_tree
from tri.engine.tree_results import analyse_tree

SYS_HL = SystemVoltages(v_ll=240.0, v_ln=120.0, high_leg=1)  # 240/120 V, high leg on B


def wired(rows: list[tuple], orders=(), *, breaker=None, group=None) -> CircuitArrays:
    """Rows ``(s_va, connection, p, q[, harmonics])`` with breaker and group numbers."""
    n = len(rows)
    harm = np.zeros((n, len(orders)), dtype=complex)
    for k, row in enumerate(rows):
        if len(row) > 4:
            harm[k] = row[4]
    return CircuitArrays(
        s_va=np.array([r[0] for r in rows], dtype=complex),
        connection=np.array([r[1] for r in rows], dtype=int),
        phase_p=np.array([r[2] for r in rows], dtype=int),
        phase_q=np.array([r[3] for r in rows], dtype=int),
        harmonics=harm,
        orders=np.array(orders, dtype=int),
        breaker=None if breaker is None else np.array(breaker, dtype=int),
        neutral_group=None if group is None else np.array(group, dtype=int),
    )


def close(x, y) -> None:
    np.testing.assert_allclose(x, y, rtol=1e-9, atol=1e-9)


# the child: a 2-pole breaker with a neutral, 1200 VA per leg on A and B, each leg
# with 50 % third harmonic: legs 10∠0° and 10∠−120° A, thirds 5∠0° and 5∠−360° A
MWBC = wired(
    [(1200, LINE_TO_NEUTRAL, 0, 0, [0.5]), (1200, LINE_TO_NEUTRAL, 1, 1, [0.5])],
    orders=(3,),
    breaker=[0, 0],
    group=[0, 0],
)
# the parent: its feeder (row 0, breaker 0) and a 2-pole breaker with a neutral, 600 VA
# per leg on B and C (breaker 1, shared neutral 0): legs 5∠−120° and 5∠120° A
PARENT = wired(
    [(0, THREE_PHASE, 0, 0), (600, LINE_TO_NEUTRAL, 1, 1), (600, LINE_TO_NEUTRAL, 2, 2)],
    breaker=[0, 1, 1],
    group=[-1, 0, 0],
)


def mwbc_tree() -> TreeInputs:
    link = PanelLink(0, 0, FeederImpedance())
    return TreeInputs((TreeNode(PARENT, SYS_208Y, BIG), TreeNode(MWBC, SYS_208Y, BIG, link)))


def test_shared_neutral_of_a_child_is_rolled_up_by_hand():
    result = analyse_tree(mwbc_tree())
    child = result.nodes[1].analysis
    (group,) = child.shared_neutrals
    # 10∠0° + 10∠−120° = 10∠−60° at the fundamental; thirds 5 + 5 = 10 A in phase
    close(group.current.complex, polar(10.0, -60.0))
    close(group.harmonic_a, [10.0, 10.0])
    close(group.rms_a, math.sqrt(10.0**2 + 10.0**2))
    (breaker,) = child.breakers
    close([p.complex for p in breaker.current], [polar(10, 0), polar(10, -120), 0])
    close(breaker.rms_a, [math.sqrt(125.0), math.sqrt(125.0), 0.0])  # 10 A and 5 A


def test_the_parent_sees_the_childs_line_and_neutral_currents():
    parent = analyse_tree(mwbc_tree()).nodes[0].analysis
    # lines: A 10∠0° (child); B 10∠−120° + 5∠−120° = 15∠−120°; C 5∠120° (parent's leg)
    close(
        [p.current.complex for p in parent.phases], [polar(10, 0), polar(15, -120), polar(5, 120)]
    )
    # third harmonic on the lines: A 5, B 5 (child only; the parent's legs are linear)
    close([p.harmonic_a[1] for p in parent.phases], [5.0, 5.0, 0.0])
    # neutral: 10∠−60° (child's group) + 5∠−120° + 5∠120° (= 5∠180°) = 8.660∠−90°;
    # third: the child's 10 A
    close(parent.neutral.current.complex, polar(10, -60) + polar(5, 180))
    close(parent.neutral.harmonic_a, [5.0 * math.sqrt(3.0), 10.0])
    # the parent's own shared neutral: 5∠−120° + 5∠120° = 5∠180°
    (own_group,) = parent.shared_neutrals
    close(own_group.current.complex, polar(5, 180))
    # its feeder breaker carries the child's lines, its 2-pole breaker its own legs
    feeder, legs = parent.breakers
    close([p.complex for p in feeder.current], [polar(10, 0), polar(10, -120), 0])
    close([p.complex for p in legs.current], [0, polar(5, -120), polar(5, 120)])


def test_child_in_the_tree_equals_the_child_alone():
    result = analyse_tree(mwbc_tree())
    inside, alone = result.nodes[1].analysis, analyse(MWBC, SYS_208Y, BIG)
    assert len(inside.breakers) == len(alone.breakers) == 1
    for a, b in zip(inside.shared_neutrals, alone.shared_neutrals, strict=True):
        close(a.current.complex, b.current.complex)
        close(a.harmonic_a, b.harmonic_a)
    close(inside.breakers[0].rms_a, alone.breakers[0].rms_a)
    close(inside.circuit_calculated_a, alone.circuit_calculated_a)
    close([p.calculated_a for p in inside.phases], [p.calculated_a for p in alone.phases])
    close(inside.neutral.calculated_a, alone.neutral.calculated_a)


def test_a_panel_without_wiring_numbers_reports_no_breakers_beside_a_wired_one():
    plain = wired([(0, THREE_PHASE, 0, 0), (1200, LINE_TO_NEUTRAL, 0, 0)])
    link = PanelLink(0, 0, FeederImpedance())
    tree = TreeInputs((TreeNode(plain, SYS_208Y, BIG), TreeNode(MWBC, SYS_208Y, BIG, link)))
    result = analyse_tree(tree)
    assert result.nodes[0].analysis.breakers == ()  # as analyse(plain) reports
    assert result.nodes[0].analysis.shared_neutrals == ()
    assert analyse(plain, SYS_208Y, BIG).breakers == ()
    assert len(result.nodes[1].analysis.shared_neutrals) == 1


# a high-leg child: 1200 VA on A (120∠0°: 10∠0° A), 1200 VA on C (120∠180°: 10∠180° A),
# 2400 VA on A-B (V_AB = 120 − (−j207.8) = 240∠60°: 10∠60° A out of A, into B)
HL_CHILD = wired(
    [
        (1200, LINE_TO_NEUTRAL, 0, 0),
        (1200, LINE_TO_NEUTRAL, 2, 2),
        (2400, LINE_TO_LINE, 0, 1),
    ]
)


def hl_tree(feeder: FeederImpedance | None = None) -> TreeInputs:
    parent = wired([(0, THREE_PHASE, 0, 0)])
    link = PanelLink(0, 0, feeder or FeederImpedance())
    return TreeInputs((TreeNode(parent, SYS_HL, BIG), TreeNode(HL_CHILD, SYS_HL, BIG, link)))


def test_high_leg_child_is_rolled_up_with_its_own_phasors():
    result = analyse_tree(hl_tree())
    for node in result.nodes:  # the parent's only load is the child
        a = node.analysis
        # A: 10∠0° + 10∠60° = 17.32∠30°; B: −10∠60° = 10∠−120°; C: 10∠180°
        close(
            [p.current.complex for p in a.phases],
            [polar(10, 0) + polar(10, 60), polar(10, -120), polar(10, 180)],
        )
        # the two low-leg loads are in opposition: 10∠0° + 10∠180° = 0 in the neutral
        close(a.neutral.rms_a, 0.0)
        assert any("208 V to neutral" in f.message for f in a.findings)
    alone = analyse(HL_CHILD, SYS_HL, BIG)
    inside = result.nodes[1].analysis
    close([p.rms_a for p in inside.phases], [p.rms_a for p in alone.phases])
    close([p.calculated_a for p in inside.phases], [p.calculated_a for p in alone.phases])
    close(inside.circuit_calculated_a, alone.circuit_calculated_a)


def test_high_leg_child_voltage_through_its_feeder_by_hand():
    # 0.1 Ω phase and neutral conductors (1 km of 0.1 Ω/km); the child carries only
    # 1200 VA on A: 10∠0° A out on A and back on the neutral, so
    # V_A = 120 − 0.1·10 − 0.1·10 = 118 V (1.667 % drop); V_B (high leg) is
    # 207.8∠−90° − 0.1·10 = 207.85 V in magnitude (no drop to speak of) and the
    # deviation of phase voltages is not reported (unequal by design)
    child = wired([(1200, LINE_TO_NEUTRAL, 0, 0)])
    parent = wired([(0, THREE_PHASE, 0, 0)])
    link = PanelLink(0, 0, FeederImpedance(1000.0, 0.1, 0.0, 0.1, 0.0))
    tree = TreeInputs((TreeNode(parent, SYS_HL, BIG), TreeNode(child, SYS_HL, BIG, link)))
    v = analyse_tree(tree).nodes[1].analysis.voltage
    assert v is not None
    close(v.phase_v[0].complex, 118.0)
    close(v.drop_pct[0], 100.0 * 2.0 / 120.0)
    high = math.sqrt(3.0) / 2.0 * 240.0
    close(v.drop_pct[1], 100.0 * (high - abs(complex(-1.0, -high))) / high)
    assert v.phase_deviation_pct is None
    close(v.vuf_pct, analyse_tree(tree).batch.vuf_pct[1])


def test_what_a_transformer_next_to_a_high_leg_panel_may_be():
    tx = TransformerLink(45.0, 3.5, 2.0, parse_vector_group("Dyn"))
    parent = wired([(0, THREE_PHASE, 0, 0)])
    child = wired([(1200, LINE_TO_NEUTRAL, 0, 0)])
    tree = TreeInputs(
        (TreeNode(parent, SYS_HL, BIG), TreeNode(child, SYS_208Y, BIG, PanelLink(0, 0)))
    )
    with pytest.raises(ValueError, match="high leg"):
        pack_tree(tree)
    tree = TreeInputs(
        (
            TreeNode(parent, SystemVoltages(480.0, None), BIG),
            TreeNode(child, SYS_208Y, BIG, PanelLink(0, 0, transformer=tx)),
        )
    )
    pack_tree(tree)  # the same transformer between wye panels is fine
    # next to a high-leg delta (tri.engine.centre_tap): fed from one with a D primary, fine;
    # a YN primary on it, or a wye secondary for one, is refused
    for group, parent_sys, child_sys, words in (
        ("Dyn", SYS_HL, SYS_208Y, None),
        ("YNyn0", SYS_HL, SYS_208Y, "YN primary on a high-leg delta"),
        ("Dyn", SystemVoltages(480.0, None), SYS_HL, "centre-tapped delta"),
        ("Dd0", SystemVoltages(480.0, None), SYS_HL, None),
    ):
        link = PanelLink(0, 0, transformer=TransformerLink(45, 3.5, 2, parse_vector_group(group)))
        hl = TreeInputs((TreeNode(parent, parent_sys, BIG), TreeNode(child, child_sys, BIG, link)))
        if words is None:
            pack_tree(hl)
        else:
            with pytest.raises(ValueError, match=words):
                pack_tree(hl)


legs = st.lists(
    st.tuples(
        st.floats(100.0, 5000.0),
        st.permutations([0, 1, 2]),
        st.floats(0.0, 0.8),
        st.floats(-math.pi, math.pi),
    ),
    min_size=1,
    max_size=4,
)


@settings(max_examples=40, deadline=None)
@given(groups=legs, high=st.booleans())
def test_property_roll_up_of_wired_child_equals_child_alone(groups, high):
    # each group: 2 or 3 legs on distinct phases (a breaker with a neutral), one
    # 3rd and 5th harmonic per group; the parent's figures are the child's (its only
    # load is the feeder) and the child's are those of the child alone
    system = SYS_HL if high else SYS_208Y
    rows, breaker, group = [], [], []
    for g, (va, phases, m, delta) in enumerate(groups):
        use = [p for p in phases if not (high and p == 1)][: 2 + (g % 2)]
        for p in use:
            rows.append((va, LINE_TO_NEUTRAL, p, p, [m * np.exp(1j * delta), m / 2]))
            breaker.append(g)
            group.append(g)
    child = wired(rows, orders=(3, 5), breaker=breaker, group=group)
    link = PanelLink(0, 0, FeederImpedance())
    parent = wired([(0, THREE_PHASE, 0, 0)])
    tree = TreeInputs((TreeNode(parent, system, BIG), TreeNode(child, system, BIG, link)))
    result = analyse_tree(tree)
    alone = analyse(child, system, BIG)
    scale = sum(alone.circuit_rms_a)
    for a in (result.nodes[1].analysis, result.nodes[0].analysis):
        for pa, pb in zip(a.phases, alone.phases, strict=True):
            np.testing.assert_allclose(pa.harmonic_a, pb.harmonic_a, atol=1e-9 * scale)
        np.testing.assert_allclose(
            a.neutral.harmonic_a, alone.neutral.harmonic_a, atol=1e-9 * scale
        )
    inside = result.nodes[1].analysis
    for a, b in zip(inside.shared_neutrals, alone.shared_neutrals, strict=True):
        np.testing.assert_allclose(a.harmonic_a, b.harmonic_a, atol=1e-9 * scale)
    for a, b in zip(inside.breakers, alone.breakers, strict=True):
        np.testing.assert_allclose(a.rms_a, b.rms_a, atol=1e-9 * scale)
