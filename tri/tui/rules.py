"""Whether an edit gives a panel that can exist: the schedule's full checks, worded for a form.

Every edit the UI makes (a form, a move picked on the panel view) is checked
by running :func:`~tri.schedule.validate.check_schedule` on the schedule the
edit would give and keeping the problems the edit brings (those the
schedule did not have before), whichever circuit the checks attach them to.
So every pole's position counts: a 2-pole breaker moved from slot 1 to 3
takes 3 and 5, and a breaker already in 5 refuses it. Rules the schedule
layer gains (high leg, shared neutrals ...) come with it. No textual here.
"""

from __future__ import annotations

from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import fits, occupied_slots
from tri.schedule.validate import check_schedule
from tri.tui.wording import form_problem, place_words, slots_words


def new_problems(before: Schedule, after: Schedule, edited: int) -> list[tuple[str, str]]:
    """Problems ``after`` has that ``before`` had not: (key, words from ``edited``'s side)."""
    old = set(check_schedule(before))
    out: list[tuple[str, str]] = []
    for issue in check_schedule(after):
        if issue in old:
            continue
        item = (issue.key or "", form_problem(issue, after, edited))
        if item not in out:
            out.append(item)
    return out


def moved(
    schedule: Schedule,
    index: int,
    slot: int | None = None,
    phases: tuple[int, ...] | None = None,
) -> Circuit:
    """Circuit ``index`` at ``slot`` (two-column) or on ``phases`` (rail board)."""
    c = schedule.circuits[index]
    if schedule.panel.uses_slots:
        return schedule.placed(c.at_slot(slot))  # the phases as this panel is built
    return c.on_phases(phases)


def move_problems(schedule: Schedule, index: int, target: Circuit) -> list[str]:
    """Why circuit ``index`` cannot become ``target`` (its new position); empty when it can."""
    c = target
    if (
        schedule.panel.uses_slots
        and c.slot is not None
        and not fits(c.slot, c.poles, schedule.panel.spaces)
    ):
        poles = occupied_slots(c.slot, c.poles)
        if c.slot < 1 or c.slot > schedule.panel.spaces:
            return [f"slot {c.slot} is not on the panel; expected 1 to {schedule.panel.spaces}"]
        return [
            f"a {c.poles}-pole breaker at slot {c.slot} takes {slots_words(poles)}; "
            f"the panel ends at slot {schedule.panel.spaces}"
        ]
    return [text for _key, text in new_problems(schedule, schedule.with_circuit(index, c), index)]


def move_summary(schedule: Schedule, target: Circuit) -> str:
    """Where a breaker would go, every pole named: ``"slots 3 and 5 (B, C)"``."""
    if target.slot is None:
        return place_words(target, schedule)
    poles = occupied_slots(target.slot, target.poles)
    return f"{slots_words(poles)} ({schedule.phase_text(target.phases)})"
