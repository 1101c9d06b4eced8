"""The balance within a budget, relaxed to fractional moves: a bound by Kelley's cutting planes.

Let ``x`` give every free circuit a weight on each of its options
(``x ≥ 0``, the weights of a circuit summing to 1); a plan is such an
``x`` with one weight 1 per circuit. Phase p's currents in case c are
linear in ``x``: ``v_cp(x) = base_cp + Σ_o x_o·contrib_cop`` (real and
imaginary parts of every harmonic order as one real vector, so that
``||v_cp||`` is the phase's RMS current, :func:`tri.engine.harmonics.rms`).
A plan with at most ``k`` relocations changes the option of at most ``k``
placed circuits (a breaker on other phases has left its slot), so its
``x`` satisfies ``Σ_{placed i} x_(i, now) ≥ n_placed - k``.

Lemma (the relaxation)
----------------------
For any finite set of unit vectors ``u`` per case and phase, the least
``t`` over fractional ``x`` (as above, with the budget row) such that
``<v_cp(x), u> ≤ t`` for every listed ``u`` is at most the largest phase
RMS current (over the cases) of every plan with at most ``k`` relocations.

*Proof.* Such a plan is a feasible ``x``; for it ``<v_cp, u> ≤ ||v_cp||``
(Cauchy-Schwarz, ``||u|| = 1``), so ``t = max_cp ||v_cp||`` is feasible and
the least ``t`` is at most that. Slots, capacity and the neutral limit only
restrict the plans further. ∎

Each linear program is solved by HiGHS (:func:`scipy.optimize.linprog`);
its ``x`` then gives the directions ``u = v_cp(x)/||v_cp(x)||`` of the
phases above ``t``, added as cuts (Kelley's method [1]), until the least
``t`` is within :data:`CONVERGED` of ``max ||v_cp(x)||`` (the relaxation's
own optimum: a convex program), the bound is as high as the caller needs,
or time runs out. Every round's ``t`` is a bound; a relative slack of
:data:`SLACK` covers the solver's tolerances.

This is the bound the mixed-integer program's relaxation tends to, reached
without its polygons or its branching. Fractional moves spread the fine
balance over many breakers, so the bound stays near the floor ``F`` with a
generous budget; with a tight one (few moves must carry a crowded phase's
excess) it rises above ``F`` and the budget floor of
:mod:`tri.rebalance.crossing`.

References
----------
1. J. E. Kelley, "The cutting-plane method for solving convex programs",
   *J. SIAM* 8 (1960) 703-712.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

from tri.rebalance.problem import Problem
from tri.rebalance.sequence_frame import real_parts

#: Relative gap between the program's ``t`` and its plan's largest current that ends the loop [-].
CONVERGED = 1e-7
#: Relative slack on each program's value for the solver's tolerances [-].
SLACK = 1e-7
#: Most rounds of cuts [-].
ROUNDS = 400


def _currents(pr: Problem) -> tuple[np.ndarray, np.ndarray]:
    """Every case's fixed part (C·3, K) and each option's part (O, C·3, K), real vectors."""
    base, parts = [], []
    for view in pr.views():
        base.append(real_parts(view.base))
        parts.append(real_parts(view.contrib))
    return np.concatenate(base), np.concatenate(parts, axis=1)


def _rows(pr: Problem, k: int) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The weights' rows: one sum per circuit (equalities) and the budget (``≤``)."""
    n_opt = pr.owner.size
    a_eq = np.zeros((pr.n_free, n_opt + 1))
    a_eq[pr.owner, np.arange(n_opt)] = 1.0
    placed = np.flatnonzero(pr.movable)
    budget = np.zeros((1, n_opt + 1))
    budget[0, pr.current[placed]] = -1.0
    return a_eq, np.ones(pr.n_free), budget, np.array([k - placed.size], dtype=float)


def relaxed_bound(
    pr: Problem,
    k: int,
    seen: list[np.ndarray],
    enough: float = math.inf,
    stop: Callable[[], bool] | None = None,
) -> float | None:
    """The lemma's bound on every plan with at most ``k`` relocations [A] (module notes).

    Parameters
    ----------
    pr : Problem
    k : int
        Relocations allowed [-].
    seen : list of int ndarray
        Plans (options per free circuit) whose phase directions start the cuts.
    enough : float
        Stop once the bound reaches this [A].
    stop : callable, optional
        Checked between rounds (the bound so far is returned).

    Returns
    -------
    float or None
        The largest round's bound; None when the solver failed at once.
    """
    from scipy.optimize import linprog  # only when a search runs

    base, parts = _currents(pr)
    n_opt = pr.owner.size
    a_eq, b_eq, a_ub, b_ub = _rows(pr, k)
    cost = np.zeros(n_opt + 1)
    cost[-1] = 1.0
    bounds = [(0.0, 1.0)] * n_opt + [(0.0, None)]
    cut_rows, cut_rhs = [a_ub], [b_ub]

    def add_cuts(v: np.ndarray, over: np.ndarray) -> None:
        u = v[over] / np.linalg.norm(v[over], axis=1, keepdims=True)
        rows = np.hstack([np.einsum("ock,ck->co", parts[:, over], u), -np.ones((u.shape[0], 1))])
        cut_rows.append(rows)
        cut_rhs.append(-np.einsum("ck,ck->c", base[over], u))

    for assign in seen or [pr.current_assignment()]:
        v = base + parts[np.asarray(assign)].sum(axis=0)
        add_cuts(v, np.linalg.norm(v, axis=1) > 0)
    best = None
    centre, centre_value = np.zeros(n_opt), math.inf
    for _ in range(ROUNDS):
        res = linprog(
            cost,
            A_ub=np.vstack(cut_rows),
            b_ub=np.concatenate(cut_rhs),
            A_eq=a_eq,
            b_eq=b_eq,
            bounds=bounds,
            method="highs",
        )
        if res.status != 0 or res.x is None:
            return best
        t = float(res.x[-1])
        bound = t * (1 - SLACK)
        best = bound if best is None else max(best, bound)
        x = res.x[:n_opt]
        v = base + np.einsum("o,ock->ck", x, parts)
        size = np.linalg.norm(v, axis=1)
        if size.max() < centre_value:
            centre, centre_value = x, float(size.max())
        if centre_value <= t * (1 + CONVERGED) or best >= enough or (stop is not None and stop()):
            break
        add_cuts(v, size > t * (1 + CONVERGED))
        mid = base + np.einsum("o,ock->ck", 0.5 * (x + centre), parts)  # a deeper cut (in-out)
        add_cuts(mid, np.linalg.norm(mid, axis=1) > t * (1 + CONVERGED))
    return best
