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
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from tri.rebalance.plan_currents import spectra
from tri.rebalance.problem import Problem
from tri.rebalance.squares import gram

#: Relative slack on the target and neutral checks: round-off only [-].
SLACK = 1e-7
#: Largest number of plans counted out [-].
PLAN_LIMIT = 3_000_000
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


def _depth(pr: Problem, k: int) -> int:
    """Changes to list for ``k`` relocations: new circuits' options come on top [-].

    New circuits sit at their first option in the reference plan; a plan with
    at most ``k`` relocations differs from it in at most ``k`` placed circuits
    and any of the new ones.
    """
    return int(min(pr.n_free, max(0, k) + np.sum(~pr.movable)))


def plans_count(pr: Problem, k: int) -> int:
    """Plans listed for ``k`` relocations (:func:`_depth` changes at most) [-].

    The elementary symmetric sums of the number of other options of each
    free circuit, up to that degree.
    """
    alt = np.diff(pr.starts) - 1
    d = _depth(pr, k)
    e = [1] + [0] * d
    for a in alt.tolist():
        for j in range(len(e) - 1, 0, -1):
            e[j] += e[j - 1] * a
    return int(sum(e))


def enumeration_fits(pr: Problem, k: int) -> bool:
    """True when :func:`plans_within` applies for ``k`` relocations."""
    return k >= 0 and plans_count(pr, k) <= PLAN_LIMIT


class _Quantities:
    """Per-change terms and Gram matrices of the phases (and the neutral)."""

    def __init__(self, pr: Problem, with_neutral: bool) -> None:
        cur = pr.current_assignment()
        self.cur = cur
        self.others = np.array([o for o in range(pr.n_options) if o != cur[pr.owner[o]]], dtype=int)
        self.circ = pr.owner[self.others] if self.others.size else np.zeros(0, dtype=int)
        self.moves = pr.movable[self.circ]  # a change of a placed circuit (a relocation)
        was = cur[self.circ]
        deltas, bases = [], []
        for view in pr.views():  # every case's phases, then every case's neutral
            v0, _ = spectra(view, cur)
            deltas += [view.contrib[self.others, p, :] - view.contrib[was, p, :] for p in range(3)]
            bases += [v0[p] for p in range(3)]
        if with_neutral:
            for view in pr.views():
                _, n0 = spectra(view, cur)
                deltas.append(view.ncontrib[self.others] - view.ncontrib[was])
                bases.append(n0)
        self.base2 = np.array([float(np.sum(b.real**2 + b.imag**2)) for b in bases])
        self.lin = np.stack(
            [
                2.0 * np.real(np.sum(np.conj(b)[None, :] * d, axis=-1)) + np.sum(np.abs(d) ** 2, -1)
                for b, d in zip(bases, deltas, strict=True)
            ],
            axis=-1,
        )  # (C, Q)
        self.g = np.stack([gram(d) for d in deltas], axis=-1)  # (C, C, Q)
        use = np.concatenate([pr.use_cells, pr.use_window], axis=1)
        self.use0 = use[cur].sum(axis=0)
        self.duse = use[self.others] - use[was]  # (C, 7)
        self.cap = np.concatenate([pr.cap_phase, pr.cap_window])


def _chunks(q: _Quantities, k: int):
    """Every plan with at most ``k`` changes, in chunks ``(vals, use, plans)`` by number of changes.

    ``vals`` (n, Q): the squared norms of the quantities; ``use`` (n, 7): the
    capacity counts; ``plans(mask)``: the options of the selected plans.
    """
    for vals, use, rows in _change_chunks(q, k):
        yield vals, use, lambda sel, rows=rows: np.array([_plan_of(q, r) for r in rows(sel)])


def _change_chunks(q: _Quantities, k: int):
    """As :func:`_chunks`, with ``rows(mask)`` the change indices of the selected plans."""
    yield q.base2[None, :], q.use0[None, :], lambda sel: np.zeros((int(np.sum(sel)), 0), int)
    n = q.others.size
    if k < 1 or n == 0:
        return
    yield q.base2 + q.lin, q.use0 + q.duse, lambda sel: np.flatnonzero(sel)[:, None]
    if k < 2 or n < 2:
        return
    ia, ib = np.triu_indices(n, 1)
    keep_pair = q.circ[ia] != q.circ[ib]
    ia, ib = ia[keep_pair], ib[keep_pair]
    order = np.argsort(q.circ[ia], kind="stable")
    ia, ib = ia[order], ib[order]
    pair_vals = q.base2 + q.lin[ia] + q.lin[ib] + q.g[ia, ib]  # (P, Q)
    pair_use = q.use0 + q.duse[ia] + q.duse[ib]
    yield pair_vals, pair_use, lambda sel: np.column_stack([ia[sel], ib[sel]])
    first_circ = q.circ[ia]
    # deeper: a prefix of d - 2 changes, then every pair after its last circuit
    for depth in range(3, k + 1):
        for prefix in _prefixes(q.circ, depth - 2):
            start = int(np.searchsorted(first_circ, q.circ[prefix[-1]], side="right"))
            if start >= ia.size:
                continue
            sl = slice(start, None)
            pre = prefix.tolist()
            pre_val = q.lin[pre].sum(axis=0)
            if len(pre) > 1:
                sub = q.g[np.ix_(pre, pre)]  # the diagonal is 2·||Δ||², not a pair
                pre_val = pre_val + 0.5 * (sub.sum(axis=(0, 1)) - np.einsum("iiq->q", sub))
            cross = q.g[pre].sum(axis=0)  # (C, Q): with every change
            vals = pair_vals[sl] + pre_val + cross[ia[sl]] + cross[ib[sl]]
            use = pair_use[sl] + q.duse[pre].sum(axis=0)

            def rows(sel, prefix=prefix, sl=sl):
                m = int(np.sum(sel))
                return np.column_stack([np.tile(prefix, (m, 1)), ia[sl][sel], ib[sl][sel]])

            yield vals, use, rows


#: Plans scored at once by the product walker [-].
_BLOCK = 20_000


def _product_chunks(pr: Problem, with_neutral: bool, k: int):
    """Every plan (every option of every free circuit) with at most ``k`` relocations' worth of
    changes of placed circuits, in blocks, as :func:`_chunks` yields them.

    The plans are counted in mixed radix: the last circuits vary inside a
    block (their sums computed once), the first ones from block to block.
    """
    counts = np.diff(pr.starts)
    cur = pr.current_assignment()
    parts = [view.contrib[:, p, :] for view in pr.views() for p in range(3)]
    bases = [view.base[p] for view in pr.views() for p in range(3)]
    if with_neutral:
        parts += [view.ncontrib for view in pr.views()]
        bases += [view.nbase for view in pr.views()]
    use_of = np.concatenate([pr.use_cells, pr.use_window], axis=1)
    cap_split = int(np.searchsorted(np.cumprod(counts[::-1]), _BLOCK, side="right"))
    inner = list(range(pr.n_free - cap_split, pr.n_free))
    outer = list(range(pr.n_free - cap_split))
    inner_opts = _grid(pr, inner)  # (B, len(inner)) options
    sums = [np.zeros((inner_opts.shape[0], q.shape[1]), complex) for q in parts]
    for j in range(len(inner)):
        for qk, q in enumerate(parts):
            sums[qk] += q[inner_opts[:, j]]
    inner_use = use_of[inner_opts].sum(axis=1) if inner else np.zeros((1, use_of.shape[1]))
    inner_moves = np.sum(pr.movable[inner] & (inner_opts != cur[inner]), axis=1)
    for combo in _grid(pr, outer):
        moved = int(np.sum(pr.movable[outer] & (combo != cur[outer])))
        if moved > k:
            continue
        ok = inner_moves + moved <= k
        vals = np.stack(
            [
                np.sum(np.abs(b + q[combo].sum(axis=0) + sm) ** 2, axis=-1)
                for b, q, sm in zip(bases, parts, sums, strict=True)
            ],
            axis=-1,
        )
        use = inner_use + use_of[combo].sum(axis=0)
        use = np.where(ok[:, None], use, np.iinfo(np.int32).max)

        def plans(sel, combo=combo):
            rows = inner_opts[sel]
            return np.column_stack([np.tile(combo, (rows.shape[0], 1)), rows]).astype(int)

        yield vals, use, plans


def _grid(pr: Problem, circuits: list[int]) -> np.ndarray:
    """Every combination of options of ``circuits`` (int ndarray, shape (n, len)), in order."""
    if not circuits:
        return np.zeros((1, 0), dtype=int)
    axes = [np.arange(pr.starts[i], pr.starts[i + 1]) for i in circuits]
    mesh = np.meshgrid(*axes, indexing="ij")
    return np.stack([g.ravel() for g in mesh], axis=-1)


def _walk(pr: Problem, q: _Quantities, with_neutral: bool, k: int):
    """The plan chunks: the product of every option when it is small, else by changes."""
    if int(np.prod(np.diff(pr.starts).astype(float))) <= PLAN_LIMIT:
        return _product_chunks(pr, with_neutral, k)
    return _chunks(q, _depth(pr, k))


def _plan_of(q: _Quantities, row: np.ndarray) -> np.ndarray:
    a = q.cur.copy()
    a[q.circ[row]] = q.others[row]
    return a


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
    q = _Quantities(pr, with_neutral)
    found: list[np.ndarray] = []
    sizes: list[int] = []
    n_ph = 3 * pr.n_cases
    for vals, use, plans in _walk(pr, q, with_neutral, k):
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
    q = _Quantities(pr, with_neutral)
    best_v = np.zeros(0)
    best_rows: list[np.ndarray] = []
    passing = 0
    n_ph = 3 * pr.n_cases
    for vals, use, plans in _walk(pr, q, with_neutral, k):
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
