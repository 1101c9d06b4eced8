"""``tri [open] [FILE]``: open the terminal UI."""

from __future__ import annotations

import argparse
import sys
from typing import Any

from tri.cli.common import EXIT_ERROR, print_error

NO_TERMINAL = (
    "the terminal UI needs a terminal on standard input and output; "
    "in scripts use 'tri report', 'tri check' or 'tri suggest'"
)


def has_terminal() -> bool:
    """True when standard input and output are both a terminal (the UI can draw and read keys)."""
    try:
        return sys.stdin.isatty() and sys.stdout.isatty()
    except (AttributeError, ValueError):  # closed or replaced streams
        return False


def add_parser(sub: Any) -> None:
    p = sub.add_parser(
        "open",
        help="open a schedule in the terminal UI (the default: 'tri FILE')",
        description="Open FILE in the keyboard-driven terminal UI. Without FILE, choose a "
        "demo panel or a recent file. A missing FILE is offered for creation.",
    )
    p.add_argument("file", nargs="?", help="schedule file (.toml)")


def run(args: argparse.Namespace) -> int:
    if not has_terminal():
        print_error(NO_TERMINAL)
        return EXIT_ERROR
    try:
        from tri.tui.app import run_app  # imported late: headless commands never load textual
    except ImportError:
        print(
            "The terminal UI is not built yet in this version. Meanwhile:\n"
            f"  tri report {args.file or 'FILE'}    figures per phase\n"
            "  tri --help          all commands"
        )
        return 0
    return run_app(args.file)
