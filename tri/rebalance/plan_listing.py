"""Listing every plan with a few option changes, in vectorised chunks: the
per-change terms and Gram matrices of each quantity (:class:`Quantities`),
and the plans with their squared norms and capacity use, by number of
changes or as a full product of options when that is small
(:func:`walk_plans`). :mod:`tri.rebalance.exhaust` keeps the plans that meet
the goal (module notes there: the expansion of the squared norm).
"""

from __future__ import annotations

import numpy as np

from tri.rebalance.plan_currents import spectra
from tri.rebalance.problem import Problem
from tri.rebalance.squares import gram

#: Largest number of plans counted out [-].
PLAN_LIMIT = 3_000_000


def change_depth(pr: Problem, k: int) -> int:
    """Changes to list for ``k`` relocations: new circuits' options come on top [-].

    New circuits sit at their first option in the reference plan; a plan with
    at most ``k`` relocations differs from it in at most ``k`` placed circuits
    and any of the new ones.
    """
    return int(min(pr.n_free, max(0, k) + np.sum(~pr.movable)))


class Quantities:
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


def plan_of(q: Quantities, row: np.ndarray) -> np.ndarray:
    """Options per free circuit of the plan made of the changes ``row``."""
    a = q.cur.copy()
    a[q.circ[row]] = q.others[row]
    return a


def _chunks(q: Quantities, k: int):
    """Every plan with at most ``k`` changes, in chunks ``(vals, use, plans)`` by number of changes.

    ``vals`` (n, Q): the squared norms of the quantities; ``use`` (n, 7): the
    capacity counts; ``plans(mask)``: the options of the selected plans.
    """
    for vals, use, rows in _change_chunks(q, k):
        yield vals, use, lambda sel, rows=rows: np.array([plan_of(q, r) for r in rows(sel)])


def _change_chunks(q: Quantities, k: int):
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


def walk_plans(pr: Problem, q: Quantities, with_neutral: bool, k: int):
    """The plan chunks: the product of every option when it is small, else by changes."""
    if int(np.prod(np.diff(pr.starts).astype(float))) <= PLAN_LIMIT:
        return _product_chunks(pr, with_neutral, k)
    return _chunks(q, change_depth(pr, k))


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
