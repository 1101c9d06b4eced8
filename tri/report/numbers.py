"""How every report writes a number: rounded, ``-0.0`` as ``0.0``, non-finite as ``None``;
fixed decimals without a negative zero."""

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


def fixed(x: float | None, digits: int = 1, *, signed: bool = False, none: str = "–") -> str:
    """``x`` with ``digits`` decimals, never a negative zero (``-0.0`` is written ``0.0``).

    Parameters
    ----------
    x : float or None
        Any figure [any unit].
    digits : int
        Decimals.
    signed : bool
        Write ``+`` before a positive figure (a rounded zero has no sign).
    none : str
        Text for None.

    Returns
    -------
    str
    """
    if x is None:
        return none
    text = f"{x:+.{digits}f}" if signed else f"{x:.{digits}f}"
    if float(text) == 0:
        return f"{0.0:.{digits}f}"
    return text
