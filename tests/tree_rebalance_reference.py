"""An independent reference for the building rebalancer: every arrangement of every panel.

Nothing here uses :mod:`tri.rebalance`. Each panel's unlocked breakers
(feeder breakers included) are put in every set of first slots its
geometry allows (:func:`rebalance_reference.arrangements`), within the
panel's reach limit when it has one (``[panel] max_row_shift``:
:func:`rebalance_reference.within_reach`, rows counted there); each slot's
phase is read with the panel's ``right_column`` (A-B-C or C-B-A down the
even column, :func:`tri.schedule.slots.slot_phases`); arrangements
that put every breaker on the same phases are one electrical case, kept
with its fewest relocations (a placed breaker whose first slot changes is
one relocation). Every combination of one case per panel is written into
the building and run through the engine's whole-tree analysis
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
from rebalance_reference import arrangements, within_reach

from tri.schedule.model import Schedule
from tri.schedule.slots import slot_phases
from tri.schedule.tree import ScheduleTree, with_schedules
from tri.schedule.tree_to_engine import analyse_building


@dataclass(frozen=True)
class PanelCases:
    """The electrical cases of one panel: a schedule and its fewest relocations each."""

    schedules: list[Schedule]
    relocations: list[int]


def panel_cases(schedule: Schedule) -> PanelCases:
    """Every electrically distinct arrangement of a panel with its fewest relocations."""
    free = [i for i, c in enumerate(schedule.circuits) if c.is_placed and not c.locked]
    slots = within_reach(schedule, free, arrangements(schedule, free))
    rc = schedule.panel.right_column
    best: dict[tuple, tuple[int, np.ndarray]] = {}
    for row in slots:
        key = tuple(
            frozenset(slot_phases(int(s), schedule.circuits[i].poles, rc))
            for s, i in zip(row, free, strict=True)
        )
        moved = sum(
            1 for s, i in zip(row, free, strict=True) if schedule.circuits[i].slot != int(s)
        )
        if key not in best or moved < best[key][0]:
            best[key] = (moved, row)
    schedules, counts = [], []
    for moved, row in best.values():
        out = schedule
        for s, i in zip(row, free, strict=True):
            out = out.with_circuit(i, out.circuits[i].at_slot(int(s)))
        schedules.append(out)
        counts.append(moved)
    return PanelCases(schedules, counts)


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
