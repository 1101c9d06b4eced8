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


# ---------------------------------------------------------------- bounds
# What the trade can mean. Each bound is documented in the README's reference
# ("Bounds"); a value outside is a located error that names the bound.

#: Bus, main and neutral ratings [A]: from a small sub-panel to the largest
#: switchboard bus (6000 A is the largest common rating) with room to spare.
RATING_A = (1.0, 10_000.0)
#: Breaker ratings [A]: from a 0.5 A miniature breaker to a 6000 A frame.
BREAKER_A = (0.5, 6_000.0)
#: A circuit's load given in VA or W [VA, W]: 0 (a spare), else from 0.001
#: (an indicator lamp) to 5 MVA (more than a 4000 A, 600 V three-pole feeder).
LOAD_VA = (0.001, 5_000_000.0)
#: A circuit's load given in amperes [A]: 0, else 0.001 A to 10 000 A.
LOAD_A = (0.001, 10_000.0)
#: Displacement power factor [-]: a capacitor bank is near 0.001 (leading).
POWER_FACTOR = (0.001, 1.0)
#: Measured true-RMS currents [A].
READING_A = (0.0, 10_000.0)
#: Harmonic magnitude relative to the fundamental [-] and angle [deg].
HARMONIC_MAGNITUDE = (0.0, 5.0)
ANGLE_DEG = (-360.0, 360.0)
#: Names of panels and circuits, phase labels [characters].
MAX_NAME_CHARS = 200
#: ``[[circuit]]`` tables in one schedule, and ``[profiles.NAME]`` tables.
MAX_CIRCUITS = 1000
MAX_PROFILES = 100


def _fmt(x: float) -> str:
    """A bound as people write it: ``10 000``, ``0.5``, ``5 000 000``."""
    if float(x).is_integer() and abs(x) < 1e15:
        return f"{int(x):,}".replace(",", " ")
    return f"{x:g}"


def positive(v: float) -> str | None:
    """A value above 0."""
    return None if v > 0 else "expected a value greater than 0"


def non_negative(v: float) -> str | None:
    """A value of 0 or more."""
    return None if v >= 0 else "expected 0 or more"


def between(lo: float, hi: float, what: str = "") -> Check:
    """A value from ``lo`` to ``hi`` inclusive; ``what`` names the unit in the message."""

    def check(v: float) -> str | None:
        return None if lo <= v <= hi else f"expected {_fmt(lo)} to {_fmt(hi)}{what}"

    return check


def in_range(bounds: tuple[float, float], what: str = "") -> Check:
    """:func:`between` on a pair of bounds such as :data:`RATING_A`."""
    return between(bounds[0], bounds[1], what)


def zero_or_in_range(bounds: tuple[float, float], what: str = "") -> Check:
    """0, or a value within ``bounds`` (a load: 0 for a spare, else a real size)."""
    lo, hi = bounds

    def check(v: float) -> str | None:
        if v == 0 or lo <= v <= hi:
            return None
        return f"expected 0, or {_fmt(lo)} to {_fmt(hi)}{what}"

    return check


def power_factor(v: float) -> str | None:
    """A displacement power factor from :data:`POWER_FACTOR` (above 0, at most 1)."""
    lo, hi = POWER_FACTOR
    if lo <= v <= hi:
        return None
    return f"expected a power factor above 0 and at most 1 (from {_fmt(lo)})"


def short_text(v: str) -> str | None:
    """A name or label: at most :data:`MAX_NAME_CHARS` characters."""
    if len(v) <= MAX_NAME_CHARS:
        return None
    return f"{len(v)} characters, expected at most {MAX_NAME_CHARS}"
