"""Linear bounds on the magnitude of a phasor: polygons, sectors, support polygons.

The rebalancer's mixed-integer programs are linear, but a phase current's
magnitude ``|z|`` is not. This module holds the geometry that turns
magnitudes into linear inequalities with a proven error, and the proofs.

Conventions: a phasor ``z`` is a complex number [A]; a direction is a unit
complex number ``u``; ``<z, u> = Re(conj(u)·z)`` is the projection of ``z``
on ``u`` [A]. Angles are radians here.

Theorem 1 (circumscribed polygon)
---------------------------------
Let ``u_j = exp(2πij/m)``, ``j = 0..m-1``, ``m ≥ 3``, and
``P_m(z) = max_j <z, u_j>``. Then for every phasor ``z``

``cos(π/m)·|z| ≤ P_m(z) ≤ |z|``.

*Proof.* Upper: ``<z, u_j> ≤ |z|·|u_j| = |z|`` (Cauchy-Schwarz). Lower:
write ``z = |z|·exp(iφ)``. The directions are ``2π/m`` apart, so one of
them, ``u_k``, lies within ``π/m`` of ``φ``; then
``<z, u_k> = |z|·cos(φ - 2πk/m) ≥ |z|·cos(π/m)`` since cos decreases on
``[0, π]``. ∎

Consequently the linear constraints ``<z, u_j> ≤ R`` (all j) admit every
``|z| ≤ R`` and nothing with ``|z| > R/cos(π/m)``: the relative error of
the polygon is ``ε_m = 1/cos(π/m) - 1`` (:func:`polygon_error`). For
``m = 36`` (every 10°), ``ε = 0.382 %`` < 0.5 %; the smallest ``m`` with
``ε < 0.5 %`` is 32 (``ε = 0.484 %``).

Theorem 2 (sector upper bound)
------------------------------
If ``arg z`` lies in a sector of half-width ``β < π/2`` around the
direction ``u_c``, then ``|z| ≤ <z, u_c> / cos β``.

*Proof.* ``<z, u_c> = |z|·cos(arg z - arg u_c) ≥ |z|·cos β`` and
``cos β > 0``. ∎

Theorem 1 gives lower bounds of a magnitude (a convex function: linear
pieces below it); Theorem 2 gives upper bounds, valid only inside a sector,
so an upper bound over several sectors needs one binary choice per sector.

Theorem 3 (norms in more dimensions)
------------------------------------
For a vector ``v`` of phasors (a phase current at every harmonic order)
``||v|| = sqrt(Σ_h |v_h|²)`` is the Euclidean norm of the real vector of
its parts, so ``||v|| ≥ Σ_h <v_h, u_h>`` for every ``u`` with
``Σ_h |u_h|² = 1``, with equality at ``u = v/||v||`` (Cauchy-Schwarz).
Such cuts, added at the points the solver proposes (outer approximation,
Kelley's cutting planes [2]), make the bound exact at those points.

References
----------
1. A. Ben-Tal, A. Nemirovski, "On polyhedral approximations of the
   second-order cone", *Math. Oper. Res.* 26 (2001) 193-205 (polyhedral
   approximation of norms).
2. J. E. Kelley, "The cutting-plane method for solving convex programs",
   *J. SIAM* 8 (1960) 703-712.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Default number of polygon sides: one every 10° (error 0.382 %, Theorem 1).
DEFAULT_SIDES = 36


def polygon_error(sides: int) -> float:
    """Relative error of the circumscribed polygon (Theorem 1).

    Parameters
    ----------
    sides : int
        Number of directions ``m`` (≥ 3) [-].

    Returns
    -------
    float
        ``1/cos(π/m) - 1`` [-]: ``|z| ≤ (1 + ε)·P_m(z)``.
    """
    if sides < 3:
        raise ValueError("a polygon needs at least 3 sides")
    return 1.0 / math.cos(math.pi / sides) - 1.0


def sides_for_error(error: float) -> int:
    """Fewest polygon sides whose relative error is at most ``error``.

    Parameters
    ----------
    error : float
        Largest acceptable relative error ``ε`` (> 0) [-].

    Returns
    -------
    int
        Smallest ``m ≥ 3`` with ``1/cos(π/m) - 1 ≤ ε`` [-].
    """
    if not error > 0:
        raise ValueError("error must be > 0")
    m = max(3, math.ceil(math.pi / math.acos(1.0 / (1.0 + error))))
    while polygon_error(m) > error:  # guard against round-off at the boundary
        m += 1
    return m


def polygon_directions(sides: int, offset: float = 0.0) -> np.ndarray:
    """Unit directions of the circumscribed polygon.

    Parameters
    ----------
    sides : int
        Number of directions ``m`` [-].
    offset : float
        Angle of the first direction [rad].

    Returns
    -------
    complex ndarray, shape (m,)
        ``exp(i·(offset + 2πj/m))`` [-].
    """
    return np.exp(1j * (offset + 2.0 * np.pi * np.arange(sides) / sides))


def polygon_norm(z: np.ndarray | complex, sides: int) -> np.ndarray:
    """``P_m(z) = max_j <z, u_j>``, the polygon's under-estimate of ``|z|``.

    Parameters
    ----------
    z : complex array_like, shape (...)
        Phasors [A].
    sides : int
        Number of directions [-].

    Returns
    -------
    float ndarray, shape (...)
        ``P_m(z)`` [A], between ``cos(π/m)·|z|`` and ``|z|`` (Theorem 1).
    """
    u = polygon_directions(sides)
    z = np.asarray(z, dtype=complex)
    return np.max(np.real(np.conj(u) * z[..., None]), axis=-1)


@dataclass(frozen=True)
class Sectors:
    """Angular sectors covering an interval of angles.

    Attributes
    ----------
    centres : complex ndarray, shape (S,)
        Unit direction of each sector's centre [-].
    lower_normals, upper_normals : complex ndarray, shape (S,)
        ``<z, lower_normals[j]> ≥ 0`` and ``<z, upper_normals[j]> ≥ 0`` say
        that ``arg z`` is at least the sector's start and at most its end [-].
    half_width : float
        Half-width ``β`` of every sector [rad] (< π/2).
    """

    centres: np.ndarray
    lower_normals: np.ndarray
    upper_normals: np.ndarray
    half_width: float

    @property
    def count(self) -> int:
        """Number of sectors ``S`` [-]."""
        return int(self.centres.size)

    @property
    def upper_factor(self) -> float:
        """``1/cos β``: ``|z| ≤ <z, centre>·upper_factor`` inside a sector (Theorem 2)."""
        return 1.0 / math.cos(self.half_width)


def sectors(start: float, stop: float, max_width: float) -> Sectors:
    """Split the angles ``[start, stop]`` into equal sectors no wider than ``max_width``.

    Parameters
    ----------
    start, stop : float
        Interval of angles, ``stop ≥ start``, ``stop - start ≤ 2π`` [rad].
    max_width : float
        Largest sector width (< π) [rad].

    Returns
    -------
    Sectors
    """
    span = max(stop - start, 0.0)
    count = max(1, math.ceil(span / max_width - 1e-12))
    width = max(span / count, 1e-9)
    edges = start + width * np.arange(count + 1)
    lo, hi = edges[:-1], edges[1:]
    return Sectors(
        centres=np.exp(1j * (lo + hi) / 2.0),
        lower_normals=np.exp(1j * (lo + np.pi / 2.0)),
        upper_normals=np.exp(1j * (hi - np.pi / 2.0)),
        half_width=width / 2.0,
    )


@dataclass(frozen=True)
class Reach:
    """What a phasor can become: bounds from an outer polygon of its reachable set.

    Attributes
    ----------
    max_abs : float
        Upper bound on ``|z|`` [A].
    min_abs : float
        Lower bound on ``|z|`` [A] (0 when the polygon contains the origin).
    angle_start, angle_stop : float
        Interval that contains ``arg z`` [rad] (the whole circle when the
        polygon contains the origin).
    """

    max_abs: float
    min_abs: float
    angle_start: float
    angle_stop: float


def reach_from_support(directions: np.ndarray, support: np.ndarray) -> Reach:
    """Bounds on ``z`` from support values ``h_j ≥ max <z, n_j>`` over a set.

    Parameters
    ----------
    directions : complex ndarray, shape (m,)
        Unit directions ``n_j``, equally spaced around the circle in
        increasing angle (``polygon_directions``) [-].
    support : float ndarray, shape (m,)
        ``h_j`` [A]: every reachable ``z`` has ``<z, n_j> ≤ h_j``.

    Returns
    -------
    Reach

    Notes
    -----
    The reachable set lies in the polygon ``∩_j {<z, n_j> ≤ h_j}``, whose
    vertices are the intersections of consecutive lines (the ``h_j`` come
    from a support function, so no line is redundant). ``|z|`` is at most the
    largest vertex modulus; the origin is inside when every ``h_j ≥ 0``;
    otherwise ``|z| ≥ <z, -n_j> ≥ -h_j`` for every j, and ``arg z`` lies
    between the extreme vertex angles, less than π apart.
    """
    n = np.asarray(directions, dtype=complex)
    h = np.asarray(support, dtype=float)
    a1, b1 = n.real, n.imag
    a2, b2 = np.roll(a1, -1), np.roll(b1, -1)
    h2 = np.roll(h, -1)
    det = a1 * b2 - a2 * b1
    vx = (h * b2 - h2 * b1) / det
    vy = (a1 * h2 - a2 * h) / det
    verts = vx + 1j * vy
    max_abs = float(np.max(np.abs(verts)))
    if np.all(h >= 0):
        return Reach(max_abs=max_abs, min_abs=0.0, angle_start=0.0, angle_stop=2 * np.pi)
    min_abs = float(max(0.0, np.max(-h)))
    ref = np.angle(np.mean(verts))
    rel = np.angle(verts * np.exp(-1j * ref))
    return Reach(
        max_abs=max_abs,
        min_abs=min_abs,
        angle_start=float(ref + rel.min()),
        angle_stop=float(ref + rel.max()),
    )
