"""``tri suggest PARENT``: the fewest breaker moves across a building.

When the file given feeds other panels (or ``--at PANEL`` names one), the
search covers the service (the file given, or the panel named) and every
panel below it (:func:`tri.rebalance.tree_solve.suggest_tree`): the
service within ``--target`` and every panel below it within
``--child-target`` (default: the same), each panel's currents including
what it feeds; ``--neutral-max`` limits the service's neutral RMS current
(everything it feeds included). The work order is grouped by panel.

``--write DIR`` writes the building after the moves into DIR, a new or
empty folder (:func:`tri.schedule.tree_save.save_tree`): every panel at its
path relative to the folder common to the inputs, so every ``feeds`` still
resolves; panels that changed are saved with their comments kept, the
others copied as they are. The input files are never written.

The search runs in a worker thread; Ctrl+C ends it cleanly with the best
plan so far and its honest status (exit as for the time limit).

Exit status: 0 when the plan meets every target, 1 when no plan meeting
them was found (or none exists), 2 for bad input or options.
"""

from __future__ import annotations

import argparse
import os
import sys
from typing import Any

from tri.cli.common import EXIT_LIMIT, EXIT_OK, SAFETY_CAUTION, CliError, SearchProgress
from tri.native_output import native_stdout_to_devnull


def add_tree_arguments(p: Any) -> None:
    """The options of the building search, on ``tri suggest``'s parser."""
    p.add_argument(
        "--at",
        metavar="PANEL",
        help="in a building: balance this panel (its [panel] name or file) and the panels below "
        "it (default: the file given)",
    )
    p.add_argument(
        "--child-target",
        metavar="PCT",
        help="in a building: largest deviation allowed at every panel below the one balanced, "
        "percent (default: --target)",
    )


def uses_tree(args: argparse.Namespace, feeds_others: bool) -> bool:
    """True when ``tri suggest`` searches a building rather than one panel."""
    return feeds_others or args.at is not None or args.child_target is not None


def _refuse_single_panel_options(args: argparse.Namespace) -> None:
    unsupported = [
        ("--place-new", args.place_new),
        ("--relayout", args.relayout),
    ]
    for name, given in unsupported:
        if given:
            raise CliError(
                f"{name}: not yet available for a building ({args.file} feeds other panels); "
                "run tri suggest on one panel's file for it"
            )
    if args.max_moves is not None and args.target is None:
        raise CliError(
            "--max-moves without --target asks for the best balance of one panel; for a "
            "building give --target (and --max-moves as a cap on the relocations)"
        )


def _options(args: argparse.Namespace) -> Any:
    from tri.cli.suggest import _number, search_numbers
    from tri.rebalance.tree_solve import TreeOptions

    target, neutral, time_limit, moves = search_numbers(args)
    child = _number("--child-target", args.child_target, "a percentage", 0.0, 200.0)
    return TreeOptions(
        target_pct=target,
        child_target_pct=child,
        max_moves=moves,
        service=args.at,
        neutral_max_a=neutral,
        time_limit_s=time_limit,
    )


def _search(tree, options, progress) -> Any:
    """The building search; Ctrl+C ends it with the best plan so far (:mod:`tri.cli.stoppable`)."""
    from tri.cli.stoppable import run_stoppable
    from tri.rebalance.tree_solve import suggest_tree

    return run_stoppable(
        lambda cancel: suggest_tree(tree, options, progress=progress, cancel=cancel), progress
    )


def _check_folder(folder: str, step: Any) -> Any:
    """``step(folder)``, a refused folder shown as ``--write DIR: why`` (exit 2)."""
    try:
        return step(folder)
    except ValueError as exc:
        raise CliError(f"--write {folder}: {exc}") from None


def _write(tree: Any, result: Any, folder: str) -> None:
    """Write the building after the moves into ``folder``; say what was written on stderr."""
    from tri.schedule.tree_save import save_tree

    schedules = [p.schedule for p in result.tree.panels]
    written = _check_folder(folder, lambda f: save_tree(tree, schedules, f))
    names = [(os.path.relpath(w.written, folder), w.changed) for w in written]
    changed = [n for n, c in names if c]
    copied = [n for n, c in names if not c]
    top = written[0].written
    print(
        f"tri: wrote the building after the moves to {folder} (top panel {top}): "
        + (f"changed: {', '.join(changed)}" if changed else "no panel changed (no moves)")
        + (f"; copied unchanged: {', '.join(copied)}" if copied else ""),
        file=sys.stderr,
    )


def run_tree(args: argparse.Namespace) -> int:
    """Run ``tri suggest`` on a building; returns 0 or 1 (bad input raises, exit 2)."""
    from tri.schedule.tree import load_tree
    from tri.schedule.tree_save import check_tree_folder

    _refuse_single_panel_options(args)
    options = _options(args)
    if args.write is not None:
        _check_folder(args.write, check_tree_folder)
    tree = load_tree(args.file)
    before = tuple(p.schedule for p in tree.panels)
    progress = SearchProgress()
    try:
        with native_stdout_to_devnull():
            result = _search(tree, options, progress)
    except ValueError as exc:
        raise CliError(f"{args.file}: cannot rebalance this building: {exc}") from None
    finally:
        progress.clear()
    if result.stopped == "cancelled":
        print("tri: stopped by Ctrl+C; shown: the best plan so far", file=sys.stderr)
    if args.write is not None:
        _write(tree, result, args.write)

    from tri.cli.report import emit
    from tri.report.tree_work_order import render_tree_json, render_tree_text, tree_suggestion_data

    if args.format == "json":
        emit(render_tree_json(tree_suggestion_data(result, before, SAFETY_CAUTION)), utf8=True)
    else:
        enc = (getattr(sys.stdout, "encoding", None) or "").lower().replace("-", "")
        emit(render_tree_text(result, before, SAFETY_CAUTION, ascii_only=enc != "utf8"))
    ok = result.status != "infeasible" and result.target_met
    return EXIT_OK if ok else EXIT_LIMIT
