"""Every malformed file in tests/data/bad gets located, understandable errors (issue 2).

Each case names the line the problem is on and words a practitioner would
recognise; the command line answers with exit status 2 and no traceback.
The command runs in-process for every file, and as a real process for a few.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from cli_support import assert_clean_error, run_tri, spawn_tri

from tri.schedule.errors import ScheduleError
from tri.schedule.load import load_schedule

BAD = Path(__file__).parent / "data" / "bad"

# file -> list of (line or None, fragment expected in that problem's text)
CASES: dict[str, list[tuple[int | None, str]]] = {
    "syntax_error.toml": [(4, "not valid TOML")],
    "future_format.toml": [(1, "newer tri")],
    "missing_format.toml": [(None, "expected format = 1")],
    "unknown_system.toml": [(5, "did you mean '208Y/120'")],
    "missing_panel_keys.toml": [(3, "'spaces': missing"), (3, "'bus_a': missing")],
    "wrong_types.toml": [
        (10, "'three' (text), expected a whole number"),
        (12, "'1200 VA' (text), expected a number"),
        (13, "'yes' (text), expected true or false"),
    ],
    "nan_load.toml": [(12, "found nan, expected a finite number")],
    "inf_load.toml": [(12, "found inf, expected a finite number")],
    "negative_load.toml": [(12, "found -500, expected 0, or 0.001 to 5 000 000 VA")],
    "pf_out_of_range.toml": [(13, "power factor above 0 and at most 1")],
    "pf_zero.toml": [(13, "power factor above 0 and at most 1")],
    "slot_out_of_range.toml": [(10, "slot 13 is not on the panel; expected 1 to 12")],
    "slot_shared.toml": [(15, 'slot 3 is already taken by circuit "Copier" in slot 3')],
    "two_pole_off_panel.toml": [(10, "needs slot 13, past the last space 12")],
    "multipole_overlap.toml": [(16, 'slot 5 is already taken by circuit "Rooftop unit" in slot 1')],
    "ln_on_3wire.toml": [(9, "480D system, which has no neutral")],
    "unknown_phase_label.toml": [(12, "unknown phase label in 'L4'; expected labels L1, L2, L3")],
    "unknown_profile.toml": [(13, "unknown harmonic profile 'servers'")],
    "bad_supply.toml": [
        (10, "'transformer_kva': found 0, expected 1 to 100 000 kVA"),
        (11, "'transformer_z_pct': found 150, expected 0.5 to 25 %"),
        (12, "'transformer_x_r': found -2, expected 0.1 to 100"),
    ],
    "two_load_keys.toml": [(13, "expected exactly one load key")],
    "missing_load.toml": [(9, "missing load")],
    "unknown_key.toml": [(9, "missing load"), (12, "did you mean 'load_va'")],
    "single_brackets_circuit.toml": [(9, "use [[circuit]]")],
    "bad_readings.toml": [
        (10, "unknown name 'X'"),
        (11, "found 120 V, expected near the nominal 208 V line-to-line"),
    ],
    "bad_profile.toml": [(10, "order 1, expected 2 to"), (10, "entry 2 is [5, 'big', 0.0]")],
    "bool_as_number.toml": [(10, "found True (true/false), expected a whole number")],
    "not_utf8.toml": [(3, "not UTF-8")],
    "many_problems.toml": [
        (18, "key 'pf'"),
        (21, 'slot 2 is already taken by circuit "Bad pf" in slot 2'),
        (26, "slot 40 is not on the panel"),
    ],
}


def test_every_bad_file_has_a_case() -> None:
    assert sorted(p.name for p in BAD.glob("*.toml")) == sorted(CASES)
    assert len(CASES) >= 15  # issue 2: a corpus of at least 15 malformed files


@pytest.mark.parametrize("name", sorted(CASES))
def test_bad_file_reports_every_problem_located(name: str) -> None:
    with pytest.raises(ScheduleError) as info:
        load_schedule(BAD / name)
    issues = info.value.issues
    expected = CASES[name]
    assert len(issues) == len(expected), info.value.summary()
    for issue, (line, fragment) in zip(issues, expected, strict=True):
        text = str(issue)
        assert fragment in text, text
        assert issue.line == line, text
        assert issue.file == str(BAD / name)


def test_circuit_problems_name_the_circuit_slot_and_key() -> None:
    with pytest.raises(ScheduleError) as info:
        load_schedule(BAD / "pf_out_of_range.toml")
    text = str(info.value.issues[0])
    assert "circuit \"Motor\" in slot 1: key 'pf'" in text
    assert "key 'pf'" in text
    assert text.startswith(f"{BAD / 'pf_out_of_range.toml'}:13:")


@pytest.mark.parametrize("name", sorted(CASES))
def test_cli_exits_2_without_traceback(name: str) -> None:
    assert_clean_error(run_tri("report", str(BAD / name)))


@pytest.mark.parametrize("name", ["many_problems.toml", "not_utf8.toml", "syntax_error.toml"])
def test_real_command_exits_2_without_traceback(name: str) -> None:
    r = spawn_tri("report", str(BAD / name))
    assert_clean_error(r)
    assert f"{BAD / name}:" in r.stderr


def test_loading_a_bad_file_writes_nothing(tmp_path: Path) -> None:
    target = tmp_path / "panel.toml"
    text = (BAD / "slot_shared.toml").read_text()
    target.write_text(text)
    with pytest.raises(ScheduleError):
        load_schedule(target)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["panel.toml"]
    assert target.read_text() == text


def test_missing_file_and_folder(tmp_path: Path) -> None:
    with pytest.raises(ScheduleError, match="no such file"):
        load_schedule(tmp_path / "nope.toml")
    with pytest.raises(ScheduleError, match="is a folder"):
        load_schedule(tmp_path)
