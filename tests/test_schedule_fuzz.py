"""The loader never crashes: arbitrary text and arbitrary TOML give clean errors (issue 2)."""

from __future__ import annotations

import datetime as dt

import tomlkit
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from tri.schedule.errors import ScheduleError
from tri.schedule.load import parse_schedule
from tri.schedule.read_circuit import CIRCUIT_KEYS
from tri.schedule.read_panel import PANEL_KEYS
from tri.schedule.read_supply import SUPPLY_KEYS

#: Examples per fuzz property: 150 keeps the suite short; raise it locally when changing the loader.
FAST = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _loads_or_clean_error(text: str) -> None:
    try:
        parse_schedule(text, filename="fuzz.toml")
    except ScheduleError as exc:
        assert exc.issues, "an error must say what is wrong"
        for issue in exc.issues:
            assert issue.message
            assert str(issue).startswith("fuzz.toml")


@FAST
@given(st.text(max_size=400))
@example("format = 1\n[panel]\n")
@example("[[circuit]]\n[[circuit]]\n")
@example("format = 1\n[panel]\nname='x'\nsystem='208Y/120'\nspaces=2\nbus_a=1\n[[circuit]]\n")
def test_arbitrary_text(text: str) -> None:
    _loads_or_clean_error(text)


_scalars = (
    st.none()
    | st.booleans()
    | st.integers(min_value=-(2**63), max_value=2**63 - 1)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.text(max_size=12)
    | st.dates(min_value=dt.date(1900, 1, 1))
)
_values = st.recursive(
    _scalars.filter(lambda v: v is not None),
    lambda inner: (
        st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=8), inner, max_size=4)
    ),
    max_leaves=12,
)
_key = st.sampled_from([*CIRCUIT_KEYS, *PANEL_KEYS, *SUPPLY_KEYS, "amps", "volts_ll", "x"])


@st.composite
def toml_documents(draw: st.DrawFn) -> str:
    doc: dict = {}
    if draw(st.booleans()):
        doc["format"] = draw(st.sampled_from([1, 1, 1, 0, 2, "1", 1.0]))
    for table in ("panel", "supply", "readings"):
        if draw(st.booleans()):
            doc[table] = draw(st.dictionaries(_key, _values, max_size=8))
    if draw(st.booleans()):
        doc["profiles"] = draw(
            st.dictionaries(st.text(min_size=1, max_size=6), _values, max_size=2)
        )
    if draw(st.booleans()):
        doc["circuit"] = draw(
            st.lists(st.dictionaries(_key, _values, min_size=1, max_size=8), max_size=5)
        )
    if draw(st.booleans()):
        doc[draw(st.text(min_size=1, max_size=6))] = draw(_values)
    try:
        return tomlkit.dumps(doc)
    except Exception:
        return "format = 1\n"


@FAST
@given(toml_documents())
def test_arbitrary_toml_documents(text: str) -> None:
    _loads_or_clean_error(text)


@FAST
@given(
    st.fixed_dictionaries(
        {
            "name": _values,
            "system": st.sampled_from(["208Y/120", "480D", "400Y/230", "nope"]) | _values,
            "spaces": st.integers(-5, 500) | _values,
            "bus_a": st.floats() | _values,
        }
    ),
    st.lists(
        st.fixed_dictionaries(
            {"name": st.text(max_size=5), "slot": st.integers(-2, 60)},
            optional={
                "poles": st.integers(-1, 5),
                "load_va": st.floats(),
                "load_a": st.floats(),
                "pf": st.floats(),
                "phases": st.text(alphabet="ABCL123 -", max_size=6),
                "profile": st.sampled_from(["linear", "vfd", "zzz"]),
            },
        ),
        max_size=8,
    ),
)
def test_near_valid_documents(panel: dict, circuits: list[dict]) -> None:
    try:
        text = tomlkit.dumps({"format": 1, "panel": panel, "circuit": circuits})
    except Exception:
        return
    _loads_or_clean_error(text)
