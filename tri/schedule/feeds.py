"""Feeder circuits: the ``feeds``, ``feeder`` and ``transformer`` keys of a ``[[circuit]]``.

A feeder circuit names the schedule file of the panel it feeds (``feeds``,
relative to its own file), optionally the feeder conductors (``feeder``)
and a transformer between them (``transformer``). It has no load key: the
panel it feeds gives its load. Keys are in ``shared/spec/field-keys.md``.

The inline tables are read with the same rules as every other table; a
problem inside one is reported at its key (``feeder`` or ``transformer``,
whose line the file gives) naming the inner key.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from tri.engine.transformer import parse_vector_group
from tri.engine.tree_inputs import FeederImpedance
from tri.schedule.locate import TableKey
from tri.schedule.reader import MISSING, Reader, found
from tri.schedule.rules import Rule, between, read_rules
from tri.schedule.systems import SYSTEMS

_OHM_PER_KM = between(0, 100, " ohm/km")

FEEDER_RULES: dict[str, Rule] = {
    "length_m": Rule("number", between(0, 10_000, " m"), default=0.0),
    "r_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
    "x_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
    "neutral_r_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
    "neutral_x_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
}
TRANSFORMER_RULES: dict[str, Rule] = {
    "kva": Rule("number", between(1, 100_000, " kVA"), required=True),
    "z_pct": Rule("number", between(0.5, 25, " % (distribution transformers)"), required=True),
    "x_r": Rule("number", between(0.1, 100), required=True),
    "connection": Rule("text", required=True),
    "secondary": Rule("text", required=True),
}
#: The circuit keys of a feeder.
FEED_KEYS = ("feeds", "feeder", "transformer")


@dataclass(frozen=True)
class TransformerSpec:
    """The ``transformer`` inline table of a feeder circuit.

    Attributes
    ----------
    kva : float
        Rating [kVA].
    z_pct : float
        Percent impedance [%].
    x_r : float
        X/R ratio [-].
    connection : str
        Vector group as written, e.g. ``"Dyn"`` (the clock number defaults
        as :func:`tri.engine.transformer.parse_vector_group` says).
    secondary : str
        System key of the secondary, e.g. ``"208Y/120"``.
    """

    kva: float
    z_pct: float
    x_r: float
    connection: str
    secondary: str


@dataclass(frozen=True)
class Feed:
    """What a feeder circuit feeds.

    Attributes
    ----------
    path : str
        The child's schedule file as written (relative to this file).
    feeder : FeederImpedance
        Feeder conductors (zero impedance when not given).
    transformer : TransformerSpec or None
        A transformer between the feeder and the child.
    """

    path: str
    feeder: FeederImpedance = field(default_factory=FeederImpedance)
    transformer: TransformerSpec | None = None


def _inline(
    r: Reader,
    raw: Mapping[str, Any],
    key: str,
    rules: dict[str, Rule],
    table: TableKey,
    where: str,
    index: int,
) -> dict[str, Any] | None:
    """Read the inline table ``raw[key]`` by ``rules``; issues located at ``key``."""
    sub = raw[key]
    if not isinstance(sub, dict):
        example = (
            "{ length_m = 30, r_ohm_per_km = 0.2 }" if key == "feeder" else "{ kva = 45, ... }"
        )
        r.add(
            f"found {found(sub)}, expected an inline table such as {example}",
            table,
            key,
            where,
            index,
        )
        return None
    inner = Reader(r.filename, None)
    inner.unknown_keys(sub, tuple(rules), table, where, index)
    values = read_rules(inner, sub, rules, table, where, index)
    for issue in inner.issues:
        r.add(f"{issue.key}: {issue.message}", table, key, where, index)
    if inner.issues or any(v is MISSING for v in values.values()):
        return None
    return values


def read_feed(
    r: Reader, raw: Mapping[str, Any], table: TableKey, where: str, index: int
) -> Feed | None:
    """The feeder keys of one circuit table, or ``None`` (absent, or reported on ``r``).

    Parameters
    ----------
    r : Reader
        Collects located issues.
    raw : mapping
        The circuit's table.
    table, where, index
        Where the circuit is, for messages.

    Returns
    -------
    Feed or None
    """
    if "feeds" not in raw:
        for key in ("feeder", "transformer"):
            if key in raw:
                r.add(
                    f"only a feeder circuit takes '{key}'; add feeds = \"FILE.toml\" "
                    "(the panel it feeds) or remove it",
                    table,
                    key,
                    where,
                    index,
                )
        return None
    path = raw["feeds"]
    ok = True
    if not isinstance(path, str) or not path.strip():
        r.add(
            f'found {found(path)}, expected the file it feeds, e.g. "lp1.toml"',
            table,
            "feeds",
            where,
            index,
        )
        ok = False
    feeder = FeederImpedance()
    if "feeder" in raw:
        values = _inline(r, raw, "feeder", FEEDER_RULES, table, where, index)
        ok = ok and values is not None
        feeder = FeederImpedance(**values) if values else feeder
    transformer = None
    if "transformer" in raw:
        values = _inline(r, raw, "transformer", TRANSFORMER_RULES, table, where, index)
        ok = ok and values is not None
        if values is not None:
            transformer = _transformer(r, values, table, where, index)
            ok = ok and transformer is not None
    if not ok:
        return None
    return Feed(path=path.strip(), feeder=feeder, transformer=transformer)


def _transformer(
    r: Reader, values: dict[str, Any], table: TableKey, where: str, index: int
) -> TransformerSpec | None:
    try:
        parse_vector_group(values["connection"])
    except ValueError as exc:
        r.add(f"connection: {exc}", table, "transformer", where, index)
        return None
    secondary = values["secondary"]
    if secondary not in SYSTEMS:
        r.add(
            f"secondary: unknown system '{secondary}' (expected one of {', '.join(SYSTEMS)})",
            table,
            "transformer",
            where,
            index,
        )
        return None
    return TransformerSpec(**values)


def check_feeder_circuit(
    r: Reader, raw: Mapping[str, Any], poles: Any, table: TableKey, where: str, index: int
) -> None:
    """A feeder circuit has no load key and three poles (the child's A, B, C)."""
    from tri.schedule.model import LOAD_KEYS

    child = raw.get("feeds")
    shown = f"'{child}'" if isinstance(child, str) else "the panel it feeds"
    for key in LOAD_KEYS:
        if key in raw:
            r.add(
                f"a feeder circuit carries the load of {shown}; remove {key} (the circuits "
                "of that file give the load)",
                table,
                key,
                where,
                index,
            )
    if poles is not None and poles is not MISSING and poles != 3:
        r.add(
            f"found {poles!r}, a feeder to a panel is a 3-pole breaker (its phases A, B, C "
            "continue along the feeder)",
            table,
            "poles",
            where,
            index,
        )
