"""The edit forms: circuit, panel, supply and readings.

Each validator builds the same plain data a TOML file would hold and runs the
schedule loader's own readers (``read_circuit``, ``read_panel`` ...) and
:func:`~tri.schedule.validate.check_schedule` on it, so the UI accepts exactly
what a file may contain, with the same messages.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from typing import Any

from tri.engine.profiles import BUILTIN_PROFILES
from tri.schedule.model import Circuit, PanelInfo, Schedule
from tri.schedule.read_circuit import read_circuit
from tri.schedule.read_panel import read_panel
from tri.schedule.read_readings import read_readings
from tri.schedule.read_supply import read_supply
from tri.schedule.reader import Reader
from tri.schedule.slots import RIGHT_ABC, TWO_COLUMN
from tri.schedule.systems import SYSTEMS
from tri.schedule.validate import check_schedule
from tri.tui.fmt import parse_number
from tri.tui.rules import move_problems, move_summary, new_problems
from tri.tui.screens.form import Field, FormScreen, Values
from tri.tui.wording import circuit_label, issue_words, plural

#: The circuit keys the circuit form edits; any other key of the circuit is kept.
FORM_KEYS = (
    "name", "slot", "phases", "poles", "load_kind", "load_value", "pf",
    "leading", "profile", "continuous", "locked", "breaker_a", "note",
)  # fmt: skip

LOAD_UNITS = (("VA", "va"), ("W", "w"), ("A", "a"))


def _num_text(value: float | None) -> str:
    if value is None:
        return ""
    return f"{value:g}"


def _issues_by_key(reader: Reader) -> dict[str, str]:
    out: dict[str, str] = {}
    for issue in reader.issues:
        out.setdefault(issue.key or "", issue.message)
    return out


def _put(raw: dict[str, Any], key: str, text: str) -> None:
    value = parse_number(text)
    if value is not None:
        raw[key] = value


# ---------------------------------------------------------------- circuit


def _circuit_fields(schedule: Schedule, c: Circuit) -> list[Field]:
    """The circuit form's fields, filled from ``c``."""
    panel = schedule.panel
    place = (
        Field("slot", "Slot", _num_text(c.slot), hint=f"1..{panel.spaces}, blank = not placed")
        if panel.uses_slots
        else Field(
            "phases",
            "Phases",
            "" if c.phases is None else schedule.phase_text(c.phases),
            hint=f"e.g. {panel.phase_labels[0]} or {''.join(panel.phase_labels[1:])}",
        )
    )
    profiles = [*BUILTIN_PROFILES, *(p.name for p in schedule.profiles)]
    if c.profile not in profiles:
        profiles.append(c.profile)
    if c.feed is not None:
        return _feeder_fields(c, place)
    return [
        Field("name", "Name", c.name, hint="purpose, as in the panel directory"),
        place,
        Field(
            "poles",
            "Poles",
            str(c.poles),
            kind="choice",
            choices=(("1", "1"), ("2", "2"), ("3", "3")),
        ),
        Field("load", "Load", _num_text(c.load_value), hint="number, e.g. 1200 or 1.2k"),
        Field("unit", "Load unit", c.load_kind, kind="choice", choices=LOAD_UNITS),
        Field("pf", "Power factor", _num_text(c.pf), hint="0 < pf ≤ 1"),
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
        Field("breaker_a", "Breaker A", _num_text(c.breaker_a), hint="rating, optional"),
        Field("note", "Note", c.note, hint="optional"),
    ]


def _feeder_fields(c: Circuit, place: Field) -> list[Field]:
    """A feeder circuit's fields: its load is the panel it feeds, so only these are edited."""
    return [
        Field("name", "Name", c.name, hint="purpose, as in the panel directory"),
        place,
        Field("feeds", "Feeds", c.feed.path if c.feed else "", disabled=True),
        Field("continuous", "Continuous", c.continuous, kind="bool"),
        Field("locked", "Locked", c.locked, kind="bool"),
        Field("breaker_a", "Breaker A", _num_text(c.breaker_a), hint="rating, optional"),
        Field("note", "Note", c.note, hint="optional"),
    ]


def _circuit_raw(values: Values, c: Circuit, slots: bool) -> tuple[dict[str, Any], dict[str, str]]:
    """The circuit table the form's values make, as a file would hold it (or a problem)."""
    raw: dict[str, Any] = {"name": values["name"]}
    if slots:
        _put(raw, "slot", values["slot"])
    elif values["phases"].strip():
        raw["phases"] = values["phases"].strip()
    if c.feed is not None:
        raw["feeds"] = c.feed.path  # its load is the panel it feeds; poles stay 3
        raw["poles"] = c.poles
    else:
        raw["poles"] = int(values["poles"])
        load = parse_number(values["load"])
        if load is None:
            return raw, {"load": "missing; type the load as a number (unit below)"}
        raw[f"load_{values['unit']}"] = load
        _put(raw, "pf", values["pf"])
        raw["leading"] = bool(values["leading"])
        raw["profile"] = values["profile"]
    raw["continuous"] = bool(values["continuous"])
    raw["locked"] = bool(values["locked"])
    _put(raw, "breaker_a", values["breaker_a"])
    if values["note"].strip():
        raw["note"] = values["note"].strip()
    return raw, {}


def circuit_form(schedule: Schedule, index: int | None, base: Circuit | None = None) -> FormScreen:
    """Edit circuit ``index`` (``None``: a new circuit, prefilled from ``base``)."""
    panel = schedule.panel
    c = base if base is not None else (schedule.circuits[index] if index is not None else None)
    c = c or Circuit(name="", load_value=0.0)
    slots = panel.uses_slots
    fields = _circuit_fields(schedule, c)
    position = index if index is not None else len(schedule.circuits)
    keys = {f.key for f in fields}

    def validate(values: Values) -> tuple[Circuit | None, dict[str, str]]:
        raw, missing = _circuit_raw(values, c, slots)
        if missing:
            return None, missing
        reader = Reader(None, None)
        parsed = read_circuit(reader, raw, position, panel)
        problems = _issues_by_key(reader)
        if "load_va" in problems or "load_w" in problems or "load_a" in problems:
            problems["load"] = next(
                problems.pop(k) for k in ("load_va", "load_w", "load_a") if k in problems
            )
        if parsed is None:
            return None, problems or {"": "not a valid circuit"}
        # Only what the form shows is replaced: keys it does not show stay as they were.
        circuit = replace(c, **{k: getattr(parsed, k) for k in FORM_KEYS})
        legs = _legs_problem(c, circuit)
        if legs:
            problems.setdefault("load", legs)
        if index is None:
            candidate = schedule.with_added(circuit)
        else:
            candidate = schedule.with_circuit(index, circuit)
        for key, text in new_problems(schedule, candidate, position):
            problems.setdefault(key if key in keys else "", text)
        return (None if problems else circuit), problems

    title = "Add a circuit" if index is None else f"Edit {circuit_label(schedule, index)}"
    return FormScreen(title, fields, validate)


def _legs_problem(before: Circuit, after: Circuit) -> str | None:
    """A breaker with one load per leg keeps its legs, which the form shows as one sum:
    a changed load, unit or pole count would be shown but not used, so it is refused."""
    if before.leg_values is None:
        return None
    same = (after.load_value, after.load_kind, after.poles) == (
        before.load_value,
        before.load_kind,
        before.poles,
    )
    if same:
        return None
    unit = {"va": "VA", "w": "W", "a": "A"}[before.load_kind]
    shown = " + ".join(f"{x:g}" for x in before.leg_values)
    return (
        f"this breaker has one load per leg ({shown} {unit}); the form edits one number, so "
        "change the legs (load and poles) in the file"
    )


def move_form(schedule: Schedule, index: int) -> FormScreen:
    """Move circuit ``index`` to another slot (or other phases on a rail board).

    The field starts at the breaker's present position; a blank field is
    refused (taking a breaker off the panel is its own action, ``o``).
    """
    c = schedule.circuits[index]
    panel = schedule.panel
    if panel.uses_slots:
        now = "" if c.slot is None else str(c.slot)
        field = Field("slot", "To slot", now, hint=f"first slot, 1..{panel.spaces}")
    else:
        now = "" if c.phases is None else schedule.phase_text(c.phases)
        example = "".join(panel.phase_labels[: c.poles])
        field = Field("phases", "To phases", now, hint=f"e.g. {example}")

    def validate(values: Values) -> tuple[Circuit | None, dict[str, str]]:
        text = values[field.key].strip()
        if not text:
            return None, {field.key: "type where it goes; o in the main view takes it off"}
        if panel.uses_slots:
            value = parse_number(text)
            if not isinstance(value, int) or isinstance(value, bool):
                return None, {"slot": f"found {text!r}, expected a whole slot number"}
            target = c.at_slot(value)
        else:
            reader = Reader(None, None)
            raw = {"name": c.name, "phases": text, "poles": c.poles, "load_va": 0}
            parsed = read_circuit(reader, raw, index, panel)
            if parsed is None:
                return None, {"phases": next(iter(_issues_by_key(reader).values()), "not phases")}
            target = c.on_phases(parsed.phases)
        problems = move_problems(schedule, index, target)
        if problems:
            return None, {field.key: "; ".join(problems)}
        return target, {}

    def describe(target: Circuit | None) -> str:
        if target is None:
            return ""
        if (target.slot, target.phases) == (c.slot, c.phases):
            return "It is there now: type the new position (o in the main view takes it off)."
        return f"✓ Goes to {move_summary(schedule, target)}: every pole's position is free."

    form = FormScreen(
        f"Move {circuit_label(schedule, index)} ({c.poles}-pole)",
        [field],
        validate,
        describe=describe,
    )
    return form


# ---------------------------------------------------------------- panel


def _unshown_panel_keys(p: PanelInfo, system: str, labels: list[str]) -> dict[str, Any]:
    """The ``[panel]`` keys the form does not show, as the file holds them, so they are kept
    (and checked again by the loader): the source marking, the right column's order, the
    reach limit, and a high leg on C while the system stays a high-leg delta."""
    out: dict[str, Any] = {}
    if p.fed_from is not None:
        out["fed_from"] = p.fed_from
    if p.right_column != RIGHT_ABC:
        out["right_column"] = p.right_column
    if p.max_row_shift is not None:
        out["max_row_shift"] = p.max_row_shift
    delta = system in SYSTEMS and SYSTEMS[system].high_leg_delta
    if delta and p.high_leg is not None and len(labels) == 3:
        out["high_leg"] = labels[p.high_leg]
    return out


def panel_form(
    schedule: Schedule, outside: Callable[[Schedule], str | None] | None = None
) -> FormScreen:
    """Edit the ``[panel]`` table (the layout is shown but fixed).

    ``outside`` says what the edited schedule would break beyond itself (a
    building's links: a child's system against its transformer's
    secondary), or ``None``; its words are shown like any other problem.
    """
    p = schedule.panel
    fields = [
        Field("name", "Panel name", p.name),
        Field("system", "System", p.system, kind="choice", choices=tuple((k, k) for k in SYSTEMS)),
        Field("frequency_hz", "Frequency Hz", _num_text(p.frequency_hz)),
        Field("spaces", "Spaces", str(p.spaces), hint="circuit positions"),
        Field("bus_a", "Bus A", _num_text(p.bus_a)),
        Field("main_a", "Main A", _num_text(p.main_a), hint="blank = main lugs only"),
        Field("neutral_a", "Neutral A", _num_text(p.neutral_a), hint="blank = bus rating"),
        Field("phase_labels", "Phase labels", ",".join(p.phase_labels), hint="A,B,C or L1,L2,L3"),
        Field("layout", "Layout", p.layout, disabled=True),
    ]

    def validate(values: Values) -> tuple[Schedule | None, dict[str, str]]:
        raw: dict[str, Any] = {"name": values["name"], "system": values["system"]}
        for key in ("frequency_hz", "spaces", "bus_a", "main_a", "neutral_a"):
            _put(raw, key, values[key])
        text = values["phase_labels"]
        labels = [x for x in text.replace(" ", ",").split(",") if x]
        if len(labels) == 1 and len(labels[0]) == 3:
            labels = list(labels[0])
        raw["phase_labels"] = labels
        raw["layout"] = p.layout
        raw.update(_unshown_panel_keys(p, values["system"], labels))
        reader = Reader(None, None)
        panel = read_panel(reader, {"panel": raw})
        problems = _issues_by_key(reader)
        if panel is None:
            return None, problems or {"": "not a valid panel"}
        candidate = replace(schedule, panel=panel)
        issues = check_schedule(candidate)
        if issues:
            first = issues[0]
            key = "spaces" if first.key == "slot" else ("system" if first.key == "poles" else "")
            more = f" (and {plural(len(issues) - 1, 'other problem')})" if len(issues) > 1 else ""
            problems[key] = issue_words(first, candidate) + more
        beyond = outside(candidate) if outside is not None and not problems else None
        if beyond:
            problems["system"] = beyond
        return (None if problems else candidate), problems

    return FormScreen("Panel", fields, validate)


# ---------------------------------------------------------------- supply

SUPPLY_FIELDS = (
    ("transformer_kva", "Transformer kVA"),
    ("transformer_z_pct", "Impedance %"),
    ("transformer_x_r", "X/R"),
    ("feeder_length_m", "Feeder m"),
    ("feeder_r_ohm_per_km", "Phase R Ω/km"),
    ("feeder_x_ohm_per_km", "Phase X Ω/km"),
    ("neutral_r_ohm_per_km", "Neutral R Ω/km"),
    ("neutral_x_ohm_per_km", "Neutral X Ω/km"),
)


def supply_form(schedule: Schedule) -> FormScreen:
    """Edit the ``[supply]`` table; all blank removes it."""
    s = schedule.supply
    fields = [
        Field(k, label, "" if s is None else _num_text(getattr(s, k))) for k, label in SUPPLY_FIELDS
    ]

    def validate(values: Values) -> tuple[Schedule | None, dict[str, str]]:
        raw: dict[str, Any] = {}
        for key, _ in SUPPLY_FIELDS:
            _put(raw, key, values[key])
        if not raw:
            return replace(schedule, supply=None), {}
        reader = Reader(None, None)
        supply = read_supply(reader, {"supply": raw})
        problems = _issues_by_key(reader)
        if supply is None:
            return None, problems or {"": "not a valid supply"}
        return replace(schedule, supply=supply), problems

    return FormScreen(
        "Supply (transformer and feeder)",
        fields,
        validate,
        help_text="Blank every field to remove the supply. Needed for voltages and VUF.",
    )


# ---------------------------------------------------------------- readings


def readings_form(schedule: Schedule) -> FormScreen:
    """Edit the ``[readings]`` table (what was measured on site); all blank removes it."""
    r = schedule.readings
    lab = schedule.labels
    pairs = [lab[0] + lab[1], lab[1] + lab[2], lab[2] + lab[0]]
    if any(len(x) > 1 for x in lab):
        pairs = [f"{lab[0]}-{lab[1]}", f"{lab[1]}-{lab[2]}", f"{lab[2]}-{lab[0]}"]
    spec: list[tuple[str, str, str, str, float | None]] = []
    for k, name in enumerate(lab):
        spec.append((f"amps_{k}", f"{name} amps", "amps", name, r.phase_amps[k] if r else None))
    spec.append(("amps_n", "N amps", "amps", "N", r.neutral_amps if r else None))
    for k, name in enumerate(pairs):
        spec.append((f"vll_{k}", f"{name} volts", "volts_ll", name, r.volts_ll[k] if r else None))
    for k, name in enumerate(lab):
        spec.append((f"vln_{k}", f"{name}-N volts", "volts_ln", name, r.volts_ln[k] if r else None))
    fields = [
        Field(key, label, _num_text(v), hint="measured, optional") for key, label, _, _, v in spec
    ]
    fields.append(Field("taken", "Taken", (r.taken or "") if r else "", hint="when / by whom"))

    def validate(values: Values) -> tuple[Schedule | None, dict[str, str]]:
        raw: dict[str, Any] = {}
        for key, _label, table, name, _ in spec:
            value = parse_number(values[key])
            if value is not None:
                raw.setdefault(table, {})[name] = value
        if values["taken"].strip():
            raw["taken"] = values["taken"].strip()
        if not raw:
            return replace(schedule, readings=None), {}
        reader = Reader(None, None)
        readings = read_readings(reader, {"readings": raw}, schedule.panel)
        problems: dict[str, str] = {}
        for issue in reader.issues:
            field_key = next(
                (k for k, _l, t, n, _v in spec if t == issue.key and n in issue.message),
                next((k for k, _l, t, _n, _v in spec if t == issue.key), issue.key or ""),
            )
            problems.setdefault(field_key, issue.message)
        if readings is None:
            return None, problems or {"": "not valid readings"}
        return replace(schedule, readings=readings), problems

    return FormScreen(
        "Readings (measured on site)",
        fields,
        validate,
        help_text="True-RMS amps and volts as measured; blank what was not measured.",
    )


def default_circuit(schedule: Schedule) -> Circuit:
    """A blank new circuit for the add form, in the first free slot that fits one pole."""
    from tri.schedule.slots import candidate_slots, occupied_slots

    c = Circuit(name="", load_kind="va", load_value=0.0)
    if schedule.panel.layout != TWO_COLUMN:
        return c
    taken = [
        s for x in schedule.circuits if x.slot is not None for s in occupied_slots(x.slot, x.poles)
    ]
    free = candidate_slots(1, schedule.panel.spaces, taken)
    return c.at_slot(free[0]) if free else c
