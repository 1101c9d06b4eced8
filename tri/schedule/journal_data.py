"""The autosave journal's data: a schedule model as plain JSON-ready data and back.

Every field of the model is kept, with each circuit's position in the
original file (``source_index``), so that saving a recovered schedule
still keeps the file's comments. The conversion follows the model's own
dataclass fields and type hints, so a key added to the model (a feeder, a
log, per-leg loads) is journaled without touching this module. The values
read back are checked by the loader's own rules before the journal is
trusted (see :func:`tri.schedule.journal.read_journal`).
"""

from __future__ import annotations

import dataclasses
import functools
import types
import typing
from typing import Any

from tri.schedule.model import Schedule


def schedule_to_data(schedule: Schedule) -> dict[str, Any]:
    """The model as plain JSON-ready data (circuits keep ``source_index``)."""
    data = _plain(schedule)
    assert isinstance(data, dict)
    return data


def _plain(value: Any) -> Any:
    """Dataclasses as dicts of their fields, tuples as lists, numbers and text as they are."""
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        return {f.name: _plain(getattr(value, f.name)) for f in dataclasses.fields(value)}
    if isinstance(value, (tuple, list)):
        return [_plain(v) for v in value]
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    return value


def schedule_from_data(data: dict[str, Any]) -> Schedule:
    """Inverse of :func:`schedule_to_data`.

    Raises
    ------
    ValueError
        When the data is not a journal written by this version.
    """
    try:
        schedule = _build(Schedule, data)
    except (KeyError, TypeError, ValueError, IndexError, AttributeError) as exc:
        raise ValueError(f"not a readable journal: {exc}") from None
    assert isinstance(schedule, Schedule)
    return schedule


@functools.cache
def _hints(cls: type) -> dict[str, Any]:
    return typing.get_type_hints(cls)


def _build(cls: type, raw: Any) -> Any:
    """An instance of dataclass ``cls`` from its plain data (missing fields take defaults)."""
    if not isinstance(raw, dict):
        raise TypeError(f"{cls.__name__}: found {type(raw).__name__}, expected a table")
    hints = _hints(cls)
    kwargs = {
        f.name: _convert(raw[f.name], hints[f.name])
        for f in dataclasses.fields(cls)
        if f.name in raw and f.init
    }
    return cls(**kwargs)


def _convert(value: Any, hint: Any) -> Any:
    """``value`` (plain data) as the type ``hint`` names."""
    origin = typing.get_origin(hint)
    args = typing.get_args(hint)
    if origin in (typing.Union, types.UnionType):
        if value is None and type(None) in args:
            return None
        inner = [a for a in args if a is not type(None)]
        return _convert(value, inner[0]) if len(inner) == 1 else value
    if origin is tuple:
        if not isinstance(value, list):
            raise TypeError(f"found {type(value).__name__}, expected a list")
        if len(args) == 2 and args[1] is Ellipsis:
            return tuple(_convert(v, args[0]) for v in value)
        if len(args) != len(value):
            raise ValueError(f"found {len(value)} items, expected {len(args)}")
        return tuple(_convert(v, a) for v, a in zip(value, args, strict=True))
    if origin is typing.Literal or hint is Any:
        return value
    if isinstance(hint, type) and dataclasses.is_dataclass(hint):
        return _build(hint, value)
    if hint is bool:
        if not isinstance(value, bool):
            raise TypeError(f"found {value!r}, expected true or false")
        return value
    if hint in (int, float, str):
        return hint(value)
    return value
