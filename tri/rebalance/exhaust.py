"""Every plan with a few phase changes, checked exactly: the fewest-moves proof when few.

To prove that no plan with at most ``k`` relocations meets the target, the
mixed-integer program must rule out every such plan through its
relaxation, and plans that miss the target by a hair keep it busy. When
``k`` is small the plans can simply be counted out instead: a plan with at
most ``k`` relocations has at most ``k`` *option changes* (a breaker on
other phases has left its slot), so it is the current plan with at most
``k`` placed circuits on another option — and those can all be listed.

For one quantity ``y`` (a phase's spectrum, or the neutral's), with
``Δ_c`` what change ``c`` (a circuit to one of its other options) adds,

``||y_now + Σ_{c∈S} Δ_c||² = ||y_now||² + Σ_{c∈S} (2·Re<y_now, Δ_c> + ||Δ_c||²)
+ Σ_{c<c'∈S} 2·Re<Δ_c, Δ_c'>``,

so with the per-change terms and the Gram matrix computed once, a plan
costs a handful of additions per quantity, vectorised over all plans that
share their first changes. A plan is kept when it meets the target within
round-off (a relative :data:`SLACK`, far above it) and passes the panel's
capacity counts (open slots per phase, side-by-side windows per type — a
necessary condition for fitting). :func:`plans_within` returns the kept
plans and whether the list is *complete*: then every plan with at most
``k`` relocations that meets the goal has its options in the list, and
the fewest relocations among them (:func:`tri.rebalance.realise.realise`)
is the optimum.

With several cases (scenarios, :mod:`tri.rebalance.problem`) the quantities
are every case's three phases, then every case's neutral: a plan is kept
only when it meets the target (and the neutral limit) in every case, and
plans are ranked by the worst case's largest phase RMS current.

The listing itself (per-change terms, chunks of plans) is
:mod:`tri.rebalance.plan_listing`.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from tri.rebalance.plan_listing import PLAN_LIMIT, Quantities, change_depth, walk_plans
from tri.rebalance.problem import Problem

#: Re-exported: the limit on plans counted out is part of this module's contract.
__all__ = [
    "FOUND_LIMIT",
    "PLAN_LIMIT",
    "SLACK",
    "Counted",
    "Ranked",
    "best_plans_within",
    "enumeration_fits",
    "plans_count",
    "plans_within",
]

#: Relative slack on the target and neutral checks: round-off only [-].
SLACK = 1e-7
#: Largest number of plans returned (beyond it the list is not complete) [-].
FOUND_LIMIT = 4_000


@dataclass(frozen=True)
class Counted:
    """Plans that pass the counting-out.

    Attributes
    ----------
    plans : list of int ndarray
        Options per free circuit, fewest changes of placed circuits first.
    changes : list of int
        Placed circuits on another option in each plan [-].
    complete : bool
        Every plan with at most ``k`` changes that meets the goal is listed.
    """

    plans: list[np.ndarray]
    changes: list[int]
    complete: bool


def plans_count(pr: Problem, k: int) -> int:
    """Plans listed for ``k`` relocations (:func:`change_depth` changes at most) [-].

    The elementary symmetric sums of the number of other options of each
    free circuit, up to that degree.
    """
    alt = np.diff(pr.starts) - 1
    d = change_depth(pr, k)
    e = [1] + [0] * d
    for a in alt.tolist():
        for j in range(len(e) - 1, 0, -1):
            e[j] += e[j - 1] * a
    return int(sum(e))


def enumeration_fits(pr: Problem, k: int) -> bool:
    """True when :func:`plans_within` applies for ``k`` relocations."""
    return k >= 0 and plans_count(pr, k) <= PLAN_LIMIT


def plans_within(
    pr: Problem,
    target: float,
    neutral_max_a: float | None,
    k: int,
    stop: Callable[[], bool] | None = None,
) -> Counted | None:
    """Every plan with at most ``k`` option changes that meets the goal (module notes).

    Parameters
    ----------
    pr : Problem
    target : float
        Largest deviation of a phase RMS current from the mean, a fraction [-].
    neutral_max_a : float or None
        Largest neutral RMS current [A].
    k : int
        Largest number of placed circuits on another option [-].
    stop : callable, optional
        Checked between chunks; when it returns True the list ends, not complete.

    Returns
    -------
    Counted or None
        None when more than :data:`PLAN_LIMIT` plans would be listed.
    """
    if not enumeration_fits(pr, k):
        return None
    with_neutral = neutral_max_a is not None and pr.has_neutral
    q = Quantities(pr, with_neutral)
    found: list[np.ndarray] = []
    sizes: list[int] = []
    n_ph = 3 * pr.n_cases
    for vals, use, plans in walk_plans(pr, q, with_neutral, k):
        if stop is not None and stop():
            return Counted(found, sizes, complete=False)
        r = np.sqrt(np.maximum(vals[:, :n_ph], 0.0)).reshape(-1, pr.n_cases, 3)
        mean = r.mean(axis=2)
        dev = np.max(np.abs(r - mean[..., None]), axis=2)
        good = np.all(dev <= target * mean * (1 + SLACK) + 1e-12, axis=1)
        if vals.shape[1] > n_ph:
            assert neutral_max_a is not None
            good &= np.all(
                np.sqrt(np.maximum(vals[:, n_ph:], 0.0)) <= neutral_max_a * (1 + SLACK), axis=1
            )
        good &= np.all(use <= q.cap, axis=1)
        if not np.any(good):
            continue
        for a in plans(good):
            moved = int(np.sum(pr.movable & (a != pr.current)))
            if moved <= k:
                found.append(a)
                sizes.append(moved)
        if len(found) > FOUND_LIMIT:
            return Counted(found[:FOUND_LIMIT], sizes[:FOUND_LIMIT], complete=False)
    order = np.argsort(sizes, kind="stable")
    return Counted([found[i] for i in order], [sizes[i] for i in order], complete=True)


@dataclass(frozen=True)
class Ranked:
    """The best plans by largest phase RMS current.

    Attributes
    ----------
    plans : list of int ndarray
        Options per free circuit, smallest largest-phase RMS current first.
    values : list of float
        That current for each [A].
    complete : bool
        Every plan with at most ``k`` changes that passes the capacity
        counts and the neutral limit is listed; otherwise every such plan
        not listed has a value of at least the last one listed.
    """

    plans: list[np.ndarray]
    values: list[float]
    complete: bool


def best_plans_within(
    pr: Problem,
    neutral_max_a: float | None,
    k: int,
    limit: int = FOUND_LIMIT,
    stop: Callable[[], bool] | None = None,
) -> Ranked | None:
    """The ``limit`` plans with at most ``k`` option changes of smallest largest-phase RMS
    (the worst case's, with scenarios).

    Plans over the neutral limit (within round-off) or the capacity counts are
    left out; with new circuits, plans with more than ``k`` changes of placed
    circuits may be listed too (they fail the budget when checked). None when
    :func:`enumeration_fits` does not hold or ``stop()`` became true.
    """
    if not enumeration_fits(pr, k):
        return None
    with_neutral = neutral_max_a is not None and pr.has_neutral
    q = Quantities(pr, with_neutral)
    best_v = np.zeros(0)
    best_rows: list[np.ndarray] = []
    passing = 0
    n_ph = 3 * pr.n_cases
    for vals, use, plans in walk_plans(pr, q, with_neutral, k):
        if stop is not None and stop():
            return None
        top = np.sqrt(np.maximum(vals[:, :n_ph], 0.0)).max(axis=1)  # the worst case's
        good = np.all(use <= q.cap, axis=1)
        if vals.shape[1] > n_ph:
            assert neutral_max_a is not None
            good &= np.all(
                np.sqrt(np.maximum(vals[:, n_ph:], 0.0)) <= neutral_max_a * (1 + SLACK), axis=1
            )
        passing += int(np.sum(good))
        if best_v.size >= limit:
            good &= top < best_v.max()
        if not np.any(good):
            continue
        best_v = np.concatenate([best_v, top[good]])
        best_rows.extend(plans(good))
        if best_v.size > 2 * limit:
            keep = np.argsort(best_v, kind="stable")[:limit]
            best_v, best_rows = best_v[keep], [best_rows[i] for i in keep]
    order = np.argsort(best_v, kind="stable")[:limit]
    return Ranked(
        [np.asarray(best_rows[i], dtype=int) for i in order],
        [float(best_v[i]) for i in order],
        complete=passing <= limit,
    )
