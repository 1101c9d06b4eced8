"""Load a schedule from TOML text, checking everything and locating every problem.

Loading never stops at the first problem: it reads every table and circuit
it can, then raises :class:`~tri.schedule.errors.ScheduleError` listing all
of them, each with file, line, circuit and key. Nothing is ever written here.
"""

from __future__ import annotations

import datetime as _dt
import difflib
import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import tomlkit
from tomlkit.exceptions import ParseError
from tomlkit.toml_document import TOMLDocument

from tri.engine.profiles import BUILTIN_PROFILES
from tri.schedule.errors import ScheduleError, ScheduleIssue
from tri.schedule.locate import LineIndex, TableKey
from tri.schedule.log_spec import read_log_table
from tri.schedule.model import (
    DEFAULT_LABELS,
    FORMAT_VERSION,
    LOAD_KEYS,
    Circuit,
    PanelInfo,
    Readings,
    Schedule,
    Supply,
    UserProfile,
    parse_phase_text,
)
from tri.schedule.slots import LAYOUTS, PHASES, TWO_COLUMN, slot_phases
from tri.schedule.systems import SYSTEMS
from tri.schedule.use_factors import read_use
from tri.schedule.validate import check_schedule, circuit_where

TOP_KEYS = ("format", "panel", "supply", "readings", "profiles", "log", "circuit")
PANEL_KEYS = (
    "name",
    "system",
    "frequency_hz",
    "spaces",
    "bus_a",
    "main_a",
    "neutral_a",
    "phase_labels",
    "layout",
    "note",
)
SUPPLY_KEYS = (
    "transformer_kva",
    "transformer_z_pct",
    "transformer_x_r",
    "feeder_length_m",
    "feeder_r_ohm_per_km",
    "feeder_x_ohm_per_km",
    "neutral_r_ohm_per_km",
    "neutral_x_ohm_per_km",
)
READINGS_KEYS = ("amps", "volts_ll", "volts_ln", "taken", "note")
PROFILE_KEYS = ("harmonics", "description")
CIRCUIT_KEYS = (
    "slot",
    "phases",
    "poles",
    "name",
    "load_va",
    "load_w",
    "load_a",
    "pf",
    "leading",
    "profile",
    "continuous",
    "locked",
    "breaker_a",
    "note",
    "use",
)
MAX_SPACES = 420
MAX_HARMONIC_ORDER = 100

_MISSING = object()


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


def _type_name(value: Any) -> str:
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


def found(value: Any) -> str:
    """Describe a value found in a file, e.g. ``"'abc' (text)"``."""
    shown = repr(value)
    if len(shown) > 40:
        shown = shown[:37] + "..."
    return f"{shown} ({_type_name(value)})"


def _suggest(word: str, choices: tuple[str, ...] | list[str]) -> str:
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f"; did you mean '{close[0]}'?" if close else ""


class _Reader:
    """Reads typed values out of plain dictionaries, collecting located issues."""

    def __init__(self, filename: str | None, lines: LineIndex | None) -> None:
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
        for key in data:
            if key not in allowed:
                self.add(
                    f"unknown key{_suggest(key, allowed)} (expected one of {', '.join(allowed)})",
                    table,
                    key,
                    where,
                    circuit_index,
                )

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
        check: Callable[[Any], str | None] | None = None,
        circuit_index: int | None = None,
    ) -> Any:
        """Read ``data[key]`` as ``kind`` ('text', 'int', 'number', 'bool').

        Returns ``_MISSING`` when the key is required but absent or wrong, so
        callers can tell a usable value from a reported problem.
        """
        if key not in data:
            if required:
                self.add(f"missing; expected {_KIND_TEXT[kind]}", table, key, where, circuit_index)
                return _MISSING
            return default
        value = data[key]
        ok = _KIND_TEST[kind](value)
        if not ok:
            self.add(
                f"found {found(value)}, expected {_KIND_TEXT[kind]}",
                table,
                key,
                where,
                circuit_index,
            )
            return _MISSING
        if kind == "number":
            value = float(value)
            if not math.isfinite(value):
                self.add(
                    f"found {value!r}, expected a finite number", table, key, where, circuit_index
                )
                return _MISSING
        if check is not None:
            problem = check(value)
            if problem:
                self.add(f"found {value!r}, {problem}", table, key, where, circuit_index)
                return _MISSING
        return value


_KIND_TEXT = {
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


def _positive(v: float) -> str | None:
    return None if v > 0 else "expected a value greater than 0"


def _non_negative(v: float) -> str | None:
    return None if v >= 0 else "expected 0 or more"


def _between(lo: float, hi: float, what: str = "") -> Callable[[float], str | None]:
    def check(v: float) -> str | None:
        return None if lo <= v <= hi else f"expected {lo:g} to {hi:g}{what}"

    return check


def _power_factor(v: float) -> str | None:
    return None if 0 < v <= 1 else "expected a power factor above 0 and at most 1"


def _read_panel(r: _Reader, data: Mapping[str, Any]) -> PanelInfo | None:
    table: TableKey = ("panel",)
    where = "[panel]"
    raw = data.get("panel", _MISSING)
    if raw is _MISSING:
        r.add("missing [panel] table; every schedule needs one", (), None, "[panel]")
        return None
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected a [panel] table", (), "panel", where)
        return None
    r.unknown_keys(raw, PANEL_KEYS, table, where)
    name = r.value(raw, "name", table, where, "text", required=True)
    system = r.value(raw, "system", table, where, "text", required=True)
    if system is not _MISSING and system not in SYSTEMS:
        r.add(
            f"unknown system '{system}'{_suggest(system, list(SYSTEMS))} "
            f"(expected one of {', '.join(SYSTEMS)})",
            table,
            "system",
            where,
        )
        system = _MISSING
    default_f = SYSTEMS[system].default_frequency_hz if system is not _MISSING else 60.0
    frequency = r.value(
        raw,
        "frequency_hz",
        table,
        where,
        "number",
        default=default_f,
        check=_between(40, 70, " Hz (50 or 60 Hz systems)"),
    )
    spaces = r.value(
        raw, "spaces", table, where, "int", required=True, check=_between(1, MAX_SPACES)
    )
    bus = r.value(raw, "bus_a", table, where, "number", required=True, check=_positive)
    main = r.value(raw, "main_a", table, where, "number", check=_positive)
    neutral = r.value(raw, "neutral_a", table, where, "number", check=_positive)
    labels = _read_labels(r, raw, table, where)
    layout = r.value(raw, "layout", table, where, "text", default=TWO_COLUMN)
    if layout is not _MISSING and layout not in LAYOUTS:
        r.add(
            f"found '{layout}', expected \"two-column\" (numbered slots) or "
            '"phases" (each circuit names its phases)',
            table,
            "layout",
            where,
        )
        layout = _MISSING
    r.value(raw, "note", table, where, "text")
    values = (name, system, frequency, spaces, bus, main, neutral, labels, layout)
    if any(v is _MISSING for v in values):
        return None
    return PanelInfo(
        name=name,
        system=system,
        frequency_hz=float(frequency),
        spaces=spaces,
        bus_a=bus,
        main_a=main,
        neutral_a=neutral,
        phase_labels=labels,
        layout=layout,
    )


def _read_labels(r: _Reader, raw: Mapping[str, Any], table: TableKey, where: str) -> Any:
    if "phase_labels" not in raw:
        return DEFAULT_LABELS
    labels = raw["phase_labels"]
    if (
        not isinstance(labels, list)
        or len(labels) != 3
        or not all(isinstance(x, str) and x.strip() for x in labels)
    ):
        r.add(
            f'found {found(labels)}, expected three labels such as ["A", "B", "C"] '
            'or ["L1", "L2", "L3"]',
            table,
            "phase_labels",
            where,
        )
        return _MISSING
    cleaned = tuple(x.strip() for x in labels)
    upper = [x.upper() for x in cleaned]
    if len(set(upper)) != 3 or any(a != b and a.startswith(b) for a in upper for b in upper):
        r.add(
            f"found {cleaned!r}, expected three distinct labels, none the start of another",
            table,
            "phase_labels",
            where,
        )
        return _MISSING
    if any(ch in "-,/ _" for x in cleaned for ch in x):
        r.add("labels may not contain '-', ',', '/', '_' or spaces", table, "phase_labels", where)
        return _MISSING
    return cleaned


def _read_supply(r: _Reader, data: Mapping[str, Any]) -> Supply | None:
    raw = data.get("supply")
    if raw is None:
        return None
    table: TableKey = ("supply",)
    where = "[supply]"
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected a [supply] table", (), "supply", where)
        return None
    r.unknown_keys(raw, SUPPLY_KEYS, table, where)
    checks: dict[str, tuple[bool, Callable[[float], str | None]]] = {
        "transformer_kva": (True, _between(1, 100_000, " kVA")),
        "transformer_z_pct": (True, _between(0.5, 25, " % (distribution transformers)")),
        "transformer_x_r": (True, _between(0.1, 100)),
        "feeder_length_m": (False, _between(0, 10_000, " m")),
        "feeder_r_ohm_per_km": (False, _between(0, 100, " ohm/km")),
        "feeder_x_ohm_per_km": (False, _between(0, 100, " ohm/km")),
        "neutral_r_ohm_per_km": (False, _between(0, 100, " ohm/km")),
        "neutral_x_ohm_per_km": (False, _between(0, 100, " ohm/km")),
    }
    values = {
        key: r.value(raw, key, table, where, "number", required=req, default=0.0, check=chk)
        for key, (req, chk) in checks.items()
    }
    if any(v is _MISSING for v in values.values()):
        return None
    return Supply(**values)


_PAIR_INDEX = {frozenset({0, 1}): 0, frozenset({1, 2}): 1, frozenset({0, 2}): 2}


def _read_readings(r: _Reader, data: Mapping[str, Any], panel: PanelInfo | None) -> Readings | None:
    raw = data.get("readings")
    if raw is None:
        return None
    table: TableKey = ("readings",)
    where = "[readings]"
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected a [readings] table", (), "readings", where)
        return None
    r.unknown_keys(raw, READINGS_KEYS, table, where)
    labels = panel.phase_labels if panel else DEFAULT_LABELS
    system = SYSTEMS.get(panel.system) if panel else None
    ok = True

    def triple(key: str, pairs: bool) -> tuple[tuple[Any, Any, Any], Any]:
        nonlocal ok
        out: list[Any] = [None, None, None]
        neutral = None
        sub = raw.get(key)
        if sub is None:
            return (None, None, None), None
        if not isinstance(sub, dict):
            r.add(
                f"found {found(sub)}, expected a table such as {{ A = 61.0, ... }}",
                table,
                key,
                where,
            )
            ok = False
            return (None, None, None), None
        for name, value in sub.items():
            if not _KIND_TEST["number"](value) or not math.isfinite(float(value)) or value < 0:
                r.add(
                    f"{name} = {found(value)}, expected a finite number, 0 or more",
                    table,
                    key,
                    where,
                )
                ok = False
                continue
            idx = parse_phase_text(str(name), labels)
            if key == "amps" and str(name).upper() == "N":
                neutral = float(value)
                continue
            valid = idx is not None and (
                (pairs and len(idx) == 2 and idx[0] != idx[1]) or (not pairs and len(idx) == 1)
            )
            if not valid:
                want = (
                    "pairs such as "
                    + ", ".join(labels[a] + labels[b] for a, b in ((0, 1), (1, 2), (2, 0)))
                    if pairs
                    else "labels " + ", ".join(labels) + (" or N" if key == "amps" else "")
                )
                r.add(f"unknown name '{name}'; expected {want}", table, key, where)
                ok = False
                continue
            pos = _PAIR_INDEX[frozenset(idx)] if pairs else idx[0]
            out[pos] = float(value)
        return (out[0], out[1], out[2]), neutral

    amps, neutral = triple("amps", pairs=False)
    volts_ll, _ = triple("volts_ll", pairs=True)
    volts_ln, _ = triple("volts_ln", pairs=False)
    if system is not None:
        for key, values, nominal, what in (
            ("volts_ll", volts_ll, system.v_ll, "line-to-line"),
            ("volts_ln", volts_ln, system.v_ln, "line-to-neutral"),
        ):
            for v in values:
                if v is None:
                    continue
                if nominal is None:
                    r.add(f"a {system.key} system has no neutral to measure to", table, key, where)
                    ok = False
                elif not 0.8 * nominal <= v <= 1.2 * nominal:
                    r.add(
                        f"found {v:g} V, expected near the nominal {nominal:g} V {what} "
                        "of the panel's system",
                        table,
                        key,
                        where,
                    )
                    ok = False
    taken = raw.get("taken")
    if taken is not None and not isinstance(taken, str | _dt.date | _dt.time):
        r.add(f"found {found(taken)}, expected text or a date", table, "taken", where)
        ok = False
    r.value(raw, "note", table, where, "text")
    if not ok:
        return None
    return Readings(
        phase_amps=amps,
        neutral_amps=neutral,
        volts_ll=volts_ll,
        volts_ln=volts_ln,
        taken=None if taken is None else str(taken),
    )


def _read_profiles(r: _Reader, data: Mapping[str, Any]) -> tuple[UserProfile, ...] | None:
    raw = data.get("profiles")
    if raw is None:
        return ()
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected [profiles.NAME] tables", (), "profiles", "[profiles]")
        return None
    out: list[UserProfile] = []
    ok = True
    for name, body in raw.items():
        table: TableKey = ("profiles", name)
        where = f"[profiles.{name}]"
        if name in BUILTIN_PROFILES:
            r.add(f"'{name}' is a built-in profile; give yours another name", table, None, where)
            ok = False
            continue
        if not isinstance(body, dict):
            r.add(f"found {found(body)}, expected a table with 'harmonics'", table, None, where)
            ok = False
            continue
        r.unknown_keys(body, PROFILE_KEYS, table, where)
        desc = r.value(body, "description", table, where, "text", default="")
        rows = body.get("harmonics", _MISSING)
        parsed = _read_harmonic_rows(r, rows, table, where)
        if parsed is None or desc is _MISSING:
            ok = False
            continue
        out.append(UserProfile(name=name, harmonics=parsed, description=desc))
    return tuple(out) if ok else None


def _read_harmonic_rows(
    r: _Reader, rows: Any, table: TableKey, where: str
) -> tuple[tuple[int, float, float], ...] | None:
    expected = (
        "expected [[order, magnitude, angle_deg], ...], e.g. [[3, 0.8, 0.0], [5, 0.6, 180.0]]"
    )
    if rows is _MISSING:
        r.add(f"missing; {expected}", table, "harmonics", where)
        return None
    if not isinstance(rows, list):
        r.add(f"found {found(rows)}, {expected}", table, "harmonics", where)
        return None
    out: list[tuple[int, float, float]] = []
    seen: set[int] = set()
    ok = True
    for k, row in enumerate(rows, start=1):
        good = (
            isinstance(row, list)
            and len(row) == 3
            and _KIND_TEST["int"](row[0])
            and all(_KIND_TEST["number"](x) and math.isfinite(float(x)) for x in row[1:])
        )
        if not good:
            r.add(f"entry {k} is {found(row)}; {expected}", table, "harmonics", where)
            ok = False
            continue
        order, mag, ang = int(row[0]), float(row[1]), float(row[2])
        if not 2 <= order <= MAX_HARMONIC_ORDER:
            r.add(
                f"entry {k}: order {order}, expected 2 to {MAX_HARMONIC_ORDER}",
                table,
                "harmonics",
                where,
            )
            ok = False
        elif order in seen:
            r.add(f"entry {k}: order {order} given twice", table, "harmonics", where)
            ok = False
        elif not 0 <= mag <= 5:
            r.add(
                f"entry {k}: magnitude {mag:g}, expected 0 to 5 times the fundamental",
                table,
                "harmonics",
                where,
            )
            ok = False
        seen.add(order)
        out.append((order, mag, ang))
    return tuple(out) if ok else None


def read_circuit(
    r: _Reader,
    raw: Any,
    index: int,
    panel: PanelInfo | None,
    *,
    stand_in: bool = False,
) -> Circuit | None:
    """One ``[[circuit]]`` table as a :class:`Circuit`, or ``None`` after reporting problems.

    With ``stand_in``, a circuit whose only problems are outside its
    placement (load, power factor, ...) still comes back, with neutral
    values in place of the bad ones, so that slot clashes with it are found
    in the same pass. Callers must not use such a stand-in as real data
    (``r.issues`` is not empty then).
    """
    table: TableKey = ("circuit", index)
    name_hint = raw.get("name") if isinstance(raw, dict) else None
    slot_hint = raw.get("slot") if isinstance(raw, dict) else None
    place = (
        f"slot {slot_hint}, "
        if isinstance(slot_hint, int) and not isinstance(slot_hint, bool)
        else ""
    )
    shown = f'"{name_hint}"' if isinstance(name_hint, str) else "unnamed"
    where = f"circuit {index + 1} ({place}{shown})"
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected a [[circuit]] table", table, None, where, index)
        return None
    start = len(r.issues)

    def val(key: str, kind: str, **kw: Any) -> Any:
        return r.value(raw, key, table, where, kind, circuit_index=index, **kw)

    r.unknown_keys(raw, CIRCUIT_KEYS, table, where, index)
    name = val("name", "text", required=True)
    if isinstance(name, str) and not name.strip():
        r.add("found an empty name, expected the circuit's purpose", table, "name", where, index)
    poles = val("poles", "int", check=_between(1, 3, " poles"))
    given = [k for k in LOAD_KEYS if k in raw]
    load_kind, load_value = "va", _MISSING
    if not given:
        r.add(
            "missing load; expected one of load_va (VA), load_w (W, with pf) or load_a (A)",
            table,
            None,
            where,
            index,
        )
    elif len(given) > 1:
        r.add(
            f"gives {' and '.join(given)}; expected exactly one load key",
            table,
            given[1],
            where,
            index,
        )
    else:
        load_kind = LOAD_KEYS[given[0]]
        load_value = val(given[0], "number", check=_non_negative)
    pf = val("pf", "number", default=1.0, check=_power_factor)
    leading = val("leading", "bool", default=False)
    profile = val("profile", "text", default="linear")
    continuous = val("continuous", "bool", default=False)
    locked = val("locked", "bool", default=False)
    breaker = val("breaker_a", "number", check=_positive)
    note = val("note", "text", default="")
    use = read_use(r.add, raw, table, where, index)
    slot = val("slot", "int", check=_between(1, MAX_SPACES, " (slot numbers start at 1)"))
    phases: Any = None
    if "phases" in raw:
        phases = _read_phases(r, raw["phases"], table, where, index, panel)
    layout = panel.layout if panel else None
    if layout == TWO_COLUMN and "phases" in raw:
        r.add(
            "this panel uses numbered slots (layout = \"two-column\"); give 'slot' instead "
            "of 'phases'",
            table,
            "phases",
            where,
            index,
        )
    if layout == PHASES and "slot" in raw:
        r.add(
            "this board has no slot geometry (layout = \"phases\"); give 'phases' instead "
            "of 'slot'",
            table,
            "slot",
            where,
            index,
        )
    if panel is None:
        return None
    if len(r.issues) > start:
        geometry_ok = all(
            i.key not in ("slot", "phases", "poles", "name") for i in r.issues[start:]
        )
        if not (stand_in and geometry_ok):
            return None
        name, load_kind, load_value = name if isinstance(name, str) else "", "va", 0.0
        pf, leading, profile, continuous, locked, breaker, note = (
            1.0,
            False,
            "linear",
            False,
            False,
            None,
            "",
        )
    if poles is None:
        poles = len(phases) if phases else 1
    placed: tuple[int, ...] | None = None
    if panel.layout == TWO_COLUMN and slot is not None:
        placed = slot_phases(slot, poles)
    elif panel.layout == PHASES and phases is not None:
        placed = phases
    return Circuit(
        name=name.strip(),
        poles=poles,
        slot=slot if panel.layout == TWO_COLUMN else None,
        phases=placed,
        load_kind=load_kind,
        load_value=load_value,
        pf=pf,
        leading=leading,
        profile=profile,
        continuous=continuous,
        locked=locked,
        breaker_a=breaker,
        note=note,
        use=use or (),
        source_index=index,
    )


def _read_phases(
    r: _Reader, raw: Any, table: TableKey, where: str, index: int, panel: PanelInfo | None
) -> tuple[int, ...] | None:
    labels = panel.phase_labels if panel else DEFAULT_LABELS
    text = "".join(raw) if isinstance(raw, list) and all(isinstance(x, str) for x in raw) else raw
    if not isinstance(text, str):
        r.add(
            f'found {found(raw)}, expected text such as "A", "BC" or "ABC"',
            table,
            "phases",
            where,
            index,
        )
        return None
    parsed = parse_phase_text(text, labels)
    if parsed is None or not 1 <= len(parsed) <= 3:
        r.add(
            f"unknown phase label in '{text}'; expected labels {', '.join(labels)} "
            "(set by [panel] phase_labels), e.g. "
            f'"{labels[0]}", "{labels[1]}{labels[2]}"',
            table,
            "phases",
            where,
            index,
        )
        return None
    if len(set(parsed)) != len(parsed):
        r.add(
            f"'{text}' names a phase twice; expected distinct phases", table, "phases", where, index
        )
        return None
    return parsed


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


def build_schedule(
    data: Mapping[str, Any], filename: str | None = None, lines: LineIndex | None = None
) -> Schedule:
    """Build and check a :class:`Schedule` from plain TOML data (dicts and lists).

    Raises
    ------
    ScheduleError
        With every problem found.
    """
    r = _Reader(filename, lines)
    for key in data:
        if key not in TOP_KEYS:
            r.add(
                f"unknown top-level key or table{_suggest(key, TOP_KEYS)} "
                f"(expected {', '.join(TOP_KEYS)})",
                (),
                key,
                "top level",
            )
    fmt = data.get("format", _MISSING)
    if fmt is _MISSING:
        r.add(
            f"missing; expected format = {FORMAT_VERSION} at the top of the file",
            (),
            "format",
            "top level",
        )
    elif not _KIND_TEST["int"](fmt) or fmt < 1:
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
    panel = _read_panel(r, data)
    supply = _read_supply(r, data)
    readings = _read_readings(r, data, panel)
    profiles = _read_profiles(r, data)
    log = read_log_table(r, data, panel.phase_labels if panel else DEFAULT_LABELS)
    raw_circuits = data.get("circuit", [])
    circuits: list[Circuit] = []
    if isinstance(raw_circuits, dict):
        raw_circuits = [raw_circuits]
        r.add("use [[circuit]] (double brackets) for each circuit", ("circuit",), None, "[circuit]")
    if not isinstance(raw_circuits, list):
        r.add(
            f"found {found(raw_circuits)}, expected [[circuit]] tables", (), "circuit", "top level"
        )
        raw_circuits = []
    for index, raw in enumerate(raw_circuits):
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
                circuit_where(src, circuits[i], model),
                src,
            )
    if r.issues:
        raise ScheduleError(sorted(r.issues, key=lambda x: (x.line is None, x.line or 0)))
    return model


def load_schedule(path: str | Path) -> ScheduleFile:
    """Read and check a schedule file.

    Raises
    ------
    ScheduleError
        When the file cannot be read or has problems; nothing is written.
    """
    p = Path(path)
    name = str(path)
    try:
        raw = p.read_bytes()
    except FileNotFoundError:
        raise ScheduleError([ScheduleIssue("no such file", file=name)]) from None
    except IsADirectoryError:
        raise ScheduleError(
            [ScheduleIssue("is a folder, expected a .toml file", file=name)]
        ) from None
    except PermissionError:
        raise ScheduleError(
            [ScheduleIssue("permission denied reading the file", file=name)]
        ) from None
    except OSError as exc:
        raise ScheduleError([ScheduleIssue(f"cannot read: {exc.strerror}", file=name)]) from None
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
