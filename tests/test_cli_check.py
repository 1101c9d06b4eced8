"""``tri check``: exit codes 0/1/2, each limit made to fail in turn, the issue-9 panels.

The machine-shop demo passes every default limit (deviation 6.27 %, VUF 0.12 %
computed and 0.68 % measured, neutral 9.17 %, calculated load 86.49 %, RMS
current 73.64 %, largest breaker 90.21 %), so lowering one limit at a time
below its figure makes exactly that limit fail. Those figures are the
engine's own, as in tests/golden/machine_shop_480.json (regression values;
only which side of each limit they fall on matters here) except where a
test recomputes them. Phase A's current, 294.56 A / 400 A = 73.64 %, is
hand-worked in test_report_hand.py. Default limits and their sources:
tri/engine/limits.py and tri/report/check_report.py.

Most cases run ``tri.cli.main`` in this process (the same code path as the
command, without the start-up cost); a few run ``python -m tri`` in a
subprocess, as scripts and CI would.
"""

from __future__ import annotations

import io
import json
import math
import os
import subprocess
import sys
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path
from typing import Any

import pytest
import tomlkit

from tri.cli import main
from tri.cli.report import build_data
from tri.report.check_report import LIMITS, NOT_CHECKED, evaluate

ROOT = Path(__file__).parents[1]
DEMO = ROOT / "tri" / "panels_demo"
SHOP = str(DEMO / "machine_shop_480.toml")
BAKERY = str(DEMO / "bakery_208.toml")
GARAGE = str(DEMO / "garage_ev_208.toml")
STUDIO = str(DEMO / "studio_400_rail.toml")
SQRT3 = math.sqrt(3)


class Run:
    """Exit status and the two streams of one run."""

    def __init__(self, returncode: int, stdout: str, stderr: str) -> None:
        self.returncode, self.stdout, self.stderr = returncode, stdout, stderr


def tri(*args: str) -> Run:
    """``tri ARGS`` in this process (stdout with a byte buffer, as a terminal has)."""
    raw = io.BytesIO()
    out = io.TextIOWrapper(raw, encoding="utf-8", newline="")
    err = io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = main(list(args))
        out.flush()
    return Run(code, raw.getvalue().decode("utf-8"), err.getvalue())


def tri_process(*args: str) -> subprocess.CompletedProcess[str]:
    env = {k: v for k, v in os.environ.items() if k not in ("NO_COLOR", "FORCE_COLOR")}
    env["PYTHONIOENCODING"] = "utf-8"
    return subprocess.run(
        [sys.executable, "-m", "tri", *args],
        capture_output=True,
        text=True,
        encoding="utf-8",
        timeout=120,
        env=env,
    )


def statuses(doc: dict[str, Any], file_index: int = 0) -> dict[str, list[str]]:
    out: dict[str, list[str]] = {}
    for c in doc["files"][file_index]["checks"]:
        out.setdefault(c["key"], []).append(c["status"])
    return out


SHOP_PASSES = {
    "deviation": ["pass"],
    "vuf": ["pass", "pass"],
    "neutral": ["pass"],
    "loading": ["pass"],
    "current": ["pass"],
    "breakers": ["pass"],
    "phase-kva": ["skipped"],
}


def write_panel(tmp_path: Path, name: str, body: str, system: str = "208Y/120") -> str:
    f = tmp_path / f"{name}.toml"
    f.write_text(f'format = 1\n[panel]\nname = "{name}"\nsystem = "{system}"\n{body}', "utf-8")
    return str(f)


def test_defaults_and_their_sources_are_printed_end_to_end() -> None:
    r = tri_process("check", SHOP)
    assert r.returncode == 0, r.stdout + r.stderr
    assert "PASS, all 7 checks within limits" in r.stdout
    flat = " ".join(r.stdout.split())
    for words in (
        "common practice",  # deviation 10 %, neutral 100 %
        "EN 50160",  # VUF 2 % (published)
        "IEC 61000-2-2",  # VUF 2 % (from memory)
        "NEC 215.2(A)(1) and 215.3",  # the sizing rule (published, secondary)
        "NEC 210.20(A)",  # breakers (published, secondary)
        "weekly statistic",  # EN 50160's 2 % in context
        "Not checked:",
        "de-energise",
    ):
        assert words in flat, words
    for x in LIMITS:
        assert f"{x.key} {x.default_text} ({x.option})" in flat


@pytest.mark.parametrize(
    ("option", "value", "failing"),
    [
        ("--max-deviation", "5", {"deviation": ["fail"]}),  # 6.27 % > 5 %
        ("--max-vuf", "0.5", {"vuf": ["pass", "fail"]}),  # computed 0.12 % ok, measured 0.68 %
        ("--max-vuf", "0.1", {"vuf": ["fail", "fail"]}),  # both above 0.1 %
        ("--max-neutral-pct", "5", {"neutral": ["fail"]}),  # 9.17 % > 5 %
        ("--max-loading-pct", "80", {"loading": ["fail"]}),  # 86.49 % > 80 %
        ("--max-current-pct", "70", {"current": ["fail"]}),  # 73.64 % > 70 %
        ("--max-breaker-pct", "90", {"breakers": ["fail"]}),  # 90.21 % > 90 %
        ("--max-phase-kva", "4.6", {"phase-kva": ["fail"]}),  # 8.12 kVA > 4.6 kVA
    ],
)
def test_each_limit_fails_in_turn(option: str, value: str, failing: dict[str, list[str]]) -> None:
    r = tri("check", SHOP, option, value, "--format", "json")
    assert r.returncode == 1, r.stderr
    doc = json.loads(r.stdout)
    assert doc["status"] == "fail" and doc["exit_code"] == 1
    assert statuses(doc) == {**SHOP_PASSES, **failing}
    key = next(iter(failing))
    changed = [c for c in doc["files"][0]["checks"] if c["key"] == key]
    assert all(not c["default"] and f"set by {option}" in c["source"] for c in changed)
    assert doc["not_checked"] == NOT_CHECKED


def test_shop_figures_recomputed() -> None:
    """The shop's calculated load and kVA gap from the report's own per-circuit figures
    (each hand-checked in test_report_hand.py): Σ phase VA on A with continuous circuits
    ×1.25, over 277 V; phases' VA max − min. 1e-8 relative: a sum of 17 figures, each
    rounded to the report's 9 significant digits."""
    data = build_data(SHOP, iterate=False)
    a = sum(c["phase_va"]["A"] * (1.25 if c["continuous"] else 1) for c in data["circuits"])
    assert data["phases"]["A"]["calculated_a"] == pytest.approx(a / 277, rel=1e-8)
    assert 100 * a / 277 / 400 == pytest.approx(86.49, abs=5e-3)
    va = [p["va"] for p in data["phases"].values()]
    (gap,) = [r for r in evaluate(data, {"phase-kva": 4.6}) if r.key == "phase-kva"]
    assert gap.value == pytest.approx((max(va) - min(va)) / 1000, rel=1e-12)
    assert gap.value == pytest.approx(8.12, abs=5e-3) and gap.status == "fail"


def test_text_names_the_failed_limit() -> None:
    r = tri("check", SHOP, "--max-current-pct", "70")
    assert r.returncode == 1
    assert "FAIL, 1 of 7 checks over the limit" in r.stdout
    (line,) = [x for x in r.stdout.splitlines() if x.startswith("  FAIL")]
    # 73.64 %: phase A, 294.56 A RMS / 400 A main (hand-worked in test_report_hand.py)
    assert "current" in line and "73.64 % >  70 %" in line and "phase A" in line
    assert "set by --max-current-pct" in r.stdout


def test_bakery_fails_the_sizing_rule_and_passes_when_allowed() -> None:
    """[computed] Bakery phase A: 21329.4 VA scheduled, 11959.4 VA of it continuous
    (from the report's per-circuit shares): (21329.4 + 0.25·11959.4)/120 = 202.66 A,
    101.33 % of the 200 A main (NEC 215.3, 230.42(A)(1) [published, secondary]).
    Its RMS current, 169.83 A = 84.91 % (test_report_hand.py), is within the main."""
    data = build_data(BAKERY, iterate=False)
    va = sum(c["phase_va"]["A"] for c in data["circuits"])
    cont = sum(c["phase_va"]["A"] for c in data["circuits"] if c["continuous"])
    assert va == pytest.approx(21329.4, abs=0.05) and cont == pytest.approx(11959.4, abs=0.05)
    assert data["phases"]["A"]["calculated_pct"] == pytest.approx(
        100 * (va + 0.25 * cont) / 120 / 200,
        rel=1e-8,  # sums of 9-digit figures
    )
    r = tri("check", BAKERY, "--format", "json")
    assert r.returncode == 1
    got = statuses(json.loads(r.stdout))
    assert got["loading"] == ["fail"] and got["current"] == ["pass"]
    assert tri("check", BAKERY, "--max-loading-pct", "102").returncode == 0


class TestIssuePanels:
    """The three worked panels of issue 9, as a user would write them."""

    def test_125_percent_rule_passes_and_the_breaker_fails(self, tmp_path: Path) -> None:
        """200 A main: 3-pole 170 A noncontinuous + 18 A continuous on a 20 A breaker.
        [computed] 170 + 1.25·18 = 192.5 A = 96.25 % of 200 A: the sizing rule passes;
        1.25·18 = 22.5 A = 112.5 % of 20 A: the breaker check fails, naming slot 7."""
        f = write_panel(
            tmp_path,
            "Shop A",
            "spaces = 12\nbus_a = 225\nmain_a = 200\n"
            '[[circuit]]\nslot = 1\npoles = 3\nname = "Kiln"\nload_a = 170\nbreaker_a = 200\n'
            '[[circuit]]\nslot = 7\nname = "Sign lighting"\nload_a = 18\ncontinuous = true\n'
            "breaker_a = 20\n",
        )
        r = tri("check", f, "--format", "json")
        assert r.returncode == 1
        # figures compared to 1e-9 relative: the report keeps 9 significant digits
        checks = {c["key"]: c for c in json.loads(r.stdout)["files"][0]["checks"]}
        assert checks["loading"]["status"] == "pass"
        assert checks["loading"]["value"] == pytest.approx(100 * 192.5 / 200, rel=1e-9)
        assert checks["breakers"]["status"] == "fail"
        assert checks["breakers"]["value"] == pytest.approx(112.5, rel=1e-9)
        assert "slot 7 'Sign lighting'" in checks["breakers"]["where"]
        assert "210.20(A)" in checks["breakers"]["source"]
        # phase A physically carries 170 + 18 = 188 A = 94 %: within the main
        assert checks["current"]["status"] == "pass"
        assert checks["current"]["value"] == pytest.approx(94.0, rel=1e-9)
        # a 100 %-rated assembly: the continuous factor is a setting
        assert tri("check", f, "--continuous-factor", "1").returncode == 0
        report = tri("report", f)
        flat = " ".join(report.stdout.split())
        assert 'circuit "Sign lighting" in slot 7: 22.5 A over its 20 A breaker' in flat

    def test_light_load_is_not_judged(self, tmp_path: Path) -> None:
        """400 A main, 30/25/25 A: deviation 12.5 % [computed: 3.33/26.67], heaviest
        phase 7.5 % of the rating, below the 20 % light-load threshold: skipped, exit 0.
        With --light-load-pct 5 it is judged and fails."""
        body = "spaces = 12\nbus_a = 400\nmain_a = 400\n" + "".join(
            f'[[circuit]]\nslot = {s}\nname = "Load {s}"\nload_a = {a}\n'
            for s, a in ((1, 30), (3, 25), (5, 25))
        )
        f = write_panel(tmp_path, "Light", body)
        r = tri("check", f, "--format", "json")
        assert r.returncode == 0, r.stdout
        (dev,) = [c for c in json.loads(r.stdout)["files"][0]["checks"] if c["key"] == "deviation"]
        assert dev["status"] == "skipped" and "lightly loaded" in dev["where"]
        assert "7.5 %" in dev["where"] and "12.5 %" in dev["where"]
        assert tri("check", f, "--light-load-pct", "5").returncode == 1

    def test_three_wire_drive_gives_no_current_carrying_neutral_advice(self, tmp_path: Path):
        """A 3-pole six-pulse drive (vfd profile) at 86 % of the load and three equal
        linear 1-pole loads: neutral 0 A [computed: balanced]; no 310.15(E) advice."""
        body = (
            "spaces = 12\nbus_a = 100\n"
            '[[circuit]]\nslot = 1\npoles = 3\nname = "Drive"\nload_va = 8600\nprofile = "vfd"\n'
        ) + "".join(
            f'[[circuit]]\nslot = {s}\nname = "Lights {s}"\nload_va = {1400 / 3}\n'
            for s in (2, 4, 6)
        )
        data = build_data(write_panel(tmp_path, "Drive", body), iterate=False)
        assert data["nonlinear_share_pct"] == pytest.approx(86.0, rel=1e-9)
        assert data["neutral"]["rms_a"] == pytest.approx(0.0, abs=1e-6)
        messages = " ".join(f["message"] for f in data["findings"])
        assert "count the neutral as a current-carrying" not in messages


def test_vuf_skipped_without_supply_or_line_voltages(tmp_path: Path) -> None:
    doc = tomlkit.parse(Path(GARAGE).read_text("utf-8"))
    del doc["readings"]
    bare = tmp_path / "garage_no_readings.toml"
    bare.write_text(tomlkit.dumps(doc), "utf-8")
    r = tri(
        "check",
        str(bare),
        "--max-loading-pct",
        "200",
        "--max-current-pct",
        "200",
        "--max-deviation",
        "60",
    )
    assert r.returncode == 0, r.stdout
    skipped = [x for x in r.stdout.splitlines() if x.startswith("  SKIPPED")]
    assert any("vuf" in x and "not checked" in x for x in skipped)
    assert "no [supply] table and no measured line voltages" in " ".join(r.stdout.split())


def test_measured_vuf_is_checked_without_a_supply() -> None:
    # The garage has no [supply] but measured 201.9 / 205.6 / 204.1 V: VUF 1.0532 %
    # [computed: the IEC 61000-4-30 β formula on the three magnitudes, recomputed here
    # in its textbook form; 1e-8 relative: the report rounds to 9 significant digits].
    r = tri("check", GARAGE, "--format", "json", "--max-vuf", "1")
    doc = json.loads(r.stdout)
    (vuf,) = [c for c in doc["files"][0]["checks"] if c["key"] == "vuf"]
    assert vuf["status"] == "fail" and "measured" in vuf["where"]
    u = [
        float(x)
        for x in tomlkit.parse(Path(GARAGE).read_text("utf-8"))["readings"]["volts_ll"].values()
    ]
    beta = sum(x**4 for x in u) / sum(x**2 for x in u) ** 2
    root = (3 - 6 * beta) ** 0.5
    assert vuf["value_pct"] == pytest.approx(100 * ((1 - root) / (1 + root)) ** 0.5, rel=1e-8)
    assert vuf["value_pct"] == pytest.approx(1.0532, abs=5e-5)  # half a unit of the 4th decimal


def test_several_files_exit_1_if_any_fails_and_2_if_any_cannot_be_read() -> None:
    assert tri("check", SHOP, SHOP).returncode == 0
    r = tri("check", SHOP, BAKERY, "--format", "json")
    assert r.returncode == 1
    doc = json.loads(r.stdout)
    assert [f["status"] for f in doc["files"]] == ["pass", "fail"]
    r = tri_process("check", BAKERY, "missing.toml", SHOP, "--format", "json")
    assert r.returncode == 2
    doc = json.loads(r.stdout)  # still parseable: the error is on stderr and in the entry
    assert [f["status"] for f in doc["files"]] == ["fail", "error", "pass"]
    assert "no such file" in doc["files"][1]["error"]
    assert "no such file" in r.stderr and "Traceback" not in r.stderr
    r = tri("check", "missing.toml", SHOP)
    assert r.returncode == 2
    assert "ERROR, not checked" in r.stdout and "PASS, all 7 checks" in r.stdout


@pytest.mark.parametrize(
    "args",
    [
        ["check"],
        ["check", SHOP, "--max-vuf", "-1"],
        ["check", SHOP, "--max-deviation", "nan"],
        ["check", SHOP, "--max-loading-pct", "lots"],
        ["check", SHOP, "--max-phase-kva", "-4.6"],
        ["check", SHOP, "--light-load-pct", "120"],
        ["check", SHOP, "--continuous-factor", "0.8"],
        ["check", str(ROOT / "tests" / "data" / "bad" / "syntax_error.toml")],
    ],
)
def test_bad_input_exits_2(args: list[str]) -> None:
    r = tri(*args)
    assert r.returncode == 2, r.stdout
    assert "Traceback" not in r.stderr


def test_three_wire_panel_skips_neutral_and_breakers(tmp_path: Path) -> None:
    f = write_panel(
        tmp_path,
        "Pump room",
        'spaces = 12\nbus_a = 100\n[[circuit]]\nslot = 1\npoles = 3\nname = "Pump"\n'
        "load_a = 20\npf = 0.85\n",
        system="480D",
    )
    r = tri("check", f, "--format", "json")
    assert r.returncode == 0, r.stdout + r.stderr
    assert statuses(json.loads(r.stdout)) == {
        "deviation": ["pass"],
        "vuf": ["skipped"],
        "neutral": ["skipped"],
        "loading": ["pass"],
        "current": ["pass"],
        "breakers": ["skipped"],
        "phase-kva": ["skipped"],
    }


def test_a_value_equal_to_the_limit_passes() -> None:
    data = build_data(STUDIO, iterate=False)
    rated = [c for c in data["circuits"] if c["breaker_a"] is not None]
    va = [p["va"] for p in data["phases"].values()]
    exact = {
        "deviation": data["current_unbalance"]["max_deviation_pct"],
        "neutral": data["neutral"]["loading_pct"],
        "loading": max(p["calculated_pct"] for p in data["phases"].values()),
        "current": max(p["loading_pct"] for p in data["phases"].values()),
        "breakers": max(100 * c["calculated_a"] / c["breaker_a"] for c in rated),
        "vuf": max(data["voltage"]["vuf_pct"], data["readings"]["vuf_pct"]),
        "phase-kva": (max(va) - min(va)) / 1000,
    }
    results = evaluate(data, exact)
    assert all(r.status == "pass" for r in results), results
    nudged = {k: v * (1 - 1e-9) for k, v in exact.items()}
    assert {r.key for r in evaluate(data, nudged) if r.status == "fail"} == set(exact)


def test_partial_line_voltages_are_reported_as_not_checked() -> None:
    data = build_data(GARAGE, iterate=False)
    first = next(iter(data["readings"]["volts_ll"]))
    data["readings"]["volts_ll"][first] = None
    data["readings"]["vuf_pct"] = None
    (vuf,) = [r for r in evaluate(data) if r.key == "vuf"]
    assert vuf.status == "skipped" and "only some line voltages" in vuf.where


def test_iec_practice_panel_uses_no_continuous_factor() -> None:
    """The 50 Hz studio: IEC practice, factor 1 (IEC 60364-4-43 [from memory]); the
    calculated load is the scheduled VA over 230 V, so it is above the 125 % figure
    only by what the factor adds. [computed] L1 from the report's shares."""
    data = build_data(STUDIO, iterate=False)
    assert data["basis"]["practice"] == "IEC" and data["basis"]["continuous_factor"] == 1.0
    l1 = sum(c["phase_va"]["L1"] for c in data["circuits"]) / 230
    # 1e-8: a sum of figures each rounded to the report's 9 significant digits
    assert data["phases"]["L1"]["calculated_a"] == pytest.approx(l1, rel=1e-8)
    (row,) = [r for r in evaluate(data) if r.key == "loading"]
    assert "scheduled" in row.where
