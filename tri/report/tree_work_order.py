"""A building rebalancer suggestion in words: the status, the figures, one work order per panel.

The steps of each panel are the single-panel work order's sentences
(:func:`tri.report.work_order.work_order`), numbered from 1 in each panel:
every panel is its own job (its own lock-out). The status words say
exactly what was proven, about relocations over the panels searched.

JSON (``tri suggest PARENT --format json``)::

    {"status", "status_text", "objective", "relocations", "bound",
     "bound_unit": "moves", "target_pct", "child_target_pct", "target_met",
     "max_moves", "neutral_max_a", "stopped", "service": {"file", "panel"},
     "panels": [{"file", "panel", "depth", "fed_from", "target_pct",
                 "target_met", "relocations", "before", "after",
                 "moves": [{"circuit", "from_slot", "to_slot", "from_phases",
                            "to_phases", "poles", "changes_phase",
                            "set_aside_first", "shared_neutral_group"}],
                 "work_order": [{"step", "action", "circuit", "text"}]}],
     "above": [{"file", "panel", "before", "after"}], "notes", "caution",
     "cases", "deciding_case", "deciding_text"}

``shared_neutral_group`` (only on the breakers of a shared-neutral group,
which move as one block and count as one relocation) names the group;
``relocations`` counts such a group once. ``before``/``after`` are the
engine's figures of the panel in the building
(everything it feeds included): ``phases_rms_a`` by the panel's labels,
``neutral_rms_a``, ``max_deviation_pct``, ``limits``. ``stopped`` is
``"time limit"``, ``"cancelled"`` or null. ``neutral_max_a`` is the
limit asked on the service's neutral RMS current (null without); with one,
``target_met`` includes it. Numbers are SI (A, %).

With ``use`` scenarios in the building every target holds in every case
(the connected load, every factor 1.0, then each scenario): ``cases`` lists
their names (``["connected"]`` without scenarios), each panel has
``"cases": [{"name", "deciding", "before", "after"}]`` (its figures in
every case; ``deciding`` marks its largest deviation after the moves;
empty without scenarios) and ``before``/``after`` are the connected
load's; ``deciding_case`` is ``{"case", "panel", "file", "deviation_pct",
"target_pct"}``, the case and panel nearest to (or furthest over) its
target after the moves, or null without scenarios; ``deciding_text`` says
it in words (null without).
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from typing import Any, cast

from rich.console import RenderableType
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from tri.rebalance import Figures, Move, Suggestion, WorkStep
from tri.rebalance.tree_results import PanelPlan, TreeSuggestion
from tri.report.data import num
from tri.report.text_report import plain_text, to_ascii
from tri.report.tree_figures import figures_table
from tri.report.work_order import GROUP_COUNT, WorkLine, fixed, moves_count_words, work_order
from tri.schedule.model import Schedule
from tri.words import plural


@dataclass(frozen=True)
class _PanelWork:
    """What :func:`tri.report.work_order.work_order` reads of a suggestion: moves and steps."""

    moves: tuple[Move, ...]
    steps: tuple[WorkStep, ...]


def panel_steps(p: PanelPlan, before: Schedule) -> tuple[WorkLine, ...]:
    """One panel's numbered steps, in the single-panel work order's words."""
    return work_order(cast(Suggestion, _PanelWork(p.moves, p.steps)), before)


def tree_status_words(s: TreeSuggestion) -> str:
    """The status as a sentence: exactly what was proven about the relocations searched."""
    budget = f" with at most {plural(s.max_moves, 'relocation')}" if s.max_moves is not None else ""
    where = "in the panels searched" if len(s.panels) > 1 else "in this panel"
    every = " in every case" if len(s.case_names) > 1 else ""
    lim = s.neutral_max_a
    neutral = "" if lim is None else f" and the neutral limit of {lim:g} A at {s.service.panel}"
    stop = {"cancelled": "stopped by the user", "time limit": "in the time limit"}.get(
        s.stopped or "", "in the search"
    )
    if s.status == "already-balanced":
        return (
            f"already balanced: every panel meets its target{neutral}{every} as it is; "
            "no move needed"
        )
    if s.status == "optimal":
        fewer = "fewer breakers relocated"
        if has_groups(s):
            fewer = f"fewer relocations ({GROUP_COUNT})"
        return (
            f"optimal: proven that no plan with {fewer} {where} meets every target{neutral}{every}"
        )
    if s.status == "infeasible":
        return (
            f"targets out of reach (proven): no plan{budget} brings every panel within its "
            f"target{neutral}{every}; nothing is proposed"
        )
    bound = s.bound or 0
    proven = (
        f"proven: no plan with fewer than {plural(bound, 'relocation')} meets every "
        f"target{neutral}{every}"
        if bound > 0
        else "no lower bound on the relocations was proven"
    )
    if s.relocations or s.target_met:
        return f"best found {stop}, not proven optimal; {proven}"
    return (
        f"no plan{budget} meeting every target{neutral}{every} was found {stop} (not proven "
        f"impossible); {proven}; nothing is proposed"
    )


def has_groups(s: TreeSuggestion) -> bool:
    """Some panel searched has a shared-neutral group: the search counts a group moved as one
    block as one relocation (:mod:`tri.rebalance.units`), so claims say relocations."""
    return any(c.shared_neutral is not None for p in s.panels for c in p.schedule.circuits)


def tree_deciding_words(s: TreeSuggestion) -> str | None:
    """Every case judged and the one that decides after the moves; None without scenarios."""
    found = s.deciding
    if found is None:
        return None
    name, p = found
    dev = next(c for c in p.cases if c.name == name).after.max_deviation_pct
    when = "after the moves" if s.relocations else "as it is"
    return (
        f"Judged in every case ({', '.join(s.case_names)}; connected = every use factor "
        f"1.0). Deciding case {when}: {name}, at {p.panel} (deviation "
        f"{fixed(dev, 2)}\u00a0% against its target of {p.target_pct:g}\u00a0%)."
    )


def _figures(f: Figures, labels: tuple[str, str, str]) -> dict[str, Any]:
    return {
        "phases_rms_a": {lab: num(v) for lab, v in zip(labels, f.phases_rms_a, strict=True)},
        "neutral_rms_a": num(f.neutral_rms_a),
        "max_deviation_pct": num(f.max_deviation_pct),
        "limits": list(f.limits),
    }


def _moves(p: PanelPlan, before: Schedule) -> list[dict[str, Any]]:
    aside = {st.circuit_index for st in p.steps if st.action == "take-out"}

    def phases(ph: tuple[int, ...] | None) -> str | None:
        return None if ph is None else before.phase_text(ph)

    return [
        {
            "circuit": m.circuit,
            "from_slot": m.from_slot,
            "to_slot": m.to_slot,
            "from_phases": phases(m.from_phases),
            "to_phases": phases(m.to_phases),
            "poles": m.poles,
            "changes_phase": m.changes_phase,
            "set_aside_first": m.circuit_index in aside,
            **({"shared_neutral_group": m.group} if m.group is not None else {}),
        }
        for m in p.moves
    ]


def tree_suggestion_data(
    s: TreeSuggestion, before: tuple[Schedule, ...], caution: str
) -> dict[str, Any]:
    """The JSON of the module notes as a plain dict.

    Parameters
    ----------
    s : TreeSuggestion
    before : tuple of Schedule
        Every panel's schedule as it was, in the building's order (labels, names).
    caution : str
    """
    panels = []
    for p in s.panels:
        sched = before[p.index]
        panels.append(
            {
                "file": p.file,
                "panel": p.panel,
                "depth": p.depth,
                "fed_from": p.parent_file,
                "target_pct": num(p.target_pct),
                "target_met": p.target_met,
                "relocations": p.relocations,
                "before": _figures(p.before, sched.labels),
                "after": _figures(p.after, sched.labels),
                "cases": [
                    {
                        "name": c.name,
                        "deciding": c.name == p.deciding,
                        "before": _figures(c.before, sched.labels),
                        "after": _figures(c.after, sched.labels),
                    }
                    for c in p.cases
                ],
                "moves": _moves(p, sched),
                "work_order": [
                    {"step": w.number, "action": w.action, "circuit": w.circuit, "text": w.sentence}
                    for w in panel_steps(p, sched)
                ],
            }
        )
    labels = ("A", "B", "C")
    return {
        "status": s.status,
        "status_text": tree_status_words(s),
        "objective": s.objective,
        "relocations": s.relocations,
        "bound": s.bound,
        "bound_unit": "moves",
        "target_pct": num(s.target_pct),
        "child_target_pct": num(s.child_target_pct),
        "target_met": s.target_met,
        "max_moves": s.max_moves,
        "neutral_max_a": None if s.neutral_max_a is None else num(s.neutral_max_a),
        "stopped": s.stopped,
        "service": {"file": s.service.file, "panel": s.service.panel},
        "panels": panels,
        "above": [
            {
                "file": a.file,
                "panel": a.panel,
                "before": _figures(a.before, labels),
                "after": _figures(a.after, labels),
            }
            for a in s.above
        ],
        "notes": list(s.notes),
        "caution": caution,
        "cases": list(s.case_names),
        "deciding_case": _deciding_data(s),
        "deciding_text": tree_deciding_words(s),
    }


def _deciding_data(s: TreeSuggestion) -> dict[str, Any] | None:
    found = s.deciding
    if found is None:
        return None
    name, p = found
    return {
        "case": name,
        "panel": p.panel,
        "file": p.file,
        "deviation_pct": num(next(c for c in p.cases if c.name == name).after.max_deviation_pct),
        "target_pct": num(p.target_pct),
    }


def render_tree_json(data: dict[str, Any]) -> str:
    """Strict JSON text (two-space indent, newline at the end)."""
    return json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def _work(
    s: TreeSuggestion, before: tuple[Schedule, ...], ascii_only: bool
) -> list[RenderableType]:
    moving = [p for p in s.panels if p.moves]
    if not moving:
        return [Text("No breaker moves are proposed.")]
    out: list[RenderableType] = [
        Text(
            f"Work order ({moves_count_words(*(p.moves for p in moving))} in "
            f"{plural(len(moving), 'panel')}), for a qualified person to review; each panel "
            "is its own job:"
        )
    ]
    for p in moving:
        sched = before[p.index]
        kind = "slots" if sched.panel.uses_slots else "rail board: circuits change phases"
        out.append(Text(f"{p.panel} ({p.file}): {moves_count_words(p.moves)}; {kind}"))
        steps = Table.grid(padding=(0, 1))
        steps.add_column(justify="right", no_wrap=True)
        steps.add_column()
        for w in panel_steps(p, sched):
            steps.add_row(f"{w.number}.", to_ascii(w.sentence) if ascii_only else w.sentence)
        out.append(steps)
    still = [f"{p.panel} ({p.file})" for p in s.panels if not p.moves]
    if still:
        out.append(Text("No moves in: " + "; ".join(still) + "."))
    out.append(
        Text(
            "Before any move: de-energise and lock out the panel being worked on and prove it "
            "dead. For each moved circuit check that its conductors reach the new position and "
            "that the breaker suits it; afterwards update that panel's directory and measure the "
            "phase and neutral currents again, in it and in the panels that feed it (their "
            "currents change with it) (common practice)."
        )
    )
    return out


def tree_renderables(
    s: TreeSuggestion,
    before: tuple[Schedule, ...],
    caution: str,
    *,
    ascii_only: bool = False,
    width: int = 80,
) -> list[RenderableType]:
    """The sections as Rich renderables (print them in order) for a console ``width`` wide."""
    rule = "-" if ascii_only else "─"
    out: list[RenderableType] = [
        Text(f"Proposed breaker moves across a building: {s.service.panel}", style="bold"),
        Text(f"Caution: {caution}"),
        Rule(characters=rule),
        Text(f"Status: {tree_status_words(s)}."),
        Text(f"Minimised: {s.objective}."),
        Text(
            "Figures from the engine on the building before and after (estimates; each panel "
            "with everything it feeds):"
        ),
        figures_table(s, ascii_only, width),
    ]
    deciding = tree_deciding_words(s)
    if deciding:
        out.append(Text(deciding + " (* marks each panel's worst case.)"))
    load = ", connected load" if len(s.case_names) > 1 else ""
    for a in s.above:
        out.append(
            Text(
                f"Not searched (above {s.service.panel}{load}): {a.panel} ({a.file}), deviation "
                f"{fixed(a.before.max_deviation_pct, 2)} % before, "
                f"{fixed(a.after.max_deviation_pct, 2)} % after."
            )
        )
    for p in s.panels:
        if p.after.limits:
            out.append(
                Text(
                    f"Still over a rating in {p.panel} after the moves (balancing alone does not "
                    "fix it; see tri report): " + " ".join(p.after.limits)
                )
            )
    out.append(Rule(characters=rule))
    out.extend(_work(s, before, ascii_only))
    for note in s.notes:
        out.append(Text(f"Note: {note}."))
    out.append(Rule(characters=rule))
    out.append(Text(f"Caution: {caution}"))
    if ascii_only:
        out = [Text(to_ascii(x.plain)) if isinstance(x, Text) else x for x in out]
    return out


def render_tree_text(
    s: TreeSuggestion,
    before: tuple[Schedule, ...],
    caution: str,
    *,
    width: int = 80,
    ascii_only: bool = False,
) -> str:
    """The work order as plain text (no colour), lines without trailing spaces."""
    return plain_text(
        tree_renderables(s, before, caution, ascii_only=ascii_only, width=width), width
    )
