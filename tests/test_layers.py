"""The headless layers never import the UI toolkits (conventions.md, "Shape of the code")."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

HEADLESS = [
    "tri.engine.analysis",
    "tri.schedule.load",
    "tri.schedule.save",
    "tri.schedule.to_engine",
    "tri.schedule.tree_to_engine",
    "tri.rebalance",
    "tri.report.text_report",
    "tri.report.building_render",
    "tri.cli",
]


@pytest.mark.parametrize("module", HEADLESS)
def test_headless_module_does_not_load_textual(module: str) -> None:
    code = (
        f"import sys, {module}\n"
        "bad = [m for m in ('textual',) if m in sys.modules]\n"
        "print(','.join(bad))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""


@pytest.mark.parametrize(
    "module",
    ["tri.engine.analysis", "tri.engine.tree_results", "tri.schedule.load", "tri.schedule.tree"],
)
def test_engine_and_schedule_do_not_load_rich(module: str) -> None:
    code = f"import sys, {module}\nprint('rich' in sys.modules)\n"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


@pytest.mark.parametrize(
    ("argv", "never"),
    [
        (["--version"], ("numpy", "tomlkit", "rich", "scipy", "textual", "pandas")),
        (
            ["report", "tri/panels_demo/bakery_208.toml", "--format", "json"],
            ("scipy", "textual", "rich"),
        ),
        (["check", "tri/panels_demo/bakery_208.toml"], ("scipy", "textual", "pandas")),
    ],
)
def test_commands_start_without_the_libraries_they_do_not_use(argv, never) -> None:
    # Start-up (issue 11): each command imports only what it runs; suggest alone
    # loads scipy and the UI alone textual (bench/bench_startup.py prints the times).
    code = (
        "import sys\nfrom tri.cli import main\n"
        f"status = main({argv!r})\n"
        f"loaded = [m for m in {never!r} if m in sys.modules]\n"
        "print('LOADED', ','.join(loaded), file=sys.stderr)\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=False, cwd=ROOT
    )
    loaded = out.stderr.rsplit("LOADED", 1)[-1].strip()
    assert loaded == "", f"{argv} loaded {loaded}"
