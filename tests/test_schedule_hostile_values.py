"""Property: schedules built from extreme but well-typed values never crash, lie or inject.

Hypothesis builds TOML schedules whose numbers sit at, just inside and just
outside every bound (and at the ends of float range: 10**400, 1e308, 1e-320,
inf, nan) and whose texts carry control and bidirectional characters. For
each, through the command in-process (issue 10):

- ``tri report`` in every format and ``tri check`` exit with 0, 1 or 2 only;
- an exit 2 is one clean error on standard error, nothing on standard output;
- no output holds a control character (line ends apart);
- every figure is finite: JSON has no NaN or Infinity, the other formats no
  ``nan`` or ``inf``, and the engine's own results are finite.
"""

from __future__ import annotations

import dataclasses
import json
import math
import re
import tempfile
from pathlib import Path
from typing import Any

import numpy as np
import tomlkit
from cli_support import assert_clean_error, control_chars, run_tri
from hypothesis import HealthCheck, assume, event, given, settings
from hypothesis import strategies as st

from tri.schedule.errors import ScheduleError
from tri.schedule.load import load_schedule
from tri.schedule.to_engine import analyse_schedule

BIG = 10**400
ENDS = [BIG, -BIG, 2**63, 1e308, 1.7976931348623157e308, 1e-320, 5e-324, -0.0, math.inf, -math.inf]
ENDS += [math.nan]


def _pool(inside: list[Any], outside: list[Any], ends: bool = True) -> st.SearchStrategy[Any]:
    """Mostly values inside the bounds (so figures get computed), now and then outside
    (with the ends of float range when ``ends``)."""
    bad = outside + (ENDS if ends else [])
    return st.integers(0, 24).flatmap(lambda k: st.sampled_from(bad if k == 0 else inside))


RATING = _pool([1, 1.0, 10_000, 225, 63.5], [0.999, 10_000.5, 0, -5])
LOAD = _pool([0, 0.001, 5_000_000, 1200, 0.5], [0.0009, 5_000_001, -1])
LOAD_A = _pool([0, 0.001, 10_000, 16], [10_000.1, -0.001])
PF = _pool([0.001, 1, 0.85, 0.05], [0, 1.0001, 0.0009])
BREAKER = _pool([0.5, 6_000, 20], [0.49, 6_001])
SPACES = _pool([420, 42, 30], [0, 1, 421, -1])
FREQUENCY = _pool([40, 70, 50, 60.0], [39.9, 70.1])
KVA = _pool([1, 100_000, 75], [0.5, 100_001])
Z_PCT = _pool([0.5, 25, 4.5], [0.4, 26])
X_R = _pool([0.1, 100, 2.5], [0.09, 101])
LENGTH = _pool([0, 10_000, 25, 1e-6], [10_001, 1e-7])
OHM = _pool([0, 100, 0.2], [101, -0.1])
AMPS = _pool([0, 10_000, 61.0], [10_001, -1])
MAGNITUDE = _pool([0, 5, 0.8, 1e-6], [5.1, 1e-7])
ANGLE = _pool([-360, 360, 0, 180.0], [361, -361])
GOOD_TEXTS = ["Lights", "Ünïcödé ✓", "a|b", "=cmd()", 'q"uote', "x" * 200, "<b>&amp;"]
BAD_TEXTS = [
    "x" * 201, "", "\x1b[2J", "bell\x07", "\u202eevil", "\x9b31m", "nul\x00", "tab\there",
    "a\u2028b", "del\x7f", "\u2066iso\u2069",
]  # fmt: skip
NAME = st.integers(0, 24).flatmap(
    lambda k: (
        st.sampled_from(BAD_TEXTS)
        if k == 0
        else st.sampled_from(GOOD_TEXTS)
        | st.text(
            alphabet=st.characters(exclude_categories=("Cc", "Cs", "Cf", "Zl", "Zp")),
            min_size=1,
            max_size=12,
        ).filter(lambda t: t.strip() and not re.search("nan|inf", t, re.IGNORECASE))
    )
)


@st.composite
def hostile_schedules(draw: st.DrawFn) -> str:
    """TOML text of a schedule with extreme but typed values."""
    system = draw(st.sampled_from(["208Y/120", "480D", "400Y/230", "600Y/347"]))
    panel: dict[str, Any] = {
        "name": draw(NAME),
        "system": system,
        "spaces": draw(SPACES),
        "bus_a": draw(RATING),
    }
    for key, values in (("main_a", RATING), ("neutral_a", RATING), ("frequency_hz", FREQUENCY)):
        if draw(st.booleans()):
            panel[key] = draw(values)
    if draw(st.integers(0, 4)) == 0:
        panel["phase_labels"] = draw(
            _pool(
                [["L1", "L2", "L3"], ["R", "Y", "B"]],
                [["A", "N", "C"], ["X\x1b", "Y", "Z"], [1e308, "Y", "Z"]],
                ends=False,
            )
        )
    doc: dict[str, Any] = {"format": 1, "panel": panel}
    if draw(st.booleans()):
        doc["supply"] = {
            "transformer_kva": draw(KVA),
            "transformer_z_pct": draw(Z_PCT),
            "transformer_x_r": draw(X_R),
            "feeder_length_m": draw(LENGTH),
            "feeder_r_ohm_per_km": draw(OHM),
            "neutral_r_ohm_per_km": draw(OHM),
        }
    if draw(st.booleans()):
        doc["readings"] = {"amps": {"A": draw(AMPS), "N": draw(AMPS)}, "taken": draw(NAME)}
    profiles = ["linear", "vfd", "electronics", "class-d-limit"]
    if draw(st.booleans()):
        profiles.append("drives")
        doc["profiles"] = {
            draw(_pool(["drives"], ["pc\x1b", "x" * 201], ends=False)): {
                "harmonics": [[3, draw(MAGNITUDE), draw(ANGLE)], [99, draw(MAGNITUDE), 0.0]],
                "description": draw(NAME),
            }
        }
    circuits = []
    poles = [2, 3] if system == "480D" else [1, 2, 3]
    for slot in range(1, draw(st.integers(0, 5)) * 6, 6):
        kind = draw(st.sampled_from(["load_va", "load_w", "load_a"]))
        circuit: dict[str, Any] = {
            "slot": slot,
            "name": draw(NAME),
            "poles": draw(st.sampled_from(poles)),
            kind: draw(LOAD_A if kind == "load_a" else LOAD),
            "pf": draw(PF),
            "profile": draw(st.sampled_from(profiles)),
        }
        if draw(st.booleans()):
            circuit["breaker_a"] = draw(BREAKER)
        if draw(st.booleans()):
            circuit["note"] = draw(NAME)
        circuits.append(circuit)
    if circuits:
        doc["circuit"] = circuits
    try:
        return tomlkit.dumps(doc)
    except Exception:
        assume(False)
        raise


def _no_nan(token: str) -> float:
    raise AssertionError(f"JSON holds {token}")


def _engine_numbers(obj: Any) -> list[float]:
    """Every number in a frozen engine result, walked through dataclasses and tuples."""
    if dataclasses.is_dataclass(obj):
        return [x for f in dataclasses.fields(obj) for x in _engine_numbers(getattr(obj, f.name))]
    if isinstance(obj, tuple | list):
        return [x for item in obj for x in _engine_numbers(item)]
    if isinstance(obj, complex):
        return [obj.real, obj.imag]
    if isinstance(obj, float | int | np.floating) and not isinstance(obj, bool):
        return [float(obj)]
    if isinstance(obj, np.ndarray):
        return [float(x) for x in np.abs(obj).ravel()]
    return []


FORMATS = ("text", "json", "markdown", "csv")


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(hostile_schedules())
def test_extreme_values_never_crash_lie_or_inject(text: str) -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "hostile.toml"
        path.write_text(text, encoding="utf-8")
        results = {fmt: run_tri("report", str(path), "--format", fmt) for fmt in FORMATS}
        check = run_tri("check", str(path))
        assert check.returncode in (0, 1, 2), check.stderr
        codes = {r.returncode for r in results.values()}
        assert codes <= {0, 2} and len(codes) == 1, {f: r.stderr for f, r in results.items()}
        # check reports unreadable files in its own table on standard output.
        assert control_chars(check.stdout + check.stderr) == []
        assert "Traceback" not in check.stdout + check.stderr
        event("refused" if codes == {2} else "reported")
        if codes == {2}:
            for r in results.values():
                assert_clean_error(r)
            assert check.returncode == 2
            return
        for fmt, r in results.items():
            assert control_chars(r.stdout) == [], fmt
            assert control_chars(r.stderr) == [], fmt
            if fmt == "json":
                json.loads(r.stdout, parse_constant=_no_nan)
            else:
                assert not re.search(r"\b(nan|inf|infinity)\b", r.stdout, re.IGNORECASE), fmt
        assert check.returncode in (0, 1) and control_chars(check.stdout) == []
        try:
            schedule = load_schedule(path).schedule
        except ScheduleError as exc:  # pragma: no cover - the report just loaded it
            raise AssertionError(exc.summary()) from None
        numbers = _engine_numbers(analyse_schedule(schedule))
        assert all(math.isfinite(x) for x in numbers), "an engine figure is not finite"
