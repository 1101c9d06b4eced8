"""A circuit's ``use`` table: its share of the load in each named scenario.

```toml
[[circuit]]
name = "EV charger, bay 1"
load_a = 32
use = { day = 0.2, night = 1.0 }
```

Every name used in any circuit's ``use`` is a scenario. A circuit without
``use``, or whose ``use`` does not name a scenario, is at 1.0 in it (its
full scheduled load: the safe reading of a table that says nothing).
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from typing import Any

#: Largest use factor accepted [-] (a circuit at twice its scheduled load is
#: a schedule to correct, not a scenario).
MAX_USE = 2.0
#: A scenario name: a letter, then letters, digits, ``-`` or ``_``.
NAME_PATTERN = re.compile(r"^[A-Za-z][A-Za-z0-9_-]{0,31}$")

UseFactors = tuple[tuple[str, float], ...]


def read_use(
    add: Any, raw: Mapping[str, Any], table: Any, where: str, index: int
) -> UseFactors | None:
    """Read ``use`` of one circuit; ``None`` after reporting a problem.

    Parameters
    ----------
    add : callable
        ``add(message, table, key, where, circuit_index)`` records a problem.
    raw : mapping
        The circuit's table.
    table, where, index
        Location of the circuit for messages.

    Returns
    -------
    tuple of (name, factor)
        In the file's order; empty when the key is absent.
    """
    value = raw.get("use")
    if value is None:
        return ()
    if not isinstance(value, dict) or not value:
        add(
            f"found {value!r}, expected a table of scenario shares such as "
            "{ day = 0.2, night = 1.0 }",
            table,
            "use",
            where,
            index,
        )
        return None
    out = []
    ok = True
    for name, factor in value.items():
        if not NAME_PATTERN.match(str(name)):
            add(
                f"scenario name '{name}': expected a letter, then letters, digits, - or _ "
                "(at most 32)",
                table,
                "use",
                where,
                index,
            )
            ok = False
            continue
        if (
            isinstance(factor, bool)
            or not isinstance(factor, int | float)
            or not math.isfinite(float(factor))
            or not 0 <= float(factor) <= MAX_USE
        ):
            add(
                f"{name} = {factor!r}: expected a share of the load from 0 to {MAX_USE:g} "
                "(1.0 = the scheduled load)",
                table,
                "use",
                where,
                index,
            )
            ok = False
            continue
        out.append((str(name), float(factor)))
    return tuple(out) if ok else None


def use_table(use: UseFactors) -> Any:
    """``use`` as a TOML inline table for saving (``None`` when empty)."""
    if not use:
        return None
    import tomlkit

    t = tomlkit.inline_table()
    for name, factor in use:
        t[name] = int(factor) if float(factor).is_integer() else factor
    return t
