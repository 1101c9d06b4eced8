"""The floor in words: how close the largest phase comes to the bound no arrangement
can go below (:attr:`tri.rebalance.Suggestion.floor_a`), in full and for a small screen."""

from __future__ import annotations

from tri.rebalance import Suggestion
from tri.report.work_order import fixed


def _no_floor(s: Suggestion) -> bool:
    """A high-leg delta: no floor is proven (:mod:`tri.rebalance.problem`, High leg)."""
    return s.schedule.panel.effective_high_leg is not None


def floor_words(s: Suggestion) -> str:
    """How close the largest phase comes to the floor no arrangement can go below."""
    top = s.worst_max_phase_rms_a
    if _no_floor(s):
        return (
            "No floor is given on a high-leg delta: its phases are not 120° apart to neutral, "
            f"so the positive-sequence share moves with the circuits; after the moves the "
            f"largest phase is {fixed(top, 1)}\u00a0A."
        )
    gap = 100.0 * (top - s.floor_a) / s.floor_a if s.floor_a > 0 else 0.0
    where, after = "", "after the moves it is"
    if s.cases:
        where = f" in the {s.floor_case} case"
        after = "after the moves the worst case's is"
    return (
        f"No arrangement can bring the largest phase{where} below {fixed(s.floor_a, 1)} A "
        f"(its share of the positive-sequence current, harmonics included); {after} "
        f"{fixed(top, 1)}\u00a0A, {fixed(gap, 2)}\u00a0% above."
    )


def floor_brief(s: Suggestion) -> str:
    """:func:`floor_words` in fewer words, for a small screen."""
    top = s.worst_max_phase_rms_a
    if _no_floor(s):
        return f"No floor on a high-leg delta; largest phase after: {fixed(top, 1)} A."
    gap = 100.0 * (top - s.floor_a) / s.floor_a if s.floor_a > 0 else 0.0
    return (
        f"Floor {fixed(s.floor_a, 1)} A (no arrangement goes below it); largest phase after: "
        f"{fixed(top, 1)} A, {fixed(gap, 2)} % above."
    )
