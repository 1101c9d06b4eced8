"""Dense small two-column panels, and every claim of a suggestion checked against the reference.

Used by ``tests/test_rebalance_enumeration.py`` (a few hundred panels) and
``bench/bench_rebalance_sweep.py`` (thousands). The panels are random
tilings of a small two-column panel: every slot but 0-2 taken, 1-, 2- and
3-pole breakers, some locked, a quarter of the 1- and 2-pole loads with a
harmonic profile, sometimes a new circuit without a slot.

A claim is checked against :mod:`rebalance_reference` (every arrangement,
engine figures, relocations counted as the work order counts them). Where
a plan sits on the very edge of a target the question has no robust answer
(round-off decides), so targets and limits are judged with a relative
band of ``EDGE`` each side: a claim is false only when a plan beats it by
more than that.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np
from rebalance_reference import Enumerated, enumerate_panel, free_breakers

from tri.schedule.model import Circuit, PanelInfo, Schedule
from tri.schedule.slots import TWO_COLUMN, fits, occupied_slots, slot_phases
from tri.schedule.validate import check_schedule

#: Relative band around a target or an optimum inside which round-off decides [-]
#: (the rebalancer's own tolerances are 1e-9 relative; plans of random loads are
#: never this close to an edge except by construction).
EDGE = 1e-7
#: Relative gap at which the rebalancer calls a balance plan optimal (its PROVEN_GAP) [-],
#: plus the band.
OPTIMAL_GAP = 1e-6 + EDGE

PROFILES = ("linear", "linear", "linear", "electronics", "led-driver", "vfd")


def dense_panel(rng: np.random.Generator, spaces: int, max_free: int = 6) -> Schedule:
    """A random tiling of ``spaces`` slots with 0-2 left empty (module notes).

    At most ``max_free`` breakers stay unlocked (the rest are locked), so
    the reference's enumeration stays small.
    """
    empties = int(rng.integers(0, 3))
    used: set[int] = set()
    circuits: list[Circuit] = []
    spare = empties
    for cell in range(1, spaces + 1):
        if cell in used:
            continue
        choices = [
            k
            for k in (1, 2, 3)
            if fits(cell, k, spaces) and not used.intersection(occupied_slots(cell, k))
        ]
        if spare > 0 and rng.random() < 0.2:
            spare -= 1
            used.add(cell)
            continue
        k = int(rng.choice(choices, p=_pole_weights(choices)))
        used.update(occupied_slots(cell, k))
        circuits.append(_circuit(rng, len(circuits) + 1, k, cell))
    unlocked = [i for i, c in enumerate(circuits) if not c.locked]
    for i in unlocked[max_free:]:
        circuits[i] = replace(circuits[i], locked=True)
    if rng.random() < 0.3:
        k = int(rng.choice([1, 1, 2]))
        circuits.append(_circuit(rng, len(circuits) + 1, k, None))
    info = PanelInfo(
        name="dense",
        system="208Y/120",
        frequency_hz=60.0,
        spaces=spaces,
        bus_a=225.0,
        layout=TWO_COLUMN,
    )
    return Schedule(panel=info, circuits=tuple(circuits))


#: Scenario names of :func:`with_scenarios` [-].
SCENARIOS = ("day", "night")


def with_scenarios(rng: np.random.Generator, schedule: Schedule) -> Schedule:
    """The panel with random ``use`` factors: each circuit, with probability 0.8
    (the first always), gets a share from 0 to 1 in each of :data:`SCENARIOS`
    (some at 0, some naming one scenario only, so the other is at 1.0)."""
    circuits = []
    for k, c in enumerate(schedule.circuits):
        use = []
        if k == 0 or rng.random() < 0.8:
            for name in SCENARIOS:
                if k == 0 or rng.random() < 0.85:
                    f = 0.0 if rng.random() < 0.15 else float(np.round(rng.uniform(0.05, 1.0), 2))
                    use.append((name, f))
        circuits.append(replace(c, use=tuple(use)))
    return replace(schedule, circuits=tuple(circuits))


def _pole_weights(choices: list[int]) -> np.ndarray:
    w = np.array([{1: 0.55, 2: 0.3, 3: 0.15}[k] for k in choices])
    return w / w.sum()


def _circuit(rng: np.random.Generator, n: int, poles: int, slot: int | None) -> Circuit:
    profile = str(rng.choice(PROFILES)) if poles < 3 else "linear"
    return Circuit(
        name=f"C{n}",
        poles=poles,
        slot=slot,
        phases=None if slot is None else slot_phases(slot, poles),
        load_kind="va",
        load_value=float(rng.uniform(300, 6000)),
        pf=float(rng.uniform(0.75, 1.0)),
        profile=profile,
        locked=bool(slot is not None and rng.random() < 0.15),
    )


@dataclass(frozen=True)
class Case:
    """One question: a panel and the options of one mode.

    Attributes
    ----------
    schedule : Schedule
    mode : str
        ``fewest-moves``, ``balance``, ``place-new`` or ``relayout``.
    target_pct, max_moves, neutral_max_a : float, int, float or None
        As in :class:`tri.rebalance.SuggestOptions`.
    place_new : bool
    """

    schedule: Schedule
    mode: str
    target_pct: float | None = None
    max_moves: int | None = None
    neutral_max_a: float | None = None
    place_new: bool = False

    def options(self, **extra):
        """The rebalancer's options for this case."""
        from tri.rebalance import SuggestOptions

        return SuggestOptions(
            target_pct=self.target_pct,
            max_moves=self.max_moves,
            neutral_max_a=self.neutral_max_a,
            place_new=self.place_new,
            relayout=self.mode == "relayout",
            **extra,
        )


def cases_for(rng: np.random.Generator, schedule: Schedule) -> list[Case]:
    """One case of every mode for a panel (targets and budgets drawn at random)."""
    has_new = any(not c.is_placed for c in schedule.circuits)
    target = float(rng.choice([2.0, 5.0, 10.0, 20.0, 30.0]))
    out = [
        Case(schedule, "fewest-moves", target_pct=target, place_new=has_new and rng.random() < 0.5),
        Case(schedule, "fewest-moves", target_pct=target, max_moves=int(rng.integers(1, 3))),
        Case(schedule, "balance", max_moves=int(rng.integers(1, 4))),
        Case(schedule, "relayout"),
    ]
    if has_new:
        out.append(Case(schedule, "place-new", place_new=True))
    return out


def _within(enum: Enumerated, case: Case) -> np.ndarray:
    ok = np.ones(enum.relocations.shape, dtype=bool)
    if case.max_moves is not None and case.mode in ("fewest-moves", "balance"):
        ok &= enum.relocations <= case.max_moves
    return ok


def check_case(case: Case, s, enum: Enumerated | None = None) -> list[str]:
    """Every false claim of suggestion ``s`` for ``case`` (empty: all claims true)."""
    sched = case.schedule
    free = free_breakers(sched, case.mode, case.place_new)
    enum = enum or enumerate_panel(sched, free)
    bad = _plan_errors(sched, free, s) + _figure_errors(free, s, enum)
    within = _within(enum, case)
    n_lim = case.neutral_max_a
    if n_lim is not None:
        strict_n = enum.neutral_rms <= n_lim * (1 - EDGE)
        loose_n = enum.neutral_rms <= n_lim * (1 + EDGE)
    else:
        strict_n = loose_n = np.ones_like(within)
    if case.mode == "fewest-moves":
        t = case.target_pct
        assert t is not None
        strict = within & strict_n & (enum.deviation_pct <= t * (1 - EDGE))
        loose = within & loose_n & (enum.deviation_pct <= t * (1 + EDGE))
        placed = all(s.schedule.circuits[i].is_placed for i in free)
        if n_lim is not None:  # the claimed target_met covers the neutral limit too
            placed = placed and s.worst_neutral_rms_a <= n_lim * (1 + EDGE)
        bad += _fewest_errors(s, enum, strict, loose, t, placed)
    else:
        feasible = within & strict_n
        best = float(enum.max_rms[feasible].min()) if np.any(feasible) else math.inf
        bad += _balance_errors(s, best, bool(np.any(within & loose_n)))
    return bad


def _figure_errors(free: list[int], s, enum: Enumerated) -> list[str]:
    """The plan's reported worst-case figures against the reference's for its arrangement.

    Every case counts (:mod:`rebalance_reference`): a plan judged on the
    connected load alone reports figures the reference does not confirm.
    """
    slots = [s.schedule.circuits[i].slot for i in free]
    if any(x is None for x in slots):
        return []  # a new circuit left without a slot: not among the arrangements
    hit = np.flatnonzero(np.all(enum.slots == np.array(slots, dtype=int), axis=1))
    if not hit.size:
        return ["the plan is not among the reference's arrangements"]
    row = int(hit[0])
    bad = []
    for what, mine, ref in (
        ("deviation", s.worst_deviation_pct, float(enum.deviation_pct[row])),
        ("neutral", s.worst_neutral_rms_a, float(enum.neutral_rms[row])),
        ("largest phase current", s.worst_max_phase_rms_a, float(enum.max_rms[row])),
    ):
        if abs(mine - ref) > 1e-6 * max(1.0, abs(ref)):
            bad.append(f"worst-case {what} said {mine:.6f}, the reference has {ref:.6f}")
    return bad


def _plan_errors(sched: Schedule, free: list[int], s) -> list[str]:
    bad = []
    after = s.schedule
    if check_schedule(after):
        bad.append(f"the plan is not a valid panel: {check_schedule(after)[0].message}")
    free_set = set(free)
    reloc = 0
    for i, (b, a) in enumerate(zip(sched.circuits, after.circuits, strict=True)):
        if i not in free_set and (b.slot, b.phases) != (a.slot, a.phases):
            bad.append(f"{b.name} is not free but moved")
        if b.slot is not None and a.slot != b.slot:
            reloc += 1
    if reloc != s.relocations:
        bad.append(f"relocations said {s.relocations}, the schedules differ in {reloc}")
    return bad


def _fewest_errors(s, enum: Enumerated, strict, loose, t: float, placed: bool) -> list[str]:
    """False claims of a fewest-moves suggestion (``placed``: every free circuit has a slot)."""
    bad = []
    k_best = int(enum.relocations[strict].min()) if np.any(strict) else None
    met = placed and s.worst_deviation_pct <= t * (1 + EDGE)
    if s.target_met != met:
        bad.append(f"target_met {s.target_met} but the deviation after is {s.worst_deviation_pct}")
    if s.status in ("optimal", "already-balanced"):
        if not met:
            bad.append(f"{s.status} but the target is not met")
        if k_best is not None and s.relocations > k_best:
            bad.append(f"{s.status} with {s.relocations} relocations; {k_best} suffice")
        if s.status == "already-balanced" and s.relocations:
            bad.append("already-balanced with moves")
    elif s.status == "infeasible":
        if k_best is not None:
            bad.append(f"infeasible, but {k_best} relocations meet the target")
    elif s.status == "best-found":
        if s.bound is not None and k_best is not None and s.bound > k_best + 1e-9:
            bad.append(f"bound {s.bound} relocations, but {k_best} suffice")
        if met and s.bound is not None and s.relocations < s.bound - 1e-9:
            bad.append(f"bound {s.bound} above the plan's own {s.relocations}")
    if not np.any(loose) and met:
        bad.append("the plan meets the target but the reference finds no such plan")
    return bad


def _balance_errors(s, best: float, any_feasible: bool) -> list[str]:
    bad = []
    top = s.worst_max_phase_rms_a
    if s.status in ("optimal", "already-balanced") and top > best * (1 + OPTIMAL_GAP):
        bad.append(f"{s.status} at {top:.6f} A, but {best:.6f} A is possible")
    elif s.status == "infeasible" and math.isfinite(best):
        bad.append(f"infeasible, but a plan reaches {best:.6f} A")
    if s.bound is not None and s.bound > best * (1 + EDGE):
        bad.append(f"bound {s.bound:.6f} A above the optimum {best:.6f} A")
    if s.status != "infeasible" and not any_feasible and s.moves:
        bad.append("a plan is shown but no arrangement is feasible")
    return bad
