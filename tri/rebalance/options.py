"""What the user asks the rebalancer: the options, the mode they select, the objective in words.

Modes
-----
``fewest-moves`` (``target_pct``)
    The fewest breaker relocations after which every phase RMS current is
    within ``target_pct`` of the mean of the three (the deviation the
    report shows), and the neutral RMS current at most ``neutral_max_a`` if
    given; at most ``max_moves`` if given.
``balance`` (``max_moves`` without a target)
    The smallest largest-phase RMS current reachable with at most
    ``max_moves`` relocations.
``place-new``
    Circuits without a slot get the best free slots; nothing else moves
    (combine with a target or a budget to allow relocations as well).
``relayout``
    Every unlocked circuit may go anywhere (design work): the smallest
    largest-phase current; relocations are then reduced where that costs
    nothing (not proven fewest).

With ``use`` scenarios every mode works in every case at once: the
connected load (every factor 1.0: the design load ``tri check`` judges
too, so a plan never trades a check there for one in a scenario) and each
named scenario. A target and a neutral limit must hold in every case; the
balance modes minimise the largest phase RMS current of the worst case.

A relocation is a placed breaker whose slot changes (on a rail board:
whose phases change), as the work order counts it; placing a new circuit
is not one.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

from tri.engine.loading import FindingLimits
from tri.words import plural as plural  # re-exported

Mode = Literal["fewest-moves", "balance", "place-new", "relayout"]

#: Default target on the deviation [%]: the engine's warning level, so that
#: ``tri suggest`` aims where ``tri report`` starts to warn.
DEFAULT_TARGET_PCT = FindingLimits().deviation_warn_pct
#: Default time limit [s].
DEFAULT_TIME_LIMIT_S = 5.0
#: Default relative gap to the proven bound at which balance modes stop [-].
DEFAULT_STOP_GAP = 1e-3


@dataclass(frozen=True)
class SuggestOptions:
    """What to ask the rebalancer.

    Attributes
    ----------
    target_pct : float or None
        Largest deviation of a phase RMS current from the mean [%]; selects
        the fewest-moves mode. Default (no mode option at all):
        :data:`DEFAULT_TARGET_PCT`.
    max_moves : int or None
        Largest number of relocations [-]; alone it selects the balance mode.
    place_new : bool
        Place circuits that have no slot yet.
    relayout : bool
        Full re-layout of every unlocked circuit (no target, no budget).
    neutral_max_a : float or None
        Largest neutral RMS current [A].
    time_limit_s : float
        Wall-clock budget [s].
    floor_gap : float
        Balance modes stop once the largest phase current is within this
        fraction of the proven lower bound [-] (0: prove optimality).
    use_solver : bool
        False: greedy start and local search only (for comparisons).
    list_plans : bool
        Settle small questions by listing every plan
        (:mod:`tri.rebalance.exhaust`); False leaves every proof to the
        mixed-integer programs (for tests of those).
    """

    target_pct: float | None = None
    max_moves: int | None = None
    place_new: bool = False
    relayout: bool = False
    neutral_max_a: float | None = None
    time_limit_s: float = DEFAULT_TIME_LIMIT_S
    floor_gap: float = DEFAULT_STOP_GAP
    use_solver: bool = True
    list_plans: bool = True

    def __post_init__(self) -> None:
        problems = []
        if self.target_pct is not None and not (
            math.isfinite(self.target_pct) and 0 <= self.target_pct <= 200
        ):
            problems.append("the target must be a percentage from 0 to 200")
        if self.max_moves is not None and self.max_moves < 0:
            problems.append("the number of moves must be 0 or more")
        if self.neutral_max_a is not None and not (
            math.isfinite(self.neutral_max_a) and self.neutral_max_a > 0
        ):
            problems.append("the neutral limit must be a current above 0 A")
        if not (math.isfinite(self.time_limit_s) and self.time_limit_s > 0):
            problems.append("the time limit must be above 0 s")
        if not (math.isfinite(self.floor_gap) and self.floor_gap >= 0):
            problems.append("the stopping gap must be 0 or more")
        if self.relayout and (self.target_pct is not None or self.max_moves is not None):
            problems.append("a full re-layout takes neither a target nor a move limit")
        if problems:
            raise ValueError("; ".join(problems))

    @property
    def mode(self) -> Mode:
        """The mode these options select."""
        if self.relayout:
            return "relayout"
        if self.target_pct is not None:
            return "fewest-moves"
        if self.max_moves is not None:
            return "balance"
        if self.place_new:
            return "place-new"
        return "fewest-moves"

    @property
    def effective_target_pct(self) -> float | None:
        """Target used [%] (the default in fewest-moves mode without one)."""
        if self.mode != "fewest-moves":
            return None
        return DEFAULT_TARGET_PCT if self.target_pct is None else self.target_pct


def cases_text(case_names: tuple[str, ...]) -> str:
    """The cases in words: ``""`` without scenarios (module notes)."""
    if len(case_names) <= 1:
        return ""
    names = ", ".join(case_names[1:])
    return f"the connected load and the scenarios {names}"


def objective_text(opts: SuggestOptions, case_names: tuple[str, ...] = ("connected",)) -> str:
    """What the mode minimises, in words (the ``objective`` of the output)."""
    mode = opts.mode
    cases = cases_text(case_names)
    neutral = (
        f", with the neutral RMS current at most {opts.neutral_max_a:g} A"
        if opts.neutral_max_a is not None
        else ""
    )
    if mode == "fewest-moves":
        cap = f" (at most {opts.max_moves})" if opts.max_moves is not None else ""
        target = opts.effective_target_pct
        every = f", in every case ({cases})" if cases else ""
        return (
            f"number of breakers relocated{cap} so that every phase RMS current is within "
            f"{target:g} % of the mean of the three{neutral}{every}"
        )
    worst = "largest phase RMS current [A]"
    if cases:
        worst = f"largest phase RMS current [A] of the worst case ({cases})"
    if mode == "balance":
        return f"{worst} with at most {plural(opts.max_moves or 0, 'breaker')} relocated{neutral}"
    if mode == "place-new":
        return f"{worst}, placing new circuits without moving others{neutral}"
    return (
        f"{worst} over a full re-layout{neutral}; relocations are then "
        "reduced where that costs nothing (not proven fewest)"
    )
