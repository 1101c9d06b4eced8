"""Loading a building: feeder keys, the tree of files, and every located error naming both files."""

from __future__ import annotations

from pathlib import Path

import pytest

from tri.schedule.errors import ScheduleError
from tri.schedule.load import load_schedule
from tri.schedule.save import schedule_text
from tri.schedule.tree import load_tree
from tri.schedule.tree_to_engine import analyse_building

DEMO = Path(__file__).parents[1] / "tri" / "panels_demo" / "brewery" / "mdp_480.toml"


def panel(name: str, system: str = "208Y/120", body: str = "") -> str:
    return f"""format = 1

[panel]
name = "{name}"
system = "{system}"
spaces = 42
bus_a = 225

{body}"""


def feeder(slot: int, target: str, extra: str = "") -> str:
    return f"""
[[circuit]]
slot = {slot}
poles = 3
name = "Feeder to {target}"
feeds = "{target}"
{extra}
"""


TX = (
    'transformer = {{ kva = 45, z_pct = 3.5, x_r = 2, connection = "{connection}", '
    'secondary = "{secondary}" }}'
)
LOAD = """
[[circuit]]
slot = 2
name = "Lights"
load_va = 1200
"""


def write(folder: Path, files: dict[str, str]) -> Path:
    for name, text in files.items():
        path = folder / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
    return folder / next(iter(files))


def problems(root: Path) -> list[str]:
    with pytest.raises(ScheduleError) as info:
        load_tree(root)
    return [str(i) for i in info.value.issues]


def test_demo_building_loads_depth_first():
    tree = load_tree(DEMO)
    names = [p.path.name for p in tree.panels]
    assert names == ["mdp_480.toml", "hp1_480.toml", "lp1_208.toml", "lp2_208.toml"]
    assert [p.parent for p in tree.panels] == [None, 0, 0, 0]
    c = tree.feeder_circuit(2)
    assert c is not None and c.feed is not None and c.feed.transformer.connection == "Dyn"


def test_three_levels_in_subfolders(tmp_path):
    root = write(
        tmp_path,
        {
            "mdp.toml": panel("MDP", body=feeder(1, "floors/lp1.toml") + LOAD),
            "floors/lp1.toml": panel("LP-1", body=feeder(1, "lp1a.toml") + LOAD),
            "floors/lp1a.toml": panel("LP-1A", body=LOAD),
        },
    )
    tree = load_tree(root)
    assert [p.schedule.panel.name for p in tree.panels] == ["MDP", "LP-1", "LP-1A"]
    assert [p.parent for p in tree.panels] == [None, 0, 1]
    result = analyse_building(tree)
    # 1200 VA at 120 V on phase A in each panel: 10, 20, 30 A up the tree [computed]
    assert [round(n.analysis.phases[0].current_a, 9) for n in result.nodes] == [30.0, 20.0, 10.0]


def test_a_file_that_feeds_itself(tmp_path):
    root = write(tmp_path, {"mdp.toml": panel("MDP", body=feeder(1, "mdp.toml"))})
    (msg,) = problems(root)
    assert msg.startswith(f"{root}:")  # located in the file, with its line
    assert "mdp.toml → " in msg and "cannot feed itself" in msg and "key 'feeds'" in msg


def test_a_loop_through_others_names_every_file(tmp_path):
    root = write(
        tmp_path,
        {
            "a.toml": panel("A", body=feeder(1, "b.toml")),
            "b.toml": panel("B", body=feeder(1, "c.toml")),
            "c.toml": panel("C", body=feeder(7, "a.toml")),
        },
    )
    (msg,) = problems(root)
    assert str(tmp_path / "c.toml") in msg.split(":")[0]
    assert "a.toml → " in msg and "b.toml → " in msg and "c.toml → " in msg
    line = (tmp_path / "c.toml").read_text().splitlines().index('feeds = "a.toml"') + 1
    assert f"c.toml:{line}:" in msg  # at the feeds key of the feeder that closes the loop


def test_missing_child(tmp_path):
    root = write(tmp_path, {"mdp.toml": panel("MDP", body=feeder(1, "lp9.toml"))})
    (msg,) = problems(root)
    assert msg.startswith(f"{root}:")
    assert "feeds " in msg and "lp9.toml: no such file" in msg


def test_child_system_must_match_without_a_transformer(tmp_path):
    root = write(
        tmp_path,
        {
            "mdp.toml": panel("MDP", "480Y/277", feeder(1, "lp1.toml")),
            "lp1.toml": panel("LP-1", "208Y/120", LOAD),
        },
    )
    (msg,) = problems(root)
    assert "mdp.toml" in msg and "lp1.toml" in msg
    assert "208Y/120" in msg and "480Y/277" in msg and "transformer" in msg


def test_child_system_must_match_the_secondary(tmp_path):
    tx = TX.format(connection="Dyn", secondary="400Y/230")
    root = write(
        tmp_path,
        {
            "mdp.toml": panel("MDP", "480Y/277", feeder(1, "lp1.toml", tx)),
            "lp1.toml": panel("LP-1", "208Y/120", LOAD),
        },
    )
    (msg,) = problems(root)
    assert "key 'transformer'" in msg and "400Y/230" in msg and "lp1.toml" in msg


def test_delta_secondary_cannot_feed_a_four_wire_panel(tmp_path):
    tx = TX.format(connection="Dd", secondary="208Y/120")
    root = write(
        tmp_path,
        {
            "mdp.toml": panel("MDP", "480Y/277", feeder(1, "lp1.toml", tx)),
            "lp1.toml": panel("LP-1", "208Y/120", LOAD),
        },
    )
    (msg,) = problems(root)
    assert "has no neutral" in msg and "4-wire" in msg


def test_a_high_leg_delta_secondary_is_a_delta_winding(tmp_path):
    """A 240/120D panel is fed by a d secondary (its neutral is a centre tap, README)."""
    for connection, wrong in (("Dyn", True), ("Dd0", False), ("Yd1", False)):
        tx = TX.format(connection=connection, secondary="240/120D")
        root = write(
            tmp_path / connection,
            {
                "mdp.toml": panel("MDP", "480Y/277", feeder(1, "shop.toml", tx)),
                "shop.toml": panel("Shop", "240/120D", LOAD.replace("slot = 2", "slot = 1")),
            },
        )
        if wrong:
            (msg,) = problems(root)
            assert "key 'transformer'" in msg and "centre-tapped" in msg and "Dd0" in msg
        else:
            assert load_tree(root).panels[1].schedule.panel.system == "240/120D"


def test_a_child_fed_twice(tmp_path):
    root = write(
        tmp_path,
        {
            "mdp.toml": panel("MDP", body=feeder(1, "lp1.toml") + feeder(7, "lp1.toml")),
            "lp1.toml": panel("LP-1", body=LOAD),
        },
    )
    (msg,) = problems(root)
    assert "already fed from" in msg and "lp1.toml" in msg and "slot 1" in msg


def test_a_feeder_with_a_load_key(tmp_path):
    root = write(
        tmp_path,
        {
            "mdp.toml": panel("MDP", body=feeder(1, "lp1.toml", "load_va = 5000")),
            "lp1.toml": panel("LP-1", body=LOAD),
        },
    )
    msgs = problems(root)
    assert any("key 'load_va'" in m and "'lp1.toml'" in m and "remove load_va" in m for m in msgs)


@pytest.mark.parametrize(
    ("extra", "expected"),
    [
        ("feeder = 30", "expected an inline table"),
        ("feeder = { length_m = -3 }", "length_m: found -3, expected 0 to 10 000 m"),
        ("feeder = { lenght_m = 3 }", "did you mean 'length_m'"),
        (
            'transformer = { kva = 45, z_pct = 3.5, x_r = 2, connection = "Dzn", '
            'secondary = "208Y/120" }',
            "connection: 'Dzn' is not a vector group",
        ),
        ('transformer = { kva = 45, z_pct = 3.5, x_r = 2, secondary = "208Y/120" }', "connection"),
        ("poles = 2", "3-pole breaker"),
    ],
)
def test_bad_feeder_keys(tmp_path, extra, expected):
    body = feeder(1, "lp1.toml", extra)
    if extra.startswith("poles"):
        body = body.replace("poles = 3\n", "")
    root = write(tmp_path, {"mdp.toml": panel("MDP", body=body)})
    with pytest.raises(ScheduleError) as info:
        load_schedule(root)
    assert any(expected in str(i) for i in info.value.issues), info.value.summary()


def test_feeder_keys_without_feeds(tmp_path):
    body = LOAD + "feeder = { length_m = 3 }\n"
    root = write(tmp_path, {"mdp.toml": panel("MDP", body=body)})
    with pytest.raises(ScheduleError, match="only a feeder circuit takes 'feeder'"):
        load_schedule(root)


def test_saving_a_moved_feeder_keeps_its_keys():
    loaded = load_schedule(DEMO)
    s = loaded.schedule
    i = next(k for k, c in enumerate(s.circuits) if c.feed is not None and c.slot == 7)
    moved = s.with_circuit(i, s.circuits[i].at_slot(25))
    text = schedule_text(moved, loaded.document)
    assert "slot = 25" in text
    assert 'feeds = "lp1_208.toml"' in text and "load_va" not in text.split("slot = 25")[1][:200]


def test_a_parent_analysed_alone_says_what_it_leaves_out():
    from tri.schedule.to_engine import analyse_schedule

    a = analyse_schedule(load_schedule(DEMO).schedule)
    assert any("feeds 3 panels" in f.message and "leave" in f.message for f in a.findings)
