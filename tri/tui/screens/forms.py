"""The edit forms: move, panel, supply and readings (the circuit form is in :mod:`circuit_form`).

Each validator builds the same plain data a TOML file would hold and runs the
schedule loader's own readers (``read_circuit``, ``read_panel`` ...) and
:func:`~tri.schedule.validate.check_schedule` on it, so the UI accepts exactly
what a file may contain, with the same messages.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from typing import Any

from tri.schedule.model import Circuit, PanelInfo, Schedule
from tri.schedule.read_circuit import read_circuit
from tri.schedule.read_panel import read_panel
from tri.schedule.read_readings import read_readings
from tri.schedule.read_supply import read_supply
from tri.schedule.reader import Reader
from tri.schedule.slots import RIGHT_ABC, RIGHT_COLUMN_ORDERS, TWO_COLUMN
from tri.schedule.systems import SYSTEMS
from tri.schedule.validate import check_schedule
from tri.tui.fmt import parse_number
from tri.tui.rules import move_problems, move_summary
from tri.tui.screens.circuit_form import circuit_form
from tri.tui.screens.form import Field, FormScreen, Values
from tri.tui.wording import circuit_label, issue_words, plural


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
            target = schedule.placed(c.at_slot(value))
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


def _wiring_fields(p: PanelInfo) -> list[Field]:
    """The ``[panel]`` keys of panels as they are wired: high leg, right column, source, reach."""
    slots = p.layout == TWO_COLUMN
    orders = tuple((f"{'-'.join(o)} from the top", o) for o in RIGHT_COLUMN_ORDERS)
    high = "" if p.high_leg in (None, 1) else p.phase_labels[p.high_leg]
    return [
        Field("high_leg", "High leg", high, hint=f"240/120D: blank = {p.phase_labels[1]}"),
        Field(
            "right_column",
            "Right column",
            p.right_column,
            kind="choice",
            choices=orders,
            disabled=not slots,
        ),
        Field("fed_from", "Fed from", p.fed_from or "", hint="source marking, optional"),
        Field(
            "max_row_shift",
            "Reach rows",
            _num_text(p.max_row_shift),
            hint="rows a breaker may move, optional",
            disabled=not slots,
        ),
    ]


def _put_wiring(raw: dict[str, Any], values: Values, p: PanelInfo) -> None:
    """The wiring keys typed, as the file would hold them (blank: not given)."""
    for key in ("high_leg", "fed_from"):
        if values[key].strip():
            raw[key] = values[key].strip()
    if p.layout == TWO_COLUMN:
        if values["right_column"] != RIGHT_ABC or p.right_column != RIGHT_ABC:
            raw["right_column"] = values["right_column"]
        _put(raw, "max_row_shift", values["max_row_shift"])


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
        *_wiring_fields(p),
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
        _put_wiring(raw, values, p)
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
    """A blank new circuit for the add form, in the first free slot that fits one pole.

    On a high-leg delta that slot is off the high leg (a 1-pole 120 V circuit
    may not go there).
    """
    from tri.schedule.slots import candidate_slots, occupied_slots, slot_phase

    c = Circuit(name="", load_kind="va", load_value=0.0)
    if schedule.panel.layout != TWO_COLUMN:
        return c
    taken = [
        s for x in schedule.circuits if x.slot is not None for s in occupied_slots(x.slot, x.poles)
    ]
    free = candidate_slots(1, schedule.panel.spaces, taken)
    high = schedule.panel.effective_high_leg
    free = [x for x in free if slot_phase(x, schedule.panel.right_column) != high]
    return schedule.placed(c.at_slot(free[0])) if free else c


__all__ = [
    "circuit_form",
    "default_circuit",
    "move_form",
    "panel_form",
    "readings_form",
    "supply_form",
]
