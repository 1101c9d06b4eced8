"""The autosave journal's data: a schedule model as plain JSON-ready data and back.

Every field of the model is kept, with each circuit's position in the
original file (``source_index``), so that saving a recovered schedule
still keeps the file's comments. The values read back are checked by the
loader's own rules before the journal is trusted (see
:func:`tri.schedule.journal.read_journal`).
"""

from __future__ import annotations

from typing import Any

from tri.schedule.model import (
    Circuit,
    PanelInfo,
    Readings,
    Schedule,
    Supply,
    UserProfile,
)


def schedule_to_data(schedule: Schedule) -> dict[str, Any]:
    """The model as plain JSON-ready data (circuits keep ``source_index``)."""
    p = schedule.panel
    return {
        "format": schedule.format,
        "panel": {
            "name": p.name,
            "system": p.system,
            "frequency_hz": p.frequency_hz,
            "spaces": p.spaces,
            "bus_a": p.bus_a,
            "main_a": p.main_a,
            "neutral_a": p.neutral_a,
            "phase_labels": list(p.phase_labels),
            "layout": p.layout,
        },
        "supply": None if schedule.supply is None else dict(vars(schedule.supply)),
        "readings": None
        if schedule.readings is None
        else {
            "phase_amps": list(schedule.readings.phase_amps),
            "neutral_amps": schedule.readings.neutral_amps,
            "volts_ll": list(schedule.readings.volts_ll),
            "volts_ln": list(schedule.readings.volts_ln),
            "taken": schedule.readings.taken,
        },
        "profiles": [
            {
                "name": u.name,
                "harmonics": [list(h) for h in u.harmonics],
                "description": u.description,
            }
            for u in schedule.profiles
        ],
        "circuits": [
            {
                "name": c.name,
                "poles": c.poles,
                "slot": c.slot,
                "phases": None if c.phases is None else list(c.phases),
                "load_kind": c.load_kind,
                "load_value": c.load_value,
                "pf": c.pf,
                "leading": c.leading,
                "profile": c.profile,
                "continuous": c.continuous,
                "locked": c.locked,
                "breaker_a": c.breaker_a,
                "note": c.note,
                "source_index": c.source_index,
            }
            for c in schedule.circuits
        ],
    }


def _triple(values: Any) -> tuple[float | None, float | None, float | None]:
    a, b, c = (None if v is None else float(v) for v in values)
    return (a, b, c)


def schedule_from_data(data: dict[str, Any]) -> Schedule:
    """Inverse of :func:`schedule_to_data`.

    Raises
    ------
    ValueError
        When the data is not a journal written by this version.
    """
    try:
        p = data["panel"]
        labels = tuple(str(x) for x in p["phase_labels"])
        if len(labels) != 3:
            raise ValueError("three phase labels expected")
        panel = PanelInfo(
            name=str(p["name"]),
            system=str(p["system"]),
            frequency_hz=float(p["frequency_hz"]),
            spaces=int(p["spaces"]),
            bus_a=float(p["bus_a"]),
            main_a=None if p["main_a"] is None else float(p["main_a"]),
            neutral_a=None if p["neutral_a"] is None else float(p["neutral_a"]),
            phase_labels=(labels[0], labels[1], labels[2]),
            layout=str(p["layout"]),
        )
        s = data.get("supply")
        supply = None if s is None else Supply(**{k: float(v) for k, v in s.items()})
        r = data.get("readings")
        readings = (
            None
            if r is None
            else Readings(
                phase_amps=_triple(r["phase_amps"]),
                neutral_amps=None if r["neutral_amps"] is None else float(r["neutral_amps"]),
                volts_ll=_triple(r["volts_ll"]),
                volts_ln=_triple(r["volts_ln"]),
                taken=r.get("taken"),
            )
        )
        profiles = tuple(
            UserProfile(
                name=str(u["name"]),
                harmonics=tuple((int(o), float(m), float(a)) for o, m, a in u["harmonics"]),
                description=str(u.get("description", "")),
            )
            for u in data.get("profiles", [])
        )
        circuits = tuple(
            Circuit(
                name=str(c["name"]),
                poles=int(c["poles"]),
                slot=None if c["slot"] is None else int(c["slot"]),
                phases=None if c["phases"] is None else tuple(int(x) for x in c["phases"]),
                load_kind=c["load_kind"],
                load_value=float(c["load_value"]),
                pf=float(c["pf"]),
                leading=bool(c["leading"]),
                profile=str(c["profile"]),
                continuous=bool(c["continuous"]),
                locked=bool(c["locked"]),
                breaker_a=None if c["breaker_a"] is None else float(c["breaker_a"]),
                note=str(c.get("note", "")),
                source_index=None if c.get("source_index") is None else int(c["source_index"]),
            )
            for c in data["circuits"]
        )
        return Schedule(
            panel=panel,
            circuits=circuits,
            supply=supply,
            readings=readings,
            profiles=profiles,
            format=int(data.get("format", 1)),
        )
    except (KeyError, TypeError, ValueError, IndexError) as exc:
        raise ValueError(f"not a readable journal: {exc}") from None
