"""Roll-up of a tree of panels: equal to each panel's own analysis, voltages down the tree.

Sources: every expectation follows from the definitions [computed]: a
feeder without a transformer carries its child's line and neutral currents
unchanged (Kirchhoff's current law), so a parent whose only load is that
feeder has exactly the child's figures; the drop along a feeder is
``Z·I_p + Z_N·I_N`` (shared/spec/engine.md). Tolerances: 1e-9 of the panel's
total current or voltage (two summation orders of the same numbers).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from test_engine_scalar_reference import RATINGS, SUPPLY, SYS, circuit, to_arrays
from tree_support import SYS_208Y, SYS_480Y, arrays, feeder_only, one_phase_amps, two_level

from tri.engine import analyse
from tri.engine.inputs import LINE_TO_NEUTRAL, THREE_PHASE, CircuitArrays
from tri.engine.tree_inputs import FeederImpedance, PanelLink, TreeInputs, TreeNode, pack_tree
from tri.engine.tree_results import analyse_tree


def with_feeder_row(c: CircuitArrays) -> CircuitArrays:
    """The same circuits with an empty 3-pole feeder row appended."""
    h = np.asarray(c.orders).size
    return CircuitArrays(
        s_va=np.append(c.s_va, 0j),
        connection=np.append(c.connection, THREE_PHASE),
        phase_p=np.append(c.phase_p, 0),
        phase_q=np.append(c.phase_q, 0),
        harmonics=np.vstack([c.harmonics, np.zeros((1, h))]),
        orders=c.orders,
        continuous=np.append(c.continuous, False),
    )


def same_figures(a, b, scale: float) -> None:
    """Every current figure of two PanelAnalysis objects agrees."""

    def close(x, y):
        np.testing.assert_allclose(x, y, rtol=1e-9, atol=1e-9 * scale + 1e-12)

    for pa, pb in zip(a.phases, b.phases, strict=True):
        close(pa.current.complex, pb.current.complex)
        close(pa.harmonic_a, pb.harmonic_a)
        close([pa.rms_a, pa.design_a, pa.va / 100], [pb.rms_a, pb.design_a, pb.va / 100])
    close(a.neutral.harmonic_a, b.neutral.harmonic_a)
    close(a.neutral.rms_a, b.neutral.rms_a)
    for s in ("i0", "i1", "i2"):
        close(getattr(a.sequence, s).complex, getattr(b.sequence, s).complex)
    # percentages of ~0 currents are ill-conditioned; compared where the panel is loaded
    if scale > 1e-6:
        close(a.current_unbalance.max_deviation_pct, b.current_unbalance.max_deviation_pct)
        close(a.nonlinear_share_pct, b.nonlinear_share_pct)


@settings(max_examples=50, deadline=None)
@given(st.lists(circuit(), min_size=1, max_size=10))
def test_parent_of_one_child_equals_the_child(circuits):
    child = to_arrays(circuits)
    tree = TreeInputs(
        (
            TreeNode(feeder_only(), SYS, RATINGS),
            TreeNode(child, SYS, RATINGS, PanelLink(0, 0)),
        )
    )
    result = analyse_tree(tree)
    alone = analyse(child, SYS, RATINGS)
    scale = sum(alone.circuit_rms_a)
    same_figures(result.nodes[1].analysis, alone, scale)  # the child's own report
    same_figures(result.nodes[0].analysis, alone, scale)  # its parent's figures
    feeder = result.nodes[1].feeder
    assert feeder is not None and feeder.transformer is None
    np.testing.assert_allclose(
        result.nodes[0].analysis.circuit_rms_a[0], max(p.rms_a for p in alone.phases)
    )


@settings(max_examples=40, deadline=None)
@given(st.lists(circuit(), min_size=1, max_size=8), st.lists(circuit(), min_size=1, max_size=8))
def test_parent_spectrum_is_own_plus_child(own, child):
    # a chain root -> middle -> leaf: the root's spectrum is the sum of the others'
    own_arrays, leaf = to_arrays(own), to_arrays(child)
    middle = with_feeder_row(own_arrays)
    tree = TreeInputs(
        (
            TreeNode(feeder_only(), SYS, RATINGS),
            TreeNode(middle, SYS, RATINGS, PanelLink(0, 0)),
            TreeNode(leaf, SYS, RATINGS, PanelLink(1, middle.n_circuits - 1)),
        )
    )
    sol = analyse_tree(tree).solution
    a, b = analyse_batch_spectra(own_arrays), analyse_batch_spectra(leaf)
    scale = 1 + np.abs(a).max() + np.abs(b).max()
    np.testing.assert_allclose(sol.total.phase[0], a + b, atol=1e-9 * scale)
    np.testing.assert_allclose(sol.total.phase[1], a + b, atol=1e-9 * scale)
    np.testing.assert_allclose(sol.total.phase[2], b, atol=1e-9 * scale)


def analyse_batch_spectra(c: CircuitArrays) -> np.ndarray:
    from tri.engine import analyse_batch

    return analyse_batch(c, SYS, RATINGS).phase_spectrum


@pytest.mark.parametrize("iterate", [False, True])
def test_tree_of_one_equals_analyse_with_supply(iterate):
    rng = np.random.default_rng(7)
    rows = [
        (complex(rng.uniform(500, 9000), rng.uniform(0, 3000)), LINE_TO_NEUTRAL, p % 3, p % 3)
        for p in range(12)
    ]
    panel = arrays(rows)
    tree = TreeInputs((TreeNode(panel, SYS, RATINGS),), supply=SUPPLY)
    got = analyse_tree(tree, iterate_voltage=iterate).nodes[0].analysis
    want = analyse(panel, SYS, RATINGS, SUPPLY, iterate_voltage=iterate)
    assert got.voltage is not None and want.voltage is not None
    for vg, vw in zip(got.voltage.phase_v, want.voltage.phase_v, strict=True):
        assert vg.complex == pytest.approx(vw.complex, abs=1e-7)
    assert got.voltage.vuf_pct == pytest.approx(want.voltage.vuf_pct, abs=1e-9)
    same_figures(got, want, sum(want.circuit_rms_a))
    assert [f.message for f in got.findings] == [f.message for f in want.findings]


def test_feeder_drop_by_hand():
    # 100 A unity pf on phase A of a 208Y/120 child through 50 m of
    # 0.2 + j0.08 ohm/km phase and neutral conductors: Z = 0.01 + j0.004 ohm,
    # V_A = 120 − Z·100 − Z·100 = 118 − j0.8 V; V_B, V_C see only the
    # neutral's drop, −Z·100 = −1 − j0.4 V [computed]
    feeder = FeederImpedance(50.0, 0.2, 0.08, 0.2, 0.08)
    child = one_phase_amps(100.0, 120.0)
    tree = two_level(child, SYS_208Y, SYS_208Y, None, feeder=feeder)
    v = analyse_tree(tree).nodes[1].analysis.voltage
    nominal = 120.0 * np.exp(1j * np.deg2rad([0.0, -120.0, 120.0]))
    want = nominal - np.array([2.0, 1.0, 1.0]) * complex(1.0, 0.4)
    np.testing.assert_allclose([p.complex for p in v.phase_v], want, atol=1e-9)


def test_root_without_supply_has_no_voltage_but_its_child_does():
    feeder = FeederImpedance(50.0, 0.2, 0.08, 0.2, 0.08)
    tree = two_level(one_phase_amps(10.0, 120.0), SYS_208Y, SYS_208Y, None, feeder=feeder)
    result = analyse_tree(tree)
    assert result.nodes[0].analysis.voltage is None
    assert result.nodes[1].analysis.voltage is not None


def test_iterated_tree_is_a_fixed_point():
    # each load draws its power at its own panel's voltage: recomputing the
    # voltages from the final currents gives the same voltages (to tol)
    rows = [(30e3, LINE_TO_NEUTRAL, 0, 0), (10e3, LINE_TO_NEUTRAL, 1, 1)]
    tree = two_level(
        arrays(rows),
        SYS_480Y,
        SYS_208Y,
        "Dyn1",
        feeder=FeederImpedance(80.0, 0.3, 0.1, 0.3, 0.1),
        supply=SUPPLY,
        kva=75.0,
    )
    result = analyse_tree(tree, iterate_voltage=True, tol=1e-12)
    sol = result.solution
    assert sol.converged and sol.iterations > 1
    from tri.engine.tree import voltages_down

    packed = pack_tree(tree)
    again = voltages_down(packed, sol.total.phase[..., 0], sol.total.neutral[..., 0])
    np.testing.assert_allclose(again, sol.v_phase, atol=1e-8)
    # the child's loads draw their scheduled power at its panel voltage [computed]
    v = sol.v_phase[1]
    i_a = sol.own.phase[1, 0, 0]
    assert v[0] * np.conj(i_a) == pytest.approx(30e3, rel=1e-9)
    assert result.nodes[1].analysis.voltage.iterated


def test_rerun_after_a_child_changes():
    tree = two_level(one_phase_amps(10.0, 120.0), SYS_208Y, SYS_208Y, None)
    before = analyse_tree(tree).nodes[0].analysis.phases[0].current_a
    after = analyse_tree(tree.with_circuits(1, one_phase_amps(25.0, 120.0)))
    assert before == pytest.approx(10.0)
    assert after.nodes[0].analysis.phases[0].current_a == pytest.approx(25.0)


def test_transformer_overload_is_a_limit_finding():
    # 45 kVA at 208 V: rated 124.9 A; 150 A on one phase is 120 % [computed]
    tree = two_level(one_phase_amps(150.0, 120.0), SYS_480Y, SYS_208Y, "Dyn1")
    node = analyse_tree(tree).nodes[1]
    tx = node.feeder.transformer
    assert tx.rated_a == pytest.approx(45e3 / (np.sqrt(3) * 208.0))
    assert tx.loading_pct == pytest.approx(100 * 150.0 / tx.rated_a)
    assert any(f.level == "limit" and "transformer" in f.message for f in node.analysis.findings)


@pytest.mark.parametrize(
    ("change", "message"),
    [
        (lambda n: dataclasses.replace(n, link=None), "no feeder"),
        (lambda n: dataclasses.replace(n, link=PanelLink(1, 0)), "parent must come before"),
        (lambda n: dataclasses.replace(n, link=PanelLink(0, 5)), "feeder row 5"),
        (lambda n: dataclasses.replace(n, system=SYS_480Y), "without a transformer"),
    ],
)
def test_malformed_trees(change, message):
    tree = two_level(one_phase_amps(10.0, 120.0), SYS_208Y, SYS_208Y, None)
    bad = TreeInputs((tree.nodes[0], change(tree.nodes[1])))
    with pytest.raises(ValueError, match=message):
        analyse_tree(bad)


def test_feeder_row_with_a_load_is_refused():
    parent = arrays([(1000.0, THREE_PHASE, 0, 0)])
    tree = two_level(one_phase_amps(10.0, 120.0), SYS_208Y, SYS_208Y, None, parent=parent)
    with pytest.raises(ValueError, match="zero load"):
        analyse_tree(tree)


def test_orders_of_different_panels_are_merged():
    a = arrays([(5000.0, LINE_TO_NEUTRAL, 0, 0, [0.5])], orders=(3,))
    b = arrays([(5000.0, LINE_TO_NEUTRAL, 1, 1, [0.3])], orders=(5,))
    parent = arrays([(0, THREE_PHASE, 0, 0), (0, THREE_PHASE, 0, 0)])
    tree = TreeInputs(
        (
            TreeNode(parent, SYS_208Y, RATINGS),
            TreeNode(a, SYS_208Y, RATINGS, PanelLink(0, 0)),
            TreeNode(b, SYS_208Y, RATINGS, PanelLink(0, 1)),
        )
    )
    root = analyse_tree(tree).nodes[0].analysis
    assert root.orders == (1, 3, 5)
    i1 = 5000.0 / 120.0
    # phase A: 0.5 pu of 3rd; phase B: 0.3 pu of 5th [computed]
    assert root.phases[0].harmonic_a == pytest.approx((i1, 0.5 * i1, 0.0))
    assert root.phases[1].harmonic_a == pytest.approx((i1, 0.0, 0.3 * i1))
