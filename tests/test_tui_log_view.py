"""Pilot tests of the log view and the scenario choice, pressing real keys at 80×24.

The figures on screen are checked against ``tri report``'s own data for the
same file (:func:`tri.cli.report.build_all`): the UI must show the report's
figures, never figures of its own. A long read is cancelled with Esc; a
log that cannot be read gives the located problem.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import numpy as np
import pytest
from tui_support import settle

from tri.cli.report import build_all
from tri.engine.log_analysis import analyse_log
from tri.tui.app import TriApp
from tri.tui.log_plot import column_range
from tri.tui.screens.choice import ChoiceScreen
from tri.tui.screens.log_view import LogScreen
from tri.tui.screens.main import MainScreen
from tri.tui.widgets.results_panel import ResultsPanel

DEMOS = Path(__file__).parents[1] / "tri" / "panels_demo"
SCHEDULE_WITH_LOG = """\
format = 1

[panel]
name = "Logged test panel"
system = "208Y/120"
spaces = 12
bus_a = 100

[log]
file = "{file}"
time = "Time"
amps = {{ A = "IA", B = "IB", C = "IC" }}

[[circuit]]
slot = 1
name = "Lights"
load_va = 1200
"""


@pytest.fixture
def garage(tmp_path: Path) -> Path:
    """The logged garage demo (schedule and its week of 5-minute data) in a folder of its own."""
    for name in ("garage_logged_208.toml", "garage_logged_week.csv"):
        shutil.copy(DEMOS / name, tmp_path / name)
    return tmp_path / "garage_logged_208.toml"


def write_minute_log(path: Path, rows: int) -> None:
    """``rows`` one-minute rows of three phase currents (a fixed pattern, no zone)."""
    minutes = np.arange(1, rows + 1)
    times = np.datetime64("2024-01-01T00:00") + minutes.astype("timedelta64[m]")
    text = np.datetime_as_string(times, unit="m")
    amps = 20.0 + (minutes % 97) / 4.0
    lines = [f"{t},{a:.2f},{a * 0.8:.2f},{a * 0.6:.2f}" for t, a in zip(text, amps, strict=True)]
    path.write_text("Time,IA,IB,IC\n" + "\n".join(lines) + "\n", encoding="utf-8")


def write_offset_log(path: Path, rows: int) -> None:
    """``rows`` one-minute rows whose UTC offset changes halfway (a clock going back an hour).

    Times with offsets that change within a log are the slow case of the
    reader (pandas makes Python objects of them), the one a big log is read
    in a child process for.
    """
    k = np.arange(rows)
    utc = np.datetime64("2024-11-01T00:00") + k.astype("timedelta64[m]")
    later = k >= rows // 2
    local = utc - np.where(later, 6, 5).astype("timedelta64[h]")
    text = np.char.add(np.datetime_as_string(local, unit="m"), np.where(later, "-06:00", "-05:00"))
    amps = 20.0 + (k % 97) / 4.0
    lines = [f"{t},{a:.2f},{a * 0.8:.2f},{a * 0.6:.2f}" for t, a in zip(text, amps, strict=True)]
    path.write_text("Time,IA,IB,IC\n" + "\n".join(lines) + "\n", encoding="utf-8")


async def open_log(pilot) -> LogScreen:
    await settle(pilot)
    await pilot.press("d")
    await settle(pilot)
    screen = pilot.app.screen
    assert isinstance(screen, LogScreen)
    return screen


async def test_log_view_shows_the_reports_figures(garage: Path) -> None:
    report = build_all(str(garage), iterate=False)[0]
    app = TriApp(garage, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_log(pilot)
        assert screen.data is not None
        # The same functions as tri report: every figure of the log section is equal.
        assert screen.data["log"] == report["log"]
        assert screen.data["scenarios"] == report["scenarios"]
        summary = str(screen.query_one("#log-summary").render())
        demand_a = report["log"]["demand"]["phases"]["A"]["a"]
        assert f"A {demand_a:.1f} A" in summary
        assert "NOT a basis" in summary, "a week is not the 30 days NEC 220.87 asks for"
        assert report["log"]["capacity"]["not_basis_reasons"][0] in summary.replace("\n", " ")
        title = str(screen.query_one("#log-title").render())
        assert "garage_logged_week.csv" in title and "2016 rows" in title


async def test_zoom_scroll_peak_and_channels(garage: Path) -> None:
    app = TriApp(garage, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_log(pilot)
        whole = screen.window
        assert (whole.start, whole.stop) == (0, 2016)
        await pilot.press("plus")
        assert screen.window.length == whole.length // 2
        await pilot.press("pagedown")
        assert screen.window.start >= whole.length // 2 - 1
        await pilot.press("minus", "minus")
        assert screen.window.length == whole.length
        # p: the cursor goes to phase A's demand peak, the readout names it.
        await pilot.press("plus", "plus", "plus", "p")
        peak = screen.figures.phases[0].start_index
        first, last = column_range(screen.window, screen._plot_cols(), screen.cursor)
        assert first <= peak < last
        readout = str(screen.query_one("#log-readout").render())
        assert f"peak A {screen.figures.phases[0].value_a:.1f} A" in readout
        # ← moves the cursor back one column; the readout gives that column's time.
        before = screen.cursor
        await pilot.press("left")
        assert screen.cursor == before - 1 or screen.window.start < first
        # 1 hides phase A (its legend says so); pressing it again shows it.
        await pilot.press("1")
        assert screen.shown[0] is False
        assert "A (hidden)" in str(screen.query_one("#log-readout").render())
        await pilot.press("1", "0")
        assert screen.shown[0] is True and screen.window.length == whole.length


async def test_duration_view_reads_hours_above(garage: Path) -> None:
    report = build_all(str(garage), iterate=False)[0]
    duration = report["log"]["duration"]
    app = TriApp(garage, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_log(pilot)
        await pilot.press("tab")
        assert screen.view == "duration"
        await pilot.press("up", "up")
        k = len(duration["levels_a"]) // 2 + 2
        readout = str(screen.query_one("#log-readout").render())
        assert f"above {duration['levels_a'][k]:.1f} A:" in readout
        assert f"A {duration['hours_above']['A'][k]:.1f} h" in readout
        await pilot.press("tab")
        assert screen.view == "figures"
        body = str(screen.query_one("#log-figures-body").render())
        assert "CAPACITY FOR ADDED LOAD" in body and "NOT a basis" in body
        await pilot.press("escape")
        assert isinstance(app.screen, MainScreen)


async def test_a_long_read_is_cancelled_with_escape(tmp_path: Path, monkeypatch) -> None:
    # The file layer's own reader, in small chunks, each step slowed down so that
    # the read certainly outlasts the key presses (a million-row log takes seconds).
    import time

    import tri.schedule.log_file as log_file

    real = log_file.read_log
    slowed = [True]  # the first read only: the one that is cancelled

    def slow(spec, base, progress):
        def step(fraction, what):
            if slowed[0]:
                time.sleep(0.05)
            progress(fraction, what)

        return real(spec, base, progress=step)

    monkeypatch.setattr(log_file, "CHUNK_ROWS", 5_000)
    monkeypatch.setattr(log_file, "read_log", slow)
    write_minute_log(tmp_path / "long.csv", 100_000)
    schedule = tmp_path / "logged.toml"
    schedule.write_text(SCHEDULE_WITH_LOG.format(file="long.csv"), encoding="utf-8")
    app = TriApp(schedule, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("d")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, LogScreen) and screen.reading
        await pilot.press("escape")
        assert not screen.reading
        assert "Cancelled" in str(screen.query_one("#log-readout").render())
        await settle(pilot)  # the reading thread stops at its next step
        assert screen.logged is None and app.log_cache == {}
        assert isinstance(app.screen, LogScreen), "Esc while reading cancels; it does not leave"
        slowed[0] = False
        await pilot.press("r")
        await settle(pilot)
        assert screen.logged is not None and screen.logged.rows == 100_000
        # One row a minute, none missing [computed]: 100 000 one-minute intervals.
        assert screen.figures.n_intervals == 100_000


async def test_a_big_log_is_read_in_a_child_process_and_cancelled_at_once(
    tmp_path: Path, monkeypatch
) -> None:
    import multiprocessing

    import tri.tui.log_reader as log_reader

    monkeypatch.setattr(log_reader, "PROCESS_ABOVE_BYTES", 1_000)  # this file is "big"
    write_offset_log(tmp_path / "big.csv", 200_000)
    schedule = tmp_path / "logged.toml"
    schedule.write_text(SCHEDULE_WITH_LOG.format(file="big.csv"), encoding="utf-8")
    app = TriApp(schedule, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("d")
        await pilot.pause(0.3)  # the child is starting or reading (it takes seconds)
        screen = app.screen
        assert isinstance(screen, LogScreen) and screen.reading
        await pilot.press("escape")
        assert not screen.reading
        await settle(pilot)
        assert multiprocessing.active_children() == [], "cancelling ends the child at once"
        assert screen.logged is None
        # Read it to the end: the figures come back through the pipe unchanged.
        await pilot.press("r")
        await settle(pilot)
        assert screen.logged is not None and screen.logged.rows == 200_000
        assert screen.figures.n_intervals == 200_000  # one-minute rows, none missing [computed]
        assert "UTC-05:00" in screen.data["log"]["zone"]


async def test_the_child_process_gives_the_reports_figures(garage: Path, monkeypatch) -> None:
    import tri.tui.log_reader as log_reader

    monkeypatch.setattr(log_reader, "PROCESS_ABOVE_BYTES", 0)
    report = build_all(str(garage), iterate=False)[0]
    app = TriApp(garage, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_log(pilot)
        assert screen.data["log"] == report["log"]


async def test_a_log_that_cannot_be_read_says_where(tmp_path: Path) -> None:
    schedule = tmp_path / "logged.toml"
    schedule.write_text(SCHEDULE_WITH_LOG.format(file="missing.csv"), encoding="utf-8")
    app = TriApp(schedule, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_log(pilot)
        assert screen.logged is None
        assert any("missing.csv" in p and "log file not found" in p for p in screen.problems)
        assert "cannot be read" in str(screen.query_one("#log-readout").render())


async def test_cache_reads_the_log_once(garage: Path, monkeypatch) -> None:
    calls = []
    import tri.schedule.log_file as log_file

    real = log_file.read_log

    def counting(*args, **kwargs):
        calls.append(1)
        return real(*args, **kwargs)

    monkeypatch.setattr(log_file, "read_log", counting)
    app = TriApp(garage, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await open_log(pilot)
        await pilot.press("escape")
        await open_log(pilot)
    assert len(calls) == 1


async def test_no_log_key_without_a_log_table() -> None:
    app = TriApp(DEMOS / "bakery_208.toml", journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("d")
        await settle(pilot)
        assert isinstance(app.screen, MainScreen)


async def test_choosing_a_scenario_changes_the_figures_not_the_checks(garage: Path) -> None:
    app = TriApp(garage, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        checks = list(app.checks)
        assert [c.name for c in app.cases] == ["connected", "day", "evening"]
        await pilot.press("n")
        await settle(pilot)
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("2")
        await settle(pilot)
        evening = app.cases[2].analysis
        assert app.analysis is evening
        assert app.screen.query_one(ResultsPanel).analysis is evening
        assert "scenario evening" in app.screen.query_one(ResultsPanel).border_title
        assert list(app.checks) == checks, "tri check judges every case whichever is shown"
        # An edit keeps the chosen case: the new figures are the evening's again.
        await pilot.press("x")
        await settle(pilot)
        assert app.case_name == "evening" and app.analysis is app.cases[2].analysis


async def test_checks_are_tri_checks_worst_case(garage: Path) -> None:
    from tri.cli.check import _check_one

    app = TriApp(garage, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        ui = [(r.key, r.status, r.value) for r in app.checks]
    cli = _check_one(str(garage), {}, False, None, 20.0)[0]["results"]
    assert ui == [(r.key, r.status, r.value) for r in cli]


def test_log_analysis_is_the_reports(garage: Path) -> None:
    # The engine's figures of the demo log, straight: the view reads the same ones.
    from tri.schedule.load import load_schedule
    from tri.schedule.log_file import read_log

    spec = load_schedule(garage).schedule.log
    log = read_log(spec, garage.parent)
    figures = analyse_log(log.arrays, demand_minutes=15.0)
    report = build_all(str(garage), iterate=False)[0]
    assert report["log"]["demand"]["phases"]["A"]["a"] == pytest.approx(figures.phases[0].value_a)
