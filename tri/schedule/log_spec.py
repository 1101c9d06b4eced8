"""The ``[log]`` table: where a logger's export is and which columns mean what.

Only the table is read here (every problem located in the schedule); the
export itself is read by :mod:`tri.schedule.log_file` when a figure needs it,
so loading a schedule never touches the log or imports pandas.

```toml
[log]
file = "lp2-week.csv"            # relative to the schedule
time = "Timestamp"               # ISO 8601 times
amps = { A = "I1", B = "I2", C = "I3", N = "IN" }
volts_ll = { AB = "U12", BC = "U23", CA = "U31" }   # optional
demand_minutes = 15              # default 15
demand_window = "sliding"        # or "block"
timezone = "America/Chicago"     # optional: the zone of times written without an offset
stamp = "end"                    # "end" (default) or "start" of each interval
decimal = "."                    # or "," for exports such as 12,5
```
"""

from __future__ import annotations

import math
import zoneinfo
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, Literal, Protocol

from tri.schedule.errors import ScheduleIssue

LOG_KEYS = (
    "file",
    "time",
    "amps",
    "volts_ll",
    "demand_minutes",
    "demand_window",
    "timezone",
    "stamp",
    "decimal",
    "note",
)
DEFAULT_DEMAND_MINUTES = 15.0
#: Longest demand window accepted [min] (a day; 15 and 30 are usual).
MAX_DEMAND_MINUTES = 1440.0
WINDOWS = ("sliding", "block")
STAMPS = ("end", "start")
DECIMALS = (".", ",")
_PAIRS = ((0, 1), (1, 2), (2, 0))
_PAIR_INDEX = {frozenset(p): i for i, p in enumerate(_PAIRS)}


@dataclass(frozen=True)
class LogSpec:
    """The ``[log]`` table.

    Attributes
    ----------
    file : str
        The export's path as written (relative to the schedule's folder).
    time : str
        Column of the times.
    amps : tuple of 3 str
        Columns of the phase currents, in phase order [A].
    neutral : str or None
        Column of the neutral current [A].
    volts_ll : tuple of 3 str or None
        Columns of the line voltages AB, BC, CA [V].
    demand_minutes : float
        Demand window [min].
    demand_window : {"sliding", "block"}
    timezone : str or None
        IANA zone name of times written without an offset.
    stamp : {"end", "start"}
        Whether a row's time is the end or the start of its interval.
    decimal : {".", ","}
        Decimal mark of the numbers.
    """

    file: str
    time: str
    amps: tuple[str, str, str]
    neutral: str | None = None
    volts_ll: tuple[str, str, str] | None = None
    demand_minutes: float = DEFAULT_DEMAND_MINUTES
    demand_window: Literal["sliding", "block"] = "sliding"
    timezone: str | None = None
    stamp: Literal["end", "start"] = "end"
    decimal: str = "."

    def columns(self) -> tuple[str, ...]:
        """Every column the log needs, time first."""
        cols = [self.time, *self.amps]
        if self.neutral is not None:
            cols.append(self.neutral)
        if self.volts_ll is not None:
            cols.extend(self.volts_ll)
        return tuple(dict.fromkeys(cols))


def log_issue(
    path: str, message: str, line: int | None = None, key: str | None = None
) -> ScheduleIssue:
    """A problem in the log file itself at ``line`` (the header is line 1), column ``key``."""
    return ScheduleIssue(message, file=path, line=line, where="log", key=key)


class IssueSink(Protocol):
    """Collects a located problem (the schedule loader's reader)."""

    def add(
        self, message: str, table: Any, key: str | None = None, where: str | None = None
    ) -> None:
        """Record ``message`` at ``table``/``key``."""


class _Counting:
    """Passes problems on and counts them."""

    def __init__(self, sink: IssueSink) -> None:
        self.sink = sink
        self.count = 0

    def add(
        self, message: str, table: Any, key: str | None = None, where: str | None = None
    ) -> None:
        self.count += 1
        self.sink.add(message, table, key, where)


def _shown(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def read_log_table(
    r: IssueSink, data: Mapping[str, Any], labels: tuple[str, str, str]
) -> LogSpec | None:
    """Read and check ``[log]``; ``None`` when absent or wrong (problems go to ``r``).

    Parameters
    ----------
    r : IssueSink
        Receives every problem, located at ``("log",)`` and the key.
    data : mapping
        The whole document as plain data.
    labels : tuple of 3 str
        The panel's phase labels (the keys of ``amps`` and ``volts_ll``).
    """
    raw = data.get("log")
    if raw is None:
        return None
    table, where = ("log",), "[log]"
    if not isinstance(raw, dict):
        r.add(f"found {_shown(raw)}, expected a [log] table", (), "log", where)
        return None
    r = _Counting(r)
    for key in raw:
        if key not in LOG_KEYS:
            r.add(f"unknown key (expected one of {', '.join(LOG_KEYS)})", table, key, where)
    text = {}
    for key in ("file", "time"):
        value = raw.get(key)
        if not isinstance(value, str) or not value.strip():
            got = "missing" if value is None else f"found {_shown(value)}"
            r.add(f"{got}; expected text in quotes (a {key} name)", table, key, where)
        else:
            text[key] = value
    amps, neutral = _columns(r, raw, "amps", labels, pairs=False)
    if "amps" not in raw:
        r.add(
            "missing; expected the current columns, e.g. "
            f'{{ {labels[0]} = "I1", {labels[1]} = "I2", {labels[2]} = "I3", N = "IN" }}',
            table,
            "amps",
            where,
        )
    volts, _ = _columns(r, raw, "volts_ll", labels, pairs=True)
    minutes = _demand_minutes(r, raw, table, where)
    choices = _choices(r, raw, table, where)
    zone = _zone(r, raw, table, where)
    if "note" in raw and not isinstance(raw["note"], str):
        r.add(f"found {_shown(raw['note'])}, expected text", table, "note", where)
    if r.count or amps is None or len(text) < 2:
        return None
    return LogSpec(
        file=text["file"],
        time=text["time"],
        amps=amps,  # type: ignore[arg-type]
        neutral=neutral,
        volts_ll=volts,  # type: ignore[arg-type]
        demand_minutes=float(minutes),
        demand_window=choices["demand_window"],
        timezone=zone,
        stamp=choices["stamp"],
        decimal=choices["decimal"],
    )


def _demand_minutes(
    r: IssueSink, raw: Mapping[str, Any], table: tuple[str, ...], where: str
) -> Any:
    """``demand_minutes`` as written [min] (its default when absent); a problem to ``r``
    unless above 0 and at most ``MAX_DEMAND_MINUTES``."""
    minutes = raw.get("demand_minutes", DEFAULT_DEMAND_MINUTES)
    if (
        isinstance(minutes, bool)
        or not isinstance(minutes, int | float)
        or not math.isfinite(float(minutes))
        or not 0 < float(minutes) <= MAX_DEMAND_MINUTES
    ):
        r.add(
            f"found {_shown(minutes)}, expected minutes above 0 and at most "
            f"{MAX_DEMAND_MINUTES:g} (15 is usual)",
            table,
            "demand_minutes",
            where,
        )
    return minutes


def _choices(
    r: IssueSink, raw: Mapping[str, Any], table: tuple[str, ...], where: str
) -> dict[str, Any]:
    """``demand_window``, ``stamp`` and ``decimal`` as written (defaults when absent);
    a problem to ``r`` for a value outside its choices."""
    choices = {}
    for key, allowed, default in (
        ("demand_window", WINDOWS, "sliding"),
        ("stamp", STAMPS, "end"),
        ("decimal", DECIMALS, "."),
    ):
        value = raw.get(key, default)
        if value not in allowed:
            options = " or ".join(f'"{a}"' for a in allowed)
            r.add(f"found {_shown(value)}, expected {options}", table, key, where)
        choices[key] = value
    return choices


def _zone(r: IssueSink, raw: Mapping[str, Any], table: tuple[str, ...], where: str) -> Any:
    """``timezone`` as written (None when absent); a problem to ``r`` unless a zone name."""
    zone = raw.get("timezone")
    if zone is not None and not _is_zone(zone):
        r.add(
            f"found {_shown(zone)}, expected a time-zone name such as "
            '"America/Chicago" or "Europe/Berlin"',
            table,
            "timezone",
            where,
        )
    return zone


def _is_zone(name: Any) -> bool:
    if not isinstance(name, str) or not name.strip():
        return False
    try:
        zoneinfo.ZoneInfo(name)
    except (zoneinfo.ZoneInfoNotFoundError, ValueError, OSError):
        return False
    return True


def _columns(
    r: IssueSink, raw: Mapping[str, Any], key: str, labels: tuple[str, str, str], *, pairs: bool
) -> tuple[tuple[str, ...] | None, str | None]:
    """Column names by phase (or line pair) from an inline table; all three needed."""
    from tri.schedule.model import parse_phase_text

    sub = raw.get(key)
    if sub is None:
        return None, None
    table, where = ("log",), "[log]"
    names = [labels[a] + labels[b] for a, b in _PAIRS] if pairs else [*labels, "N"]
    if not isinstance(sub, dict):
        r.add(
            f"found {_shown(sub)}, expected a table of column names by "
            + ("line pair" if pairs else "phase")
            + f" ({', '.join(names)})",
            table,
            key,
            where,
        )
        return None, None
    out: list[str | None] = [None, None, None]
    neutral = None
    ok = True
    for name, column in sub.items():
        if not isinstance(column, str) or not column.strip():
            r.add(f"{name} = {_shown(column)}, expected a column name in quotes", table, key, where)
            ok = False
            continue
        if not pairs and str(name).upper() == "N":
            neutral = column
            continue
        idx = parse_phase_text(str(name), labels)
        valid = idx is not None and (
            (pairs and len(idx) == 2 and idx[0] != idx[1]) or (not pairs and len(idx) == 1)
        )
        if not valid:
            r.add(
                f"'{name}' is not "
                + ("a line pair" if pairs else "a phase")
                + f" of this panel; expected {', '.join(names)} (the panel's phase labels "
                "are set in [panel] phase_labels)",
                table,
                key,
                where,
            )
            ok = False
            continue
        out[_PAIR_INDEX[frozenset(idx)] if pairs else idx[0]] = column  # type: ignore[index,arg-type]
    if ok and any(c is None for c in out):
        missing = [names[i] for i in range(3) if out[i] is None]
        r.add(f"no column for {', '.join(missing)}; all three are needed", table, key, where)
        ok = False
    if not ok:
        return None, None
    return tuple(out), neutral  # type: ignore[arg-type]
