"""Per-order line and neutral currents, RMS and THD.

The fundamental is treated as order 1 of the same computation. There is no
Python loop over circuits: the per-unit spectrum of every circuit of every
panel is built with one array multiplication per harmonic order, and the
line and neutral sums are one matrix product per chunk of panels (chunks
keep the working arrays in the CPU cache; results do not depend on them).

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
1. IEEE 519, definitions of harmonic order, RMS and THD (from memory; the
   formulas used are those of ``shared/spec/engine.md``).
2. R. C. Dugan et al., *Electrical Power Systems Quality*, ch. 5 (triplen
   harmonics add in the neutral; 3-wire loads draw no triplens) (from
   memory; both facts also follow from the sequence of each order,
   [computed]).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.inputs import CircuitArrays
from tri.engine.phasors import PHASE_ANGLES, connection_masks, line_masks

#: Spectrum elements (circuits × orders) processed per chunk of the batch, so
#: the working arrays stay in the CPU cache [-].
CHUNK_ELEMENTS = 1 << 16


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


def unit_powers(unit: np.ndarray, orders: np.ndarray, out: np.ndarray | None = None) -> np.ndarray:
    """Integer powers ``u^h`` of unit phasors, one array pass per order.

    Parameters
    ----------
    unit : complex ndarray, shape (...)
        Unit phasors ``e^{jθ}`` (or 0).
    orders : int ndarray, shape (h,)
        Orders, ascending, ≥ 1.
    out : complex ndarray, shape (..., h), optional
        Where to write the result.

    Returns
    -------
    complex ndarray, shape (..., h)
        ``e^{j·h·θ}`` for each order [-].

    Notes
    -----
    ``u^{h_k} = u^{h_{k-1}}·u^{h_k − h_{k−1}}``, the step powers cached and
    built by squaring: one complex multiplication per order instead of a
    complex exponential per element (about 10× faster). The round-off grows
    by about one unit in the last place per multiplication, i.e. ~1e-14 at
    order 50.
    """
    steps = [int(h) for h in np.asarray(orders)]
    if out is None:
        out = np.empty((*np.shape(unit), len(steps)), dtype=complex)
    cache: dict[int, np.ndarray] = {1: unit}

    def power(d: int) -> np.ndarray:
        if d not in cache:
            half = power(d // 2)
            cache[d] = half * half if d % 2 == 0 else half * half * unit
        return cache[d]

    prev, acc = 0, None
    for k, h in enumerate(steps):
        acc = power(h) if acc is None else acc * power(h - prev)
        out[..., k] = acc
        prev = h
    return out


def polar_unit(current: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Magnitude and unit phasor of each current.

    Parameters
    ----------
    current : complex ndarray, shape (...)
        Currents [A].

    Returns
    -------
    mag : float ndarray, shape (...)
        ``|I|`` [A].
    unit : complex ndarray, shape (...)
        ``I/|I|``, 1 where ``I = 0`` [-]. Real divisions stay exact for
        subnormal currents, where a complex division would overflow.
    """
    mag = np.abs(current)
    safe = np.where(mag > 0, mag, 1.0)
    unit = np.where(mag > 0, current.real / safe + 1j * (current.imag / safe), 1.0)
    return mag, unit


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
    harmonic_power_pu : float ndarray, shape (..., n)
        ``Σ_{h>1} m_h²`` of each circuit's profile [pu²] (> 0: non-linear).
    triplen_power_pu : float ndarray, shape (..., n)
        The triplen part of it for 3-pole circuits (0 for the others) [pu²].
    """

    orders: np.ndarray
    phase: np.ndarray
    neutral: np.ndarray
    circuit_fundamental_a: np.ndarray
    circuit_rms_a: np.ndarray
    harmonic_power_pu: np.ndarray
    triplen_power_pu: np.ndarray
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
    Element spectrum ``E_c,h = m_h·e^{jδ_h}·|I_e|·u^h`` with
    ``u = I_e/|I_e| = e^{jθ}`` (so ``∠E = h·θ + δ_h``), and

    ``I_p,h = Σ_c M_c,p·E_c,h + R_p,h·Σ_{c∈3P} E_c,h``,
    ``I_N,h = Σ_{c∈1P} E_c,h`` [2],

    with ``M`` the incidence (+1 on p, −1 on q) and ``R`` from
    :func:`three_wire_rotation`. The sums are one real matrix product per
    chunk of panels (``|I_e|`` folded into the collector matrix); the per-unit
    spectrum ``m_h·e^{jδ_h}·u^h`` is built with one multiplication per order
    (:func:`unit_powers`). Per-circuit RMS:
    ``|I_e|·sqrt(1 + Σ m_h²)`` (triplens left out for 3-pole circuits).
    """
    ln, _, tp = connection_masks(circuits)
    orders = np.asarray(circuits.orders, dtype=int)
    orders_all = all_orders(orders)
    rot = three_wire_rotation(orders_all)
    i_e = np.asarray(i_element, dtype=complex)
    batch, n, n_h = i_e.shape[:-1], i_e.shape[-1], orders.size
    harm = np.ascontiguousarray(
        np.broadcast_to(np.asarray(circuits.harmonics, dtype=complex), (*batch, n, n_h))
    )
    mag, unit = polar_unit(i_e)

    collect = _collector(circuits, ln, tp, mag, weights)
    n_rows = collect.shape[-2]
    sums = np.empty((*batch, n_rows, n_h + 1), dtype=complex)
    unit_pairs = unit.view(np.float64).reshape(*batch, n, 2)
    sums[..., 0] = (collect @ unit_pairs).view(complex)[..., 0]  # the fundamental
    power = np.zeros((*batch, n, 2))
    if n_h:
        _harmonic_sums(collect, unit, harm, orders, sums, power)

    phase = sums[..., :3, :] + sums[..., 3:4, :] * rot
    weighted = None
    if weights is not None:
        weighted = sums[..., 5:8, :] + sums[..., 8:9, :] * rot

    # per-circuit RMS: |E_h| = m_h·|I_e|; 3-pole circuits lose their triplens
    harmonic, triplen = power[..., 0], np.where(tp, power[..., 1], 0.0)
    rms_pu = np.sqrt(1.0 + np.maximum(harmonic - triplen, 0.0))
    return OrderCurrents(
        orders=orders_all,
        phase=phase,
        neutral=sums[..., 4, :],
        circuit_fundamental_a=mag,
        circuit_rms_a=mag * rms_pu,
        phase_weighted=weighted,
        harmonic_power_pu=harmonic,
        triplen_power_pu=triplen,
    )


def _collector(
    circuits: CircuitArrays,
    ln: np.ndarray,
    tp: np.ndarray,
    mag: np.ndarray,
    weights: np.ndarray | None,
) -> np.ndarray:
    """Collector matrix, scaled by |I_e| [A] so the spectrum it multiplies is per unit.

    Rows 0-2 the 1-/2-pole incidence (+1 on p, -1 on q), row 3 picks 3-pole
    circuits, row 4 line-to-neutral ones (the neutral); rows 5-8 repeat 0-3
    with the weights. Shape (..., 5 or 9, n).
    """
    batch, n = mag.shape[:-1], mag.shape[-1]
    out_on, back_on = line_masks(circuits)
    n_rows = 5 if weights is None else 9
    collect = np.empty((*batch, n_rows, n))
    np.subtract(out_on, back_on, out=collect[..., :3, :], dtype=float)
    collect[..., 3, :] = tp
    collect[..., 4, :] = ln
    if weights is not None:
        np.multiply(
            collect[..., :4, :], np.asarray(weights, float)[..., None, :], out=collect[..., 5:, :]
        )
    collect *= mag[..., None, :]
    return collect


def _harmonic_sums(
    collect: np.ndarray,
    unit: np.ndarray,
    harm: np.ndarray,
    orders: np.ndarray,
    sums: np.ndarray,
    power: np.ndarray,
) -> None:
    """Fill ``sums[..., 1:]`` (collected currents at each harmonic order [A]) and
    ``power`` (per circuit: Σ_{h>1} m_h² and its triplen part [-]) in place, in
    chunks of panels of about ``CHUNK_ELEMENTS`` elements."""
    batch, n = unit.shape[:-1], unit.shape[-1]
    n_rows, n_h = collect.shape[-2], orders.size
    # per-unit spectrum powers for the per-circuit RMS: column 0 Σ_{h>1} m_h²,
    # column 1 its triplen part (3-pole circuits cannot draw it)
    pick = np.stack([np.ones(n_h), (orders % 3 == 0).astype(float)], axis=-1)
    pick = np.repeat(pick, 2, axis=0)  # rows for the real and imaginary parts
    flat = int(np.prod(batch, dtype=int))
    sums_h = sums.reshape(flat, n_rows, n_h + 1)[..., 1:]
    power_f = power.reshape(flat, n, 2)
    collect_f = collect.reshape(flat, n_rows, n)
    unit_f = unit.reshape(flat, n)
    harm_f = harm.reshape(flat, n, n_h)
    step = max(1, CHUNK_ELEMENTS // (n * n_h or 1))
    for lo in range(0, flat, step):
        hi = min(flat, lo + step)
        spec = unit_powers(unit_f[lo:hi], orders)  # u^h, (m, n, h)
        np.multiply(spec, harm_f[lo:hi], out=spec)  # m_h e^{jδ_h} u^h = E_h / |I_e|
        # real view: a real matrix product, half the work of a complex one
        pairs = spec.view(np.float64)
        sums_h[lo:hi] = (collect_f[lo:hi] @ pairs).view(complex)
        sq = np.square(pairs, out=pairs).reshape(-1, 2 * n_h)  # one 2-D product
        power_f[lo:hi] = (sq @ pick).reshape(hi - lo, n, 2)  # Σ |E_h/|I_e||² = Σ m_h²


def is_triplen(orders: np.ndarray) -> np.ndarray:
    """True for the triplen orders (multiples of 3), which add in the neutral.

    Parameters
    ----------
    orders : int array_like, shape (H,)
        Orders (1 = the fundamental).

    Returns
    -------
    bool ndarray, shape (H,)
        ``h % 3 == 0``: a balanced set of such currents is in phase on the
        three phases (zero sequence), so it adds in the neutral [2].
    """
    return np.asarray(orders, dtype=int) % 3 == 0


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
