"""Slot assignment inside the optimisation: which breakers stay, which windows are used.

On a two-column panel a plan is not only a phase choice: a breaker may
leave its slot without changing phases, to make room for another (a 2-pole
one shifting down a row, a 3-pole one clearing three rows), and that is a
relocation the electrician carries out. This block makes the model count
relocations exactly as the work order does, for every arrangement of the
breakers the panel's geometry allows (:mod:`tri.rebalance.geometry`).

Variables (added to the electrical block's ``x``)
-------------------------------------------------
* ``s_b ∈ {0, 1}``: placed free breaker b stays in its slot, for each
  breaker whose slots some window covers (``s_b ≤ x_current(b)``: a
  breaker that changes option leaves). For any other placed breaker,
  staying is the same as keeping its option (nothing is gained by moving
  it within its phase, as no window needs its slot), so ``s_b`` *is* the
  column ``x_current(b)``.
* ``u_w ∈ {0, 1}``: window w (a first slot for a 2- or 3-pole breaker in
  open slots) receives one of the multi-pole breakers that are relocated
  or placed.

Rows
----
* *slot*: each open slot holds at most one breaker:
  ``Σ_{w ∋ c} u_w + s_{b(c)} ≤ 1`` (``b(c)`` the breaker there now);
* *pool*: multi-pole breakers are interchangeable in their window pool
  (same pole count, same option kind), so for every pool ``(k, t)``:
  ``Σ_{w in pool} u_w = Σ_{b of k poles} x_{b,t} - Σ_{b now in pool} s_b``
  (the breakers of the pool that are relocated or placed);
* *phase*: 1-pole breakers on phase p are interchangeable among the open
  slots of p: ``Σ_{1-pole b} x_{b,p} + Σ_{multi-pole b} n_{b,p}·s_b +
  Σ_w n_{w,p}·u_w ≤ open_p`` (``n``: slots on phase p).

Exactness. Every arrangement of the breakers satisfies the rows with its
own stays and windows, and counts ``Σ (1 - s_b)`` relocations over the
placed free breakers. Conversely a solution of the rows gives an
arrangement: stayers stay, the relocated multi-pole breakers of each pool
take that pool's chosen windows (in any order), and the 1-pole ones the
slots of their phase left over (enough by the phase rows, disjoint by the
slot rows) — :mod:`tri.rebalance.realise` builds it, and its relocations
are at most ``Σ (1 - s_b)``. So the minimum of ``Σ (1 - s_b)`` over the
rows is the fewest relocations that realise the options, and a model with
this block is a relaxation only where its *electrical* rows are.

With a reach limit (``[panel] max_row_shift``), or with wired units
(:mod:`tri.rebalance.units`: their option in a window is its order of
phases, not its kind), breakers of a pool are no longer interchangeable:
:mod:`tri.rebalance.reach_model` then gives every breaker positions of its
own (same columns ``s`` and ``u``, exact in the same sense on the panel
with that limit).

On a rail board there are no slots: a move is a change of phases, and
``s_b`` is the column ``x_current(b)``.
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass

import numpy as np

from tri.rebalance.electrical import Electrical
from tri.rebalance.geometry import Window
from tri.rebalance.model import Model
from tri.rebalance.problem import Problem


@dataclass(frozen=True)
class SlotColumns:
    """Columns of the slot block.

    Attributes
    ----------
    placed : int ndarray, shape (P,)
        Problem indices of the placed free breakers.
    stay : int ndarray, shape (P,)
        Column meaning "stays in its slot" for each of them.
    window : int or None
        First window column (``window + k`` is ``windows[k]``).
    windows : tuple of Window
    """

    placed: np.ndarray
    stay: np.ndarray
    window: int | None
    windows: tuple[Window, ...]

    def relocation_terms(self) -> tuple[float, np.ndarray, np.ndarray]:
        """Relocations as ``const + Σ vals·x[cols]``: ``P - Σ s_b``."""
        return float(self.placed.size), self.stay, -np.ones(self.stay.size)

    def add_budget(self, m: Model, budget: int) -> None:
        """At most ``budget`` relocations: ``Σ s_b ≥ P - budget``."""
        if self.placed.size and budget < self.placed.size:
            m.row(self.stay, np.ones(self.stay.size), self.placed.size - budget, np.inf)

    def stays(self, x: np.ndarray) -> np.ndarray:
        """Bool per placed free breaker: stays in the solution ``x``."""
        return np.asarray(x)[self.stay] > 0.5

    def used_windows(self, x: np.ndarray) -> list[Window]:
        """Windows used in the solution ``x``."""
        if self.window is None:
            return []
        vals = np.asarray(x)[self.window : self.window + len(self.windows)]
        return [w for w, v in zip(self.windows, vals, strict=True) if v > 0.5]


def _option_col(pr: Problem, x: int, b: int, kind: int) -> int:
    return x + int(pr.starts[b]) + kind


def add_slots(m: Model, pr: Problem, el: Electrical) -> SlotColumns:
    """The slot block of the module notes (or, on a rail board, the move count alone).

    Parameters
    ----------
    m : Model
    pr : Problem
    el : Electrical
        The option columns.

    Returns
    -------
    SlotColumns
    """
    placed = np.flatnonzero(pr.movable)
    current_cols = el.x + pr.current[placed]
    geo = pr.geometry
    if geo is None:
        return SlotColumns(placed, current_cols.astype(int), None, ())
    if geo.reach is not None or np.any(pr.wired):
        from tri.rebalance.reach_model import add_reach_slots

        return add_reach_slots(m, pr, el)
    windows = geo.windows
    occupant = geo.occupant()
    covered = {c for w in windows for c in w.cells}
    needs_stay = [b for b in placed if covered.intersection(geo.homes[b] or ())]
    s0 = m.binary(len(needs_stay))
    stay_col = {int(b): int(current_cols[k]) for k, b in enumerate(placed)}
    for k, b in enumerate(needs_stay):
        stay_col[int(b)] = s0 + k
        m.row([s0 + k, el.x + int(pr.current[b])], [1.0, -1.0], -np.inf, 0.0)
    u0 = m.binary(len(windows))
    _slot_rows(m, windows, u0, occupant, stay_col)
    _pool_rows(m, pr, el, windows, u0, stay_col)
    _phase_rows(m, pr, el, stay_col, windows, u0)
    stay = np.array([stay_col[int(b)] for b in placed], dtype=int)
    return SlotColumns(placed, stay, u0, windows)


def _slot_rows(m: Model, windows, u0: int, occupant: dict[int, int], stay_col) -> None:
    """Each open slot holds at most one breaker."""
    by_cell: dict[int, list[int]] = defaultdict(list)
    for k, w in enumerate(windows):
        for c in w.cells:
            by_cell[c].append(u0 + k)
    for c, cols in by_cell.items():
        b = occupant.get(c)
        if b is not None and b in stay_col:
            cols = [*cols, stay_col[b]]
        if len(cols) > 1:
            m.row(cols, np.ones(len(cols)), -np.inf, 1.0)


def _pool_rows(m: Model, pr: Problem, el: Electrical, windows, u0: int, stay_col) -> None:
    """Relocated or placed multi-pole breakers of each pool = windows of that pool used."""
    pools: dict[tuple[int, int], list[int]] = defaultdict(list)
    for k, w in enumerate(windows):
        pools[(w.poles, w.kind)].append(u0 + k)
    multi = [b for b in range(pr.n_free) if pr.poles[b] > 1]
    for (poles, kind), ucols in pools.items():
        cols, vals = list(ucols), [1.0] * len(ucols)
        for b in multi:
            if pr.poles[b] != poles:
                continue
            cols.append(_option_col(pr, el.x, b, kind))
            vals.append(-1.0)
            if pr.movable[b] and int(pr.kind[pr.current[b]]) == kind:
                cols.append(stay_col[b])
                vals.append(1.0)
        m.row(cols, vals, 0.0, 0.0)
    # a pool with no window: its breakers cannot be relocated or placed there
    for b in multi:
        for kind in range(int(pr.starts[b + 1] - pr.starts[b])):
            if (int(pr.poles[b]), kind) in pools:
                continue
            cols = [_option_col(pr, el.x, b, kind)]
            vals = [1.0]
            if pr.movable[b] and int(pr.kind[pr.current[b]]) == kind:
                cols.append(stay_col[b])
                vals.append(-1.0)
            m.row(cols, vals, -np.inf, 0.0)


def _phase_rows(m: Model, pr: Problem, el: Electrical, stay_col, windows, u0) -> None:
    """1-pole breakers on each phase fit in the open slots the others leave."""
    geo = pr.geometry
    assert geo is not None
    single = [b for b in range(pr.n_free) if pr.poles[b] == 1]
    if not single:
        return
    for p in range(3):
        cols = [_option_col(pr, el.x, b, p) for b in single]
        vals = [1.0] * len(cols)
        for b in range(pr.n_free):
            if pr.poles[b] > 1 and pr.movable[b]:
                n_p = sum(1 for c in geo.homes[b] or () if geo.phase_of(c) == p)
                if n_p:
                    cols.append(stay_col[b])
                    vals.append(float(n_p))
        for k, w in enumerate(windows):
            n_p = sum(1 for c in w.cells if geo.phase_of(c) == p)
            if n_p:
                cols.append(u0 + k)
                vals.append(float(n_p))
        m.row(cols, vals, -np.inf, float(geo.open_per_phase[p]))
