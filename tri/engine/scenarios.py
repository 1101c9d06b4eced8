"""Scenarios: the same panel with each circuit's load scaled by a use factor.

A scenario set is an extra leading axis of load multipliers: ``factors``
has shape ``(S, n)`` (scenario, circuit), and :func:`scale_circuits` turns
one panel's ``(n,)`` arrays into a batch of ``(S, n)`` that
:func:`tri.engine.analysis.analyse_batch` (and anything else that takes a
batch, such as a rebalancer meeting its target in every scenario at once)
handles as it is. Harmonic spectra are relative to each circuit's own
fundamental, so they scale with it.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from tri.engine.analysis import analyse
from tri.engine.inputs import CircuitArrays, Ratings, SupplyImpedance, SystemVoltages
from tri.engine.loading import FindingLimits
from tri.engine.results import PanelAnalysis


@dataclass(frozen=True, eq=False)
class ScenarioSet:
    """Named scenarios as load multipliers.

    Attributes
    ----------
    names : tuple of str
        Scenario names, in order (S).
    factors : float ndarray, shape (S, n)
        Share of each circuit's scheduled load in each scenario [-].
    """

    names: tuple[str, ...]
    factors: np.ndarray

    def __post_init__(self) -> None:
        f = np.asarray(self.factors, dtype=float)
        if f.ndim != 2 or f.shape[0] != len(self.names):
            raise ValueError(f"factors must have shape ({len(self.names)}, n), got {f.shape}")
        if not np.all(np.isfinite(f)) or np.any(f < 0):
            raise ValueError("use factors must be finite and 0 or more")
        object.__setattr__(self, "factors", f)

    @property
    def count(self) -> int:
        """Number of scenarios (S)."""
        return len(self.names)


def scale_circuits(circuits: CircuitArrays, factors: np.ndarray) -> CircuitArrays:
    """One panel's circuits as a batch, one row of multipliers per scenario.

    Parameters
    ----------
    circuits : CircuitArrays
        Shape (n,).
    factors : float ndarray, shape (S, n)
        Multipliers on each circuit's complex power [-].

    Returns
    -------
    CircuitArrays
        Shape (S, n): ``s_va`` scaled, everything else repeated.
    """
    f = np.asarray(factors, dtype=float)
    n = circuits.n_circuits
    if f.ndim != 2 or f.shape[1] != n:
        raise ValueError(f"factors must have shape (S, {n}), got {f.shape}")
    s = f.shape[0]

    def rep(x: np.ndarray) -> np.ndarray:
        return np.broadcast_to(np.asarray(x), (s, *np.shape(x))).copy()

    per_circuit = {name: rep(getattr(circuits, name)) for name in _per_circuit_fields(circuits)}
    return dataclasses.replace(circuits, s_va=np.asarray(circuits.s_va) * f, **per_circuit)


def _per_circuit_fields(circuits: CircuitArrays) -> list[str]:
    """Names of the per-circuit arrays besides ``s_va`` (whatever fields CircuitArrays gains)."""
    shape = np.shape(circuits.s_va)
    return [
        fld.name
        for fld in dataclasses.fields(circuits)
        if fld.name not in ("s_va", "orders")
        and np.shape(getattr(circuits, fld.name))[: len(shape)] == shape
    ]


def analyse_scenarios(
    circuits: CircuitArrays,
    scenarios: ScenarioSet,
    system: SystemVoltages,
    ratings: Ratings,
    supply: SupplyImpedance | None = None,
    *,
    iterate_voltage: bool = False,
    phase_labels: tuple[str, str, str] = ("A", "B", "C"),
    limits: FindingLimits | None = None,
    circuit_labels: tuple[str, ...] | None = None,
) -> tuple[PanelAnalysis, ...]:
    """The full analysis (figures and findings) of the panel in each scenario.

    Parameters
    ----------
    circuits : CircuitArrays
        One panel, shape (n,).
    scenarios : ScenarioSet
    system, ratings, supply, iterate_voltage, phase_labels, limits, circuit_labels
        As for :func:`tri.engine.analysis.analyse` (site readings belong to
        no scenario and are left out).

    Returns
    -------
    tuple of PanelAnalysis
        One per scenario, in ``scenarios.names`` order.
    """
    batch = scale_circuits(circuits, scenarios.factors)
    out = []
    for k in range(scenarios.count):
        one = dataclasses.replace(
            batch,
            s_va=batch.s_va[k],
            **{name: getattr(batch, name)[k] for name in _per_circuit_fields(batch)},
        )
        out.append(
            analyse(
                one,
                system,
                ratings,
                supply,
                None,
                iterate_voltage=iterate_voltage,
                phase_labels=phase_labels,
                limits=limits,
                circuit_labels=circuit_labels,
            )
        )
    return tuple(out)
