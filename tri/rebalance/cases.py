"""The rebalancing problem in every case: the connected load and each ``use`` scenario.

A schedule with ``use`` factors is judged in every *case*: the connected
load (every factor 1.0, the design load ``tri check`` judges too) and each
named scenario (:mod:`tri.schedule.to_scenarios`, in order of first
appearance). The options and slots are the same in every case; only the
currents differ, each circuit's scaled by its factor, computed by the
engine on the scaled loads (:func:`with_cases`). The problem's own arrays
are the connected load's; :attr:`~tri.rebalance.problem.Problem.others`
holds the problem in each further case and
:meth:`~tri.rebalance.problem.Problem.views` all of them, so a bound proven
on one case's currents is proven for that case (a plan must meet the target
in every case, so each case's bound on relocations is a bound; the worst
case's largest phase current is at least each case's), and a plan is
judged in every case. :class:`Stacked` gives the currents of every case
with a case axis, for the searches that score plans in all at once.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

import numpy as np

from tri.schedule.model import Schedule
from tri.schedule.to_scenarios import CONNECTED, scenario_set

if TYPE_CHECKING:
    from tri.rebalance.problem import Problem


@dataclass(frozen=True, eq=False)
class Stacked:
    """Currents of every case (module notes), the case axis after the option's.

    Attributes
    ----------
    contrib : complex ndarray, shape (O, S, 3, H)
    ncontrib : complex ndarray, shape (O, S, H)
    base : complex ndarray, shape (S, 3, H)
    nbase : complex ndarray, shape (S, H)
        [A], as :class:`~tri.rebalance.problem.Problem`'s arrays, one row per case.
    """

    contrib: np.ndarray
    ncontrib: np.ndarray
    base: np.ndarray
    nbase: np.ndarray


def stack(views: Sequence[Problem]) -> Stacked:
    """The currents of the problems of every case with a case axis."""
    return Stacked(
        contrib=np.stack([v.contrib for v in views], axis=1),
        ncontrib=np.stack([v.ncontrib for v in views], axis=1),
        base=np.stack([v.base for v in views]),
        nbase=np.stack([v.nbase for v in views]),
    )


def with_cases(
    problem: Problem,
    schedule: Schedule,
    currents: Callable,
    names: tuple[str, ...] | None = None,
) -> Problem:
    """The problem with every scenario of the schedule's ``use`` factors (module notes).

    Parameters
    ----------
    problem : Problem
        The connected load's, with its floor.
    schedule : Schedule
    currents : callable
        ``currents(factors)`` -> ``(base, nbase, contrib, ncontrib)``: the
        engine's currents with each circuit's load scaled by ``factors``
        (one per circuit) [A].
    names : tuple of str, optional
        These scenarios, in this order (a building's: every panel of it
        judged in the same cases, a scenario its circuits do not name at
        1.0); default the schedule's own.

    Returns
    -------
    Problem
        Unchanged without scenarios.
    """
    from tri.rebalance.problem import with_floor

    cases = scenario_set(schedule, names)
    if cases.count == 0:
        return problem
    others = []
    for k in range(cases.count):
        base, nbase, contrib, ncontrib = currents(cases.factors[k])
        view = replace(
            problem,
            contrib=contrib,
            ncontrib=ncontrib,
            base=base,
            nbase=nbase,
            case_names=(cases.names[k],),
        )
        others.append(with_floor(view))
    return replace(problem, case_names=(CONNECTED, *cases.names), others=tuple(others))
