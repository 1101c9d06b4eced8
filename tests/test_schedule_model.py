"""Schedule model: slot geometry, load conversions, demo panels (issue 2)."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from tri.schedule.load import load_schedule, parse_schedule
from tri.schedule.model import Circuit, parse_phase_text
from tri.schedule.slots import candidate_slots, occupied_slots, slot_phase, slot_phases
from tri.schedule.systems import SYSTEMS

DEMOS = sorted((Path(__file__).parents[1] / "tri" / "panels_demo").glob("*.toml"))


def test_two_column_rows_cycle_a_b_c() -> None:
    # Common practice (check-values.md, "Panel and code facts"): slots 1-2 A,
    # 3-4 B, 5-6 C, 7-8 A ...
    expected = {1: 0, 2: 0, 3: 1, 4: 1, 5: 2, 6: 2, 7: 0, 8: 0, 41: 2, 42: 2}
    assert {s: slot_phase(s) for s in expected} == expected


def test_multipole_breakers_take_consecutive_rows_of_one_column() -> None:
    # Common practice: a 2-pole in 1 takes 1-3 (A-B), 3-5 is B-C, 5-7 is C-A.
    assert occupied_slots(1, 2) == (1, 3)
    assert slot_phases(1, 2) == (0, 1)
    assert slot_phases(3, 2) == (1, 2)
    assert slot_phases(5, 2) == (2, 0)
    assert occupied_slots(2, 3) == (2, 4, 6)
    assert slot_phases(2, 3) == (0, 1, 2)


def test_candidate_slots_respect_panel_end_and_taken_slots() -> None:
    assert candidate_slots(2, 6, taken={1}) == [2, 3, 4]
    assert candidate_slots(3, 6, taken=set()) == [1, 2]


@pytest.mark.parametrize(
    ("text", "labels", "expected"),
    [
        ("A", ("A", "B", "C"), (0,)),
        ("bc", ("A", "B", "C"), (1, 2)),
        ("ABC", ("A", "B", "C"), (0, 1, 2)),
        ("L2L3", ("L1", "L2", "L3"), (1, 2)),
        ("L3-L1", ("L1", "L2", "L3"), (2, 0)),
        ("l1 l2 l3", ("L1", "L2", "L3"), (0, 1, 2)),
        ("L4", ("L1", "L2", "L3"), None),
        ("", ("A", "B", "C"), None),
    ],
)
def test_phase_text(text: str, labels: tuple[str, str, str], expected: tuple | None) -> None:
    assert parse_phase_text(text, labels) == expected


def test_load_in_amperes_is_line_current() -> None:
    # schedule-format.md: VA = I*V_LN for 1 pole, I*V_LL for 2, sqrt(3)*I*V_LL for 3,
    # with V_LL the magnitude of the nominal phasors V_A - V_B = sqrt(3)*120 V
    # (engine.md) [computed], so that amps in give the same amps out.
    s = SYSTEMS["208Y/120"]
    v_ll = math.sqrt(3) * 120
    # 10 A · 120 V: an exact product; tolerances 1e-12 relative below (round-off of √3)
    assert Circuit("x", poles=1, load_kind="a", load_value=10).apparent_power_va(s) == 1200
    two = Circuit("x", poles=2, load_kind="a", load_value=10).apparent_power_va(s)
    assert two == pytest.approx(10 * v_ll, rel=1e-12)
    three = Circuit("x", poles=3, load_kind="a", load_value=10).apparent_power_va(s)
    assert three == pytest.approx(math.sqrt(3) * 10 * v_ll, rel=1e-12)
    # 480D has no neutral: its line voltage is the system's own 480 V (10 A · 480 V).
    delta = Circuit("x", poles=2, load_kind="a", load_value=10).apparent_power_va(SYSTEMS["480D"])
    assert delta == pytest.approx(4800, rel=1e-12)


def test_load_in_watts_uses_power_factor_and_sign_of_q() -> None:
    s = SYSTEMS["480Y/277"]
    # [computed] S = P / pf = 850 / 0.85 = 1000 VA, Q = S·sin(acos pf) > 0 lagging
    # (engine.md); leading flips the sign of Q. Round-off only: 1e-12 relative.
    lag = Circuit("m", load_kind="w", load_value=850, pf=0.85)
    lead = Circuit("m", load_kind="w", load_value=850, pf=0.85, leading=True)
    assert lag.apparent_power_va(s) == pytest.approx(1000, rel=1e-12)
    assert lag.complex_power_va(s) == pytest.approx(
        complex(850, 1000 * math.sqrt(1 - 0.85**2)), rel=1e-12
    )
    assert lead.complex_power_va(s).imag == pytest.approx(-lag.complex_power_va(s).imag, rel=1e-12)


def test_defaults_follow_the_format() -> None:
    text = """
format = 1
[panel]
name = "P"
system = "208Y/120"
spaces = 12
bus_a = 100
[[circuit]]
slot = 4
name = "Lights"
load_va = 100
"""
    s = parse_schedule(text).schedule
    c = s.circuits[0]
    assert (c.poles, c.pf, c.leading, c.profile, c.continuous, c.locked) == (
        1,
        1.0,
        False,
        "linear",
        False,
        False,
    )
    assert c.phases == (1,)  # slot 4 is on phase B: row (4 + 1)//2 = 2 [common practice]
    # 60 Hz: the catalogue's frequency for 208Y/120 (North American practice [common
    # practice]; schedule-format.md names no default) when the file gives none
    assert s.panel.frequency_hz == 60
    assert s.panel.effective_neutral_a == 100  # neutral_a defaults to bus_a (schedule-format.md)
    assert s.panel.phase_labels == ("A", "B", "C")


def test_unplaced_circuit_has_no_phases() -> None:
    text = """
format = 1
[panel]
name = "P"
system = "208Y/120"
spaces = 12
bus_a = 100
[[circuit]]
poles = 2
name = "Planned EV charger"
load_a = 32
"""
    c = parse_schedule(text).schedule.circuits[0]
    assert c.slot is None and c.phases is None and not c.is_placed


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.name)
def test_demo_panels_load(path: Path) -> None:
    s = load_schedule(path).schedule
    assert s.circuits
    assert s.panel.system in SYSTEMS


def test_there_are_four_demo_scenarios_at_least() -> None:
    systems = {load_schedule(p).schedule.panel.system for p in DEMOS}
    assert len(DEMOS) >= 4
    assert {"208Y/120", "480Y/277", "400Y/230"} <= systems
