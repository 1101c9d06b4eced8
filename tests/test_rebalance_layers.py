"""The rebalancer is a headless layer (conventions.md, "Shape of the code").

``tri.rebalance`` may use the engine and the schedule layer only: no
Textual, no Rich. Its renderer in ``tri.report`` may use Rich, never Textual.
"""

from __future__ import annotations

import subprocess
import sys


def _loaded(module: str) -> list[str]:
    code = (
        f"import sys, {module}\n"
        "print(','.join(m for m in ('textual', 'rich') if m in sys.modules))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return [m for m in out.stdout.strip().split(",") if m]


def test_rebalance_loads_no_ui_toolkit() -> None:
    # every module of the package, in one interpreter
    modules = ", ".join(
        f"tri.rebalance.{m}"
        for m in (
            "control",
            "heuristic",
            "milp",
            "polygon",
            "problem",
            "realise",
            "results",
            "solve",
        )
    )
    assert _loaded(f"tri.rebalance, {modules}") == []


def test_suggest_renderer_loads_no_textual() -> None:
    assert "textual" not in _loaded("tri.report.suggest")
