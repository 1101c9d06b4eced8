"""The code's rules (issue 9) on panels as they are wired (issue 12).

Per-leg loads feed the calculated load of their own phase with their own VA;
the NEC 220.61 neutral load counts each leg to neutral (of a shared neutral
or of a 2-/3-pole breaker with a neutral) on its phase; a breaker with
several legs is judged against its rating on its largest pole; a 240/120 V
high-leg delta is 4-wire but not a wye, so the wye rules of NEC 310.15(E)
and IEC 60364-5-52 Annex E are not applied to it, and its 220.61 neutral
load counts only the 120 V loads of the two low legs.

Check values are worked in the comments [computed] from the definitions:
the calculated load per phase is ``Σ w·VA_share / V`` with ``V`` the phase's
voltage to neutral for 1-pole rows and ``V_LL/√3`` for the shares of 2- and
3-pole rows (``V_LN`` on a wye; NEC Article 220 adds VA per phase
[published, secondary]); ``w`` = 1.25 on continuous loads (NEC 210.20(A),
215.2(A)(1) [published, secondary]); the 220.61(A) neutral load is the
largest line-to-neutral load on one phase at 100 % [published, secondary].
Tolerance 1e-9 relative: a few sums and one division, round-off ~1e-15.
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
from tri.engine.neutral_rules import neutral_counts

WYE_208 = SystemVoltages(v_ll=208.0, v_ln=120.0)
DELTA_B = SystemVoltages(v_ll=240.0, v_ln=120.0, high_leg=1)
RATINGS = Ratings(bus_a=400.0)
REL = 1e-9
#: |V_1| of the 240/120 V high-leg delta, the divisor of 2- and 3-pole shares [V]
V_EQ = 240.0 / math.sqrt(3.0)


def panel(
    spec: list[tuple[int, int, int, float]],
    *,
    breaker: list[int] | None = None,
    group: list[int] | None = None,
    continuous: list[bool] | None = None,
    breaker_a: list[float] | None = None,
    third: float = 0.0,
) -> CircuitArrays:
    """Rows from (connection, p, q, VA at unity); ``third``: 3rd harmonic on every row."""
    n = len(spec)
    return CircuitArrays(
        s_va=np.array([complex(s) for *_, s in spec]),
        connection=np.array([c for c, *_ in spec]),
        phase_p=np.array([p for _, p, _, _ in spec]),
        phase_q=np.array([q for _, _, q, _ in spec]),
        harmonics=np.full((n, 1), third, dtype=complex),
        orders=np.array([3]),
        continuous=np.array(continuous or [False] * n),
        breaker_a=np.array(breaker_a if breaker_a is not None else [np.nan] * n, dtype=float),
        breaker=None if breaker is None else np.array(breaker),
        neutral_group=None if group is None else np.array(group),
    )


def ln(p: int, va: float) -> tuple[int, int, int, float]:
    return (LINE_TO_NEUTRAL, p, p, va)


def ll(p: int, q: int, va: float) -> tuple[int, int, int, float]:
    return (LINE_TO_LINE, p, q, va)


def calculated(a) -> list[float]:
    return [p.calculated_a for p in a.phases]


def breaker_limits(a) -> list[str]:
    return [f.message for f in a.findings if "breaker" in f.message and f.level == "limit"]


# ------------------------------------------------------------------ per-leg loads
def test_each_leg_feeds_its_own_phase_with_its_own_va() -> None:
    # a 2-pole breaker with a neutral, continuous, legs 1200 VA on A and 800 VA on B:
    # A 1.25·1200/120 = 12.5 A, B 1.25·800/120 = 8.3333 A, C 0
    a = analyse(
        panel([ln(0, 1200), ln(1, 800)], breaker=[0, 0], group=[0, 0], continuous=[True] * 2),
        WYE_208,
        RATINGS,
    )
    assert calculated(a) == pytest.approx([12.5, 1000 / 120, 0.0], rel=REL, abs=1e-12)
    # the same 2000 VA as one line-to-line load: half on each, 1.25·1000/120 = 10.4167 A
    one = analyse(panel([ll(0, 1, 2000)], continuous=[True]), WYE_208, RATINGS)
    assert calculated(one) == pytest.approx([1250 / 120, 1250 / 120, 0.0], rel=REL, abs=1e-12)


def test_unbalanced_wye_load_on_a_3_pole_breaker_with_a_neutral() -> None:
    # 30/20/10 A at unity on A/B/C (3600, 2400, 1200 VA at 120 V), 25 A breaker:
    # calculated 30, 20, 10 A; 220.61 neutral load = the largest leg, 30 A; the physical
    # neutral |30 + 20∠-120° + 10∠120°| = √(30²+20²+10²-30·20-20·10-10·30) = √300 = 17.32 A;
    # the breaker judged on its largest pole: 30 A over 25 A, one finding
    a = analyse(
        panel(
            [ln(0, 3600), ln(1, 2400), ln(2, 1200)],
            breaker=[0, 0, 0],
            group=[0, 0, 0],
            breaker_a=[25.0] * 3,
        ),
        WYE_208,
        RATINGS,
    )
    assert calculated(a) == pytest.approx([30.0, 20.0, 10.0], rel=REL)
    assert a.neutral.calculated_a == pytest.approx(30.0, rel=REL)
    assert a.neutral.rms_a == pytest.approx(math.sqrt(300.0), rel=REL)
    assert a.circuit_calculated_a == pytest.approx((30.0,) * 3, rel=REL)
    (limit,) = breaker_limits(a)
    assert "circuit 1: 30.0 A on its largest pole over its 25 A breaker" in limit


def test_largest_leg_at_its_rating_passes_and_continuous_does_not() -> None:
    # legs 2400 VA on A and 1200 VA on B, 20 A breaker: largest leg 2400/120 = 20 A,
    # equal to the rating: passes (NEC 210.20(A): not less than the load)
    rows = [ln(0, 2400), ln(1, 1200)]
    a = analyse(panel(rows, breaker=[0, 0], breaker_a=[20.0] * 2), WYE_208, RATINGS)
    assert a.circuit_calculated_a == pytest.approx((20.0, 20.0), rel=REL)
    assert breaker_limits(a) == []
    # continuous: 1.25·20 = 25 A over 20 A, one finding for the breaker (not one per leg)
    a = analyse(
        panel(rows, breaker=[0, 0], breaker_a=[20.0] * 2, continuous=[True] * 2),
        WYE_208,
        RATINGS,
    )
    (limit,) = breaker_limits(a)
    assert "25.0 A on its largest pole over its 20 A breaker (continuous 20.0 A at 125 %)" in limit


def test_delta_load_is_judged_on_its_largest_line_current() -> None:
    # 240 V delta elements AB 3000, BC 3000, CA 1500 VA at unity: I_AB = I_BC = 12.5 A,
    # I_CA = 6.25 A, each in phase with its line voltage, 120° apart. Line B:
    # |I_BC - I_AB| = √3·12.5 = 21.65 A; line A: |I_AB - I_CA| = √(a² + b² + a·b) with
    # a = 12.5, b = 6.25 (|a - b|² = a² + b² - 2ab·cos 120°) = 16.54 A, line C the same.
    # Against a 20 A breaker the largest pole, 21.65 A, is over (the largest element,
    # 12.5 A, would hide it)
    rows = [ll(0, 1, 3000), ll(1, 2, 3000), ll(2, 0, 1500)]
    a = analyse(panel(rows, breaker=[0, 0, 0], breaker_a=[20.0] * 3), DELTA_B, RATINGS)
    assert a.circuit_calculated_a[0] == pytest.approx(12.5 * math.sqrt(3), rel=REL)
    (limit,) = breaker_limits(a)
    assert "21.7 A on its largest pole over its 20 A breaker" in limit
    # per phase, half of each element over |V_1| = 240/√3: A (3000+1500)/2/138.56 = 16.24 A,
    # B 3000/138.56 = 21.65 A, C 16.24 A
    assert calculated(a) == pytest.approx([2250 / V_EQ, 3000 / V_EQ, 2250 / V_EQ], rel=REL)
    # the breaker's physical pole currents agree at unity (no harmonics): 16.54, 21.65, 16.54
    (brk,) = a.breakers
    side = math.sqrt(12.5**2 + 6.25**2 + 12.5 * 6.25)
    assert brk.rms_a == pytest.approx((side, 12.5 * math.sqrt(3), side), rel=REL)


# ------------------------------------------------------------------ NEC 220.61 neutral load
def test_neutral_load_counts_every_leg_to_neutral_on_its_phase() -> None:
    # rows: shared neutral 'g0' legs A 1500 and B 900 (two 1-pole breakers); a 1-pole A 600;
    # a 2-pole breaker with a neutral, continuous, legs B 1500 and C 300; a 3-pole 9000 VA
    # and a 2-pole A-C 4800 VA (no neutral load). Per phase, at 100 % (220.61 takes no
    # 125 %): A 1500 + 600 = 2100, B 900 + 1500 = 2400, C 300 VA → 2400/120 = 20.0 A
    rows = [
        ln(0, 1500),
        ln(1, 900),
        ln(0, 600),
        ln(1, 1500),
        ln(2, 300),
        (THREE_PHASE, 0, 0, 9000),
        ll(0, 2, 4800),
    ]
    a = analyse(
        panel(
            rows,
            breaker=[0, 1, 2, 3, 3, 4, 5],
            group=[0, 0, -1, 1, 1, -1, -1],
            continuous=[False, False, False, True, True, False, False],
        ),
        WYE_208,
        RATINGS,
    )
    assert a.neutral.calculated_a == pytest.approx(20.0, rel=REL)


def test_high_leg_delta_neutral_load_counts_the_two_low_legs_only() -> None:
    # 240/120D, B high: 1-pole 1200 and 600 VA on A, 1500 VA on C; a 2-pole A-B 4800 VA and
    # a balanced 3-pole √3·240·20 = 8313.8 VA touch the high leg but not the neutral.
    # Neutral load: max(1800, 1500)/120 = 15.0 A
    s3 = math.sqrt(3) * 240 * 20
    rows = [ln(0, 1200), ln(0, 600), ln(2, 1500), ll(0, 1, 4800), (THREE_PHASE, 0, 0, s3)]
    a = analyse(panel(rows), DELTA_B, RATINGS)
    assert a.neutral.calculated_a == pytest.approx(15.0, rel=REL)
    # calculated per phase: the 3-pole load's third S/3/(240/√3) = 20 A on each phase (its
    # line current; not S/3/120 = 23.09 A); the 2-pole's half 2400/138.56 = 17.32 A on A
    # and B; the 1-pole rows over 120 V: A 1800/120 = 15, C 1500/120 = 12.5
    half = 2400 / V_EQ
    assert calculated(a) == pytest.approx([15 + half + 20, half + 20, 12.5 + 20], rel=REL)
    # each circuit's own calculated load: 10, 5, 12.5 A; 4800/240 = 20 A; 20 A
    assert a.circuit_calculated_a == pytest.approx((10.0, 5.0, 12.5, 20.0, 20.0), rel=REL)


# ------------------------------------------------------------------ a high-leg delta is not a wye
def _count_warnings(a) -> list[str]:
    return [
        f.message for f in a.findings if "current-carrying conductor when adjusting" in f.message
    ]


def _iec(a) -> list[str]:
    return [f.message for f in a.findings if "IEC practice sizes" in f.message]


def test_310_15_e_and_iec_annex_e_are_wye_rules() -> None:
    # 208Y/120: three 16 A (1920 VA) electronic legs on A, B, C with 80 % third harmonic.
    # The fundamentals cancel, the thirds add: neutral 3·0.8·16 = 38.4 A; all the load is
    # non-linear line-to-neutral, over the 50 % major portion: NEC 310.15(E)(3) counts the
    # neutral, and IEC Annex E (third over 33 %) sizes on the neutral current
    wye = analyse(panel([ln(0, 1920), ln(1, 1920), ln(2, 1920)], third=0.8), WYE_208, RATINGS)
    assert wye.neutral.rms_a == pytest.approx(38.4, rel=REL)
    assert len(_count_warnings(wye)) == 1 and len(_iec(wye)) == 1
    # 240/120D: the same legs on the low legs A and C (120∠0°, 120∠180°): the fundamentals
    # are in opposition and so are the thirds (3·180° = 540° ≡ 180°): neutral 0 A. The wye
    # rules would call for a counted, up-sized neutral that carries nothing: not applied;
    # an info finding says why
    delta = analyse(panel([ln(0, 1920), ln(2, 1920)], third=0.8), DELTA_B, RATINGS)
    assert delta.neutral.rms_a == pytest.approx(0.0, abs=1e-9)
    assert delta.nonlinear_ln_share_pct == pytest.approx(100.0, rel=REL)
    assert _count_warnings(delta) == [] and _iec(delta) == []
    (info,) = [f for f in delta.findings if "4-wire wye" in f.message]
    assert info.level == "info" and "centre tap" in info.message
    assert "310.15(E)" in info.source


def test_neutral_counting_rule_is_for_a_wye_only() -> None:
    # NEC 310.15(E)(2): two phases and the neutral of a 4-wire wye: counted; the same
    # three wires of a high-leg delta (A, C and the centre tap) carry the difference of
    # the two legs, like a 120/240 V single-phase circuit: not counted
    assert neutral_counts(2, True, 0.0, 50.0).counts
    assert not neutral_counts(2, False, 0.0, 50.0).counts
    assert not neutral_counts(3, False, 100.0, 50.0).counts
