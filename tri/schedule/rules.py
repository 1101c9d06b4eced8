"""Per-key value rules: the type of each scalar key and the range the trade gives it.

A :class:`Rule` says what one scalar key holds (its TOML type, whether it is
required, its default) and which :data:`~tri.schedule.reader.Check` its value
must pass. Each table's reader declares its keys as a mapping of key name to
rule, so adding a key is one line there; a check that several tables share
(a rating in amperes, a power factor) lives here.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from tri.schedule.locate import TableKey
from tri.schedule.reader import Check, Reader


@dataclass(frozen=True)
class Rule:
    """What one scalar key of a table holds.

    Attributes
    ----------
    kind : str
        ``"text"``, ``"int"``, ``"number"`` or ``"bool"``.
    check : Check or None
        Range or content check on a value of the right type; returns the
        problem in words, or ``None`` when the value is good.
    required : bool
        The key must be present.
    default : Any
        Value when the key is absent (and not required).
    """

    kind: str
    check: Check | None = None
    required: bool = False
    default: Any = None


def read_rules(
    r: Reader,
    raw: Mapping[str, Any],
    rules: Mapping[str, Rule],
    table: TableKey,
    where: str,
    circuit_index: int | None = None,
) -> dict[str, Any]:
    """Every key of ``rules`` read from ``raw``, in the order of ``rules``.

    Values that are missing-but-required or wrong are
    :data:`~tri.schedule.reader.MISSING` (and reported on ``r``).
    """
    return {
        key: r.value(
            raw,
            key,
            table,
            where,
            rule.kind,
            required=rule.required,
            default=rule.default,
            check=rule.check,
            circuit_index=circuit_index,
        )
        for key, rule in rules.items()
    }


def positive(v: float) -> str | None:
    """A value above 0."""
    return None if v > 0 else "expected a value greater than 0"


def non_negative(v: float) -> str | None:
    """A value of 0 or more."""
    return None if v >= 0 else "expected 0 or more"


def between(lo: float, hi: float, what: str = "") -> Check:
    """A value from ``lo`` to ``hi`` inclusive; ``what`` names the unit in the message."""

    def check(v: float) -> str | None:
        return None if lo <= v <= hi else f"expected {lo:g} to {hi:g}{what}"

    return check


def power_factor(v: float) -> str | None:
    """A displacement power factor, above 0 and at most 1."""
    return None if 0 < v <= 1 else "expected a power factor above 0 and at most 1"
