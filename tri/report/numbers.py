"""How every report writes a number: rounded, ``-0.0`` as ``0.0``, non-finite as ``None``."""

from __future__ import annotations

import math

#: Significant digits kept in every number [-].
SIGNIFICANT_DIGITS = 9


def num(x: float | None) -> float | None:
    """A number ready for the report: rounded, ``-0.0`` as ``0.0``, non-finite as ``None``.

    Parameters
    ----------
    x : float or None
        Any figure [any unit].

    Returns
    -------
    float or None
        ``x`` rounded to :data:`SIGNIFICANT_DIGITS` significant digits.
    """
    if x is None:
        return None
    x = float(x)
    if not math.isfinite(x):
        return None
    r = float(f"{x:.{SIGNIFICANT_DIGITS}g}")
    return 0.0 if r == 0 else r
