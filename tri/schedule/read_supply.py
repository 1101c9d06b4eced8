"""Read the optional ``[supply]`` table: the transformer and feeder behind the panel.

Every key is a number with a range; :data:`SUPPLY_RULES` declares them, one
line per key, in the order of the engine's
:class:`~tri.engine.inputs.SupplyImpedance` fields.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from tri.schedule.locate import TableKey
from tri.schedule.model import Supply
from tri.schedule.reader import MISSING, Reader
from tri.schedule.rules import Rule, between, read_rules

_OHM_PER_KM = between(0, 100, " ohm/km")

SUPPLY_RULES: dict[str, Rule] = {
    "transformer_kva": Rule("number", between(1, 100_000, " kVA"), required=True),
    "transformer_z_pct": Rule(
        "number", between(0.5, 25, " % (distribution transformers)"), required=True
    ),
    "transformer_x_r": Rule("number", between(0.1, 100), required=True),
    "feeder_length_m": Rule("number", between(0, 10_000, " m"), default=0.0),
    "feeder_r_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
    "feeder_x_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
    "neutral_r_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
    "neutral_x_ohm_per_km": Rule("number", _OHM_PER_KM, default=0.0),
}
SUPPLY_KEYS = tuple(SUPPLY_RULES)

_TABLE: TableKey = ("supply",)
_WHERE = "[supply]"


def read_supply(r: Reader, data: Mapping[str, Any]) -> Supply | None:
    """The ``[supply]`` table of ``data`` (a whole document); ``None`` if absent or bad."""
    raw = r.table(data, "supply")
    if raw is None or raw is MISSING:
        return None
    r.unknown_keys(raw, SUPPLY_KEYS, _TABLE, _WHERE)
    values = read_rules(r, raw, SUPPLY_RULES, _TABLE, _WHERE)
    if any(v is MISSING for v in values.values()):
        return None
    return Supply(**values)
