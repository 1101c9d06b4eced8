"""Building blocks of the terminal report: the glyph set (UTF-8 or ASCII), loading
bars, status words and their style, section rules, number cells, and the
ASCII spelling of the report's symbols (:func:`to_ascii`).

Status words and thresholds are :func:`tri.engine.limits.loading_word`'s.
"""

from __future__ import annotations

import unicodedata
from typing import Any

from rich import box
from rich.console import Group
from rich.rule import Rule
from rich.text import Text

from tri.engine.limits import DESIGN_HEADROOM_PCT, NEAR, OVER, loading_word
from tri.report.numbers import fixed

#: Width of the loading bar [cells]; a full bar is 100 % of the rating.
BAR_CELLS = 10


_EIGHTHS = " ▏▎▍▌▋▊▉"


#: Like ``box.SIMPLE_HEAD`` (a rule under the header only), in ASCII.
_ASCII_SIMPLE_HEAD = box.Box("    \n    \n -- \n    \n    \n    \n    \n    \n", ascii=True)


class Glyphs:
    """The characters one report uses: UTF-8 symbols, or their ASCII spellings."""

    def __init__(self, ascii_only: bool) -> None:
        self.ascii = ascii_only
        self.angle = "@" if ascii_only else "∠"
        self.deg = " deg" if ascii_only else "°"
        self.none = "-" if ascii_only else "–"
        self.times = "x" if ascii_only else "×"
        self.box = _ASCII_SIMPLE_HEAD if ascii_only else box.SIMPLE_HEAD
        self.angle_head = "Deg" if ascii_only else "Angle°"
        self.dot = "*" if ascii_only else "·"
        self.rule = "-" if ascii_only else "─"


def figure_text(x: float | None, digits: int = 1, g: Glyphs | None = None) -> str:
    """``x`` with ``digits`` decimals; a dash for None."""
    return fixed(x, digits, none=g.none if g else "-")


def va_text(x: float | None) -> str:
    """Volt-amperes with thousands separators [VA]; ``-`` for None."""
    return "-" if x is None else f"{x:,.0f}"


def bar(pct: float | None, *, ascii_only: bool = False, cells: int = BAR_CELLS) -> str:
    """A loading bar of ``cells`` characters, full at 100 %.

    Parameters
    ----------
    pct : float or None
        Loading [%]; above 100 the bar is full and ends with ``>``.
    ascii_only : bool
        Use ``#`` and ``.`` instead of block characters.
    cells : int
        Bar width [characters].

    Returns
    -------
    str
        Exactly ``cells`` characters.
    """
    if pct is None:
        return " " * cells
    frac = max(0.0, min(pct, 100.0)) / 100.0
    if ascii_only:
        full = round(frac * cells)
        out = "#" * full + "." * (cells - full)
    else:
        eighths = round(frac * cells * 8)
        full, part = divmod(eighths, 8)
        out = "█" * full
        if full < cells:
            out += (_EIGHTHS[part] if part else "░") + "░" * (cells - full - 1)
    if pct > 100.0:
        out = out[:-1] + ">"
    return out


def status_word(pct: float | None, headroom_pct: float = DESIGN_HEADROOM_PCT) -> str:
    """``OVER`` above 100 %, ``NEAR`` above the headroom, else ``ok`` (blank for None).

    The words and thresholds are :func:`tri.engine.limits.loading_word`'s.
    """
    return loading_word(pct, headroom_pct)


def status_style(word: str) -> str:
    """Rich style of a loading status word (the word itself always printed)."""
    return {OVER: "bold red", NEAR: "yellow"}.get(word, "")


def section(title: str, g: Glyphs) -> Group:
    """A blank line and a titled rule opening a report section."""
    return Group(
        Text(""), Rule(Text(title, style="bold"), characters=g.rule, align="left", style="")
    )


_ASCII = str.maketrans(
    {
        "…": "...",
        "–": "-",
        "—": "-",
        "−": "-",
        "·": "*",
        "∠": "@",
        "°": " deg",
        "×": "x",
        "≤": "<=",
        "≥": ">=",
        "±": "+/-",
        "’": "'",
        "“": '"',
        "”": '"',
    }
)


def to_ascii(text: str) -> str:
    """``text`` with the report's symbols spelled in ASCII and accents dropped."""
    text = unicodedata.normalize("NFKD", text.translate(_ASCII))
    return (
        "".join(ch for ch in text if not unicodedata.combining(ch))
        .encode("ascii", "replace")
        .decode("ascii")
    )


def ascii_data(x: Any) -> Any:
    """Report data with every string spelled in ASCII (:func:`to_ascii`)."""
    if isinstance(x, str):
        return to_ascii(x)
    if isinstance(x, dict):
        return {k: ascii_data(v) for k, v in x.items()}
    if isinstance(x, list):
        return [ascii_data(v) for v in x]
    return x
