"""Turn a building (a :class:`~tri.schedule.tree.ScheduleTree`) into the engine's tree inputs.

The one bridge between the schedule files of a building and
:mod:`tri.engine.tree_results`, as :mod:`tri.schedule.to_engine` is for one
panel: each panel's circuits, system and ratings as for a panel alone, each
feeder circuit as the link to the panel it feeds, and the root's
``[supply]`` behind the whole tree. A child's own ``[supply]`` table (what
feeds it when it is analysed alone) is not used in the building; a finding
says so.
"""

from __future__ import annotations

import dataclasses

from tri.engine.loading import FindingLimits
from tri.engine.results import Finding
from tri.engine.transformer import TransformerLink, parse_vector_group
from tri.engine.tree import Progress
from tri.engine.tree_inputs import PanelLink, TreeInputs, TreeNode
from tri.engine.tree_results import TreeAnalysis, analyse_tree
from tri.schedule.to_engine import (
    circuit_arrays,
    circuit_labels,
    measured,
    per_circuit,
    ratings,
    system_voltages,
)
from tri.schedule.tree import ScheduleTree


def _link(tree: ScheduleTree, index: int) -> PanelLink | None:
    p = tree.panels[index]
    c = tree.feeder_circuit(index)
    if c is None or c.feed is None:
        return None
    assert p.parent is not None and p.feeder_index is not None
    spec = c.feed.transformer
    tx = None
    if spec is not None:
        tx = TransformerLink(spec.kva, spec.z_pct, spec.x_r, parse_vector_group(spec.connection))
    return PanelLink(p.parent, p.feeder_index, c.feed.feeder, tx)


def tree_inputs(tree: ScheduleTree, continuous_factor: float | None = None) -> TreeInputs:
    """The engine's inputs for every panel of the building, root first."""
    nodes = tuple(
        TreeNode(
            circuit_arrays(p.schedule),
            system_voltages(p.schedule),
            ratings(p.schedule, continuous_factor),
            _link(tree, i),
        )
        for i, p in enumerate(tree.panels)
    )
    return TreeInputs(nodes, supply=tree.root.schedule.supply)


def _unused_supply(tree: ScheduleTree, index: int) -> Finding:
    parent = tree.panels[tree.panels[index].parent or 0]
    return Finding(
        "info",
        f"This panel's [supply] table (what feeds it when analysed alone) is not used here: "
        f"in the building it is fed from {parent.schedule.panel.name} ({parent.shown}).",
        "tri roll-up (the feeder circuit describes the supply)",
    )


def analyse_building(
    tree: ScheduleTree,
    *,
    iterate_voltage: bool = False,
    continuous_factor: float | None = None,
    limits: FindingLimits | None = None,
    progress: Progress | None = None,
    scenario: str | None = None,
) -> TreeAnalysis:
    """Run the engine on a building: every panel's figures with everything it feeds.

    Parameters
    ----------
    tree : ScheduleTree
        From :func:`tri.schedule.tree.load_tree`.
    iterate_voltage : bool
        Solve every load as constant power at its panel's voltage.
    continuous_factor : float
        Multiplier on continuous loads for the sizing check [-].
    limits : FindingLimits, optional
    progress : callable, optional
        ``progress(sweep, step)`` during the iteration.
    scenario : str, optional
        Analyse the building in this scenario: every panel's loads times
        their use factors (:mod:`tri.schedule.tree_scenarios`); site readings
        belong to no scenario and are left out. None: the connected load.
    """
    inputs = tree_inputs(tree, continuous_factor)
    readings = tuple(measured(p.schedule) for p in tree.panels)
    if scenario is not None:
        from tri.schedule.tree_scenarios import scenario_inputs

        inputs = scenario_inputs(tree, inputs, scenario)
        readings = tuple(None for _ in tree.panels)
    result = analyse_tree(
        inputs,
        readings=readings,
        phase_labels=tuple(p.schedule.labels for p in tree.panels),
        circuit_labels=tuple(circuit_labels(p.schedule) for p in tree.panels),
        iterate_voltage=iterate_voltage,
        limits=limits,
        progress=progress,
    )
    nodes = list(result.nodes)
    for i, p in enumerate(tree.panels):
        # one current per circuit (a breaker's largest pole) and the shared-neutral
        # findings, as for the panel alone
        a = per_circuit(nodes[i].analysis, p.schedule)
        if i > 0 and p.schedule.supply is not None:
            a = dataclasses.replace(a, findings=(*a.findings, _unused_supply(tree, i)))
        nodes[i] = dataclasses.replace(nodes[i], analysis=a)
    return dataclasses.replace(result, nodes=tuple(nodes))
