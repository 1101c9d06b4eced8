"""Save a schedule: update the TOML document in place, write atomically, keep a backup.

Saving never rewrites what did not change. Each table of the model is
compared with what the original document says; only tables that differ are
touched, and within them only the keys that differ. Comments, key order and
the formatting of untouched parts survive (the edits themselves:
:mod:`tri.schedule.toml_edit`).
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import tomlkit
from tomlkit.items import AoT, Table
from tomlkit.toml_document import TOMLDocument

from tri.schedule.atomic import write_atomic
from tri.schedule.model import (
    FORMAT_VERSION,
    Circuit,
    PanelInfo,
    Readings,
    Schedule,
    Supply,
    UserProfile,
    parse_phase_text,
)
from tri.schedule.read_circuit import read_circuit
from tri.schedule.read_panel import read_panel
from tri.schedule.read_profiles import read_profiles
from tri.schedule.read_readings import read_readings
from tri.schedule.read_supply import read_supply
from tri.schedule.read_wiring import read_rcds
from tri.schedule.reader import Reader
from tri.schedule.slots import PHASES, RIGHT_ABC, TWO_COLUMN
from tri.schedule.toml_edit import (
    clean_value,
    end_with_blank_line,
    insert_table,
    plain_value,
    set_key,
)
from tri.schedule.use_factors import use_table

HEADER_COMMENT = (
    "Panel schedule for tri. Edit it by hand or with `tri FILE`; keep it in version control.",
    "Units: VA, W, A, V, Hz. See the README's file reference for every key.",
)


def _quiet_reader() -> Reader:
    return Reader(None, None)


def _write_panel(doc: TOMLDocument, panel: PanelInfo) -> None:
    existing: Any = doc.get("panel")
    if (
        isinstance(existing, dict)
        and read_panel(_quiet_reader(), {"panel": plain_value(existing)}) == panel
    ):
        return
    created = not isinstance(existing, Table)
    t = tomlkit.table() if created else existing
    system = panel.supply_system
    set_key(t, "name", panel.name)
    set_key(t, "system", panel.system)
    set_key(t, "frequency_hz", panel.frequency_hz, system.default_frequency_hz)
    set_key(t, "spaces", panel.spaces)
    set_key(t, "bus_a", panel.bus_a)
    set_key(t, "main_a", panel.main_a)
    set_key(t, "neutral_a", panel.neutral_a)
    set_key(t, "phase_labels", list(panel.phase_labels), ["A", "B", "C"])
    set_key(t, "layout", panel.layout, TWO_COLUMN)
    _write_panel_wiring(t, panel)
    if created:
        insert_table(doc, "panel", t, ("format",))


def _write_panel_wiring(t: Any, panel: PanelInfo) -> None:
    """``high_leg``, ``right_column``, ``fed_from``, ``max_row_shift`` (defaults left out)."""
    high = panel.high_leg if panel.supply_system.high_leg_delta else None
    labels = panel.phase_labels
    set_key(t, "high_leg", None if high is None else labels[high], labels[1])
    set_key(t, "right_column", panel.right_column, RIGHT_ABC)
    set_key(t, "fed_from", panel.fed_from)
    set_key(t, "max_row_shift", panel.max_row_shift)


def _write_rcds(doc: TOMLDocument, schedule: Schedule) -> None:
    """The ``[[rcd]]`` tables: untouched when equal, else updated one by one."""
    existing = doc.get("rcd")
    if isinstance(existing, AoT):
        old = read_rcds(_quiet_reader(), {"rcd": existing.unwrap()}, schedule.panel)
        if old == schedule.rcds:
            return
    if not schedule.rcds:
        if existing is not None:
            del doc["rcd"]
        return
    if not isinstance(existing, AoT):
        if existing is not None:
            del doc["rcd"]
        doc["rcd"] = tomlkit.aot()
        existing = doc["rcd"]
    tables = list(existing)
    for k in reversed(range(len(schedule.rcds), len(tables))):
        del existing[k]
    labels = schedule.panel.phase_labels
    for k, rcd in enumerate(schedule.rcds):
        t = tables[k] if k < len(tables) else tomlkit.table()
        set_key(t, "name", rcd.name)
        set_key(t, "poles", rcd.poles, 2)
        set_key(t, "phase", None if rcd.phase is None else labels[rcd.phase])
        if k >= len(tables):
            existing.append(t)


def _write_supply(doc: TOMLDocument, supply: Supply | None) -> None:
    existing: Any = doc.get("supply")
    if supply is None:
        if existing is not None:
            del doc["supply"]
        return
    if (
        isinstance(existing, dict)
        and read_supply(_quiet_reader(), {"supply": plain_value(existing)}) == supply
    ):
        return
    created = not isinstance(existing, Table)
    t = tomlkit.table() if created else existing
    for key, value in vars(supply).items():
        set_key(t, key, value, 0.0)
    if created:
        insert_table(doc, "supply", t, ("panel", "format"))


def _triple_table(labels: list[str], values: tuple[Any, ...], extra: dict[str, Any]) -> Any:
    t = tomlkit.inline_table()
    for label, v in zip(labels, values, strict=True):
        if v is not None:
            t[label] = v
    for k, v in extra.items():
        if v is not None:
            t[k] = v
    return t


def _write_readings(doc: TOMLDocument, readings: Readings | None, panel: PanelInfo) -> None:
    existing: Any = doc.get("readings")
    if readings is None:
        if existing is not None:
            del doc["readings"]
        return
    if isinstance(existing, dict):
        old = read_readings(_quiet_reader(), {"readings": plain_value(existing)}, panel)
        if old == readings:
            return
    created = not isinstance(existing, Table)
    t = tomlkit.table() if created else existing
    lab = list(panel.phase_labels)
    pairs = [lab[0] + lab[1], lab[1] + lab[2], lab[2] + lab[0]]
    if any(len(x) > 1 for x in lab):
        pairs = [f"{lab[0]}-{lab[1]}", f"{lab[1]}-{lab[2]}", f"{lab[2]}-{lab[0]}"]
    parts = {
        "amps": _triple_table(lab, readings.phase_amps, {"N": readings.neutral_amps}),
        "volts_ll": _triple_table(pairs, readings.volts_ll, {}),
        "volts_ln": _triple_table(lab, readings.volts_ln, {}),
    }
    for key, table in parts.items():
        if len(table) == 0:
            if key in t:
                del t[key]
        else:
            t[key] = table
    set_key(t, "taken", readings.taken)
    if created:
        insert_table(doc, "readings", t, ("supply", "panel", "format"))


def _profile_table(profile: UserProfile) -> Table:
    t = tomlkit.table()
    if profile.description:
        t["description"] = profile.description
    rows = tomlkit.array()
    for order, mag, ang in profile.harmonics:
        rows.append([order, clean_value(mag), clean_value(ang)])
    t["harmonics"] = rows
    return t


def _write_profiles(doc: TOMLDocument, profiles: tuple[UserProfile, ...]) -> None:
    existing: Any = doc.get("profiles")
    if isinstance(existing, dict):
        old = read_profiles(_quiet_reader(), {"profiles": plain_value(existing)})
        if old == profiles:
            return
    if not profiles:
        if existing is not None:
            del doc["profiles"]
        return
    if not isinstance(existing, Table):
        existing = tomlkit.table(is_super_table=True)
        insert_table(doc, "profiles", existing, ("readings", "supply", "panel", "format"))
        existing = doc["profiles"]
    wanted = {p.name: p for p in profiles}
    for name in list(existing.keys()):
        if name not in wanted:
            del existing[name]
    for name, profile in wanted.items():
        body = existing.get(name)
        if isinstance(body, dict):
            old = read_profiles(_quiet_reader(), {"profiles": {name: plain_value(body)}})
            if old == (profile,):
                continue
            set_key(body, "description", profile.description or None)
            body["harmonics"] = [
                [o, clean_value(m), clean_value(a)] for o, m, a in profile.harmonics
            ]
        else:
            table = _profile_table(profile)
            table.add(tomlkit.nl())
            existing[name] = table


def _write_circuit(table: Any, c: Circuit, schedule: Schedule) -> None:
    panel = schedule.panel
    if isinstance(table, dict) and c.source_index is not None:
        old = read_circuit(_quiet_reader(), plain_value(table), c.source_index, panel)
        if old == c:
            return
    if panel.layout == TWO_COLUMN:
        set_key(table, "slot", c.slot)
        if "phases" in table:
            del table["phases"]
    else:
        old_phases = table.get("phases")
        old_parsed = (
            parse_phase_text(str(old_phases), panel.phase_labels)
            if isinstance(old_phases, str)
            else None
        )
        if c.phases is None:
            set_key(table, "phases", None)
        elif old_parsed != c.phases:
            table["phases"] = schedule.phase_text(c.phases)
        if "slot" in table:
            del table["slot"]
    set_key(table, "name", c.name)
    poles_default = len(c.phases) if (panel.layout == PHASES and c.phases) else 1
    if "poles" in table or c.poles != poles_default:
        set_key(table, "poles", c.poles)
    if c.feed is None:  # a feeder circuit's load is its panel's; its feeds keys stay as written
        load_key = None if c.spare else f"load_{c.load_kind}"
        for key in ("load_va", "load_w", "load_a"):
            if key != load_key and key in table:
                del table[key]
        if load_key is not None:
            set_key(table, load_key, c.load_value if c.leg_values is None else c.leg_values)
    set_key(table, "pf", c.pf, 1.0)
    set_key(table, "leading", c.leading, False)
    set_key(table, "profile", c.profile, "linear")
    set_key(table, "continuous", c.continuous, False)
    set_key(table, "locked", c.locked, False)
    set_key(table, "breaker_a", c.breaker_a)
    if c.note or "note" in table:
        set_key(table, "note", c.note or None)
    set_key(table, "neutral", c.neutral, False)
    set_key(table, "shared_neutral", c.shared_neutral)
    set_key(table, "handle_tied", c.handle_tied, False)
    set_key(table, "spare", c.spare, False)
    set_key(table, "rcd", c.rcd)
    if c.use or "use" in table:
        set_key(table, "use", use_table(c.use) if c.use else None)


def _write_circuits(doc: TOMLDocument, schedule: Schedule) -> None:
    existing: Any = doc.get("circuit")
    if not schedule.circuits:
        if existing is not None:
            del doc["circuit"]
        return
    old_tables: list[Any] = list(existing) if isinstance(existing, AoT) else []
    order = [c.source_index for c in schedule.circuits]
    kept = [k for k in order if k is not None and k < len(old_tables)]
    n_old = sum(1 for k in order if k is not None)
    new_at_end = len(kept) == n_old and all(k is None for k in order[len(kept) :])
    if isinstance(existing, AoT) and kept == sorted(set(kept)) and new_at_end:
        # Usual case: circuits edited, some deleted, new ones appended.
        for k in reversed(range(len(old_tables))):
            if k not in kept:
                del existing[k]
        aot = existing
        first_new = len(kept)
    else:
        # Reordered: rebuild the array, reusing each original table once.
        used: set[int] = set()
        rebuilt = tomlkit.aot()
        for src in order:
            if src is not None and src < len(old_tables) and src not in used:
                used.add(src)
                rebuilt.append(old_tables[src])
            else:
                rebuilt.append(tomlkit.table())
        if existing is not None:
            del doc["circuit"]
        doc["circuit"] = rebuilt
        aot = doc["circuit"]
        first_new = 0
    tables = list(aot)
    for i, c in enumerate(schedule.circuits):
        if i < len(tables):
            _write_circuit(tables[i], c, schedule)
        else:
            t = tomlkit.table()
            _write_circuit(t, c, schedule)
            aot.append(t)
    tables = list(aot)
    for t in tables[max(0, first_new - 1) : -1]:
        end_with_blank_line(t)


def updated_document(schedule: Schedule, original: TOMLDocument | None = None) -> TOMLDocument:
    """A TOML document for ``schedule``, based on ``original`` where given.

    The original is not modified: a copy is parsed from its text and only the
    tables and keys whose values differ from the model are changed.
    """
    if original is None:
        doc = tomlkit.document()
        for line in HEADER_COMMENT:
            doc.add(tomlkit.comment(line))
        doc.add("format", FORMAT_VERSION)
        doc.add(tomlkit.nl())
    else:
        doc = tomlkit.parse(original.as_string())
        set_key(doc, "format", schedule.format)
    _write_panel(doc, schedule.panel)
    _write_supply(doc, schedule.supply)
    _write_readings(doc, schedule.readings, schedule.panel)
    _write_profiles(doc, schedule.profiles)
    _write_rcds(doc, schedule)
    _write_circuits(doc, schedule)
    return doc


def schedule_text(schedule: Schedule, original: TOMLDocument | None = None) -> str:
    """The TOML text that :func:`save_schedule` would write (ending with a newline)."""
    text = updated_document(schedule, original).as_string()
    return text if text.endswith("\n") else text + "\n"


def save_schedule(
    path: str | Path, schedule: Schedule, original: TOMLDocument | None = None
) -> TOMLDocument:
    """Save ``schedule`` to ``path`` atomically (:func:`~tri.schedule.atomic.write_atomic`),
    keeping the comments of ``original``.

    Returns the document written, to be kept as the new ``original``.
    """
    text = schedule_text(schedule, original)
    write_atomic(path, text)
    return tomlkit.parse(text)
