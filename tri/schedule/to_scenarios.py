"""A schedule's ``use`` factors as engine scenarios, and the panel analysed in each.

Every name used in any circuit's ``use`` is a scenario (in order of first
appearance in the file); a circuit that does not name it is at 1.0. The
connected load (every factor 1.0, what the schedule says without ``use``)
is analysed as it always was; :func:`analyse_cases` puts it first so that
adding scenarios to a schedule can only add figures to check, never hide one.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tri.engine.loading import FindingLimits
from tri.engine.results import PanelAnalysis
from tri.engine.scenarios import ScenarioSet, analyse_scenarios
from tri.schedule.model import Schedule
from tri.schedule.to_engine import (
    analyse_schedule,
    circuit_arrays,
    circuit_labels,
    element_rows,
    per_circuit,
    ratings,
    supply_impedance,
    system_voltages,
)

#: Name of the case with every use factor at 1.0.
CONNECTED = "connected"


def scenario_names(schedule: Schedule) -> tuple[str, ...]:
    """Every scenario named in any circuit's ``use``, in order of first appearance."""
    seen: dict[str, None] = {}
    for c in schedule.circuits:
        for name, _ in c.use:
            seen.setdefault(name, None)
    return tuple(seen)


def scenario_set(schedule: Schedule, names: tuple[str, ...] | None = None) -> ScenarioSet:
    """The schedule's scenarios as an engine :class:`ScenarioSet` (S may be 0).

    ``factors[s, i]`` is circuit ``i``'s share in scenario ``s``: its ``use``
    value, or 1.0 when it names no such scenario. ``names``: these scenarios
    in this order (a building's, :mod:`tri.schedule.tree_scenarios`);
    default the schedule's own.
    """
    names = scenario_names(schedule) if names is None else tuple(names)
    factors = np.ones((len(names), len(schedule.circuits)))
    for i, c in enumerate(schedule.circuits):
        for name, value in c.use:
            if name in names:
                factors[names.index(name), i] = value
    return ScenarioSet(names, factors)


@dataclass(frozen=True)
class Case:
    """The panel in one case: the connected load or a named scenario.

    Attributes
    ----------
    name : str
        ``"connected"`` or the scenario's name.
    connected : bool
        True for the connected load.
    analysis : PanelAnalysis
    """

    name: str
    connected: bool
    analysis: PanelAnalysis


def analyse_cases(
    schedule: Schedule,
    connected: PanelAnalysis | None = None,
    *,
    iterate_voltage: bool = False,
    continuous_factor: float | None = None,
    limits: FindingLimits | None = None,
) -> tuple[Case, ...]:
    """The connected load and every scenario, analysed.

    Parameters
    ----------
    schedule : Schedule
    connected : PanelAnalysis, optional
        The connected-load analysis when already made (saves a run).
    iterate_voltage, continuous_factor, limits
        As for :func:`tri.schedule.to_engine.analyse_schedule`.

    Returns
    -------
    tuple of Case
        The connected load first, then each scenario; only the connected
        load when the schedule names none.
    """
    if connected is None:
        connected = analyse_schedule(
            schedule,
            iterate_voltage=iterate_voltage,
            continuous_factor=continuous_factor,
            limits=limits,
        )
    cases = [Case(CONNECTED, True, connected)]
    scenarios = scenario_set(schedule)
    if scenarios.count == 0:
        return tuple(cases)
    # one engine row per leg (breakers with several legs): each row takes its circuit's factor
    row_circuit = [i for i, _ in element_rows(schedule)]
    per_row = ScenarioSet(scenarios.names, scenarios.factors[:, row_circuit])
    analyses = analyse_scenarios(
        circuit_arrays(schedule),
        per_row,
        system_voltages(schedule),
        ratings(schedule, continuous_factor),
        supply_impedance(schedule),
        iterate_voltage=iterate_voltage,
        phase_labels=schedule.labels,
        limits=limits,
        circuit_labels=circuit_labels(schedule),
    )
    cases.extend(
        Case(n, False, per_circuit(a, schedule))
        for n, a in zip(scenarios.names, analyses, strict=True)
    )
    return tuple(cases)
