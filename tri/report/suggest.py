"""Renderers of a rebalancer suggestion: the JSON contract and the printable work order.

The words (status, counts, floor, ratings, the numbered steps) are those
of :mod:`tri.report.work_order`, which the terminal UI's rebalance screen
uses too, so the command line's text, its JSON and the UI say the same.

JSON (``tri suggest FILE --format json``) follows the rebalancer contract in
``shared/spec/schedule-format.md``::

    {"status", "objective", "moves": [{"circuit", "from_slot", "to_slot",
     "from_phases", "to_phases"}], "before": {"phases_rms_a", "neutral_rms_a",
     "max_deviation_pct"}, "after": {...}, "bound"}

with these added keys beside them: ``status_text`` (the status in words,
exactly what was proven); ``mode``; ``bound_unit`` (``"moves"``, i.e. relocations, or
``"A"``); ``target_pct``, ``target_met``, ``neutral_max_a``, ``max_moves``;
``floor_a`` (no arrangement brings the largest phase RMS current below it);
``relocations``; per move ``poles``, ``changes_phase`` and
``set_aside_first`` (take it out before the others, install it last: a
swap), and ``shared_neutral_group`` for a breaker of a shared-neutral group
that moves as one block (the group's breakers move together and count as
one relocation); ``work_order`` (the numbered steps: ``step``, ``action``,
``circuit``, ``text``); in ``before`` and ``after``, ``limits`` (the
engine's findings at level "limit": ratings still exceeded);
``unplaced_left``; ``notes``; ``caution``; ``stopped`` (``"cancelled"`` when
Ctrl+C stopped the search and this is the best plan so far, else ``null``). With ``use`` scenarios
(``null`` / empty without): ``cases`` (one object per case, the connected
load first: ``name``, ``deciding`` (true for the case that decides after
the moves), ``before`` and ``after`` as above; the top-level ``before`` and
``after`` are the connected load's), ``deciding_case``, ``floor_case`` (the
case whose floor is ``floor_a``), ``deciding_text``. Numbers are SI (A, %), rounded
to 9 significant digits; phases by the panel's labels; ``null`` for "no
slot" or "not placed".

Text is a work order a person can follow, step by step, with the safety
caution first and last. It proposes; it never says the work may go ahead.
"""

from __future__ import annotations

import json
from typing import Any

from rich import box
from rich.console import Console, Group, RenderableType
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from tri.rebalance import Figures, Suggestion
from tri.report.data import num
from tri.report.floor_words import floor_words
from tri.report.text_report import plain_text, to_ascii
from tri.report.work_order import (
    count_words,
    deciding_words,
    fixed,
    limits_words,
    status_words,
    work_order,
)
from tri.schedule.model import Schedule


def _figures(f: Figures, labels: tuple[str, str, str]) -> dict[str, Any]:
    return {
        "phases_rms_a": {lab: num(v) for lab, v in zip(labels, f.phases_rms_a, strict=True)},
        "neutral_rms_a": num(f.neutral_rms_a),
        "max_deviation_pct": num(f.max_deviation_pct),
        "limits": list(f.limits),
    }


def _phases(schedule: Schedule, phases: tuple[int, ...] | None) -> str | None:
    return None if phases is None else schedule.phase_text(phases)


def _bound(s: Suggestion) -> float | int | None:
    if s.bound is None:
        return None
    return round(s.bound) if s.mode == "fewest-moves" else num(s.bound)


def suggestion_data(s: Suggestion, before: Schedule, caution: str) -> dict[str, Any]:
    """The JSON contract as a plain dict.

    Parameters
    ----------
    s : Suggestion
        From :func:`tri.rebalance.suggest`.
    before : Schedule
        The schedule the suggestion was made for (labels, names).
    caution : str
        The safety caution carried with the output.

    Returns
    -------
    dict
        Contract keys first, then the added keys (module notes); [A], [%].
    """
    labels = before.labels
    aside = {st.circuit_index for st in s.steps if st.action == "take-out"}
    moves = [
        {
            "circuit": m.circuit,
            "from_slot": m.from_slot,
            "to_slot": m.to_slot,
            "from_phases": _phases(before, m.from_phases),
            "to_phases": _phases(before, m.to_phases),
            "poles": m.poles,
            "changes_phase": m.changes_phase,
            "set_aside_first": m.circuit_index in aside,
            **({"shared_neutral_group": m.group} if m.group is not None else {}),
        }
        for m in s.moves
    ]
    steps = [
        {"step": w.number, "action": w.action, "circuit": w.circuit, "text": w.sentence}
        for w in work_order(s, before)
    ]
    return {
        "status": s.status,
        "objective": s.objective,
        "moves": moves,
        "before": _figures(s.before, labels),
        "after": _figures(s.after, labels),
        "bound": _bound(s),
        "status_text": status_words(s),
        "bound_unit": "moves" if s.mode == "fewest-moves" else "A",
        "mode": s.mode,
        "target_pct": num(s.target_pct),
        "target_met": s.target_met,
        "neutral_max_a": num(s.neutral_max_a),
        "max_moves": s.max_moves,
        "floor_a": num(s.floor_a),
        "relocations": s.relocations,
        "work_order": steps,
        "unplaced_left": list(s.unplaced_left),
        "notes": list(s.notes),
        "caution": caution,
        "cases": [
            {
                "name": c.name,
                "deciding": c.name == s.deciding,
                "before": _figures(c.before, labels),
                "after": _figures(c.after, labels),
            }
            for c in s.cases
        ],
        "deciding_case": s.deciding,
        "floor_case": s.floor_case,
        "deciding_text": deciding_words(s),
        "stopped": s.stopped,
    }


def render_suggestion_json(data: dict[str, Any]) -> str:
    """Strict JSON text (two-space indent, newline at the end) of :func:`suggestion_data`."""
    return json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def _figures_table(s: Suggestion, labels: tuple[str, str, str], ascii_only: bool) -> Table:
    t = Table(box=box.ASCII if ascii_only else box.SIMPLE_HEAD, pad_edge=False)
    t.add_column("")
    t.add_column("Before", justify="right")
    t.add_column("After", justify="right")
    for k, lab in enumerate(labels):
        t.add_row(
            f"Phase {lab} RMS [A]",
            fixed(s.before.phases_rms_a[k], 1),
            fixed(s.after.phases_rms_a[k], 1),
        )
    t.add_row("Neutral RMS [A]", fixed(s.before.neutral_rms_a, 1), fixed(s.after.neutral_rms_a, 1))
    t.add_row(
        "Largest deviation from the mean [%]",
        fixed(s.before.max_deviation_pct, 2),
        fixed(s.after.max_deviation_pct, 2),
    )
    return t


def _cases_table(s: Suggestion, ascii_only: bool) -> Table:
    """Every case's figures, before → after; the deciding case marked ``*``."""
    t = Table(box=box.ASCII if ascii_only else box.SIMPLE_HEAD, pad_edge=False)
    arrow = "->" if ascii_only else "→"
    t.add_column("Case")
    for head in ("Largest phase [A]", "Neutral [A]", "Deviation [%]"):
        t.add_column(head, justify="right")
    for c in s.cases:
        b, a = c.before, c.after
        t.add_row(
            c.name + (" *" if c.name == s.deciding else ""),
            f"{fixed(b.max_phase_rms_a, 1)} {arrow} {fixed(a.max_phase_rms_a, 1)}",
            f"{fixed(b.neutral_rms_a, 1)} {arrow} {fixed(a.neutral_rms_a, 1)}",
            f"{fixed(b.max_deviation_pct, 2)} {arrow} {fixed(a.max_deviation_pct, 2)}",
        )
    return t


def _work_section(s: Suggestion, before: Schedule, ascii_only: bool) -> list[RenderableType]:
    if not s.moves:
        return [Text("No breaker moves are proposed.")]
    kind = "rail board: circuits change phases" if not before.panel.uses_slots else "slots"
    out: list[RenderableType] = [
        Text(f"Work order ({count_words(s)}; {kind}), for a qualified person to review:")
    ]
    steps = Table.grid(padding=(0, 1))
    steps.add_column(justify="right", no_wrap=True)
    steps.add_column()
    for w in work_order(s, before):
        steps.add_row(f"{w.number}.", to_ascii(w.sentence) if ascii_only else w.sentence)
    out.append(steps)
    out.append(
        Text(
            "Before any move: de-energise and lock out the panel and prove it dead. "
            "For each moved circuit check that its conductors reach the new position "
            "and that the breaker suits it; afterwards update the panel directory "
            "(circuit numbers and phases change) and measure the phase and neutral "
            "currents again (common practice)."
        )
    )
    return out


def suggestion_renderables(
    s: Suggestion, before: Schedule, caution: str, *, ascii_only: bool = False
) -> list[RenderableType]:
    """The work order's sections as Rich renderables (print them in order)."""
    rule = "-" if ascii_only else "─"
    out: list[RenderableType] = [
        Text(f"Proposed breaker moves: {before.panel.name}", style="bold"),
        Text(f"Caution: {caution}"),
        Rule(characters=rule),
        Text(f"Status: {status_words(s)}."),
        Text(_nbsp(f"Minimised: {s.objective}.")),
    ]
    if s.target_pct is not None:
        met = "met" if s.target_met else "not met"
        out.append(
            Text(f"Target: within {s.target_pct:g}\u00a0% of the mean ({met} after the moves).")
        )
    if s.neutral_max_a is not None:
        out.append(Text(f"Neutral limit: {s.neutral_max_a:g} A."))
    load = ", connected load" if s.cases else ""
    out.append(Text(f"Figures from the engine on the schedule before and after (estimates{load}):"))
    out.append(_figures_table(s, before.labels, ascii_only))
    deciding = deciding_words(s)
    if deciding:
        out.append(Text(_nbsp(deciding)))
        out.append(_cases_table(s, ascii_only))
    out.append(Text(floor_words(s)))
    limits = limits_words(s)
    if limits:
        out.append(Text(limits))
    out.append(Rule(characters=rule))
    out.extend(_work_section(s, before, ascii_only))
    if s.unplaced_left:
        out.append(
            Text("Not placed (use --place-new to find them slots): " + ", ".join(s.unplaced_left))
        )
    for note in s.notes:
        out.append(Text(f"Note: {note}."))
    out.append(Rule(characters=rule))
    out.append(Text(f"Caution: {caution}"))
    if ascii_only:
        out = [Text(to_ascii(x.plain)) if isinstance(x, Text) else x for x in out]
    return out


def _nbsp(text: str) -> str:
    """Keep a number with its unit on one line."""
    return text.replace(" %", "\u00a0%").replace(" A", "\u00a0A")


def render_suggestion_text(
    s: Suggestion,
    before: Schedule,
    caution: str,
    *,
    width: int = 80,
    ascii_only: bool = False,
) -> str:
    """The work order as plain text (no colour), lines without trailing spaces."""
    return plain_text(suggestion_renderables(s, before, caution, ascii_only=ascii_only), width)


def print_suggestion(s: Suggestion, before: Schedule, caution: str, console: Console) -> None:
    """Print the work order on a Rich console."""
    ascii_only = not console.encoding.lower().startswith("utf")
    console.print(Group(*suggestion_renderables(s, before, caution, ascii_only=ascii_only)))
