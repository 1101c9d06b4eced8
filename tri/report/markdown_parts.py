"""Markdown building blocks: escaping user and engine text (:func:`md_escape`),
number cells and pipe tables (:func:`md_table`)."""

from __future__ import annotations

from tri.report.numbers import fixed

_SPECIAL = "\\`*_[]<>|#~"


def md_escape(text: str) -> str:
    """Text safe inside a Markdown table cell or paragraph (special characters escaped)."""
    out = "".join("\\" + ch if ch in _SPECIAL else ch for ch in text)
    return out.replace("\n", " ").replace("\r", " ")


def md_figure(x: float | None, digits: int = 1) -> str:
    """``x`` with ``digits`` decimals; a dash for None."""
    return fixed(x, digits)


def md_va(x: float | None) -> str:
    """Volt-amperes with thousands separators [VA]; a dash for None."""
    return "–" if x is None else f"{x:,.0f}"


def md_amps(x: float | None) -> str:
    """A rating in amperes (``"20 A"``); empty for None."""
    return "" if x is None else f"{x:g} A"


def md_table(head: list[str], rows: list[list[str]], align: str | None = None) -> list[str]:
    """A Markdown pipe table; ``align`` gives ``l``/``r``/``c`` per column."""
    align = align or "l" * len(head)
    marks = {"l": "---", "r": "---:", "c": ":---:"}
    out = ["| " + " | ".join(head) + " |", "|" + "|".join(marks[a] for a in align) + "|"]
    out += ["| " + " | ".join(r) + " |" for r in rows]
    return out
