"""``tri suggest FILE``: the fewest breaker moves to balance a panel, or the best balance.

Modes (see :mod:`tri.rebalance.solve`): ``--target PCT`` (default: the
report's deviation warning level) finds the fewest moves that bring every
phase RMS current within PCT % of the mean; ``--max-moves K`` alone finds
the best balance with at most K moves; ``--place-new`` places circuits that
have no slot yet; ``--relayout`` re-lays out every unlocked circuit.

Output: ``--format text`` (default) is a work order with the safety
caution; ``--format json`` is the rebalancer contract
(``shared/spec/schedule-format.md``) and the only thing on standard output
(the solver's native library is kept off it). ``--write OUT.toml`` saves the
schedule after the moves, keeping the file's comments (for a building,
``--write DIR`` writes every panel into a new folder: :mod:`tri.cli.suggest_tree`).

Exit status: 0 when the plan meets what was asked (target met, or a plan
found), 1 when the target is out of reach or was not reached in the time
limit, 2 for bad input or options.
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path
from typing import Any

from tri.cli.common import EXIT_LIMIT, EXIT_OK, SAFETY_CAUTION, CliError, SearchProgress, load
from tri.native_output import native_stdout_to_devnull

#: Largest accepted --time-limit [s].
MAX_TIME_LIMIT_S = 3600.0


def add_parser(sub: Any) -> None:
    """Register ``tri suggest``."""
    from tri.rebalance import DEFAULT_TARGET_PCT, DEFAULT_TIME_LIMIT_S

    p = sub.add_parser(
        "suggest",
        help="fewest breaker moves to rebalance; best slots for new circuits",
        description="Propose breaker moves that even out the phase currents: the fewest "
        "moves that reach a target, or the best balance with a limited number of moves, "
        "with proof of optimality where the solver finds one. Figures before and after "
        "come from the same engine as 'tri report'. A proposal, not approval to work.",
        epilog="exit status: 0 plan found (target met), 1 target out of reach or not reached "
        "in the time limit, 2 bad input or options.",
    )
    p.add_argument("file", help="schedule file (.toml)")
    p.add_argument(
        "--target",
        metavar="PCT",
        help="largest deviation of a phase RMS current from the mean of the three, percent "
        f"(default {DEFAULT_TARGET_PCT:g}, the report's warning level)",
    )
    p.add_argument(
        "--max-moves",
        metavar="K",
        help="at most K breaker moves; without --target: the best balance with K moves",
    )
    p.add_argument("--place-new", action="store_true", help="place circuits that have no slot yet")
    p.add_argument(
        "--relayout",
        action="store_true",
        help="re-lay out every unlocked circuit (design work; no target, no move limit)",
    )
    p.add_argument(
        "--neutral-max", metavar="A", help="largest neutral RMS current after the moves, amperes"
    )
    p.add_argument(
        "--time-limit",
        metavar="S",
        default=str(DEFAULT_TIME_LIMIT_S),
        help=f"search time in seconds (default {DEFAULT_TIME_LIMIT_S:g})",
    )
    p.add_argument(
        "--write",
        metavar="OUT",
        help="save the schedule after the moves to OUT (.toml); for a building, a new or "
        "empty folder that receives every panel's file",
    )
    p.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    from tri.cli.suggest_tree import add_tree_arguments

    add_tree_arguments(p)  # a building: tri/cli/suggest_tree.py


def _number(option: str, text: str | None, what: str, lo: float, hi: float) -> float | None:
    if text is None:
        return None
    try:
        value = float(text)
    except ValueError:
        raise CliError(f"{option} {text}: expected {what}") from None
    if not math.isfinite(value) or not lo <= value <= hi:
        raise CliError(f"{option} {text}: expected {what} from {lo:g} to {hi:g}")
    return value


def search_numbers(
    args: argparse.Namespace,
) -> tuple[float | None, float | None, float, int | None]:
    """``--target`` [%], ``--neutral-max`` [A], ``--time-limit`` [s] and ``--max-moves``,
    checked (a :class:`CliError` naming the option otherwise); shared with buildings."""
    target = _number("--target", args.target, "a percentage", 0.0, 200.0)
    neutral = _number("--neutral-max", args.neutral_max, "a current in amperes", 0.0, 1e6)
    if neutral is not None and neutral <= 0:
        raise CliError(f"--neutral-max {args.neutral_max}: expected a current above 0 A")
    time_limit = _number("--time-limit", args.time_limit, "seconds", 0.0, MAX_TIME_LIMIT_S)
    if time_limit is None or time_limit <= 0:
        raise CliError(f"--time-limit {args.time_limit}: expected a number of seconds above 0")
    moves = None
    if args.max_moves is not None:
        try:
            moves = int(args.max_moves)
        except ValueError:
            raise CliError(f"--max-moves {args.max_moves}: expected a whole number") from None
        if moves < 0:
            raise CliError(f"--max-moves {args.max_moves}: expected 0 or more")
    return target, neutral, time_limit, moves


def _options(args: argparse.Namespace) -> Any:
    from tri.rebalance import SuggestOptions

    target, neutral, time_limit, moves = search_numbers(args)
    if args.relayout and (target is not None or moves is not None):
        raise CliError("--relayout re-lays out everything; it takes no --target or --max-moves")
    return SuggestOptions(
        target_pct=target,
        max_moves=moves,
        place_new=args.place_new,
        relayout=args.relayout,
        neutral_max_a=neutral,
        time_limit_s=time_limit,
    )


def _check_write_target(target: str) -> None:
    out = Path(target)
    if out.is_dir():
        raise CliError(f"--write {target}: is a folder, expected a file name")
    parent = out.parent if str(out.parent) else Path(".")
    if not parent.is_dir():
        raise CliError(f"--write {target}: folder {parent} does not exist")


def run(args: argparse.Namespace) -> int:
    """Run ``tri suggest``; returns 0 or 1 (bad input raises, exit 2)."""
    from tri.cli.stoppable import run_stoppable
    from tri.rebalance import suggest

    options = _options(args)
    loaded = load(args.file)
    from tri.cli.suggest_tree import run_tree, uses_tree
    from tri.schedule.tree import feeder_circuits

    if uses_tree(args, bool(feeder_circuits(loaded.schedule))):
        return run_tree(args)  # the panels it feeds are searched with it (--write: a folder)
    if args.write:
        _check_write_target(args.write)
    schedule = loaded.schedule
    if options.neutral_max_a is not None and not schedule.system.has_neutral:
        raise CliError(f"--neutral-max: {schedule.panel.system} is a 3-wire system with no neutral")
    progress = SearchProgress()
    try:
        with native_stdout_to_devnull():
            result = run_stoppable(
                lambda cancel: suggest(
                    schedule, options, progress=progress, cancel=cancel, keep_best_on_cancel=True
                ),
                progress,
            )
    except ValueError as exc:
        raise CliError(f"{args.file}: cannot rebalance this schedule: {exc}") from None
    finally:
        progress.clear()
    if result.stopped == "cancelled":
        print("tri: stopped by Ctrl+C; shown: the best plan so far", file=sys.stderr)

    if args.write:
        from tri.schedule.save import save_schedule

        save_schedule(args.write, result.schedule, loaded.document)
        what = "after the moves" if result.moves else "unchanged (no moves)"
        print(f"tri: wrote the schedule {what} to {args.write}", file=sys.stderr)

    from tri.cli.report import emit

    if args.format == "json":
        from tri.report.suggest import render_suggestion_json, suggestion_data

        emit(render_suggestion_json(suggestion_data(result, schedule, SAFETY_CAUTION)), utf8=True)
    elif sys.stdout.isatty():
        from rich.console import Console

        from tri.report.suggest import print_suggestion

        print_suggestion(
            result, schedule, SAFETY_CAUTION, Console(highlight=False, emoji=False, markup=False)
        )
    else:
        from tri.report.suggest import render_suggestion_text

        enc = (getattr(sys.stdout, "encoding", None) or "").lower().replace("-", "")
        emit(render_suggestion_text(result, schedule, SAFETY_CAUTION, ascii_only=enc != "utf8"))
    ok = result.status != "infeasible" and result.target_met
    return EXIT_OK if ok else EXIT_LIMIT
