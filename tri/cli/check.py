"""``tri check FILE...``: pass/fail against limits, for batch scripts and CI.

Exit status: 0 when every limit passes on every file, 1 when any limit
fails, 2 when any file cannot be read or an option is bad (2 wins over 1).
Every file is checked even after a failure or an unreadable file. The
limits, their defaults and the sources of the defaults are in
:mod:`tri.report.check_report`.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
import textwrap
from typing import Any

from tri.cli.common import EXIT_ERROR, EXIT_LIMIT, EXIT_OK, SAFETY_CAUTION, CliError, print_error
from tri.cli.report import add_continuous_factor_option, build_all, check_continuous_factor, emit
from tri.engine.limits import LIGHT_LOAD_PCT, SRC_LIGHT_LOAD
from tri.report.check_report import LIMITS, NOT_CHECKED, evaluate, panel_status, result_dict
from tri.report.check_text import render_check_text
from tri.schedule.errors import ScheduleError
from tri.words import plural


def add_parser(sub: Any) -> None:
    """Register ``tri check``."""
    lines = []
    for x in LIMITS:
        lines += textwrap.wrap(
            f"{x.option} {x.default_text}: {x.source}",
            width=78,
            initial_indent="  ",
            subsequent_indent="      ",
        )
    description = textwrap.fill(
        "Check one or more schedules against limits and exit 0 when all pass, 1 when any "
        "limit is exceeded, 2 when a file cannot be read. Each limit is printed with the "
        "value, pass/fail and where its default comes from. A pass covers only the limits "
        f"listed; not checked: {NOT_CHECKED}. Figures are estimates; local codes and a "
        "licensed practitioner decide.",
        width=78,
    )
    p = sub.add_parser(
        "check",
        help="exit 0 within limits, 1 when a limit is exceeded",
        description=description,
        epilog="default limits (a value equal to the limit passes):\n" + "\n".join(lines),
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("files", nargs="+", metavar="FILE", help="schedule file(s) (.toml)")
    for x in LIMITS:
        p.add_argument(
            x.option,
            type=float,
            default=x.default,
            metavar="PCT" if x.unit == "%" else x.unit.upper(),
            dest=_dest(x.key),
            help=f"maximum: {x.title} (default {x.default_text})".replace("%", "%%"),
        )
    p.add_argument(
        "--light-load-pct",
        type=float,
        default=LIGHT_LOAD_PCT,
        metavar="PCT",
        help=f"deviation not judged when the heaviest phase is below PCT of the rating "
        f"(default {LIGHT_LOAD_PCT:g}; {SRC_LIGHT_LOAD})".replace("%", "%%"),
    )
    add_continuous_factor_option(p)
    p.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    p.add_argument(
        "--iterate",
        action="store_true",
        help="with a [supply] table, solve loads at the panel voltage before checking",
    )


def _dest(key: str) -> str:
    return "max_" + key.replace("-", "_")


def _maxima(args: argparse.Namespace) -> dict[str, float | None]:
    out: dict[str, float | None] = {}
    for x in LIMITS:
        value = getattr(args, _dest(x.key))
        if value is not None and (not math.isfinite(value) or value < 0):
            what = "a percentage" if x.unit == "%" else x.unit
            raise CliError(f"{x.option} {value:g}: expected {what} of 0 or more")
        out[x.key] = value
    return out


def _light_load(args: argparse.Namespace) -> float:
    value = args.light_load_pct
    if not math.isfinite(value) or not 0 <= value <= 100:
        raise CliError(f"--light-load-pct {value:g}: expected a percentage from 0 to 100")
    return float(value)


def _check_one(
    path: str,
    maxima: dict[str, float | None],
    iterate: bool,
    factor: float | None,
    light: float,
) -> list[dict[str, Any]]:
    try:
        data, parts = build_all(path, iterate=iterate, continuous_factor=factor)
    except ScheduleError as exc:
        print_error(exc.summary())
        return [_error_entry(path, exc.summary())]
    except CliError as exc:
        print_error(str(exc))
        return [_error_entry(path, str(exc))]
    if data.get("building") is not None:  # every panel of the building, the service first
        from tri.cli.building import check_entries

        return check_entries(data, maxima, light_load_pct=light, parts=parts)
    results = _scenario_results(path, data, parts, maxima, light)
    return [
        {
            "file": path,
            "panel": data["panel"]["name"],
            "status": panel_status(results),
            "error": None,
            "basis": data["basis"]["currents"],
            "results": results,
        }
    ]


def _scenario_results(
    path: str, data: dict[str, Any], parts: Any, maxima: dict[str, float | None], light: float
) -> list[Any]:
    """Each limit in the connected load and every scenario; the worst case decides."""
    if len(parts.cases) < 2:
        return evaluate(data, maxima, light_load_pct=light)
    from tri.report.data import report_data
    from tri.report.scenario_check import evaluate_cases
    from tri.schedule.load import load_schedule

    schedule = load_schedule(path).schedule
    reports = [
        (c.name, report_data(c.analysis, schedule, caution=SAFETY_CAUTION, file=path))
        for c in parts.cases[1:]
    ]
    return evaluate_cases(data, reports, maxima, light_load_pct=light)


def _error_entry(path: str, message: str) -> dict[str, Any]:
    return {
        "file": path,
        "panel": None,
        "status": "error",
        "error": message,
        "basis": None,
        "results": [],
    }


def exit_code(entries: list[dict[str, Any]]) -> int:
    """2 if any file could not be checked, else 1 if any failed, else 0."""
    statuses = {e["status"] for e in entries}
    if "error" in statuses:
        return EXIT_ERROR
    if "fail" in statuses:
        return EXIT_LIMIT
    return EXIT_OK


def run(args: argparse.Namespace) -> int:
    """Run ``tri check``; returns the exit status."""
    maxima = _maxima(args)
    light = _light_load(args)
    factor = check_continuous_factor(args.continuous_factor)
    entries = [
        e for path in args.files for e in _check_one(path, maxima, args.iterate, factor, light)
    ]
    code = exit_code(entries)
    if args.format == "json":
        overall = {EXIT_OK: "pass", EXIT_LIMIT: "fail", EXIT_ERROR: "error"}[code]
        payload = {
            "status": overall,
            "exit_code": code,
            "files": [
                {
                    "file": e["file"],
                    "panel": e["panel"],
                    "status": e["status"],
                    "error": e["error"],
                    "currents": e["basis"],
                    "checks": [result_dict(r) for r in e["results"]],
                }
                for e in entries
            ],
            "not_checked": NOT_CHECKED,
            "caution": SAFETY_CAUTION,
        }
        emit(json.dumps(payload, indent=2, ensure_ascii=False, allow_nan=False) + "\n", utf8=True)
    else:
        emit(render_check_text(entries, caution=SAFETY_CAUTION, maxima=maxima))
    if code == EXIT_ERROR and len(entries) > 1:
        bad = sum(1 for e in entries if e["status"] == "error")
        files = plural(len(entries), "file")
        print(f"tri: {bad} of {files} could not be checked.", file=sys.stderr)
    return code
