"""Benchmark of the terminal UI, measured with Textual's pilot (printed, not asserted).

1. Start-up: from creating the app to the main view's first frame, and to the
   first results from the engine on screen.
2. Keystroke to updated results on an 84-circuit panel: press a key that edits
   the schedule (x deletes the circuit under the cursor, u undoes it), then wait
   until the engine's new figures are drawn, in the list and in the panel view
   (Tab). Target: under 50 ms per edit.

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
    return 0


if __name__ == "__main__":
    sys.exit(main())
