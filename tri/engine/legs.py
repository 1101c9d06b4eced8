"""Breakers with several legs, and neutrals shared by a group of legs.

The engine's rows are *elements*: one line-to-neutral, line-to-line or
balanced three-phase load each (:mod:`tri.engine.phasors`). A breaker with a
neutral and one load per leg is one line-to-neutral row per leg; a 3-pole
breaker feeding an unbalanced delta load is three line-to-line rows. The
optional ``CircuitArrays.breaker`` numbers say which rows are the legs of
one breaker, and ``CircuitArrays.neutral_group`` which line-to-neutral rows
return in one shared neutral conductor (a multi-wire branch circuit).

This module adds, order by order (the fundamental and every harmonic):

* the line current each breaker carries on each phase,
  ``I_b,k,h = Σ_{r∈b} (M_k,r·E_r,h + R_k,h·[r 3-pole]·E_r,h)``;
* the current in each shared neutral, ``I_g,h = Σ_{r∈g, 1-pole} E_r,h``,

with the element spectrum ``E_r,h = m_h·|I_e|∠(h·θ + δ_h)``, ``M`` the
incidence (+1 on p, −1 on q) and ``R`` the three-wire rotation of
:mod:`tri.engine.harmonics` (the same rules as the panel's line and neutral
currents, restricted to the rows of one breaker or one group).

Check values [computed, worked in ``tests/test_engine_legs.py``]: two legs of
16 A at unity on A and B: ``16∠0° + 16∠−120° = 16∠−60°``, 16 A in the
neutral. Three legs on A, B, C with 80 % third harmonic: the fundamentals
cancel; the thirds are in phase, ``3 × 0.8 × I`` (38.4 A for 16 A legs).

References
----------
1. NEC 210.4 (multi-wire branch circuits: legs on different phases, a
   means to disconnect all ungrounded conductors at once) (from memory;
   local code governs).
"""

from __future__ import annotations

import numpy as np

from tri.engine.harmonics import all_orders, polar_unit, rms, three_wire_rotation, unit_powers
from tri.engine.inputs import CircuitArrays, SystemVoltages
from tri.engine.phasors import PHASE_UNIT, connection_masks, element_currents, incidence
from tri.engine.results import BatchAnalysis, BreakerCurrents, Finding, Phasor, SharedNeutralResult

#: Source of the shared-neutral finding.
SHARED_NEUTRAL_SOURCE = (
    "NEC 210.4(B) (a multi-wire branch circuit needs a means that disconnects all its "
    "ungrounded conductors at once: handle ties or a multi-pole breaker), from memory; "
    "local code governs"
)


def check_wiring_inputs(circuits: CircuitArrays, system: SystemVoltages) -> None:
    """Raise ``ValueError`` for bad ``breaker``/``neutral_group`` arrays or a bad high leg.

    Parameters
    ----------
    circuits : CircuitArrays
    system : SystemVoltages
    """
    shape = np.shape(circuits.s_va)
    for name, low in (("breaker", 0), ("neutral_group", -1)):
        value = getattr(circuits, name)
        if value is None:
            continue
        if np.shape(value) != shape:
            raise ValueError(f"{name} has shape {np.shape(value)}, not {shape}")
        if np.any(np.asarray(value) < low):
            raise ValueError(f"{name} numbers must be >= {low}")
    if system.high_leg is not None and (system.high_leg not in (1, 2) or system.v_ln is None):
        raise ValueError("a high leg is phase 1 (B) or 2 (C) of a 4-wire delta")


def wiring_spectra(circuits: CircuitArrays, i_element: np.ndarray) -> dict[str, np.ndarray]:
    """Breaker and shared-neutral spectra, for the input arrays that ask for them.

    Parameters
    ----------
    circuits : CircuitArrays
        Rows, shape (..., n); ``breaker`` and ``neutral_group`` optional.
    i_element : complex ndarray, shape (..., n)
        Fundamental element currents [A].

    Returns
    -------
    dict
        ``breaker_pole_spectrum`` (..., nb, 3, H) and/or
        ``shared_neutral_spectrum`` (..., G, H) [A]; empty when neither is asked.
    """
    out: dict[str, np.ndarray] = {}
    if circuits.breaker is None and circuits.neutral_group is None:
        return out
    spectra = element_spectra(circuits, i_element)
    if circuits.breaker is not None:
        out["breaker_pole_spectrum"] = breaker_pole_spectra(circuits, spectra)
    if circuits.neutral_group is not None:
        out["shared_neutral_spectrum"] = group_neutral_spectra(circuits, spectra)
    return out


def breaker_calculated_a(
    circuits: CircuitArrays,
    row_calculated_a: np.ndarray,
    factor: float,
    v_phase: np.ndarray,
) -> np.ndarray:
    """Each row's calculated load for its breaker, a breaker with legs judged on its largest pole.

    Parameters
    ----------
    circuits : CircuitArrays
        Rows, shape (..., n); ``breaker`` optional.
    row_calculated_a : ndarray, shape (..., n)
        Each row's own calculated load
        (:func:`tri.engine.loading.circuit_calculated_a`) [A].
    factor : float
        Continuous factor [-].
    v_phase : complex ndarray, shape (3,)
        Nominal phase-to-neutral phasors [V].

    Returns
    -------
    ndarray, shape (..., n)
        ``row_calculated_a`` where a row is its breaker's only one; for every
        row of a breaker with several legs, the breaker's largest pole
        current from the scheduled loads at nominal voltage,
        ``max_k |Σ_{r∈b} w_r·M_k,r·I_r|`` [A] (``w`` the continuous factor on
        continuous rows, ``M`` the incidence, ``I`` the nominal element
        current): for legs to neutral, one per pole, that is the largest
        leg's own current; for a delta load the phasor sum of the two
        line-to-line loads on a pole (``√3`` times a leg's current when
        balanced, the code's ``S/(√3·V_LL)``) [computed].
    """
    row = np.asarray(row_calculated_a, dtype=float)
    if circuits.breaker is None:
        return row
    breaker = np.asarray(circuits.breaker)
    nb = int(breaker.max()) + 1 if breaker.size else 0
    weights = np.where(np.asarray(circuits.continuous, dtype=bool), factor, 1.0)
    i_nominal = weights * element_currents(circuits, v_phase)
    _, _, tp = connection_masks(circuits)
    rotation = np.where(tp[..., None, :], PHASE_UNIT[:, None], 0.0)  # a 3-pole row: I·1∠φ_k
    lines = (incidence(circuits) + rotation) * i_nominal[..., None, :]  # (..., 3, n)
    labels = np.broadcast_to(breaker, i_nominal.shape)
    poles = sum_by_label(labels, np.swapaxes(lines, -1, -2), nb)  # (..., nb, 3)
    pole_max = np.max(np.abs(poles), axis=-1)  # (..., nb)
    ones = np.ones((*labels.shape, 1))
    legs = sum_by_label(labels, ones, nb)[..., 0].real  # rows per breaker
    index = np.clip(breaker, 0, max(nb - 1, 0))
    per_row = np.take_along_axis(pole_max, index, axis=-1)
    several = np.take_along_axis(legs, index, axis=-1) > 1
    return np.where(several, per_row, row)


def breaker_results(b: BatchAnalysis, breaker: np.ndarray | None) -> tuple[BreakerCurrents, ...]:
    """Per-breaker currents of one panel (empty without breaker numbers).

    Parameters
    ----------
    b : BatchAnalysis
        One panel's figures (no batch dimension).
    breaker : int ndarray, shape (n,), or None
        The breaker number of each row (``CircuitArrays.breaker``).
    """
    if b.breaker_pole_spectrum is None or breaker is None:
        return ()
    spec = b.breaker_pole_spectrum
    pole_rms = rms(spec)
    breaker = np.asarray(breaker)
    out = []
    for k in range(spec.shape[0]):
        legs = np.flatnonzero(breaker == k)
        out.append(
            BreakerCurrents(
                current=(
                    Phasor.of(spec[k, 0, 0]),
                    Phasor.of(spec[k, 1, 0]),
                    Phasor.of(spec[k, 2, 0]),
                ),
                rms_a=(float(pole_rms[k, 0]), float(pole_rms[k, 1]), float(pole_rms[k, 2])),
                leg_current_a=tuple(float(b.circuit_current_a[r]) for r in legs),
                leg_rms_a=tuple(float(b.circuit_rms_a[r]) for r in legs),
            )
        )
    return tuple(out)


def shared_neutral_results(b: BatchAnalysis) -> tuple[SharedNeutralResult, ...]:
    """Per shared-neutral figures of one panel's batch figures (empty without groups)."""
    if b.shared_neutral_spectrum is None:
        return ()
    spec = b.shared_neutral_spectrum
    return tuple(
        SharedNeutralResult(
            current=Phasor.of(spec[g, 0]),
            rms_a=float(rms(spec[g])),
            harmonic_a=tuple(float(x) for x in np.abs(spec[g])),
        )
        for g in range(spec.shape[0])
    )


def element_spectra(circuits: CircuitArrays, i_element: np.ndarray) -> np.ndarray:
    """Current of each element at every order, the fundamental first.

    Parameters
    ----------
    circuits : CircuitArrays
        Rows, shape (..., n), with ``harmonics`` (..., n, h).
    i_element : complex ndarray, shape (..., n)
        Fundamental element currents [A].

    Returns
    -------
    complex ndarray, shape (..., n, h + 1)
        ``E_r,h`` [A]: column 0 ``I_e``, then ``m_h·|I_e|∠(h·θ + δ_h)``.
    """
    i_e = np.asarray(i_element, dtype=complex)
    mag, unit = polar_unit(i_e)
    orders = np.asarray(circuits.orders, dtype=int)
    out = np.empty((*i_e.shape, orders.size + 1), dtype=complex)
    out[..., 0] = i_e
    if orders.size:
        spec = unit_powers(unit, orders)
        out[..., 1:] = spec * np.asarray(circuits.harmonics, dtype=complex) * mag[..., None]
    return out


def sum_by_label(labels: np.ndarray, values: np.ndarray, count: int) -> np.ndarray:
    """Sum the rows of ``values`` that carry each label, ``(..., count, K)``.

    Parameters
    ----------
    labels : int ndarray, shape (..., n)
        Label 0..count-1 of each row; -1 (or any label outside) adds nowhere.
    values : complex ndarray, shape (..., n, K)
        What each row carries.
    count : int
        Number of labels.

    Returns
    -------
    complex ndarray, shape (..., count, K)
        ``Σ_{r: label_r = g} values_r`` for each g (the one-hot product
        ``onehot(labels) @ values``, computed by copying each label's first
        row and adding the others, so that a batch of many panels costs no
        more than its rows).
    """
    labels = np.asarray(labels)
    lead, n = labels.shape[:-1], labels.shape[-1]
    k = values.shape[-1]
    m = int(np.prod(lead, dtype=int))
    lab = labels.reshape(m, n)
    rows = np.broadcast_to(values, (*lead, n, k)).reshape(m * n, k)
    source = np.flatnonzero(((lab >= 0) & (lab < count)).ravel())
    target = (np.arange(m)[:, None] * count + lab).ravel()[source]
    # the first row of each label is copied, the others added (few: a breaker's further legs)
    order = np.argsort(target, kind="stable")
    target, source = target[order], source[order]
    first = np.ones(target.size, dtype=bool)
    first[1:] = target[1:] != target[:-1]
    out = np.zeros((m * count, k), dtype=np.result_type(values, complex))
    out[target[first]] = rows[source[first]]
    if not np.all(first):
        np.add.at(out, target[~first], rows[source[~first]])
    return out.reshape(*lead, count, k)


def breaker_pole_spectra(circuits: CircuitArrays, spectra: np.ndarray) -> np.ndarray:
    """Line current each breaker carries on each phase, at every order.

    Parameters
    ----------
    circuits : CircuitArrays
        Rows with ``breaker`` numbers (..., n).
    spectra : complex ndarray, shape (..., n, H)
        :func:`element_spectra`.

    Returns
    -------
    complex ndarray, shape (..., nb, 3, H)
        ``I_b,k,h`` [A]; zero on phases a breaker does not touch.
    """
    breaker = np.broadcast_to(np.asarray(circuits.breaker), spectra.shape[:-1])
    nb = int(breaker.max()) + 1 if breaker.size else 0
    ln, ll, tp = connection_masks(circuits)
    orders_all = all_orders(np.asarray(circuits.orders, dtype=int))
    rot = three_wire_rotation(orders_all)  # (3, H)
    p = np.clip(np.asarray(circuits.phase_p), 0, 2)
    q = np.clip(np.asarray(circuits.phase_q), 0, 2)
    # per row: +E on line p (1- and 2-pole), -E on line q (2-pole), R_k·E on every
    # line k (3-pole): sums over (breaker, line) bins, the incidence of tri.engine.phasors
    labels = np.concatenate(
        [np.where(ln | ll, 3 * breaker + p, -1), np.where(ll, 3 * breaker + q, -1)], axis=-1
    )
    signed = np.concatenate([spectra, -spectra], axis=-2)
    lines = sum_by_label(labels, signed, 3 * nb)
    lines = lines.reshape(*breaker.shape[:-1], nb, 3, spectra.shape[-1])
    if np.any(tp):
        three = sum_by_label(np.where(tp, breaker, -1), spectra, nb)  # (..., nb, H)
        lines = lines + three[..., None, :] * rot
    return lines


def group_neutral_spectra(circuits: CircuitArrays, spectra: np.ndarray) -> np.ndarray:
    """Current in each shared neutral conductor, at every order.

    Parameters
    ----------
    circuits : CircuitArrays
        Rows with ``neutral_group`` numbers (..., n).
    spectra : complex ndarray, shape (..., n, H)
        :func:`element_spectra`.

    Returns
    -------
    complex ndarray, shape (..., G, H)
        ``I_g,h = Σ_{r∈g} E_r,h`` over the group's line-to-neutral rows [A].
    """
    group = np.asarray(circuits.neutral_group)
    count = int(group.max()) + 1 if group.size else 0
    ln, _, _ = connection_masks(circuits)
    labels = np.broadcast_to(np.where(ln, group, -1), spectra.shape[:-1])
    return sum_by_label(labels, spectra, max(count, 0))


def shared_neutral_finding(name: str, common_trip: bool, rms_a: float) -> Finding | None:
    """The NEC 210.4(B) finding for a shared neutral whose legs do not trip together.

    Parameters
    ----------
    name : str
        How the report names the group.
    common_trip : bool
        True for a multi-pole breaker or single-pole breakers all handle-tied.
    rms_a : float
        True-RMS current in the shared neutral [A].

    Returns
    -------
    Finding or None
        ``None`` when the legs trip together.
    """
    if common_trip:
        return None
    return Finding(
        "warning",
        f"Shared neutral {name} ({rms_a:.1f} A RMS): its single-pole breakers are not marked "
        "handle-tied or common-trip, so one leg can be switched off while the neutral still "
        "carries the others' current. Tie the handles or use a multi-pole breaker; then set "
        "handle_tied = true on each leg.",
        SHARED_NEUTRAL_SOURCE,
    )
