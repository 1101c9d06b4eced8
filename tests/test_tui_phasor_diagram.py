"""The phasor drawing: every arrow has a head and its own label, none hides another.

Pure drawing checks on the widget's text output (no engine figures here: the
values are arbitrary phasors, and what is asserted follows from the drawing
rules in :mod:`tri.tui.widgets.phasor_diagram`) [computed].
"""

from __future__ import annotations

import cmath
import math

from tri.tui.widgets.phasor_diagram import SIDE_BY_SIDE_DOTS, Arrow, _offsets, draw


def arrow(label: str, magnitude: float, deg: float, dotted: bool = False) -> Arrow:
    return Arrow(label, cmath.rect(magnitude, math.radians(deg)), "bold", dotted)


def dots(text: str) -> int:
    """How many braille dots are set in the drawing."""
    return sum(bin(ord(ch) - 0x2800).count("1") for ch in text if 0x2800 <= ord(ch) <= 0x28FF)


def test_phasors_sharing_an_angle_are_drawn_side_by_side_with_both_labels() -> None:
    c, n = arrow("C", 63.0, 97.8), arrow("N", 60.0, 97.8, dotted=True)
    a = arrow("A", 170.0, -2.0)
    assert _offsets([a, c, n], [True, True, True]) == [
        0.0,
        -SIDE_BY_SIDE_DOTS / 2,
        SIDE_BY_SIDE_DOTS / 2,
    ]
    text = draw([a, c, n], 48, 20).plain
    assert "C" in text and "N" in text and "A" in text


def test_apart_angles_are_not_shifted() -> None:
    assert _offsets([arrow("A", 1, 0), arrow("B", 1, -120)], [True, True]) == [0.0, 0.0]


def test_every_arrow_ends_in_a_head() -> None:
    bare = draw([], 40, 20).plain  # the axes alone
    one = draw([arrow("A", 1.0, 30.0)], 40, 20).plain
    # A shaft from the centre to the edge is about one dot per step of the radius;
    # the head adds two short strokes, so the arrow has clearly more dots than its shaft.
    radius = min(40, 2 * 20) - 6  # dots: min(cols, 2 * rows) - 6, see draw()
    assert dots(one) - dots(bare) > radius + 4


def test_a_phasor_too_short_to_draw_is_named_not_hidden() -> None:
    text = draw([arrow("I1", 100.0, 0.0), arrow("I0", 0.5, 10.0)], 48, 20).plain
    assert "I0: too short to draw" in text


def test_labels_never_overwrite_each_other() -> None:
    # Three phasors with nearly one tip: each label still reads whole.
    arrows = [arrow(x, 50.0, 45.0 + k) for k, x in enumerate(("IA", "IB", "IC"))]
    text = draw(arrows, 48, 20).plain
    for label in ("IA", "IB", "IC"):
        assert label in text
