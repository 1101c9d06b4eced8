"""Every plan with a few changes below a cutoff, by meeting in the middle on the partition.

The balance with a budget of ``k`` relocations is number partitioning in
three bins with at most ``k`` items taken out and put back: the model's
relaxation spreads fractional moves over many breakers and reaches the
floor ``F``, while the true optimum is decided by which *few* breakers sum
to what must cross. When ``k`` is small, the plans that can still beat the
best one known are few, and they can be listed exactly.

Sizes (the frame of :mod:`tri.rebalance.crossing`)
--------------------------------------------------
Rotate phase p's order-h current by ``a^(h·p mod 3)`` to get ``w_p``; their
mean ``J`` is the same for every plan and ``F = ||J||``. With ``U = J/F``,
``s_p = <w_p, U> - F`` is the "size" phase p carries above the floor, linear
in the options, and ``s_A + s_B + s_C = 0`` for every plan (the mean of
``w_p`` is ``J``).

Lemma 1 (the triangle)
----------------------
If a plan's largest phase RMS current is below ``c``, its sizes lie in the
triangle ``s_p < δ = c - F`` (every p), and the point ``(s_A, s_B, s_C)`` of
the plane ``Σ s_p = 0`` is within ``δ·√6`` of the origin.

*Proof.* ``R_p = ||w_p|| ≥ <w_p, U> = F + s_p`` (Cauchy-Schwarz, the rotation
keeps norms), so ``s_p < δ``. On the plane, the triangle is convex with
vertices ``(δ, δ, -2δ)`` and permutations, of norm ``δ·√6``; every point of
it is at most that far from the origin. ∎

Lemma 2 (the canonical split)
-----------------------------
Number the *changes* (a placed breaker to one of its other options) by
breaker. A plan ``S`` of ``s ≤ k`` changes on distinct breakers splits in
exactly one way into ``S₁`` (its first ``⌈s/2⌉`` changes) and ``S₂`` (the
rest, all on later breakers); both have at most ``⌈k/2⌉`` changes. Sizes
add: ``s(S) = s(ref) + s(S₁) + s(S₂)``.

*Proof.* The order by breaker is total on ``S``; the sizes are linear. ∎

So every plan below ``c`` is a pair ``(S₁, S₂)`` of half-plans with
``||(-s(ref) - s(S₁)) - s(S₂)|| ≤ δ·√6`` in orthonormal coordinates of the
plane, a fixed-radius search between two point sets
(:meth:`scipy.spatial.cKDTree.sparse_distance_matrix`). The pairs found are
kept when canonical, inside the triangle, within the capacity counts
(:mod:`tri.rebalance.exhaust`) and the neutral limit, and below ``c`` by the
exact figures; :func:`plans_below` returns them all, so every plan within
the budget that is not listed has a largest phase RMS current of at least
``c`` (or fails those checks, so is not a plan). A relocation changes at
most one breaker's option, so this holds for ``k`` relocations too.

With several cases (scenarios, :mod:`tri.rebalance.problem`) the value is
the worst case's: a plan below ``c`` is below ``c`` in every case, so
Lemma 1 holds in any one of them; the case with the largest floor (the
smallest triangle) is used, and the exact check takes every case.

The triangle's size is ``c - F``: the listing is fast when the best plan
known is close to ``F``, which is also when the model's bound (about ``F``)
is least able to decide.
"""

from __future__ import annotations

import itertools
from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from tri.rebalance.plan_currents import spectra
from tri.rebalance.problem import Problem
from tri.rebalance.sequence_frame import real_parts, rotations

#: Most half-plans listed (memory and time of the search) [-].
HALF_LIMIT = 150_000
#: Most pairs the fixed-radius search may return before the listing gives up [-].
PAIR_LIMIT = 3_000_000
#: Runs of breakers the pair search is cut into [-].
BLOCKS = 8
#: Relative slack of the triangle and the cutoff: round-off only [-].
SLACK = 1e-9
#: Relative slack on the neutral limit, as in :mod:`tri.rebalance.exhaust` [-].
NEUTRAL_SLACK = 1e-7
#: Orthonormal coordinates of the plane ``Σ s_p = 0`` (rows) [-].
PLANE = np.array([[1.0, -1.0, 0.0], [1.0, 1.0, -2.0]]) / np.array([[2**0.5], [6**0.5]])


@dataclass(frozen=True)
class Listed:
    """Every plan below a cutoff (module notes).

    Attributes
    ----------
    plans : list of int ndarray
        Options per free circuit, smallest largest-phase RMS current first.
    values : list of float
        That current for each [A].
    tail : float
        Every plan within the budget that passes the capacity counts and the
        neutral limit and is not listed has a value of at least this [A].
    pairs : int
        Pairs the fixed-radius search returned (its cost) [-].
    """

    plans: list[np.ndarray]
    values: list[float]
    tail: float
    pairs: int = 0


@dataclass(frozen=True, eq=False)
class _Changes:
    """The changes against a reference plan, numbered by breaker."""

    ref: np.ndarray  # (F,) the reference options
    opt: np.ndarray  # (C,) option taken by each change
    circ: np.ndarray  # (C,) its breaker, nondecreasing
    size0: np.ndarray  # (2,) the reference's sizes in plane coordinates [A]
    dsize: np.ndarray  # (C, 2) what each change adds [A]
    floor_a: float


def _changes(pr: Problem, ref: np.ndarray) -> _Changes:
    """The changes, sized in the case with the largest floor (module notes)."""
    ref = np.asarray(ref, dtype=int)
    pr = max(pr.views(), key=lambda v: v.floor_a)
    others = np.array(
        [o for o in range(pr.n_options) if o != ref[pr.owner[o]] and pr.movable[pr.owner[o]]],
        dtype=int,
    )
    circ = pr.owner[others] if others.size else np.zeros(0, dtype=int)
    rot = rotations(pr.orders)
    w0 = real_parts(rot * spectra(pr, ref)[0])  # (3, K)
    dw = real_parts(rot[None] * (pr.contrib[others] - pr.contrib[ref[circ]]))  # (C, 3, K)
    j = w0.mean(axis=0)
    floor = float(np.linalg.norm(j))
    u = j / floor if floor > 0 else np.eye(j.size)[0]
    size0 = PLANE @ (w0 @ u - floor)
    dsize = np.einsum("cpk,k->cp", dw, u) @ PLANE.T
    return _Changes(ref, others, circ, size0, dsize, floor)


def _count_halves(ch: _Changes, depth: int) -> int:
    """Half-plans of at most ``depth`` changes on distinct breakers (elementary sums) [-]."""
    _, per = np.unique(ch.circ, return_counts=True)
    e = [1] + [0] * depth
    for a in per.tolist():
        for j in range(depth, 0, -1):
            e[j] += e[j - 1] * a
    return int(sum(e))


def halves_fit(pr: Problem, k: int, ref: np.ndarray | None = None) -> bool:
    """True when :func:`plans_below` applies: few enough half-plans, no new circuits."""
    if k < 1 or pr.n_free == 0 or not np.all(pr.movable) or not pr.symmetric:
        return False  # Lemma 1 needs Σ s_p = 0 for every plan: not on a high-leg delta
    a = pr.current_assignment() if ref is None else ref
    return _count_halves(_changes(pr, a), (k + 1) // 2) <= HALF_LIMIT


def _halves(ch: _Changes, depth: int) -> list[np.ndarray]:
    """Half-plans by size: ``out[d]`` (n_d, d) change indices on increasing breakers."""
    n = ch.opt.size
    # first change of a later breaker than change i's
    nxt = np.searchsorted(ch.circ, ch.circ, side="right")
    out = [np.zeros((1, 0), dtype=int)]
    level = np.arange(n)[:, None]
    for d in range(1, depth + 1):
        if d > 1:
            start = nxt[level[:, -1]]
            count = n - start
            rows = np.repeat(np.arange(level.shape[0]), count)
            offs = np.arange(rows.size) - np.repeat(np.cumsum(count) - count, count)
            level = np.column_stack([level[rows], start[rows] + offs])
        out.append(level)
    return out


def _pairs(ch: _Changes, halves: list[np.ndarray], k: int, radius: float, stop):
    """Canonical pairs ``(S₁, S₂)`` within ``radius`` of the origin (Lemma 2), or None.

    Rows of change indices (``C`` pads). The breakers are cut into
    :data:`BLOCKS` runs; the ``S₁`` ending in a run are searched only
    against the ``S₂`` starting in it or later, so few pairs found are
    not canonical.
    """
    pad = np.vstack([ch.dsize, np.zeros((1, 2))])
    points = [pad[h].sum(axis=1) if h.shape[1] else np.zeros((1, 2)) for h in halves]
    n_circ = int(ch.circ.max(initial=0)) + 1
    edges = np.unique(np.linspace(0, n_circ, BLOCKS + 1).astype(int))
    found, total = [], 0
    for d1 in range(len(halves) - 1, -1, -1):
        for d2 in (d1, d1 - 1):
            if d2 < 0 or d1 + d2 > k:
                continue
            if stop is not None and stop():
                return None
            if d1 == 0 or d2 == 0:
                parts = [(np.arange(len(halves[d1])), np.arange(len(halves[d2])))]
            else:
                last = ch.circ[halves[d1][:, -1]]
                first = ch.circ[halves[d2][:, 0]]
                parts = [
                    (np.flatnonzero((last >= lo) & (last < hi)), np.flatnonzero(first > lo))
                    for lo, hi in itertools.pairwise(edges)
                ]
            for ia, ib in parts:
                if ia.size == 0 or ib.size == 0:
                    continue
                i, j = _near(-ch.size0 - points[d1][ia], points[d2][ib], radius)
                total += i.size
                if total > PAIR_LIMIT:
                    return None
                i, j = ia[i], ib[j]
                if d1 and d2:  # canonical: S₁'s last breaker before S₂'s first
                    keep = ch.circ[halves[d1][i, -1]] < ch.circ[halves[d2][j, 0]]
                    i, j = i[keep], j[keep]
                rows = np.full((i.size, k), ch.opt.size)
                rows[:, :d1] = halves[d1][i]
                rows[:, d1 : d1 + d2] = halves[d2][j]
                found.append(rows)
    return (np.vstack(found) if found else np.zeros((0, k), dtype=int)), total


def _near(a: np.ndarray, b: np.ndarray, radius: float) -> tuple[np.ndarray, np.ndarray]:
    """Index pairs of points of ``a`` and ``b`` (n, 2) at most ``radius`` apart."""
    from scipy.spatial import cKDTree  # only when a listing runs

    hit = cKDTree(a).sparse_distance_matrix(cKDTree(b), radius, output_type="ndarray")
    return hit["i"].astype(int), hit["j"].astype(int)


def plans_below(
    pr: Problem,
    k: int,
    cutoff: float,
    neutral_max_a: float | None = None,
    ref: np.ndarray | None = None,
    stop: Callable[[], bool] | None = None,
) -> Listed | None:
    """Every plan with at most ``k`` changes from ``ref`` whose largest phase RMS is below a cutoff.

    Parameters
    ----------
    pr : Problem
        Every free circuit placed (:func:`halves_fit`).
    k : int
        Largest number of placed circuits on another option than in ``ref`` [-].
    cutoff : float
        [A].
    neutral_max_a : float or None
        Plans over this neutral RMS current [A] are left out (they are not plans).
    ref : int ndarray, optional
        The reference options (default: the panel as it is).
    stop : callable, optional
        Checked between searches; when it returns True the answer is None.

    Returns
    -------
    Listed or None
        None when :func:`halves_fit` does not hold, the search would return
        too many pairs, or ``stop()`` became true.
    """
    a0 = pr.current_assignment() if ref is None else np.asarray(ref, dtype=int)
    if not halves_fit(pr, k, a0) or not np.isfinite(cutoff):
        return None
    ch = _changes(pr, a0)
    delta = cutoff * (1 + SLACK) - ch.floor_a + SLACK * ch.floor_a
    if delta < 0:
        return Listed([], [], cutoff * (1 - SLACK))
    halves = _halves(ch, (k + 1) // 2)
    rows = _pairs(ch, halves, k, delta * 6**0.5, stop)
    if rows is None:
        return None
    found, pairs = rows
    return replace(_exact(pr, ch, found, cutoff, neutral_max_a), pairs=pairs)


def _exact(pr: Problem, ch: _Changes, rows: np.ndarray, cutoff: float, neutral_max_a) -> Listed:
    """The listed pairs checked: triangle, capacity, neutral, exact value below the cutoff."""
    size = np.vstack([ch.dsize, np.zeros((1, 2))])[rows].sum(axis=1) + ch.size0
    s3 = size @ PLANE  # back to (s_A, s_B, s_C)
    limit = cutoff * (1 + SLACK) - ch.floor_a + SLACK * ch.floor_a
    rows = rows[np.all(s3 < limit, axis=1)]
    was = ch.ref[ch.circ]
    use = np.concatenate([pr.use_cells, pr.use_window], axis=1)
    duse = np.vstack([use[ch.opt] - use[was], np.zeros((1, use.shape[1]), dtype=int)])
    cap = np.concatenate([pr.cap_phase, pr.cap_window])
    rows = rows[np.all(use[ch.ref].sum(axis=0) + duse[rows].sum(axis=1) <= cap, axis=1)]
    value = np.zeros(rows.shape[0])
    keep = np.ones(rows.shape[0], dtype=bool)
    with_neutral = neutral_max_a is not None and pr.has_neutral
    for view in pr.views():  # the worst case's value; the neutral limit in every case
        v0, n0 = spectra(view, ch.ref)
        v = v0[None] + _added(view.contrib, ch, was)[rows].sum(axis=1)
        value = np.maximum(value, np.sqrt(np.sum(v.real**2 + v.imag**2, axis=-1)).max(axis=-1))
        if with_neutral:
            n = n0[None] + _added(view.ncontrib, ch, was)[rows].sum(axis=1)
            keep &= np.sqrt(np.sum(np.abs(n) ** 2, axis=-1)) <= neutral_max_a * (1 + NEUTRAL_SLACK)
    keep &= value < cutoff
    rows, value = rows[keep], value[keep]
    order = np.argsort(value, kind="stable")
    plans = []
    for r in rows[order]:
        a = ch.ref.copy()
        r = r[r < ch.opt.size]
        a[ch.circ[r]] = ch.opt[r]
        plans.append(a)
    return Listed(plans, [float(x) for x in value[order]], cutoff * (1 - SLACK))


def _added(contrib: np.ndarray, ch: _Changes, was: np.ndarray) -> np.ndarray:
    """What each change adds to ``contrib``'s quantity, with a zero row for the pads."""
    d = contrib[ch.opt] - contrib[was]
    return np.concatenate([d, np.zeros((1, *d.shape[1:]), dtype=d.dtype)])
