"""The UI's door to the rebalancer (``tri.rebalance``), kept in one place.

The rebalancer's result is turned into a :class:`Plan`: the moves as
circuits before and after, found by comparing the schedule before with the
schedule the rebalancer proposes (so applying always matches what is
shown), ordered and worded as the rebalancer's own work order (set-aside
swaps included). The before/after figures shown are the engine's own
(``analyse_schedule``) on both schedules; nothing is recomputed here.
"""

from __future__ import annotations

import inspect
import threading
from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import Any

from tri.native_output import native_stdout_to_devnull
from tri.rebalance import DEFAULT_TARGET_PCT
from tri.schedule.model import Circuit, Schedule
from tri.schedule.validate import check_schedule

ENTRY_NAMES = ("suggest", "rebalance", "suggest_moves", "plan_moves")


class RebalancerMissing(Exception):
    """``tri.rebalance`` has no entry point in this build yet."""


@dataclass(frozen=True)
class Options:
    """What the user asked for.

    Attributes
    ----------
    target_pct : float or None
        Max deviation of phase RMS currents from their mean [%]; None: best balance.
    max_moves : int or None
        At most this many moves; None: no limit.
    place_new : bool
        Also find slots for the circuits not placed yet.
    mode : str
        ``"fewest-moves"`` (to the target), ``"balance"`` (best with at most
        ``max_moves``), ``"place-new"`` (only place new circuits) or
        ``"relayout"`` (every unlocked circuit placed afresh, for design work).
    time_limit_s : float
        Search budget [s].
    """

    target_pct: float | None = DEFAULT_TARGET_PCT
    max_moves: int | None = None
    place_new: bool = True
    time_limit_s: float = 3.0
    mode: str = "fewest-moves"


@dataclass(frozen=True)
class Move:
    """One breaker to relocate (or a new circuit to place)."""

    index: int
    before: Circuit
    after: Circuit

    @property
    def is_placement(self) -> bool:
        """True for a new circuit being placed (not counted as a move)."""
        return not self.before.is_placed


@dataclass(frozen=True)
class Step:
    """One line of the work order: which move it belongs to and what to do."""

    move: int
    text: str


@dataclass(frozen=True)
class Plan:
    """A proposal: status, what was minimised, the moves, the work order, the schedule after."""

    status: str
    objective: str
    moves: tuple[Move, ...]
    after: Schedule
    bound: float | None = None
    steps: tuple[Step, ...] = ()


def find_entry() -> Callable[..., Any] | None:
    """The rebalancer's entry function, or ``None`` when it is not built yet."""
    try:
        import tri.rebalance as rb
    except ImportError:
        return None
    for name in ENTRY_NAMES:
        fn = getattr(rb, name, None)
        if callable(fn):
            return fn
    return None


def _kwargs(fn: Callable[..., Any], options: Options, progress: Any, cancel: Any) -> dict[str, Any]:
    wanted = {
        ("target_pct", "target"): options.target_pct,
        ("max_moves",): options.max_moves,
        ("place_new",): options.place_new,
        ("mode",): options.mode,
        ("time_limit_s", "time_limit"): options.time_limit_s,
        ("progress", "on_progress"): progress,
        ("cancel", "cancel_event", "should_stop"): cancel,
    }
    params = inspect.signature(fn).parameters
    out: dict[str, Any] = {}
    for names, value in wanted.items():
        for name in names:
            if name in params:
                out[name] = value
                break
    return out


def _after_schedule(before: Schedule, result: Any) -> Schedule:
    for attr in ("schedule", "after_schedule", "new_schedule"):
        s = getattr(result, attr, None)
        if isinstance(s, Schedule):
            return s
    # Only moves given: apply them by circuit name.
    after = before
    for m in getattr(result, "moves", ()) or ():
        name = getattr(m, "circuit", None) or (m.get("circuit") if isinstance(m, dict) else None)
        get = (
            (lambda k, m=m: m.get(k))
            if isinstance(m, dict)
            else (lambda k, m=m: getattr(m, k, None))
        )
        idx = next((i for i, c in enumerate(after.circuits) if c.name == name), None)
        if idx is None:
            continue
        c = after.circuits[idx]
        if before.panel.uses_slots:
            moved = c.at_slot(get("to_slot"))
        else:
            from tri.schedule.model import parse_phase_text

            text = get("to_phases")
            moved = c.on_phases(parse_phase_text(text, before.labels) if text else None)
        after = after.with_circuit(idx, moved)
    return after


NAME_WIDTH = 30  #: longest circuit name shown in a work-order line (fits 80 columns)


def _where(schedule: Schedule, c: Circuit) -> str:
    ph = schedule.phase_text(c.phases)
    return f"slot {c.slot} ({ph})" if c.slot is not None else (ph if c.phases else "-")


def _name(c: Circuit) -> str:
    name = c.name if len(c.name) <= NAME_WIDTH else c.name[: NAME_WIDTH - 1] + "…"
    return f'"{name}"'


def step_text(action: str, move: Move, schedule: Schedule) -> str:
    """One work-order line, short enough for an 80-column screen."""
    name, here, there = (
        _name(move.before),
        _where(schedule, move.before),
        _where(schedule, move.after),
    )
    if action == "take-out":
        return f"Take out {name} from {here}, set it aside"
    if action == "install":
        return f"Install set-aside {name} in {there}"
    if action in ("place", "connect") or move.is_placement:
        return f"Place new {name} in {there}"
    return f"Move {name}: {here} → {there}"


def to_plan(before: Schedule, result: Any) -> Plan:
    """The rebalancer's result as a :class:`Plan`.

    The moves are found by comparing the schedules (so applying matches
    what is shown) and put in the order of the rebalancer's work order
    (``result.steps``: move, take-out, install, place ...) where it has one.
    """
    after = _after_schedule(before, result)
    changed = {
        i: Move(i, b, a)
        for i, (b, a) in enumerate(zip(before.circuits, after.circuits, strict=False))
        if (b.slot, b.phases) != (a.slot, a.phases)
    }
    actions = [
        (str(st.action), int(st.circuit_index))
        for st in (getattr(result, "steps", None) or ())
        if int(st.circuit_index) in changed
    ]
    order: list[int] = []
    for _, index in actions:
        if index not in order:
            order.append(index)
    order += [i for i in sorted(changed) if i not in order]
    moves = tuple(changed[i] for i in order)
    position = {m.index: k for k, m in enumerate(moves)}
    listed = {i for _, i in actions}
    actions += [("move", m.index) for m in moves if m.index not in listed]
    steps = tuple(
        Step(position[i], step_text(action, moves[position[i]], before)) for action, i in actions
    )
    status = str(getattr(result, "status", "best-found"))
    objective = str(getattr(result, "objective", "") or "")
    bound = getattr(result, "bound", None)
    return Plan(
        status,
        objective,
        moves,
        after,
        bound if isinstance(bound, int | float) else None,
        steps,
    )


def run(
    schedule: Schedule,
    options: Options,
    progress: Callable[[float | None, str], None],
    cancel: threading.Event,
) -> Plan:
    """Run the rebalancer (call it from a worker thread).

    Raises
    ------
    RebalancerMissing
        When ``tri.rebalance`` has no entry point yet.
    """
    fn = find_entry()
    if fn is None:
        raise RebalancerMissing(
            "The rebalancer is not in this build yet: this screen is waiting for it."
        )
    params = inspect.signature(fn).parameters
    options_cls = getattr(inspect.getmodule(fn), "SuggestOptions", None)
    if "options" in params and options_cls is not None:
        # tri.rebalance.suggest(schedule, SuggestOptions(...), progress=, cancel=):
        # the mode follows from which fields are set.
        fields = {
            "fewest-moves": {"target_pct": options.target_pct, "max_moves": options.max_moves},
            "balance": {"max_moves": options.max_moves},
            "place-new": {},
            "relayout": {"relayout": True},
        }.get(options.mode, {})
        suggest_options = options_cls(
            place_new=options.place_new, time_limit_s=options.time_limit_s, **fields
        )
        with native_stdout_to_devnull():
            result = fn(schedule, suggest_options, progress=progress, cancel=cancel)
    else:
        result = fn(schedule, **_kwargs(fn, options, progress, cancel))
    return to_plan(schedule, result)


def apply_moves(schedule: Schedule, plan: Plan, chosen: set[int]) -> tuple[Schedule | None, str]:
    """``schedule`` with the moves numbered ``chosen`` (positions in ``plan.moves``) applied.

    Returns ``(None, reason)`` when that subset does not fit on its own (for
    example a move into a slot that only another, unchosen move frees).
    """
    new = schedule
    for k, m in enumerate(plan.moves):
        if k in chosen:
            current = new.circuits[m.index]
            moved = replace(current, slot=m.after.slot, phases=m.after.phases)
            new = new.with_circuit(m.index, moved)
    issues = check_schedule(new)
    if issues:
        return None, f"these moves do not fit on their own: {issues[0].message}"
    return new, ""
