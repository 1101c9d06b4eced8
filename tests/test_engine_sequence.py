"""Symmetrical components: textbook worked examples, sympy second opinion, invariants.

Tags as in shared/spec/check-values.md: [published] read in the named book,
[from memory] recalled, [computed] follows from the definitions.
"""

from __future__ import annotations

import cmath
import math

import numpy as np
import pytest
import sympy as sp
from hypothesis import given
from hypothesis import strategies as st

from tri.engine.sequence import (
    A_INVERSE,
    A_MATRIX,
    phase_components,
    sequence_components,
    unbalance_pct,
)


def p(mag: float, deg: float) -> complex:
    """Polar to complex (deg)."""
    return cmath.rect(mag, math.radians(deg))


def polar(z: complex) -> tuple[float, float]:
    """Complex to (magnitude, deg)."""
    return abs(z), math.degrees(cmath.phase(z))


# Printed results carry 4 significant digits in the magnitude and 2-3 decimals in
# the angle; the tolerances below are half a unit in the last printed digit.
MAG_TOL = 5e-5
DEG_TOL = 5e-3


def assert_polar(z: complex, mag: float, deg: float, mag_tol=MAG_TOL, deg_tol=DEG_TOL):
    m, d = polar(z)
    assert m == pytest.approx(mag, abs=mag_tol)
    assert (d - deg + 180) % 360 - 180 == pytest.approx(0.0, abs=deg_tol)


def test_saadat_example_10_1():
    """Saadat, Power System Analysis, Example 10.1 [published inputs, computed results].

    I_a = 1.6∠25°, I_b = 1.0∠180°, I_c = 0.9∠132° →
    I_0 = 0.4512∠96.45°, I_1 = 0.9435∠−0.055°, I_2 = 0.6024∠22.32°.
    """
    i012 = sequence_components(np.array([p(1.6, 25), p(1.0, 180), p(0.9, 132)]))
    assert_polar(i012[0], 0.4512, 96.45)
    assert_polar(i012[1], 0.9435, -0.055, deg_tol=5e-4)
    assert_polar(i012[2], 0.6024, 22.32)


def test_saadat_example_10_2_inverse():
    """Saadat Example 10.2 (inverse) [published inputs, computed results].

    V_0 = 0.6∠90°, V_1 = 1.0∠30°, V_2 = 0.8∠−30° →
    V_a = 1.7088∠24.18°, V_b = 0.4000∠90.00°, V_c = 1.7088∠155.82°.
    """
    v = phase_components(np.array([p(0.6, 90), p(1.0, 30), p(0.8, -30)]))
    assert_polar(v[0], 1.7088, 24.18)
    assert_polar(v[1], 0.4000, 90.00)
    assert_polar(v[2], 1.7088, 155.82)


def test_gonen_example_9_1():
    """Gönen, Electric Power Transmission System Engineering, 2nd ed., Example 9.1.

    [published; the book also gives V_b1 = 3.97∠260.5°, V_c2 = 2.52∠220.3°]:
    V_a = 7.3∠12.5°, V_b = 0.4∠−100°, V_c = 4.4∠154° →
    V_a0 = 1.4655∠45.11°, V_a1 = 3.9691∠20.54°, V_a2 = 2.5235∠−19.70°.
    The book's b- and c-phase components (3 significant digits, tolerance half a
    unit there): V_b1 = a²·V_a1, V_c2 = a²·V_a2.
    """
    v012 = sequence_components(np.array([p(7.3, 12.5), p(0.4, -100), p(4.4, 154)]))
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
    V_1 = 481.63∠−1.04°, V_2 = 8.847∠100.12°, VUF 1.837 %. The inputs are
    rounded (the phasors sum to 0.027 V, not 0), so V_0 is not exactly 0 and
    the VUF agrees to ~0.01 % only; magnitudes to half a printed digit.
    """
    v = np.array([p(480, 0), p(490, -121.37), p(475, 118.26)])
    v012 = sequence_components(v)
    assert_polar(v012[1], 481.63, -1.04, mag_tol=5e-3, deg_tol=5e-3)
    assert_polar(v012[2], 8.847, 100.12, mag_tol=5e-4, deg_tol=5e-3)
    assert unbalance_pct(v012) == pytest.approx(1.837, abs=0.01)


def test_fortescue_matrix_matches_sympy_exactly():
    """Second opinion: sympy's exact A = [[1,1,1],[1,a²,a],[1,a,a²]], a = e^{j2π/3}.

    The engine's float matrices must equal the exact ones to double precision
    (1e-15), and A·A⁻¹ = I exactly in sympy.
    """
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
