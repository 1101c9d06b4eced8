"""The slot block when breakers are not interchangeable: each breaker takes its own positions.

With ``[panel] max_row_shift`` a placed breaker may only go to a first slot
within that many rows of its first slot now
(:meth:`tri.rebalance.geometry.SlotGeometry.allowed`), so breakers of one
pool are no longer interchangeable and the pool rows of
:mod:`tri.rebalance.slot_model` would count arrangements that cannot be
built. Wired units (:mod:`tri.rebalance.units`) are not interchangeable
either: the option a window gives them is its order of phases
(:meth:`~tri.rebalance.problem.Problem.window_option`). This block assigns
every free breaker (unit) to a position of its own.

Variables
---------
* ``s_b ∈ {0, 1}`` for every placed free breaker: it stays in its slot;
* ``z_{b,w} ∈ {0, 1}``: multi-pole breaker b goes to window w (same pole
  count, within its reach); ``z_{b,c}``: 1-pole breaker b goes to open
  slot c (within its reach);
* ``u_w ∈ {0, 1}``: window w is used (``u_w = Σ_b z_{b,w}``), read by
  :meth:`~tri.rebalance.slot_model.SlotColumns.used_windows`.

Rows
----
* *option*: for each free breaker b and each of its options o:
  ``Σ_{positions giving o} z_b + [o is b's option now]·s_b = x_o``
  (a window gives the option of :meth:`~tri.rebalance.problem.Problem.window_option`,
  a slot its phase), so a breaker is in exactly one position of the
  option it takes;
* *slot*: each open slot holds at most one breaker:
  ``Σ_{b, w ∋ c} z_{b,w} + Σ_b z_{b,c} + s_{b(c)} ≤ 1``.

Exactness. Every arrangement within the reach satisfies the rows with its
own positions (a stayer with ``s_b = 1``), and counts ``Σ (1 - s_b)``
relocations; every solution is such an arrangement (positions are
disjoint by the slot rows, every breaker has one). So the minimum of
``Σ (1 - s_b)`` is the fewest relocations that realise the options within
the reach, and the rest of the model (electrical rows, budgets, bounds)
is proven on the panel with that limit.
"""

from __future__ import annotations

from collections import defaultdict

import numpy as np

from tri.rebalance.electrical import Electrical
from tri.rebalance.model import Model
from tri.rebalance.problem import Problem


def add_reach_slots(m: Model, pr: Problem, el: Electrical):
    """The block of the module notes; returns :class:`~tri.rebalance.slot_model.SlotColumns`."""
    from tri.rebalance.slot_model import SlotColumns

    geo = pr.geometry
    assert geo is not None
    placed = np.flatnonzero(pr.movable)
    s0 = m.binary(placed.size)
    stay_col = {int(b): s0 + k for k, b in enumerate(placed)}
    windows = geo.windows
    u0 = m.binary(len(windows))
    by_cell: dict[int, list[int]] = defaultdict(list)
    users: dict[int, list[int]] = defaultdict(list)  # window -> z columns
    for b in range(pr.n_free):
        per_option: dict[int, list[int]] = defaultdict(list)
        if pr.poles[b] > 1:
            for k, w in enumerate(windows):
                o = pr.window_option(b, w)
                if o is not None and geo.allowed(b, w.first):
                    z = m.binary(1)
                    per_option[o].append(z)
                    users[k].append(z)
                    for c in w.cells:
                        by_cell[c].append(z)
        else:
            for c in geo.open_cells.tolist():
                o = pr.cell_option(b, geo.phase_of(int(c)))
                if o is not None and geo.allowed(b, int(c)):
                    z = m.binary(1)
                    per_option[o].append(z)
                    by_cell[int(c)].append(z)
        for o in pr.options_of(b):
            cols = list(per_option.get(o, []))
            vals = [1.0] * len(cols)
            if pr.movable[b] and int(pr.current[b]) == o:
                cols.append(stay_col[b])
                vals.append(1.0)
            cols.append(el.x + o)
            vals.append(-1.0)
            m.row(cols, vals, 0.0, 0.0)
    for k in range(len(windows)):
        cols = [u0 + k, *users.get(k, [])]
        m.row(cols, [1.0] + [-1.0] * (len(cols) - 1), 0.0, 0.0)
    occupant = geo.occupant()
    for c in geo.open_cells.tolist():
        cols = list(by_cell.get(int(c), []))
        holder = occupant.get(int(c))
        if holder is not None and holder in stay_col:
            cols.append(stay_col[holder])
        if len(cols) > 1:
            m.row(cols, np.ones(len(cols)), -np.inf, 1.0)
    stay = np.array([stay_col[int(b)] for b in placed], dtype=int)
    return SlotColumns(placed, stay, u0, windows)
