"""``tri new FILE``: start a new, empty schedule."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from tri.cli.common import CliError
from tri.schedule.model import PanelInfo, Schedule
from tri.schedule.save import save_schedule
from tri.schedule.slots import LAYOUTS, PHASES, TWO_COLUMN
from tri.schedule.systems import SYSTEMS

DEFAULT_BUS_A = 225.0


def add_parser(sub: Any) -> None:
    p = sub.add_parser(
        "new",
        help="start a new schedule file",
        description="Write a new schedule with a [panel] table and no circuits. "
        "Edit it by hand or open it with 'tri FILE'.",
        epilog="systems: " + ", ".join(SYSTEMS),
    )
    p.add_argument("file", help="schedule file to create (.toml)")
    p.add_argument(
        "--system",
        required=True,
        choices=list(SYSTEMS),
        metavar="SYSTEM",
        help="supply system, e.g. 208Y/120, 480Y/277, 400Y/230, 480D, 240/120D",
    )
    p.add_argument(
        "--high-leg",
        choices=("B", "C"),
        help="the high leg of a 240/120D high-leg delta (default B)",
    )
    p.add_argument("--spaces", type=int, default=42, help="circuit positions (default 42)")
    p.add_argument("--name", help="panel name (default: the file name)")
    p.add_argument(
        "--bus-a",
        type=float,
        default=DEFAULT_BUS_A,
        help=f"bus rating in amperes (default {DEFAULT_BUS_A:g}; check the nameplate)",
    )
    p.add_argument("--main-a", type=float, help="main breaker in amperes (omit: main lugs only)")
    p.add_argument("--neutral-a", type=float, help="neutral rating in amperes (default: bus)")
    p.add_argument(
        "--layout",
        choices=LAYOUTS,
        help="two-column (slots) or phases (rail board); "
        "default: phases for 50 Hz systems, else two-column",
    )
    p.add_argument(
        "--labels",
        help="phase labels, e.g. ABC or L1,L2,L3 (default: L1,L2,L3 for 50 Hz systems, else A,B,C)",
    )
    p.add_argument("--force", action="store_true", help="overwrite an existing file")


def _labels(text: str | None, european: bool) -> tuple[str, str, str]:
    if text is None:
        return ("L1", "L2", "L3") if european else ("A", "B", "C")
    parts = [x.strip() for x in text.replace(" ", ",").split(",") if x.strip()]
    if len(parts) == 1 and len(parts[0]) == 3:
        parts = list(parts[0])
    if len(parts) != 3 or len({x.upper() for x in parts}) != 3:
        raise CliError(f"--labels {text!r}: expected three distinct labels such as ABC or L1,L2,L3")
    return (parts[0], parts[1], parts[2])


def run(args: argparse.Namespace) -> int:
    path = Path(args.file)
    if path.exists() and not args.force:
        raise CliError(f"{path} already exists; choose another name or add --force")
    if path.suffix.lower() != ".toml":
        raise CliError(f"{path}: expected a .toml file name")
    system = SYSTEMS[args.system]
    european = system.default_frequency_hz == 50
    for flag, value in (
        ("--bus-a", args.bus_a),
        ("--main-a", args.main_a),
        ("--neutral-a", args.neutral_a),
    ):
        if value is not None and not value > 0:
            raise CliError(f"{flag} {value:g}: expected a rating above 0 A")
    if not 1 <= args.spaces <= 420:
        raise CliError(f"--spaces {args.spaces}: expected 1 to 420")
    if args.high_leg is not None and not system.high_leg_delta:
        raise CliError(f"--high-leg: a {system.key} system has no high leg (that is 240/120D)")
    high_leg = None
    if system.high_leg_delta:
        high_leg = 2 if args.high_leg == "C" else 1
    panel = PanelInfo(
        name=args.name or path.stem.replace("_", " ").replace("-", " "),
        system=system.key,
        frequency_hz=system.default_frequency_hz,
        spaces=args.spaces,
        bus_a=args.bus_a,
        main_a=args.main_a,
        neutral_a=args.neutral_a,
        phase_labels=_labels(args.labels, european),
        layout=args.layout or (PHASES if european else TWO_COLUMN),
        high_leg=high_leg,
    )
    save_schedule(path, Schedule(panel=panel))
    print(
        f"Created {path}: {panel.name}, {system.key}, {panel.spaces} spaces, bus {panel.bus_a:g} A."
    )
    if args.bus_a == DEFAULT_BUS_A:
        print(f"The bus rating {DEFAULT_BUS_A:g} A is a placeholder: set bus_a from the nameplate.")
    if high_leg is not None:
        print(
            f"High leg: {panel.phase_labels[high_leg]} (208 V to neutral); 1-pole circuits go "
            "on the other two phases only."
        )
    print(f"Next: add circuits by hand or run 'tri {path}'.")
    return 0
