"""How the UI words and fits things: plurals, no negative zero, names told apart, circuits named
by slot and name, problems that name the file, every pole's position checked (no textual).

The slot facts used here are the two-column geometry of the schedule format
(slot n in row (n + 1) // 2, rows cycling A, B, C; an n-pole breaker in slot
s takes s, s + 2, ...) [common practice]; the rest are exact string checks
of the UI's own wording [computed].
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from tri.schedule.load import load_schedule
from tri.schedule.model import Circuit, PanelInfo, Schedule
from tri.schedule.validate import check_schedule
from tri.tui import fmt
from tri.tui.panel_layout import rail_groups, rail_target, slot_owners, two_column_rows
from tri.tui.rules import move_problems, new_problems
from tri.tui.wording import circuit_label, issue_text, plural

DATA = Path(__file__).parent / "data" / "tui"
DEMOS = Path(__file__).parents[1] / "tri" / "panels_demo"


def small() -> Schedule:
    return load_schedule(DATA / "small.toml").schedule


def index_of(s: Schedule, name: str) -> int:
    return next(i for i, c in enumerate(s.circuits) if c.name == name)


# ---------------------------------------------------------------- words


@pytest.mark.parametrize(
    ("n", "noun", "expected"),
    [
        (0, "move", "0 moves"),
        (1, "move", "1 move"),
        (2, "move", "2 moves"),
        (1, "new circuit", "1 new circuit"),
        (3, "new circuit", "3 new circuits"),
        (2, "bus", "2 buses"),
        (2, "switch", "2 switches"),
    ],
)
def test_plurals_are_real_words(n: int, noun: str, expected: str) -> None:
    assert plural(n, noun) == expected


@pytest.mark.parametrize("value", [-0.0, -0.04, -0.0499, 0.04])
def test_no_negative_zero(value: float) -> None:
    assert fmt.deg(value) == "∠0.0°"
    assert fmt.pct(value) == "0.0 %"
    assert fmt.amps(value) == "0.0 A"


def test_negative_values_keep_their_sign() -> None:
    assert fmt.deg(-0.05001) == "∠-0.1°"
    assert fmt.deg(-158.8) == "∠-158.8°"


# ---------------------------------------------------------------- names


def test_end_cut_always_shows_an_ellipsis() -> None:
    assert fmt.shorten("render-workstation", 11) == "render-wor…"
    assert fmt.shorten("linear", 11) == "linear"


def test_names_that_would_look_alike_keep_what_tells_them_apart() -> None:
    names = [
        "High-bay LED lighting, bays 1-2",
        "High-bay LED lighting, bays 3-4",
        "EV charger, bay 1 (22 kW)",
        "EV charger, bay 3 (planned)",
        "Dust collector",
    ]
    shown = fmt.fit_names(names, 17)
    assert len(set(shown)) == len(shown), shown
    assert "bays 1-2" in shown[0] and "bays 3-4" in shown[1]
    assert "bay 1" in shown[2] and "bay 3" in shown[3]
    assert shown[4] == "Dust collector"
    assert all("…" in s for s in shown[:4])


@given(
    st.lists(st.text(alphabet="ab ,-1", min_size=0, max_size=40), min_size=1, max_size=8),
    st.integers(min_value=2, max_value=30),
)
def test_fitted_names_fit_and_mark_every_cut(names: list[str], width: int) -> None:
    for name, shown in zip(names, fmt.fit_names(names, width), strict=True):
        assert len(shown) <= width
        if len(name) <= width:
            assert shown == name
        else:
            assert "…" in shown


# ---------------------------------------------------------------- circuits and problems


def test_circuits_are_named_by_slot_or_phases_and_name() -> None:
    s = small()
    assert circuit_label(s, index_of(s, "Walk-in cooler")) == 'slot 5 "Walk-in cooler"'
    assert circuit_label(s, index_of(s, "Future espresso")) == 'new circuit "Future espresso"'
    rail = load_schedule(DEMOS / "studio_400_rail.toml").schedule
    assert circuit_label(rail, 0) == 'L1 "Open-plan socket ring 1"'


def test_a_problem_names_the_file_and_the_circuit_by_slot() -> None:
    s = small()
    i, j = index_of(s, "Signage"), index_of(s, "Receptacles bar")
    clash = s.with_circuit(i, s.circuits[i].at_slot(2))
    issues = check_schedule(clash)
    text = issue_text(issues[0], "small.toml", clash)
    assert text.startswith("small.toml: ")
    assert "<schedule>" not in text
    # Neither circuit is named by its place in the file ("circuit 2").
    assert "circuit 2" not in text and f"circuit {i + 1}" not in text
    assert 'slot 2 "' in text
    assert clash.circuits[j].name in text or clash.circuits[i].name in text


def test_a_file_that_cannot_be_read_still_names_circuits_by_place() -> None:
    from tri.schedule.errors import ScheduleIssue

    issue = ScheduleIssue(
        "expected a number",
        file="bad.toml",
        line=12,
        where='circuit 3 (slot 5, "Fryer")',
        key="load_va",
        circuit_index=2,
    )
    assert issue_text(issue, "ignored.toml") == (
        "bad.toml:12: slot 5 \"Fryer\": key 'load_va': expected a number"
    )


def test_every_pole_is_checked_whichever_circuit_the_clash_is_reported_on() -> None:
    # A 2-pole breaker in slot 1 (taking 1 and 3) moved to slot 3 takes 3 and 5;
    # a breaker in 5 must refuse it, though the clash is found on the later circuit.
    panel = PanelInfo(name="t", system="208Y/120", frequency_hz=60.0, spaces=12, bus_a=100)
    s = Schedule(
        panel,
        (
            Circuit(name="Heater", poles=2, load_value=2000).at_slot(1),
            Circuit(name="Lights", load_value=500).at_slot(5),
        ),
    )
    problems = move_problems(s, 0, s.circuits[0].at_slot(3))
    assert problems == [
        'a 2-pole breaker at slot 3 takes slots 3 and 5; slot 5 is taken by slot 5 "Lights"'
    ]
    assert move_problems(s, 0, s.circuits[0].at_slot(7)) == []


def test_a_breaker_past_the_last_space_is_refused_with_its_poles() -> None:
    s = small()
    i = index_of(s, "Oven")  # 3-pole
    problems = move_problems(s, i, s.circuits[i].at_slot(21))
    assert problems == [
        "a 3-pole breaker at slot 21 takes slots 21, 23 and 25; the panel ends at slot 24"
    ]


def test_new_problems_ignore_what_was_already_there() -> None:
    s = small()
    i = index_of(s, "Signage")
    assert new_problems(s, s, i) == []
    worse = s.with_circuit(i, s.circuits[i].at_slot(1))
    assert [k for k, _ in new_problems(s, worse, i)] == ["slot"]


# ---------------------------------------------------------------- panel layout


@pytest.mark.parametrize("demo", sorted(DEMOS.glob("*.toml")), ids=lambda p: p.stem)
def test_panel_layout_puts_every_pole_where_the_schedule_says(demo: Path) -> None:
    s = load_schedule(demo).schedule
    if not s.panel.uses_slots:
        groups = rail_groups(s)
        for phase, members in groups:
            for p in members:
                assert s.circuits[p.circuit].phases[p.pole - 1] == phase
        placed = sum(len(c.phases) for c in s.circuits if c.phases is not None)
        assert sum(len(m) for _, m in groups) == placed
        return
    owners = slot_owners(s)
    rows = two_column_rows(s)
    assert len(rows) == (s.panel.spaces + 1) // 2
    for left, right in rows:
        for pos in (left, right):
            if pos is None:
                continue
            assert pos.slot % 2 == (1 if pos is left else 0)
            if pos.circuit is None:
                assert pos.slot not in owners
                continue
            c = s.circuits[pos.circuit]
            assert pos.slot == c.slot + 2 * (pos.pole - 1)
            if c.poles < 3:
                # The phase shown is the phase the schedule connects that pole to.
                assert c.phases[pos.pole - 1] == pos.phase
    shown = sum(1 for left, right in rows for p in (left, right) if p and p.circuit is not None)
    assert shown == sum(c.poles for c in s.circuits if c.slot is not None)


def test_rail_targets_follow_the_phase_sequence() -> None:
    one, two, three = (Circuit(name="x", poles=n) for n in (1, 2, 3))
    assert rail_target(one, 2) == (2,)
    assert rail_target(two, 2) == (2, 0)  # L3-L1 [common practice]
    assert rail_target(three, 0) is None
