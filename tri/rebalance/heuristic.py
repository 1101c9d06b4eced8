"""Local search over breaker options (moves and swaps), with exact figures at every step.

:class:`LocalSearch` holds the search state and its steps;
:func:`tri.rebalance.first_plan.heuristic_plan` runs them in the order
below. The heuristic gives the search a good plan at once; the mixed-integer
program then improves it or proves it. Every candidate is scored with the
exact phase and neutral RMS currents (superposition of the engine's
per-option currents, :func:`tri.rebalance.problem.spectra`), vectorised
over all candidates of a step.

Steps
-----
1. *Insertion*: circuits that have no slot yet (and, for a full re-layout,
   every free circuit) are added one at a time, largest current first, each
   on the option that scores best (the longest-processing-time rule of
   number partitioning [1]).
2. *Descent*: repeatedly apply the best single change (one circuit to
   another option) or, when no single change helps, the best swap (two
   circuits with the same pole count exchange options, which never needs
   a free slot), within the move budget and the slot capacity.
3. *Kicks* (iterated local search [2]): a few random changes, descent
   again, keep the result if it is better; until 30 kicks bring nothing,
   the floor is reached, or a quarter of the remaining time is used.
4. *Pruning*: undo moves that are not needed (the target still met, or
   the largest phase current no larger).

Scores are those of :mod:`tri.rebalance.goal`, over every case at once
(:attr:`tri.rebalance.problem.Problem.stacked`: the currents carry a case
axis, so a step is judged in every scenario).

References
----------
1. R. L. Graham, "Bounds on multiprocessing timing anomalies", *SIAM J.
   Appl. Math.* 17 (1969) 416-429 (the LPT rule).
2. H. R. Lourenço, O. C. Martin, T. Stützle, "Iterated local search", in
   *Handbook of Metaheuristics* (2003) 320-353.
"""

from __future__ import annotations

import numpy as np

from tri.rebalance.control import Control
from tri.rebalance.goal import Goal, measures
from tri.rebalance.problem import Problem

#: Largest number of candidate pairs scored at once (memory bound) [-].
_CHUNK = 400_000


class LocalSearch:
    """Mutable search state over the options of a :class:`Problem`.

    ``assign[i] == -1`` means circuit i is not in the plan yet (only during
    insertion). Capacity counters always hold for the present circuits.
    """

    def __init__(
        self,
        problem: Problem,
        goal: Goal,
        control: Control,
        assign: np.ndarray,
        stop_gap: float = 1e-12,
    ):
        self.pr = problem
        self.stop_gap = stop_gap
        self.goal = goal
        self.control = control
        self.assign = np.array(assign, dtype=int, copy=True)
        present = self.assign >= 0
        a = self.assign[present]
        st = problem.stacked
        self.contrib, self.ncontrib = st.contrib, st.ncontrib  # (O, S, 3, H), (O, S, H)
        self.v = st.base + st.contrib[a].sum(axis=0)
        self.n = st.nbase + st.ncontrib[a].sum(axis=0)
        self.cells = problem.use_cells[a].sum(axis=0)
        self.win = problem.use_window[a].sum(axis=0)
        self.cap_total = problem.cap_phase
        self.moved = problem.movable & present & (self.assign != problem.current)
        self.floor = problem.worst_floor_a
        scale = max(self.floor, 1e-9)
        self.tol = (1e-12 if goal.target is not None else 1e-9 * scale, 1e-9 * scale * scale)
        self.sizes = np.sqrt(
            np.sum(np.abs(problem.contrib[problem.starts[:-1]]) ** 2, axis=(-1, -2))
        )

    # -- bookkeeping -----------------------------------------------------------------
    @property
    def moves(self) -> int:
        """Moves in the current plan [-]."""
        return int(np.sum(self.moved))

    def score(self) -> tuple[float, float]:
        """(primary, secondary) of the current plan."""
        p, s = measures(self.pr, self.goal, self.v, self.n)
        return float(p), float(s)

    def _moved_if(self, i: np.ndarray, o: np.ndarray) -> np.ndarray:
        return self.pr.movable[i] & (o != self.pr.current[i])

    def _fits(self, i: np.ndarray, o: np.ndarray) -> np.ndarray:
        """Whether moving circuits ``i`` to options ``o`` (one at a time) keeps capacity."""
        pr = self.pr
        if not pr.slots:
            return np.ones(o.shape, dtype=bool)
        old = self.assign[i]
        has = old >= 0
        oldc = np.where(has, old, 0)
        w = has[:, None].astype(int)
        cells = self.cells - pr.use_cells[oldc] * w + pr.use_cells[o]
        ok = np.all(cells <= self.cap_total, axis=-1)
        win = self.win - pr.use_window[oldc] * w + pr.use_window[o]
        ok &= np.all(win <= pr.cap_window, axis=-1)
        return ok

    def set(self, i: int, o: int) -> None:
        """Put free circuit ``i`` on option ``o`` (``-1``: take it out)."""
        pr = self.pr
        old = int(self.assign[i])
        if old >= 0:
            self.v = self.v - self.contrib[old]
            self.n = self.n - self.ncontrib[old]
            self.cells = self.cells - pr.use_cells[old]
            self.win = self.win - pr.use_window[old]
        if o >= 0:
            self.v = self.v + self.contrib[o]
            self.n = self.n + self.ncontrib[o]
            self.cells = self.cells + pr.use_cells[o]
            self.win = self.win + pr.use_window[o]
        self.assign[i] = o
        self.moved[i] = bool(pr.movable[i] and o >= 0 and o != pr.current[i])

    def _better(self, p: float, s: float, ref: tuple[float, float]) -> bool:
        tp, ts = self.tol
        return p < ref[0] - tp or (p <= ref[0] + tp and s < ref[1] - ts)

    def _pick(self, p: np.ndarray, s: np.ndarray) -> int:
        """Index of the lexicographically smallest (p, s) within tolerance."""
        tp = self.tol[0]
        near = p <= p.min() + tp
        idx = np.flatnonzero(near)
        return int(idx[np.argmin(s[idx])])

    # -- insertion -----------------------------------------------------------------
    def insert_missing(self) -> bool:
        """Add every absent circuit, largest first, on its best option.

        Returns False when some circuit fits nowhere (not enough free slots).
        """
        pr = self.pr
        order = [int(i) for i in np.argsort(-self.sizes, kind="stable") if self.assign[i] < 0]
        for i in order:
            opts = np.arange(pr.starts[i], pr.starts[i + 1])
            ii = np.full(opts.size, i)
            ok = self._fits(ii, opts)
            if not np.any(ok):
                return False
            opts = opts[ok]
            p, s = measures(
                pr, self.goal, self.v + self.contrib[opts], self.n + self.ncontrib[opts]
            )
            # prefer staying where it is when that scores as well
            stay = (opts == pr.current[i]).astype(float)
            s = s - stay * (abs(float(s.max())) + 1.0) * 1e-6
            self.set(i, int(opts[self._pick(p, s)]))
        return True

    # -- candidate steps -------------------------------------------------------------
    def _budget_ok(self, dmoves: np.ndarray) -> np.ndarray:
        if self.goal.max_moves is None:
            return np.ones(dmoves.shape, dtype=bool)
        return self.moves + dmoves <= self.goal.max_moves

    def best_single(self) -> tuple[float, float, tuple[tuple[int, int], ...]] | None:
        """Best single change: (primary, secondary, ((circuit, option),))."""
        pr = self.pr
        o = np.arange(pr.n_options)
        i = pr.owner
        cur = self.assign[i]
        keep = (o != cur) & (cur >= 0)
        o, i, cur = o[keep], i[keep], cur[keep]
        if o.size == 0:
            return None
        dmoves = self._moved_if(i, o).astype(int) - self.moved[i].astype(int)
        ok = self._budget_ok(dmoves) & self._fits(i, o)
        o, i, cur = o[ok], i[ok], cur[ok]
        if o.size == 0:
            return None
        v = self.v + (self.contrib[o] - self.contrib[cur])
        n = self.n + (self.ncontrib[o] - self.ncontrib[cur])
        p, s = measures(pr, self.goal, v, n)
        k = self._pick(p, s)
        return float(p[k]), float(s[k]), ((int(i[k]), int(o[k])),)

    def best_swap(self) -> tuple[float, float, tuple[tuple[int, int], ...]] | None:
        """Best exchange of options between two circuits of the same pole count."""
        pr = self.pr
        best: tuple[float, float, tuple[tuple[int, int], ...]] | None = None
        present = self.assign >= 0
        kinds_now = np.where(present, pr.kind[np.maximum(self.assign, 0)], -1)
        for poles in (1, 2):
            members = np.flatnonzero(present & (pr.poles == poles) & ~pr.wired)  # kinds only
            if members.size < 2:
                continue
            n_kinds = int(pr.starts[members[0] + 1] - pr.starts[members[0]])
            for a in range(n_kinds):
                ia = members[kinds_now[members] == a]
                if ia.size == 0:
                    continue
                for b in range(a + 1, n_kinds):
                    jb = members[kinds_now[members] == b]
                    if jb.size == 0:
                        continue
                    found = self._swap_block(ia, jb, a, b)
                    if found is not None and (
                        best is None or self._better(found[0], found[1], best[:2])
                    ):
                        best = found
        return best

    def _swap_block(
        self, ia: np.ndarray, jb: np.ndarray, a: int, b: int
    ) -> tuple[float, float, tuple[tuple[int, int], ...]] | None:
        pr = self.pr
        oia, ojb = pr.starts[ia] + b, pr.starts[jb] + a  # new options
        di = self.contrib[oia] - self.contrib[self.assign[ia]]
        dj = self.contrib[ojb] - self.contrib[self.assign[jb]]
        ndi = self.ncontrib[oia] - self.ncontrib[self.assign[ia]]
        ndj = self.ncontrib[ojb] - self.ncontrib[self.assign[jb]]
        mi = self._moved_if(ia, oia).astype(int) - self.moved[ia].astype(int)
        mj = self._moved_if(jb, ojb).astype(int) - self.moved[jb].astype(int)
        h = pr.orders.size
        rows = max(1, _CHUNK // max(1, jb.size * 3 * h * pr.n_cases))
        best = None
        for r0 in range(0, ia.size, rows):
            sl = slice(r0, r0 + rows)
            dm = mi[sl, None] + mj[None, :]
            ok = self._budget_ok(dm)
            if not np.any(ok):
                continue
            v = self.v + di[sl, None] + dj[None, :]
            n = self.n + ndi[sl, None] + ndj[None, :]
            p, s = measures(pr, self.goal, v, n)
            p = np.where(ok, p, np.inf)
            flat = self._pick(p.ravel(), np.where(ok, s, np.inf).ravel())
            x, y = divmod(flat, jb.size)
            cand = (
                float(p[x, y]),
                float(s[x, y]),
                ((int(ia[r0 + x]), int(oia[r0 + x])), (int(jb[y]), int(ojb[y]))),
            )
            if np.isfinite(cand[0]) and (best is None or self._better(cand[0], cand[1], best[:2])):
                best = cand
        return best

    # -- search loops ----------------------------------------------------------------
    def done(self) -> bool:
        """Nothing left to gain: target met, or the largest phase within ``stop_gap`` of ``F``."""
        p, _ = self.score()
        if self.goal.target is not None:
            return p <= 0.0
        return p <= self.floor * (1 + self.stop_gap)

    def descend(self, max_steps: int | None = None, swaps: bool = True) -> int:
        """Steepest descent with single changes, then swaps; returns steps taken."""
        steps = 0
        limit = max_steps if max_steps is not None else 50 * max(1, self.pr.n_free) + 100
        while steps < limit and not self.done() and not self.control.stop():
            ref = self.score()
            step = self.best_single()
            if (step is None or not self._better(step[0], step[1], ref)) and swaps:
                swap = self.best_swap()
                if swap is not None and (step is None or self._better(swap[0], swap[1], step[:2])):
                    step = swap
            if step is None or not self._better(step[0], step[1], ref):
                break
            for i, o in step[2]:
                self.set(i, o)
            steps += 1
        return steps

    def load(self, assign: np.ndarray) -> None:
        """Replace the plan by ``assign`` (every circuit present)."""
        for i in np.flatnonzero(self.assign != assign):
            self.set(int(i), int(assign[i]))

    def keep_better(
        self, best: np.ndarray, ref: tuple[float, float]
    ) -> tuple[np.ndarray, tuple[float, float], bool]:
        """The better of the plan now and ``best`` (scored ``ref``), now within the budget
        only; that plan is loaded. Returns it, its score and whether it is the plan now."""
        p, s = self.score()
        within = self.goal.max_moves is None or self.moves <= self.goal.max_moves
        if within and self._better(p, s, ref):
            return self.assign.copy(), (p, s), True
        self.load(best)
        return best, ref, False

    def kick(self, rng: np.random.Generator, changes: int) -> None:
        """Apply a few random changes that keep capacity and the budget."""
        pr = self.pr
        done = attempts = 0
        while done < changes and attempts < 10 * changes:
            attempts += 1
            i = int(rng.integers(pr.n_free))
            o = int(rng.integers(pr.starts[i], pr.starts[i + 1]))
            if self.assign[i] < 0 or o == self.assign[i]:
                continue
            gain = int(pr.movable[i] and o != pr.current[i]) - int(self.moved[i])
            if self.goal.max_moves is not None and self.moves + gain > self.goal.max_moves:
                back = [int(j) for j in np.flatnonzero(self.moved) if j != i]
                back = [j for j in back if self._fits(np.array([j]), pr.current[[j]])[0]]
                if not back:
                    continue
                j = back[int(rng.integers(len(back)))]
                self.set(j, int(pr.current[j]))
            if self._fits(np.array([i]), np.array([o]))[0]:
                self.set(i, o)
                done += 1

    def iterate(self, rng: np.random.Generator, patience: int = 30, share: float = 0.25) -> int:
        """Iterated local search: kick, descend, keep the better plan.

        Stops after ``patience`` kicks without improvement, at the floor, or
        after ``share`` of the remaining time. Returns the improvements made.
        """
        if self.pr.n_free == 0:
            return 0
        best = self.assign.copy()
        ref = self.score()
        stop_at = self.control.elapsed() + share * max(0.0, self.control.remaining())
        idle = improved = 0
        while idle < patience and not self.done() and not self.control.stop():
            if self.control.elapsed() > stop_at:
                break
            self.kick(rng, int(rng.integers(1, 4)))
            self.descend()
            best, ref, better = self.keep_better(best, ref)
            idle, improved = (0, improved + 1) if better else (idle + 1, improved)
        self.load(best)
        return improved

    def prune(self) -> int:
        """Undo moves that are not needed; returns how many were undone."""
        pr = self.pr
        undone = 0
        changed = True
        while changed and not self.control.stop():
            changed = False
            moved = np.flatnonzero(self.moved)
            for i in moved[np.argsort(self.sizes[moved], kind="stable")]:
                o_back = int(pr.current[i])
                if not self._fits(np.array([i]), np.array([o_back]))[0]:
                    continue
                ref = self.score()
                old = int(self.assign[i])
                self.set(int(i), o_back)
                p, _s = self.score()
                if self.goal.target is not None:
                    ok = p <= 0.0 or p <= ref[0]
                else:
                    ok = p <= ref[0] + self.tol[0]
                if ok:
                    undone += 1
                    changed = True
                else:
                    self.set(int(i), old)
        return undone
