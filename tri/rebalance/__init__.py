"""Rebalancer: fewest breaker moves to a target, best balance in a budget, new-circuit placement.

Pure functions and frozen results, no I/O. Layer: uses :mod:`tri.engine` and
:mod:`tri.schedule`; never imports a user-interface toolkit.

Entry point: :func:`suggest` with :class:`SuggestOptions`, returning a
:class:`Suggestion` (moves in work order, engine figures before and after,
proof status and bound). :func:`apply_moves` carries out moves on a
:class:`~tri.schedule.model.Schedule`.
"""

from tri.rebalance.control import Cancelled
from tri.rebalance.realise import WorkStep
from tri.rebalance.results import Figures, Move, Suggestion, apply_moves
from tri.rebalance.solve import DEFAULT_TARGET_PCT, DEFAULT_TIME_LIMIT_S, SuggestOptions, suggest

__all__ = [
    "DEFAULT_TARGET_PCT",
    "DEFAULT_TIME_LIMIT_S",
    "Cancelled",
    "Figures",
    "Move",
    "SuggestOptions",
    "Suggestion",
    "WorkStep",
    "apply_moves",
    "suggest",
]
