"""Help: the key list (from the bindings themselves) and what each part shows."""

from __future__ import annotations

from typing import Any

from rich.text import Text

from tri.safety import SAFETY_CAUTION
from tri.tui.screens.text_view import TextScreen
from tri.tui.widgets.circuit_table import HELP as TABLE_HELP
from tri.tui.widgets.results_panel import HELP as RESULTS_HELP

CAUTION_TITLE = "Safety"


def _key_name(keys: str) -> str:
    names = []
    for k in keys.split(","):
        k = k.strip()
        k = {
            "question_mark": "?",
            "delete": "Del",
            "escape": "Esc",
            "enter": "Enter",
            "tab": "Tab",
            "shift+tab": "Shift+Tab",
        }.get(k, k)
        if k.startswith("ctrl+"):
            k = "Ctrl+" + k[5:].upper()
        names.append(k)
    return " / ".join(names)


def _keys_of(screen_cls: Any) -> list[tuple[str, str]]:
    """(keys, what they do) of a screen's bindings, in the screen's own words where it has them."""
    words = getattr(screen_cls, "KEY_WORDS", {})
    out = []
    for b in getattr(screen_cls, "BINDINGS", []):
        if b.description in ("Down", "Up", "Page down", "Page up"):
            continue
        out.append((_key_name(b.key), words.get(b.action, b.description)))
    return out


def help_screen(app: Any) -> TextScreen:
    """The help page for the app."""
    from tri.tui.screens.main import MAIN_HELP, MainScreen
    from tri.tui.screens.phasor import PHASOR_HELP, PhasorScreen
    from tri.tui.screens.rebalance import REBALANCE_HELP, RebalanceScreen

    t = Text()

    def section(title: str, keys: list[tuple[str, str]], body: str) -> None:
        t.append(f"{title}\n", style="bold underline")
        for key, what in keys:
            t.append(f"  {key:<16}", style="bold")
            t.append(f"{what}\n")
        if body:
            t.append("\n" + body + "\n")
        t.append("\n")

    section(
        "Everywhere",
        [
            ("Ctrl+Q", "quit (asks when there are unsaved edits)"),
            ("? / F1", "this help"),
            ("t", "theme: dark, light, 16-colour"),
            ("Ctrl+P", "command palette"),
            ("Esc", "close a dialog or go back"),
        ],
        "",
    )
    main_keys = [
        ("Enter / e", "edit the circuit under the cursor (on a space: add one there)"),
        ("↑↓ j k", "move; PgUp PgDn a page; Home End g G first and last"),
        ("← →", "panel view: the other column (rail board: the next phase)"),
        *[(k, d) for k, d in _keys_of(MainScreen) if d not in ("Edit",)],
    ]
    section("Main view", main_keys, MAIN_HELP + "\n\n" + TABLE_HELP + "\n\n" + RESULTS_HELP)
    section(
        "Forms",
        [("Tab / ↑↓", "next / previous field"), ("Enter / Ctrl+S", "accept"), ("Esc", "cancel")],
        "Fields are checked as you type by the same rules as the schedule file. A field "
        "marked ✗ is refused, with the reason written under the form; what you typed stays.",
    )
    section("Phasor view", _keys_of(PhasorScreen), PHASOR_HELP)
    section("Rebalance", _keys_of(RebalanceScreen), REBALANCE_HELP)
    t.append(f"{CAUTION_TITLE}\n", style="bold underline")
    t.append(SAFETY_CAUTION + "\n")
    return TextScreen("Help: keys and what the screens show", t)
