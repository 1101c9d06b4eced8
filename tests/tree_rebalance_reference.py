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
Every combination of one case per panel is then run through the engine:
each panel's own currents once per case of that panel
(:func:`own_currents`, the building packed as
:func:`tri.schedule.tree_to_engine.analyse_building` packs it), every
combination rolled up at once by the engine's roll-up and its figures
(:func:`rolled_up`); the deviation of each panel (everything it feeds
included) is the engine's own. tests/test_tree_reference_fast.py checks
these figures against ``analyse_building`` of the combination written into
the building. The optimum for a pair of targets is then a minimum over
this list.

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

from tri.engine.batch_figures import current_figures
from tri.engine.harmonics import order_currents
from tri.engine.phasors import element_currents
from tri.engine.tree import nominal_voltages, roll_up
from tri.engine.tree_inputs import PackedTree, pack_tree
from tri.engine.tree_solution import Spectra
from tri.schedule.model import Schedule
from tri.schedule.slots import PHASES, pole_phases
from tri.schedule.tree import ScheduleTree, with_schedules
from tri.schedule.tree_scenarios import scenario_inputs
from tri.schedule.tree_to_engine import tree_inputs


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


#: What the engine's roll-up reads of a packed tree (:func:`tri.engine.tree.roll_up`): the
#: same in every arrangement, or the one roll-up of them all below would be wrong.
_ROLL_UP_FIELDS = (
    "parent",
    "has_tx",
    "high_leg",
    "tap",
    "frame_rad",
    "lag_rad",
    "ratio",
    "zero_pass",
)


def _packed(tree: ScheduleTree, schedules: list[Schedule], scenario: str | None) -> PackedTree:
    """The engine's packed tree of the building with these schedules, as analyse_building has."""
    built = with_schedules(tree, schedules)
    inputs = tree_inputs(built)
    if scenario is not None:
        inputs = scenario_inputs(built, inputs, scenario)
    return pack_tree(inputs)


@dataclass(frozen=True)
class OwnCurrents:
    """Each panel's own circuits in each of its J cases, the other panels as they are.

    ``packed``: the building as it is (the links the roll-up reads);
    ``orders`` (H,); per panel ``phase`` (J, 3, H), ``neutral`` (J, H) [A]
    and ``scale`` (J,), the sum of its circuits' RMS currents [A].
    """

    packed: PackedTree
    orders: np.ndarray
    phase: list[np.ndarray]
    neutral: list[np.ndarray]
    scale: list[np.ndarray]


def own_currents(
    tree: ScheduleTree, per_panel: list[PanelCases], scenario: str | None = None
) -> OwnCurrents:
    """Each case's own currents at nominal voltage, as analyse_building computes them.

    The building with that one panel's case is packed by the engine
    (:func:`tri.engine.tree_inputs.pack_tree`, from
    :func:`tri.schedule.tree_to_engine.tree_inputs`, scaled by
    :func:`tri.schedule.tree_scenarios.scenario_inputs` in a scenario) and
    the panel's row taken from :func:`tri.engine.harmonics.order_currents`.
    """
    here = [p.schedule for p in tree.panels]
    base = _packed(tree, here, scenario)
    orders: np.ndarray | None = None
    phase, neutral, scale = [], [], []
    for k, cases in enumerate(per_panel):
        rows = []
        for schedule in cases.schedules:
            packed = _packed(tree, [*here[:k], schedule, *here[k + 1 :]], scenario)
            for name in _ROLL_UP_FIELDS:
                assert np.array_equal(getattr(packed, name), getattr(base, name)), name
            oc = order_currents(
                packed.circuits, element_currents(packed.circuits, nominal_voltages(packed))
            )
            assert orders is None or np.array_equal(oc.orders, orders)
            orders = oc.orders
            rows.append((oc.phase[k], oc.neutral[k], np.sum(oc.circuit_rms_a[k])))
        phase.append(np.array([r[0] for r in rows]))
        neutral.append(np.array([r[1] for r in rows]))
        scale.append(np.array([r[2] for r in rows]))
    assert orders is not None
    return OwnCurrents(base, orders, phase, neutral, scale)


def rolled_up(own: OwnCurrents, combos: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Every panel's deviation (B, N) [%] and the root's neutral RMS (B,) [A] of B combinations.

    ``combos`` (B, N): one case per panel. All are rolled up at once by the
    engine's :func:`tri.engine.tree.roll_up`, the combinations side by side
    along its order axis (it treats every order on its own: combination b's
    order h at b·H + h), and their figures are the engine's
    :func:`tri.engine.batch_figures.current_figures` over the combinations
    (the figures analyse_building reports as each panel's deviation and
    neutral RMS).
    """
    nodes, count, n_orders = len(own.phase), len(combos), own.orders.size
    phase = np.stack([own.phase[k][combos[:, k]] for k in range(nodes)])  # (N, B, 3, H)
    phase = phase.transpose(0, 2, 1, 3).reshape(nodes, 3, count * n_orders)
    neutral = np.stack([own.neutral[k][combos[:, k]] for k in range(nodes)])
    neutral = neutral.reshape(nodes, count * n_orders)
    spectra = Spectra(phase, neutral, phase)
    total, _ = roll_up(own.packed, spectra, np.tile(own.orders, count))
    scale = np.stack([own.scale[k][combos[:, k]] for k in range(nodes)])  # (N, B)
    for idx in reversed(own.packed.levels[1:]):  # the subtree's circuits, as the engine's
        np.add.at(scale, own.packed.parent[idx], scale[idx])
    figures = current_figures(
        total.phase.reshape(nodes, 3, count, n_orders).transpose(2, 0, 1, 3),
        total.neutral.reshape(nodes, count, n_orders).transpose(1, 0, 2),
        None,
        scale.T,
        own.packed.rating_a,
        own.packed.neutral_rating_a,
    )
    return figures["max_deviation_pct"], figures["neutral_rms_a"][:, 0]


def all_combinations(per_panel: list[PanelCases]) -> np.ndarray:
    """Every combination of one case per panel (B, N), in :func:`itertools.product` order."""
    return np.array(list(itertools.product(*(range(len(c.schedules)) for c in per_panel))))


def tree_cases(tree: ScheduleTree, scenario: str | None = None) -> TreeCases:
    """Every combination of every panel's cases, through the engine (module notes).

    ``scenario``: every load times its use factors in that scenario (as
    ``analyse_building(..., scenario=...)``); None: the connected load.
    """
    per_panel = [panel_cases(p.schedule) for p in tree.panels]
    combos = all_combinations(per_panel)
    deviation, neutral = rolled_up(own_currents(tree, per_panel, scenario), combos)
    reloc = sum(np.asarray(c.relocations)[combos[:, k]] for k, c in enumerate(per_panel))
    return TreeCases(np.asarray(reloc), deviation, neutral)


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
