"""A rebalancer suggestion in words: the one work order the command line, JSON and the UI share.

:func:`work_order` turns a :class:`~tri.rebalance.Suggestion` into
:class:`WorkLine` steps (action, circuit, from, to, a full sentence and a
brief one for narrow screens); :func:`status_words`, :func:`count_words`,
:func:`floor_words` and :func:`limits_words` are the status, count, floor
and rating sentences. The status words say exactly what was proven, on the
objective the output names (relocations as the work order counts them, or
the engine's largest phase RMS current). Every face of ``tri suggest``
uses these: the text work order and the JSON (:mod:`tri.report.suggest`)
and the terminal UI's rebalance screen.

With ``use`` scenarios, :func:`deciding_words` names the case that decides
and :func:`case_lines` gives each case's figures before and after, in the
same words everywhere.
"""

from __future__ import annotations

from dataclasses import dataclass

from tri.rebalance import Move, Suggestion
from tri.rebalance.options import plural
from tri.rebalance.results import relocation_count
from tri.rebalance.units import GROUP_NOT_PLACED
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


def _group_where(before: Schedule, group: list[Move], after: bool) -> str:
    """``"slots 3, 5, 7 (phases B, C, A)"`` of a group's breakers, before or after."""
    slots = [m.to_slot if after else m.from_slot for m in group]
    phases = [m.to_phases if after else m.from_phases for m in group]
    ph = ", ".join(before.phase_text(p) for p in phases)
    if any(x is None for x in slots):
        return f"phases {ph}"
    return f"slots {', '.join(str(x) for x in slots)} (phases {ph})"


def _group_sentences(action: str, name: str, group: list[Move], before: Schedule):
    """The step of a shared-neutral group moved as one block (:mod:`tri.rebalance.units`)."""
    here, there = _group_where(before, group, False), _group_where(before, group, True)
    breakers = ", ".join(f'"{m.circuit}"' for m in group)
    what = f"shared-neutral group {name}"
    if action == "take-out":
        return (
            f"Take out {what} ({breakers}) from {here} and set it aside, as one block (a swap).",
            f"Take out group {name} from {here.split(' (')[0]}, set aside",
        )
    if action == "install":
        return (
            f"Install the set-aside {what} ({breakers}) in {there}, in that order.",
            f"Install set-aside group {name} in {there.split(' (')[0]}",
        )
    if action == "reconnect":
        return (
            f"Reconnect {what} ({breakers}) from {here} to {there}, together.",
            f"Reconnect group {name}: {here} → {there}",
        )
    return (
        f"Move {what} ({breakers}) from {here} to {there}, as one block in that order "
        "(it counts as one relocation).",
        f"Move group {name}: {here.split(' (')[0]} → {there.split(' (')[0]}",
    )


def work_order(s: Suggestion, before: Schedule) -> tuple[WorkLine, ...]:
    """The numbered steps of the work order, in the order to do them (a shared-neutral
    group moved as one block is one step that names its breakers)."""
    by_index: dict[int, Move] = {m.circuit_index: m for m in s.moves}
    out = []
    for n, st in enumerate(s.steps, start=1):
        m = by_index[st.circuit_index]
        if st.members:
            group = [by_index[i] for i in st.members]
            name = m.group or m.circuit
            text, brief = _group_sentences(st.action, name, group, before)
            circuit, poles = f"shared-neutral group {name}", len(group)
            here, there = _group_where(before, group, False), _group_where(before, group, True)
            changes = any(g.changes_phase for g in group)
        else:
            text, brief = _sentences(st.action, m, before)
            circuit, poles = m.circuit, m.poles
            here = _where(before, m.from_slot, m.from_phases)
            there = _where(before, m.to_slot, m.to_phases)
            changes = m.changes_phase
        out.append(
            WorkLine(
                number=n,
                action=st.action,
                circuit_index=m.circuit_index,
                circuit=circuit,
                poles=poles,
                here=here,
                there=there,
                changes_phase=changes,
                sentence=text,
                brief=brief,
            )
        )
    return tuple(out)


def _groups_count_once(s: Suggestion) -> bool:
    """True when the panel has shared-neutral groups: the searches count a group moved as
    one block as one relocation (:mod:`tri.rebalance.units`), so claims say relocations."""
    return any(c.shared_neutral is not None for c in s.schedule.circuits)


#: How a claim names its count where a shared-neutral group moved counts once.
GROUP_COUNT = "a shared-neutral group moved as one block counting as one"


def _scope(s: Suggestion) -> str:
    """Which plans a balance claim is about."""
    if s.mode == "balance" and _groups_count_once(s):
        scope = f"with at most {plural(s.max_moves or 0, 'relocation')} ({GROUP_COUNT})"
    elif s.mode == "balance":
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
    """The status as a sentence: exactly what was proven, on the objective the output names;
    new circuits of shared-neutral groups, which the rebalancer does not place, are named
    as left out of the claim."""
    text = _fewest_words(s) if s.mode == "fewest-moves" else _balance_words(s)
    left = [c.name for c in s.schedule.circuits if not c.is_placed and c.shared_neutral]
    if left and any(GROUP_NOT_PLACED in n for n in s.notes):
        names = ", ".join(f'"{n}"' for n in left)
        text += (
            f"; the claim leaves out the new circuits of shared-neutral groups ({names}), "
            "which the rebalancer does not place (they stay without a slot)"
        )
    return text


def _balance_words(s: Suggestion) -> str:
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
    if s.stopped:
        text = "best found before the search was stopped by the user, not proven optimal"
    if s.bound is not None:
        top = s.worst_max_phase_rms_a
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
        fewer = (
            f"fewer relocations ({GROUP_COUNT})"
            if _groups_count_once(s)
            else "fewer breakers relocated"
        )
        return f"optimal: proven that no plan with {fewer} meets {goal}"
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
    when = "before the search was stopped by the user" if s.stopped else "in the time limit"
    if s.target_met:
        return f"best found {when}, not proven optimal; {proven}"
    return (
        f"no plan{budget} meeting {goal} was found {when} (not proven "
        f"impossible); {proven}; shown: the best balance found"
    )


def count_words(s: Suggestion) -> str:
    """``"2 breakers relocated, 1 new circuit placed"`` (real plurals); a shared-neutral
    group moved as one counts once and is named (:func:`moves_count_words`)."""
    return moves_count_words(s.moves)


def moves_count_words(*panels: tuple[Move, ...] | list[Move]) -> str:
    """:func:`count_words` of the moves of one panel or more (a building: each panel's
    moves, a group's name counting once in its own panel)."""
    relocations = sum(relocation_count(moves) for moves in panels)
    groups = sum(
        len({m.group for m in moves if m.group is not None and not m.is_placement})
        for moves in panels
    )
    if groups:
        singles = relocations - groups
        text = f"{plural(relocations, 'relocation')} ({plural(singles, 'breaker')} and "
        text += f"{plural(groups, 'shared-neutral group')} moved as one)"
    else:
        text = f"{plural(relocations, 'breaker')} relocated"
    placed = sum(1 for moves in panels for m in moves if m.is_placement)
    if placed:
        text += f", {plural(placed, 'new circuit')} placed"
    return text


def deciding_words(s: Suggestion) -> str | None:
    """Which case decides after the moves, and by what figure; None without scenarios."""
    if not s.cases:
        return None
    case = next(c for c in s.cases if c.name == s.deciding)
    if s.mode == "fewest-moves":
        what = f"the largest deviation, {fixed(case.after.max_deviation_pct, 2)}\u00a0%"
    else:
        what = f"the largest phase RMS current, {fixed(case.after.max_phase_rms_a, 1)}\u00a0A"
    names = ", ".join(c.name for c in s.cases)
    return (
        f"Judged in every case ({names}; connected = every use factor 1.0). "
        f"Deciding case after the moves: {s.deciding} ({what})."
    )


def case_lines(s: Suggestion) -> list[str]:
    """One line per case: deviation and largest phase current before → after (brief)."""
    width = max((len(c.name) for c in s.cases), default=0)
    out = []
    for c in s.cases:
        b, a = c.before, c.after
        mark = "*" if c.name == s.deciding else " "
        out.append(
            f"{c.name:<{width}}{mark} dev {fixed(b.max_deviation_pct, 1)} → "
            f"{fixed(a.max_deviation_pct, 1)} %  largest {fixed(b.max_phase_rms_a, 1)} → "
            f"{fixed(a.max_phase_rms_a, 1)} A"
        )
    return out


def limits_brief(s: Suggestion) -> str | None:
    """:func:`limits_words` in fewer words, for a small screen (the findings counted)."""
    n = len(s.after.limits)
    if not n:
        return None
    return (
        f"Still over a rating after the moves: {plural(n, 'finding')} (balancing alone does "
        "not fix it; see the findings, f, or tri report)."
    )


def limits_words(s: Suggestion) -> str | None:
    """Ratings still exceeded after the moves, or None."""
    if not s.after.limits:
        return None
    return (
        "Still over a rating after the moves (balancing alone does not fix it; see tri "
        "report): " + " ".join(s.after.limits)
    )
