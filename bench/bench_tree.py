"""Building benchmark: a campus of 1,000 panels of 42 circuits each, rolled up as one tree.

The campus: a 480Y/277 service feeding 9 building distribution panels
directly; each feeds 10 floor panels through delta-wye transformers
(208Y/120); each floor panel feeds 10 sub-panels directly. 1 + 9 + 90 + 900
= 1,000 panels, 42 circuit rows each (feeder rows included), 25 harmonic
orders. Prints the median time (warm, after one untimed run) of each stage
of the batch engine (and the same campus with its 900 sub-panels wired:
breakers with legs and shared neutrals), the whole-tree iteration, the per-panel results with
findings, and the file path (write, read and analyse TOML files); asserts
nothing (issue 13's target: the tree analysed in under 1 s warm through the
batch engine). The machine may be shared: read the medians, not single runs.

Usage::

    .venv/bin/python bench/bench_tree.py          # full run (1,000 panels)
    .venv/bin/python bench/bench_tree.py --quick  # CI smoke run (100 panels)
"""

from __future__ import annotations

import argparse
import pathlib
import platform
import statistics
import sys
import tempfile
import time
from collections.abc import Callable

import numpy as np

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent.parent))

from tri.engine import analyse_batch
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    CircuitArrays,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)
from tri.engine.transformer import TransformerLink, parse_vector_group
from tri.engine.tree import solve_tree
from tri.engine.tree_inputs import FeederImpedance, PanelLink, TreeInputs, TreeNode, pack_tree
from tri.engine.tree_results import analyse_tree, tree_batch

ORDERS = np.arange(2, 27)
ROWS = 42
SYS_480 = SystemVoltages(480.0, 277.0)
SYS_208 = SystemVoltages(208.0, 120.0)
FEEDER = FeederImpedance(40.0, 0.2, 0.08, 0.2, 0.08)
TX = TransformerLink(75.0, 4.5, 2.5, parse_vector_group("Dyn1"))
SUPPLY = SupplyImpedance(2500.0, 5.75, 6.0, 20.0, 0.01, 0.02, 0.01, 0.02)


def panel(rng: np.random.Generator, feeders: int, scale: float) -> CircuitArrays:
    """42 rows: ``feeders`` empty 3-pole feeder rows first, random loads after."""
    n = ROWS
    conn = rng.choice([LINE_TO_NEUTRAL, LINE_TO_LINE, THREE_PHASE], size=n, p=[0.7, 0.2, 0.1])
    conn[:feeders] = THREE_PHASE
    p = rng.integers(0, 3, size=n)
    q = np.where(conn == LINE_TO_LINE, (p + rng.integers(1, 3, size=n)) % 3, p)
    kva = rng.uniform(0.2, 3.0, size=n) * scale
    pf = rng.uniform(0.75, 1.0, size=n)
    s = 1000 * kva * (pf + 1j * np.sqrt(1 - pf**2))
    s[:feeders] = 0
    mags = rng.uniform(0, 0.3, size=(n, ORDERS.size)) / ORDERS
    harm = mags * np.exp(1j * rng.uniform(-np.pi, np.pi, size=mags.shape))
    harm[:feeders] = 0
    return CircuitArrays(s, conn, p, q, harm, ORDERS, rng.random(n) < 0.2)


def wire(c: CircuitArrays) -> CircuitArrays:
    """The same sub-panel as wired: rows 0-23 as eight 3-pole breakers with a neutral.

    Each breaker's three legs go to neutral on A, B and C and share one
    neutral (a multi-wire branch circuit); the other rows stay one breaker each.
    """
    n = c.n_circuits
    legs = 24
    conn = np.array(c.connection, copy=True)
    p = np.array(c.phase_p, copy=True)
    conn[:legs] = LINE_TO_NEUTRAL
    p[:legs] = np.arange(legs) % 3
    q = np.array(c.phase_q, copy=True)
    q[:legs] = p[:legs]
    breaker = np.concatenate([np.arange(legs) // 3, legs // 3 + np.arange(n - legs)])
    group = np.concatenate([np.arange(legs) // 3, np.full(n - legs, -1)])
    return CircuitArrays(c.s_va, conn, p, q, c.harmonics, c.orders, c.continuous, breaker, group)


def campus(fan_out: tuple[int, int, int], seed: int = 13, *, wired: bool = False) -> TreeInputs:
    """Service -> buildings (direct) -> floors (Dyn) -> sub-panels (direct).

    ``wired``: every sub-panel has eight 3-pole breakers with a shared neutral (:func:`wire`).
    """
    rng = np.random.default_rng(seed)
    big = Ratings(4000.0)
    nodes = [TreeNode(panel(rng, fan_out[0], 3.0), SYS_480, big)]
    for b in range(fan_out[0]):
        nodes.append(
            TreeNode(panel(rng, fan_out[1], 2.0), SYS_480, Ratings(1200.0), PanelLink(0, b, FEEDER))
        )
        building = len(nodes) - 1
        for f in range(fan_out[1]):
            link = PanelLink(building, f, FEEDER, TX)
            nodes.append(TreeNode(panel(rng, fan_out[2], 0.3), SYS_208, Ratings(400.0), link))
            floor = len(nodes) - 1
            for k in range(fan_out[2]):
                link = PanelLink(floor, k, FeederImpedance(15.0, 0.5, 0.1, 0.5, 0.1))
                sub = panel(rng, 0, 0.05)
                nodes.append(TreeNode(wire(sub) if wired else sub, SYS_208, Ratings(100.0), link))
    return TreeInputs(tuple(nodes), supply=SUPPLY)


def median_time(fn: Callable[[], object], repeat: int) -> float:
    """Median wall time of ``fn`` over ``repeat`` runs after one warm-up [s]."""
    fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def write_campus_files(tree: TreeInputs, folder: pathlib.Path) -> pathlib.Path:
    """The campus as TOML schedules (loads as VA, profile linear), with progress."""
    labels = "ABC"
    for i, node in enumerate(tree.nodes):
        system = "480Y/277" if node.system.v_ln == 277.0 else "208Y/120"
        lines = ["format = 1", "", "[panel]", f'name = "Panel {i}"', f'system = "{system}"']
        lines += [f"spaces = {ROWS * 3}", f"bus_a = {node.ratings.bus_a:g}", "", ""]
        children = [k for k, n in enumerate(tree.nodes) if n.link and n.link.parent == i]
        fed = {tree.nodes[k].link.feeder_row: k for k in children}
        c = node.circuits
        for row in range(c.n_circuits):
            phases = "ABC" if c.connection[row] == THREE_PHASE else labels[c.phase_p[row]]
            if c.connection[row] == LINE_TO_LINE:
                phases = labels[c.phase_p[row]] + labels[c.phase_q[row]]
            lines += ["[[circuit]]", f'name = "Circuit {row}"', f'phases = "{phases}"']
            if row in fed:
                lines.append(f'feeds = "p{fed[row]}.toml"')
                link = tree.nodes[fed[row]].link
                f = link.feeder
                lines.append(
                    f"feeder = {{ length_m = {f.length_m:g}, r_ohm_per_km = {f.r_ohm_per_km:g} }}"
                )
                if link.transformer is not None:
                    lines.append(
                        'transformer = { kva = 75, z_pct = 4.5, x_r = 2.5, connection = "Dyn", '
                        'secondary = "208Y/120" }'
                    )
            else:
                lines.append(f"load_va = {abs(c.s_va[row]):.1f}")
            lines.append("")
        text = "\n".join(lines).replace("[panel]", '[panel]\nlayout = "phases"')
        (folder / f"p{i}.toml").write_text(text, encoding="utf-8")
        if (i + 1) % 100 == 0:
            print(f"  wrote {i + 1} of {len(tree.nodes)} files", file=sys.stderr)
    return folder / "p0.toml"


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="100 panels, few repeats (CI smoke)")
    args = ap.parse_args(argv)
    fan_out = (3, 3, 10) if args.quick else (9, 10, 10)
    repeat = 3 if args.quick else 7
    tree = campus(fan_out)
    count = len(tree.nodes)
    packed = pack_tree(tree)
    sol = solve_tree(packed)
    print(f"tri building benchmark: {count} panels x {ROWS} circuit rows, {ORDERS.size} orders")
    print(f"python {platform.python_version()}, numpy {np.__version__}, {platform.machine()}")
    print("median of the warm runs; the machine may be shared with other work\n")

    flat = CircuitArrays(
        packed.circuits.s_va,
        packed.circuits.connection,
        packed.circuits.phase_p,
        packed.circuits.phase_q,
        packed.circuits.harmonics,
        packed.circuits.orders,
        packed.circuits.continuous,
    )
    stages = [
        ("pack (inputs to arrays)", lambda: pack_tree(tree)),
        ("solve (currents, roll-up, voltages)", lambda: solve_tree(packed)),
        ("figures of every panel (batch)", lambda: tree_batch(packed, sol)),
        (
            "batch engine total: pack+solve+figures",
            lambda: tree_batch(p := pack_tree(tree), solve_tree(p)),
        ),
        (
            "same panels, no roll-up (analyse_batch)",
            lambda: analyse_batch(flat, SYS_208, Ratings(4000.0)),
        ),
        ("whole-tree iteration (constant power)", lambda: solve_tree(packed, iterate=True)),
        ("results with findings for every panel", lambda: analyse_tree(tree)),
    ]
    results = {}
    for name, fn in stages:
        results[name] = median_time(fn, repeat)
        print(f"{name:<44} {1000 * results[name]:9.1f} ms")
    total = results["batch engine total: pack+solve+figures"]
    base = results["same panels, no roll-up (analyse_batch)"]
    it = solve_tree(packed, iterate=True)
    print(f"\nroll-up overhead over analysing the panels alone: {total / base:.2f}x")
    print(f"iteration: {it.iterations} sweeps, converged {it.converged}")
    print(f"target (issue 13): batch engine total under 1000 ms -> {1000 * total:.1f} ms")

    wired = campus(fan_out, wired=True)
    subs = sum(1 for n in wired.nodes if n.circuits.breaker is not None)
    wired_total = median_time(lambda: tree_batch(p := pack_tree(wired), solve_tree(p)), repeat)
    wired_results = median_time(lambda: analyse_tree(wired), repeat)
    print(f"\nwired campus: {subs} sub-panels with 8 shared-neutral 3-pole breakers each")
    print(f"{'batch engine total: pack+solve+figures':<44} {1000 * wired_total:9.1f} ms")
    print(f"{'results with findings for every panel':<44} {1000 * wired_results:9.1f} ms")
    print(
        f"target (issue 13): wired batch engine total under 1000 ms -> {1000 * wired_total:.1f} ms"
    )

    files = 50 if args.quick else count
    from tri.schedule.tree import load_tree
    from tri.schedule.tree_to_engine import analyse_building

    small = campus((1, 1, files - 3)) if args.quick else tree
    with tempfile.TemporaryDirectory() as tmp:
        print(f"\nfile path: writing {len(small.nodes)} TOML files ...", file=sys.stderr)
        root = write_campus_files(small, pathlib.Path(tmp))

        def progress(n: int, name: str) -> None:
            if n % 100 == 0:
                print(f"  read {n} files", file=sys.stderr)

        t0 = time.perf_counter()
        building = load_tree(root, progress=progress)
        t1 = time.perf_counter()
        analyse_building(building)
        t2 = time.perf_counter()
    print(f"file path, {len(small.nodes)} panels (one run, cold files):")
    print(f"  read and check the files (load_tree)        {1000 * (t1 - t0):9.1f} ms")
    print(f"  analyse the building with findings          {1000 * (t2 - t1):9.1f} ms")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
