"""Top-level analysis of a panel (or a batch of panels): the entry points.

:func:`analyse_batch` does the numerics on arrays of any leading batch
shape and returns a :class:`~tri.engine.results.BatchAnalysis`;
:func:`analyse` runs the same code on one panel and adds the findings,
the readings comparison and plain-number results
(:class:`~tri.engine.results.PanelAnalysis`).

Unless ``iterate_voltage`` is set, every current is computed at nominal
voltage, as panel schedules are (``I = conj(S / V)``). With a supply and
``iterate_voltage=True`` every load draws its scheduled power at the
computed panel voltage, and all currents (fundamental and harmonics) follow
from that solution; ``PanelAnalysis.currents_basis`` says which.

References
----------
See the modules: :mod:`tri.engine.phasors`, :mod:`tri.engine.sequence`,
:mod:`tri.engine.harmonics`, :mod:`tri.engine.supply`,
:mod:`tri.engine.unbalance`, :mod:`tri.engine.loading`,
:mod:`tri.engine.readings`; the pieces assembled here:
:mod:`tri.engine.input_checks` (what is refused),
:mod:`tri.engine.batch_figures` (array figures from spectra) and
:mod:`tri.engine.describe` (plain results and findings of one panel).
"""

from __future__ import annotations

import numpy as np

from tri.engine.batch_figures import (
    SNAP_RELATIVE,
    code_figures,
    current_figures,
    snap_roundoff,
    voltage_figures,
)
from tri.engine.describe import (
    BASIS_ITERATED,
    BASIS_NOMINAL,
    SourceFigures,
    describe_panel,
)
from tri.engine.harmonics import order_currents
from tri.engine.high_leg import supply_phase_voltages
from tri.engine.input_checks import check_inputs
from tri.engine.inputs import (
    THREE_PHASE,
    UNPLACED,
    CircuitArrays,
    MeasuredReadings,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)
from tri.engine.legs import wiring_spectra
from tri.engine.limits import FindingLimits
from tri.engine.loading import continuous_weights
from tri.engine.phasors import element_currents, schedule_va
from tri.engine.results import BatchAnalysis, PanelAnalysis
from tri.engine.supply import (
    VoltageSolution,
    solve_voltages,
    supply_impedances,
    transformer_impedance,
)

#: Re-exported: other modules and tests import these names from here.
__all__ = [
    "BASIS_ITERATED",
    "BASIS_NOMINAL",
    "SNAP_RELATIVE",
    "SourceFigures",
    "analyse",
    "analyse_batch",
    "check_inputs",
    "current_figures",
    "describe_panel",
    "voltage_figures",
]


def analyse_batch(
    circuits: CircuitArrays,
    system: SystemVoltages,
    ratings: Ratings,
    supply: SupplyImpedance | None = None,
    *,
    iterate_voltage: bool = False,
    tol: float = 1e-9,
    max_iter: int = 100,
) -> BatchAnalysis:
    """Numeric analysis of one panel or a batch of panels.

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (B..., n) (``B`` may be empty); shorter panels padded with
        ``UNPLACED`` rows of zero load.
    system : SystemVoltages
        Nominal voltages, shared by the batch.
    ratings : Ratings
        Ratings, shared by the batch [A].
    supply : SupplyImpedance, optional
        Transformer and feeder; enables the voltage results.
    iterate_voltage : bool
        Solve loads as constant power at the panel voltage (needs ``supply``).
    tol, max_iter : float, int
        Iteration tolerance [pu of V_LN] and limit.

    Returns
    -------
    BatchAnalysis
        Arrays with leading shape ``B``; each panel's figures equal those of
        the panel analysed alone.
    """
    check_inputs(circuits, system, ratings)
    conn = np.asarray(circuits.connection)
    sol, i_e = _element_currents(circuits, system, supply, iterate_voltage, tol, max_iter)
    weights = continuous_weights(circuits.continuous, ratings.continuous_factor)
    oc = order_currents(circuits, i_e, weights if np.any(circuits.continuous) else None)
    if not (np.all(np.isfinite(oc.phase)) and np.all(np.isfinite(oc.circuit_rms_a))):
        raise ValueError("harmonics must be finite numbers")
    scale = np.sum(oc.circuit_rms_a, axis=-1)
    rating = ratings.main_a if ratings.main_a is not None else ratings.bus_a
    neutral_rating = ratings.neutral_a if ratings.neutral_a is not None else ratings.bus_a
    currents = current_figures(
        oc.phase, oc.neutral, oc.phase_weighted, scale, rating, neutral_rating
    )

    s_abs = np.abs(np.asarray(circuits.s_va))
    placed = conn != UNPLACED
    nonlinear = (oc.harmonic_power_pu > 0) & placed
    total_va = np.sum(np.where(placed, s_abs, 0.0), axis=-1)
    nl_va = np.sum(np.where(nonlinear, s_abs, 0.0), axis=-1)
    nl_share = np.where(total_va > 0, 100.0 * nl_va / np.where(total_va > 0, total_va, 1.0), 0.0)
    tp_triplen = np.any((conn == THREE_PHASE) & (oc.triplen_power_pu > 0), axis=-1)

    volt: dict[str, np.ndarray] = {}
    if sol is not None:
        volt = voltage_figures(sol.v_phase, system.has_neutral)
        volt.update(iterations=sol.iterations, converged=sol.converged)
    wiring = {
        k: snap_roundoff(v, scale, v.ndim - np.ndim(scale))
        for k, v in wiring_spectra(circuits, i_e).items()
    }

    return BatchAnalysis(
        orders=oc.orders,
        phase_va=schedule_va(circuits),
        circuit_current_a=oc.circuit_fundamental_a,
        circuit_rms_a=oc.circuit_rms_a,
        nonlinear_share_pct=nl_share,
        unplaced_count=np.sum((conn == UNPLACED) & (s_abs > 0), axis=-1),
        three_pole_triplens=tp_triplen,
        **currents,
        **code_figures(circuits, system, ratings, rating, nonlinear, total_va),
        **volt,
        **wiring,
    )


def _element_currents(
    circuits: CircuitArrays,
    system: SystemVoltages,
    supply: SupplyImpedance | None,
    iterate_voltage: bool,
    tol: float,
    max_iter: int,
) -> tuple[VoltageSolution | None, np.ndarray]:
    """The voltage solution (None without a supply) and the element currents [A]
    at the panel voltage, else at nominal voltage."""
    if supply is None:
        return None, element_currents(circuits, supply_phase_voltages(system))
    if system.high_leg is not None:
        raise ValueError(
            "voltages at the panel are not modelled for a high-leg delta (the supply model is "
            "a wye source)"
        )
    sol = solve_voltages(
        circuits, system, supply, iterate=iterate_voltage, tol=tol, max_iter=max_iter
    )
    return sol, sol.i_element


def analyse(
    circuits: CircuitArrays,
    system: SystemVoltages,
    ratings: Ratings,
    supply: SupplyImpedance | None = None,
    readings: MeasuredReadings | None = None,
    *,
    iterate_voltage: bool = False,
    phase_labels: tuple[str, str, str] = ("A", "B", "C"),
    limits: FindingLimits | None = None,
    circuit_labels: tuple[str, ...] | None = None,
    tol: float = 1e-9,
    max_iter: int = 100,
) -> PanelAnalysis:
    """Analyse one panel: currents, neutral, sequence, harmonics, voltages, findings.

    Parameters
    ----------
    circuits : CircuitArrays
        One panel, per-circuit arrays of shape (n,) (n may be 0).
    system : SystemVoltages
        Nominal voltages [V].
    ratings : Ratings
        Bus, main and neutral ratings [A] and the continuous factor [-].
    supply : SupplyImpedance, optional
        Transformer and feeder; without it ``voltage`` is None.
    readings : MeasuredReadings, optional
        Site readings; without them ``readings`` is None.
    iterate_voltage : bool
        With a supply, solve loads as constant power at the panel voltage
        (without one it has no effect beyond an info finding).
    phase_labels : tuple of 3 str
        Labels for results and messages (e.g. ``("L1", "L2", "L3")``).
    limits : FindingLimits, optional
        Thresholds for findings (defaults: :mod:`tri.engine.limits`).
    circuit_labels : tuple of str, optional
        How findings name each circuit row (slot or phases, and name);
        default ``"circuit 1"``, ``"circuit 2"``, ...
    tol, max_iter : float, int
        Voltage iteration tolerance [pu of V_LN] and limit.

    Returns
    -------
    PanelAnalysis

    Raises
    ------
    ValueError
        For malformed input (:func:`check_inputs`) or batched arrays.

    Notes
    -----
    :func:`analyse_batch` on a batch of one, then :func:`describe_panel`:
    plain numbers and findings, ordered limit, warning, info.
    """
    if np.ndim(circuits.s_va) != 1:
        raise ValueError("analyse() takes one panel; use analyse_batch() for a batch")
    b = analyse_batch(
        circuits,
        system,
        ratings,
        supply,
        iterate_voltage=iterate_voltage and supply is not None,
        tol=tol,
        max_iter=max_iter,
    )
    return describe_panel(
        b,
        system,
        ratings,
        None if supply is None else source_figures(supply, system),
        readings,
        iterated=iterate_voltage and supply is not None,
        iterate_requested=iterate_voltage,
        phase_labels=phase_labels,
        limits=limits,
        circuits=circuits,
        circuit_labels=circuit_labels,
    )


def source_figures(supply: SupplyImpedance, system: SystemVoltages) -> SourceFigures:
    """The impedances [Ω] and transformer full-load current [A] behind a panel."""
    z_ph, z_n = supply_impedances(supply, system)
    tx = transformer_impedance(
        supply.transformer_kva, supply.transformer_z_pct, supply.transformer_x_r, system.v_ll
    )
    return SourceFigures(complex(z_ph), complex(z_n), tx.full_load_a)
