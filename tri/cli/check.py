"""``tri check FILE``: pass/fail against limits (placeholder until the engine lands)."""

from __future__ import annotations

import argparse
from typing import Any

from tri.cli.common import load


def add_parser(sub: Any) -> None:
    p = sub.add_parser("check", help="exit 0 within limits, 1 when a limit is exceeded")
    p.add_argument("file", help="schedule file (.toml)")


def run(args: argparse.Namespace) -> int:
    load(args.file)
    return 0
