"""The circuit form: every key of a ``[[circuit]]`` table, wiring included, checked as you type.

The form's values become the table a file would hold (``load_va = [1440,
1080]`` for one load per leg, ``neutral``, ``shared_neutral``,
``handle_tied``, ``spare``, ``rcd`` ...) and the schedule loader reads it
with its own reader (:func:`~tri.schedule.read_circuit.read_circuit`); the
schedule the edit would give is then checked whole
(:func:`~tri.tui.rules.new_problems`: every pole's position, the legs
against the poles, shared-neutral groups, the high leg, RCD groups). Only
the keys the form shows are replaced; any other key of the circuit (its
``use`` factors, a feeder's ``feeds``) stays as it was.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from tri.engine.profiles import BUILTIN_PROFILES
from tri.schedule.model import Circuit, Schedule
from tri.schedule.read_circuit import read_circuit
from tri.schedule.reader import Reader
from tri.tui.fmt import parse_number
from tri.tui.rules import new_problems
from tri.tui.screens.form import Field, FormScreen, Values
from tri.tui.wording import circuit_label

LOAD_UNITS = (("VA", "va"), ("W", "w"), ("A", "a"))
#: What separates one leg's load from the next in the load field ("1440/1080").
LEG_SEPARATORS = ("/", ";")
#: The model's fields each form field decides (the others are kept as they were).
FIELD_ATTRS: dict[str, tuple[str, ...]] = {
    "name": ("name",),
    "slot": ("slot", "phases"),
    "phases": ("phases",),
    "poles": ("poles",),
    "load": ("load_kind", "load_value", "leg_values"),
    "spare": ("spare",),
    "neutral": ("neutral",),
    "pf": ("pf",),
    "leading": ("leading",),
    "profile": ("profile",),
    "continuous": ("continuous",),
    "locked": ("locked",),
    "breaker_a": ("breaker_a",),
    "shared_neutral": ("shared_neutral",),
    "handle_tied": ("handle_tied",),
    "rcd": ("rcd",),
    "note": ("note",),
}


def num_text(value: float | None) -> str:
    """A number as a field shows it (``""`` for none)."""
    if value is None:
        return ""
    return f"{value:g}"


def load_text(c: Circuit) -> str:
    """The load field: one number, or one per leg (``"1440/1080"``); blank for a spare."""
    if c.spare:
        return ""
    if c.leg_values is not None:
        return "/".join(num_text(x) for x in c.leg_values)
    return num_text(c.load_value)


def put_number(raw: dict[str, Any], key: str, text: str) -> None:
    """``raw[key]`` = the number typed (kept as text when it is not one: the loader says why)."""
    value = parse_number(text)
    if value is not None:
        raw[key] = value


def _place_field(schedule: Schedule, c: Circuit) -> Field:
    panel = schedule.panel
    if panel.uses_slots:
        return Field(
            "slot", "Slot", num_text(c.slot), hint=f"1..{panel.spaces}, blank = not placed"
        )
    return Field(
        "phases",
        "Phases",
        "" if c.phases is None else schedule.phase_text(c.phases),
        hint=f"e.g. {panel.phase_labels[0]} or {''.join(panel.phase_labels[1:])}",
    )


def circuit_fields(schedule: Schedule, c: Circuit) -> list[Field]:
    """The circuit form's fields, filled from ``c`` (a feeder circuit has fewer)."""
    place = _place_field(schedule, c)
    if c.feed is not None:
        return feeder_fields(c, place)
    profiles = [*BUILTIN_PROFILES, *(p.name for p in schedule.profiles)]
    if c.profile not in profiles:
        profiles.append(c.profile)
    poles = (("1", "1"), ("2", "2"), ("3", "3"))
    fields = [
        Field("name", "Name", c.name, hint="purpose, as in the panel directory"),
        place,
        Field("poles", "Poles", str(c.poles), kind="choice", choices=poles),
        Field("load", "Load", load_text(c), hint="1200, 1.2k; per leg 1440/1080"),
        Field("unit", "Load unit", c.load_kind, kind="choice", choices=LOAD_UNITS),
        Field("pf", "Power factor", num_text(c.pf), hint="0 < pf ≤ 1"),
        Field("leading", "Leading PF", c.leading, kind="bool"),
        Field(
            "profile",
            "Harmonics",
            c.profile,
            kind="choice",
            choices=tuple((p, p) for p in profiles),
        ),
        Field("continuous", "Continuous", c.continuous, kind="bool"),
        Field("locked", "Locked", c.locked, kind="bool"),
        Field("breaker_a", "Breaker A", num_text(c.breaker_a), hint="rating, optional"),
        # How it is wired (README: the schedule file, wiring keys).
        Field("neutral", "With neutral", c.neutral, kind="bool"),
        Field("spare", "Spare", c.spare, kind="bool"),
        Field(
            "shared_neutral", "Shared neutral", c.shared_neutral or "", hint="group name, optional"
        ),
        Field("handle_tied", "Handle tied", c.handle_tied, kind="bool"),
    ]
    if not schedule.panel.uses_slots:
        fields.append(Field("rcd", "RCD", c.rcd or "", hint="name of its [[rcd]], optional"))
    fields.append(Field("note", "Note", c.note, hint="optional"))
    return fields


def feeder_fields(c: Circuit, place: Field) -> list[Field]:
    """A feeder circuit's fields: its load is the panel it feeds, so only these are edited."""
    return [
        Field("name", "Name", c.name, hint="purpose, as in the panel directory"),
        place,
        Field("feeds", "Feeds", c.feed.path if c.feed else "", disabled=True),
        Field("continuous", "Continuous", c.continuous, kind="bool"),
        Field("locked", "Locked", c.locked, kind="bool"),
        Field("breaker_a", "Breaker A", num_text(c.breaker_a), hint="rating, optional"),
        Field("note", "Note", c.note, hint="optional"),
    ]


def _load(raw: dict[str, Any], values: Values) -> dict[str, str]:
    """The load key: one number or one per leg; a problem when the field is blank."""
    text = values["load"].strip()
    key = f"load_{values['unit']}"
    for sep in LEG_SEPARATORS:
        text = text.replace(sep, "/")
    if "/" in text:
        raw[key] = [parse_number(part) if part.strip() else part for part in text.split("/")]
        return {}
    load = parse_number(text)
    if load is None:
        return {"load": "missing; type the load as a number (unit below), or tick Spare"}
    raw[key] = load
    return {}


def circuit_raw(values: Values, c: Circuit, slots: bool) -> tuple[dict[str, Any], dict[str, str]]:
    """The circuit table the form's values make, as a file would hold it (or a problem)."""
    raw: dict[str, Any] = {"name": values["name"]}
    if slots:
        put_number(raw, "slot", values["slot"])
    elif values["phases"].strip():
        raw["phases"] = values["phases"].strip()
    if c.feed is not None:
        raw["feeds"] = c.feed.path  # its load is the panel it feeds; poles stay 3
        raw["poles"] = c.poles
    else:
        raw["poles"] = int(values["poles"])
        if values["spare"]:
            raw["spare"] = True  # nothing connected: no load key
        elif problem := _load(raw, values):
            return raw, problem
        for key in ("neutral", "handle_tied", "leading"):
            if values[key]:
                raw[key] = True
        put_number(raw, "pf", values["pf"])
        raw["profile"] = values["profile"]
        for key in ("shared_neutral", "rcd"):
            if values.get(key, "").strip():
                raw[key] = values[key].strip()
    raw["continuous"] = bool(values["continuous"])
    raw["locked"] = bool(values["locked"])
    put_number(raw, "breaker_a", values["breaker_a"])
    if values["note"].strip():
        raw["note"] = values["note"].strip()
    return raw, {}


def _by_field(reader: Reader) -> dict[str, str]:
    """The reader's problems by form field (the load key's under ``load``)."""
    out: dict[str, str] = {}
    for issue in reader.issues:
        key = issue.key or ""
        if key in ("load_va", "load_w", "load_a"):
            key = "load"
        out.setdefault(key, issue.message)
    return out


def circuit_form(schedule: Schedule, index: int | None, base: Circuit | None = None) -> FormScreen:
    """Edit circuit ``index`` (``None``: a new circuit, prefilled from ``base``)."""
    panel = schedule.panel
    c = base if base is not None else (schedule.circuits[index] if index is not None else None)
    c = c or Circuit(name="", load_value=0.0)
    fields = circuit_fields(schedule, c)
    position = index if index is not None else len(schedule.circuits)
    keys = {f.key for f in fields}
    attrs = [a for f in fields for a in FIELD_ATTRS.get(f.key, ())]

    def validate(values: Values) -> tuple[Circuit | None, dict[str, str]]:
        raw, missing = circuit_raw(values, c, panel.uses_slots)
        if missing:
            return None, missing
        reader = Reader(None, None)
        parsed = read_circuit(reader, raw, position, panel)
        problems = _by_field(reader)
        if parsed is None:
            return None, problems or {"": "not a valid circuit"}
        # Only what the form shows is replaced: keys it does not show stay as they were.
        circuit = replace(c, **{a: getattr(parsed, a) for a in attrs})
        if index is None:
            candidate = schedule.with_added(circuit)
        else:
            candidate = schedule.with_circuit(index, circuit)
        for key, text in new_problems(schedule, candidate, position):
            field = "load" if key in ("load_va", "load_w", "load_a") else key
            problems.setdefault(field if field in keys else "", text)
        return (None if problems else circuit), problems

    title = "Add a circuit" if index is None else f"Edit {circuit_label(schedule, index)}"
    return FormScreen(title, fields, validate)
