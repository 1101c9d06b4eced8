"""Autosave journal: unsaved edits kept on disk so a crash or a dropped session loses nothing.

After every edit the terminal UI writes the whole current schedule model
here (plain JSON, a few kilobytes). Saving the schedule deletes the journal.
When a file is opened and a journal for it exists whose schedule differs from
the file, the UI offers to recover it.

Where it lives
--------------
``$XDG_STATE_HOME/tri/journal/`` (default ``~/.local/state/tri/journal/``),
one file per schedule, named after the schedule's file name and a short hash
of its absolute path, so a read-only folder or a version-controlled folder
is never touched. An untitled schedule (a demo copy, a new panel not yet
saved) has its own journal named ``untitled-<panel name>``.

What it holds
-------------
The model (with each circuit's position in the original file, so saving the
recovered schedule still keeps the file's comments), the SHA-256 of the file
as it was when editing began (to tell whether the file changed on disk
since), a UTC time stamp and the number of edits.

This module does file I/O but imports nothing from the engine's internals or
from any UI library.
"""

from __future__ import annotations

import contextlib
import dataclasses
import datetime as _dt
import hashlib
import json
import os
import re
import tempfile
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from tri.schedule.log_spec import LogSpec
from tri.schedule.model import (
    Circuit,
    PanelInfo,
    Rcd,
    Readings,
    Schedule,
    Supply,
    UserProfile,
)
from tri.schedule.slots import RIGHT_ABC

JOURNAL_VERSION = 1
JOURNAL_SUFFIX = ".tri-journal"


def state_dir() -> Path:
    """``$XDG_STATE_HOME/tri`` (default ``~/.local/state/tri``)."""
    base = os.environ.get("XDG_STATE_HOME")
    root = Path(base) if base else Path.home() / ".local" / "state"
    return root / "tri"


def journal_path(path: str | Path | None, panel_name: str = "") -> Path:
    """Where the journal of the schedule at ``path`` lives (``None``: untitled)."""
    folder = state_dir() / "journal"
    if path is None:
        slug = re.sub(r"[^A-Za-z0-9._-]+", "-", panel_name).strip("-")[:40] or "panel"
        return folder / f"untitled-{slug}{JOURNAL_SUFFIX}"
    absolute = str(Path(path).expanduser().resolve())
    digest = hashlib.sha256(absolute.encode("utf-8")).hexdigest()[:12]
    return folder / f"{Path(path).name}-{digest}{JOURNAL_SUFFIX}"


def file_digest(path: str | Path | None) -> str | None:
    """SHA-256 of a file's bytes, ``None`` when there is no such file."""
    if path is None:
        return None
    try:
        return hashlib.sha256(Path(path).read_bytes()).hexdigest()
    except OSError:
        return None


# ---------------------------------------------------------------- model <-> data


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
            "high_leg": p.high_leg,
            "right_column": p.right_column,
            "fed_from": p.fed_from,
            "max_row_shift": p.max_row_shift,
        },
        "rcds": [{"name": r.name, "poles": r.poles, "phase": r.phase} for r in schedule.rcds],
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
        "log": None if schedule.log is None else dataclasses.asdict(schedule.log),
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
                "neutral": c.neutral,
                "leg_values": None if c.leg_values is None else list(c.leg_values),
                "shared_neutral": c.shared_neutral,
                "handle_tied": c.handle_tied,
                "spare": c.spare,
                "rcd": c.rcd,
                "use": [list(u) for u in c.use],
                "source_index": c.source_index,
            }
            for c in schedule.circuits
        ],
    }


def _int_or_none(value: Any) -> int | None:
    return None if value is None else int(value)


def _triple(values: Any) -> tuple[float | None, float | None, float | None]:
    a, b, c = (None if v is None else float(v) for v in values)
    return (a, b, c)


def _log_from_data(raw: Any) -> LogSpec | None:
    """The ``[log]`` table back from the journal (tuples where the model keeps them)."""
    if raw is None:
        return None
    fields = dict(raw)
    fields["amps"] = tuple(str(x) for x in fields["amps"])
    if fields.get("volts_ll") is not None:
        fields["volts_ll"] = tuple(str(x) for x in fields["volts_ll"])
    return LogSpec(**fields)


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
            high_leg=_int_or_none(p.get("high_leg")),
            right_column=str(p.get("right_column", RIGHT_ABC)),
            fed_from=p.get("fed_from"),
            max_row_shift=_int_or_none(p.get("max_row_shift")),
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
                neutral=bool(c.get("neutral", False)),
                leg_values=None
                if c.get("leg_values") is None
                else tuple(float(x) for x in c["leg_values"]),
                shared_neutral=c.get("shared_neutral"),
                handle_tied=bool(c.get("handle_tied", False)),
                spare=bool(c.get("spare", False)),
                rcd=c.get("rcd"),
                use=tuple((str(k), float(v)) for k, v in c.get("use", [])),
                source_index=None if c.get("source_index") is None else int(c["source_index"]),
            )
            for c in data["circuits"]
        )
        rcds = tuple(
            Rcd(str(r["name"]), int(r["poles"]), _int_or_none(r["phase"]))
            for r in data.get("rcds", [])
        )
        return Schedule(
            panel=panel,
            circuits=circuits,
            supply=supply,
            readings=readings,
            profiles=profiles,
            format=int(data.get("format", 1)),
            rcds=rcds,
            log=_log_from_data(data.get("log")),
        )
    except (KeyError, TypeError, ValueError, IndexError) as exc:
        raise ValueError(f"not a readable journal: {exc}") from None


# ---------------------------------------------------------------- the journal file


@dataclass(frozen=True)
class JournalEntry:
    """A journal read back from disk.

    Attributes
    ----------
    schedule : Schedule
        The schedule as it was after the last edit.
    path : str or None
        The schedule file it belongs to (absolute), ``None`` for untitled.
    base_digest : str or None
        SHA-256 of the file when editing began.
    written_utc : str
        ISO time stamp (UTC) of the last write.
    edits : int
        Number of edits since the file was opened or saved.
    """

    schedule: Schedule
    path: str | None
    base_digest: str | None
    written_utc: str
    edits: int

    def file_changed_since(self) -> bool:
        """True when the file on disk is no longer the one the edits started from."""
        return self.path is not None and file_digest(self.path) != self.base_digest


def write_journal(
    target: Path,
    schedule: Schedule,
    path: str | Path | None,
    base_digest: str | None,
    edits: int,
) -> None:
    """Write the journal atomically (temporary file, then rename).

    No fsync: the point is to survive the program dying (crash, dropped SSH
    session), for which the operating system keeps the written data.

    Raises
    ------
    OSError
        When the state folder cannot be written.
    """
    payload = {
        "tri_journal": JOURNAL_VERSION,
        "path": None if path is None else str(Path(path).expanduser().resolve()),
        "base_digest": base_digest,
        "written_utc": _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds"),
        "edits": edits,
        "schedule": schedule_to_data(schedule),
    }
    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=".journal.", suffix=".tmp", dir=target.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            json.dump(payload, fh)
        os.replace(tmp, target)
        tmp = ""
    finally:
        if tmp:
            with contextlib.suppress(OSError):
                os.unlink(tmp)


def read_journal(target: Path) -> JournalEntry | None:
    """The journal at ``target``, or ``None`` when absent or unreadable."""
    try:
        payload = json.loads(target.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    if not isinstance(payload, dict) or payload.get("tri_journal") != JOURNAL_VERSION:
        return None
    try:
        schedule = schedule_from_data(payload["schedule"])
    except (ValueError, KeyError):
        return None
    return JournalEntry(
        schedule=schedule,
        path=payload.get("path"),
        base_digest=payload.get("base_digest"),
        written_utc=str(payload.get("written_utc", "")),
        edits=int(payload.get("edits", 0) or 0),
    )


def discard_journal(target: Path) -> None:
    """Delete the journal (after a save, or when the user discards it)."""
    with contextlib.suppress(OSError):
        target.unlink()
