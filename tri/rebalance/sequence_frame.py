"""A rebalancing problem in the sequence frame: the rotated spectra of the three
phases (:class:`Rotated`, phase p's order-h current turned by ``a^(h·p mod 3)``),
and each phase's size along a direction and its principal coordinates across it
(:class:`Frame`), against the reference plan. The mathematics and the bounds
built on it are in :mod:`tri.rebalance.crossing` (module notes).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.sequence import A_OP
from tri.rebalance.knapsack import Choices, choices_of
from tri.rebalance.plan_currents import spectra
from tri.rebalance.problem import Problem

#: Perpendicular coordinates bounded one by one (the principal ones); the rest by their norm [-].
KEPT_COORDINATES = 6


def real_parts(z: np.ndarray) -> np.ndarray:
    """Complex (..., H) -> real (..., 2H): real parts, then imaginary parts."""
    return np.concatenate([z.real, z.imag], axis=-1)


@dataclass(frozen=True, eq=False)
class Frame:
    """A problem in the sequence frame (module notes), changes against the reference plan.

    Attributes
    ----------
    floor_a : float
        ``F`` [A].
    a0 : float ndarray, shape (3,)
        ``a_p`` at the reference plan (the current one, new circuits on their first option) [A].
    da : float ndarray, shape (O, 3)
        What each option changes in ``a_p`` (0 for reference options) [A].
    l0 : float ndarray, shape (3, m)
        Principal perpendicular coordinates of ``w_p`` at the reference [A].
    dl : float ndarray, shape (O, 3, m)
        Their changes [A].
    res0 : float ndarray, shape (3,)
        Norm of the other perpendicular coordinates at the reference [A].
    dres : float ndarray, shape (O, 3)
        Norms of their changes [A].
    basis : float ndarray, shape (3, K, m)
        The principal directions of each phase (orthonormal, across its ``u_p``).
    rotated : Rotated
        The rotated spectra the frame was made from.
    directions : float ndarray, shape (3, K)
        ``u_p`` of each phase (``U`` for all three, unless re-centred).
    choices : Choices
        The options of each free circuit, and which ones count as changes.
    """

    floor_a: float
    a0: np.ndarray
    da: np.ndarray
    l0: np.ndarray
    dl: np.ndarray
    res0: np.ndarray
    dres: np.ndarray
    basis: np.ndarray
    rotated: Rotated
    directions: np.ndarray
    choices: Choices


def rotations(orders: np.ndarray) -> np.ndarray:
    """``a^(h·p mod 3)`` for phase p and order h (complex ndarray, shape (3, H))."""
    h = np.asarray(orders, dtype=int)
    return np.array([A_OP ** ((h * p) % 3) for p in range(3)])


@dataclass(frozen=True, eq=False)
class Rotated:
    """The rotated spectra of a problem (module notes), parts as real vectors.

    Attributes
    ----------
    w : float ndarray, shape (3, K)
        ``w_p`` at the reference plan [A].
    dw : float ndarray, shape (O, 3, K)
        What each option changes in ``w_p`` [A].
    unit : float ndarray, shape (K,)
        ``U = J/F``.
    floor_a : float
        ``F`` [A].
    choices : Choices
        The free circuits' options.
    """

    w: np.ndarray
    dw: np.ndarray
    unit: np.ndarray
    floor_a: float
    choices: Choices


def rotated_of(pr: Problem) -> Rotated:
    """The rotated spectra of a problem (module notes)."""
    rot = rotations(pr.orders)
    ref = pr.current_assignment()
    v, _ = spectra(pr, ref)
    w = real_parts(rot * v)  # (3, K)
    u = w.mean(axis=0)
    floor = float(np.linalg.norm(u))
    u = u / floor if floor > 0 else np.eye(w.shape[1])[0]
    wc = real_parts(rot[None] * pr.contrib)  # (O, 3, K)
    return Rotated(w, wc - wc[ref[pr.owner]], u, floor, choices_of(pr))


def frame_of(pr: Problem, kept: int = KEPT_COORDINATES) -> Frame:
    """The frame of a problem with ``u_p = U`` for every phase (module notes)."""
    return frame_in(rotated_of(pr), None, kept)


def frame_in(
    rs: Rotated, directions: np.ndarray | None = None, kept: int = KEPT_COORDINATES
) -> Frame:
    """A frame of rotated spectra: ``u_p = U`` for every phase unless ``directions`` is given.

    The principal directions across each ``u_p`` are the leading
    eigenvectors of the changes' second moments (and the reference's).
    """
    w, dw = rs.w, rs.dw
    u = np.broadcast_to(rs.unit, w.shape) if directions is None else directions
    u = u / np.linalg.norm(u, axis=1, keepdims=True)
    m = max(1, min(kept, w.shape[1] - 1))
    l0 = np.zeros((3, m))
    dl = np.zeros((dw.shape[0], 3, m))
    res0, dres = np.zeros(3), np.zeros((dw.shape[0], 3))
    bases = np.zeros((3, w.shape[1], m))
    for p in range(3):
        proj = np.eye(w.shape[1]) - np.outer(u[p], u[p])
        across = dw[:, p] @ proj
        now = w[p] @ proj
        stack = np.vstack([across, now[None]])
        _, vecs = np.linalg.eigh(np.einsum("ik,il->kl", stack, stack))
        basis, _ = np.linalg.qr(proj @ vecs[:, ::-1][:, :m])  # principal directions across u_p
        bases[p] = basis
        l0[p], dl[:, p] = now @ basis, across @ basis
        res0[p] = np.linalg.norm(now - basis @ l0[p])
        dres[:, p] = np.linalg.norm(across - dl[:, p] @ basis.T, axis=-1)
    a0 = np.einsum("pk,pk->p", w, u)
    da = np.einsum("opk,pk->op", dw, u)
    return Frame(rs.floor_a, a0, da, l0, dl, res0, dres, bases, rs, np.array(u), rs.choices)
