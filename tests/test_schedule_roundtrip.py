"""Load -> save -> load gives an equal model; comments survive edits (issue 2)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tri.schedule.load import load_schedule, parse_schedule
from tri.schedule.model import Circuit, PanelInfo, Readings, Schedule, Supply, UserProfile
from tri.schedule.save import save_schedule, schedule_text, write_atomic
from tri.schedule.slots import PHASES, TWO_COLUMN, slot_phases
from tri.schedule.text import plain_text_problem

DEMOS = sorted((Path(__file__).parents[1] / "tri" / "panels_demo").glob("*.toml"))


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.name)
def test_unchanged_save_is_byte_identical(path: Path, tmp_path: Path) -> None:
    loaded = load_schedule(path)
    out = tmp_path / path.name
    save_schedule(out, loaded.schedule, loaded.document)
    assert out.read_text() == path.read_text()


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.name)
def test_edit_one_circuit_keeps_every_comment(path: Path, tmp_path: Path) -> None:
    loaded = load_schedule(path)
    s = loaded.schedule
    edited = s.with_circuit(0, replace(s.circuits[0], load_kind="va", load_value=1234.5))
    out = tmp_path / path.name
    save_schedule(out, edited, loaded.document)
    before = path.read_text().splitlines()
    after = out.read_text().splitlines()
    comments = [line for line in before if line.lstrip().startswith("#") or " # " in line]
    for line in comments:
        assert line in after, line
    # Only the edited circuit's load line changed.
    changed = [a for a in after if a not in before]
    assert changed == ["load_va = 1234.5"]
    assert load_schedule(out).schedule == edited


def test_save_keeps_backup_and_is_atomic(tmp_path: Path) -> None:
    target = tmp_path / "p.toml"
    target.write_text("old contents\n")
    bak = write_atomic(target, "new contents\n")
    assert target.read_text() == "new contents\n"
    assert bak is not None and bak.read_text() == "old contents\n"
    leftovers = [p.name for p in tmp_path.iterdir() if p.name.endswith(".tmp")]
    assert leftovers == []


def test_delete_and_add_circuits_round_trip(tmp_path: Path) -> None:
    path = next(p for p in DEMOS if "garage" in p.name)
    loaded = load_schedule(path)
    s = loaded.schedule.without(2).with_added(
        Circuit("Added later", poles=1, slot=29, phases=slot_phases(29, 1), load_value=500)
    )
    out = tmp_path / "g.toml"
    save_schedule(out, s, loaded.document)
    again = load_schedule(out).schedule
    assert again == s
    assert "# Added last month:" in out.read_text()


def test_reordered_circuits_round_trip() -> None:
    loaded = load_schedule(DEMOS[0])
    s = loaded.schedule
    reordered = replace(s, circuits=tuple(reversed(s.circuits)))
    assert parse_schedule(schedule_text(reordered, loaded.document)).schedule == reordered


# ---- property: any valid schedule survives save -> load --------------------

_names = st.text(
    alphabet=st.characters(codec="utf-8", exclude_categories=("Cs", "Cc")), min_size=1, max_size=20
).filter(lambda t: t.strip() == t and t != "" and plain_text_problem(t) is None)


def _sized(lo: float, hi: float) -> st.SearchStrategy[float]:
    """0, or a value the loader's bounds accept (nonzero values are at least 1e-6)."""
    return st.just(0.0) | st.floats(min_value=lo, max_value=hi)


_finite = _sized(1e-3, 1e4)
_pf = st.floats(min_value=0.05, max_value=1.0)


@st.composite
def schedules(draw: st.DrawFn) -> Schedule:
    layout = draw(st.sampled_from([TWO_COLUMN, PHASES]))
    system = draw(st.sampled_from(["208Y/120", "400Y/230", "480D"]))
    spaces = draw(st.integers(min_value=6, max_value=30))
    labels = draw(st.sampled_from([("A", "B", "C"), ("L1", "L2", "L3"), ("R", "Y", "B")]))
    panel = PanelInfo(
        name=draw(_names),
        system=system,
        frequency_hz=draw(st.sampled_from([50.0, 60.0])),
        spaces=spaces,
        bus_a=draw(st.floats(min_value=1, max_value=4000)),
        main_a=draw(st.none() | st.floats(min_value=1, max_value=4000)),
        phase_labels=labels,
        layout=layout,
    )
    circuits: list[Circuit] = []
    used: set[int] = set()
    for _ in range(draw(st.integers(min_value=0, max_value=8))):
        poles = draw(st.sampled_from([2, 3] if system == "480D" else [1, 2, 3]))
        c = Circuit(
            name=draw(_names),
            poles=poles,
            load_kind=draw(st.sampled_from(["va", "w", "a"])),
            load_value=draw(_finite),
            pf=draw(_pf),
            leading=draw(st.booleans()),
            profile=draw(st.sampled_from(["linear", "electronics", "vfd"])),
            continuous=draw(st.booleans()),
            locked=draw(st.booleans()),
            breaker_a=draw(st.none() | st.floats(min_value=1, max_value=1000)),
        )
        if layout == TWO_COLUMN:
            slot = draw(st.none() | st.integers(min_value=1, max_value=spaces))
            if slot is not None:
                taken = set(range(slot, slot + 2 * poles, 2))
                if max(taken) <= spaces and not taken & used:
                    used |= taken
                    c = c.at_slot(slot)
        else:
            phases = draw(st.none() | st.permutations([0, 1, 2]))
            if phases is not None:
                c = c.on_phases(tuple(phases[:poles]))
        circuits.append(c)
    supply = draw(
        st.none()
        | st.builds(
            Supply,
            transformer_kva=st.floats(min_value=1, max_value=5000),
            transformer_z_pct=st.floats(min_value=0.5, max_value=25),
            transformer_x_r=st.floats(min_value=0.1, max_value=100),
            feeder_length_m=_sized(1e-3, 1000),
        )
    )
    readings = draw(
        st.none()
        | st.builds(
            Readings,
            phase_amps=st.tuples(*[st.none() | _sized(1e-3, 1e4)] * 3),
            neutral_amps=st.none() | _sized(1e-3, 1e4),
        )
    )
    if system == "480D" and readings is not None:
        readings = replace(readings, neutral_amps=None)
    profiles = draw(
        st.lists(
            st.builds(
                UserProfile,
                name=st.sampled_from(["shop-drives", "pcs", "x1"]),
                harmonics=st.lists(
                    st.tuples(
                        st.integers(2, 50),
                        _sized(1e-6, 5),
                        _sized(1e-6, 360) | _sized(1e-6, 360).map(lambda x: -x),
                    ),
                    unique_by=lambda row: row[0],
                    max_size=4,
                ).map(tuple),
            ),
            unique_by=lambda p: p.name,
            max_size=2,
        )
    )
    return Schedule(
        panel=panel,
        circuits=tuple(circuits),
        supply=supply,
        readings=readings,
        profiles=tuple(profiles),
    )


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(schedules())
def test_any_schedule_survives_save_and_load(schedule: Schedule) -> None:
    text = schedule_text(schedule)
    assert parse_schedule(text).schedule == schedule
    # and saving the loaded document again changes nothing
    loaded = parse_schedule(text)
    assert schedule_text(loaded.schedule, loaded.document) == text
