"""Benchmark of the terminal UI, measured with Textual's pilot (printed, not asserted).

1. Start-up: from creating the app to the main view's first frame, and to the
   first results from the engine on screen.
2. Keystroke to updated results on an 84-circuit panel: press a key that edits
   the schedule (x deletes the circuit under the cursor, u undoes it), then wait
   until the engine's new figures are drawn, in the list and in the panel view
   (Tab). Target: under 50 ms per edit.
3. A building: an edit in a child panel to the top panel's figures updated
   (the whole tree re-analysed), on the demo brewery (4 panels) and on a
   generated campus of 111 panels (a top panel feeding 10 panels that feed
   10 each, 12 circuits per leaf).
4. The log view: from the key to the picture of the demo garage's week of
   5-minute data (read in a thread), and of 200 000 one-minute rows whose UTC
   offset changes halfway (read in a child process; the slow parse of such
   times is the file layer's).

Run: ``.venv/bin/python bench/bench_tui.py`` (``--quick`` for CI: fewer repeats).
"""

from __future__ import annotations

import argparse
import asyncio
import os
import statistics
import sys
import tempfile
import time
from pathlib import Path

from tri.schedule.model import Circuit, PanelInfo, Schedule
from tri.schedule.save import save_schedule
from tri.schedule.to_engine import analyse_schedule

PROFILES = ("linear", "electronics", "led-driver", "linear", "vfd", "linear", "ev-charger")


def panel_84() -> Schedule:
    """84 one-pole circuits in 84 spaces, loads 300..2900 VA, mixed profiles (fixed)."""
    panel = PanelInfo(name="Bench 84", system="208Y/120", frequency_hz=60.0, spaces=84, bus_a=400)
    circuits = tuple(
        Circuit(
            name=f"Circuit {k}",
            load_value=float(300 + (k * 337) % 2600),
            pf=0.8 + 0.2 * ((k * 7) % 10) / 10,
            profile=PROFILES[k % len(PROFILES)],
        ).at_slot(k)
        for k in range(1, 85)
    )
    return Schedule(panel=panel, circuits=circuits)


async def measure(path: Path, edits: int, view: str = "list") -> dict[str, float | list[float]]:
    from textual import events

    from tri.tui.app import TriApp
    from tri.tui.screens.main import MainScreen
    from tri.tui.widgets.results_panel import ResultsPanel

    out: dict[str, float | list[float]] = {}
    t0 = time.perf_counter()
    app = TriApp(path, journal=True, theme="textual-dark")
    async with app.run_test(size=(80, 24)) as pilot:
        while not isinstance(app.screen, MainScreen):
            await pilot.pause(0)
        await pilot.pause(0)
        out["first_frame_ms"] = (time.perf_counter() - t0) * 1000
        while not app.analysis_current:
            await pilot.pause(0)
        await pilot.pause(0)
        out["first_results_ms"] = (time.perf_counter() - t0) * 1000
        if view == "panel":
            await pilot.press("tab")
            await pilot.pause()
        results = app.screen.query_one(ResultsPanel)
        times: list[float] = []
        pilot_times: list[float] = []
        for k in range(edits):
            key = "x" if k % 2 == 0 else "u"
            # The key goes in as the terminal driver would deliver it; the clock
            # stops when the results panel has drawn the engine's new figures.
            before = app.generation
            t = time.perf_counter()
            event = events.Key(key, key)
            event.set_sender(app)
            app._driver.send_message(event)
            while not (
                app.generation > before and app.analysis_current and results.drawn is app.analysis
            ):
                await asyncio.sleep(0.0005)
            times.append((time.perf_counter() - t) * 1000)
            await pilot.pause()
        for k in range(edits):
            # The same through pilot.press, which also waits for the app to go idle.
            before = app.generation
            t = time.perf_counter()
            await pilot.press("x" if k % 2 == 0 else "u")
            while not (
                app.generation > before and app.analysis_current and results.drawn is app.analysis
            ):
                await pilot.pause(0)
            pilot_times.append((time.perf_counter() - t) * 1000)
        out["edit_ms"] = times
        out["pilot_edit_ms"] = pilot_times
    return out


async def edit_child(root: Path, edits: int) -> list[float]:
    """Milliseconds from a key in the first leaf panel to the top panel's new figures."""
    from textual import events

    from tri.tui.app import TriApp

    app = TriApp(root, journal=False, theme="textual-dark")
    async with app.run_test(size=(80, 24)) as pilot:
        while app.tree_result is None:
            await pilot.pause(0)
        leaf = len(app.building.sessions) - 1
        app.switch_panel(leaf)
        await pilot.pause()
        while not app.analysis_current:
            await pilot.pause(0)
        times = []
        for k in range(edits):
            key = "x" if k % 2 == 0 else "u"
            before = app.tree_result
            t = time.perf_counter()
            event = events.Key(key, key)
            event.set_sender(app)
            app._driver.send_message(event)
            while app.tree_result is before or not app.analysis_current:
                await asyncio.sleep(0.0005)
            times.append((time.perf_counter() - t) * 1000)
            await pilot.pause()
    return times


def write_campus(folder: Path) -> Path:
    """A top panel feeding 10 panels that feed 10 panels each (111 schedules)."""

    def panel(name: str, spaces: int, body: str) -> str:
        return (
            f'format = 1\n\n[panel]\nname = "{name}"\nsystem = "208Y/120"\n'
            f"spaces = {spaces}\nbus_a = 2000\n\n{body}"
        )

    def feeder(slot: int, child: str) -> str:
        return f'[[circuit]]\nslot = {slot}\nname = "Feeder {child}"\nfeeds = "{child}"\n\n'

    def load(slot: int, va: int) -> str:
        return f'[[circuit]]\nslot = {slot}\nname = "Load {slot}"\nload_va = {va}\n\n'

    top = ""
    for i in range(10):
        mid = ""
        for j in range(10):
            leaf = f"leaf_{i}_{j}.toml"
            body = "".join(load(s, 300 + 97 * ((i + j + s) % 13)) for s in range(1, 13))
            (folder / leaf).write_text(panel(f"Leaf {i}.{j}", 12, body))
            mid += feeder(1 + 6 * j, leaf)
        (folder / f"mid_{i}.toml").write_text(panel(f"Panel {i}", 60, mid))
        top += feeder(1 + 6 * i, f"mid_{i}.toml")
    (folder / "top.toml").write_text(panel("Campus", 60, top))
    return folder / "top.toml"


async def open_log(path: Path) -> float:
    """Milliseconds from d to the log view's picture of ``path``'s log."""
    from tri.tui.app import TriApp
    from tri.tui.screens.log_view import LogScreen

    app = TriApp(path, journal=False, theme="textual-dark")
    async with app.run_test(size=(80, 24)) as pilot:
        while not app.analysis_current:
            await pilot.pause(0)
        t = time.perf_counter()
        await pilot.press("d")
        screen = app.screen
        assert isinstance(screen, LogScreen)
        while screen.reading or screen.data is None:
            await pilot.pause(0.005)
        return (time.perf_counter() - t) * 1000


def log_cases(folder: Path, rows: int = 200_000) -> list[tuple[str, Path]]:
    """The demo garage, and a schedule over ``rows`` rows with a change of offset."""
    import numpy as np

    demo = Path(__file__).parents[1] / "tri" / "panels_demo" / "garage_logged_208.toml"
    k = np.arange(rows)
    utc = np.datetime64("2024-11-01T00:00") + k.astype("timedelta64[m]")
    later = k >= rows // 2
    local = utc - np.where(later, 6, 5).astype("timedelta64[h]")
    text = np.char.add(np.datetime_as_string(local, unit="m"), np.where(later, "-06:00", "-05:00"))
    amps = 20.0 + (k % 97) / 4.0
    lines = [f"{t},{a:.2f},{a * 0.8:.2f},{a * 0.6:.2f}" for t, a in zip(text, amps, strict=True)]
    (folder / "rows.csv").write_text("Time,IA,IB,IC\n" + "\n".join(lines) + "\n")
    (folder / "rows.toml").write_text(
        'format = 1\n\n[panel]\nname = "Logged"\nsystem = "208Y/120"\nspaces = 12\n'
        'bus_a = 100\n\n[log]\nfile = "rows.csv"\ntime = "Time"\n'
        'amps = { A = "IA", B = "IB", C = "IC" }\n\n[[circuit]]\nslot = 1\n'
        'name = "Lights"\nload_va = 1200\n'
    )
    return [
        ("garage week, 2016 rows", demo),
        (f"{rows:_} rows, offset changes".replace("_", " "), folder / "rows.toml"),
    ]


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="few repeats (CI)")
    args = parser.parse_args(argv)
    edits = 6 if args.quick else 40
    with tempfile.TemporaryDirectory() as tmp:
        os.environ["XDG_STATE_HOME"] = str(Path(tmp) / "state")
        path = Path(tmp) / "bench84.toml"
        schedule = panel_84()
        save_schedule(path, schedule)
        t = time.perf_counter()
        n_engine = 20 if args.quick else 200
        for _ in range(n_engine):
            analyse_schedule(schedule)
        engine_ms = (time.perf_counter() - t) * 1000 / n_engine
        result = asyncio.run(measure(path, edits))
        on_panel = asyncio.run(measure(path, edits, view="panel"))
    edit = result["edit_ms"]
    assert isinstance(edit, list)
    median = statistics.median(edit)
    print("tri terminal UI benchmark (pilot, 80x24, 84-circuit panel)")
    print(f"{'measure':<44}{'ms':>10}")
    print(f"{'start-up to first frame':<44}{result['first_frame_ms']:>10.1f}")
    print(f"{'start-up to first results':<44}{result['first_results_ms']:>10.1f}")
    print(f"{'engine alone, one analysis':<44}{engine_ms:>10.2f}")
    print(f"{'keystroke to updated results, median':<44}{median:>10.1f}")
    print(f"{'keystroke to updated results, worst':<44}{max(edit):>10.1f}")
    pilot = result["pilot_edit_ms"]
    assert isinstance(pilot, list)
    print(f"{'same, through pilot.press (waits for idle)':<44}{statistics.median(pilot):>10.1f}")
    panel_edit = on_panel["edit_ms"]
    assert isinstance(panel_edit, list)
    print(f"{'same on the panel view (Tab), median':<44}{statistics.median(panel_edit):>10.1f}")
    print(f"{'UI time over the engine alone (median ratio)':<44}{median / engine_ms:>9.1f}x")
    print(f"edits measured: {len(edit)}; target < 50 ms per edit")
    brewery = Path(__file__).parents[1] / "tri" / "panels_demo" / "brewery" / "mdp_480.toml"
    with tempfile.TemporaryDirectory() as tmp:
        os.environ["XDG_STATE_HOME"] = str(Path(tmp) / "state")
        campus = write_campus(Path(tmp))
        print(f"\n{'building: child edit to the top panel updated':<44}{'median ms':>10}")
        for name, root in (("brewery, 4 panels", brewery), ("campus, 111 panels", campus)):
            times = asyncio.run(edit_child(root, edits))
            print(f"{'  ' + name:<44}{statistics.median(times):>10.1f}")
        print(f"\n{'log view: key to picture':<44}{'ms':>10}")
        for name, path in log_cases(Path(tmp), 20_000 if args.quick else 200_000):
            runs = [asyncio.run(open_log(path)) for _ in range(1 if args.quick else 3)]
            print(f"{'  ' + name:<44}{statistics.median(runs):>10.1f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
