"""Read the optional ``[profiles.NAME]`` tables: harmonic spectra defined in the file.

Each profile is a list of ``[order, magnitude, angle_deg]`` rows (magnitude
relative to the fundamental); orders run from 2 to :data:`MAX_HARMONIC_ORDER`.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from tri.engine.profiles import BUILTIN_PROFILES
from tri.schedule.locate import TableKey
from tri.schedule.model import UserProfile
from tri.schedule.reader import MISSING, Reader, found, is_kind, number_problem, text_problem
from tri.schedule.rules import (
    ANGLE_DEG,
    HARMONIC_MAGNITUDE,
    MAX_PROFILES,
    in_range,
    short_text,
)

PROFILE_KEYS = ("harmonics", "description")
MAX_HARMONIC_ORDER = 100

_EXPECTED_ROWS = (
    "expected [[order, magnitude, angle_deg], ...], e.g. [[3, 0.8, 0.0], [5, 0.6, 180.0]]"
)


def read_profiles(r: Reader, data: Mapping[str, Any]) -> tuple[UserProfile, ...] | None:
    """Every ``[profiles.NAME]`` of ``data`` (a whole document); ``None`` after reporting."""
    raw = data.get("profiles")
    if raw is None:
        return ()
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected [profiles.NAME] tables", (), "profiles", "[profiles]")
        return None
    if len(raw) > MAX_PROFILES:
        r.add(
            f"{len(raw)} profiles, expected at most {MAX_PROFILES}",
            ("profiles",),
            None,
            "[profiles]",
        )
        return None
    out: list[UserProfile] = []
    ok = True
    for name, body in raw.items():
        profile = _read_profile(r, name, body)
        if profile is None:
            ok = False
        else:
            out.append(profile)
    return tuple(out) if ok else None


def _read_profile(r: Reader, name: str, body: Any) -> UserProfile | None:
    table: TableKey = ("profiles", name)
    where = f"[profiles.{name}]"
    problem = text_problem(name, short_text)
    if problem:
        r.add(f"profile name: {problem}", table, None, where)
    elif name in BUILTIN_PROFILES:
        r.add(f"'{name}' is a built-in profile; give yours another name", table, None, where)
        return None
    if not isinstance(body, dict):
        r.add(f"found {found(body)}, expected a table with 'harmonics'", table, None, where)
        return None
    r.unknown_keys(body, PROFILE_KEYS, table, where)
    desc = r.value(body, "description", table, where, "text", default="")
    parsed = read_harmonic_rows(r, body.get("harmonics", MISSING), table, where)
    if parsed is None or desc is MISSING or problem:
        return None
    return UserProfile(name=name, harmonics=parsed, description=desc)


def read_harmonic_rows(
    r: Reader, rows: Any, table: TableKey, where: str
) -> tuple[tuple[int, float, float], ...] | None:
    """``harmonics`` rows as ``(order, magnitude [pu], angle [deg])``; ``None`` after reporting."""
    if rows is MISSING:
        r.add(f"missing; {_EXPECTED_ROWS}", table, "harmonics", where)
        return None
    if not isinstance(rows, list):
        r.add(f"found {found(rows)}, {_EXPECTED_ROWS}", table, "harmonics", where)
        return None
    out: list[tuple[int, float, float]] = []
    seen: set[int] = set()
    ok = True
    for k, row in enumerate(rows, start=1):
        if not (
            isinstance(row, list)
            and len(row) == 3
            and is_kind("int", row[0])
            and all(is_kind("number", x) for x in row[1:])
        ):
            r.add(f"entry {k} is {found(row)}; {_EXPECTED_ROWS}", table, "harmonics", where)
            ok = False
            continue
        problem = _row_problem(row, seen)
        if problem:
            r.add(f"entry {k}: {problem}", table, "harmonics", where)
            ok = False
            continue
        order, mag, ang = int(row[0]), float(row[1]), float(row[2])
        seen.add(order)
        out.append((order, mag, ang))
    return tuple(out) if ok else None


_MAGNITUDE_CHECK = in_range(HARMONIC_MAGNITUDE, " times the fundamental")
_ANGLE_CHECK = in_range(ANGLE_DEG, " deg")


def _row_problem(row: list[Any], seen: set[int]) -> str | None:
    order = row[0]
    if not 2 <= order <= MAX_HARMONIC_ORDER:
        return f"order {found(order).split(' (')[0]}, expected 2 to {MAX_HARMONIC_ORDER}"
    if order in seen:
        return f"order {order} given twice"
    _, problem = number_problem(row[1], _MAGNITUDE_CHECK)
    if problem:
        return f"magnitude {problem.removeprefix('found ')}"
    _, problem = number_problem(row[2], _ANGLE_CHECK)
    if problem:
        return f"angle {problem.removeprefix('found ')}"
    return None
