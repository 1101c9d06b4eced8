"""Each demo panel's report checked against figures worked by hand for one phase.

The arithmetic is written out in the comments, circuit by circuit, and
repeated in the code with plain ``cmath`` (no engine function is used), then
compared with the JSON report of the demo. Conventions are engine.md's
[computed]: A-B-C sequence, ``V_A = V_LN∠0°``, ``V_B = V_LN∠-120°``,
``V_C = V_LN∠+120°``; ``I = conj(S / V)``; a 2-pole circuit on p,q carries
``I_pq = conj(S / V_pq)`` out on p and back on q; a 3-pole circuit carries
``(S/3) / V_LN`` on each line, lagging its phase voltage by φ; a circuit's
h-th harmonic is ``m_h·|I_1|∠(h·θ + δ_h)`` with θ the angle of its line
current. The engine takes line voltages as phasor differences, so
``|V_LL| = √3·V_LN`` (207.85 V on a "208Y/120" system, 479.78 V on
"480Y/277"), and a load given in amperes is converted to VA with that same
|V_LL|, so that the amperes written in the schedule come back unchanged.

Slots (two-column panels, common practice): slot n is in row (n+1)//2 and the
rows cycle A, B, C, so slots 1-2 A, 3-4 B, 5-6 C, 7-8 A, …; a 2-pole breaker
in slot n also takes n+2, a 3-pole also n+4.

Harmonic profiles used (tri/engine/profiles.py; their magnitudes are tagged
"typical, from memory" or "Dugan et al., from memory" there; here they are
inputs, not check values):

- electronics: h3 .81, h5 .606, h7 .37, h9 .157, h11 .024 (δ 0°), h13 .063, h15 .079 (δ 180°)
- led-driver: h3 .70, h5 .40, h7 .20, h9 .15, h11 .10, h13 .07, h15 .05 (δ 0°)
- vfd: h5 .35 (180°), h7 .12 (0°), h11 .07 (180°), h13 .05 (0°), h17 .03 (180°),
  h19 .025 (0°), h23 .02 (180°), h25 .015 (0°); no triplens

Tolerances: the report rounds to 9 significant digits and the hand figures
carry full float precision, so 1e-6 relative is ample; anything a person
would read (0.1 A, 0.1 %) is 1000 times coarser. Angles to 1e-6°: 9
significant digits of an angle up to 180° is ~1e-6° or finer. The figures
written out in the comments are rounded results, not inputs: each is checked
against its recomputed value to half a unit of its last written digit, so a
comment that drifts from the code fails.
"""

from __future__ import annotations

import cmath
import math
from pathlib import Path
from typing import Any

import pytest

from tri.cli.report import build_data

ROOT = Path(__file__).parents[1]
REL = 1e-6
SQRT3 = math.sqrt(3.0)

ELECTRONICS = {3: (0.81, 0), 5: (0.606, 0), 7: (0.37, 0), 9: (0.157, 0), 11: (0.024, 0)}
ELECTRONICS |= {13: (0.063, 180), 15: (0.079, 180)}
LED = {3: (0.70, 0), 5: (0.40, 0), 7: (0.20, 0), 9: (0.15, 0), 11: (0.10, 0)}
LED |= {13: (0.07, 0), 15: (0.05, 0)}
VFD = {5: (0.35, 180), 7: (0.12, 0), 11: (0.07, 180), 13: (0.05, 0)}
VFD |= {17: (0.03, 180), 19: (0.025, 0), 23: (0.02, 180), 25: (0.015, 0)}


def polar(mag: float, deg: float) -> complex:
    return cmath.rect(mag, math.radians(deg))


def phi(pf: float) -> float:
    """Power-factor angle [deg] (lagging)."""
    return math.degrees(math.acos(pf))


def report(name: str) -> dict[str, Any]:
    return build_data(
        str(ROOT / "tri" / "panels_demo" / name), iterate=False, continuous_factor=1.25
    )


def harmonic_rms(fund: complex, parts: list[tuple[float, float, dict[int, tuple[float, float]]]]):
    """RMS and THD of a line from its fundamental and (|I1|, θ°, profile) contributions.

    Each order's phasor is the sum of ``m_h·|I1|∠(h·θ + δ_h)`` over the parts.
    """
    orders = sorted({h for _, _, prof in parts for h in prof})
    harm2 = 0.0
    for h in orders:
        total = sum(
            polar(prof[h][0] * mag, h * theta + prof[h][1])
            for mag, theta, prof in parts
            if h in prof
        )
        harm2 += abs(total) ** 2
    return math.sqrt(abs(fund) ** 2 + harm2), 100 * math.sqrt(harm2) / abs(fund)


def test_bakery_phase_a() -> None:
    """Crumb & Kettle Bakery, 208Y/120, phase A (rows 1, 4, 7, … = slots 1-2, 7-8, 13-14, …)."""
    d = report("bakery_208.toml")
    a = d["phases"]["A"]
    vll = 120 * SQRT3  # 207.846 V, the engine's |V_AB|
    # Scheduled VA on A (all of a 1-pole, half a 2-pole, a third of a 3-pole):
    #   deck oven     slot 1 3P  14000 W pf 1           14000/3        = 4666.67
    #   proofer       slot 7 2P A-B 2800 W              2800/2         = 1400
    #   spiral mixer  slot 11 3P 18 A: 18·207.85·√3=6480.0  6480.00/3  = 2160.00
    #   walk-in       slot 17 2P C-A 16 A·207.85 = 3325.5  3325.5/2    = 1662.77
    #   reach-in 1    slot 25 1P 7.5 A·120               = 900
    #   dishwasher    slot 29 2P C-A 5500 W              5500/2        = 2750
    #   espresso      slot 2 2P A-B 5200 W               5200/2        = 2600
    #   office PCs    slot 8 1P 900 VA                   = 900
    #   water heater  slot 12 2P C-A 4500 W              4500/2        = 2250
    #   dough divider slot 20 1P 8 A·120                 = 960
    #   ice machine   slot 26 1P 9 A·120                 = 1080
    #   total                                             = 21329.44 VA
    va = (
        14000 / 3 + 2800 / 2 + 18 * vll * SQRT3 / 3 + 16 * vll / 2 + 900
        + 5500 / 2 + 5200 / 2 + 900 + 4500 / 2 + 960 + 1080
    )  # fmt: skip
    assert va == pytest.approx(21329.44, abs=0.005)
    assert a["va"] == pytest.approx(va, rel=REL)
    # Fundamental line current of A, one phasor per circuit:
    #   deck oven     14000/3/120 = 38.889 ∠0°
    #   proofer       +I_AB = 2800/207.85 = 13.472 ∠30°
    #   spiral mixer  6480.00/3/120 = 18.000 ∠-34.92° (pf 0.82)
    #   walk-in       -I_CA, I_CA = 16 A ∠(150-31.79)° → 16.000 ∠-61.79°
    #   reach-in 1    7.5 ∠-36.87° (pf 0.8)
    #   dishwasher    -I_CA = 5500/207.85 = 26.462 ∠(150-180)° = ∠-30°
    #   espresso      +I_AB = 5200/207.85 = 25.019 ∠30°
    #   office PCs    900/120 = 7.5 ∠-18.19° (pf 0.95)
    #   water heater  -I_CA = 4500/207.85 = 21.651 ∠-30°
    #   dough divider 8 ∠-36.87°;  ice machine 9 ∠-31.79° (pf 0.85)
    #   sum ≈ 169.63 A ∠-15.59°
    i_a = (
        polar(14000 / 3 / 120, 0)
        + polar(2800 / vll, 30)
        + polar(18, -phi(0.82))
        - polar(16, 150 - phi(0.85))
        + polar(7.5, -phi(0.8))
        - polar(5500 / vll, 150)
        + polar(5200 / vll, 30)
        + polar(7.5, -phi(0.95))
        - polar(4500 / vll, 150)
        + polar(8, -phi(0.8))
        + polar(9, -phi(0.85))
    )
    assert abs(i_a) == pytest.approx(169.63, abs=0.005)
    assert a["current_a"] == pytest.approx(abs(i_a), rel=REL)
    assert a["current_deg"] == pytest.approx(math.degrees(cmath.phase(i_a)), abs=1e-6)
    # Harmonics on A: the office PCs (electronics, 7.5 A) are the only non-linear circuit
    # touching A (the LED, POS, rack and sign circuits sit on B or C; the mini-split is B-C),
    # so every order is that one circuit's m_h·7.5 A:
    #   Σm² = .81² + .606² + .37² + .157² + .024² + .063² + .079² = 1.195671
    #   harmonic RMS = 7.5·√1.195671 = 8.2010 A
    #   RMS = √(169.63² + 8.2010²) = 169.83 A;  THD = 8.2010/169.63 = 4.83 %
    #   loading = 169.83 / 200 A main = 84.91 %
    sum_m2 = sum(m * m for m, _ in ELECTRONICS.values())
    assert sum_m2 == pytest.approx(1.195671, abs=1e-9)  # exact to 6 decimals; 1e-9: round-off
    harm = 7.5 * math.sqrt(sum_m2)
    rms = math.sqrt(abs(i_a) ** 2 + harm**2)
    assert a["rms_a"] == pytest.approx(rms, rel=REL)
    assert a["thd_pct"] == pytest.approx(100 * harm / abs(i_a), rel=REL)
    assert a["loading_pct"] == pytest.approx(100 * rms / 200, rel=REL)
    assert rms == pytest.approx(169.83, abs=0.005)


def test_garage_phase_c() -> None:
    """Northgate Auto Care, 208Y/120, phase C (rows 3, 6, 9, 12: slots 5-6, 11-12, 17-18, 23-24)."""
    d = report("garage_ev_208.toml")
    c = d["phases"]["C"]
    vll = 120 * SQRT3
    # Scheduled VA on C:
    #   office receptacles slot 5 1P 1200 VA                     = 1200
    #   air compressor slot 11 3P 15.2 A·207.85·√3 = 5472.0 VA / 3 = 1824.00
    #   tire changer slot 17 1P 8 A·120                          = 960
    #   water heater slot 6 2P C-A (6 → C, 8 → A) 4500 W / 2      = 2250
    #   vehicle lift 2 slot 10 2P B-C (10 → B, 12 → C) 16·207.85/2 = 1662.77
    #   door operators slot 24 1P 6 A·120                        = 720
    #   total                                                     = 8616.77 VA
    # The planned EV charger has no slot: it is unplaced and counts nowhere.
    va = 1200 + 15.2 * vll * SQRT3 / 3 + 960 + 4500 / 2 + 16 * vll / 2 + 720
    assert va == pytest.approx(8616.77, abs=0.005)
    assert c["va"] == pytest.approx(va, rel=REL)
    # Fundamental of C (V_C at +120°):
    #   office receptacles  1200/120 = 10 ∠(120-18.19)° = ∠101.81°
    #   air compressor      5472.0/3/120 = 15.200 ∠(120-31.79)° = ∠88.21°
    #   tire changer        8 ∠(120-36.87)° = ∠83.13°
    #   water heater        +I_CA = 4500/207.85 = 21.651 ∠150°
    #   vehicle lift 2      -I_BC, I_BC = 16 A ∠(-90-36.87)° → 16.000 ∠53.13°
    #   door operators      6 ∠(120-41.41)° = ∠78.59°
    #   sum ≈ 63.02 A ∠97.82°
    i_c = (
        polar(10, 120 - phi(0.95))
        + polar(15.2, 120 - phi(0.85))
        + polar(8, 120 - phi(0.8))
        + polar(4500 / vll, 150)
        - polar(16, -90 - phi(0.8))
        + polar(6, 120 - phi(0.75))
    )
    assert abs(i_c) == pytest.approx(63.02, abs=0.005)
    assert c["current_a"] == pytest.approx(abs(i_c), rel=REL)
    assert c["current_deg"] == pytest.approx(math.degrees(cmath.phase(i_c)), abs=1e-6)
    # Harmonics on C: only the office receptacles (electronics, 10 A) are non-linear here
    # (the compressor is scheduled linear), so harmonic RMS = 10·√1.195671 = 10.935 A,
    # RMS = √(63.02² + 10.935²) = 63.96 A, THD = 17.35 %, loading 63.96/150 = 42.64 %.
    harm = 10 * math.sqrt(sum(m * m for m, _ in ELECTRONICS.values()))
    rms = math.sqrt(abs(i_c) ** 2 + harm**2)
    assert rms == pytest.approx(63.96, abs=0.005)
    assert c["rms_a"] == pytest.approx(rms, rel=REL)
    assert c["thd_pct"] == pytest.approx(100 * harm / abs(i_c), rel=REL)
    assert c["loading_pct"] == pytest.approx(100 * rms / 150, rel=REL)


def test_machine_shop_phase_a_and_neutral() -> None:
    """Harlow Precision Machining, 480Y/277, phase A, and the neutral's 3rd harmonic."""
    d = report("machine_shop_480.toml")
    a = d["phases"]["A"]
    vll = 277 * SQRT3  # 479.78 V
    k = vll * SQRT3  # VA per ampere of a 3-pole load: √3·479.78 = 831.00
    # Scheduled VA on A:
    #   1-pole LED on A: slot 1 3600 + slot 14 1200 + slot 32 2000       = 6800
    #   welder 1 slot 31 2P A-B (31 → A, 33 → B) 28·479.78/2             = 6716.90
    #   welder 2 slot 35 2P C-A (35 → C, 37 → A) 28·479.78/2             = 6716.90
    #   3-pole: (28+28+35+31+14+12+22) A·831.00 + 28000 + 18000 = 187000.0, /3 = 62333.3
    #   total                                                            = 82657.1 VA
    three_pole_va = (28 + 28 + 35 + 31 + 14 + 12 + 22) * k + 28000 + 18000
    va = 6800 + 28 * vll / 2 + 28 * vll / 2 + three_pole_va / 3
    assert va == pytest.approx(82657.1, abs=0.05)
    assert a["va"] == pytest.approx(va, rel=REL)
    # Fundamental of A (3-pole: S/3/277 ∠-φ, i.e. the scheduled amperes):
    #   LED 6800/277 = 24.549 ∠-18.19°
    #   welder 1 +I_AB = 28 A ∠(30-45.57)°
    #   welder 2 -I_CA = 28 A ∠(150-45.57-180)° = ∠-75.57°
    #   mills 2×28, lathe 35, compressor 31 A (pf .95): 122 A ∠-18.19°  (vfd)
    #   T-1 28000/3/277 = 33.694 ∠-25.84° (pf .9, electronics)
    #   dust collector 14 ∠-31.79°;  oven 18000/3/277 = 21.661 ∠0°
    #   crane 12 ∠-36.87° (vfd);  make-up air 22 ∠-31.79° (vfd)
    #   sum ≈ 291.74 A ∠-24.56°
    s = 1.0  # scheduled amperes come back unchanged
    mills_etc = (28 + 28 + 35 + 31) * s
    t1 = 28000 / 3 / 277
    i_a = (
        polar(6800 / 277, -phi(0.95))
        + polar(28, 30 - phi(0.7))
        - polar(28, 150 - phi(0.7))
        + polar(mills_etc, -phi(0.95))
        + polar(t1, -phi(0.9))
        + polar(14 * s, -phi(0.85))
        + polar(18000 / 3 / 277, 0)
        + polar(12 * s, -phi(0.8))
        + polar(22 * s, -phi(0.85))
    )
    assert abs(i_a) == pytest.approx(291.74, abs=0.005)
    assert math.degrees(cmath.phase(i_a)) == pytest.approx(-24.56, abs=0.005)
    assert a["current_a"] == pytest.approx(abs(i_a), rel=REL)
    assert a["current_deg"] == pytest.approx(math.degrees(cmath.phase(i_a)), abs=1e-6)
    # Harmonics on A, order by order (θ = line-A angle of each circuit):
    #   LED 24.549 A at θ -18.19° (led-driver, all orders 3-15)
    #   vfd: 122 A at -18.19°, crane 12 A at -36.87°, make-up air 22 A at -31.79°
    #   T-1 33.694 A at -25.84°, electronics WITHOUT h3, h9, h15: a 3-pole load has no
    #   neutral, so its zero-sequence (triplen) currents cannot flow [computed].
    t1_profile = {h: v for h, v in ELECTRONICS.items() if h % 3}
    rms, thd = harmonic_rms(
        i_a,
        [
            (6800 / 277, -phi(0.95), LED),
            (mills_etc, -phi(0.95), VFD),
            (12 * s, -phi(0.8), VFD),
            (22 * s, -phi(0.85), VFD),
            (t1, -phi(0.9), t1_profile),
        ],
    )
    assert rms == pytest.approx(294.56, abs=0.005)
    assert a["rms_a"] == pytest.approx(rms, rel=REL)
    assert a["thd_pct"] == pytest.approx(thd, rel=REL)
    assert a["loading_pct"] == pytest.approx(100 * rms / 400, rel=REL)
    # Neutral, 3rd harmonic: only the 1-pole LED circuits return in the neutral, all at
    # pf 0.95: A 6800/277 = 24.549 A, B 3600/277 = 12.996 A, C 2400/277 = 8.664 A.
    # At h = 3 their angles are 3·(θ_p) = 3·(-18.19°) + 3·(0, -120, +120)° — the same for
    # all three, so the 3rd harmonics add arithmetically:
    #   I_N,3 = 0.70·(24.549 + 12.996 + 8.664) = 0.70·46.209 = 32.347 A
    orders = d["harmonics"]["orders"]
    n3 = d["harmonics"]["neutral"][orders.index(3)]
    assert n3 == pytest.approx(0.70 * (6800 + 3600 + 2400) / 277, rel=REL)
    assert n3 == pytest.approx(32.347, abs=5e-4)


def test_studio_phase_l3() -> None:
    """Lindqvist Design Studio, 400Y/230 rail board, phase L3."""
    d = report("studio_400_rail.toml")
    p = d["phases"]["L3"]
    # Scheduled VA on L3:
    #   socket ring 3 1800 VA + plotter 1200 VA (electronics)      = 3000
    #   LED zone 3 700 W / 0.95                                    = 736.84
    #   kettle and microwave 3000 W                                = 3000
    #   heat pump 3P 7500 W / 0.95 = 7894.74 VA, /3                = 2631.58
    #   total                                                      = 9368.42 VA
    va = 1800 + 1200 + 700 / 0.95 + 3000 + 7500 / 0.95 / 3
    assert va == pytest.approx(9368.42, abs=0.005)
    assert p["va"] == pytest.approx(va, rel=REL)
    # Fundamental of L3 (V_L3 = 230∠120°). Every non-linear circuit on L3 has pf 0.95, so
    # they share θ = 120 - 18.19 = 101.81°:
    #   electronics 3000/230 = 13.043 A;  LED 736.84/230 = 3.204 A;
    #   heat pump 7894.74/3/230 = 11.442 A (vfd);  kettle 3000/230 = 13.043 A ∠120°
    #   I_L3 = (13.043 + 3.204 + 11.442)∠101.81° + 13.043∠120° = 27.689∠101.81° + 13.043∠120°
    #        ≈ 40.29 A ∠107.61°
    theta = 120 - phi(0.95)
    e, led, hp = 3000 / 230, (700 / 0.95) / 230, 7500 / 0.95 / 3 / 230
    i_l3 = polar(e + led + hp, theta) + polar(3000 / 230, 120)
    assert abs(i_l3) == pytest.approx(40.29, abs=0.005)
    assert p["current_a"] == pytest.approx(abs(i_l3), rel=REL)
    assert p["current_deg"] == pytest.approx(math.degrees(cmath.phase(i_l3)), abs=1e-6)

    # Harmonics: one base angle h·θ for all three, so each order is a signed sum
    # (δ = 180° flips the sign):
    #   h3   13.043·.81 + 3.204·.70                  = 10.565 + 2.243          = 12.808
    #   h5   13.043·.606 + 3.204·.40 - 11.442·.35    = 7.904 + 1.282 - 4.005   =  5.181
    #   h7   13.043·.37 + 3.204·.20 + 11.442·.12     = 4.826 + 0.641 + 1.373   =  6.840
    #   h9   13.043·.157 + 3.204·.15                 = 2.048 + 0.481           =  2.528
    #   h11  13.043·.024 + 3.204·.10 - 11.442·.07    = 0.313 + 0.320 - 0.801   = -0.168
    #   h13 -13.043·.063 + 3.204·.07 + 11.442·.05    = -0.822 + 0.224 + 0.572  = -0.025
    #   h15 -13.043·.079 + 3.204·.05                 = -1.030 + 0.160          = -0.870
    #   h17 -11.442·.03 = -0.343;  h19 11.442·.025 = 0.286;
    #   h23 -11.442·.02 = -0.229;  h25 11.442·.015 = 0.172
    #   Σ squares = 164.04 + 26.85 + 46.78 + 6.39 + 0.03 + 0.00 + 0.76 + 0.12 + 0.08
    #               + 0.05 + 0.03 = 245.13 A²  →  harmonic RMS 15.66 A
    #   RMS = √(40.29² + 245.13) = 43.22 A;  THD = 15.66/40.29 = 38.9 %;  loading 43.22/80 A
    def signed(prof: dict[int, tuple[float, float]], h: int) -> float:
        if h not in prof:
            return 0.0
        m, delta = prof[h]
        return m if delta == 0 else -m

    harm2 = 0.0
    for h in (3, 5, 7, 9, 11, 13, 15, 17, 19, 23, 25):
        x = e * signed(ELECTRONICS, h) + led * signed(LED, h) + hp * signed(VFD, h)
        harm2 += x * x
    assert harm2 == pytest.approx(245.13, abs=0.005)
    rms = math.sqrt(abs(i_l3) ** 2 + harm2)
    assert rms == pytest.approx(43.22, abs=0.005)
    assert p["rms_a"] == pytest.approx(rms, rel=REL)
    assert p["thd_pct"] == pytest.approx(100 * math.sqrt(harm2) / abs(i_l3), rel=REL)
    assert p["loading_pct"] == pytest.approx(100 * rms / 80, rel=REL)
    # The general per-order phasor sum gives the same (a cross-check of the signed sums).
    rms2, _ = harmonic_rms(i_l3, [(e, theta, ELECTRONICS), (led, theta, LED), (hp, theta, VFD)])
    assert rms2 == pytest.approx(rms, rel=1e-12)  # two routes of the same sums: round-off
