"""Load a schedule from a file or TOML text, checking everything and locating every problem.

Loading never stops at the first problem: it reads every table and circuit
it can, then raises :class:`~tri.schedule.errors.ScheduleError` listing all
of them, each with file, line, circuit and key. Nothing is ever written here.

The tables are read by :mod:`~tri.schedule.read_panel`,
:mod:`~tri.schedule.read_supply`, :mod:`~tri.schedule.read_readings`,
:mod:`~tri.schedule.read_profiles` and :mod:`~tri.schedule.read_circuit`;
this module parses the TOML, calls them in order and adds the whole-schedule
checks of :mod:`~tri.schedule.validate`.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import tomlkit
from tomlkit.exceptions import ParseError
from tomlkit.toml_document import TOMLDocument

from tri.schedule.errors import ScheduleError, ScheduleIssue
from tri.schedule.locate import LineIndex
from tri.schedule.log_spec import read_log_table
from tri.schedule.model import DEFAULT_LABELS, FORMAT_VERSION, Circuit, Schedule
from tri.schedule.read_circuit import read_circuit
from tri.schedule.read_panel import read_panel
from tri.schedule.read_profiles import read_profiles
from tri.schedule.read_readings import read_readings
from tri.schedule.read_supply import read_supply
from tri.schedule.read_wiring import check_supply_system, read_rcds
from tri.schedule.reader import MISSING, Reader, found, is_kind, suggest
from tri.schedule.rules import MAX_CIRCUITS
from tri.schedule.source import read_limited
from tri.schedule.text import escape_char, refused_chars
from tri.schedule.validate import check_schedule, circuit_where

TOP_KEYS = ("format", "panel", "supply", "readings", "profiles", "log", "rcd", "circuit")


@dataclass(frozen=True, eq=False)
class ScheduleFile:
    """A loaded schedule with the TOML document it came from.

    Attributes
    ----------
    schedule : Schedule
        The checked model.
    document : tomlkit.TOMLDocument
        The parsed document, kept so that saving keeps comments and layout.
    path : Path or None
        Where it was read from.
    """

    schedule: Schedule
    document: TOMLDocument
    path: Path | None = None


def parse_schedule(
    text: str, filename: str | None = None, path: Path | None = None
) -> ScheduleFile:
    """Parse and check schedule text.

    Raises
    ------
    ScheduleError
        With every problem found, each located by file, line, circuit and key.
    """
    try:
        document = tomlkit.parse(text)
    except ParseError as exc:
        message = str(exc)
        base = message.split(" at line ")[0]
        raise ScheduleError(
            [
                ScheduleIssue(
                    f"not valid TOML: {base} (column {exc.col})", file=filename, line=exc.line
                )
            ]
        ) from None
    except Exception as exc:  # tomlkit raises a few other types on odd input
        raise ScheduleError([ScheduleIssue(f"not valid TOML: {exc}", file=filename)]) from None
    try:
        data = document.unwrap()
    except Exception as exc:
        raise ScheduleError([ScheduleIssue(f"not valid TOML: {exc}", file=filename)]) from None
    schedule = build_schedule(data, filename=filename, lines=LineIndex(text))
    return ScheduleFile(schedule=schedule, document=document, path=path)


def _read_top_level(r: Reader, data: Mapping[str, Any]) -> None:
    """Unknown top-level keys and the ``format`` version (a newer one stops loading)."""
    for key in data:
        if key not in TOP_KEYS:
            r.add(
                f"unknown top-level key or table{suggest(key, TOP_KEYS)} "
                f"(expected {', '.join(TOP_KEYS)})",
                (),
                key,
                "top level",
            )
    fmt = data.get("format", MISSING)
    if fmt is MISSING:
        r.add(
            f"missing; expected format = {FORMAT_VERSION} at the top of the file",
            (),
            "format",
            "top level",
        )
    elif not is_kind("int", fmt) or fmt < 1:
        r.add(f"found {found(fmt)}, expected format = {FORMAT_VERSION}", (), "format", "top level")
    elif fmt > FORMAT_VERSION:
        r.add(
            f"format {fmt} was written by a newer tri; this version reads format "
            f"{FORMAT_VERSION}. Upgrade tri to open it.",
            (),
            "format",
            "top level",
        )
        raise ScheduleError(r.issues)


def _raw_circuits(r: Reader, data: Mapping[str, Any]) -> list[Any]:
    raw = data.get("circuit", [])
    if isinstance(raw, dict):
        r.add("use [[circuit]] (double brackets) for each circuit", ("circuit",), None, "[circuit]")
        return [raw]
    if not isinstance(raw, list):
        r.add(f"found {found(raw)}, expected [[circuit]] tables", (), "circuit", "top level")
        return []
    if len(raw) > MAX_CIRCUITS:
        r.add(
            f"{len(raw)} [[circuit]] tables, expected at most {MAX_CIRCUITS}",
            ("circuit", MAX_CIRCUITS),
            None,
            "top level",
        )
        return []
    return raw


def build_schedule(
    data: Mapping[str, Any], filename: str | None = None, lines: LineIndex | None = None
) -> Schedule:
    """Build and check a :class:`Schedule` from plain TOML data (dicts and lists).

    Raises
    ------
    ScheduleError
        With every problem found.
    """
    r = Reader(filename, lines)
    _read_top_level(r, data)
    panel = read_panel(r, data)
    supply = read_supply(r, data)
    readings = read_readings(r, data, panel)
    profiles = read_profiles(r, data)
    check_supply_system(r, panel, supply)
    rcds = read_rcds(r, data, panel)
    log = read_log_table(r, data, panel.phase_labels if panel else DEFAULT_LABELS)
    circuits: list[Circuit] = []
    for index, raw in enumerate(_raw_circuits(r, data)):
        c = read_circuit(r, raw, index, panel, stand_in=True)
        if c is not None:
            circuits.append(c)
    if panel is not None:
        model = Schedule(
            panel=panel,
            circuits=tuple(circuits),
            supply=supply,
            readings=readings,
            profiles=profiles or (),
            rcds=rcds,
            log=log,
        )
        for issue in check_schedule(model):
            i = issue.circuit_index
            assert i is not None
            src = circuits[i].source_index
            assert src is not None
            r.add(
                issue.message,
                ("circuit", src),
                issue.key,
                circuit_where(circuits[i], model),
                src,
            )
    if r.issues:
        raise ScheduleError(sorted(r.issues, key=lambda x: (x.line is None, x.line or 0)))
    return model


def load_schedule(path: str | Path) -> ScheduleFile:
    """Read and check a schedule file (a regular file of at most 1 MiB, UTF-8).

    Raises
    ------
    ScheduleError
        When the file cannot be read or has problems; nothing is written.
    """
    p = Path(path)
    name = str(path)
    bad = refused_chars(name)
    if bad:  # the name is shown in every report; refuse it like any other text
        shown = ", ".join(escape_char(ch) for ch in bad)
        raise ScheduleError(
            [
                ScheduleIssue(
                    f"the file name holds control characters ({shown}); rename it", file=name
                )
            ]
        )
    raw = read_limited(p)
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise ScheduleError(
            [ScheduleIssue("not UTF-8 text; save the file as UTF-8", file=name, line=line)]
        ) from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return parse_schedule(text, filename=name, path=p)
