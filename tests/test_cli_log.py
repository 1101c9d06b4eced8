"""`tri report` / `tri check` with a [log] and use factors, run as a user would.

Figures asserted here follow from the definitions on data the test writes
([computed]); the worked demand case is the brief's: one-minute data at
150 A with 200 A for ten minutes -> 183.33 A sliding, 166.67 A in blocks that
split the peak.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from cli_support import Result, run_tri

from tri.engine.scenarios import ScenarioSet, scale_circuits
from tri.schedule.load import load_schedule
from tri.schedule.to_engine import analyse_schedule, circuit_arrays
from tri.schedule.to_scenarios import analyse_cases, scenario_set

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "tri" / "panels_demo" / "garage_logged_208.toml"

PANEL = """format = 1
[panel]
name = "Log test"
system = "208Y/120"
spaces = 12
bus_a = 225
main_a = 200

[log]
file = "log.csv"
time = "Timestamp"
amps = { A = "I1", B = "I2", C = "I3", N = "IN" }
{extra}

[[circuit]]
slot = 1
name = "Lights"
load_a = 20
use = { day = 1.0, night = 0.0 }

[[circuit]]
slot = 3
name = "Charger"
load_a = 30
use = { day = 0.0, night = 1.0 }

[[circuit]]
slot = 5
name = "Fridge"
load_a = 10
"""


def tri(*args: str, cwd: Path | None = None) -> Result:
    """``tri ARGS...`` in this process (the same code as the command, without start-up)."""
    return run_tri(*args, cwd=cwd)


def write_case(tmp_path: Path, extra: str = "", peak_start: int = 10) -> Path:
    """An hour of one-minute rows from 00:01 (end stamps: the grid starts at 00:00);
    phase B at 150 A with 200 A for minutes peak_start .. peak_start + 9."""
    rows = ["Timestamp,I1,I2,I3,IN"]
    for k in range(60):
        b = 200.0 if peak_start <= k < peak_start + 10 else 150.0
        rows.append(f"2024-03-01T00:{k + 1:02d}:00+00:00,150,{b},150,{b - 150}")
    rows[-1] = rows[-1].replace("00:60:00", "01:00:00")
    (tmp_path / "log.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    path = tmp_path / "panel.toml"
    path.write_text(PANEL.replace("{extra}", extra), encoding="utf-8")
    return path


@pytest.mark.parametrize(("window", "expected"), [("sliding", 2750 / 15), ("block", 2500 / 15)])
def test_report_json_demand_worked_case(tmp_path, window, expected):
    """[computed] Sliding: (10·200 + 5·150)/15 = 183.33 A; blocks 00:00, 00:15, ...
    split the peak (00:10-00:20) five and five: (5·200 + 10·150)/15 = 166.67 A.
    JSON keeps 9 significant digits: tolerance 1e-6 A."""
    path = write_case(tmp_path, f'demand_window = "{window}"')
    run = tri("report", str(path), "--format", "json")
    assert run.returncode == 0, run.stderr
    log = json.loads(run.stdout)["log"]
    b = log["demand"]["phases"]["B"]
    assert b["a"] == pytest.approx(expected, abs=1e-6)
    assert log["demand"]["window"] == window
    assert log["demand"]["phases"]["A"]["a"] == pytest.approx(150.0, abs=1e-6)
    # 1.25 × 183.33 (or 166.67) A on B against the 200 A main, no new circuits.
    assert log["capacity"]["total_a"]["B"] == pytest.approx(1.25 * expected, abs=1e-6)
    assert not log["capacity"]["is_basis"]  # an hour, not 30 days
    if window == "sliding":
        assert b["start"] == "2024-03-01 00:05+00:00"


def test_report_scenarios_worst_case(tmp_path):
    """[computed] Day: lights 20 A on A, fridge 10 A on C; night: charger 30 A on B
    and the fridge. The largest phase current is the charger's 30 A at night."""
    path = write_case(tmp_path)
    run = tri("report", str(path), "--format", "json")
    sc = json.loads(run.stdout)["scenarios"]
    names = [c["name"] for c in sc["cases"]]
    assert names == ["connected", "day", "night"]
    day, night = sc["cases"][1], sc["cases"][2]
    assert day["phases"]["A"]["rms_a"] == pytest.approx(20.0, abs=1e-6)
    assert day["phases"]["B"]["rms_a"] == pytest.approx(0.0, abs=1e-6)
    assert night["phases"]["B"]["rms_a"] == pytest.approx(30.0, abs=1e-6)
    # Deviation at night: 0, 30, 10 A -> mean 13.33, |30 − 13.33| / 13.33 = 125 %.
    assert night["max_deviation_pct"] == pytest.approx(125.0, abs=1e-6)
    assert sc["worst"]["max_deviation_pct"]["case"] == "night"


def test_check_worst_scenario_decides(tmp_path):
    """Connected 20/30/10 A deviates 50 % from the mean 20 A; night 125 %: the
    night decides, and `tri check` names it."""
    path = write_case(tmp_path)
    # The heaviest phase (30 A) is lightly loaded against the rating, where deviation is
    # not judged by default (tri check's light-load rule): judge it here at every load.
    run = tri("check", str(path), "--format", "json", "--light-load-pct", "0")
    assert run.returncode == 1
    checks = json.loads(run.stdout)["files"][0]["checks"]
    dev = next(c for c in checks if c["key"] == "deviation")
    assert dev["value_pct"] == pytest.approx(125.0, abs=1e-6)
    assert "worst case: night" in dev["where"]


def test_scenario_batch_axis_equals_one_at_a_time():
    """Invariant: the (S, n) batch of scaled circuits analysed at once gives each
    scenario's own figures (the leading axis the rebalancer can take)."""
    from tri.engine.analysis import analyse_batch
    from tri.schedule.to_engine import ratings, system_voltages

    schedule = load_schedule(DEMO).schedule
    scenarios = scenario_set(schedule)
    assert scenarios.names == ("day", "evening")
    batch = analyse_batch(
        scale_circuits(circuit_arrays(schedule), scenarios.factors),
        system_voltages(schedule),
        ratings(schedule),
    )
    cases = analyse_cases(schedule)
    for k, case in enumerate(cases[1:]):
        rms = [p.rms_a for p in case.analysis.phases]
        # Same arithmetic on the same numbers: identical to round-off (1e-9 A).
        assert batch.phase_rms_a[k] == pytest.approx(rms, abs=1e-9)
    ones = ScenarioSet(("all",), np.ones((1, len(schedule.circuits))))
    full = analyse_batch(
        scale_circuits(circuit_arrays(schedule), ones.factors),
        system_voltages(schedule),
        ratings(schedule),
    )
    connected = analyse_schedule(schedule)
    assert full.phase_rms_a[0] == pytest.approx([p.rms_a for p in connected.phases], abs=1e-9)


def test_scenario_findings_name_circuits_as_the_connected_case_does():
    """A breaker finding in a scenario names the circuit by slot and name, never by its
    row number (the engine is given the same labels in every case)."""
    from dataclasses import replace

    schedule = load_schedule(DEMO).schedule
    tiny = tuple(
        replace(c, breaker_a=0.5) if c.breaker_a is not None else c for c in schedule.circuits
    )
    for case in analyse_cases(replace(schedule, circuits=tiny)):
        over = [f.message for f in case.analysis.findings if "breaker" in f.message]
        assert over, case.name
        assert all(m.startswith('circuit "') and " in slot" in m for m in over), case.name


def test_markdown_writes_pictures_beside_it(tmp_path):
    path = write_case(tmp_path)
    out = tmp_path / "report.md"
    run = tri("report", str(path), "--format", "markdown", "--output", str(out))
    assert run.returncode == 0, run.stderr
    text = out.read_text(encoding="utf-8")
    assert "## Loads over time" in text and "## Scenarios" in text
    for name in ("report-current.svg", "report-duration.svg"):
        svg = (tmp_path / name).read_text(encoding="utf-8")
        assert svg.startswith("<svg") and "</svg>" in svg
        assert f"]({name})" in text


def test_demo_report_runs():
    run = tri("report", str(DEMO))
    assert run.returncode == 0, run.stderr
    assert "NOT a basis" in run.stdout and "Phase shares" in run.stdout


@pytest.mark.parametrize(
    ("change", "words"),
    [
        ('file = "missing.csv"', "log file not found"),
        ('amps = { L1 = "I1", L2 = "I2", L3 = "I3" }', "is not a phase of this panel"),
        ('amps = { A = "IA", B = "I2", C = "I3" }', "no column 'IA'"),
        ('demand_window = "rolling"', '"sliding" or "block"'),
        ('timezone = "Mars/Olympus"', "time-zone name"),
    ],
)
def test_bad_log_settings_exit_2(tmp_path, change, words):
    """Bad [log] settings and logs: a located message, exit 2, no traceback."""
    path = write_case(tmp_path)
    text = path.read_text(encoding="utf-8")
    key = change.split(" = ")[0]
    lines = [ln for ln in text.splitlines() if not ln.startswith(f"{key} = ")]
    at = lines.index("[log]") + 1
    lines.insert(at, change)
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    for command in ("report", "check"):
        run = tri(command, str(path))
        assert run.returncode == 2, (command, run.stdout, run.stderr)
        assert words in run.stderr and "Traceback" not in run.stderr


def test_non_numeric_cell_exit_2_names_the_row(tmp_path):
    path = write_case(tmp_path)
    log = tmp_path / "log.csv"
    lines = log.read_text(encoding="utf-8").splitlines()
    lines[6] = lines[6].replace(",150,", ",n/a,", 1)
    log.write_text("\n".join(lines) + "\n", encoding="utf-8")
    run = tri("report", str(path))
    assert run.returncode == 2
    assert "log.csv:7" in run.stderr and "'n/a'" in run.stderr


def test_no_pandas_without_a_log():
    """Schedules without [log] never import pandas (start-up stays fast)."""
    bakery = str(ROOT / "tri" / "panels_demo" / "bakery_208.toml")
    code = (
        "import sys; from tri.cli import main; "
        f"main(['report', {bakery!r}, '--format', 'json']); "
        "sys.stderr.write('pandas' in sys.modules and 'LOADED' or 'absent')"
    )
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=False)
    assert run.stderr.endswith("absent")
