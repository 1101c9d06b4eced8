"""Plans for a building without a solver: a beam search, and every plan with few changes listed.

A *change* is one free circuit on another option than now (another phase,
or another pair of phases). A plan is the current layout with a set of
changes on distinct circuits; its relocations are at least its changes (a
breaker on other phases has left its slot) and are counted exactly per
panel when the plan is realised in slots (:func:`tri.rebalance.realise.realise`).

For every node k and phase p, with ``y`` the node's spectrum now and
``Δ_c`` what change c adds there (:mod:`tri.rebalance.tree_problem`),

``R_kp² = ||y_kp||² + Σ_{c∈S} (2·Re<y_kp, Δ_c> + ||Δ_c||²) + Σ_{c<c'∈S} 2·Re<Δ_c, Δ_c'>``

so a plan costs a few additions per node and phase once the per-change
terms and Gram matrices are known; plans are scored in batches. With
scenarios (:mod:`tri.rebalance.tree_problem`, Cases) every case's nodes are
further nodes with the same targets: a plan passes only in every case.
With a neutral limit at the service, the service's neutral current in
every case is one more quantity with the same expansion (``y`` its
spectrum now, ``Δ_c`` what change c adds to it), and a plan passes only
when its RMS is within the limit in every case.

* :func:`beam_plans`: breadth first by number of changes, keeping the
  ``width`` plans that come nearest to every target (the sum over nodes of
  the deviation above target); a heuristic, proves nothing.
* :func:`listed_plans`: *every* plan with exactly ``j`` changes that meets
  every target within a round-off slack (:data:`SLACK`); with the levels
  ``0..j`` listed and their plans realised, no plan with at most ``j``
  relocations was missed — the proof for small budgets.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from dataclasses import dataclass

import numpy as np

from tri.rebalance.squares import gram
from tri.rebalance.tree_problem import TreeProblem

#: Relative slack on the targets while listing (round-off only; plans are checked exactly) [-].
SLACK = 1e-7
#: Largest number of plans listed at one level [-].
LIST_LIMIT = 3_000_000
#: Prefixes extended at once (memory: prefixes × changes × nodes × 3 floats) [-].
_BATCH = 1_024


@dataclass(frozen=True, eq=False)
class Changes:
    """Every change of a tree problem with its terms (module notes).

    Attributes
    ----------
    circuit : int ndarray, shape (C,)
        Global free circuit of each change (non-decreasing).
    option : int ndarray, shape (C,)
        The option it takes.
    base2 : float ndarray, shape (Q,)
        ``||y_kp||²`` now, ``Q = 3·P·S`` (case-major, then node-major: a
        node in another case is one more node to judge) [A²].
    lin : float ndarray, shape (C, Q)
        [A²].
    g : float ndarray, shape (C, C, Q)
        ``2·Re<Δ_c, Δ_c'>`` [A²].
        With a neutral limit the last ``S`` entries of ``Q`` (and of
        ``base2``, ``lin``, ``g``) are the service's neutral in each case.
    targets : float ndarray, shape (P·S,)
        Per node of every case, a fraction [-].
    phase_q : int
        ``3·P·S``: the entries of ``Q`` that are phases [-].
    neutral_max_a : float or None
        The limit on the service's neutral RMS current [A].
    """

    circuit: np.ndarray
    option: np.ndarray
    base2: np.ndarray
    lin: np.ndarray
    g: np.ndarray
    targets: np.ndarray
    phase_q: int = 0
    neutral_max_a: float | None = None

    @property
    def count(self) -> int:
        """Number of changes ``C`` [-]."""
        return int(self.circuit.size)

    def plan(self, tp: TreeProblem, rows: np.ndarray) -> np.ndarray:
        """The global options of the plan made of the changes ``rows``."""
        a = tp.current_assignment()
        a[self.circuit[rows]] = self.option[rows]
        return a


def changes_of(tp: TreeProblem) -> Changes:
    """The changes of ``tp`` and their terms, every case's nodes one after the other."""
    cur = tp.current_assignment()
    owner = tp.owner
    others = np.array([o for o in range(tp.n_options) if o != cur[owner[o]]], dtype=int)
    circ = owner[others] if others.size else np.zeros(0, dtype=int)
    order = np.argsort(circ, kind="stable")
    others, circ = others[order], circ[order]
    h = tp.orders.size
    views = tp.views()
    ys = [v.spectra(cur).reshape(-1, h) for v in views]
    deltas = [(v.contrib[others] - v.contrib[cur[circ]]).reshape(others.size, -1, h) for v in views]
    phase_q = sum(y.shape[0] for y in ys)
    if tp.neutral_max_a is not None:  # the service's neutral, every case
        ys += [v.neutral_spectra(cur)[:1] for v in views]
        deltas += [(v.ncontrib[others, :1] - v.ncontrib[cur[circ], :1]) for v in views]
    y = np.concatenate(ys)  # (Q, H)
    delta = np.concatenate(deltas, axis=1)
    base2 = np.sum(y.real**2 + y.imag**2, axis=-1)
    lin = 2.0 * np.real(np.sum(np.conj(y)[None] * delta, axis=-1)) + np.sum(np.abs(delta) ** 2, -1)
    q = y.shape[0]
    g = np.zeros((others.size, others.size, q))
    for k in range(q):
        g[:, :, k] = gram(delta[:, k, :])
    targets = np.tile(tp.targets, len(views))
    return Changes(circ, others, base2, lin, g, targets, phase_q, tp.neutral_max_a)


def excess(ch: Changes, r2: np.ndarray) -> np.ndarray:
    """How far a batch of plans is beyond each target, fractions (n, P·S, plus S with a limit).

    ``r2`` (n, Q): squared phase RMS currents (and the service's squared
    neutral RMS in each case). A node's deviation above its target; the
    service neutral's RMS above its limit, relative to the limit. Zero where
    a node meets its target (and where its mean current is zero).
    """
    phases = r2[:, : ch.phase_q]
    r = np.sqrt(np.maximum(phases, 0.0)).reshape(r2.shape[0], -1, 3)
    mean = r.mean(axis=-1)
    dev = np.max(np.abs(r - mean[..., None]), axis=-1) / np.where(mean > 0, mean, 1.0)
    over = np.maximum(0.0, dev - ch.targets[None, :])
    if ch.neutral_max_a is None:
        return over
    lim = max(ch.neutral_max_a, 1e-12)
    n_over = np.maximum(0.0, np.sqrt(np.maximum(r2[:, ch.phase_q :], 0.0)) / lim - 1.0)
    return np.concatenate([over, n_over], axis=1)


def passes(ch: Changes, r2: np.ndarray) -> np.ndarray:
    """Plans of a batch within every target (and the neutral limit) up to :data:`SLACK`."""
    over = excess(ch, r2)
    slack = SLACK * ch.targets
    if ch.neutral_max_a is not None:
        slack = np.concatenate([slack, np.full(over.shape[1] - slack.size, SLACK)])
    return np.all(over <= slack[None, :] + 1e-12, axis=-1)


def plans_at_level(ch: Changes, j: int) -> int:
    """Plans with exactly ``j`` changes (elementary symmetric sum of the alternatives) [-]."""
    alt = np.bincount(ch.circuit, minlength=int(ch.circuit.max(initial=-1)) + 1)
    e = [1] + [0] * j
    for a in alt.tolist():
        for i in range(j, 0, -1):
            e[i] += e[i - 1] * a
    return int(e[j])


def listed_plans(ch: Changes, j: int, stop: Callable[[], bool]) -> Iterator[np.ndarray] | None:
    """Every plan with exactly ``j`` changes meeting every target, as change rows in batches.

    Returns None when the level holds more than :data:`LIST_LIMIT` plans.
    The generator stops early (without saying so) when ``stop()`` is true:
    callers check ``stop()`` after it ends before counting the level as listed.
    """
    if plans_at_level(ch, j) > LIST_LIMIT:
        return None
    return _walk(
        ch,
        np.zeros((1, 0), dtype=int),
        ch.base2[None, :],
        np.zeros((1, ch.count, ch.base2.size)),
        np.array([-1]),
        j,
        stop,
    )


def _walk(ch: Changes, rows, r2, gsum, last, left: int, stop) -> Iterator[np.ndarray]:
    """Depth first over prefixes (``rows``, squares, cross sums); ``left`` changes to add."""
    if left == 0:
        ok = passes(ch, r2)
        if np.any(ok):
            yield rows[ok]
        return
    for s in range(0, rows.shape[0], _BATCH):
        if stop():
            return
        sl = slice(s, s + _BATCH)
        allowed = ch.circuit[None, :] > last[sl, None]  # (B, C)
        b_idx, c_idx = np.nonzero(allowed)
        if not b_idx.size:
            continue
        vals = r2[sl][b_idx] + ch.lin[c_idx] + gsum[sl][b_idx, c_idx]
        new_rows = np.column_stack([rows[sl][b_idx], c_idx])
        if left == 1:
            ok = passes(ch, vals)
            if np.any(ok):
                yield new_rows[ok]
            continue
        for t in range(0, b_idx.size, _BATCH):
            part = slice(t, t + _BATCH)
            bb, cc = b_idx[part], c_idx[part]
            yield from _walk(
                ch,
                new_rows[part],
                vals[part],
                gsum[sl][bb] + ch.g[cc],
                ch.circuit[cc],
                left - 1,
                stop,
            )


def beam_plans(
    ch: Changes, max_changes: int, stop: Callable[[], bool], width: int = 48, keep: int = 12
) -> list[np.ndarray]:
    """Plans found breadth first (module notes), fewest changes first: change rows.

    Returns up to ``keep`` plans of the first level at which some plan meets
    every target (within the slack), or none.
    """
    if passes(ch, ch.base2[None, :])[0]:
        return [np.zeros(0, dtype=int)]
    n_phase = ch.phase_q
    rows = np.zeros((1, 0), dtype=int)
    r2 = ch.base2[None, :]
    gsum = np.zeros((1, ch.count, ch.base2.size))
    for _ in range(min(max_changes, int(np.unique(ch.circuit).size))):
        if stop() or not rows.shape[0]:
            return []
        used = np.zeros((rows.shape[0], ch.count), dtype=bool)
        for i in range(rows.shape[1]):
            used |= ch.circuit[None, :] == ch.circuit[rows[:, i]][:, None]
        b_idx, c_idx = np.nonzero(~used)
        vals = r2[b_idx] + ch.lin[c_idx] + gsum[b_idx, c_idx]
        new_rows = np.sort(np.column_stack([rows[b_idx], c_idx]), axis=1)
        _, first = np.unique(new_rows, axis=0, return_index=True)
        new_rows, vals, b_idx, c_idx = new_rows[first], vals[first], b_idx[first], c_idx[first]
        ok = passes(ch, vals)
        if np.any(ok):
            found = new_rows[ok]
            score = np.max(np.sqrt(np.maximum(vals[ok][:, :n_phase], 0.0)), axis=-1)
            return [found[i] for i in np.argsort(score)[:keep]]
        over = excess(ch, vals)
        score = np.sum(over, axis=-1) + 1e-3 * np.max(over, axis=-1)
        best = np.argsort(score, kind="stable")[:width]
        rows, r2 = new_rows[best], vals[best]
        gsum = gsum[b_idx[best]] + ch.g[c_idx[best]]
    return []
