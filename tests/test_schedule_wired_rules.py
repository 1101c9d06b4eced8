"""The wiring keys of issue 12 under the rules of issue 10, and through the shared engine call.

Every per-leg load obeys the bound of its key (``load_va``/``load_w``: 0, or
0.001 to 5 000 000; ``load_a``: 0, or 0.001 to 10 000 A; never a denormal or
a float overflow); every wiring text (``fed_from``, ``shared_neutral``,
``rcd``, an ``[[rcd]]`` name) refuses control and bidirectional characters
and is at most 200 characters; the journal keeps every wiring key and does
not trust one that breaks these rules. ``analyse_schedule`` gives one
calculated load per circuit, a breaker with legs its largest pole
([computed] in the comments).
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import pytest

from tri.schedule.errors import ScheduleError
from tri.schedule.journal import read_journal, schedule_from_data, schedule_to_data, write_journal
from tri.schedule.load import load_schedule, parse_schedule
from tri.schedule.to_engine import analyse_schedule

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "tri" / "panels_demo" / "woodshop_240d.toml"
RAIL = Path(__file__).parent / "data" / "wiring" / "rail_rcd_400.toml"
REL = 1e-9


def _text(circuits: str, panel: str = "", system: str = "208Y/120") -> str:
    return (
        f'format = 1\n[panel]\nname = "T"\nsystem = "{system}"\nspaces = 24\nbus_a = 100\n'
        f"{panel}\n{circuits}"
    )


def _mwbc(load: str, extra: str = "") -> str:
    return _text(f'[[circuit]]\nslot = 1\npoles = 2\nneutral = true\nname = "M"\n{load}\n{extra}')


def _problems(text: str) -> str:
    with pytest.raises(ScheduleError) as info:
        parse_schedule(text, filename="t.toml")
    return str(info.value)


# ------------------------------------------------------------------ bounds on per-leg loads
@pytest.mark.parametrize(
    ("load", "expected"),
    [
        ("load_va = [1200, 5000001]", "leg 2: found 5000001, expected 0, or 0.001 to 5 000 000 VA"),
        ("load_w = [0.0009, 100]", "leg 1: found 0.0009, expected 0, or 0.001 to 5 000 000 W"),
        ("load_a = [16, 10000.5]", "leg 2: found 10000.5, expected 0, or 0.001 to 10 000 A"),
        ("load_va = [-1, 100]", "leg 1: found -1, expected 0, or 0.001"),
        ("load_va = [1e-320, 100]", "leg 1: found 1e-320"),
        ("load_va = [1200, 1e309]", "leg 2: found inf, expected a finite number"),
        ("load_va = [1200, true]", "leg 2: found True (true/false)"),
    ],
)
def test_per_leg_loads_obey_the_bounds_of_their_key(load: str, expected: str) -> None:
    message = _problems(_mwbc(load))
    assert expected in message
    # located: file, line, circuit by slot and name, key
    assert "t.toml" in message and "slot 1" in message and "load_" in message


def test_per_leg_loads_at_their_bounds_load() -> None:
    s = parse_schedule(_mwbc("load_va = [0.001, 5000000]")).schedule
    assert s.circuits[0].leg_values == (0.001, 5_000_000.0)
    s = parse_schedule(_mwbc("load_a = [0, 10000]")).schedule
    assert s.circuits[0].leg_values == (0.0, 10_000.0)


# ------------------------------------------------------------------ wiring texts
@pytest.mark.parametrize(
    ("text", "key"),
    [
        (
            _text(
                '[[circuit]]\nslot = 1\nname = "L"\nload_va = 1\nshared_neutral = "N\\u001b[2J"\n'
                '[[circuit]]\nslot = 3\nname = "M"\nload_va = 1\nshared_neutral = "N\\u001b[2J"\n'
            ),
            "shared_neutral",
        ),
        (_text("", panel='fed_from = "MDP-1\\u202e7 tiucric"'), "fed_from"),
        (
            _text(
                '[[circuit]]\nphases = "L1"\nname = "L"\nload_va = 1\nrcd = "R\\u0007"\n',
                panel='layout = "phases"',
                system="400Y/230",
            ),
            "rcd",
        ),
        (
            _text(
                '[[rcd]]\nname = "R\\u0085"\nphase = "L1"\n',
                panel='layout = "phases"',
                system="400Y/230",
            ),
            "name",
        ),
    ],
    ids=["shared_neutral", "fed_from", "rcd", "rcd-name"],
)
def test_wiring_texts_refuse_control_characters(text: str, key: str) -> None:
    message = _problems(text)
    assert "control character" in message and key in message
    # the message shows the character escaped, never raw
    assert "\x1b" not in message and "\u202e" not in message and "\x07" not in message


def test_wiring_names_are_at_most_200_characters() -> None:
    long = "N" * 201
    message = _problems(_text("", panel=f'fed_from = "{long}"'))
    assert "201 characters, expected at most 200" in message
    ok = parse_schedule(_text("", panel=f'fed_from = "{"N" * 200}"')).schedule
    assert ok.panel.fed_from == "N" * 200


# ------------------------------------------------------------------ the journal
@pytest.mark.parametrize("path", [DEMO, RAIL], ids=["woodshop", "rail-rcd"])
def test_journal_round_trips_every_wiring_key(path: Path, tmp_path: Path) -> None:
    s = load_schedule(path).schedule
    # through JSON text, as the journal stores it
    assert schedule_from_data(json.loads(json.dumps(schedule_to_data(s)))) == s
    target = tmp_path / "j.tri-journal"
    write_journal(target, s, path, None, 1)
    entry = read_journal(target)
    assert entry is not None and entry.schedule == s


def test_journal_with_a_refused_wiring_text_is_not_trusted(tmp_path: Path) -> None:
    s = load_schedule(DEMO).schedule
    bad = replace(s, panel=replace(s.panel, fed_from="disconnect\x1b]0;owned\x07"))
    target = tmp_path / "j.tri-journal"
    write_journal(target, bad, DEMO, None, 1)
    assert read_journal(target) is None
    legs = replace(s.circuits[3], leg_values=(1440.0, 6e6))  # over the 5 MVA bound
    write_journal(
        target, replace(s, circuits=(*s.circuits[:3], legs, *s.circuits[4:])), DEMO, None, 1
    )
    assert read_journal(target) is None


# ------------------------------------------------------------------ through analyse_schedule
def test_analyse_schedule_gives_one_calculated_load_per_circuit() -> None:
    # slot 1: a 2-pole breaker with a neutral, legs A 1800 and B 1200 VA, continuous, 20 A;
    # slot 5: a 1-pole 960 VA on C. Calculated per phase: A 1.25·1800/120 = 18.75 A,
    # B 1.25·1200/120 = 12.5 A, C 960/120 = 8 A; the breaker's largest pole 18.75 A (under
    # 20 A: no finding); 220.61 neutral load max(1800, 1200, 960)/120 = 15 A
    text = _mwbc("load_va = [1800, 1200]", "continuous = true\nbreaker_a = 20\n")
    text += '[[circuit]]\nslot = 5\nname = "C load"\nload_va = 960\n'
    s = parse_schedule(text).schedule
    a = analyse_schedule(s)
    assert [p.calculated_a for p in a.phases] == pytest.approx([18.75, 12.5, 8.0], rel=REL)
    assert a.circuit_calculated_a == pytest.approx((18.75, 8.0), rel=REL)
    assert a.neutral.calculated_a == pytest.approx(15.0, rel=REL)
    assert not [f for f in a.findings if "breaker" in f.message and f.level == "limit"]
    # at 15 A the same breaker is over: one finding that names it by slot and name
    over = analyse_schedule(
        parse_schedule(text.replace("breaker_a = 20", "breaker_a = 15")).schedule
    )
    (limit,) = [f.message for f in over.findings if "breaker" in f.message and f.level == "limit"]
    assert limit.startswith('circuit "M" in slot 1: 18.8 A on its largest pole over its 15 A')


def test_demo_heater_is_over_its_breaker_on_its_largest_pole() -> None:
    # the demo's drying-room heater: 240 V elements 3000, 3000, 1500 VA on poles B-C, C-A,
    # A-B, continuous: line C |I_CA - I_BC| = √3·12.5 = 21.65 A, at 125 % 27.06 A > 25 A
    a = analyse_schedule(load_schedule(DEMO).schedule)
    heater = [c.name for c in load_schedule(DEMO).schedule.circuits].index("Drying room heater")
    assert a.circuit_calculated_a[heater] == pytest.approx(1.25 * 12.5 * 3**0.5, rel=REL)
    assert any(
        "Drying room heater" in f.message and "largest pole" in f.message for f in a.findings
    )
