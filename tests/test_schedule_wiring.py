"""Panels as they are wired (issue 12): keys, defaults, geometry and located errors.

Bad files live in tests/data/bad_wiring/ (one kind of bad input each); good
ones in tests/data/wiring/. Slot-to-phase facts are [common practice]: rows
cycle A, B, C from the top, and some panelboards read C, B, A down the right
column.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest
from cli_support import assert_clean_error, run_tri

from tri.schedule.errors import ScheduleError
from tri.schedule.load import load_schedule, parse_schedule
from tri.schedule.model import Circuit
from tri.schedule.slots import pole_phases, slot_phase, slot_phases
from tri.schedule.validate import check_schedule
from tri.schedule.wiring import (
    LEG_LINE_TO_LINE,
    LEG_TO_NEUTRAL,
    empty_slots,
    legs_of,
    neutral_groups,
)

DATA = Path(__file__).parent / "data"
BAD = DATA / "bad_wiring"
GOOD = DATA / "wiring"

# file -> list of (line, fragment expected in that problem's text)
CASES: dict[str, list[tuple[int | None, str]]] = {
    "legs_pole_mismatch.toml": [(14, "found 2 values, expected 3: one per leg")],
    "legs_on_one_pole.toml": [(12, "a per-leg load on a 1-pole breaker")],
    "legs_two_pole_no_neutral.toml": [(13, "2-pole breaker without a neutral feeds one")],
    "shared_neutral_not_adjacent.toml": [(13, "spans slots 1, 5, which are not adjacent")],
    "shared_neutral_same_phase.toml": [(21, "are both on L1, so the neutral would carry")],
    "shared_neutral_lonely.toml": [(13, "shared neutral 'N1' has only this leg")],
    "neutral_on_one_pole.toml": [(12, "neutral = true is for 2- and 3-pole breakers")],
    "spare_with_load.toml": [(13, "a spare has nothing connected")],
    "high_leg_on_wye.toml": [(8, "on a 208Y/120 system, which has no high leg")],
    "high_leg_one_pole.toml": [
        (
            15,
            "circuit \"Receptacles\" in slot 3: key 'slot': a 1-pole 120 V circuit on the "
            "high leg B (slot 3 is on B), which reads 208 V to neutral",
        ),
        (20, "a leg to neutral of this breaker on the high leg B (slot 4 is on B)"),
    ],
    "right_column_bad.toml": [(8, "found 'BCA', expected \"ABC\"")],
    "rcd_two_column.toml": [
        (9, "RCD groups are for rail boards"),
        (17, "key 'rcd': RCD groups are for rail boards"),
    ],
    "rcd_problems.toml": [
        (18, "found 3, expected 2 (one phase and neutral) or 4"),
        (21, "on L2 behind the 2-pole RCD 'R1', which is on L1"),
        (30, "a 2-pole circuit behind the 2-pole RCD 'R1'"),
        (36, "no [[rcd]] named 'R9' (known: R1)"),
    ],
}


def test_every_bad_wiring_file_has_a_case() -> None:
    assert sorted(p.name for p in BAD.glob("*.toml")) == sorted(CASES)


@pytest.mark.parametrize("name", sorted(CASES))
def test_bad_wiring_is_located(name: str) -> None:
    with pytest.raises(ScheduleError) as info:
        load_schedule(BAD / name)
    issues = info.value.issues
    expected = CASES[name]
    assert len(issues) == len(expected), info.value.summary()
    for issue, (line, fragment) in zip(issues, expected, strict=True):
        assert fragment in str(issue), str(issue)
        assert issue.line == line, str(issue)


@pytest.mark.parametrize("name", ["high_leg_one_pole.toml", "legs_pole_mismatch.toml"])
def test_cli_exits_2_on_bad_wiring(name: str) -> None:
    assert_clean_error(run_tri("report", str(BAD / name)))


def _panel(extra: str = "", system: str = "208Y/120", circuits: str = "") -> str:
    return (
        f'format = 1\n[panel]\nname = "T"\nsystem = "{system}"\nspaces = 24\nbus_a = 100\n'
        f"{extra}\n{circuits}"
    )


def test_defaults_of_the_new_keys() -> None:
    s = parse_schedule(_panel(circuits='[[circuit]]\nslot = 1\nname = "x"\nload_va = 1\n')).schedule
    p, c = s.panel, s.circuits[0]
    assert (p.high_leg, p.right_column, p.fed_from, p.max_row_shift) == (None, "ABC", None, None)
    assert p.effective_high_leg is None
    assert (c.neutral, c.leg_values, c.shared_neutral, c.handle_tied, c.spare, c.rcd) == (
        False,
        None,
        None,
        False,
        False,
        None,
    )
    assert s.rcds == ()


def test_high_leg_defaults_to_b_and_may_be_c() -> None:
    s = parse_schedule(_panel(system="240/120D")).schedule
    assert s.panel.high_leg == 1 and s.panel.effective_high_leg == 1
    s = parse_schedule(_panel('high_leg = "C"', system="240/120D")).schedule
    assert s.panel.effective_high_leg == 2
    with pytest.raises(ScheduleError, match='expected "B"'):
        parse_schedule(_panel('high_leg = "A"', system="240/120D"))


def test_right_column_cba_puts_even_slots_on_c_b_a() -> None:
    # [common practice] left column A, B, C from the top; a C-B-A right column reads
    # slot 2 on C, 4 on B, 6 on A, 8 on C ...
    assert [slot_phase(s) for s in (1, 2, 3, 4, 5, 6)] == [0, 0, 1, 1, 2, 2]
    assert [slot_phase(s, "CBA") for s in (1, 2, 3, 4, 5, 6, 8)] == [0, 2, 1, 1, 2, 0, 2]
    assert slot_phases(2, 2, "CBA") == (2, 1)
    assert pole_phases(3, 3) == (1, 2, 0)  # a 3-pole breaker from slot 3: B, C, A
    text = _panel(
        'right_column = "CBA"',
        circuits='[[circuit]]\nslot = 2\npoles = 2\nname = "x"\nload_va = 1\n',
    )
    s = parse_schedule(text).schedule
    assert s.circuits[0].phases == (2, 1)
    # an edit through the model keeps the geometry as built
    moved = s.with_circuit(0, s.circuits[0].at_slot(4))
    assert moved.circuits[0].phases == (1, 0)


def test_legs_of_each_kind() -> None:
    text = _panel(
        circuits="""
[[circuit]]
slot = 3
poles = 2
neutral = true
name = "MWBC"
load_va = [1200, 800]

[[circuit]]
slot = 4
poles = 3
name = "Delta"
load_va = [3000, 2000, 1000]

[[circuit]]
slot = 9
poles = 3
neutral = true
name = "Wye, same on each leg"
load_a = 10
"""
    )
    s = parse_schedule(text).schedule
    mwbc, delta, wye = (legs_of(c, s) for c in s.circuits)
    assert [(g.kind, g.phases, g.va) for g in mwbc] == [
        (LEG_TO_NEUTRAL, (1,), 1200.0),
        (LEG_TO_NEUTRAL, (2,), 800.0),
    ]
    # slot 4 is on B, so poles B, C, A and pairs BC, CA, AB in that order
    assert [(g.kind, g.phases) for g in delta] == [
        (LEG_LINE_TO_LINE, (1, 2)),
        (LEG_LINE_TO_LINE, (2, 0)),
        (LEG_LINE_TO_LINE, (0, 1)),
    ]
    # a single number on a breaker with a neutral is the load of each leg: 10 A at 120 V
    assert [g.va for g in wye] == [1200.0, 1200.0, 1200.0]
    assert s.circuits[2].apparent_power_va(s.system) == 3600.0
    assert s.circuits[0].load_value == 2000.0  # the sum, for displays


def test_neutral_groups_and_handle_ties() -> None:
    s = load_schedule(GOOD / "mwbc_208.toml").schedule
    groups = neutral_groups(s)
    assert [(g.label(s), g.common_trip) for g in groups] == [
        ("Office receptacles (shared neutral)", True),
        ("Sub-board feeder", True),
        ("N13", True),
        ("N21", False),
    ]
    assert s.panel.fed_from == "MDP-1, circuit 7"
    spare = next(c for c in s.circuits if c.spare)
    assert spare.load_value == 0.0 and spare.apparent_power_va(s.system) == 0.0
    assert 17 not in empty_slots(s) and 19 in empty_slots(s)


def test_edit_that_splits_a_group_is_caught_after_the_edit() -> None:
    s = load_schedule(GOOD / "mwbc_208.toml").schedule
    i = next(k for k, c in enumerate(s.circuits) if c.name == "Printer")
    moved = s.with_circuit(i, s.circuits[i].at_slot(27))
    messages = [x.message for x in check_schedule(moved)]
    assert any("not adjacent" in m for m in messages), messages


def test_rcd_groups_on_a_rail_board_load() -> None:
    text = """format = 1
[panel]
name = "Studio"
system = "400Y/230"
spaces = 12
bus_a = 63
layout = "phases"
phase_labels = ["L1", "L2", "L3"]

[[rcd]]
name = "R1"
phase = "L2"

[[rcd]]
name = "R2"
poles = 4

[[circuit]]
phases = "L2"
name = "Sockets"
load_va = 900
rcd = "R1"

[[circuit]]
phases = "L1L2L3"
name = "Oven"
load_va = 6000
rcd = "R2"
"""
    s = parse_schedule(text).schedule
    assert [(r.name, r.poles, r.phase) for r in s.rcds] == [("R1", 2, 1), ("R2", 4, None)]
    assert [c.rcd for c in s.circuits] == ["R1", "R2"]


def test_circuit_defaults_compare_equal() -> None:
    assert Circuit(name="a") == Circuit(name="a", neutral=False, spare=False)


# --------------------------------------------------------------------------
# saving the new keys, comments kept
# --------------------------------------------------------------------------
def test_unchanged_wiring_file_saves_byte_identical(tmp_path: Path) -> None:
    from tri.schedule.save import save_schedule

    for path in sorted(GOOD.glob("*.toml")):
        loaded = load_schedule(path)
        out = tmp_path / path.name
        save_schedule(out, loaded.schedule, loaded.document)
        assert out.read_text() == path.read_text(), path.name


def test_edits_of_the_new_keys_round_trip_with_comments(tmp_path: Path) -> None:

    from tri.schedule.save import save_schedule

    path = GOOD / "mwbc_208.toml"
    loaded = load_schedule(path)
    s = loaded.schedule
    c = list(s.circuits)
    c[0] = replace(c[0], leg_values=(1500.0, 900.0), load_value=2400.0)
    c[6] = replace(c[6], handle_tied=True)  # Copier joins its partner's handle tie
    c[4] = replace(c[4], spare=False, load_value=300.0, name="Was spare")
    edited = replace(
        s,
        circuits=tuple(c),
        panel=replace(s.panel, fed_from="MDP-2, circuit 3", max_row_shift=2),
    )
    out = tmp_path / "out.toml"
    save_schedule(out, edited, loaded.document)
    text = out.read_text()
    for line in path.read_text().splitlines():
        if "#" in line:
            assert line.split("#", 1)[1] in text, line
    assert "load_va = [1500, 900]" in text
    assert 'fed_from = "MDP-2, circuit 3"' in text and "max_row_shift = 2" in text
    again = load_schedule(out).schedule
    assert again == edited


def test_high_leg_c_right_column_and_rcds_are_written(tmp_path: Path) -> None:

    from tri.schedule.model import Rcd
    from tri.schedule.save import save_schedule, schedule_text

    s = parse_schedule(_panel(system="240/120D")).schedule
    s = replace(s, panel=replace(s.panel, high_leg=2, right_column="CBA"))
    text = schedule_text(s)
    assert 'high_leg = "C"' in text and 'right_column = "CBA"' in text
    assert parse_schedule(text).schedule == s
    # the default high leg B is not written
    assert "high_leg" not in schedule_text(replace(s, panel=replace(s.panel, high_leg=1)))

    rail = parse_schedule(
        'format = 1\n[panel]\nname = "R"\nsystem = "400Y/230"\nspaces = 6\nbus_a = 63\n'
        'layout = "phases"\n'
    ).schedule
    rail = replace(rail, rcds=(Rcd("R1", 2, 0), Rcd("R2", 4, None)))
    rail = rail.with_added(Circuit("Sockets", phases=(0,), load_value=900.0, rcd="R1"))
    out = tmp_path / "rail.toml"
    save_schedule(out, rail)
    assert load_schedule(out).schedule == rail


def test_high_leg_readings_and_supply() -> None:
    # [computed] the high leg reads √3/2·240 = 207.8 V to neutral: 209 V is near its nominal
    text = _panel(system="240/120D") + "\n[readings]\nvolts_ln = { A = 121, B = 209, C = 119 }\n"
    assert parse_schedule(text).schedule.readings.volts_ln == (121, 209, 119)
    with pytest.raises(ScheduleError, match=r"expected near the nominal 207\.8 V"):
        parse_schedule(text.replace("B = 209", "B = 120"))
    supply = "\n[supply]\ntransformer_kva = 75\ntransformer_z_pct = 4\ntransformer_x_r = 2\n"
    with pytest.raises(ScheduleError, match="not modelled for a 240/120D high-leg delta"):
        parse_schedule(_panel(system="240/120D") + supply)


def test_journal_keeps_the_wiring_keys() -> None:

    from tri.schedule.journal import schedule_from_data, schedule_to_data
    from tri.schedule.model import Rcd

    s = load_schedule(GOOD / "mwbc_208.toml").schedule
    s = replace(
        s,
        panel=replace(s.panel, right_column="CBA", max_row_shift=3),
        rcds=(Rcd("R1", 2, 0),),
    )
    assert schedule_from_data(schedule_to_data(s)) == s
