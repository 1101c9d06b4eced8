"""The headless layers never import the UI toolkits (conventions.md, "Shape of the code")."""

from __future__ import annotations

import subprocess
import sys

import pytest

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
