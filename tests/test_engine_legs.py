"""Shared neutrals, per-leg loads, unbalanced wye/delta loads and the high-leg delta.

Every check value is worked from the phasors in the comment beside it
[computed]: positive sequence A-B-C, V_A at 0°, I = conj(S / V). Tolerances:
1e-9 relative (round-off of a few complex sums and one division, ~1e-15,
with a wide margin); phasors the engine snaps to zero compare with atol 1e-9 A.
"""

from __future__ import annotations

import cmath
import math

import numpy as np
import pytest

from tri.engine import analyse, analyse_batch
from tri.engine.high_leg import high_leg_phase_voltages, supply_phase_voltages
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    CircuitArrays,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)
from tri.engine.phasors import line_voltages

WYE_208 = SystemVoltages(v_ll=208.0, v_ln=120.0)
DELTA_B = SystemVoltages(v_ll=240.0, v_ln=120.0, high_leg=1)
DELTA_C = SystemVoltages(v_ll=240.0, v_ln=120.0, high_leg=2)
RATINGS = Ratings(bus_a=200.0)
REL = 1e-9


def rows(
    spec: list[tuple[int, int, int, complex]],
    *,
    breaker: list[int] | None = None,
    group: list[int] | None = None,
    harmonics: list[list[complex]] | None = None,
    orders: list[int] | None = None,
) -> CircuitArrays:
    """Engine rows from (connection, p, q, S) tuples."""
    n = len(spec)
    orders = orders or []
    harm = np.zeros((n, len(orders)), dtype=complex) if harmonics is None else np.array(harmonics)
    return CircuitArrays(
        s_va=np.array([s for *_, s in spec], dtype=complex),
        connection=np.array([c for c, *_ in spec]),
        phase_p=np.array([p for _, p, _, _ in spec]),
        phase_q=np.array([q for _, _, q, _ in spec]),
        harmonics=harm.reshape(n, len(orders)),
        orders=np.array(orders, dtype=int),
        breaker=None if breaker is None else np.array(breaker),
        neutral_group=None if group is None else np.array(group),
    )


def ln(p: int, va: float) -> tuple[int, int, int, complex]:
    return (LINE_TO_NEUTRAL, p, p, complex(va))


# --------------------------------------------------------------------------
# shared neutrals
# --------------------------------------------------------------------------
def test_two_legs_of_16_a_on_a_and_b_put_16_a_in_the_neutral() -> None:
    # [computed] 1920 VA at 120 V = 16 A each: 16∠0° + 16∠−120° = 16∠−60°
    a = analyse(rows([ln(0, 1920), ln(1, 1920)], breaker=[0, 0], group=[0, 0]), WYE_208, RATINGS)
    (g,) = a.shared_neutrals
    assert g.current_a == pytest.approx(16.0, rel=REL)
    assert g.current.deg == pytest.approx(-60.0, abs=1e-9)
    assert g.rms_a == pytest.approx(16.0, rel=REL)
    # the breaker carries 16 A on A and B, nothing on C
    (brk,) = a.breakers
    assert [x.magnitude for x in brk.current] == pytest.approx([16.0, 16.0, 0.0], rel=REL, abs=1e-9)
    # alone in the panel, the group's neutral is the panel neutral
    assert a.neutral.rms_a == pytest.approx(16.0, rel=REL)


def test_three_legs_with_80_pct_third_harmonic_put_38_4_a_in_the_neutral() -> None:
    # [computed] 16 A legs on A, B, C: the fundamentals cancel (16·(1 + a² + a) = 0);
    # the third harmonics 0.8·16 A are in phase (3·θ = 0°, −360°, +360°): 3 × 12.8 = 38.4 A
    third = [[0.8 + 0j]] * 3
    c = rows(
        [ln(0, 1920), ln(1, 1920), ln(2, 1920)],
        breaker=[0, 0, 0],
        group=[0, 0, 0],
        harmonics=third,
        orders=[3],
    )
    a = analyse(c, WYE_208, RATINGS)
    (g,) = a.shared_neutrals
    assert g.current_a == pytest.approx(0.0, abs=1e-9)
    assert g.harmonic_a[1] == pytest.approx(38.4, rel=REL)
    assert g.rms_a == pytest.approx(38.4, rel=REL)
    # each leg's pole: sqrt(16² + 12.8²) = 20.49 A RMS
    assert a.breakers[0].rms_a == pytest.approx((math.hypot(16, 12.8),) * 3, rel=REL)


def test_unbalanced_wye_30_20_10_a_gives_17_32_a_neutral() -> None:
    # [computed] |30 + 20∠−120° + 10∠120°| = sqrt(30² + 20² + 10² − 30·20 − 20·10 − 10·30)
    # = sqrt(300) = 17.3205 A (the closed form for equal power factors, check-values.md)
    c = rows([ln(0, 3600), ln(1, 2400), ln(2, 1200)], breaker=[0, 0, 0], group=[0, 0, 0])
    a = analyse(c, WYE_208, RATINGS)
    assert a.shared_neutrals[0].current_a == pytest.approx(math.sqrt(300.0), rel=REL)
    assert a.neutral.current_a == pytest.approx(17.320508075688775, rel=REL)
    assert [x.magnitude for x in a.breakers[0].current] == pytest.approx([30, 20, 10], rel=REL)


def test_groups_are_summed_apart_from_the_panel_neutral() -> None:
    # [computed] group 0: 10 A on A and 10 A on B -> 10∠−60°; group 1: one 5 A leg on C
    # whose partner is elsewhere -> 5∠120°; the panel neutral 10∠−60° + 5∠120° = 5∠−60°
    c = rows([ln(0, 1200), ln(1, 1200), ln(2, 600)], breaker=[0, 0, 1], group=[0, 0, 1])
    a = analyse(c, WYE_208, RATINGS)
    g0, g1 = a.shared_neutrals
    assert (g0.current_a, g0.current.deg) == pytest.approx((10.0, -60.0), rel=REL)
    assert (g1.current_a, g1.current.deg) == pytest.approx((5.0, 120.0), rel=REL)
    assert (a.neutral.current_a, a.neutral.current_deg) == pytest.approx((5.0, -60.0), rel=REL)


def test_unbalanced_delta_breaker_line_currents() -> None:
    # [computed] 208Y/120, |V_AB| = 120·√3 = 207.85 V: only the AB leg loaded, 4800 VA
    # unity -> I_ab = 4800/207.85 = 23.094 A out on A, back on B, nothing on C
    i_ab = 4800 / (120 * math.sqrt(3))
    spec = [
        (LINE_TO_LINE, 0, 1, 4800 + 0j),
        (LINE_TO_LINE, 1, 2, 0j),
        (LINE_TO_LINE, 2, 0, 0j),
    ]
    a = analyse(rows(spec, breaker=[0, 0, 0]), WYE_208, RATINGS)
    cur = a.breakers[0].current
    assert [x.magnitude for x in cur] == pytest.approx([i_ab, i_ab, 0], rel=REL, abs=1e-9)
    # equal legs: a balanced delta, line current √3 × the branch current
    spec = [(LINE_TO_LINE, 0, 1, 2000j), (LINE_TO_LINE, 1, 2, 2000j), (LINE_TO_LINE, 2, 0, 2000j)]
    a = analyse(rows(spec, breaker=[0, 0, 0]), WYE_208, RATINGS)
    branch = 2000 / (120 * math.sqrt(3))
    assert [x.magnitude for x in a.breakers[0].current] == pytest.approx(
        [math.sqrt(3) * branch] * 3, rel=REL
    )
    assert a.neutral.rms_a == pytest.approx(0.0, abs=1e-9)


# --------------------------------------------------------------------------
# high-leg delta
# --------------------------------------------------------------------------
def test_high_leg_b_phasors_and_240_v_line_voltages() -> None:
    # [computed] centre-tapped A-C winding: V_AN = 120∠0°, V_CN = 120∠180°, and the far
    # corner B at √3/2·240 = 207.85 V, ∠−90° (so that V_AB, V_BC, V_CA run A-B-C)
    v = high_leg_phase_voltages(240.0, 1)
    expect = [120.0, cmath.rect(120 * math.sqrt(3), -math.pi / 2), -120.0]
    np.testing.assert_allclose(v, expect, rtol=REL, atol=1e-12)
    lines = line_voltages(v)
    np.testing.assert_allclose(np.abs(lines), [240.0] * 3, rtol=REL)
    # V_AB = 120 + 207.85j = 240∠60°, V_BC = 240∠−60°, V_CA = 240∠180°: 120° apart, A-B-C
    np.testing.assert_allclose(np.degrees(np.angle(lines)), [60.0, -60.0, 180.0], atol=1e-9)


def test_high_leg_c_phasors() -> None:
    # [computed] centre-tapped A-B winding: V_AN = 120∠0°, V_BN = 120∠180°, V_CN = 207.85∠+90°
    v = supply_phase_voltages(DELTA_C)
    np.testing.assert_allclose(v, [120.0, -120.0, 120j * math.sqrt(3)], rtol=REL, atol=1e-12)
    lines = line_voltages(v)
    np.testing.assert_allclose(np.abs(lines), [240.0] * 3, rtol=REL)
    np.testing.assert_allclose(np.degrees(np.angle(lines)), [0.0, -120.0, 120.0], atol=1e-9)


def test_10_a_on_a_and_10_a_on_c_cancel_on_a_high_leg_delta() -> None:
    # [computed] V_A = 120∠0°, V_C = 120∠180°: 10∠0° + 10∠180° = 0 A in the neutral;
    # on 208Y/120 the same loads give 10∠0° + 10∠120° = 10∠60°, 10 A
    c = rows([ln(0, 1200), ln(2, 1200)])
    assert analyse(c, DELTA_B, RATINGS).neutral.rms_a == pytest.approx(0.0, abs=1e-9)
    wye = analyse(c, WYE_208, RATINGS).neutral
    assert (wye.current_a, wye.current_deg) == pytest.approx((10.0, 60.0), rel=REL)


def test_balanced_and_line_to_line_loads_on_a_high_leg_delta() -> None:
    # [computed] a 3-pole load of √3·240·20 = 8313.8 VA sees a 240 V three-phase supply:
    # 20 A on every line, nothing in the neutral; a 2-pole 4800 VA on A-B: 4800/240 = 20 A
    s3 = math.sqrt(3) * 240 * 20
    a = analyse(rows([(THREE_PHASE, 0, 0, complex(s3))]), DELTA_B, RATINGS)
    assert [p.rms_a for p in a.phases] == pytest.approx([20.0] * 3, rel=REL)
    assert a.neutral.rms_a == pytest.approx(0.0, abs=1e-9)
    a = analyse(rows([(LINE_TO_LINE, 0, 1, 4800 + 0j)]), DELTA_B, RATINGS)
    assert [p.rms_a for p in a.phases] == pytest.approx([20.0, 20.0, 0.0], rel=REL, abs=1e-9)
    # unity power factor: the current is in phase with V_AB = 240∠60°
    assert a.phases[0].current_deg == pytest.approx(60.0, abs=1e-9)


def test_high_leg_caution_is_a_finding_and_supply_is_refused() -> None:
    a = analyse(rows([ln(0, 1200)]), DELTA_B, RATINGS)
    caution = [f for f in a.findings if "high leg" in f.message]
    assert len(caution) == 1 and "208 V to neutral" in caution[0].message
    assert "B" in caution[0].message and "NEC 110.15" in caution[0].source
    supply = SupplyImpedance(transformer_kva=75, transformer_z_pct=4, transformer_x_r=2)
    with pytest.raises(ValueError, match="high-leg delta"):
        analyse_batch(rows([ln(0, 1200)]), DELTA_B, RATINGS, supply)


def test_bad_wiring_arrays_are_refused() -> None:
    with pytest.raises(ValueError, match="breaker has shape"):
        analyse(rows([ln(0, 1)], breaker=[0, 0]), WYE_208, RATINGS)
    with pytest.raises(ValueError, match="neutral_group numbers"):
        analyse(rows([ln(0, 1)], group=[-2]), WYE_208, RATINGS)
    with pytest.raises(ValueError, match="high leg"):
        analyse(rows([(LINE_TO_LINE, 0, 1, 1j)]), SystemVoltages(240.0, None, high_leg=1), RATINGS)
