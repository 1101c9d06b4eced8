"""Symmetrical components (Fortescue) of three-phase phasors.

Works on any array whose last axis holds phases A, B, C (or, for line
voltages, AB, BC, CA); leading axes are batch dimensions.

References
----------
1. C. L. Fortescue, "Method of symmetrical co-ordinates applied to the
   solution of polyphase networks", *AIEE Trans.* 37 (1918) 1027-1140
   (from memory).
2. H. Saadat, *Power System Analysis*, sec. 10.2, eqs. (10.7)-(10.9) (the
   section and equation numbers are from memory; the equations are those of
   ``shared/spec/engine.md``, and Examples 10.1-10.2 are the tests' check
   values).
3. IEC 61000-4-30, unbalance: ``u2 = |U2| / |U1|`` (published).
"""

from __future__ import annotations

import numpy as np

#: The operator ``a = 1∠120°`` [-].
A_OP = np.exp(2j * np.pi / 3)

#: Synthesis matrix: ``[X_A, X_B, X_C] = A · [X_0, X_1, X_2]`` [-].
A_MATRIX = np.array(
    [
        [1, 1, 1],
        [1, A_OP**2, A_OP],
        [1, A_OP, A_OP**2],
    ],
    dtype=complex,
)
#: Analysis matrix ``A⁻¹ = (1/3)·conj(A)`` [-].
A_INVERSE = np.conj(A_MATRIX) / 3.0


def sequence_components(x_abc: np.ndarray) -> np.ndarray:
    """Zero, positive and negative sequence components of a phase set.

    Parameters
    ----------
    x_abc : complex ndarray, shape (..., 3)
        Phasors of phases A, B, C [A or V].

    Returns
    -------
    complex ndarray, shape (..., 3)
        ``X_0, X_1, X_2`` referred to phase A [same unit].

    Notes
    -----
    With ``a = 1∠120°`` [1, 2]:

    ``X_0 = (X_A + X_B + X_C) / 3``,
    ``X_1 = (X_A + a·X_B + a²·X_C) / 3``,
    ``X_2 = (X_A + a²·X_B + a·X_C) / 3``.
    """
    x = np.asarray(x_abc, dtype=complex)
    xa, xb, xc = x[..., 0], x[..., 1], x[..., 2]
    a, a2 = A_OP, A_OP**2
    # element-wise (not a BLAS product) so batch and single results agree bit for bit
    return np.stack([xa + xb + xc, xa + a * xb + a2 * xc, xa + a2 * xb + a * xc], -1) / 3.0


def phase_components(x_012: np.ndarray) -> np.ndarray:
    """Phase phasors from sequence components (inverse of :func:`sequence_components`).

    Parameters
    ----------
    x_012 : complex ndarray, shape (..., 3)
        ``X_0, X_1, X_2`` [A or V].

    Returns
    -------
    complex ndarray, shape (..., 3)
        ``X_A, X_B, X_C`` [same unit].

    Notes
    -----
    ``X_A = X_0 + X_1 + X_2``, ``X_B = X_0 + a²X_1 + aX_2``,
    ``X_C = X_0 + aX_1 + a²X_2`` [2].
    """
    x = np.asarray(x_012, dtype=complex)
    x0, x1, x2 = x[..., 0], x[..., 1], x[..., 2]
    a, a2 = A_OP, A_OP**2
    return np.stack([x0 + x1 + x2, x0 + a2 * x1 + a * x2, x0 + a * x1 + a2 * x2], -1)


def unbalance_pct(x_012: np.ndarray, which: int = 2) -> np.ndarray:
    """Zero- or negative-sequence unbalance factor in percent.

    Parameters
    ----------
    x_012 : complex ndarray, shape (..., 3)
        Sequence components ``X_0, X_1, X_2``.
    which : {0, 2}
        2 for ``|X_2| / |X_1|`` (the unbalance factor [3]), 0 for
        ``|X_0| / |X_1|``.

    Returns
    -------
    float ndarray, shape (...)
        Percent [%]; 0 where ``X_1 = 0`` (nothing connected).
    """
    x = np.abs(np.asarray(x_012))
    den = x[..., 1]
    return np.where(den > 0, 100.0 * x[..., which] / np.where(den > 0, den, 1.0), 0.0)


def order_sequence(orders: np.ndarray) -> np.ndarray:
    """Which sequence a balanced set of currents of each harmonic order forms.

    Parameters
    ----------
    orders : int array_like, shape (H,)
        Harmonic orders (1 = the fundamental).

    Returns
    -------
    int ndarray, shape (H,)
        Index into ``X_0, X_1, X_2``: 1 (positive) for ``h ≡ 1 (mod 3)``,
        2 (negative) for ``h ≡ 2``, 0 (zero sequence) for ``h ≡ 0``
        (the triplen orders).

    Notes
    -----
    A balanced set ``X∠0, X∠-120°, X∠+120°`` at the fundamental becomes, at
    order h, ``X∠0, X∠-120h°, X∠+120h°`` (a time shift of the fundamental
    shifts order h by h times the angle), which is the set of sequence
    ``h mod 3`` in the numbering above [computed].
    """
    return np.asarray(orders, dtype=int) % 3


def sequence_of_orders(spectrum: np.ndarray, orders: np.ndarray) -> np.ndarray:
    """Per order, the sequence component that a balanced set of that order forms.

    Parameters
    ----------
    spectrum : complex ndarray, shape (..., 3, H)
        Phase currents at each order [A].
    orders : int array_like, shape (H,)
        The orders of the columns.

    Returns
    -------
    complex ndarray, shape (..., H)
        ``X_{order_sequence(h)}`` of each order's phase set [A]
        (:func:`sequence_components`, :func:`order_sequence`).
    """
    seq = sequence_components(np.swapaxes(np.asarray(spectrum, dtype=complex), -1, -2))
    idx = np.broadcast_to(order_sequence(orders)[:, None], (*seq.shape[:-1], 1))
    return np.take_along_axis(seq, idx, axis=-1)[..., 0]
