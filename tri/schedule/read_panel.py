"""Read the ``[panel]`` table: name, system, ratings, phase labels, layout.

Scalar keys are declared in :data:`PANEL_RULES` (one line per key); the
keys with their own grammar (``system``, ``phase_labels``, ``layout``) are
read by the functions below.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from tri.schedule.locate import TableKey
from tri.schedule.model import DEFAULT_LABELS, PanelInfo
from tri.schedule.read_wiring import PANEL_WIRING_KEYS, read_panel_wiring
from tri.schedule.reader import MISSING, Reader, found, suggest
from tri.schedule.rules import RATING_A, Rule, between, in_range, read_rules, short_text
from tri.schedule.slots import LAYOUTS, TWO_COLUMN
from tri.schedule.systems import SYSTEMS
from tri.schedule.text import plain_text_problem

MAX_SPACES = 420
MAX_LABEL_CHARS = 3

#: Scalar keys of ``[panel]`` read after ``system`` (whose catalogue entry
#: gives the default frequency).
PANEL_RULES: dict[str, Rule] = {
    "spaces": Rule("int", between(1, MAX_SPACES), required=True),
    "bus_a": Rule("number", in_range(RATING_A, " A"), required=True),
    "main_a": Rule("number", in_range(RATING_A, " A")),
    "neutral_a": Rule("number", in_range(RATING_A, " A")),
}
PANEL_KEYS = (
    "name",
    "system",
    "frequency_hz",
    *PANEL_RULES,
    "phase_labels",
    "layout",
    "note",
    *PANEL_WIRING_KEYS,
)

_TABLE: TableKey = ("panel",)
_WHERE = "[panel]"


def read_panel(r: Reader, data: Mapping[str, Any]) -> PanelInfo | None:
    """The ``[panel]`` table of ``data`` (a whole document), or ``None`` after reporting."""
    raw = data.get("panel", MISSING)
    if raw is MISSING:
        r.add("missing [panel] table; every schedule needs one", (), None, _WHERE)
        return None
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected a [panel] table", (), "panel", _WHERE)
        return None
    r.unknown_keys(raw, PANEL_KEYS, _TABLE, _WHERE)
    name = r.value(raw, "name", _TABLE, _WHERE, "text", required=True, check=short_text)
    system = _read_system(r, raw)
    default_f = SYSTEMS[system].default_frequency_hz if system is not MISSING else 60.0
    frequency = r.value(
        raw,
        "frequency_hz",
        _TABLE,
        _WHERE,
        "number",
        default=default_f,
        check=between(40, 70, " Hz (50 or 60 Hz systems)"),
    )
    values = read_rules(r, raw, PANEL_RULES, _TABLE, _WHERE)
    labels = read_labels(r, raw, _TABLE, _WHERE)
    layout = _read_layout(r, raw)
    r.value(raw, "note", _TABLE, _WHERE, "text")
    wiring = read_panel_wiring(r, raw, system, labels, layout, _TABLE, _WHERE)
    everything = (name, system, frequency, labels, layout, *values.values(), *wiring.values())
    if any(v is MISSING for v in everything):
        return None
    return PanelInfo(
        name=name,
        system=system,
        frequency_hz=float(frequency),
        phase_labels=labels,
        layout=layout,
        **values,
        **wiring,
    )


def _read_system(r: Reader, raw: Mapping[str, Any]) -> Any:
    system = r.value(raw, "system", _TABLE, _WHERE, "text", required=True)
    if system is not MISSING and system not in SYSTEMS:
        r.add(
            f"unknown system '{system}'{suggest(system, list(SYSTEMS))} "
            f"(expected one of {', '.join(SYSTEMS)})",
            _TABLE,
            "system",
            _WHERE,
        )
        return MISSING
    return system


def _read_layout(r: Reader, raw: Mapping[str, Any]) -> Any:
    layout = r.value(raw, "layout", _TABLE, _WHERE, "text", default=TWO_COLUMN)
    if layout is not MISSING and layout not in LAYOUTS:
        r.add(
            f"found '{layout}', expected \"two-column\" (numbered slots) or "
            '"phases" (each circuit names its phases)',
            _TABLE,
            "layout",
            _WHERE,
        )
        return MISSING
    return layout


def read_labels(r: Reader, raw: Mapping[str, Any], table: TableKey, where: str) -> Any:
    """``phase_labels`` of ``raw``: three distinct labels, none the start of another.

    Each label is 1 to :data:`MAX_LABEL_CHARS` letters or digits, and not ``N``
    (the neutral's name in readings). Returns the default ``("A", "B", "C")``
    when absent, ``MISSING`` after reporting.
    """
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
        return MISSING
    for x in labels:
        problem = plain_text_problem(x)
        if problem:
            r.add(f"found {found(x)}, which {problem}", table, "phase_labels", where)
            return MISSING
    cleaned = tuple(x.strip() for x in labels)
    upper = [x.upper() for x in cleaned]
    if len(set(upper)) != 3 or any(a != b and a.startswith(b) for a in upper for b in upper):
        r.add(
            f"found {cleaned!r}, expected three distinct labels, none the start of another",
            table,
            "phase_labels",
            where,
        )
        return MISSING
    if not all(x.isalnum() and len(x) <= MAX_LABEL_CHARS for x in cleaned):
        r.add(
            f"found {cleaned!r}, expected labels of 1 to {MAX_LABEL_CHARS} letters or digits "
            "(no '-', ',', '/', '_' or spaces)",
            table,
            "phase_labels",
            where,
        )
        return MISSING
    if "N" in upper:
        r.add("'N' names the neutral; expected other phase labels", table, "phase_labels", where)
        return MISSING
    return cleaned
