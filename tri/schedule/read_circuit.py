"""Read one ``[[circuit]]`` table: placement (slot or phases), load and its attributes.

Scalar keys are declared in :data:`CIRCUIT_RULES` (one line per key); the
load (exactly one of ``load_va``, ``load_w``, ``load_a``) and ``phases``
have their own readers below. Checks that involve other circuits (two
breakers in one slot) live in :mod:`tri.schedule.validate`.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from tri.schedule.errors import name_circuit
from tri.schedule.feeds import FEED_KEYS, check_feeder_circuit, read_feed
from tri.schedule.locate import TableKey
from tri.schedule.model import (
    DEFAULT_LABELS,
    LOAD_KEYS,
    Circuit,
    LoadKind,
    PanelInfo,
    parse_phase_text,
)
from tri.schedule.read_panel import MAX_SPACES
from tri.schedule.read_wiring import read_leg_values
from tri.schedule.reader import MISSING, Reader, found, shown
from tri.schedule.rules import (
    BREAKER_A,
    LOAD_A,
    LOAD_VA,
    Rule,
    between,
    in_range,
    power_factor,
    read_rules,
    short_text,
    zero_or_in_range,
)
from tri.schedule.slots import PHASES, TWO_COLUMN, slot_phases
from tri.schedule.use_factors import read_use

CIRCUIT_RULES: dict[str, Rule] = {
    "name": Rule("text", short_text, required=True),
    "poles": Rule("int", between(1, 3, " poles")),
    "pf": Rule("number", power_factor, default=1.0),
    "leading": Rule("bool", default=False),
    "profile": Rule("text", short_text, default="linear"),
    "continuous": Rule("bool", default=False),
    "locked": Rule("bool", default=False),
    "breaker_a": Rule("number", in_range(BREAKER_A, " A")),
    "note": Rule("text", default=""),
    "slot": Rule("int", between(1, MAX_SPACES, " (slot numbers start at 1)")),
    "neutral": Rule("bool", default=False),
    "shared_neutral": Rule("text", short_text),
    "handle_tied": Rule("bool", default=False),
    "spare": Rule("bool", default=False),
    "rcd": Rule("text", short_text),
}
#: The check of each load key (a circuit gives exactly one).
LOAD_CHECKS = {
    "load_va": zero_or_in_range(LOAD_VA, " VA"),
    "load_w": zero_or_in_range(LOAD_VA, " W"),
    "load_a": zero_or_in_range(LOAD_A, " A"),
}
_PLACEMENT_KEYS = ("slot", "phases", "poles", "name")
#: Every key a circuit may hold, placement first (the order of messages).
CIRCUIT_KEYS = (
    *_PLACEMENT_KEYS,
    *LOAD_KEYS,
    *(k for k in CIRCUIT_RULES if k not in _PLACEMENT_KEYS),
    *FEED_KEYS,
    "use",
)

#: What a circuit whose only problems lie outside its placement stands in with.
_STAND_IN = {
    "pf": 1.0,
    "leading": False,
    "profile": "linear",
    "continuous": False,
    "locked": False,
    "breaker_a": None,
    "note": "",
    "neutral": False,
    "shared_neutral": None,
    "handle_tied": False,
    "spare": False,
    "rcd": None,
}


def circuit_hint(raw: Any) -> str:
    """How messages name a circuit table before it is read: its name and slot or phases."""
    if not isinstance(raw, dict):
        return "a [[circuit]] entry"
    name = raw.get("name")
    slot = raw.get("slot")
    phases = raw.get("phases")
    place = None
    if isinstance(slot, int) and not isinstance(slot, bool):
        place = f"slot {shown(slot)}"
    elif isinstance(phases, str) and phases.strip():
        place = f"phases {phases.strip()}"
    return name_circuit(name if isinstance(name, str) else None, place)


def read_circuit(
    r: Reader,
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
    where = circuit_hint(raw)
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected a [[circuit]] table", table, None, where, index)
        return None
    start = len(r.issues)
    r.unknown_keys(raw, CIRCUIT_KEYS, table, where, index)
    v = read_rules(r, raw, CIRCUIT_RULES, table, where, index)
    if isinstance(v["name"], str) and not v["name"].strip():
        r.add("found an empty name, expected the circuit's purpose", table, "name", where, index)
    feed = read_feed(r, raw, table, where, index)
    load_kind: LoadKind
    if "feeds" in raw:  # a feeder's load is the panel it feeds
        check_feeder_circuit(r, raw, v["poles"], table, where, index)
        load_kind, load_value = "va", 0.0
    else:
        load_kind, load_value = _read_load(r, raw, table, where, index, spare=v["spare"] is True)
    use = read_use(r.add, raw, table, where, index)
    phases: Any = None
    if "phases" in raw:
        phases = read_phases(r, raw["phases"], table, where, index, panel)
    _check_layout_keys(r, raw, panel, table, where, index)
    if panel is None:
        return None
    if len(r.issues) > start:
        geometry_ok = all(i.key not in _PLACEMENT_KEYS for i in r.issues[start:])
        if not (stand_in and geometry_ok):
            return None
        v.update(_STAND_IN, name=v["name"] if isinstance(v["name"], str) else "")
        load_kind, load_value = "va", 0.0
    default_poles = 3 if "feeds" in raw else (len(phases) if phases else 1)
    poles = v["poles"] if v["poles"] is not None else default_poles
    slot = v["slot"]
    legs = load_value if isinstance(load_value, tuple) else None
    placed: tuple[int, ...] | None = None
    if panel.layout == TWO_COLUMN and slot is not None:
        placed = slot_phases(slot, poles, panel.right_column)
    elif panel.layout == PHASES and phases is not None:
        placed = phases
    return Circuit(
        name=v["name"].strip(),
        poles=poles,
        slot=slot if panel.layout == TWO_COLUMN else None,
        phases=placed,
        load_kind=load_kind,
        load_value=sum(legs) if legs is not None else load_value,
        pf=v["pf"],
        leading=v["leading"],
        profile=v["profile"],
        continuous=v["continuous"],
        locked=v["locked"],
        breaker_a=v["breaker_a"],
        note=v["note"],
        neutral=v["neutral"],
        leg_values=legs,
        shared_neutral=_name_or_none(v["shared_neutral"]),
        handle_tied=v["handle_tied"],
        spare=v["spare"],
        rcd=_name_or_none(v["rcd"]),
        use=use or (),
        source_index=index,
        feed=feed,
    )


def _name_or_none(text: str | None) -> str | None:
    """A group or device name, stripped; blank counts as not given."""
    return text.strip() or None if isinstance(text, str) else None


def _read_load(
    r: Reader,
    raw: Mapping[str, Any],
    table: TableKey,
    where: str,
    index: int,
    *,
    spare: bool = False,
) -> tuple[LoadKind, Any]:
    """``(load_kind, load_value)`` from the one load key given; value ``MISSING`` if bad.

    The value is a tuple when the key holds one number per leg. A spare
    (``spare = true``) has nothing connected: no load key, load 0.
    """
    given = [k for k in LOAD_KEYS if k in raw]
    if spare:
        if given:
            r.add(
                "a spare has nothing connected; remove the load key or 'spare = true'",
                table,
                given[0],
                where,
                index,
            )
            return "va", MISSING
        return "va", 0.0
    if not given:
        r.add(
            "missing load; expected one of load_va (VA), load_w (W, with pf) or load_a (A)",
            table,
            None,
            where,
            index,
        )
        return "va", MISSING
    if len(given) > 1:
        r.add(
            f"gives {' and '.join(given)}; expected exactly one load key",
            table,
            given[1],
            where,
            index,
        )
        return "va", MISSING
    check = LOAD_CHECKS[given[0]]
    if isinstance(raw[given[0]], list):
        legs = read_leg_values(r, raw[given[0]], given[0], table, where, index, check)
        return LOAD_KEYS[given[0]], legs
    value = r.value(raw, given[0], table, where, "number", check=check, circuit_index=index)
    return LOAD_KEYS[given[0]], value


def _check_layout_keys(
    r: Reader,
    raw: Mapping[str, Any],
    panel: PanelInfo | None,
    table: TableKey,
    where: str,
    index: int,
) -> None:
    """A slot on a rail board, or phases on a two-column panel, is reported."""
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


def read_phases(
    r: Reader, raw: Any, table: TableKey, where: str, index: int, panel: PanelInfo | None
) -> tuple[int, ...] | None:
    """``phases`` text (``"A"``, ``"BC"``, ``"L1-L2"``) as phase indices; ``None`` if bad."""
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
