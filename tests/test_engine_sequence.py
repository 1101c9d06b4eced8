"""Symmetrical components: textbook worked examples, sympy second opinion, invariants.

Tags as in shared/spec/check-values.md: [published] read in the named book,
[from memory] recalled, [computed] follows from the definitions.
"""

from __future__ import annotations

import cmath
import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from tri.engine.sequence import (
    A_INVERSE,
    A_MATRIX,
    phase_components,
    sequence_components,
    unbalance_pct,
)
from tri.engine.unbalance import vuf_from_line_magnitudes


def p(mag: float, deg: float) -> complex:
    """Polar to complex (deg)."""
    return cmath.rect(mag, math.radians(deg))


def polar(z: complex) -> tuple[float, float]:
    """Complex to (magnitude, deg)."""
    return abs(z), math.degrees(cmath.phase(z))


# Printed results carry 4 decimals in the magnitude and 2 decimals in the angle;
# the tolerances below are half a unit in the last printed digit (a figure printed
# with 3 angle decimals gets deg_tol=5e-4 where it is checked).
MAG_TOL = 5e-5
DEG_TOL = 5e-3
# Engine against the definition recomputed in the test: the same three complex
# sums in another order, so only round-off (~1e-16 relative) separates them.
DEF_TOL = 1e-12


def assert_polar(z: complex, mag: float, deg: float, mag_tol=MAG_TOL, deg_tol=DEG_TOL):
    m, d = polar(z)
    assert m == pytest.approx(mag, abs=mag_tol)
    assert (d - deg + 180) % 360 - 180 == pytest.approx(0.0, abs=deg_tol)


def fortescue(xa: complex, xb: complex, xc: complex) -> list[complex]:
    """X_0, X_1, X_2 written out from engine.md with cmath (no engine code) [computed]."""
    a = cmath.rect(1.0, 2 * math.pi / 3)
    return [(xa + xb + xc) / 3, (xa + a * xb + a * a * xc) / 3, (xa + a * a * xb + a * xc) / 3]


def synthesis(x0: complex, x1: complex, x2: complex) -> list[complex]:
    """X_A, X_B, X_C from sequence components, written out (no engine code) [computed]."""
    a = cmath.rect(1.0, 2 * math.pi / 3)
    return [x0 + x1 + x2, x0 + a * a * x1 + a * x2, x0 + a * x1 + a * a * x2]


def test_saadat_example_10_1():
    """Saadat, Power System Analysis, Example 10.1 [published inputs, computed results].

    I_a = 1.6∠25°, I_b = 1.0∠180°, I_c = 0.9∠132° →
    I_0 = 0.4512∠96.45°, I_1 = 0.9435∠−0.055°, I_2 = 0.6024∠22.32°.
    The results are tagged [computed] in check-values.md, so they are also
    recomputed here from the definition (DEF_TOL); the printed figures are
    checked to half a unit of their last digit (I_1's angle has 3 decimals).
    """
    i_abc = (p(1.6, 25), p(1.0, 180), p(0.9, 132))
    i012 = sequence_components(np.array(i_abc))
    np.testing.assert_allclose(i012, fortescue(*i_abc), rtol=DEF_TOL, atol=DEF_TOL)
    assert_polar(i012[0], 0.4512, 96.45)
    assert_polar(i012[1], 0.9435, -0.055, deg_tol=5e-4)
    assert_polar(i012[2], 0.6024, 22.32)


def test_saadat_example_10_2_inverse():
    """Saadat Example 10.2 (inverse) [published inputs, computed results].

    V_0 = 0.6∠90°, V_1 = 1.0∠30°, V_2 = 0.8∠−30° →
    V_a = 1.7088∠24.18°, V_b = 0.4000∠90.00°, V_c = 1.7088∠155.82°.
    Recomputed from the synthesis equations too (DEF_TOL); printed figures to
    half a unit of their last digit.
    """
    v012 = (p(0.6, 90), p(1.0, 30), p(0.8, -30))
    v = phase_components(np.array(v012))
    np.testing.assert_allclose(v, synthesis(*v012), rtol=DEF_TOL, atol=DEF_TOL)
    assert_polar(v[0], 1.7088, 24.18)
    assert_polar(v[1], 0.4000, 90.00)
    assert_polar(v[2], 1.7088, 155.82)


def test_gonen_example_9_1():
    """Gönen, Electric Power Transmission System Engineering, 2nd ed., Example 9.1.

    [published; the book also gives V_b1 = 3.97∠260.5°, V_c2 = 2.52∠220.3°]:
    V_a = 7.3∠12.5°, V_b = 0.4∠−100°, V_c = 4.4∠154° →
    V_a0 = 1.4655∠45.11°, V_a1 = 3.9691∠20.54°, V_a2 = 2.5235∠−19.70°.
    The book's b- and c-phase components (3 significant digits, tolerance half a
    unit there): V_b1 = a²·V_a1, V_c2 = a²·V_a2. The 4-decimal a-phase figures
    are check-values.md's, finer than the book's 3 digits, so they are also
    recomputed here from the definition (DEF_TOL).
    """
    v_abc = (p(7.3, 12.5), p(0.4, -100), p(4.4, 154))
    v012 = sequence_components(np.array(v_abc))
    np.testing.assert_allclose(v012, fortescue(*v_abc), rtol=DEF_TOL, atol=DEF_TOL)
    assert_polar(v012[0], 1.4655, 45.11)
    assert_polar(v012[1], 3.9691, 20.54)
    assert_polar(v012[2], 2.5235, -19.70)
    a = cmath.rect(1, 2 * math.pi / 3)
    assert_polar(a**2 * v012[1], 3.97, 260.5 - 360, mag_tol=5e-3, deg_tol=0.05)
    assert_polar(a**2 * v012[2], 2.52, 220.3 - 360, mag_tol=5e-3, deg_tol=0.05)


def test_one_line_open():
    """One line open: 10∠0°, 10∠180°, 0 → I_0 = 0, I_1 = 5.7735∠−30°, I_2 = 5.7735∠30°.

    Grainger & Stevenson, Power System Analysis [from memory for the example
    number; computed]: 10/√3 = 5.7735. Tolerance 1e-12: exact arithmetic.
    """
    i012 = sequence_components(np.array([10, -10, 0], dtype=complex))
    assert abs(i012[0]) == pytest.approx(0.0, abs=1e-12)
    assert i012[1] == pytest.approx(p(10 / math.sqrt(3), -30), abs=1e-12)
    assert i012[2] == pytest.approx(p(10 / math.sqrt(3), 30), abs=1e-12)


def test_phase_b_open_grounded_wye_neutral():
    """Phase b open on a grounded wye: 10∠0°, 0, 10∠120° → neutral 10∠60° [computed].

    Neutral = I_a + I_b + I_c = 3·I_0. Tolerance 1e-12: exact arithmetic.
    """
    i = np.array([p(10, 0), 0, p(10, 120)])
    i0 = sequence_components(i)[0]
    assert 3 * i0 == pytest.approx(p(10, 60), abs=1e-12)
    assert i.sum() == pytest.approx(p(10, 60), abs=1e-12)


def test_kersting_example_9_3_line_voltages():
    """Kersting, Distribution System Modeling and Analysis, Example 9.3 [published inputs].

    V_ab = 480∠0°, V_bc = 490∠−121.37°, V_ca = 475∠118.26° →
    V_1 = 481.63∠−1.04°, V_2 = 8.847∠100.12°, VUF 1.837 %. Only the inputs are
    [published]; the results are recomputed here from the definition (DEF_TOL)
    and the printed figures checked to half a unit of their last digit, the
    VUF of these phasors included (1.8369 %).
    The inputs are rounded (the phasors sum to 0.027 V, not 0), so V_0 is not
    exactly 0 and the route from the three magnitudes alone (IEC 61000-4-30 β
    formula, 1.8358 %) differs from the phasor VUF: that route agrees with the
    printed 1.837 % to ~0.01 % only (check-values.md).
    """
    v_abc = (p(480, 0), p(490, -121.37), p(475, 118.26))
    v = np.array(v_abc)
    v012 = sequence_components(v)
    np.testing.assert_allclose(v012, fortescue(*v_abc), rtol=DEF_TOL, atol=DEF_TOL)
    assert_polar(v012[1], 481.63, -1.04, mag_tol=5e-3, deg_tol=5e-3)
    assert_polar(v012[2], 8.847, 100.12, mag_tol=5e-4, deg_tol=5e-3)
    assert unbalance_pct(v012) == pytest.approx(1.837, abs=5e-4)
    assert float(vuf_from_line_magnitudes(480, 490, 475)) == pytest.approx(1.837, abs=0.01)


def test_fortescue_matrix_matches_sympy_exactly():
    """Second opinion: sympy's exact A = [[1,1,1],[1,a²,a],[1,a,a²]], a = e^{j2π/3}.

    The engine's float matrices must equal the exact ones to double precision
    (1e-15: entries of magnitude ≤ 1, a few units of machine epsilon 2.2e-16),
    and A·A⁻¹ = I exactly in sympy.
    """
    import sympy as sp  # here, not at collection (a third of a second)

    a = sp.exp(2 * sp.pi * sp.I / 3)
    a_exact = sp.Matrix([[1, 1, 1], [1, a**2, a], [1, a, a**2]])
    inv_exact = a_exact.inv()

    def exact_zero(m: sp.Matrix) -> bool:
        return m.applyfunc(lambda e: sp.simplify(sp.expand_complex(e))) == sp.zeros(3, 3)

    assert exact_zero(a_exact * inv_exact - sp.eye(3))
    assert exact_zero(inv_exact - a_exact.conjugate() / 3)
    # a = −1/2 + j√3/2 exactly
    assert sp.expand_complex(a) == sp.Rational(-1, 2) + sp.sqrt(3) * sp.I / 2
    num = np.array(a_exact.evalf(30).tolist(), dtype=complex)
    num_inv = np.array(inv_exact.evalf(30).tolist(), dtype=complex)
    np.testing.assert_allclose(A_MATRIX, num, atol=1e-15)
    np.testing.assert_allclose(A_INVERSE, num_inv, atol=1e-15)


finite = st.floats(-1e4, 1e4, allow_nan=False)
phasors3 = st.lists(st.builds(complex, finite, finite), min_size=3, max_size=3)


@given(phasors3)
def test_round_trip_and_neutral_is_three_i0(x):
    """Invariants: A·(A⁻¹·x) = x, and I_A + I_B + I_C = 3·I_0 (engine.md).

    Tolerance 1e-9 of the largest magnitude: a few double-precision roundings.
    """
    x = np.array(x)
    scale = max(1.0, float(np.max(np.abs(x))))
    seq = sequence_components(x)
    np.testing.assert_allclose(phase_components(seq), x, atol=1e-9 * scale)
    assert 3 * seq[0] == pytest.approx(x.sum(), abs=1e-9 * scale)


@given(st.lists(phasors3, min_size=1, max_size=5))
def test_batch_equals_one_at_a_time(xs):
    """Leading batch axes give the same result as one set at a time (bit for bit)."""
    batch = sequence_components(np.array(xs))
    for row, x in zip(batch, xs, strict=True):
        np.testing.assert_array_equal(row, sequence_components(np.array(x)))


def test_unbalance_pct_zero_positive_sequence():
    """Nothing connected: |I_1| = 0 gives 0 %, not a division by zero."""
    with np.errstate(all="raise"):
        assert unbalance_pct(np.zeros(3, dtype=complex)) == 0.0
