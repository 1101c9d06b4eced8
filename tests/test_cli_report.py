"""``tri report``: goldens and colour through the real command (``python -m tri``), options
and errors in-process (:func:`cli_support.run_tri`, the same ``main``).

The golden files are shared with tests/test_report_golden.py (regenerate
them there with TRI_UPDATE_GOLDEN=1); here the command's standard output
must equal them byte for byte, which also proves that piped text output is
80 columns without colour.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest
from cli_support import run_tri

ROOT = Path(__file__).parents[1]
GOLDEN = Path(__file__).parent / "golden"
DEMO_DIR = ROOT / "tri" / "panels_demo"
DEMOS = sorted(DEMO_DIR.glob("*.toml"))
EXT = {"text": "txt", "json": "json", "markdown": "md", "csv": "csv"}


def env(**extra: str) -> dict[str, str]:
    e = {k: v for k, v in os.environ.items() if k not in ("NO_COLOR", "FORCE_COLOR", "COLUMNS")}
    e["PYTHONIOENCODING"] = "utf-8"
    e.update(extra)
    return e


def tri(*args: str, cwd: Path | None = None, **extra: str) -> subprocess.CompletedProcess[bytes]:
    return subprocess.run(
        [sys.executable, "-m", "tri", *args],
        capture_output=True,
        timeout=120,
        cwd=cwd,
        env=env(**extra),
    )


#: Runs through the real command: tests/test_report_golden.py checks every demo in every
#: format in-process (the same render), so these prove the command writes those bytes
#: unchanged: the garage (OVER, harmonics) in every format, the high-leg woodshop (its
#: marks outside ASCII) as text.
COMMAND_RUNS = [("garage_ev_208", fmt) for fmt in EXT] + [("woodshop_240d", "text")]


@pytest.fixture(scope="module")
def golden_runs() -> dict[tuple[str, str], subprocess.CompletedProcess[bytes]]:
    """The command runs of COMMAND_RUNS, concurrently to keep the suite quick."""
    procs = {
        (stem, fmt): subprocess.Popen(
            [
                sys.executable,
                "-m",
                "tri",
                "report",
                str(DEMO_DIR / f"{stem}.toml"),
                "--format",
                fmt,
            ],
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
            env=env(),
        )
        for stem, fmt in COMMAND_RUNS
    }
    out = {}
    for key, p in procs.items():
        stdout, stderr = p.communicate(timeout=120)
        out[key] = subprocess.CompletedProcess(p.args, p.returncode, stdout, stderr)
    return out


@pytest.mark.parametrize(("stem", "fmt"), COMMAND_RUNS, ids=[f"{s}-{f}" for s, f in COMMAND_RUNS])
def test_command_output_equals_golden(stem: str, fmt: str, golden_runs: dict) -> None:
    r = golden_runs[(stem, fmt)]
    assert r.returncode == 0, r.stderr.decode()
    assert r.stderr == b""
    assert r.stdout == (GOLDEN / f"{stem}.{EXT[fmt]}").read_bytes()


def test_force_color_does_not_colour_piped_output() -> None:
    r = tri("report", str(DEMOS[0]), FORCE_COLOR="1")
    assert r.returncode == 0
    assert b"\x1b[" not in r.stdout
    assert r.stdout == (GOLDEN / f"{DEMOS[0].stem}.txt").read_bytes()


def test_json_stays_parseable_when_there_are_warnings() -> None:
    # The garage has no [supply]: --iterate cannot apply, a warning goes to stderr.
    r = run_tri("report", str(DEMO_DIR / "garage_ev_208.toml"), "--format", "json", "--iterate")
    assert r.returncode == 0
    assert "warning" in r.stderr
    doc = json.loads(r.stdout)
    assert doc["voltage"] is None
    assert any("no supply" in f["message"] for f in doc["findings"])


def test_iterate_changes_the_basis_and_says_so() -> None:
    r = run_tri("report", str(DEMO_DIR / "bakery_208.toml"), "--format", "json", "--iterate")
    doc = json.loads(r.stdout)
    assert doc["basis"]["iterated"] is True
    assert doc["voltage"]["iterated"] is True and doc["voltage"]["converged"] is True
    nominal = json.loads((GOLDEN / "bakery_208.json").read_bytes())
    # Constant-power loads draw more current at the lower panel voltage.
    assert doc["phases"]["A"]["current_a"] > nominal["phases"]["A"]["current_a"]


def test_continuous_factor_option(tmp_path: Path) -> None:
    demo = str(DEMO_DIR / "bakery_208.toml")
    one = json.loads(run_tri("report", demo, "--format", "json", "--continuous-factor", "1").stdout)
    for ph in one["phases"].values():
        assert ph["design_a"] == pytest.approx(ph["rms_a"], rel=1e-9)
    for bad in ("0.5", "nan", "-1", "4"):
        r = run_tri("report", demo, "--continuous-factor", bad)
        assert r.returncode == 2, bad
        assert "--continuous-factor" in r.stderr and "Traceback" not in r.stderr
        assert r.stdout == ""


@pytest.mark.parametrize("fmt", ["text", "csv"])
def test_output_file_equals_standard_output(fmt: str, tmp_path: Path) -> None:
    out = tmp_path / f"report.{EXT[fmt]}"
    r = run_tri("report", str(DEMOS[1]), "--format", fmt, "--output", str(out))
    assert r.returncode == 0, r.stderr
    assert r.stdout == ""
    assert out.read_bytes() == (GOLDEN / f"{DEMOS[1].stem}.{EXT[fmt]}").read_bytes()
    assert [p.name for p in tmp_path.iterdir()] == [out.name]  # no temporary left behind


def test_output_never_overwrites_the_schedule(tmp_path: Path) -> None:
    src = tmp_path / "panel.toml"
    src.write_bytes(DEMOS[0].read_bytes())
    r = run_tri("report", str(src), "--format", "json", "--output", str(src))
    assert r.returncode == 2
    assert "schedule itself" in r.stderr
    assert src.read_bytes() == DEMOS[0].read_bytes()
    r = run_tri("report", str(src), "--output", str(tmp_path))
    assert r.returncode == 2 and "folder" in r.stderr


@pytest.mark.parametrize(
    "args",
    [
        ["report", "missing.toml", "--format", "json"],
        ["report", "tests/data/bad/syntax_error.toml", "--format", "json"],
        ["report", "tests/data/bad/many_problems.toml"],
    ],
)
def test_bad_input_exits_2_with_nothing_on_stdout(args: list[str]) -> None:
    r = run_tri(*args, cwd=ROOT)
    assert r.returncode == 2
    assert r.stdout == ""
    assert "tri: error:" in r.stderr and "Traceback" not in r.stderr


def test_terminal_output_uses_colour_unless_no_color() -> None:
    pty = pytest.importorskip("pty")

    def run_on_tty(**extra: str) -> tuple[int, bytes]:
        main, sub = pty.openpty()
        p = subprocess.Popen(
            [sys.executable, "-m", "tri", "report", str(DEMOS[1])],
            stdout=sub,
            stderr=subprocess.PIPE,
            env=env(COLUMNS="100", TERM="xterm-256color", **extra),
        )
        os.close(sub)
        chunks = []
        while True:
            try:
                chunk = os.read(main, 65536)
            except OSError:
                break
            if not chunk:
                break
            chunks.append(chunk)
        os.close(main)
        return p.wait(timeout=60), b"".join(chunks)

    rc, out = run_on_tty()
    assert rc == 0
    # 116.4 %: garage phase A as in tests/golden/garage_ev_208.txt (a regression value;
    # what matters here is the colour around it)
    assert b"\x1b[" in out and b"116.4 %" in out and b"OVER" in out
    rc, plain = run_on_tty(NO_COLOR="1")
    assert rc == 0
    assert b"\x1b[31" not in plain and b"\x1b[33" not in plain  # no red, no yellow
    assert b"OVER" in plain  # the words carry the meaning
