"""Every plan with a few moves, checked exactly: the fewest-moves proof when the budget is small.

To prove that no plan with at most ``k`` moves meets the target, the
mixed-integer program must rule out every such plan through its
relaxation, and plans that miss the target by a hair keep it busy. When
``k`` is small the plans can simply be counted out instead: each is the
current plan with at most ``k`` placed circuits on another option.

For one quantity ``y`` (a phase's spectrum, or the neutral's), with
``Δ_c`` what change ``c`` (a circuit to one of its other options) adds,

``||y_now + Σ_{c∈S} Δ_c||² = ||y_now||² + Σ_{c∈S} (2·Re<y_now, Δ_c> + ||Δ_c||²)
+ Σ_{c<c'∈S} 2·Re<Δ_c, Δ_c'>``,

so with the per-change terms and the Gram matrix computed once, a plan
costs a handful of additions per quantity, vectorised over all plans
that share their first changes. Slot capacity and window geometry are
ignored here: every plan the solver could choose is among those checked,
so when none meets the target within round-off (a relative ``1e-7`` of
slack, far above it), no plan with at most ``k`` moves does — breaker
relocations are never fewer than option changes. Plans that do pass are
returned for the exact check with slot realisation.
"""

from __future__ import annotations

import numpy as np

from tri.rebalance.problem import Problem, spectra
from tri.rebalance.squares import gram

#: Relative slack on the target and neutral checks: round-off only [-].
SLACK = 1e-7
#: Largest number of plans counted out [-].
PLAN_LIMIT = 3_000_000
#: Largest number of plans returned [-].
FOUND_LIMIT = 64


def plans_count(pr: Problem, k: int) -> int:
    """Plans with at most ``k`` placed circuits on another option [-].

    The elementary symmetric sums of the number of other options of each
    movable circuit, up to degree ``k``.
    """
    alt = (np.diff(pr.starts) - 1)[pr.movable]
    e = [1] + [0] * max(0, k)
    for a in alt.tolist():
        for j in range(len(e) - 1, 0, -1):
            e[j] += e[j - 1] * a
    return int(sum(e))


def plans_within(
    pr: Problem, target: float, neutral_max_a: float | None, k: int
) -> list[np.ndarray] | None:
    """Every plan with at most ``k`` moves that meets the goal within round-off.

    Parameters
    ----------
    pr : Problem
    target : float
        Largest deviation of a phase RMS current from the mean, a fraction [-].
    neutral_max_a : float or None
        Largest neutral RMS current [A].
    k : int
        Largest number of placed circuits on another option [-].

    Returns
    -------
    list of int ndarray, or None
        The plans (options per free circuit), fewest changes first, at
        most :data:`FOUND_LIMIT`; an empty list proves that no plan with at
        most ``k`` moves meets the goal. None when the method does not
        apply (new circuits to place, or more than :data:`PLAN_LIMIT` plans).
    """
    if np.any(~pr.movable) or k < 0 or plans_count(pr, k) > PLAN_LIMIT:
        return None
    cur = pr.current_assignment()
    v0, n0 = spectra(pr, cur)
    others = np.array(
        [o for o in range(pr.n_options) if pr.movable[pr.owner[o]] and o != cur[pr.owner[o]]],
        dtype=int,
    )
    circ = pr.owner[others] if others.size else np.zeros(0, dtype=int)
    # quantities: three phases and, with a limit, the neutral
    deltas = [pr.contrib[others, p, :] - pr.contrib[cur[circ], p, :] for p in range(3)]
    bases = [v0[p] for p in range(3)]
    if neutral_max_a is not None and pr.has_neutral:
        deltas.append(pr.ncontrib[others] - pr.ncontrib[cur[circ]])
        bases.append(n0)
    base2 = np.array([float(np.sum(b.real**2 + b.imag**2)) for b in bases])
    lin = np.stack(
        [
            2.0 * np.real(np.sum(np.conj(b)[None, :] * d, axis=-1)) + np.sum(np.abs(d) ** 2, -1)
            for b, d in zip(bases, deltas, strict=True)
        ],
        axis=-1,
    )  # (C, Q)
    g = np.stack([gram(d) for d in deltas], axis=-1)  # (C, C, Q)

    def ok(vals: np.ndarray) -> np.ndarray:
        r = np.sqrt(np.maximum(vals[:, :3], 0.0))
        mean = r.mean(axis=1)
        dev = np.max(np.abs(r - mean[:, None]), axis=1)
        good = dev <= target * mean * (1 + SLACK) + 1e-12
        if vals.shape[1] > 3:
            assert neutral_max_a is not None
            good &= np.sqrt(np.maximum(vals[:, 3], 0.0)) <= neutral_max_a * (1 + SLACK)
        return good

    found: list[np.ndarray] = []

    def keep(combos: np.ndarray) -> bool:
        for row in combos:
            a = cur.copy()
            a[circ[row]] = others[row]
            found.append(a)
            if len(found) >= FOUND_LIMIT:
                return True
        return False

    if ok(base2[None, :])[0] and keep(np.zeros((1, 0), dtype=int)):
        return found
    if k >= 1 and others.size:
        hit = np.flatnonzero(ok(base2 + lin))
        if hit.size and keep(hit[:, None]):
            return found
    if k < 2 or others.size < 2:
        return found
    ia, ib = np.triu_indices(others.size, 1)
    keep_pair = circ[ia] != circ[ib]
    ia, ib = ia[keep_pair], ib[keep_pair]
    order = np.argsort(circ[ia], kind="stable")
    ia, ib = ia[order], ib[order]
    pair_vals = base2 + lin[ia] + lin[ib] + g[ia, ib]  # (P, Q)
    hit = np.flatnonzero(ok(pair_vals))
    if hit.size and keep(np.column_stack([ia[hit], ib[hit]])):
        return found
    first_circ = circ[ia]
    # deeper: a prefix of d - 2 changes, then every pair after its last circuit
    for depth in range(3, k + 1):
        for prefix in _prefixes(circ, depth - 2):
            start = int(np.searchsorted(first_circ, circ[prefix[-1]], side="right"))
            if start >= ia.size:
                continue
            sl = slice(start, None)
            pre = prefix.tolist()
            pre_val = lin[pre].sum(axis=0)
            if len(pre) > 1:
                sub = g[np.ix_(pre, pre)]  # the diagonal is 2·||Δ||², not a pair
                pre_val = pre_val + 0.5 * (sub.sum(axis=(0, 1)) - np.einsum("iiq->q", sub))
            cross = g[pre].sum(axis=0)  # (C, Q): with every change
            vals = pair_vals[sl] + pre_val + cross[ia[sl]] + cross[ib[sl]]
            hit = np.flatnonzero(ok(vals))
            if hit.size:
                rows = np.column_stack([np.tile(prefix, (hit.size, 1)), ia[sl][hit], ib[sl][hit]])
                if keep(rows):
                    return found
    return found


def _prefixes(circ: np.ndarray, size: int):
    """Index tuples of ``size`` changes on increasing circuits (circ is nondecreasing)."""
    n = circ.size

    def rec(start: int, last: int, acc: list[int]):
        if len(acc) == size:
            yield np.array(acc, dtype=int)
            return
        for c in range(start, n):
            if circ[c] > last:
                acc.append(c)
                yield from rec(c + 1, int(circ[c]), acc)
                acc.pop()

    yield from rec(0, -1, [])


def enumeration_fits(pr: Problem, k: int) -> bool:
    """True when :func:`plans_within` applies for ``k`` moves."""
    return bool(np.all(pr.movable)) and k >= 0 and plans_count(pr, k) <= PLAN_LIMIT
