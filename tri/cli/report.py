"""``tri report FILE``: figures per phase (placeholder until the engine lands)."""

from __future__ import annotations

import argparse
from typing import Any

from tri.cli.common import load


def add_parser(sub: Any) -> None:
    p = sub.add_parser("report", help="phase, neutral and voltage figures of a schedule")
    p.add_argument("file", help="schedule file (.toml)")
    p.add_argument("--format", choices=("text", "json", "markdown", "csv"), default="text")


def run(args: argparse.Namespace) -> int:
    loaded = load(args.file)
    print(f"{loaded.schedule.panel.name}: {len(loaded.schedule.circuits)} circuits")
    return 0
