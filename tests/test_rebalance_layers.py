"""The rebalancer is a headless layer (conventions.md, "Shape of the code"), and scipy waits.

``tri.rebalance`` may use the engine and the schedule layer only: no
Textual, no Rich. Its renderer in ``tri.report`` may use Rich, never
Textual. scipy's optimiser is imported only when a search runs, so the
commands that never search (``tri --version``, ``tri report``) start
without it (issue 11).
"""

from __future__ import annotations

import pkgutil
import subprocess
import sys
from pathlib import Path

import tri.rebalance

DEMO = Path(__file__).resolve().parents[1] / "tri" / "panels_demo" / "bakery_208.toml"


def _loaded(code: str, watch: tuple[str, ...] = ("textual", "rich", "scipy")) -> list[str]:
    probe = f"import sys\n{code}\nprint(','.join(m for m in {watch!r} if m in sys.modules))\n"
    out = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True)
    last = (out.stdout.strip().splitlines() or [""])[-1]
    return [m for m in last.split(",") if m]


def _modules() -> list[str]:
    return [f"tri.rebalance.{m.name}" for m in pkgutil.iter_modules(tri.rebalance.__path__)]


def test_rebalance_loads_no_ui_toolkit_and_no_scipy() -> None:
    # every module of the package, in one interpreter
    modules = _modules()
    assert len(modules) > 15
    assert _loaded("import " + ", ".join(["tri.rebalance", *modules])) == []


def test_suggest_renderer_loads_no_textual() -> None:
    assert "textual" not in _loaded("import tri.report.suggest")


def test_version_and_report_start_without_scipy() -> None:
    run = "from tri.cli import main\ntry:\n    main({args!r})\nexcept SystemExit:\n    pass"
    assert "scipy" not in _loaded(run.format(args=["--version"]))
    assert "scipy" not in _loaded(run.format(args=["report", str(DEMO)]))


def test_a_search_does_load_scipy() -> None:
    # the probe can fail: a search needs the optimiser
    code = (
        "from tri.rebalance import SuggestOptions, suggest\n"
        "from tri.schedule.load import load_schedule\n"
        f"s = load_schedule({str(DEMO)!r}).schedule\n"
        "suggest(s, SuggestOptions(target_pct=0.5, time_limit_s=0.2, list_plans=False))"
    )
    assert "scipy" in _loaded(code)
