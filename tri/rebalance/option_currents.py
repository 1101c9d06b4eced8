"""What each option of each free unit adds to the phase and neutral currents, from the engine.

The fixed circuits' currents and every option's come from
:func:`tri.engine.analyse_batch` itself, so the optimiser and the report
share one set of equations (:mod:`tri.rebalance.problem`). A plain breaker's
option is a one-row panel (its connection on the option's phases). A wired
unit's option (:mod:`tri.rebalance.units`) is the panel of its breakers
alone, connected in that option's order of phases (on a rail-board copy of
the schedule, where the order of ``phases`` is the order of the poles), so
every leg is one engine row, as :func:`tri.schedule.to_engine.circuit_arrays`
makes them. At nominal voltage the engine is linear in its rows, so the
sum over the options taken plus the fixed circuits' currents is the plan's.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from tri.engine import analyse_batch
from tri.engine.inputs import LINE_TO_LINE, LINE_TO_NEUTRAL, THREE_PHASE, UNPLACED, CircuitArrays
from tri.rebalance.units import Unit
from tri.schedule.model import Circuit, Schedule
from tri.schedule.slots import PHASES
from tri.schedule.to_engine import circuit_arrays, element_rows, ratings, system_voltages

Currents = tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]


def _connection(poles: int) -> int:
    return {1: LINE_TO_NEUTRAL, 2: LINE_TO_LINE}.get(poles, THREE_PHASE)


def _scaled(ca: CircuitArrays, circuit_of_row: list[int], factors: np.ndarray | None):
    if factors is None:
        return ca
    f = np.asarray(factors, dtype=float)[circuit_of_row]
    return replace(ca, s_va=np.asarray(ca.s_va) * f)


def _plain_batch(ca: CircuitArrays, rows: np.ndarray, conn, p, q) -> CircuitArrays:
    """One-circuit panels: row ``rows[k]`` of ``ca`` connected as (conn, p, q)[k]."""
    return CircuitArrays(
        s_va=ca.s_va[rows][:, None],
        connection=np.asarray(conn, dtype=np.int64)[:, None],
        phase_p=np.asarray(p, dtype=np.int64)[:, None],
        phase_q=np.asarray(q, dtype=np.int64)[:, None],
        harmonics=ca.harmonics[rows][:, None, :],
        orders=ca.orders,
        continuous=np.zeros((rows.size, 1), dtype=bool),
    )


def _on_orders(ca: CircuitArrays, orders: np.ndarray) -> np.ndarray:
    """``ca``'s harmonics on the columns of ``orders`` (a superset of its own), 0 elsewhere."""
    out = np.zeros((*np.shape(ca.s_va), len(orders)), dtype=complex)
    col = {int(h): k for k, h in enumerate(np.asarray(orders).tolist())}
    for k, h in enumerate(np.asarray(ca.orders).tolist()):
        out[..., col[int(h)]] = ca.harmonics[..., k]
    return out


def _wired_batch(
    schedule: Schedule,
    unit: Unit,
    orders: list[tuple[int, ...]],
    factors: np.ndarray | None,
    harmonic_orders: np.ndarray,
) -> CircuitArrays:
    """The unit's breakers alone, once per order of phases (module notes), on the
    panel's harmonic orders ``harmonic_orders``."""
    panel = replace(schedule.panel, layout=PHASES, max_row_shift=None)
    arrays = []
    for order in orders:
        circuits = schedule.circuits
        mini: tuple[Circuit, ...]
        if unit.group is None:
            mini = (replace(circuits[unit.lead], slot=None, phases=tuple(order)),)
        else:
            mini = tuple(
                replace(circuits[i], slot=None, phases=(p,))
                for i, p in zip(unit.members, order, strict=True)
            )
        sched = replace(schedule, panel=panel, circuits=mini)
        rows = [unit.members[i] for i, _ in element_rows(sched)]
        arrays.append(_scaled(circuit_arrays(sched), rows, factors))
    first = arrays[0]
    return CircuitArrays(
        s_va=np.stack([a.s_va for a in arrays]),
        connection=np.stack([a.connection for a in arrays]),
        phase_p=np.stack([a.phase_p for a in arrays]),
        phase_q=np.stack([a.phase_q for a in arrays]),
        harmonics=np.stack([_on_orders(a, harmonic_orders) for a in arrays]),
        orders=np.asarray(harmonic_orders),
        continuous=np.zeros((len(arrays), first.s_va.shape[-1]), dtype=bool),
    )


def engine_currents(
    schedule: Schedule,
    units: list[Unit],
    phases: list[tuple[int, ...]],
    owner: np.ndarray,
    factors: np.ndarray | None = None,
) -> Currents:
    """Fixed circuits' currents ``(3, H)``, ``(H,)`` and each option's ``(O, 3, H)``, ``(O, H)``.

    ``factors`` (one per circuit) scales each circuit's load: one case
    (:mod:`tri.rebalance.cases`).
    """
    circuits = schedule.circuits
    rows_of = [i for i, _ in element_rows(schedule)]
    ca = _scaled(circuit_arrays(schedule), rows_of, factors)
    system, rat = system_voltages(schedule), ratings(schedule)
    h = 1 + len(ca.orders)
    moving = {i for u in units for i in u.members}
    conn = np.array(ca.connection, copy=True)
    conn[[k for k, i in enumerate(rows_of) if i in moving]] = UNPLACED
    base_ca = replace(ca, connection=conn, continuous=np.zeros_like(ca.continuous))
    if len(circuits):
        b = analyse_batch(base_ca, system, rat)
        base = np.asarray(b.phase_spectrum, dtype=complex)
        nbase = np.asarray(b.neutral_spectrum, dtype=complex)
    else:
        base, nbase = np.zeros((3, h), dtype=complex), np.zeros(h, dtype=complex)
    contrib = np.zeros((owner.size, 3, h), dtype=complex)
    ncontrib = np.zeros((owner.size, h), dtype=complex)
    plain = np.array([not units[int(f)].wired for f in owner], dtype=bool)
    if np.any(plain):
        opts = np.flatnonzero(plain)
        rows = np.array([units[int(owner[o])].lead for o in opts], dtype=int)
        ph = [phases[o] for o in opts]
        batch = _plain_batch(
            ca,
            rows,
            [_connection(circuits[i].poles) for i in rows],
            [p[0] if len(p) < 3 else 0 for p in ph],
            [p[1] if len(p) == 2 else (p[0] if len(p) == 1 else 0) for p in ph],
        )
        ob = analyse_batch(batch, system, rat)
        contrib[opts] = np.asarray(ob.phase_spectrum, dtype=complex)
        ncontrib[opts] = np.asarray(ob.neutral_spectrum, dtype=complex)
    for f, unit in enumerate(units):
        if not unit.wired:
            continue
        opts = np.flatnonzero(owner == f)
        ob = analyse_batch(
            _wired_batch(schedule, unit, [phases[o] for o in opts], factors, ca.orders),
            system,
            rat,
        )
        contrib[opts] = np.asarray(ob.phase_spectrum, dtype=complex)
        ncontrib[opts] = np.asarray(ob.neutral_spectrum, dtype=complex)
    return base, nbase, contrib, ncontrib
