"""The building suggestion's figures table: every panel before and after, within the width.

One row per panel searched (indented by its depth below the service), with
scenarios one row per case under it. The figures' columns keep their
numbers on one line; the panel column takes what is left of the width, and
a name longer than that is wrapped at word boundaries with its next lines
indented four more spaces than the name (deeper than the panels it feeds
and its cases, two more), their figure cells empty, so that a wrapped name
never reads as a panel or a case of its own. Headers are three short lines so that an 80-column
terminal leaves the names about 30 characters.
"""

from __future__ import annotations

import textwrap

from rich import box
from rich.table import Table

from tri.rebalance.results import Figures
from tri.rebalance.tree_results import TreeSuggestion
from tri.report.work_order import fixed

#: Headers of the figure columns, one line each (the panel column's comes first).
_HEADERS = (
    ("Target", "%", ""),
    ("Deviation", "%", "before"),
    ("", "", "after"),
    ("Largest", "phase A", "before"),
    ("", "", "after"),
)
#: Characters between two columns (padding, separator, padding) and at each edge [-].
_GAP, _EDGE = 3, 1
#: Fewest characters the panel column keeps, however wide the figures [-].
_MIN_NAME = 12


def _rows(s: TreeSuggestion) -> list[tuple[str, int, tuple[str, ...]]]:
    """Every row: its label, its indent [characters] and its five figure cells."""
    out: list[tuple[str, int, tuple[str, ...]]] = []
    for p in s.panels:
        indent = 2 * p.depth
        target = f"{p.target_pct:g}"
        cases: list[tuple[str, int, Figures, Figures]] = [(p.panel, indent, p.before, p.after)]
        if p.cases:
            out.append((p.panel, indent, (target, "", "", "", "")))
            cases = [
                (f"{c.name}{' *' if c.name == p.deciding else ''}", indent + 2, c.before, c.after)
                for c in p.cases
            ]
            target = ""
        for label, at, before, after in cases:
            over = after.max_deviation_pct > p.target_pct * (1 + 1e-9) + 1e-12
            cells = (
                target,
                fixed(before.max_deviation_pct, 2),
                fixed(after.max_deviation_pct, 2) + (" over" if over else ""),
                fixed(before.max_phase_rms_a, 1),
                fixed(after.max_phase_rms_a, 1),
            )
            out.append((label, at, cells))
    return out


def _wrapped(label: str, indent: int, width: int) -> str:
    """``label`` indented, wrapped within ``width`` with hanging lines four spaces further."""
    lead = " " * indent
    lines = textwrap.wrap(
        label,
        max(width, indent + 8),
        initial_indent=lead,
        subsequent_indent=lead + "    ",
        break_on_hyphens=False,
    )
    return "\n".join(lines) or lead


def figures_table(s: TreeSuggestion, ascii_only: bool, width: int = 80) -> Table:
    """The table of the module notes for a console ``width`` characters wide."""
    rows = _rows(s)
    first = "Panel" + (" / case" if len(s.case_names) > 1 else "")
    widths = [
        max(max(len(h) for h in head), *(len(r[2][k]) for r in rows))
        for k, head in enumerate(_HEADERS)
    ]
    name_width = max(_MIN_NAME, width - 2 * _EDGE - sum(widths) - _GAP * len(widths))
    t = Table(box=box.ASCII if ascii_only else box.SIMPLE_HEAD, pad_edge=False)
    t.add_column(f"{first}\n\n", no_wrap=True)
    for head in _HEADERS:
        t.add_column("\n".join(head), justify="right", no_wrap=True)
    for label, indent, cells in rows:
        t.add_row(_wrapped(label, indent, name_width), *cells)
    return t
