"""Report of a building: the root panel's report, every panel's own, and the feeders between.

:func:`building_data` turns a :class:`~tri.engine.tree_results.TreeAnalysis`
into plain data. The top level is the root panel's report exactly as for
one panel (:func:`tri.report.data.report_data`, the report contract), its
figures including everything the root feeds, plus one added key:

``building``
    ``iterated`` (bool), ``panel_count``, ``scenarios`` (the building's
    scenario names, every ``use`` name of any panel; empty without), and
    ``panels``: every panel, root
    first and each parent before its children, each with ``file`` (as the
    feeder names it, joined to its parent's folder), ``name``, ``depth``
    (0 for the root), ``parent`` (its parent's ``file`` or ``None``),
    ``children`` (their ``file``), ``feeder`` (``None`` for the root) and
    ``report`` (that panel's report, the same shape as the top level,
    its figures including everything it feeds; for a fed panel ``supply``
    is ``None``, its own ``[supply]`` table not being used, and
    ``voltage.source`` says in words where its voltage comes from; with
    scenarios, ``scenarios`` as for one panel: that panel's figures, what it
    feeds included, in the connected load and each scenario of the
    building, and the case that decides each).

``feeder`` of a panel: ``circuit`` (the parent's feeder circuit: ``name``,
``slot``, ``breaker_a``), ``conductors`` (the ``feeder`` table as given:
``length_m`` [m], ``r_ohm_per_km`` ... [Ω/km]), ``current`` {phase of the
parent: {``current_a``, ``current_deg``, ``rms_a``}} (what the panel draws
at the parent, in the parent's phase order and frame) [A, deg],
``neutral_rms_a`` [A] (0 where a transformer keeps zero sequence out),
``z_phase_ohm`` and ``z_neutral_ohm`` {r, x} (the link referred to the
panel, in the panel's voltage model) [Ω], and ``transformer`` (``None``
without one) {``connection`` (as written), ``vector_group`` (with its
clock number), ``kva``, ``z_pct``, ``x_r``, ``secondary`` (system),
``rated_a`` [A], ``secondary_rms_a`` {phase: A}, ``loading_pct`` [%],
``delta_circulating_a`` [A] (``None`` without a delta primary)}.

In every panel's ``circuits``, a feeder circuit has ``feeds`` (the file it
feeds); other circuits have ``feeds`` ``None``. Its ``current_a`` and
``rms_a`` are the largest of its three line currents.
"""

from __future__ import annotations

from typing import Any

from tri.engine.limits import DESIGN_HEADROOM_PCT
from tri.engine.tree_results import FeederResult, TreeAnalysis
from tri.report.data import num, report_data
from tri.report.over_time_data import scenarios_data
from tri.schedule.to_scenarios import CONNECTED, Case
from tri.schedule.tree import ScheduleTree


def _feeder(f: FeederResult, tree: ScheduleTree, index: int) -> dict[str, Any]:
    parent = tree.panels[tree.panels[index].parent or 0].schedule
    circuit = tree.feeder_circuit(index)
    assert circuit is not None and circuit.feed is not None
    labels = parent.labels
    child_labels = tree.panels[index].schedule.labels
    tx = None
    if f.transformer is not None:
        t, spec = f.transformer, circuit.feed.transformer
        assert spec is not None
        tx = {
            "connection": spec.connection,
            "vector_group": t.group,
            "kva": num(t.kva),
            "z_pct": num(spec.z_pct),
            "x_r": num(spec.x_r),
            "secondary": spec.secondary,
            "rated_a": num(t.rated_a),
            "secondary_rms_a": {
                lab: num(x) for lab, x in zip(child_labels, t.secondary_rms_a, strict=True)
            },
            "loading_pct": num(t.loading_pct),
            "delta_circulating_a": num(t.delta_circulating_a),
        }
    return {
        "circuit": {
            "name": circuit.name,
            "slot": circuit.slot,
            "breaker_a": num(circuit.breaker_a),
        },
        "conductors": {k: num(v) for k, v in vars(circuit.feed.feeder).items()},
        "current": {
            lab: {"current_a": num(p.magnitude), "current_deg": num(p.deg), "rms_a": num(r)}
            for lab, p, r in zip(labels, f.current, f.rms_a, strict=True)
        },
        "neutral_rms_a": num(f.neutral_rms_a),
        "z_phase_ohm": {"r": num(f.z_phase_ohm.real), "x": num(f.z_phase_ohm.imag)},
        "z_neutral_ohm": {"r": num(f.z_neutral_ohm.real), "x": num(f.z_neutral_ohm.imag)},
        "transformer": tx,
    }


def _source_text(tree: ScheduleTree, index: int) -> str:
    """Where a fed panel's voltage comes from, in words."""
    p = tree.panels[index]
    assert p.parent is not None
    parent = tree.panels[p.parent]
    circuit = tree.feeder_circuit(index)
    assert circuit is not None and circuit.feed is not None
    f = circuit.feed.feeder
    text = f"{parent.schedule.panel.name}'s panel voltage less the feeder ({f.length_m:g} m)"
    tx = circuit.feed.transformer
    if tx is not None:
        text += f" and a {tx.kva:g} kVA {tx.z_pct:g} % X/R {tx.x_r:g} {tx.connection} transformer"
    return text


def building_data(
    result: TreeAnalysis,
    tree: ScheduleTree,
    *,
    caution: str,
    scenarios: tuple[tuple[str, TreeAnalysis], ...] = (),
    headroom_pct: float = DESIGN_HEADROOM_PCT,
) -> dict[str, Any]:
    """The report of a building as plain data (module docstring for the keys).

    Parameters
    ----------
    result : TreeAnalysis
        From :func:`tri.schedule.tree_to_engine.analyse_building` (the connected load).
    tree : ScheduleTree
        The panels it was computed from, in the same order.
    caution : str
        Safety caution carried with every panel's figures.
    scenarios : tuple of (name, TreeAnalysis)
        The building in each named scenario
        (:mod:`tri.schedule.tree_scenarios`); each panel's report then has
        ``scenarios`` (:func:`tri.report.over_time_data.scenarios_data`: its
        figures in every case, the worst deciding).
    headroom_pct : float
        The design headroom behind the word NEAR [%].

    Returns
    -------
    dict
        JSON-ready.
    """
    panels: list[dict[str, Any]] = []
    for i, (node, p) in enumerate(zip(result.nodes, tree.panels, strict=True)):
        report = report_data(
            node.analysis, p.schedule, caution=caution, file=p.shown, headroom_pct=headroom_pct
        )
        if p.parent is not None:
            report["supply"] = None  # its own [supply] is not used in the building
            if report["voltage"] is not None:
                report["voltage"]["source"] = _source_text(tree, i)
        for c, circuit in zip(report["circuits"], p.schedule.circuits, strict=True):
            c["feeds"] = None
            if circuit.feed is not None:
                child = next(
                    tree.panels[k].shown
                    for k in node.children
                    if tree.panels[k].feeder_index == c["number"] - 1
                )
                c["feeds"] = child
        if scenarios:
            cases = (Case(CONNECTED, True, node.analysis),)
            cases += tuple(Case(n, False, r.nodes[i].analysis) for n, r in scenarios)
            report["scenarios"] = scenarios_data(cases)
        panels.append(
            {
                "file": p.shown,
                "name": p.schedule.panel.name,
                "depth": node.depth,
                "parent": None if p.parent is None else tree.panels[p.parent].shown,
                "children": [tree.panels[k].shown for k in node.children],
                "feeder": None if node.feeder is None else _feeder(node.feeder, tree, i),
                "report": report,
            }
        )
    top = dict(panels[0]["report"])
    top["building"] = {
        "iterated": result.iterated,
        "panel_count": len(panels),
        "scenarios": [name for name, _ in scenarios],
        "panels": panels,
    }
    return top


def is_building(data: dict[str, Any]) -> bool:
    """True when report data is a building's (it has the ``building`` key)."""
    return data.get("building") is not None
