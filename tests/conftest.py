"""Shared fixtures: a private state folder for every test, and the UI tests' small panel.

Also shorter idle naps for Textual's pilot and rarer garbage collections
(:func:`pytest_configure`).
"""

from __future__ import annotations

import gc
import shutil
from pathlib import Path

import pytest

TUI_DATA = Path(__file__).parent / "data" / "tui"

#: Allocations between two young-generation collections (Python: 700) [-], and how many
#: of those before an older one (Python: 10, 10).
GC_THRESHOLDS = (5000, 20, 20)

#: Textual's pilot nap while it waits for the app to go idle [s], and the CPU time
#: within one nap below which the app counts as idle [s] (Textual: 1/50 and 1/1000).
IDLE_NAP_S, IDLE_CPU_S = 0.001, 0.0001


def pytest_configure(config: pytest.Config) -> None:
    """Shorter idle naps for Textual's pilot (every press and pause ends in one).

    The pilot waits until a whole nap passes with the process (all its
    threads) almost idle; at Textual's 20 ms each of the UI tests' ~3200
    waits idled 20 ms or more, over a minute of the workers' time. The same rule
    at 1 ms (the UI tests ~5 % faster than at 2 ms), and a tenth of the CPU
    allowance (at a twentieth, idle is seldom seen and many waits run to
    Textual's 1 s limit: the UI tests 40 % slower), waits as well; what the tests
    wait for (messages handled, workers done) comes from ``pilot.pause`` and
    ``tui_support.settle``, not from the nap. The names live in Textual's
    private ``textual._wait``: when they go, the naps are Textual's again
    (slower, not wrong).
    """
    # The UI tests allocate many short-lived objects (styles, strips, messages): at
    # Python's 700 a forms-and-edit run spent 2.6 s of 15 s in ~2570 collections; at
    # 5000 it spends ~1 s in ~390 (measured with gc.callbacks). Only the test processes.
    gc.set_threshold(*GC_THRESHOLDS)
    try:
        import textual._wait as textual_wait
    except ImportError:
        return
    if hasattr(textual_wait, "SLEEP_GRANULARITY") and hasattr(textual_wait, "SLEEP_IDLE"):
        textual_wait.SLEEP_GRANULARITY = IDLE_NAP_S
        textual_wait.SLEEP_IDLE = IDLE_CPU_S


@pytest.fixture(autouse=True)
def _state(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """Journal and recent files go to the test's own folder, never the user's."""
    monkeypatch.setenv("XDG_STATE_HOME", str(tmp_path / "state"))


@pytest.fixture
def small(tmp_path: Path) -> Path:
    """A writable copy of the UI tests' small 208Y/120 panel."""
    target = tmp_path / "small.toml"
    shutil.copy(TUI_DATA / "small.toml", target)
    return target
