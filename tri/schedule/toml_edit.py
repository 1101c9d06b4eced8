"""Minimal edits of a TOML document (tomlkit) that keep its comments and layout:
set a key only when its value changes (:func:`set_key`), insert a new
top-level table after a given one (:func:`insert_table`), and tidy values
and separations. :mod:`tri.schedule.save` writes the model with them."""

from __future__ import annotations

from typing import Any

import tomlkit
from tomlkit.items import Table, Whitespace
from tomlkit.toml_document import TOMLDocument


def clean_value(value: Any) -> Any:
    """Whole floats as integers, tuples as lists, so files stay tidy."""
    if isinstance(value, float) and value.is_integer() and abs(value) < 1e15:
        return int(value)
    if isinstance(value, tuple):
        return [clean_value(v) for v in value]
    return value


def plain_value(value: Any) -> Any:
    """A tomlkit item as plain Python data (dicts, lists, numbers, text)."""
    return value.unwrap() if hasattr(value, "unwrap") else value


def same_value(a: Any, b: Any) -> bool:
    """Equal values, lists and tuples compared item by item."""
    if isinstance(a, list | tuple) and isinstance(b, list | tuple):
        return len(a) == len(b) and all(same_value(x, y) for x, y in zip(a, b, strict=True))
    return a == b


def set_key(table: Any, key: str, value: Any, default: Any = None) -> None:
    """Set ``key`` only if its value changes; drop it when it becomes ``None``.

    A key that is absent stays absent while the value equals ``default``.
    """
    present = key in table
    if value is None:
        if present:
            del table[key]
        return
    if not present:
        if default is not None and same_value(value, default):
            return
        table[key] = clean_value(value)
        return
    current = table[key]
    current = plain_value(current)
    if not same_value(current, value):
        table[key] = clean_value(value)


def insert_table(doc: TOMLDocument, key: str, table: Table, after: tuple[str, ...]) -> None:
    """Add a filled top-level table after the first existing key of ``after`` (else at the end).

    tomlkit has no public "insert after"; ``Container._insert_at`` (present from
    tomlkit 0.7 to 0.15) takes a position in ``doc.body``. Any failure appends.
    """
    table.add(tomlkit.nl())
    keys = list(doc.keys())
    for anchor in after:
        if anchor in doc and anchor != keys[-1]:
            position = _body_position_after(doc, anchor)
            if position is None:
                break
            try:
                doc._insert_at(position, key, table)
            except Exception:
                break
            return
    doc[key] = table


def _body_position_after(doc: TOMLDocument, anchor: str) -> int | None:
    """Index in ``doc.body`` just after the top-level entry ``anchor``, or None."""
    for index, (body_key, _item) in enumerate(doc.body):
        if body_key is not None and body_key.key == anchor:
            return index + 1
    return None


def end_with_blank_line(table: Table) -> None:
    """Separate an existing last table from the ones appended after it."""
    body = table.value.body
    if not body or not isinstance(body[-1][1], Whitespace):
        table.add(tomlkit.nl())
