"""``tri new FILE``: start a new, empty schedule."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from tri.cli.common import CliError
from tri.schedule.model import PanelInfo, Schedule
from tri.schedule.read_panel import read_panel
from tri.schedule.reader import Reader
from tri.schedule.save import save_schedule
from tri.schedule.slots import LAYOUTS, PHASES, TWO_COLUMN
from tri.schedule.systems import SYSTEMS
from tri.schedule.text import escaped

DEFAULT_BUS_A = 225.0
#: The ``[panel]`` key each option sets, so problems name the option.
OPTION_OF_KEY = {
    "name": "--name",
    "system": "--system",
    "spaces": "--spaces",
    "bus_a": "--bus-a",
    "main_a": "--main-a",
    "neutral_a": "--neutral-a",
    "phase_labels": "--labels",
    "layout": "--layout",
    "high_leg": "--high-leg",
}


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
    p.add_argument("--spaces", default="42", help="circuit positions (default 42)")
    p.add_argument("--name", help="panel name (default: the file name)")
    p.add_argument(
        "--bus-a",
        default=f"{DEFAULT_BUS_A:g}",
        help=f"bus rating in amperes (default {DEFAULT_BUS_A:g}; check the nameplate)",
    )
    p.add_argument("--main-a", help="main breaker in amperes (omit: main lugs only)")
    p.add_argument("--neutral-a", help="neutral rating in amperes (default: bus)")
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


def _labels(text: str | None, european: bool) -> list[str]:
    """``--labels`` as a list: ``ABC`` (three single letters) or ``L1,L2,L3``."""
    if text is None:
        return ["L1", "L2", "L3"] if european else ["A", "B", "C"]
    parts = [x.strip() for x in text.replace(" ", ",").split(",") if x.strip()]
    if len(parts) == 1 and len(parts[0]) == 3:
        parts = list(parts[0])
    return parts


def _number(text: str | None) -> Any:
    """An option's text as the number a TOML file would hold (text stays text)."""
    if text is None:
        return None
    for kind in (int, float):
        try:
            return kind(text)
        except ValueError:
            pass
    return text


def panel_from_options(args: argparse.Namespace, path: Path) -> PanelInfo:
    """The ``[panel]`` the options describe, checked by the loader's own rules.

    Raises
    ------
    CliError
        Naming each option whose value a schedule file could not hold.
    """
    system = SYSTEMS[args.system]
    european = system.default_frequency_hz == 50
    raw: dict[str, Any] = {
        "name": args.name or path.stem.replace("_", " ").replace("-", " "),
        "system": system.key,
        "spaces": _number(args.spaces),
        "bus_a": _number(args.bus_a),
        "phase_labels": _labels(args.labels, european),
        "layout": args.layout or (PHASES if european else TWO_COLUMN),
    }
    for key in ("main_a", "neutral_a"):
        if getattr(args, key) is not None:
            raw[key] = _number(getattr(args, key))
    if args.high_leg is not None:  # B or C whatever the labels: the file holds the label
        raw["high_leg"] = raw["phase_labels"][1 if args.high_leg == "B" else 2]
    reader = Reader()
    panel = read_panel(reader, {"panel": raw})
    if reader.issues or panel is None:
        problems = [_option_problem(args, i.key, i.message) for i in reader.issues]
        raise CliError("\n  ".join(problems or ["not a valid panel"]))
    return panel


def _option_problem(args: argparse.Namespace, key: str | None, message: str) -> str:
    """``--bus-a 1e309: found inf, expected a finite number``."""
    option = OPTION_OF_KEY.get(key or "")
    if option is None:
        return message
    given = getattr(args, option.removeprefix("--").replace("-", "_"), None)
    if key == "phase_labels":
        given = args.labels
    return (
        f"{option} {escaped(str(given))}: {message}"
        if given is not None
        else f"{option}: {message}"
    )


def run(args: argparse.Namespace) -> int:
    path = Path(args.file)
    if path.exists() and not args.force:
        raise CliError(f"{path} already exists; choose another name or add --force")
    if path.suffix.lower() != ".toml":
        raise CliError(f"{path}: expected a .toml file name")
    panel = panel_from_options(args, path)
    system = panel.supply_system
    high_leg = panel.effective_high_leg
    save_schedule(path, Schedule(panel=panel))
    print(
        f"Created {path}: {panel.name}, {system.key}, {panel.spaces} spaces, bus {panel.bus_a:g} A."
    )
    if panel.bus_a == DEFAULT_BUS_A:
        print(f"The bus rating {DEFAULT_BUS_A:g} A is a placeholder: set bus_a from the nameplate.")
    if high_leg is not None:
        print(
            f"High leg: {panel.phase_labels[high_leg]} (208 V to neutral); 1-pole circuits go "
            "on the other two phases only."
        )
    print(f"Next: add circuits by hand or run 'tri {path}'.")
    return 0
