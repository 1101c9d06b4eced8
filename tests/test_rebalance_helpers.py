"""Shared builders for the rebalancer tests, and an exhaustive search kept as the reference.

The exhaustive search enumerates every assignment of the free circuits and
evaluates each whole panel with the engine itself
(:func:`tri.engine.analyse_batch`), independently of the rebalancer's
superposition and solver code: it is the outside check the optimality
tests compare against.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np

from tri.engine import analyse_batch
from tri.engine.inputs import CircuitArrays
from tri.rebalance.problem import PAIRS
from tri.schedule.model import Circuit, PanelInfo, Schedule
from tri.schedule.slots import PHASES, TWO_COLUMN, slot_phases
from tri.schedule.to_engine import circuit_arrays, ratings, system_voltages
from tri.schedule.validate import check_schedule

PROFILES = ("linear", "linear", "electronics", "led-driver")


def panel(layout: str = PHASES, spaces: int = 42, system: str = "208Y/120") -> PanelInfo:
    """A 225 A panel (200 A main) of the given layout."""
    return PanelInfo(
        name="Test panel",
        system=system,
        frequency_hz=60.0,
        spaces=spaces,
        bus_a=225.0,
        main_a=200.0,
        layout=layout,
    )


def circuit(
    name: str,
    va: float,
    *,
    poles: int = 1,
    phases: tuple[int, ...] | None = None,
    slot: int | None = None,
    pf: float = 1.0,
    profile: str = "linear",
    locked: bool = False,
    leading: bool = False,
) -> Circuit:
    """One circuit; ``slot`` (two-column) sets the phases from the geometry."""
    if slot is not None:
        phases = slot_phases(slot, poles)
    return Circuit(
        name=name,
        poles=poles,
        slot=slot,
        phases=phases,
        load_kind="va",
        load_value=float(va),
        pf=pf,
        leading=leading,
        profile=profile,
        locked=locked,
    )


def random_rail(rng: np.random.Generator, n: int, *, harmonics: bool = True) -> Schedule:
    """A rail board with ``n`` circuits (about one in four 2-pole, some locked)."""
    circuits = []
    for k in range(n):
        poles = 2 if rng.random() < 0.25 else 1
        phases = PAIRS[rng.integers(3)] if poles == 2 else (int(rng.integers(3)),)
        circuits.append(
            circuit(
                f"C{k + 1}",
                float(rng.uniform(300, 4000)),
                poles=poles,
                phases=phases,
                pf=float(rng.uniform(0.75, 1.0)),
                profile=str(rng.choice(PROFILES)) if harmonics else "linear",
                locked=bool(rng.random() < 0.15),
                leading=bool(rng.random() < 0.1),
            )
        )
    return Schedule(panel=panel(PHASES), circuits=tuple(circuits))


def random_two_column(
    rng: np.random.Generator, n: int, spaces: int = 42, *, harmonics: bool = True
) -> Schedule:
    """A two-column panel with ``n`` breakers dropped in free positions at random."""
    used: set[int] = set()
    circuits = []
    for k in range(n):
        poles = int(rng.choice([1, 1, 1, 2, 2, 3]))
        starts = [
            s
            for s in range(1, spaces + 1)
            if s + 2 * (poles - 1) <= spaces and not used.intersection(range(s, s + 2 * poles, 2))
        ]
        if not starts:
            continue
        s = int(rng.choice(starts))
        used.update(range(s, s + 2 * poles, 2))
        circuits.append(
            circuit(
                f"C{k + 1}",
                float(rng.uniform(300, 6000)),
                poles=poles,
                slot=s,
                pf=float(rng.uniform(0.75, 1.0)),
                profile=str(rng.choice(PROFILES)) if harmonics and poles < 3 else "linear",
                locked=bool(rng.random() < 0.15),
            )
        )
    return Schedule(panel=panel(TWO_COLUMN, spaces), circuits=tuple(circuits))


@dataclass(frozen=True)
class Exhaustive:
    """Every assignment of the movable circuits of a rail board, analysed by the engine.

    Attributes
    ----------
    moves : int ndarray, shape (B,)
        Circuits whose phases differ from now.
    rms : ndarray, shape (B, 3)
        Phase RMS currents [A].
    neutral : ndarray, shape (B,)
        Neutral RMS current [A].
    deviation : ndarray, shape (B,)
        Largest deviation from the mean [%].
    """

    moves: np.ndarray
    rms: np.ndarray
    neutral: np.ndarray
    deviation: np.ndarray

    def fewest_moves(self, target_pct: float, neutral_max: float | None = None) -> int | None:
        """Fewest moves meeting the target (None: no assignment meets it)."""
        # (1 + 1e-9) + 1e-12: round-off slack at the target, the same the plan tests allow
        ok = self.deviation <= target_pct * (1 + 1e-9) + 1e-12
        if neutral_max is not None:
            ok &= self.neutral <= neutral_max * (1 + 1e-9)
        return int(self.moves[ok].min()) if np.any(ok) else None

    def best_max_rms(self, max_moves: int) -> float:
        """Smallest largest-phase RMS current with at most ``max_moves`` moves [A]."""
        ok = self.moves <= max_moves
        return float(self.rms[ok].max(axis=1).min())


def movable_rail(schedule: Schedule) -> list[int]:
    """Indices the rebalancer may move on a rail board (unlocked, placed, 1- or 2-pole)."""
    return [
        i for i, c in enumerate(schedule.circuits) if c.is_placed and not c.locked and c.poles < 3
    ]


def exhaustive_rail(schedule: Schedule) -> Exhaustive:
    """Enumerate all 3^m assignments of the movable circuits (m ≤ 8 or so)."""
    ca = circuit_arrays(schedule)
    free = movable_rail(schedule)
    choices = []
    for i in free:
        c = schedule.circuits[i]
        choices.append([(p, p) for p in range(3)] if c.poles == 1 else list(PAIRS))
    combos = list(itertools.product(*choices)) if free else [()]
    b = len(combos)
    p = np.broadcast_to(ca.phase_p, (b, ca.n_circuits)).copy()
    q = np.broadcast_to(ca.phase_q, (b, ca.n_circuits)).copy()
    moves = np.zeros(b, dtype=int)
    for k, combo in enumerate(combos):
        for i, (pp, qq) in zip(free, combo, strict=True):
            p[k, i], q[k, i] = pp, qq
            now = schedule.circuits[i].phases
            assert now is not None
            moves[k] += set(now) != {pp, qq}
    batch = CircuitArrays(
        s_va=np.broadcast_to(ca.s_va, (b, ca.n_circuits)),
        connection=np.broadcast_to(ca.connection, (b, ca.n_circuits)),
        phase_p=p,
        phase_q=q,
        harmonics=np.broadcast_to(ca.harmonics, (b, *ca.harmonics.shape)),
        orders=ca.orders,
        continuous=np.zeros((b, ca.n_circuits), dtype=bool),
    )
    res = analyse_batch(batch, system_voltages(schedule), ratings(schedule))
    return Exhaustive(
        moves=moves,
        rms=np.asarray(res.phase_rms_a),
        neutral=np.asarray(res.neutral_rms_a),
        deviation=np.asarray(res.max_deviation_pct),
    )


def slot_owners(schedule: Schedule) -> dict[int, int]:
    """Slot -> circuit index; asserts that no two breakers share a slot."""
    owners: dict[int, int] = {}
    for i, c in enumerate(schedule.circuits):
        if c.slot is None:
            continue
        for s in range(c.slot, c.slot + 2 * c.poles, 2):
            assert s not in owners, f"slot {s} taken twice"
            assert s <= schedule.panel.spaces
            owners[s] = i
    return owners


def assert_sound(schedule: Schedule) -> None:
    """The schedule layer's own validation finds nothing wrong."""
    issues = check_schedule(schedule)
    assert not issues, [i.message for i in issues]
    if schedule.panel.uses_slots:
        slot_owners(schedule)


def test_exhaustive_reference_counts_every_assignment() -> None:
    # 3 movable 1-pole circuits -> 27 assignments, one of them with 0 moves
    s = Schedule(
        panel=panel(),
        circuits=(
            circuit("a", 1200, phases=(0,)),
            circuit("b", 1200, phases=(1,)),
            circuit("c", 1200, phases=(2,)),
        ),
    )
    ex = exhaustive_rail(s)
    assert ex.moves.shape == (27,)
    assert int(np.sum(ex.moves == 0)) == 1
    # three equal resistive loads one per phase: balanced [computed] (3^3 = 27 assignments)
    assert ex.fewest_moves(0.0) == 0
