"""An independent reference for the building rebalancer: every arrangement of every panel.

Nothing here uses :mod:`tri.rebalance`. What moves in a panel is a
*block* (:mod:`rebalance_wired_reference`): an unlocked placed breaker
(feeder breakers included, and breakers with one load per leg), or the
1-pole breakers of a ``shared_neutral`` group, which move together side by
side in one column in their order (README, shared neutrals; a group with a
locked breaker stays). On a two-column panel the blocks are put in every
set of first slots its geometry allows
(:func:`rebalance_wired_reference.block_arrangements`), within the panel's
reach limit when it has one (``[panel] max_row_shift``:
:func:`rebalance_reference.within_reach`, rows counted there), and on a
high-leg delta none with a load to neutral on the high leg
(:func:`rebalance_wired_reference.buildable`); each pole's phase is read
with the panel's ``right_column`` (A-B-C or C-B-A down the even column,
:func:`tri.schedule.slots.pole_phases`). On a rail board each block takes
every phases it may (:func:`rebalance_wired_reference.rail_options`:
behind a 2-pole RCD only that RCD's phase). Arrangements that put every
block on the same phases (in pole order for a wired block, as a set for a
plain breaker) are one electrical case, kept with its fewest relocations (a
placed block whose first slot, or on a rail board whose phases, change is
one relocation: a group moved counts once, as the work order counts it).
Every combination of one case per panel is written into the building and
run through the engine's whole-tree analysis
(:func:`tri.schedule.tree_to_engine.analyse_building`); the deviation of
each panel (everything it feeds included) is the engine's own. The
optimum for a pair of targets is then a minimum over this list.

Small random buildings for it are written by :func:`write_building`: a
480Y/277 parent with one or two feeders, a child on the same system fed
directly and/or a 208Y/120 child behind a transformer (``Dyn``, ``YNyn0``
or ``Yyn0``), a few 1- and 2-pole loads with harmonic profiles (invented
data).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from rebalance_reference import within_reach
from rebalance_wired_reference import (
    block_arrangements,
    blocks_of,
    buildable,
    rail_options,
    schedule_at,
)

from tri.schedule.model import Schedule
from tri.schedule.slots import PHASES, pole_phases
from tri.schedule.tree import ScheduleTree, with_schedules
from tri.schedule.tree_to_engine import analyse_building


@dataclass(frozen=True)
class PanelCases:
    """The electrical cases of one panel: a schedule and its fewest relocations each."""

    schedules: list[Schedule]
    relocations: list[int]


def _free_blocks(schedule: Schedule) -> list[tuple[int, ...]]:
    """The blocks that may move: unlocked placed breakers, a shared-neutral group only whole."""
    circuits = schedule.circuits
    free = [i for i, c in enumerate(circuits) if c.is_placed and not c.locked]
    held = {c.shared_neutral for c in circuits if c.locked and c.shared_neutral is not None}
    free = [i for i in free if circuits[i].poles > 1 or circuits[i].shared_neutral not in held]
    return blocks_of(schedule, free)


def _ordered(schedule: Schedule, block: tuple[int, ...]) -> bool:
    """The order of a block's phases matters: a group, or a breaker with one load per leg."""
    return len(block) > 1 or schedule.circuits[block[0]].has_legs


def _key(schedule: Schedule, block: tuple[int, ...], phases: tuple[int, ...]):
    """What a block's phases mean electrically: in pole order when wired, else as a set."""
    return tuple(phases) if _ordered(schedule, block) else frozenset(phases)


def _slot_cases(schedule: Schedule, blocks: list[tuple[int, ...]]) -> dict[tuple, tuple]:
    """Two-column panel: every arrangement of the blocks (module notes), fewest moves per case."""
    firsts = block_arrangements(schedule, blocks)
    firsts = firsts[buildable(schedule, blocks, firsts)]
    firsts = within_reach(schedule, [b[0] for b in blocks], firsts)
    circuits = schedule.circuits
    rc = schedule.panel.right_column
    poles = [sum(circuits[i].poles for i in b) for b in blocks]
    best: dict[tuple, tuple] = {}
    for row in firsts:
        key = tuple(
            _key(schedule, b, pole_phases(int(s), n, rc))
            for b, s, n in zip(blocks, row, poles, strict=True)
        )
        moved = sum(1 for b, s in zip(blocks, row, strict=True) if circuits[b[0]].slot != int(s))
        if key not in best or moved < best[key][0]:
            best[key] = (moved, schedule_at(schedule, blocks, row))
    return best


def _rail_cases(schedule: Schedule, blocks: list[tuple[int, ...]]) -> dict[tuple, tuple]:
    """Rail board: every phases of every block (:func:`rail_options`), a changed block one move."""
    circuits = schedule.circuits
    now = [
        _key(schedule, b, tuple(p for i in b for p in (circuits[i].phases or ()))) for b in blocks
    ]
    best: dict[tuple, tuple] = {}
    for plan in itertools.product(*(rail_options(schedule, b) for b in blocks)):
        key = tuple(_key(schedule, b, ph) for b, ph in zip(blocks, plan, strict=True))
        out = schedule
        for b, ph in zip(blocks, plan, strict=True):
            for k, i in enumerate(b):
                own = ph if len(b) == 1 else (ph[k],)
                out = out.with_circuit(i, out.circuits[i].on_phases(own))
        best[key] = (sum(1 for a, n in zip(key, now, strict=True) if a != n), out)
    return best


def panel_cases(schedule: Schedule) -> PanelCases:
    """Every electrically distinct arrangement of a panel with its fewest relocations."""
    blocks = _free_blocks(schedule)
    if schedule.panel.layout == PHASES:
        best = _rail_cases(schedule, blocks)
    else:
        best = _slot_cases(schedule, blocks)
    return PanelCases([b[1] for b in best.values()], [b[0] for b in best.values()])


@dataclass(frozen=True)
class TreeCases:
    """Every combination of cases: relocations and every panel's deviation [%]."""

    relocations: np.ndarray  # (N,)
    deviation_pct: np.ndarray  # (N, panels)
    service_neutral_a: np.ndarray  # (N,): the root's neutral RMS, the engine's [A]

    def optimum(
        self, service_pct: float, child_pct: float, neutral_max_a: float | None = None
    ) -> int | None:
        """Fewest relocations meeting both targets (and the root's neutral limit; None: no plan)."""
        targets = np.full(self.deviation_pct.shape[1], child_pct)
        targets[0] = service_pct
        ok = np.all(self.deviation_pct <= targets * (1 + 1e-9) + 1e-12, axis=1)
        if neutral_max_a is not None:
            ok &= self.service_neutral_a <= neutral_max_a * (1 + 1e-9)
        return int(self.relocations[ok].min()) if np.any(ok) else None

    def clear_targets(self, column: int, count: int, rng) -> list[float]:
        """Demanding targets halfway between distinct deviations of a panel (none near) [%]."""
        values = np.unique(np.round(self.deviation_pct[:, column], 6))
        mids = (values[:-1] + values[1:]) / 2
        mids = mids[np.diff(values) > 1e-3]
        if not mids.size:
            return [float(values[0]) + 1.0]
        low = mids[: max(count, mids.size // 4)]  # demanding targets: the lowest quarter
        return [float(x) for x in rng.choice(low, size=min(count, low.size), replace=False)]


def tree_cases(tree: ScheduleTree) -> TreeCases:
    """Every combination of every panel's cases, through the engine (module notes)."""
    per_panel = [panel_cases(p.schedule) for p in tree.panels]
    reloc, devs, neutral = [], [], []
    for combo in itertools.product(*(range(len(c.schedules)) for c in per_panel)):
        schedules = [per_panel[k].schedules[j] for k, j in enumerate(combo)]
        result = analyse_building(with_schedules(tree, schedules))
        reloc.append(sum(per_panel[k].relocations[j] for k, j in enumerate(combo)))
        devs.append([n.analysis.current_unbalance.max_deviation_pct for n in result.nodes])
        neutral.append(result.nodes[0].analysis.neutral.rms_a)
    return TreeCases(np.array(reloc), np.array(devs), np.array(neutral))


_PROFILES = ("linear", "electronics", "led-driver")


def _load(rng, slot: int, poles: int, name: str, locked: bool = False) -> str:
    va = int(rng.integers(5, 40)) * 100 if poles == 1 else int(rng.integers(10, 60)) * 100
    profile = _PROFILES[int(rng.integers(0, 3))]
    lock = "locked = true\n" if locked else ""
    return (
        f'[[circuit]]\nslot = {slot}\npoles = {poles}\nname = "{name}"\n'
        f'load_va = {va}\npf = 0.9\nprofile = "{profile}"\n{lock}\n'
    )


def _panel(name: str, system: str, spaces: int, body: str, wired: str = "") -> str:
    return (
        f'format = 1\n\n[panel]\nname = "{name}"\nsystem = "{system}"\nspaces = {spaces}\n'
        f"bus_a = 400\n{wired}\n{body}"
    )


def write_building(
    folder: Path, seed: int, children: int, cba_child: bool = False, reach: int | None = None
) -> Path:
    """A small random building (module notes); returns the parent's file.

    ``children``: 1 (behind a transformer) or 2 (one direct, one behind a
    transformer). From seed 6 on the child behind the transformer is larger
    (five 1-pole loads in 8 spaces, one locked). ``cba_child``: that child's
    right column reads C-B-A (``right_column = "CBA"``); ``reach``: every
    panel has ``max_row_shift = reach``.
    """
    limit = "" if reach is None else f"max_row_shift = {reach}\n"
    rng = np.random.default_rng(seed)
    group = ("Dyn", "YNyn0", "Yyn0")[seed % 3]
    body = (
        '[[circuit]]\nslot = 1\npoles = 3\nname = "Feeder to T1 / LP"\nfeeds = "lp.toml"\n'
        "feeder = { length_m = 10, r_ohm_per_km = 0.5, x_ohm_per_km = 0.1 }\n"
        f'transformer = {{ kva = 30, z_pct = 4, x_r = 2, connection = "{group}", '
        'secondary = "208Y/120" }\n\n'
    )
    spaces = 8
    loads = [2, 7] if children == 1 else [8]
    if children == 2:
        body += '[[circuit]]\nslot = 2\npoles = 3\nname = "Feeder to HP"\nfeeds = "hp.toml"\n\n'
        spaces = 10
    for k, slot in enumerate(loads):
        body += _load(rng, slot, 1, f"Parent load {k + 1}")
    (folder / "main.toml").write_text(_panel("MAIN", "480Y/277", spaces, body, limit))
    lp = ""
    cba = 'right_column = "CBA"\n' if cba_child else ""
    lp_slots = [(1, 1), (2, 2), (5, 1)] if seed % 2 else [(1, 1), (3, 1), (2, 1)]
    lp_spaces = 6
    if seed >= 6:  # a larger child: four 1-pole loads, one of them locked
        lp_slots, lp_spaces = [(1, 1), (3, 1), (5, 1), (2, 1), (4, 1)], 8
    for k, (slot, poles) in enumerate(lp_slots):
        lp += _load(rng, slot, poles, f"LP load {k + 1}", locked=seed >= 6 and k == 4)
    (folder / "lp.toml").write_text(_panel("LP", "208Y/120", lp_spaces, lp, cba + limit))
    if children == 2:
        hp = _load(rng, 1, 1, "HP load 1") + _load(rng, 2, 2, "HP load 2")
        (folder / "hp.toml").write_text(_panel("HP", "480Y/277", 6, hp, limit))
    return folder / "main.toml"
