"""``tri suggest FILE``: breaker moves to rebalance (placeholder until the rebalancer lands)."""

from __future__ import annotations

import argparse
from typing import Any

from tri.cli.common import CliError, load


def add_parser(sub: Any) -> None:
    p = sub.add_parser("suggest", help="fewest breaker moves to rebalance the phases")
    p.add_argument("file", help="schedule file (.toml)")


def run(args: argparse.Namespace) -> int:
    load(args.file)
    raise CliError("the rebalancer is not built yet in this version")
