"""A building's links checked: each child's system against its parent's feeder circuit.

Read by :func:`tri.schedule.tree.load_tree` for every feeder: the frequency
is kept; without a transformer the system is kept; with one the child is
its secondary's system, whose winding matches it (a neutral for a 4-wire
wye, a delta with one winding centre-tapped for a high-leg delta:
:mod:`tri.engine.centre_tap`), and a YN primary has a neutral to take
(not a high-leg delta's centre tap). Each problem is located at the
parent's feeder circuit, naming the child's file.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from tri.engine.transformer import VectorGroup, parse_vector_group
from tri.schedule.systems import SYSTEMS

if TYPE_CHECKING:
    from tri.schedule.tree import _Builder


def check_link(b: _Builder, parent: int, feeder: int, child: int) -> None:
    """The child's system against its parent's (or the transformer's secondary), each
    problem located at the parent's feeder circuit (``b.at_feeder``)."""
    ps = b.panels[parent].schedule
    cs = b.panels[child].schedule
    c = ps.circuits[feeder]
    assert c.feed is not None
    shown = b.panels[child].shown
    tx = c.feed.transformer
    child_sys = cs.panel.system
    if ps.panel.frequency_hz != cs.panel.frequency_hz:
        b.at_feeder(
            parent,
            feeder,
            "feeds",
            f"feeds {shown}, a {cs.panel.frequency_hz:g} Hz panel, from this "
            f"{ps.panel.frequency_hz:g} Hz one; a feeder keeps the frequency",
        )
    if tx is None:
        if child_sys != ps.panel.system:
            b.at_feeder(
                parent,
                feeder,
                "feeds",
                f"feeds {shown}, whose system is {child_sys}, not this panel's "
                f"{ps.panel.system}; a feeder without a transformer keeps the system (add "
                "transformer = { ... } or correct [panel] system in one of the files)",
            )
        return
    if tx.secondary != child_sys:
        b.at_feeder(
            parent,
            feeder,
            "transformer",
            f"secondary {tx.secondary}, but {shown} is a {child_sys} panel; they must match",
        )
        return
    group = parse_vector_group(tx.connection)
    four_wire = SYSTEMS[child_sys].has_neutral
    if SYSTEMS[child_sys].high_leg_delta or ps.panel.effective_high_leg is not None:
        _check_high_leg_link(b, (parent, feeder), group, child_sys)
        return
    if group.secondary_has_neutral != four_wire:
        wiring, example = ("4-wire", "Dyn") if four_wire else ("3-wire", "Dd")
        b.at_feeder(
            parent,
            feeder,
            "transformer",
            f"connection {tx.connection}: its secondary "
            f"{'has' if group.secondary_has_neutral else 'has no'} neutral, but {shown} is a "
            f"{wiring} {child_sys} panel (use e.g. {example})",
        )
    if group.primary_needs_neutral and not ps.system.has_neutral:
        b.at_feeder(
            parent,
            feeder,
            "transformer",
            f"connection {tx.connection}: a YN primary needs a neutral, and this "
            f"{ps.panel.system} panel has none",
        )


def _check_high_leg_link(
    b: _Builder, at: tuple[int, int], group: VectorGroup, child_sys: str
) -> None:
    """A transformer next to a high-leg delta (:mod:`tri.engine.centre_tap`): its secondary
    winding is a delta when the child is one (the centre tap gives the neutral), and a
    high-leg parent feeds a D or Y primary (its centre tap is no neutral for a wye)."""
    parent, feeder = at
    ps = b.panels[parent].schedule
    tx = ps.circuits[feeder].feed.transformer  # type: ignore[union-attr]
    assert tx is not None
    if SYSTEMS[child_sys].high_leg_delta and group.secondary != "d":
        b.at_feeder(
            parent,
            feeder,
            "transformer",
            f"connection {tx.connection}: a {child_sys} secondary is a delta with one winding "
            "centre-tapped for the neutral; use a d secondary (e.g. Dd0 or Yd1)",
        )
    elif not SYSTEMS[child_sys].high_leg_delta and (
        group.secondary_has_neutral != SYSTEMS[child_sys].has_neutral
    ):
        example = "Dyn" if SYSTEMS[child_sys].has_neutral else "Dd"
        b.at_feeder(
            parent,
            feeder,
            "transformer",
            f"connection {tx.connection}: its secondary does not match the {child_sys} panel "
            f"it feeds (use e.g. {example})",
        )
    if ps.panel.effective_high_leg is not None and group.primary == "YN":
        b.at_feeder(
            parent,
            feeder,
            "transformer",
            f"connection {tx.connection}: a YN primary on this {ps.panel.system} high-leg "
            "delta would take its centre tap as a wye neutral; use a D or Y primary",
        )
