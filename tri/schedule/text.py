"""What text a schedule may hold, and how text that may not is shown.

Names, notes, labels, profile names and every other text of a schedule
reach terminals, Markdown and CSV files. A control character there can
clear a screen, retitle a window or hide part of a line, and a
bidirectional override can make a name read differently from what it is.
The policy is to refuse such text when the schedule is loaded (every
format and the UI's forms read through the loader), with a message that
shows the characters escaped; nothing downstream needs to escape.

Refused: the C0 and C1 control characters and DEL (Unicode category Cc,
tab and newline included: every text is one line), line and paragraph
separators (Zl, Zp), lone surrogates (Cs), and the bidirectional controls
(U+061C, U+200E, U+200F, U+202A-U+202E, U+2066-U+2069) [published: Unicode
Standard Annex #9, Table 4; Unicode Character Database general categories].
"""

from __future__ import annotations

import unicodedata

_BIDI_CONTROLS = frozenset(
    "\u061c\u200e\u200f\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069"
)
_REFUSED_CATEGORIES = frozenset({"Cc", "Cs", "Zl", "Zp"})


def is_refused_char(ch: str) -> bool:
    """True for a character a schedule's text may not hold (see the module docstring)."""
    return ch in _BIDI_CONTROLS or unicodedata.category(ch) in _REFUSED_CATEGORIES


def refused_chars(text: str) -> list[str]:
    """The distinct refused characters of ``text``, in order of first appearance."""
    out: list[str] = []
    for ch in text:
        if ch not in out and is_refused_char(ch):
            out.append(ch)
    return out


def escape_char(ch: str) -> str:
    """``\\x1b``, ``\\u202e``: how a refused character is shown."""
    code = ord(ch)
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def escaped(text: str, *, keep_newlines: bool = False) -> str:
    """``text`` with every refused character written as its escape (safe to print).

    With ``keep_newlines``, ``\\n`` stays as it is (for multi-line messages).
    """
    if not any(is_refused_char(ch) for ch in text):
        return text
    return "".join(
        ch if (keep_newlines and ch == "\n") or not is_refused_char(ch) else escape_char(ch)
        for ch in text
    )


def plain_text_problem(text: str) -> str | None:
    """Why ``text`` may not be in a schedule, or ``None`` when it may."""
    bad = refused_chars(text)
    if not bad:
        return None
    shown = ", ".join(escape_char(ch) for ch in bad)
    what = "a control character" if len(bad) == 1 else "control characters"
    return f"holds {what} ({shown}); expected plain text on one line"
