"""End-to-end checks of ``tri.engine.analyse`` on worked panels.

Sources are named beside each value (tags as in shared/spec/check-values.md).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tri.engine import analyse
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    CircuitArrays,
    Ratings,
    SystemVoltages,
)

SYS_208 = SystemVoltages(v_ll=208.0, v_ln=120.0, frequency_hz=60.0)
SYS_415 = SystemVoltages(v_ll=415.0, v_ln=415.0 / math.sqrt(3.0), frequency_hz=50.0)


def linear(s_va, connection, p, q=None) -> CircuitArrays:
    """Linear circuits from plain lists."""
    n = len(s_va)
    return CircuitArrays(
        s_va=np.asarray(s_va, dtype=complex),
        connection=np.asarray(connection),
        phase_p=np.asarray(p),
        phase_q=np.asarray(p if q is None else q),
        harmonics=np.zeros((n, 0), dtype=complex),
        orders=np.zeros(0, dtype=int),
    )


def test_208y120_mixed_example():
    """208Y/120: three 1-pole 1200 W (A, B, C) + one 2-pole 2000 W on A-B, unity PF.

    [computed] check-values.md "Neutral current": I_A = 18.954∠14.71°,
    I_B = 18.954∠−134.71°, I_C = 10∠120°, neutral 0, I_1 = 15.556∠0°,
    I_2 = 5.556∠60°. Recomputed here from the definitions, with the engine's
    |V_AB| = |V_A − V_B| = 120·√3 = 207.85 V (engine.md; the nameplate 208 is
    rounded): I_AB = conj(2000 / (207.85∠30°)) = 9.623∠30°;
    I_A = 10∠0° + 9.623∠30°. (With a rounded 208 V it would be 9.615 A and
    |I_A| = 18.947 A, outside the printed figure.) The 2-pole load alone gives
    I_1 = I_AB·(1 − a)/3 and I_2 = I_AB·(1 − a²)/3, with |1 − a| = |1 − a²| = √3,
    i.e. 2000/360 A at 0° and 60°; the 1-pole set adds 10 A to I_1 only.
    Tolerances: 1e-9 relative on the recomputed phasors (round-off only), 1e-12
    on the closed forms; printed magnitudes (3 decimals) to 1e-3 and angles
    (2 decimals) to 0.01, one unit of the last digit: the definition gives
    14.7047°, which rounds to 14.70°, so check-values.md's 14.71° is one unit
    off and half a unit would reject it.
    """
    c = linear([1200, 1200, 1200, 2000], [1, 1, 1, 2], [0, 1, 2, 0], [0, 1, 2, 1])
    a = analyse(c, SYS_208, Ratings(bus_a=225.0, main_a=200.0))
    a_op = np.exp(2j * np.pi / 3)
    v = 120.0 * np.array([1, a_op**2, a_op])
    i_ab = np.conj(2000 / (v[0] - v[1]))
    expect = np.conj(1200 / v) + np.array([i_ab, -i_ab, 0])
    for k in range(3):
        assert a.phases[k].current.complex == pytest.approx(expect[k], rel=1e-9)
    # printed check values (4-5 significant digits)
    assert a.phases[0].current_a == pytest.approx(18.954, abs=1e-3)
    assert a.phases[0].current_deg == pytest.approx(14.71, abs=0.01)
    assert a.phases[1].current_deg == pytest.approx(-134.71, abs=0.01)
    assert a.phases[2].current_a == pytest.approx(10.0, abs=1e-9)
    assert a.neutral.current_a == pytest.approx(0.0, abs=1e-9)
    assert a.sequence.i1.magnitude == pytest.approx(15.556, abs=1e-3)
    assert a.sequence.i1.deg == pytest.approx(0.0, abs=1e-9)
    assert a.sequence.i2.magnitude == pytest.approx(5.556, abs=1e-3)
    assert a.sequence.i2.deg == pytest.approx(60.0, abs=1e-9)
    i2_closed = 2000 / 360  # |I_AB| / √3 = 2000 / (120·√3·√3)
    assert a.sequence.i1.magnitude == pytest.approx(1200 / 120 + i2_closed, rel=1e-12)
    assert a.sequence.i2.magnitude == pytest.approx(i2_closed, rel=1e-12)
    # 35.7 % printed to 1 decimal (half a unit, 0.05); exactly 100·(50/9)/(140/9) = 500/14
    assert a.current_unbalance.negative_sequence_pct == pytest.approx(35.7, abs=0.05)
    assert a.current_unbalance.negative_sequence_pct == pytest.approx(500 / 14, rel=1e-12)
    # schedule VA bookkeeping: A = 1200 + 2000/2 = 2200 VA, not |I_A|·120 = 2274.5 VA
    # (sums of the inputs: exact up to round-off, pytest's default 1e-6 is ample)
    assert a.phases[0].va == pytest.approx(2200.0)
    assert a.phases[0].current_a * 120 == pytest.approx(2274.5, abs=0.05)  # half a unit
    assert a.phases[2].va == pytest.approx(1200.0)


def test_bird_415v_resistive_neutral():
    """415 V 4-wire, 24 / 18 / 12 kW resistive on A, B, C.

    Bird, Electrical Circuit Theory and Technology [from memory for the book];
    100.17 / 75.13 / 50.08 A, neutral 43.37 A [computed]. Recomputed: I = P / V_LN,
    and the closed form I_N = sqrt(Ia² + Ib² + Ic² − IaIb − IbIc − IcIa) for equal
    power factors. Tolerance 0.005 A: the listed figures (check-values.md,
    [computed]; the book is named from memory) have 2 decimals, half a unit.
    1e-12 relative against the recomputed values: round-off only.
    """
    c = linear([24e3, 18e3, 12e3], [1, 1, 1], [0, 1, 2])
    a = analyse(c, SYS_415, Ratings(bus_a=200.0))
    v_ln = 415 / math.sqrt(3)
    ia, ib, ic = 24e3 / v_ln, 18e3 / v_ln, 12e3 / v_ln
    closed = math.sqrt(ia**2 + ib**2 + ic**2 - ia * ib - ib * ic - ic * ia)
    assert [p.current_a for p in a.phases] == pytest.approx([ia, ib, ic], rel=1e-12)
    assert [p.current_a for p in a.phases] == pytest.approx([100.17, 75.13, 50.08], abs=0.005)
    assert a.neutral.current_a == pytest.approx(closed, rel=1e-12)
    assert a.neutral.current_a == pytest.approx(43.37, abs=0.005)
    assert a.neutral.rms_a == pytest.approx(closed, rel=1e-12)  # linear: RMS = fundamental


def test_three_pole_balanced_is_positive_sequence_only():
    """A 3-pole load: each line carries conj((S/3)/V_p), no neutral (engine.md) [computed].

    The engine works from the phase voltages: 208Y/120 means V_LN = 120 V and
    V_AB = |V_A − V_B| = 120·√3 = 207.85 V (the nameplate 208 is rounded).
    Per line |I| = 10 kVA / (3·120 V) [computed]; 1e-12 relative (round-off);
    angles to pytest's default 1e-6 relative.
    """
    s = 10e3 * complex(0.8, 0.6)  # 10 kVA at 0.8 lagging
    c = linear([s], [THREE_PHASE], [0])
    a = analyse(c, SYS_208, Ratings(bus_a=100.0))
    i = 10e3 / (3 * 120)
    for k, ang in enumerate((0.0, -120.0, 120.0)):
        assert a.phases[k].current_a == pytest.approx(i, rel=1e-12)
        # lagging 0.8: current lags its phase voltage by acos(0.8) = 36.87°
        assert a.phases[k].current_deg == pytest.approx(ang - math.degrees(math.acos(0.8)))
    assert a.neutral.current_a == 0.0
    assert a.sequence.i2.magnitude == 0.0
    assert a.circuit_current_a[0] == pytest.approx(i, rel=1e-12)


def test_line_to_line_has_no_neutral_and_splits_va():
    """A 2-pole load: +I_pq on p, −I_pq on q, nothing in the neutral (engine.md).

    [computed] |I_BC| = 3000 VA / (120·√3 V); VA split in half per line (the
    schedule convention, schedule-format.md). Exact up to round-off.
    """
    c = linear([3000 * complex(0.85, math.sin(math.acos(0.85)))], [LINE_TO_LINE], [1], [2])
    a = analyse(c, SYS_208, Ratings(bus_a=100.0))
    assert a.phases[0].current_a == 0.0
    assert a.phases[1].current.complex == pytest.approx(-a.phases[2].current.complex)
    # |V_BC| = |V_B − V_C| = 120·√3 (see the 3-pole test)
    assert a.phases[1].current_a == pytest.approx(3000 / (120 * math.sqrt(3)), rel=1e-12)
    assert a.neutral.current_a == 0.0
    assert [p.va for p in a.phases] == pytest.approx([0.0, 1500.0, 1500.0])


def test_leading_power_factor_current_leads():
    """Q < 0 (leading): the current leads the voltage by acos(PF) [computed]."""
    c = linear([1000 * complex(0.9, -math.sin(math.acos(0.9)))], [LINE_TO_NEUTRAL], [0])
    a = analyse(c, SYS_208, Ratings(bus_a=100.0))
    assert a.phases[0].current_deg == pytest.approx(math.degrees(math.acos(0.9)))
