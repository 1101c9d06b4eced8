"""Harmonic currents, RMS, THD and the neutral; built-in and user profiles.

Tags as in shared/spec/check-values.md.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tri.engine import analyse, analyse_batch
from tri.engine.harmonics import thd_pct, three_wire_rotation
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    CircuitArrays,
    Ratings,
    SystemVoltages,
)
from tri.engine.profiles import (
    BUILTIN_PROFILES,
    CLASS_D_ORDERS,
    class_d_ma_per_w,
    profile_matrix,
)

SYS_230 = SystemVoltages(v_ll=400.0, v_ln=230.0, frequency_hz=50.0)
SYS_120 = SystemVoltages(v_ll=208.0, v_ln=120.0)
RATINGS = Ratings(bus_a=100.0)


def panel(s_va, connection, p, q, harmonics, orders) -> CircuitArrays:
    return CircuitArrays(
        s_va=np.asarray(s_va, dtype=complex),
        connection=np.asarray(connection),
        phase_p=np.asarray(p),
        phase_q=np.asarray(q),
        harmonics=np.asarray(harmonics, dtype=complex),
        orders=np.asarray(orders, dtype=int),
    )


def balanced_ln(s_each, harmonics_row, orders):
    """One identical 1-pole load on each of A, B, C."""
    h = np.tile(np.asarray(harmonics_row, dtype=complex), (3, 1))
    return panel([s_each] * 3, [LINE_TO_NEUTRAL] * 3, [0, 1, 2], [0, 1, 2], h, orders)


def test_balanced_linear_gives_zero_neutral():
    """Balanced linear 1-pole loads: I_A + I_B + I_C = 0 (a + a² + 1 = 0) [computed].

    Exactly 0 after the engine's round-off snap (1e-12 of the total current).
    """
    a = analyse(balanced_ln(1500 * complex(0.9, 0.3), [], []), SYS_120, RATINGS)
    assert a.neutral.current_a == 0.0
    assert a.neutral.rms_a == 0.0
    assert a.sequence.i0.magnitude == 0.0
    assert a.sequence.i2.magnitude == 0.0


def test_balanced_third_harmonic_neutral_is_three_times_phase_third():
    """Balanced loads with a 3rd harmonic: I_N = 3·I_3 [computed].

    Triplens are zero sequence: 3·(120°·k) is a multiple of 360°, so they add.
    Fundamental 10 A, m_3 = 0.4 → phase I_3 = 4 A, neutral 12 A. Tolerances:
    1e-12 relative on each phase (one product and one square root); 1e-9 on the
    neutral, a sum of three phasors whose angles pass through cos/sin of 3·θ, so
    its round-off is relative to the phase currents, not to the result.
    """
    i1 = 1200 / 120
    a = analyse(balanced_ln(1200, [0.4], [3]), SYS_120, RATINGS)
    for ph in a.phases:
        assert ph.harmonic_a[1] == pytest.approx(0.4 * i1, rel=1e-12)
        assert ph.thd_pct == pytest.approx(40.0, rel=1e-12)
        assert ph.rms_a == pytest.approx(i1 * math.sqrt(1 + 0.4**2), rel=1e-12)
    assert a.neutral.current_a == 0.0  # the fundamentals cancel
    assert a.neutral.rms_a == pytest.approx(3 * 0.4 * i1, rel=1e-9)
    assert a.neutral.harmonic_a[1] == pytest.approx(3 * 0.4 * i1, rel=1e-9)


def test_non_triplen_orders_cancel_in_neutral():
    """5th and 7th harmonics of balanced loads are negative/positive sequence: no neutral.

    [computed] Σ_k e^{jh·φ_k} = 0 for h = 5, 7 (not multiples of 3). Tolerance
    1e-9 A absolute: the phase harmonics are 6 A and 3 A, so cancellation leaves
    round-off of order 1e-15 A; 1e-9 A is far below anything a meter reads.
    """
    a = analyse(balanced_ln(1200, [0.6, 0.3], [5, 7]), SYS_120, RATINGS)
    assert a.neutral.rms_a == pytest.approx(0.0, abs=1e-9)


def test_sqrt3_ratio_with_third_of_0_7071():
    """Fundamental 1 with a 3rd of 1/√2: I_N / I_phase = √3 exactly [computed].

    I_phase = sqrt(1 + 1/2) = sqrt(3/2); I_N = 3/√2; ratio = 3/√2 / sqrt(3/2) = √3.
    The trade's fact: the neutral of a panel of single-phase electronic loads can
    approach ≈ 1.73 × the phase current [common practice]. Tolerance 1e-12.
    """
    a = analyse(balanced_ln(120.0, [1 / math.sqrt(2)], [3]), SYS_120, RATINGS)
    assert a.neutral.ratio_to_max_phase == pytest.approx(math.sqrt(3), rel=1e-12)
    assert any("exceeds the largest phase" in f.message for f in a.findings)


def test_class_d_limit_device_per_phase():
    """One IEC 61000-3-2 Class D device at its limits per phase, 200 W at 230 V.

    Limits [published]: mA/W h3 3.4, h5 1.9, h7 1.0, h9 0.5, h11 0.35, odd
    h13..39 3.85/h. Check [computed]: I_1 = 200/230 = 0.8696 A → phase RMS
    1.198 A, THD 94.8 %, neutral 2.074 A (ratio 1.7316). Recomputed below from
    the limits (1e-12 relative on single-phase figures, 1e-9 on the neutral, a
    phasor sum); printed figures to half a unit of their last digit.
    """
    harm, orders = profile_matrix(["class-d-limit"] * 3, np.ones(3), np.full(3, 230.0), {})
    c = panel([200.0] * 3, [1, 1, 1], [0, 1, 2], [0, 1, 2], harm, orders)
    a = analyse(c, SYS_230, RATINGS)
    i1 = 200 / 230
    amps = {h: class_d_ma_per_w(h) * 1e-3 * 200 for h in CLASS_D_ORDERS}
    rms = math.sqrt(i1**2 + sum(x**2 for x in amps.values()))
    neutral = 3 * math.sqrt(sum(x**2 for h, x in amps.items() if h % 3 == 0))
    thd = 100 * math.sqrt(sum(x**2 for x in amps.values())) / i1
    for ph in a.phases:
        assert ph.current_a == pytest.approx(i1, rel=1e-12)
        assert ph.current_a == pytest.approx(0.8696, abs=5e-5)
        assert ph.rms_a == pytest.approx(rms, rel=1e-12)
        assert ph.rms_a == pytest.approx(1.198, abs=5e-4)
        assert ph.thd_pct == pytest.approx(thd, rel=1e-12)
        assert ph.thd_pct == pytest.approx(94.8, abs=0.05)
    assert a.neutral.rms_a == pytest.approx(neutral, rel=1e-9)
    assert a.neutral.rms_a == pytest.approx(2.074, abs=5e-4)
    assert a.neutral.ratio_to_max_phase == pytest.approx(neutral / rms, rel=1e-9)
    assert a.neutral.ratio_to_max_phase == pytest.approx(1.7316, abs=5e-5)
    assert a.nonlinear_share_pct == 100.0
    # 230 V, 50 Hz: IEC practice, so the loaded neutral is IEC 60364-5-52 Annex E's
    # (third harmonic 3.4/4.348 = 78 % of the fundamental, over 45 %: sized on the
    # neutral current), not NEC 310.15(E)'s (tri.engine.neutral_rules)
    assert any("Annex E" in f.source and "neutral current" in f.message for f in a.findings)


def test_class_d_per_unit_depends_on_voltage_and_pf():
    """m_h = L_h·V·cos φ (IEC 61000-3-2 limits in A/W; I_1 = P/(V·cos φ)) [computed].

    L_3 = 3.4 mA/W and L_h = 3.85/h mA/W for h ≥ 13, IEC 61000-3-2 Class D
    [published] (check-values.md). Tolerance 1e-12 relative: each value is one
    or two float products.
    """
    harm, orders = profile_matrix(
        ["class-d-limit", "class-d-limit"], np.array([1.0, 0.5]), np.array([230.0, 120.0]), {}
    )
    k3 = list(orders).index(3)
    assert harm[0, k3] == pytest.approx(3.4e-3 * 230, rel=1e-12)
    assert harm[1, k3] == pytest.approx(3.4e-3 * 120 * 0.5, rel=1e-12)
    k15 = list(orders).index(15)
    assert harm[0, k15] == pytest.approx(3.85e-3 / 15 * 230, rel=1e-12)


def test_class_c_limit_third_depends_on_pf():
    """IEC 61000-3-2 Class C [published]: h3 30·λ %, h5 10 %, h2 2 %, h11 3 %.

    Tolerance 1e-12 relative: percent / 100 and one product with λ.
    """
    harm, orders = profile_matrix(["class-c-limit"], np.array([0.9]), np.array([230.0]), {})
    o = list(orders)
    assert harm[0, o.index(3)] == pytest.approx(0.30 * 0.9, rel=1e-12)
    assert harm[0, o.index(5)] == pytest.approx(0.10, rel=1e-12)
    assert harm[0, o.index(2)] == pytest.approx(0.02, rel=1e-12)
    assert harm[0, o.index(11)] == pytest.approx(0.03, rel=1e-12)


def test_builtin_profile_names_and_union_of_orders():
    """All stub names are still there; the matrix covers the union of the orders used."""
    for name in ("linear", "led-driver", "electronics", "ev-charger", "vfd", "class-d-limit"):
        assert name in BUILTIN_PROFILES
    names = list(BUILTIN_PROFILES)
    harm, orders = profile_matrix(names, np.ones(len(names)), np.full(len(names), 230.0), {})
    assert harm.shape == (len(names), len(orders))
    assert list(orders) == sorted(set(orders)) and orders.min() > 1
    assert not np.any(harm[names.index("linear")])
    # electronics: Dugan et al. [from memory] h3 81 % (a stored constant: exact up
    # to round-off, 1e-12)
    assert harm[names.index("electronics"), list(orders).index(3)] == pytest.approx(0.81, rel=1e-12)
    # vfd: six-pulse, no triplens
    vfd = harm[names.index("vfd")]
    assert not np.any(vfd[orders % 3 == 0])


def test_user_profile_and_errors():
    """User profiles: [order, magnitude, angle deg]; bad ones are refused clearly."""
    user = {"office": [(3, 0.8, 0.0), (5, 0.6, 180.0)]}
    harm, orders = profile_matrix(["office", "linear"], np.ones(2), np.full(2, 120.0), user)
    assert list(orders) == [3, 5]
    # the user's own inputs: 0.8∠0° and 0.6∠180° = −0.6 [computed]; round-off only
    assert harm[0] == pytest.approx([0.8, -0.6], rel=1e-12)
    with pytest.raises(ValueError, match="unknown harmonic profile 'nope'"):
        profile_matrix(["nope"], np.ones(1), np.ones(1), {})
    with pytest.raises(ValueError, match="above 1"):
        profile_matrix(["x"], np.ones(1), np.ones(1), {"x": [(1, 0.5, 0.0)]})
    with pytest.raises(ValueError, match="twice"):
        profile_matrix(["x"], np.ones(1), np.ones(1), {"x": [(3, 0.5, 0.0), (3, 0.1, 0.0)]})
    harm, orders = profile_matrix([], np.ones(0), np.ones(0), {})
    assert harm.shape == (0, 0)


def test_harmonic_angle_follows_h_times_fundamental_angle():
    """Harmonic h of a circuit at θ is m_h·|I_1|∠(h·θ + δ_h) (engine.md) [computed].

    1-pole on phase B at unity PF: θ = −120°; h5, δ = 30° → 5·(−120°) + 30° = −570°
    ≡ 150°; |I_1| = 1200 VA / 120 V = 10 A, |I_5| = 0.5·10 A = 5 A. Tolerance
    1e-12 relative / 1e-9° (round-off of 5·θ through cos and sin).
    """
    c = panel([1200], [1], [1], [1], [[0.5 * np.exp(1j * math.radians(30))]], [5])
    a = analyse(c, SYS_120, RATINGS)
    b = analyse_batch(c, SYS_120, RATINGS)
    i5 = b.phase_spectrum[1, 1]
    i1 = 1200 / 120
    assert abs(i5) == pytest.approx(0.5 * i1, rel=1e-12)
    assert math.degrees(np.angle(i5)) == pytest.approx(5 * -120 + 30 + 720, abs=1e-9)
    assert a.phases[1].harmonic_a == pytest.approx((i1, 0.5 * i1), rel=1e-12)


def test_two_pole_harmonic_leaves_by_line_q():
    """2-pole on A-B with a 2nd harmonic: line B carries exactly −(line A) at every order.

    (engine.md: the harmonic current leaves by line q as for the fundamental; for
    even orders this differs from rotating the line-B fundamental.) No neutral.
    """
    c = panel([2000], [LINE_TO_LINE], [0], [1], [[0.3, 0.2]], [2, 3])
    b = analyse_batch(c, SYS_120, RATINGS)
    np.testing.assert_allclose(b.phase_spectrum[1], -b.phase_spectrum[0], atol=1e-12)
    assert np.all(b.phase_spectrum[2] == 0)
    assert np.all(b.neutral_spectrum == 0)


def test_three_pole_triplens_removed_others_kept():
    """3-pole circuits are 3-wire loads: zero sequence (triplens) removed [computed].

    Balanced set rotated by h·φ_k: Σ_k e^{jhφ_k} = 3 for h ≡ 0 mod 3, else 0, so
    triplens vanish and h = 5, 7 keep their magnitude; nothing reaches the neutral.
    Per line |I_1| = (30 kVA / 3) / 120 V. Tolerance 1e-12 relative (round-off);
    the removed triplens to 1e-12 A absolute (pytest's floor for an expected 0:
    what is left of a subtraction of equal phasors of ~40 A).
    """
    c = panel([30e3], [THREE_PHASE], [0], [0], [[0.5, 0.3, 0.2]], [3, 5, 7])
    a = analyse(c, SYS_120, RATINGS)
    i1 = 10e3 / 120
    for ph in a.phases:
        assert ph.harmonic_a == pytest.approx((i1, 0.0, 0.3 * i1, 0.2 * i1), rel=1e-12)
        assert ph.rms_a == pytest.approx(i1 * math.sqrt(1 + 0.3**2 + 0.2**2), rel=1e-12)
    assert a.neutral.rms_a == 0.0
    assert a.circuit_rms_a[0] == pytest.approx(i1 * math.sqrt(1 + 0.3**2 + 0.2**2), rel=1e-12)
    assert any("3-pole" in f.message for f in a.findings)
    rot = three_wire_rotation(np.array([1, 3, 5, 6, 7, 9]))
    assert np.all(rot[:, [1, 3, 5]] == 0)
    np.testing.assert_allclose(np.abs(rot[:, [0, 2, 4]]), 1.0, rtol=1e-15)


def test_thd_zero_fundamental_is_zero_not_nan():
    """THD with no fundamental is undefined; reported as 0 without a warning."""
    with np.errstate(all="raise"):
        assert thd_pct(np.zeros((3, 4), dtype=complex)).tolist() == [0.0, 0.0, 0.0]
