"""Read the optional ``[readings]`` table: amperes and volts measured on site.

``amps``, ``volts_ll`` and ``volts_ln`` are small tables keyed by phase
label (``A``, ``L1`` ...), phase pair (``AB``, ``L1-L2``) or ``N``; their
values are checked here, voltages against the nominal of the panel's system.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Mapping
from typing import Any

from tri.schedule.locate import TableKey
from tri.schedule.model import DEFAULT_LABELS, PanelInfo, Readings, parse_phase_text
from tri.schedule.reader import MISSING, Reader, found, number_problem, text_problem
from tri.schedule.rules import READING_A, in_range, short_text
from tri.schedule.systems import SYSTEMS, SupplySystem

READINGS_KEYS = ("amps", "volts_ll", "volts_ln", "taken", "note")

_TABLE: TableKey = ("readings",)
_WHERE = "[readings]"
_PAIR_INDEX = {frozenset({0, 1}): 0, frozenset({1, 2}): 1, frozenset({0, 2}): 2}
_Triple = tuple[Any, Any, Any]
_AMPS_CHECK = in_range(READING_A, " A")
#: Volts are first checked for sign and size, then against the system's nominal.
_VOLTS_CHECK = in_range((0.0, 100_000.0), " V")


def read_readings(r: Reader, data: Mapping[str, Any], panel: PanelInfo | None) -> Readings | None:
    """The ``[readings]`` table of ``data`` (a whole document); ``None`` if absent or bad."""
    raw = r.table(data, "readings")
    if raw is None or raw is MISSING:
        return None
    r.unknown_keys(raw, READINGS_KEYS, _TABLE, _WHERE)
    labels = panel.phase_labels if panel else DEFAULT_LABELS
    system = SYSTEMS.get(panel.system) if panel else None
    start = len(r.issues)
    amps, neutral = _read_triple(r, raw, "amps", labels, pairs=False)
    volts_ll, _ = _read_triple(r, raw, "volts_ll", labels, pairs=True)
    volts_ln, _ = _read_triple(r, raw, "volts_ln", labels, pairs=False)
    if system is not None and panel is not None:
        _check_voltages(r, system, "volts_ll", volts_ll, system.v_ll, "line-to-line")
        _check_voltages(r, system, "volts_ln", volts_ln, _ln_nominal(panel), "line-to-neutral")
    taken = raw.get("taken")
    if taken is not None and not isinstance(taken, str | _dt.date | _dt.time):
        r.add(f"found {found(taken)}, expected text or a date", _TABLE, "taken", _WHERE)
    elif isinstance(taken, str) and text_problem(taken, short_text):
        r.add(str(text_problem(taken, short_text)), _TABLE, "taken", _WHERE)
    bad = len(r.issues) > start
    r.value(raw, "note", _TABLE, _WHERE, "text")
    if bad:
        return None
    return Readings(
        phase_amps=amps,
        neutral_amps=neutral,
        volts_ll=volts_ll,
        volts_ln=volts_ln,
        taken=None if taken is None else str(taken),
    )


def _read_triple(
    r: Reader, raw: Mapping[str, Any], key: str, labels: tuple[str, str, str], *, pairs: bool
) -> tuple[_Triple, Any]:
    """One of ``amps``/``volts_ll``/``volts_ln`` as values in phase (or pair) order, and N."""
    out: list[Any] = [None, None, None]
    neutral = None
    sub = raw.get(key)
    if sub is None:
        return (None, None, None), None
    if not isinstance(sub, dict):
        r.add(
            f"found {found(sub)}, expected a table such as {{ A = 61.0, ... }}",
            _TABLE,
            key,
            _WHERE,
        )
        return (None, None, None), None
    check = _AMPS_CHECK if key == "amps" else _VOLTS_CHECK
    for name, value in sub.items():
        number, problem = number_problem(value, check)
        if problem:
            r.add(f"{name} = {problem.removeprefix('found ')}", _TABLE, key, _WHERE)
            continue
        idx = parse_phase_text(str(name), labels)
        if key == "amps" and str(name).upper() == "N":
            neutral = number
            continue
        valid = idx is not None and (
            (pairs and len(idx) == 2 and idx[0] != idx[1]) or (not pairs and len(idx) == 1)
        )
        if idx is None or not valid:
            r.add(
                f"unknown name '{name}'; expected {_expected(key, labels, pairs)}",
                _TABLE,
                key,
                _WHERE,
            )
            continue
        pos = _PAIR_INDEX[frozenset(idx)] if pairs else idx[0]
        out[pos] = number
    return (out[0], out[1], out[2]), neutral


def _expected(key: str, labels: tuple[str, str, str], pairs: bool) -> str:
    if pairs:
        return "pairs such as " + ", ".join(
            labels[a] + labels[b] for a, b in ((0, 1), (1, 2), (2, 0))
        )
    return "labels " + ", ".join(labels) + (" or N" if key == "amps" else "")


def _ln_nominal(panel: PanelInfo) -> float | tuple[float, float, float] | None:
    """Nominal volts to neutral: one figure, or per phase on a high-leg delta [V]."""
    system = panel.supply_system
    high = panel.effective_high_leg
    if high is None or system.v_ln is None:
        return system.v_ln
    nominal = [system.v_ln] * 3
    nominal[high] = math.sqrt(3.0) / 2.0 * system.v_ll  # the high leg, 208 V on 240/120D
    return (nominal[0], nominal[1], nominal[2])


def _check_voltages(
    r: Reader,
    system: SupplySystem,
    key: str,
    values: _Triple,
    nominals: float | tuple[float, float, float] | None,
    what: str,
) -> None:
    for k, v in enumerate(values):
        nominal = nominals[k] if isinstance(nominals, tuple) else nominals
        if v is None:
            continue
        if nominal is None:
            r.add(f"a {system.key} system has no neutral to measure to", _TABLE, key, _WHERE)
        elif not 0.8 * nominal <= v <= 1.2 * nominal:
            r.add(
                f"found {v:g} V, expected near the nominal {nominal:.4g} V {what} "
                "of the panel's system",
                _TABLE,
                key,
                _WHERE,
            )
