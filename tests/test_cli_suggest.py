"""``tri suggest`` as a user runs it: the real command in a subprocess.

JSON must be the only thing on standard output and follow the rebalancer
contract (``shared/spec/schedule-format.md``); text is a work order with the
safety caution and no wording of approval; ``--write`` keeps the file's
comments; bad options exit 2 with a clear message; an out-of-reach target
exits 1 with status ``infeasible``.
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from cli_support import Result, ctrl_c_tri, spawn_tri, stopped_plan
from cli_support import run_tri as in_process

from tri.cli.common import SAFETY_CAUTION
from tri.schedule.load import load_schedule
from tri.schedule.slots import slot_phases
from tri.schedule.to_engine import analyse_schedule

PANEL = """\
# Workshop panel for the suggest tests (invented).
format = 1

[panel]
name = "Workshop DB-1"
system = "208Y/120"
spaces = 18
bus_a = 100
main_a = 100   # main breaker

# ---- left column ----
[[circuit]]
slot = 1
name = "Lathe lights"   # keep me
load_va = 1800

[[circuit]]
slot = 3
name = "Compressor"
poles = 2
load_va = 2400
pf = 0.85

[[circuit]]
slot = 7
name = "Bench sockets"
load_va = 1900
locked = true   # fed from the wall duct, do not move

[[circuit]]
slot = 9
name = "Heater"
load_va = 2000

# ---- right column ----
[[circuit]]
slot = 2
name = "Dust extractor"
load_va = 1600

[[circuit]]
slot = 8
name = "Office PCs"
load_va = 900
profile = "electronics"

[[circuit]]
name = "Planned welder outlet"   # not placed yet
poles = 2
load_va = 3000
"""

CONTRACT_MOVE_KEYS = {"circuit", "from_slot", "to_slot", "from_phases", "to_phases"}
CONTRACT_FIGURE_KEYS = {"phases_rms_a", "neutral_rms_a", "max_deviation_pct"}


def run_tri(*args: str, cwd: Path | None = None) -> Result:
    """``tri suggest ARGS...`` in this process (the contract test below spawns the command)."""
    return in_process("suggest", *args, cwd=cwd)


@pytest.fixture
def panel_file(tmp_path: Path) -> Path:
    p = tmp_path / "workshop.toml"
    p.write_text(PANEL, encoding="utf-8")
    return p


def test_json_follows_the_contract_and_is_alone_on_stdout(panel_file: Path) -> None:
    # a real process: nothing the solver prints natively may reach standard output
    out = spawn_tri("suggest", str(panel_file), "--target", "5", "--format", "json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)  # the whole of stdout is one JSON object
    # seven breakers: every plan is listed, so the answer is proven (that it is
    # the true minimum is checked against every arrangement in
    # test_rebalance_enumeration.py)
    assert data["status"] == "optimal"
    assert data["status_text"].startswith("optimal: proven that no plan with fewer breakers")
    assert data["bound"] is None and data["relocations"] == len(data["moves"]) == 2
    assert [w["step"] for w in data["work_order"]] == [1, 2]
    assert all(w["circuit"] in w["text"] for w in data["work_order"])
    assert isinstance(data["objective"], str) and "relocated" in data["objective"]
    assert (
        set(data["before"]) >= CONTRACT_FIGURE_KEYS and set(data["after"]) >= CONTRACT_FIGURE_KEYS
    )
    assert list(data["before"]["phases_rms_a"]) == ["A", "B", "C"]
    for m in data["moves"]:
        assert set(m) >= CONTRACT_MOVE_KEYS
        assert isinstance(m["circuit"], str)
        assert m["to_slot"] is None or isinstance(m["to_slot"], int)
    # before-figures are the engine's on the file [same engine as tri report]
    eng = analyse_schedule(load_schedule(panel_file).schedule)
    # rel 1e-8: the JSON rounds to 9 significant digits
    assert data["before"]["phases_rms_a"]["A"] == pytest.approx(eng.phases[0].rms_a, rel=1e-8)
    assert data["target_met"]
    # the --target 5 given above; 1e-9 %: round-off slack at the boundary
    assert data["after"]["max_deviation_pct"] <= 5.0 + 1e-9
    assert data["caution"] == SAFETY_CAUTION
    names = [m["circuit"] for m in data["moves"]]
    assert "Bench sockets" not in names  # locked


def test_text_is_a_work_order_with_the_caution(panel_file: Path) -> None:
    out = run_tri(str(panel_file), "--target", "5")
    assert out.returncode == 0, out.stderr
    text = out.stdout
    assert "Panel work can kill" in text
    assert text.count("nothing here is approval to work") == 2  # top and bottom
    assert "Work order (" in text and "breakers relocated" in text
    assert "move(s)" not in text and "breaker(s)" not in text  # real plurals
    assert "-0.0" not in text  # no negative zero
    lowered = text.lower()
    for word in ("approved", "safe to", "you may now", "go ahead"):
        assert word not in lowered
    assert "Not placed" in text  # the planned welder outlet without --place-new


def test_write_keeps_comments_and_moves_the_breakers(panel_file: Path, tmp_path: Path) -> None:
    target = tmp_path / "after.toml"
    out = run_tri(
        str(panel_file),
        "--place-new",
        "--max-moves",
        "2",
        "--write",
        str(target),
        "--format",
        "json",
    )
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    written = target.read_text(encoding="utf-8")
    for comment in (
        "# Workshop panel for the suggest tests (invented).",
        "# keep me",
        "# fed from the wall duct, do not move",
        "# ---- right column ----",
        "# main breaker",
    ):
        assert comment in written
    after = load_schedule(target).schedule
    by_name = {c.name: c for c in after.circuits}
    for m in data["moves"]:
        assert by_name[m["circuit"]].slot == m["to_slot"]
    assert by_name["Planned welder outlet"].is_placed
    assert by_name["Bench sockets"].slot == 7
    eng = analyse_schedule(after)
    # the engine on the written file; rel 1e-8: the JSON rounds to 9 significant digits
    assert data["after"]["max_deviation_pct"] == pytest.approx(
        eng.current_unbalance.max_deviation_pct, rel=1e-8
    )


BAD_OPTIONS = [
    (["--target", "abc"], "--target abc"),
    (["--target", "-3"], "--target -3"),
    (["--max-moves", "1.5"], "--max-moves 1.5"),
    (["--max-moves", "-1"], "--max-moves -1"),
    (["--time-limit", "0"], "--time-limit 0"),
    (["--neutral-max", "0"], "--neutral-max 0"),
    (["--relayout", "--max-moves", "2"], "--relayout"),
    (["--format", "yaml"], "invalid choice"),
]


@pytest.mark.parametrize(("args", "expect"), BAD_OPTIONS[:2] + BAD_OPTIONS[-2:])
def test_bad_options_exit_2(panel_file: Path, args: list[str], expect: str) -> None:
    out = run_tri(str(panel_file), *args)
    assert out.returncode == 2
    assert expect in out.stderr
    assert "Traceback" not in out.stderr
    assert out.stdout == ""


@pytest.mark.parametrize(("args", "expect"), BAD_OPTIONS)
def test_bad_options_exit_2_in_process(
    panel_file: Path, args: list[str], expect: str, capsys: pytest.CaptureFixture[str]
) -> None:
    # the same dispatcher the command uses (tri.cli.main), without a process each
    from tri.cli import main

    assert main(["suggest", str(panel_file), *args]) == 2
    err = capsys.readouterr()
    assert expect in err.err and err.out == ""


def test_neutral_limit_on_a_three_wire_system_exits_2(tmp_path: Path) -> None:
    p = tmp_path / "delta.toml"
    p.write_text(
        'format = 1\n[panel]\nname = "D"\nsystem = "480D"\nspaces = 12\nbus_a = 100\n'
        '[[circuit]]\nslot = 1\npoles = 2\nname = "Motor"\nload_va = 5000\n',
        encoding="utf-8",
    )
    out = run_tri(str(p), "--neutral-max", "10")
    assert out.returncode == 2 and "3-wire" in out.stderr


def test_unreachable_target_exits_1_with_infeasible(tmp_path: Path) -> None:
    # one big locked load and two small ones: 1 % cannot be reached [computed:
    # even with the small loads on B and C the deviation stays above 50 %]
    p = tmp_path / "lopsided.toml"
    p.write_text(
        'format = 1\n[panel]\nname = "L"\nsystem = "208Y/120"\nspaces = 12\nbus_a = 100\n'
        '[[circuit]]\nslot = 1\nname = "Oven"\nload_va = 6000\nlocked = true\n'
        '[[circuit]]\nslot = 3\nname = "Fan"\nload_va = 400\n'
        '[[circuit]]\nslot = 5\nname = "Lights"\nload_va = 300\n',
        encoding="utf-8",
    )
    out = run_tri(str(p), "--target", "1", "--format", "json")
    assert out.returncode == 1
    data = json.loads(out.stdout)
    assert data["status"] == "infeasible" and data["target_met"] is False
    assert data["after"]["max_deviation_pct"] > 50


def test_missing_file_exits_2(tmp_path: Path) -> None:
    out = run_tri(str(tmp_path / "nope.toml"))
    assert out.returncode == 2 and "Traceback" not in out.stderr


def test_rail_board_demo_moves_phases_only() -> None:
    demo = Path(__file__).resolve().parents[1] / "tri" / "panels_demo" / "studio_400_rail.toml"
    if not demo.exists():
        pytest.skip("demo panel not present")
    out = run_tri(str(demo), "--max-moves", "2", "--format", "json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    assert data["moves"] and all(
        m["from_slot"] is None and m["to_slot"] is None for m in data["moves"]
    )
    assert list(data["after"]["phases_rms_a"]) == ["L1", "L2", "L3"]


def test_ratings_still_exceeded_after_the_moves_are_said() -> None:
    """The repair-shop demo balances to within 10 %, but its 150 A main stays overloaded
    (the engine's limit findings, carried into the work order and the JSON)."""
    demo = Path(__file__).parents[1] / "tri" / "panels_demo" / "garage_ev_208.toml"
    out = run_tri(str(demo), "--target", "10", "--place-new", "--format", "json")
    data = json.loads(out.stdout)
    assert data["after"]["limits"], data["after"]
    assert all("150 A rating" in text for text in data["after"]["limits"])
    text = run_tri(str(demo), "--target", "10", "--place-new").stdout
    assert "Still over a rating after the moves" in text


def _big_panel(folder: Path) -> Path:
    """60 single-pole loads on an 84-space panel (invented data): a 0.05 % target keeps
    the search going until its time limit (measured: best found at 10 s, not proven)."""
    rng = np.random.default_rng(3)
    body = "".join(
        f'[[circuit]]\nslot = {j + 1}\nname = "Load {j}"\n'
        f"load_va = {int(rng.integers(3, 30)) * 100}\n"
        f'profile = "{("linear", "electronics", "led-driver")[int(rng.integers(0, 3))]}"\n'
        for j in range(60)
    )
    path = folder / "big.toml"
    path.write_text(
        'format = 1\n[panel]\nname = "BIG"\nsystem = "208Y/120"\nspaces = 84\nbus_a = 400\n' + body
    )
    return path


def test_ctrl_c_ends_with_the_best_so_far(tmp_path: Path) -> None:
    """Ctrl+C once the solver runs: the best plan so far, its status what was proven by then."""
    panel = _big_panel(tmp_path)
    args = ("--target", "0.05", "--time-limit", "900", "--format", "json")
    d = stopped_plan(ctrl_c_tri("suggest", str(panel), *args, once=b"solver"))
    if d is None:
        return
    # the plan shown is the engine's: its figures are those of the schedule after the moves
    after = load_schedule(panel).schedule
    by_name = {c.name: c for c in after.circuits}
    moved = {m["circuit"]: m["to_slot"] for m in d["moves"]}
    circuits = tuple(
        replace(c, slot=moved[c.name], phases=slot_phases(moved[c.name], 1))
        if c.name in moved
        else c
        for c in by_name.values()
    )
    figures = analyse_schedule(replace(after, circuits=circuits))
    got = [p.rms_a for p in figures.phases]
    assert got == pytest.approx(list(d["after"]["phases_rms_a"].values()), rel=1e-6)
