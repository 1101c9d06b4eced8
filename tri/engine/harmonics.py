"""Per-order line and neutral currents, RMS and THD.

The fundamental is treated as order 1 of the same computation, so the whole
spectrum is one vectorised pass over a ``(..., n, H+1)`` array: no Python
loop over circuits or orders.

Rules (``shared/spec/engine.md``):

* a circuit whose element current is ``|I_e|∠θ`` carries, at order h,
  ``m_h·|I_e|∠(h·θ + δ_h)``;
* a 2-pole circuit's harmonic current leaves by line q, as its fundamental;
* a 3-pole circuit is a **3-wire load**: its line k carries the element
  current rotated by ``h·φ_k`` (``φ = 0, -120°, +120°``), and the
  zero-sequence part of that set is removed, because a zero-sequence
  current needs a neutral to flow in. For a balanced 3-pole circuit this
  removes exactly the triplen orders (h = 3, 6, 9, …), whose three line
  currents would be in phase, and leaves every other order untouched;
* the neutral carries the sum of the line-to-neutral circuits' currents,
  order by order.

References
----------
1. IEEE 519, definitions of harmonic order, RMS and THD.
2. R. C. Dugan et al., *Electrical Power Systems Quality*, ch. 5 (triplen
   harmonics add in the neutral; 3-wire loads draw no triplens).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.inputs import CircuitArrays
from tri.engine.phasors import PHASE_ANGLES, connection_masks, incidence


def all_orders(orders: np.ndarray) -> np.ndarray:
    """Orders including the fundamental.

    Parameters
    ----------
    orders : int ndarray, shape (h,)
        Harmonic orders (> 1).

    Returns
    -------
    int ndarray, shape (h + 1,)
        ``[1, *orders]`` [-].
    """
    return np.concatenate([[1], np.asarray(orders, dtype=int)]).astype(int)


def three_wire_rotation(orders_all: np.ndarray) -> np.ndarray:
    """Per-line rotation of a 3-pole circuit's current, zero sequence removed.

    Parameters
    ----------
    orders_all : int ndarray, shape (H,)
        Orders including the fundamental.

    Returns
    -------
    complex ndarray, shape (3, H)
        ``R[k, h] = e^{j·h·φ_k} − (1/3)·Σ_m e^{j·h·φ_m}`` [-].

    Notes
    -----
    ``Σ_m e^{j·h·φ_m}`` is 3 for ``h ≡ 0 (mod 3)`` and 0 otherwise, so the
    rows are zero at triplen orders and unit phasors elsewhere.
    """
    rot = np.exp(1j * np.outer(PHASE_ANGLES, np.asarray(orders_all, dtype=float)))
    rot = rot - rot.mean(axis=0, keepdims=True)
    rot[np.abs(rot) < 1e-12] = 0.0  # exact zeros at triplens, not round-off
    return rot


def element_spectrum(
    i_element: np.ndarray, harmonics: np.ndarray, orders: np.ndarray
) -> np.ndarray:
    """Element current of every circuit at every order.

    Parameters
    ----------
    i_element : complex ndarray, shape (..., n)
        Fundamental element currents ``I_e`` [A].
    harmonics : complex ndarray, shape (..., n, h)
        ``m_h·e^{jδ_h}`` per circuit [pu, rad].
    orders : int ndarray, shape (h,)
        Harmonic orders of the columns.

    Returns
    -------
    complex ndarray, shape (..., n, h + 1)
        Column 0 is ``I_e``; column k is ``m_h·|I_e|·e^{j(h·θ + δ_h)}`` [A].
    """
    i_e = np.asarray(i_element, dtype=complex)
    harm = np.asarray(harmonics, dtype=complex)
    orders = np.asarray(orders, dtype=float)
    mag = np.abs(i_e)
    theta = np.angle(i_e)
    out = np.empty((*np.broadcast_shapes(i_e.shape, harm.shape[:-1]), orders.size + 1), complex)
    out[..., 0] = i_e
    out[..., 1:] = (mag[..., None] * harm) * np.exp(1j * theta[..., None] * orders)
    return out


@dataclass(frozen=True, eq=False)
class OrderCurrents:
    """Line, neutral and per-circuit currents at every order (arrays).

    Attributes
    ----------
    orders : int ndarray, shape (H,)
        Orders, ``orders[0] == 1`` (the fundamental).
    phase : complex ndarray, shape (..., 3, H)
        Line currents ``I_p,h`` [A].
    neutral : complex ndarray, shape (..., H)
        Neutral current ``I_N,h`` [A].
    circuit_fundamental_a : float ndarray, shape (..., n)
        Line current magnitude of each circuit at the fundamental [A].
    circuit_rms_a : float ndarray, shape (..., n)
        True-RMS line current of each circuit [A] (3-pole circuits without
        their triplens).
    phase_weighted : complex ndarray, shape (..., 3, H), or None
        Line currents with each circuit's current multiplied by ``weights``
        [A]; None when no weights were given.
    """

    orders: np.ndarray
    phase: np.ndarray
    neutral: np.ndarray
    circuit_fundamental_a: np.ndarray
    circuit_rms_a: np.ndarray
    phase_weighted: np.ndarray | None = None


def order_currents(
    circuits: CircuitArrays,
    i_element: np.ndarray,
    weights: np.ndarray | None = None,
) -> OrderCurrents:
    """Sum circuit currents into line and neutral currents, order by order.

    Parameters
    ----------
    circuits : CircuitArrays
        Circuits, shape (..., n), with ``harmonics`` (..., n, h).
    i_element : complex ndarray, shape (..., n)
        Fundamental element currents (:func:`tri.engine.phasors.element_currents`) [A].
    weights : float ndarray, shape (..., n), optional
        Multiplier on each circuit's current (e.g. 1.25 on continuous loads
        for the sizing check) [-]. Default 1.

    Returns
    -------
    OrderCurrents
        Line, neutral and per-circuit currents.

    Notes
    -----
    ``I_p,h = Σ_c M_c,p·E_c,h + R_p,h·Σ_{c∈3P} E_c,h`` with ``M`` the
    incidence (+1 on p, −1 on q), ``E`` the element spectrum and ``R`` from
    :func:`three_wire_rotation`; ``I_N,h = Σ_{c∈1P} E_c,h`` [2].
    """
    ln, _, tp = connection_masks(circuits)
    orders_all = all_orders(circuits.orders)
    spec = element_spectrum(i_element, circuits.harmonics, circuits.orders)
    # one collector matrix: rows 0-2 the 1-/2-pole incidence, row 3 picks the
    # 3-pole circuits, row 4 the line-to-neutral ones (the neutral)
    collect = np.concatenate(
        [np.swapaxes(incidence(circuits), -1, -2), tp[..., None, :], ln[..., None, :]], axis=-2
    ).astype(complex)
    rot = three_wire_rotation(orders_all)

    def lines(s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        summed = collect @ s
        return summed[..., :3, :] + summed[..., 3:4, :] * rot, summed[..., 4, :]

    phase, neutral = lines(spec)
    weighted = None
    if weights is not None:
        weighted = lines(spec * np.asarray(weights, dtype=float)[..., None])[0]
    # per-circuit line currents: |E| on each line; 3-pole lose their triplens
    power = np.abs(spec) ** 2
    power = np.where(tp[..., None], power * np.abs(rot[0]) ** 2, power)
    return OrderCurrents(
        orders=orders_all,
        phase=phase,
        neutral=neutral,
        circuit_fundamental_a=np.abs(spec[..., 0]),
        circuit_rms_a=np.sqrt(np.sum(power, axis=-1)),
        phase_weighted=weighted,
    )


def rms(spectrum: np.ndarray) -> np.ndarray:
    """True RMS from a spectrum of RMS phasors.

    Parameters
    ----------
    spectrum : complex ndarray, shape (..., H)
        Phasors at each order (including the fundamental) [A].

    Returns
    -------
    float ndarray, shape (...)
        ``sqrt(Σ_h |I_h|²)`` [A] [1].
    """
    return np.sqrt(np.sum(np.abs(spectrum) ** 2, axis=-1))


def thd_pct(spectrum: np.ndarray) -> np.ndarray:
    """Total harmonic distortion of a current, percent of the fundamental.

    Parameters
    ----------
    spectrum : complex ndarray, shape (..., H)
        Phasors, column 0 the fundamental [A].

    Returns
    -------
    float ndarray, shape (...)
        ``100·sqrt(Σ_{h>1} |I_h|²) / |I_1|`` [%] [1]; 0 where the fundamental
        is zero (THD is then undefined).
    """
    s = np.abs(np.asarray(spectrum))
    fund = s[..., 0]
    harm = np.sqrt(np.sum(s[..., 1:] ** 2, axis=-1))
    return np.where(fund > 0, 100.0 * harm / np.where(fund > 0, fund, 1.0), 0.0)
