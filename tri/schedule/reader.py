"""The reader every table of a schedule goes through: typed values, located issues.

A :class:`Reader` reads values out of the plain dictionaries a TOML file
unwraps to, checks each against its :class:`~tri.schedule.rules.Rule`, and
collects every problem as a located :class:`~tri.schedule.errors.ScheduleIssue`
(file, line, table or circuit, key) instead of stopping at the first. The
terminal UI's forms use the same reader, so a form accepts exactly what a
file may hold, with the same words.
"""

from __future__ import annotations

import datetime as _dt
import difflib
import math
from collections.abc import Callable, Mapping
from typing import Any

from tri.schedule.errors import ScheduleIssue
from tri.schedule.locate import LineIndex, TableKey
from tri.schedule.text import plain_text_problem

#: Returned by :meth:`Reader.value` for a value that is missing or was reported.
MISSING: Any = object()
#: Any number other than 0 must be at least this large in size [-].
SMALLEST_NUMBER = 1e-6
#: No text of a schedule (a note included) may be longer [characters].
MAX_TEXT_CHARS = 2000

Check = Callable[[Any], str | None]

KIND_TEXT = {
    "text": "text in quotes",
    "int": "a whole number",
    "number": "a number",
    "bool": "true or false",
}
_KIND_TEST: dict[str, Callable[[Any], bool]] = {
    "text": lambda v: isinstance(v, str),
    "int": lambda v: isinstance(v, int) and not isinstance(v, bool),
    "number": lambda v: isinstance(v, int | float) and not isinstance(v, bool),
    "bool": lambda v: isinstance(v, bool),
}


def is_kind(kind: str, value: Any) -> bool:
    """True when ``value`` has the TOML type of ``kind`` ('text', 'int', 'number', 'bool')."""
    return _KIND_TEST[kind](value)


def type_name(value: Any) -> str:
    """The TOML type of a value in plain words, e.g. ``"text"`` or ``"true/false"``."""
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, int):
        return "integer"
    if isinstance(value, float):
        return "number"
    if isinstance(value, str):
        return "text"
    if isinstance(value, list):
        return "array"
    if isinstance(value, dict):
        return "table"
    if isinstance(value, _dt.date | _dt.time):
        return "date/time"
    return type(value).__name__


def shown(value: Any) -> str:
    """A value as quoted in a message: its repr, cut to 40 characters (long integers say
    how many digits they have)."""
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) >= 10**30:
        digits = len(str(abs(value))) if abs(value) < 10**4000 else "over 4000"
        return f"{'-' if value < 0 else ''}{str(abs(value))[:6]}... ({digits} digits)"
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def found(value: Any) -> str:
    """Describe a value found in a file, e.g. ``"'abc' (text)"``."""
    return f"{shown(value)} ({type_name(value)})"


def number_problem(value: Any, check: Check | None) -> tuple[Any, str | None]:
    """``(float value, None)`` for a good number, else ``(MISSING, the problem in words)``.

    A number must be a TOML integer or float (not true/false), finite, within
    float range, pass ``check``, and be 0 or at least :data:`SMALLEST_NUMBER`
    in size: smaller values are below any instrument's resolution and would
    underflow in the engine.
    """
    if not _KIND_TEST["number"](value):
        return MISSING, f"found {found(value)}, expected {KIND_TEXT['number']}"
    try:
        number = float(value)
    except OverflowError:
        bound = check(math.inf if value > 0 else -math.inf) if check else None
        return MISSING, f"found {shown(value)}, {bound or 'expected a finite number'}"
    if not math.isfinite(number):
        return MISSING, f"found {number!r}, expected a finite number"
    if check is not None:
        problem = check(number)
        if problem:
            return MISSING, f"found {shown(value)}, {problem}"
    if number != 0 and abs(number) < SMALLEST_NUMBER:
        return MISSING, (
            f"found {shown(value)}, expected 0 or a size of at least {SMALLEST_NUMBER:g} "
            "(smaller is below any instrument's resolution)"
        )
    return number, None


def text_problem(value: str, check: Check | None = None) -> str | None:
    """Why text may not be in a schedule (control characters, length, ``check``), or ``None``."""
    problem = plain_text_problem(value)
    if problem:
        return f"found {shown(value)}, which {problem}"
    if len(value) > MAX_TEXT_CHARS:
        return f"found {len(value)} characters of text, expected at most {MAX_TEXT_CHARS}"
    if check is not None:
        problem = check(value)
        if problem:
            return f"found {shown(value)}, {problem}"
    return None


def suggest(word: str, choices: tuple[str, ...] | list[str]) -> str:
    """``"; did you mean 'x'?"`` when ``word`` is close to one of ``choices``, else ``""``."""
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f"; did you mean '{close[0]}'?" if close else ""


class Reader:
    """Reads typed values out of plain dictionaries, collecting located issues.

    Parameters
    ----------
    filename : str or None
        File name as the user gave it (``None`` for the UI's forms).
    lines : LineIndex or None
        Line numbers of the file's tables and keys, where known.
    """

    def __init__(self, filename: str | None = None, lines: LineIndex | None = None) -> None:
        self.filename = filename
        self.lines = lines
        self.issues: list[ScheduleIssue] = []

    def add(
        self,
        message: str,
        table: TableKey,
        key: str | None = None,
        where: str | None = None,
        circuit_index: int | None = None,
    ) -> None:
        """Record one problem, located by the table's or key's line."""
        line = None
        if self.lines is not None:
            line = self.lines.key_line(table, key) if key else self.lines.table_line(table)
        self.issues.append(
            ScheduleIssue(
                message,
                file=self.filename,
                line=line,
                where=where,
                key=key,
                circuit_index=circuit_index,
            )
        )

    def unknown_keys(
        self,
        data: Mapping[str, Any],
        allowed: tuple[str, ...],
        table: TableKey,
        where: str,
        circuit_index: int | None = None,
    ) -> None:
        """Report every key of ``data`` not in ``allowed`` (with a suggestion when close)."""
        for key in data:
            if key not in allowed:
                self.add(
                    f"unknown key{suggest(key, allowed)} (expected one of {', '.join(allowed)})",
                    table,
                    key,
                    where,
                    circuit_index,
                )

    def table(self, data: Mapping[str, Any], name: str, default: Any = None) -> Any:
        """The top-level table ``[name]`` of ``data``; ``MISSING`` after reporting a non-table.

        Returns ``default`` when the table is absent.
        """
        raw = data.get(name, default)
        if raw is default or isinstance(raw, dict):
            return raw
        self.add(f"found {found(raw)}, expected a [{name}] table", (), name, f"[{name}]")
        return MISSING

    def value(
        self,
        data: Mapping[str, Any],
        key: str,
        table: TableKey,
        where: str,
        kind: str,
        *,
        required: bool = False,
        default: Any = None,
        check: Check | None = None,
        circuit_index: int | None = None,
    ) -> Any:
        """Read ``data[key]`` as ``kind`` ('text', 'int', 'number', 'bool').

        Returns ``MISSING`` when the key is required but absent or wrong, so
        callers can tell a usable value from a reported problem.
        """
        if key not in data:
            if required:
                self.add(f"missing; expected {KIND_TEXT[kind]}", table, key, where, circuit_index)
                return MISSING
            return default
        value = data[key]
        problem: str | None = None
        if not _KIND_TEST[kind](value):
            problem = f"found {found(value)}, expected {KIND_TEXT[kind]}"
        elif kind == "number":
            value, problem = number_problem(value, check)
        elif kind == "text":
            problem = text_problem(value, check)
        elif check is not None:
            detail = check(value)
            problem = f"found {shown(value)}, {detail}" if detail else None
        if problem:
            self.add(problem, table, key, where, circuit_index)
            return MISSING
        return value
