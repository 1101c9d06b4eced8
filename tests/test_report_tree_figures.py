"""The building suggestion's text fits 80 columns, long panel names and scenarios included.

Issue 13: a long ``[panel] name`` used to wrap in the figures table with
its next line at the left edge, where it read as a panel of its own. Now
the name column takes what the figures leave of 80 columns and a long name
wraps with its next lines indented under it (:mod:`tri.report.tree_figures`).
"""

from __future__ import annotations

import re

import pytest
from test_rebalance_tree_scenarios import add_use_factors
from tree_wired_buildings import write_wired_building

from tri.native_output import native_stdout_to_devnull
from tri.rebalance.tree_solve import TreeOptions, suggest_tree
from tri.report.tree_work_order import render_tree_text
from tri.schedule.tree import load_tree

LONG = "LP panel for the taproom and beer garden receptacles, north wing, level 2"


@pytest.mark.parametrize("ascii_only", [False, True], ids=["unicode", "ascii"])
@pytest.mark.parametrize("scenarios", [False, True], ids=["connected", "scenarios"])
def test_long_names_fit_80_columns_and_wrap_under_themselves(tmp_path, ascii_only, scenarios):
    write_wired_building(tmp_path, "groups", 1)
    lp = tmp_path / "lp.toml"
    lp.write_text(lp.read_text().replace('name = "LP"', f'name = "{LONG}"', 1))
    if scenarios:
        add_use_factors(tmp_path, 1)
    tree = load_tree(tmp_path / "main.toml")
    with native_stdout_to_devnull():
        s = suggest_tree(tree, TreeOptions(target_pct=30, time_limit_s=30))
    before = tuple(p.schedule for p in tree.panels)
    text = render_tree_text(s, before, "caution", ascii_only=ascii_only)
    lines = text.splitlines()
    assert max(len(line) for line in lines) <= 80
    head = next(i for i, line in enumerate(lines) if "LP panel for the" in line)
    assert "Target" not in lines[head]  # the row of the name, not a header

    # the name's words in order on its row's lines: the next lines deeper, no figures there
    def cells(line: str) -> list[str]:
        return [c for c in re.split(r"\s{2,}|\|", line.strip(" |")) if c.strip()]

    start = len(lines[head]) - len(lines[head].lstrip(" |"))
    words = cells(lines[head])[0].split()
    k = head + 1
    while len(cells(lines[k])) == 1 and len(lines[k]) - len(lines[k].lstrip(" |")) == start + 4:
        words += cells(lines[k])[0].split()
        k += 1
    assert " ".join(words) == LONG
    assert k - head >= 2  # it did wrap
