"""A rebalancer suggestion in words: the one work order the command line, JSON and the UI share.

:func:`work_order` turns a :class:`~tri.rebalance.Suggestion` into
:class:`WorkLine` steps (action, circuit, from, to, a full sentence and a
brief one for narrow screens); :func:`status_words`, :func:`count_words`,
:func:`floor_words` and :func:`limits_words` are the status, count, floor
and rating sentences. Every face of ``tri suggest`` uses these: the text
work order (:func:`render_suggestion_text`), the JSON
(:func:`suggestion_data`) and the terminal UI's rebalance screen.

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
swap); ``work_order`` (the numbered steps: ``step``, ``action``,
``circuit``, ``text``); in ``before`` and ``after``, ``limits`` (the
engine's findings at level "limit": ratings still exceeded);
``unplaced_left``; ``notes``; ``caution``. Numbers are SI (A, %), rounded
to 9 significant digits; phases by the panel's labels; ``null`` for "no
slot" or "not placed".

Text is a work order a person can follow, step by step, with the safety
caution first and last. It proposes; it never says the work may go ahead.
"""

from __future__ import annotations

import io
import json
from dataclasses import dataclass
from typing import Any

from rich import box
from rich.console import Console, Group, RenderableType
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from tri.rebalance import Figures, Move, Suggestion
from tri.rebalance.options import plural
from tri.report.data import num
from tri.report.text_report import to_ascii
from tri.schedule.model import Schedule


def fixed(value: float, digits: int) -> str:
    """``value`` with ``digits`` decimals, never a negative zero (``-0.0`` reads as ``0.0``)."""
    text = f"{value:.{digits}f}"
    return text[1:] if text.startswith("-") and float(text) == 0.0 else text


@dataclass(frozen=True)
class WorkLine:
    """One numbered step of the work order.

    Attributes
    ----------
    number : int
        Step number, from 1.
    action : str
        ``move``, ``take-out``, ``install``, ``place``, ``reconnect`` or ``connect``.
    circuit_index : int
        Index of the circuit in the schedule.
    circuit : str
        Its name.
    poles : int
    here, there : str
        Where it is and where it goes, e.g. ``"slot 16 (phases BC)"``.
    changes_phase : bool
        False when the breaker only makes room (same phases).
    sentence : str
        The step as the command line prints it.
    brief : str
        The same step in fewer words, for an 80-column screen.
    """

    number: int
    action: str
    circuit_index: int
    circuit: str
    poles: int
    here: str
    there: str
    changes_phase: bool
    sentence: str
    brief: str


def _where(schedule: Schedule, slot: int | None, phases: tuple[int, ...] | None) -> str:
    ph = schedule.phase_text(phases) if phases is not None else "-"
    word = "phase" if phases is not None and len(phases) == 1 else "phases"
    if slot is None:
        return f"{word} {ph}"
    return f"slot {slot} ({word} {ph})"


def _short(schedule: Schedule, slot: int | None, phases: tuple[int, ...] | None) -> str:
    ph = schedule.phase_text(phases) if phases is not None else "-"
    return ph if slot is None else f"slot {slot} ({ph})"


def _sentences(action: str, m: Move, before: Schedule) -> tuple[str, str]:
    name = f'"{m.circuit}" ({m.poles}-pole)'
    here, there = _where(before, m.from_slot, m.from_phases), _where(before, m.to_slot, m.to_phases)
    a, b = _short(before, m.from_slot, m.from_phases), _short(before, m.to_slot, m.to_phases)
    nm = f'"{m.circuit}"'
    if action == "move":
        text = f"Move breaker {name} from {here} to {there}."
        brief = f"Move {nm}: {a} → {b}"
        if not m.changes_phase:
            text += " Same phases: this only makes room."
            brief += ", makes room"
        return text, brief
    if action == "take-out":
        return (
            f"Take out breaker {name} from {here} and set it aside (a swap).",
            f"Take out {nm} from {a}, set it aside",
        )
    if action == "install":
        return (
            f"Install the set-aside breaker {name} in {there}.",
            f"Install set-aside {nm} in {b}",
        )
    if action == "place":
        return (f"Install the new circuit's breaker {name} in {there}.", f"Place new {nm} in {b}")
    if action == "connect":
        return (f"Connect the new circuit {name} to {there}.", f"Connect new {nm} to {b}")
    return (f"Reconnect circuit {name} from {here} to {there}.", f"Reconnect {nm}: {a} → {b}")


def work_order(s: Suggestion, before: Schedule) -> tuple[WorkLine, ...]:
    """The numbered steps of the work order, in the order to do them."""
    by_index: dict[int, Move] = {m.circuit_index: m for m in s.moves}
    out = []
    for n, st in enumerate(s.steps, start=1):
        m = by_index[st.circuit_index]
        text, brief = _sentences(st.action, m, before)
        out.append(
            WorkLine(
                number=n,
                action=st.action,
                circuit_index=m.circuit_index,
                circuit=m.circuit,
                poles=m.poles,
                here=_where(before, m.from_slot, m.from_phases),
                there=_where(before, m.to_slot, m.to_phases),
                changes_phase=m.changes_phase,
                sentence=text,
                brief=brief,
            )
        )
    return tuple(out)


def _scope(s: Suggestion) -> str:
    """Which plans a balance claim is about."""
    if s.mode == "balance":
        scope = f"with at most {plural(s.max_moves or 0, 'breaker')} relocated"
    elif s.mode == "place-new":
        scope = "placing the new circuits in free slots"
    else:
        scope = "of any arrangement"
    if s.neutral_max_a is not None:
        scope += f" and the neutral at or below {s.neutral_max_a:g} A"
    return scope


def _goal(s: Suggestion) -> str:
    """What a fewest-moves plan must meet."""
    if s.neutral_max_a is None:
        return "the target"
    return f"the target and the neutral limit of {s.neutral_max_a:g} A"


def status_words(s: Suggestion) -> str:
    """The status as a sentence: exactly what was proven, on the objective the output names."""
    if s.mode == "fewest-moves":
        return _fewest_words(s)
    scope = _scope(s)
    if s.status == "optimal":
        return (
            f"optimal: proven that no plan {scope} has a smaller largest phase RMS current "
            "(to within 0.0001 %)"
        )
    if s.status == "already-balanced":
        return (
            f"already balanced: proven that no plan {scope} has a smaller largest phase RMS "
            "current; no move needed"
        )
    if s.status == "infeasible":
        return "no plan fits (proven); nothing is proposed"
    text = "best found, not proven optimal"
    if s.bound is not None:
        top = s.after.max_phase_rms_a
        gap = 100.0 * (top / s.bound - 1.0) if s.bound > 0 else 0.0
        text += (
            f"; proven: no plan {scope} brings the largest phase below {fixed(s.bound, 2)} A "
            f"(this plan is {fixed(gap, 3)} % above)"
        )
    if s.stop_gap > 0 and s.bound is not None:
        text += f"; the search stops within {s.stop_gap * 100:g} % of the bound"
    return text


def _fewest_words(s: Suggestion) -> str:
    budget = f" with at most {plural(s.max_moves, 'relocation')}" if s.max_moves is not None else ""
    goal = _goal(s)
    if s.status == "already-balanced":
        return f"already balanced: the panel meets {goal} as it is; no move needed"
    if s.status == "optimal":
        return f"optimal: proven that no plan with fewer breakers relocated meets {goal}"
    if s.status == "infeasible":
        return (
            f"target out of reach (proven): no plan{budget} meets {goal}; shown: the best "
            "balance found"
        )
    bound = round(s.bound or 0)
    proven = (
        f"proven: no plan with fewer than {plural(bound, 'relocation')} meets {goal}"
        if bound > 0
        else "no lower bound on the relocations was proven"
    )
    if s.target_met:
        return f"best found in the time limit, not proven optimal; {proven}"
    return (
        f"no plan{budget} meeting {goal} was found in the time limit (not proven "
        f"impossible); {proven}; shown: the best balance found"
    )


def count_words(s: Suggestion) -> str:
    """``"2 breakers relocated, 1 new circuit placed"`` (real plurals)."""
    text = f"{plural(s.relocations, 'breaker')} relocated"
    placed = sum(1 for m in s.moves if m.is_placement)
    if placed:
        text += f", {plural(placed, 'new circuit')} placed"
    return text


def floor_words(s: Suggestion) -> str:
    """How close the largest phase comes to the floor no arrangement can go below."""
    top = s.after.max_phase_rms_a
    gap = 100.0 * (top - s.floor_a) / s.floor_a if s.floor_a > 0 else 0.0
    return (
        f"No arrangement can bring the largest phase below {fixed(s.floor_a, 1)} A (its share "
        f"of the positive-sequence current, harmonics included); after the moves it is "
        f"{fixed(top, 1)}\u00a0A, {fixed(gap, 2)}\u00a0% above."
    )


def limits_words(s: Suggestion) -> str | None:
    """Ratings still exceeded after the moves, or None."""
    if not s.after.limits:
        return None
    return (
        "Still over a rating after the moves (balancing alone does not fix it; see tri "
        "report): " + " ".join(s.after.limits)
    )


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
    out.append(Text("Figures from the engine on the schedule before and after (estimates):"))
    out.append(_figures_table(s, before.labels, ascii_only))
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
    buf = io.StringIO()
    console = Console(
        file=buf, width=width, color_system=None, highlight=False, emoji=False, markup=False
    )
    for item in suggestion_renderables(s, before, caution, ascii_only=ascii_only):
        console.print(item)
    text = "\n".join(line.rstrip() for line in buf.getvalue().splitlines())
    return text + "\n"


def print_suggestion(s: Suggestion, before: Schedule, caution: str, console: Console) -> None:
    """Print the work order on a Rich console."""
    ascii_only = not console.encoding.lower().startswith("utf")
    console.print(Group(*suggestion_renderables(s, before, caution, ascii_only=ascii_only)))
