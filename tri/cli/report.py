"""``tri report FILE``: phase, neutral, harmonic and voltage figures in four formats.

``--format text`` (default) is a Rich layout: coloured on a terminal, plain
80-column text when piped, written to a file or when ``NO_COLOR`` is set.
``json`` follows the report contract (``shared/spec/schedule-format.md``)
and is the only thing written to standard output; any warning goes to
standard error. ``markdown`` is the printable panel directory with the
results and the caution; ``csv`` is one row per circuit (RFC 4180).
"""

from __future__ import annotations

import argparse
import contextlib
import math
import os
import sys
from pathlib import Path
from typing import Any

from tri.cli.common import SAFETY_CAUTION, CliError, load
from tri.engine.limits import (
    CONTINUOUS_FACTOR,
    CONTINUOUS_FACTOR_RANGE,
    DESIGN_HEADROOM_PCT,
    IEC_CONTINUOUS_FACTOR,
    PHASE_KVA_EXAMPLE,
    FindingLimits,
)
from tri.schedule.to_engine import analyse_schedule

FORMATS = ("text", "json", "markdown", "csv")


def add_parser(sub: Any) -> None:
    """Register ``tri report``."""
    p = sub.add_parser(
        "report",
        help="phase, neutral and voltage figures of a schedule",
        description="Compute and show a panel's phase currents (fundamental and true RMS), "
        "neutral current, symmetrical components, current unbalance, voltage at the panel "
        "(with a [supply] table), site readings against the computed figures, and findings "
        "with their sources. Figures are estimates from the schedule.",
        epilog="formats: text (terminal), json (report contract), markdown (printable panel "
        "directory with results), csv (one row per circuit).",
    )
    p.add_argument("file", help="schedule file (.toml)")
    p.add_argument("--format", choices=FORMATS, default="text", help="output format")
    p.add_argument(
        "--iterate",
        action="store_true",
        help="with a [supply] table, solve loads as constant power at the panel voltage "
        "(default: currents at nominal voltage, as schedules are written)",
    )
    add_finding_options(p)
    p.add_argument(
        "--output",
        "-o",
        metavar="OUT",
        help="write the report to OUT instead of standard output (text: 80 columns, no colour)",
    )


def add_continuous_factor_option(p: argparse.ArgumentParser) -> None:
    """``--continuous-factor`` (``tri report`` and ``tri check``)."""
    p.add_argument(
        "--continuous-factor",
        type=float,
        default=None,
        metavar="F",
        help=f"multiplier on continuous loads in the sizing rule (default "
        f"{CONTINUOUS_FACTOR:g}, NEC practice, on 60 Hz panels; {IEC_CONTINUOUS_FACTOR:g}, IEC "
        "practice, on 50 Hz panels)",
    )


def add_finding_options(p: argparse.ArgumentParser) -> None:
    """``tri report``'s finding settings: the factor, the headroom, the kVA cap."""
    add_continuous_factor_option(p)
    p.add_argument(
        "--headroom-pct",
        type=float,
        default=DESIGN_HEADROOM_PCT,
        metavar="PCT",
        help=f"design headroom: phase RMS loading above it is NEAR (default "
        f"{DESIGN_HEADROOM_PCT:g}; a margin, not a code rule)".replace("%", "%%"),
    )
    p.add_argument(
        "--max-phase-kva",
        type=float,
        default=None,
        metavar="KVA",
        help="largest difference of scheduled apparent power between phases, as some grid "
        f"operators cap it (e.g. {PHASE_KVA_EXAMPLE:g}; default: not judged)",
    )


def finding_settings(args: argparse.Namespace) -> tuple[float | None, FindingLimits]:
    """The continuous factor and finding limits of the options, or :class:`CliError`."""
    factor = check_continuous_factor(args.continuous_factor)
    headroom = args.headroom_pct
    if not math.isfinite(headroom) or not 0 < headroom <= 100:
        raise CliError(f"--headroom-pct {headroom:g}: expected a percentage above 0, at most 100")
    kva = args.max_phase_kva
    if kva is not None and (not math.isfinite(kva) or kva < 0):
        raise CliError(f"--max-phase-kva {kva:g}: expected kVA of 0 or more")
    return factor, FindingLimits(headroom_pct=headroom, phase_kva_limit=kva)


def check_continuous_factor(value: float | None) -> float | None:
    """The continuous factor (None: the panel's practice), or :class:`CliError` [-]."""
    if value is None:
        return None
    lo, hi = CONTINUOUS_FACTOR_RANGE
    if not math.isfinite(value) or not lo <= value <= hi:
        raise CliError(
            f"--continuous-factor {value:g}: expected a number from {lo:g} to {hi:g} "
            f"(1.25 counts continuous loads at 125 %)"
        )
    return value


def build_data(
    path: str,
    *,
    iterate: bool,
    continuous_factor: float | None = None,
    limits: FindingLimits | None = None,
) -> dict[str, Any]:
    """Load, analyse and turn one schedule into report data (see :mod:`tri.report.data`).

    ``continuous_factor`` None takes the panel's practice; ``limits`` None the defaults.
    """
    return build_all(path, iterate=iterate, continuous_factor=continuous_factor, limits=limits)[0]


def build_all(
    path: str,
    *,
    iterate: bool,
    continuous_factor: float | None = None,
    limits: FindingLimits | None = None,
) -> tuple[dict[str, Any], Any]:
    """Report data and the parts behind its ``scenarios`` and ``log`` keys.

    A building (a schedule whose circuits feed other panels) gives the whole
    tree's data, every panel's figures in each scenario of the building
    included, and :class:`tri.cli.building.BuildingParts` (no log).
    """
    from tri.cli.building import building_report_all, is_building_root
    from tri.report.data import report_data
    from tri.report.over_time_data import add_over_time

    limits = limits or FindingLimits()
    loaded = load(path)
    if is_building_root(loaded):
        return building_report_all(
            path, iterate=iterate, continuous_factor=continuous_factor, limits=limits
        )
    try:
        analysis = analyse_schedule(
            loaded.schedule,
            iterate_voltage=iterate,
            continuous_factor=continuous_factor,
            limits=limits,
        )
    except ValueError as exc:
        raise CliError(f"{path}: cannot analyse this schedule: {exc}") from None
    data = report_data(
        analysis,
        loaded.schedule,
        caution=SAFETY_CAUTION,
        file=path,
        headroom_pct=limits.headroom_pct,
    )
    parts = add_over_time(
        data, loaded, analysis, iterate=iterate, continuous_factor=continuous_factor, limits=limits
    )
    return data, parts


def render(
    data: dict[str, Any],
    fmt: str,
    *,
    ascii_only: bool = False,
    images: dict[str, str] | None = None,
) -> str:
    """The report in ``fmt`` as text (text format: 80 columns, no colour)."""
    if data.get("building") is not None:
        from tri.report import building_render as b

        if fmt == "text":
            return b.render_building_text(data, ascii_only=ascii_only)
        if fmt == "markdown":
            return b.render_building_markdown(data)
        if fmt == "csv":
            return b.render_building_csv(data)
    text = _render_base(data, fmt, ascii_only=ascii_only)
    if fmt in ("text", "markdown") and ("scenarios" in data or "log" in data):
        from tri.report import over_time_text as ot

        extra = (
            ot.render_over_time_markdown(data, images)
            if fmt == "markdown"
            else ot.render_over_time_text(data)
        )
        if ascii_only:
            extra = extra.encode("ascii", "replace").decode("ascii")
        text += extra
    return text


def write_pictures(parts: Any, data: dict[str, Any], report_path: str) -> dict[str, str]:
    """Write the log's pictures beside ``report_path``; returns alt text -> file name."""
    if parts.log is None:
        return {}
    from tri.report.log_svg import current_over_time_svg, duration_svg

    out = Path(report_path)
    labels = [*data["phase_order"], "N"]
    name = data["panel"]["name"]
    pictures = {
        f"Phase and neutral current over time, {name}": (
            out.with_name(f"{out.stem}-current.svg"),
            current_over_time_svg(
                parts.figures.picture,
                parts.log.interval_s,
                labels,
                parts.log.time_text,
                f"{name}: current over time",
            ),
        ),
        f"Hours above each current, {name}": (
            out.with_name(f"{out.stem}-duration.svg"),
            duration_svg(
                data["log"]["duration"]["levels_a"],
                data["log"]["duration"]["hours_above"],
                f"{name}: hours above each current",
            ),
        ),
    }
    written = {}
    for alt, (path, svg) in pictures.items():
        write_file(str(path), svg, report_path)
        written[alt] = path.name
    return written


def _render_base(data: dict[str, Any], fmt: str, *, ascii_only: bool = False) -> str:
    if fmt == "json":
        from tri.report.json_report import render_json

        return render_json(data)
    if fmt == "markdown":
        from tri.report.markdown_report import render_markdown

        return render_markdown(data)
    if fmt == "csv":
        from tri.report.csv_report import render_csv

        return render_csv(data)
    from tri.report.text_report import render_text

    return render_text(data, ascii_only=ascii_only)


def _is_utf8(stream: Any) -> bool:
    enc = getattr(stream, "encoding", None) or ""
    return enc.lower().replace("-", "").startswith("utf8")


def emit(text: str, *, utf8: bool = False) -> None:
    """Write ``text`` to standard output exactly (no newline translation).

    ``utf8`` forces UTF-8 bytes (JSON and CSV); otherwise the stream's own
    encoding is used and characters it cannot show are replaced rather than
    raising.
    """
    out = sys.stdout
    buf = getattr(out, "buffer", None)
    if buf is None:  # a text-only stream (e.g. captured in tests)
        out.write(text)
        out.flush()
        return
    out.flush()
    encoding = "utf-8" if utf8 else (getattr(out, "encoding", None) or "utf-8")
    buf.write(text.encode(encoding, errors="replace"))
    buf.flush()


def write_file(target: str, text: str, source: str) -> None:
    """Write ``text`` to ``target`` (UTF-8, exact line ends) via a temporary file and rename."""
    out = Path(target)
    if out.exists() and out.resolve() == Path(source).resolve():
        raise CliError(f"--output {target}: that is the schedule itself; choose another file")
    if out.is_dir():
        raise CliError(f"--output {target}: is a folder, expected a file name")
    tmp = out.with_name(f".{out.name}.tri-tmp")
    try:
        with open(tmp, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
        os.replace(tmp, out)
    except OSError as exc:
        with contextlib.suppress(OSError):
            tmp.unlink(missing_ok=True)
        raise CliError(f"--output {target}: cannot write: {exc.strerror or exc}") from None


def run(args: argparse.Namespace) -> int:
    """Run ``tri report``; returns 0 (errors raise :class:`CliError` or ``ScheduleError``)."""
    factor, limits = finding_settings(args)
    data, parts = build_all(
        args.file, iterate=args.iterate, continuous_factor=factor, limits=limits
    )
    if args.iterate and data["supply"] is None:
        print(
            "tri: warning: --iterate needs a [supply] table; currents are at nominal voltage.",
            file=sys.stderr,
        )
    fmt = args.format
    if args.output:
        images = write_pictures(parts, data, args.output) if fmt == "markdown" else None
        write_file(args.output, render(data, fmt, images=images), args.file)
        print(f"Wrote the {fmt} report to {args.output}.", file=sys.stderr)
        return 0
    if fmt == "text" and sys.stdout.isatty() and data.get("building") is None:
        from rich.console import Console

        from tri.report.text_report import print_text

        print_text(data, Console(highlight=False, emoji=False, markup=False))
        if "scenarios" in data or "log" in data:
            from tri.report.over_time_text import render_over_time_text

            emit(render_over_time_text(data))
        return 0
    utf8 = fmt in ("json", "csv", "markdown")
    emit(render(data, fmt, ascii_only=not utf8 and not _is_utf8(sys.stdout)), utf8=utf8)
    return 0
