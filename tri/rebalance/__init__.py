"""Rebalancer: fewest relocations to a target, best balance in a budget, new-circuit placement.

Pure functions and frozen results, no I/O. Layer: uses :mod:`tri.engine` and
:mod:`tri.schedule`; never imports a user-interface toolkit, and imports
scipy's optimiser only when a search runs.

Entry point: :func:`suggest` with :class:`SuggestOptions`, returning a
:class:`Suggestion` (moves in work order, engine figures before and after,
proof status and bound). :func:`apply_moves` carries out moves on a
:class:`~tri.schedule.model.Schedule`.
"""

from tri.rebalance.control import Cancelled
from tri.rebalance.options import DEFAULT_TARGET_PCT, DEFAULT_TIME_LIMIT_S, SuggestOptions
from tri.rebalance.results import Figures, Move, Suggestion, apply_moves
from tri.rebalance.solve import suggest
from tri.rebalance.workorder import WorkStep

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
