"""Transformers between panels: vector groups, the check values of issue 13, a second opinion.

Check values (each worked in its comment):

* 100 A on one phase of a 480 V delta to 208Y/120 Dyn secondary shows on the
  primary as 25, 25 and 0 A [computed]. The winding ratio is 480:120 = 4
  (the delta winding sees the 480 V line voltage, the wye winding the 120 V
  phase voltage); the loaded secondary winding draws 100/4 = 25 A in the one
  delta winding on its limb, and that winding current leaves by two primary
  lines. The engine's line-voltage ratio is 480/(120·√3) = 4/√3, which is
  the same transformer. (The issue's figures need this ratio: with the
  rounded 208 V the ratio would be 480/208 and the figure 25.02 A.)
* A balanced third harmonic of 10 A per phase makes 30 A in the secondary
  neutral and nothing on the primary lines [computed: the three order-3
  currents are in phase, a zero-sequence set; a delta keeps it], and
  10/4 = 2.5 A circulates in each delta winding [computed].
* Yyn by hand [computed]: 100 A on phase A of a 480Y/277 to 208Y/120
  transformer, n = 277/120. With the primary neutral connected (YNyn0) the
  current passes as it is: 100/n = 43.32 A on primary A, 0 on B and C, 43.32
  A in the primary neutral. Without it (Yyn0) the zero-sequence third is
  blocked: I_0 = I_1 = I_2 = 100/3 A, primary A = (I_1 + I_2)/n = 28.88 A,
  B = C = (a²I_1 + aI_2)/n = −I_1/n, 14.44 A.
* Twelve pulses: two identical six-pulse loads, one behind a Dd0 and one
  behind a Dy transformer, cancel their 5th and 7th harmonics on the common
  primary and double the 11th and 13th (Arrillaga & Watson, *Power System
  Harmonics* (from memory); [computed] from the sequence shifts).

Tolerances: 1e-9 relative (round-off of a sequence round trip, ~1e-15, with
ample margin) unless a comment says otherwise.
"""

from __future__ import annotations

import cmath
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from tree_support import (
    SYS_208Y,
    SYS_480D,
    SYS_480Y,
    arrays,
    one_phase_amps,
    polar,
    two_level,
)

from tri.engine.inputs import LINE_TO_LINE, LINE_TO_NEUTRAL, THREE_PHASE
from tri.engine.transformer import (
    current_factors,
    parse_vector_group,
    transfer_currents,
    transfer_voltages,
    voltage_factors,
)
from tri.engine.tree_results import analyse_tree

TOL = 1e-9


def primary_lines(tree) -> np.ndarray:
    """The parent's fundamental line currents (its only load is the feeder)."""
    result = analyse_tree(tree)
    return np.array([p.current.complex for p in result.nodes[0].analysis.phases])


@pytest.mark.parametrize(
    ("group", "expected"),
    [
        # Dyn1: winding a sits on primary A-C; the secondary lags 30°, so the
        # winding current 25∠−30° enters line A and leaves by C [computed]
        ("Dyn1", (polar(25, -30), 0, polar(25, 150))),
        # Dyn11: winding a on A-B, secondary leads 30° [computed]
        ("Dyn11", (polar(25, 30), polar(25, -150), 0)),
    ],
)
def test_single_phase_load_through_delta_wye(group, expected):
    tree = two_level(one_phase_amps(100.0, 120.0), SYS_480D, SYS_208Y, group)
    np.testing.assert_allclose(primary_lines(tree), expected, atol=TOL * 100)


def test_single_phase_load_through_delta_wye_on_a_277_v_parent():
    # 480Y/277 parent: n = 277/120, |I| = 100/(√3·n) = 25.0083 A [computed]
    tree = two_level(one_phase_amps(100.0, 120.0), SYS_480Y, SYS_208Y, "Dyn1")
    mags = np.sort(np.abs(primary_lines(tree)))
    expected = 100.0 / (math.sqrt(3.0) * 277.0 / 120.0)
    np.testing.assert_allclose(mags, [0.0, expected, expected], atol=TOL * 100)


def test_balanced_third_harmonic_stays_in_the_delta():
    # three 50 A unity-pf loads with a 3rd harmonic of 0.2 pu: 10 A each
    rows = [(50.0 * 120.0, LINE_TO_NEUTRAL, p, p, [0.2]) for p in range(3)]
    tree = two_level(arrays(rows, orders=(3,)), SYS_480D, SYS_208Y, "Dyn1")
    result = analyse_tree(tree)
    child, parent = result.nodes[1], result.nodes[0]
    assert child.analysis.neutral.harmonic_a[1] == pytest.approx(30.0, rel=TOL)
    for ph in parent.analysis.phases:
        assert ph.harmonic_a[1] == pytest.approx(0.0, abs=TOL * 100)
        # the fundamental passes: 50 A·120 V per phase = 50/(4/√3)... = 50·120/277.13 [computed]
        assert ph.current_a == pytest.approx(50.0 * 120.0 / (480.0 / math.sqrt(3.0)), rel=TOL)
    assert child.feeder.transformer.delta_circulating_a == pytest.approx(2.5, rel=TOL)
    assert parent.analysis.neutral.rms_a == 0.0  # a 3-wire parent has none


@pytest.mark.parametrize(
    ("group", "expected_lines", "expected_neutral"),
    [
        ("YNyn0", (100 * 120 / 277, 0.0, 0.0), 100 * 120 / 277),
        ("Yyn0", (200 / 3 * 120 / 277, 100 / 3 * 120 / 277, 100 / 3 * 120 / 277), 0.0),
    ],
)
def test_hand_worked_wye_wye(group, expected_lines, expected_neutral):
    tree = two_level(one_phase_amps(100.0, 120.0), SYS_480Y, SYS_208Y, group)
    result = analyse_tree(tree)
    parent = result.nodes[0].analysis
    np.testing.assert_allclose(
        [p.current_a for p in parent.phases], expected_lines, rtol=TOL, atol=TOL
    )
    assert parent.neutral.current_a == pytest.approx(expected_neutral, abs=TOL)
    # the current on A is in phase with the load (no shift through Yy0) [computed]
    assert parent.phases[0].current_deg == pytest.approx(0.0, abs=1e-9)
    warned = any("no primary neutral" in f.message for f in result.nodes[1].analysis.findings)
    assert warned == (group == "Yyn0")


def test_twelve_pulse_cancellation():
    # one balanced 3-pole load with 5th, 7th, 11th, 13th of 0.2, 0.14, 0.09, 0.07 pu
    orders = (5, 7, 11, 13)
    harm = [0.2, 0.14, 0.09, 0.07]
    drive = arrays([(100e3, THREE_PHASE, 0, 0, harm)], orders=orders)
    from tree_support import transformer

    from tri.engine.inputs import Ratings
    from tri.engine.tree_inputs import FeederImpedance, PanelLink, TreeInputs, TreeNode

    parent = arrays([(0, THREE_PHASE, 0, 0), (0, THREE_PHASE, 0, 0)])
    big = Ratings(2000.0)
    tree = TreeInputs(
        (
            TreeNode(parent, SYS_480D, big),
            TreeNode(drive, SYS_480D, big, PanelLink(0, 0, FeederImpedance(), transformer("Dd0"))),
            TreeNode(drive, SYS_480D, big, PanelLink(0, 1, FeederImpedance(), transformer("Dy1"))),
        )
    )
    result = analyse_tree(tree)
    one = result.nodes[1].analysis.phases[0].harmonic_a
    both = result.nodes[0].analysis.phases[0].harmonic_a
    # orders 1, 5, 7, 11, 13. Each fundamental is in phase with its own primary
    # voltage (power is conserved through the shift), so the two add
    assert both[0] == pytest.approx(2 * one[0], rel=TOL)
    assert both[1] == pytest.approx(0.0, abs=TOL * one[0])
    assert both[2] == pytest.approx(0.0, abs=TOL * one[0])
    assert both[3] == pytest.approx(2 * one[3], rel=TOL)
    assert both[4] == pytest.approx(2 * one[4], rel=TOL)


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("Dyn", "Dyn1"),
        ("dyn11", "Dyn11"),
        ("Yyn", "Yyn0"),
        ("YNyn0", "YNyn0"),
        ("Dd", "Dd0"),
        ("Yd", "Yd1"),
        ("Yd11", "Yd11"),
        ("Dy5", "Dy5"),
    ],
)
def test_vector_group_text(text, expected):
    assert parse_vector_group(text).text == expected


@pytest.mark.parametrize("text", ["Dyn2", "Dd1", "Zyn11", "Dyn12", "", "D y n"])
def test_vector_group_refused(text):
    with pytest.raises(ValueError, match=r"vector group|clock number"):
        parse_vector_group(text)


# --------------------------------------------------------------------------
# second opinion: ideal windings in the phase domain, order by order
# --------------------------------------------------------------------------
def phase_domain_primary(sec_abs: np.ndarray, group: str, n_winding: float) -> np.ndarray:
    """Primary line currents of an ideal transformer from secondary line currents.

    Written from the windings, not from sequence components: each secondary
    winding current ``I_w = I_sec/N`` flows in the primary winding on the same
    limb. Dyn1: windings on A-C, B-A, C-B; Dyn11: on A-B, B-C, C-A
    (IEC 60076-1 diagrams, from memory). YNyn0: primary = secondary/N.
    """
    w = sec_abs / n_winding
    if group == "Dyn1":
        return np.array([w[0] - w[1], w[1] - w[2], w[2] - w[0]])
    if group == "Dyn11":
        return np.array([w[0] - w[2], w[1] - w[0], w[2] - w[1]])
    return w


@settings(max_examples=60, deadline=None)
@given(
    st.sampled_from(["Dyn1", "Dyn11", "YNyn0"]),
    st.lists(st.complex_numbers(max_magnitude=100, allow_nan=False), min_size=9, max_size=9),
)
def test_sequence_transfer_equals_windings(group, values):
    g = parse_vector_group(group)
    orders = np.array([1, 3, 5])
    child = np.array(values).reshape(3, 3)  # phases × orders, child frame
    if g.delta_primary:
        ratio, n_winding = 4.0 / math.sqrt(3.0), 4.0  # 480 V delta, 120 V winding
    else:
        ratio = n_winding = 277.0 / 120.0
    f = current_factors(
        np.array([g.lag_rad]), np.array([ratio]), np.array([g.zero_sequence_passes]), orders
    )
    got = transfer_currents(child[None], f)[0]
    for k, h in enumerate(orders):
        sec_abs = child[:, k] * cmath.exp(-1j * h * g.lag_rad)  # child frame to absolute
        want = phase_domain_primary(sec_abs, group, n_winding)
        np.testing.assert_allclose(got[:, k], want, atol=1e-9 * (1 + np.abs(child).max()))


@settings(max_examples=60, deadline=None)
@given(
    st.sampled_from(["Dyn1", "Dyn11", "Yyn0", "YNyn0", "Dd0", "Yd1", "Dy5", "Yy6"]),
    st.lists(st.complex_numbers(max_magnitude=100, allow_nan=False), min_size=6, max_size=6),
)
def test_ideal_transformer_conserves_power(group, values):
    # S = Σ V·conj(I) is the same on both sides at the fundamental [computed]
    # (zero sequence that does not pass has V_0 = 0 on the secondary and I_0 = 0 on
    # the primary, so it does no work on either side)
    g = parse_vector_group(group)
    v_prim = np.array(values[:3])
    i_sec = np.array(values[3:])
    args = (np.array([g.lag_rad]), np.array([2.0]), np.array([g.zero_sequence_passes]))
    v_sec = transfer_voltages(v_prim[None], voltage_factors(*args))[0]
    i_prim = transfer_currents(i_sec[None, :, None], current_factors(*args, np.array([1])))[0, :, 0]
    s_prim = np.sum(v_prim * np.conj(i_prim))
    s_sec = np.sum(v_sec * np.conj(i_sec))
    assert abs(s_prim - s_sec) <= 1e-9 * (1 + abs(v_prim).max() * abs(i_sec).max())


def test_no_load_secondary_is_nominal_in_its_own_frame():
    # at no load the child sees exactly its nominal, balanced voltage [computed]
    from tri.engine.inputs import SupplyImpedance

    supply = SupplyImpedance(500.0, 5.0, 5.0)
    for group in ("Dyn1", "Dyn11", "YNyn0"):
        tree = two_level(
            arrays([(0, LINE_TO_LINE, 0, 1)]), SYS_480Y, SYS_208Y, group, supply=supply
        )
        v = analyse_tree(tree).nodes[1].analysis.voltage
        assert v is not None
        for k, deg in enumerate((0.0, -120.0, 120.0)):
            assert v.phase_v[k].magnitude == pytest.approx(120.0, rel=TOL)
            assert v.phase_v[k].deg == pytest.approx(deg, abs=1e-7)


def test_voltage_drop_through_dyn_is_the_series_impedance():
    # stiff parent, no feeder: V_a = 120 − Z_T·100 A, V_b and V_c untouched, because
    # every sequence sees the same Z_T behind a delta primary [computed]
    tree = two_level(one_phase_amps(100.0, 120.0), SYS_480D, SYS_208Y, "Dyn1")
    v = analyse_tree(tree).nodes[1].analysis.voltage
    z = tree.nodes[1].link.transformer.impedance_ohm(208.0)
    assert v.phase_v[0].complex == pytest.approx(120.0 - z * 100.0, abs=1e-9)
    assert v.phase_v[1].complex == pytest.approx(polar(120.0, -120.0), abs=1e-9)
    assert v.phase_v[2].complex == pytest.approx(polar(120.0, 120.0), abs=1e-9)


def test_three_wire_secondary_refuses_a_four_wire_child():
    tree = two_level(one_phase_amps(10.0, 120.0), SYS_480D, SYS_208Y, "Dd0")
    with pytest.raises(ValueError, match="secondary"):
        analyse_tree(tree)


def test_yn_primary_needs_a_neutral_upstream():
    tree = two_level(one_phase_amps(10.0, 120.0), SYS_480D, SYS_208Y, "YNyn0")
    with pytest.raises(ValueError, match="YN primary"):
        analyse_tree(tree)
