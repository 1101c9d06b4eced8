"""Read the keys of panels as they are wired: high leg, right column, ``[[rcd]]``, leg loads.

``[panel] high_leg`` and ``right_column`` have their own grammar (a phase
label; a phase order) and are read here; ``fed_from`` and
``max_row_shift`` are plain rules (:data:`PANEL_WIRING_RULES`). ``[[rcd]]``
tables name the residual-current devices of a rail board. A circuit's load
key may hold one number per leg (:func:`read_leg_values`). Checks that
involve several circuits (shared-neutral groups, the high leg, circuits
behind an RCD) live in :mod:`tri.schedule.wiring`.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from tri.schedule.locate import TableKey
from tri.schedule.model import Rcd, parse_phase_text
from tri.schedule.reader import MISSING, Check, Reader, found, is_kind, number_problem
from tri.schedule.rules import Rule, between, non_negative, read_rules, short_text
from tri.schedule.slots import RIGHT_ABC, RIGHT_COLUMN_ORDERS, TWO_COLUMN
from tri.schedule.systems import SYSTEMS

#: Largest ``max_row_shift``: the rows of the largest panel [rows].
MAX_ROW_SHIFT = 210

#: Plain ``[panel]`` keys of this module (one line per key).
PANEL_WIRING_RULES: dict[str, Rule] = {
    "fed_from": Rule("text", short_text),
    "max_row_shift": Rule("int", between(0, MAX_ROW_SHIFT, " rows")),
}
#: Every ``[panel]`` key of this module.
PANEL_WIRING_KEYS = ("high_leg", "right_column", *PANEL_WIRING_RULES)

RCD_RULES: dict[str, Rule] = {
    "name": Rule("text", short_text, required=True),
    "poles": Rule("int", default=2),
    "note": Rule("text"),
}
RCD_KEYS = ("name", "poles", "phase", "note")


def read_panel_wiring(
    r: Reader,
    raw: Mapping[str, Any],
    system: Any,
    labels: Any,
    layout: Any,
    table: TableKey,
    where: str,
) -> dict[str, Any]:
    """``high_leg``, ``right_column``, ``fed_from``, ``max_row_shift`` of ``[panel]``.

    Returns keyword arguments for :class:`~tri.schedule.model.PanelInfo`;
    a value that was reported is :data:`~tri.schedule.reader.MISSING`.
    ``system``, ``labels`` and ``layout`` may themselves be ``MISSING``.
    """
    values = read_rules(r, raw, PANEL_WIRING_RULES, table, where)
    if isinstance(values["fed_from"], str):
        values["fed_from"] = values["fed_from"].strip() or None
    values["high_leg"] = _read_high_leg(r, raw, system, labels, table, where)
    values["right_column"] = _read_right_column(r, raw, layout, table, where)
    if "max_row_shift" in raw and layout not in (MISSING, TWO_COLUMN):
        r.add(
            'a reach limit in rows is for two-column panels; this board has layout = "phases"',
            table,
            "max_row_shift",
            where,
        )
        values["max_row_shift"] = MISSING
    return values


def _read_high_leg(
    r: Reader, raw: Mapping[str, Any], system: Any, labels: Any, table: TableKey, where: str
) -> Any:
    delta = system is not MISSING and SYSTEMS[system].high_leg_delta
    if "high_leg" not in raw:
        return 1 if delta else None
    text = r.value(raw, "high_leg", table, where, "text")
    if text is MISSING or system is MISSING or labels is MISSING:
        return MISSING
    if not delta:
        r.add(
            f"found high_leg on a {system} system, which has no high leg; high_leg is for a "
            'high-leg delta (system = "240/120D")',
            table,
            "high_leg",
            where,
        )
        return MISSING
    parsed = parse_phase_text(text, labels)
    if parsed not in ((1,), (2,)):
        r.add(
            f"found '{text}', expected \"{labels[1]}\" (the usual high leg) or "
            f'"{labels[2]}" (where the meter layout puts it there)',
            table,
            "high_leg",
            where,
        )
        return MISSING
    return parsed[0]


def _read_right_column(
    r: Reader, raw: Mapping[str, Any], layout: Any, table: TableKey, where: str
) -> Any:
    order = r.value(raw, "right_column", table, where, "text", default=RIGHT_ABC)
    if order is MISSING:
        return MISSING
    if order.strip().upper() not in RIGHT_COLUMN_ORDERS:
        r.add(
            f"found '{order}', expected \"ABC\" (the right column reads A-B-C from the top, "
            'as the left) or "CBA"',
            table,
            "right_column",
            where,
        )
        return MISSING
    if "right_column" in raw and layout not in (MISSING, TWO_COLUMN):
        r.add(
            'a column order is for two-column panels; this board has layout = "phases"',
            table,
            "right_column",
            where,
        )
        return MISSING
    return order.strip().upper()


def check_supply_system(r: Reader, panel: Any, supply: Any) -> None:
    """A ``[supply]`` on a high-leg delta is refused: its voltages are not modelled yet."""
    if panel is None or supply is None or not panel.supply_system.high_leg_delta:
        return
    r.add(
        f"voltages at the panel are not modelled for a {panel.system} high-leg delta (the "
        "supply model is a wye source); remove [supply] to report the currents",
        ("supply",),
        None,
        "[supply]",
    )


def read_rcds(r: Reader, data: Mapping[str, Any], panel: Any) -> tuple[Rcd, ...]:
    """The ``[[rcd]]`` tables (rail boards only); reported ones are left out."""
    raw = data.get("rcd", [])
    if not isinstance(raw, list):
        r.add(f"found {found(raw)}, expected [[rcd]] tables", (), "rcd", "top level")
        return ()
    out: list[Rcd] = []
    names: set[str] = set()
    for index, item in enumerate(raw):
        rcd = _read_rcd(r, item, index, panel)
        if rcd is None:
            continue
        if rcd.name in names:
            r.add(f"a second RCD named '{rcd.name}'; expected unique names", ("rcd", index), "name")
            continue
        names.add(rcd.name)
        out.append(rcd)
    if raw and panel is not None and panel.layout == TWO_COLUMN:
        r.add(
            'RCD groups are for rail boards (layout = "phases"); a two-column panel\'s '
            "circuits are protected breaker by breaker",
            ("rcd", 0),
            None,
            "[[rcd]]",
        )
    return tuple(out)


def _read_rcd(r: Reader, raw: Any, index: int, panel: Any) -> Rcd | None:
    table: TableKey = ("rcd", index)
    if not isinstance(raw, dict):
        r.add(f"found {found(raw)}, expected an [[rcd]] table", table, None, "[[rcd]]")
        return None
    name = raw.get("name")
    where = f"RCD '{name}'" if isinstance(name, str) and name.strip() else "an [[rcd]] entry"
    start = len(r.issues)
    r.unknown_keys(raw, RCD_KEYS, table, where)
    v = read_rules(r, raw, RCD_RULES, table, where)
    poles = v["poles"]
    if poles is not MISSING and poles not in (2, 4):
        r.add(
            f"found {poles}, expected 2 (one phase and neutral) or 4 (three phases and neutral)",
            table,
            "poles",
            where,
        )
    phase: int | None = None
    labels = panel.phase_labels if panel is not None else ("A", "B", "C")
    if poles == 2:
        text = r.value(raw, "phase", table, where, "text", required=True)
        parsed = parse_phase_text(text, labels) if is_kind("text", text) else None
        if text is not MISSING and (parsed is None or len(parsed) != 1):
            r.add(
                f"found '{text}', expected one phase label ({', '.join(labels)})",
                table,
                "phase",
                where,
            )
        elif parsed is not None:
            phase = parsed[0]
    elif poles == 4 and "phase" in raw:
        r.add("a 4-pole RCD covers all three phases; remove 'phase'", table, "phase", where)
    if len(r.issues) > start:
        return None
    return Rcd(name=v["name"].strip(), poles=poles, phase=phase)


def read_leg_values(
    r: Reader,
    raw: list[Any],
    key: str,
    table: TableKey,
    where: str,
    index: int,
    check: Check | None = None,
) -> tuple[float, ...] | Any:
    """A load key holding one number per leg, e.g. ``load_va = [1200, 800]``.

    Returns the values [VA, W or A] or ``MISSING`` after reporting. Each leg
    is a number as the single load is (finite, within float range, not a
    denormal) and passes ``check``, the key's load bound
    (:data:`tri.schedule.read_circuit.LOAD_CHECKS`). How many legs a breaker
    has is checked with the rest of the wiring (:mod:`tri.schedule.wiring`),
    so that an edit of ``poles`` is judged too.
    """
    if not 2 <= len(raw) <= 3:
        r.add(
            f"found {len(raw)} values, expected one number, or one per leg (2 or 3)",
            table,
            key,
            where,
            index,
        )
        return MISSING
    values = []
    for k, x in enumerate(raw, start=1):
        value, problem = number_problem(x, check if check is not None else non_negative)
        if problem is not None:
            r.add(f"leg {k}: {problem}", table, key, where, index)
            return MISSING
        values.append(value)
    return tuple(values)
