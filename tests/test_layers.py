"""The headless layers never import the UI toolkits (conventions.md, "Shape of the code")."""

from __future__ import annotations

import json
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


#: Engine and schedule modules that must not load rich either.
RICH_FREE = [
    "tri.engine.analysis",
    "tri.engine.tree_results",
    "tri.schedule.load",
    "tri.schedule.tree",
]
WATCHED = ("textual", "rich")


@pytest.fixture(scope="module")
def loaded_by() -> dict[str, list[str]]:
    """What each module brings of ``WATCHED``, all imported in one fresh interpreter.

    The modules are imported one after another, the rich-free ones first, and
    each is charged with the watched libraries that appear at its import.
    Importing only adds modules, so a library absent after the last import was
    loaded by none of them alone, and the first module to load one is named.
    """
    code = (
        "import importlib, json, sys\n"
        "seen, out = set(), {}\n"
        f"for m in {[*RICH_FREE, *HEADLESS]!r}:\n"
        "    importlib.import_module(m)\n"
        f"    new = [w for w in {WATCHED!r} if w in sys.modules and w not in seen]\n"
        "    seen.update(new)\n"
        "    out[m] = out.get(m, []) + new\n"
        "print(json.dumps(out))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return json.loads(out.stdout)


@pytest.mark.parametrize("module", HEADLESS)
def test_headless_module_does_not_load_textual(module: str, loaded_by) -> None:
    assert "textual" not in loaded_by[module]


@pytest.mark.parametrize("module", RICH_FREE)
def test_engine_and_schedule_do_not_load_rich(module: str, loaded_by) -> None:
    assert "rich" not in loaded_by[module]


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
