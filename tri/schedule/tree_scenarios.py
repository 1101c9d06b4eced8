"""Scenarios of a building: every panel's ``use`` factors, the whole tree analysed in each.

A building's scenarios are every name used in any ``use`` table of any of
its panels (root first, then each panel in the tree's order, each name at
its first appearance), as one panel's are the names of its own circuits
(:mod:`tri.schedule.to_scenarios`). In a scenario every circuit of every
panel draws its scheduled load times its use factor (1.0 where its ``use``
names no such scenario), and the tree is rolled up again: a sub-panel's
night loads change its parent's night figures, whether or not the parent
names the scenario. The connected load (every factor 1.0) comes first, so
adding scenarios can only add figures to judge, never hide one.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from tri.engine.tree_inputs import TreeInputs
from tri.schedule.model import Schedule
from tri.schedule.to_engine import element_rows
from tri.schedule.to_scenarios import CONNECTED
from tri.schedule.tree import ScheduleTree


def building_scenario_names(tree: ScheduleTree) -> tuple[str, ...]:
    """Every scenario named in any panel's ``use``, in order of first appearance."""
    seen: dict[str, None] = {}
    for p in tree.panels:
        for c in p.schedule.circuits:
            for name, _ in c.use:
                seen.setdefault(name, None)
    return tuple(seen)


def row_factors(schedule: Schedule, name: str) -> np.ndarray:
    """Each engine row's share of its load in scenario ``name`` (1.0 where not named) [-].

    One value per row of :func:`tri.schedule.to_engine.element_rows`: the
    legs of a breaker take their circuit's factor.
    """
    per_circuit = [dict(c.use).get(name, 1.0) for c in schedule.circuits]
    return np.array([per_circuit[i] for i, _ in element_rows(schedule)], dtype=float)


def scenario_inputs(tree: ScheduleTree, inputs: TreeInputs, name: str) -> TreeInputs:
    """The building's engine inputs with every panel's loads scaled for scenario ``name``.

    Parameters
    ----------
    tree : ScheduleTree
        The panels, in the order of ``inputs.nodes``.
    inputs : TreeInputs
        The connected load (:func:`tri.schedule.tree_to_engine.tree_inputs`).
    name : str
        A scenario of :func:`building_scenario_names`.
    """
    nodes = []
    for node, p in zip(inputs.nodes, tree.panels, strict=True):
        c = node.circuits
        scaled = dataclasses.replace(c, s_va=np.asarray(c.s_va) * row_factors(p.schedule, name))
        nodes.append(dataclasses.replace(node, circuits=scaled))
    return dataclasses.replace(inputs, nodes=tuple(nodes))


def case_names(tree: ScheduleTree) -> tuple[str, ...]:
    """``"connected"`` then every scenario of the building (just the first without any)."""
    return (CONNECTED, *building_scenario_names(tree))
