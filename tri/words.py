"""Plurals for every face of ``tri`` (reports, the rebalancer's words, the UI).

One function in one place, below every layer that prints counts, so that
no output says "circuit(s)".
"""

from __future__ import annotations


def plural(count: int, noun: str, many: str | None = None) -> str:
    """``"1 move"``, ``"2 moves"``, ``"0 moves"``; ``many`` when the plural is not noun + s.

    The last word is inflected: ``plural(2, "new circuit")`` is ``"2 new circuits"``,
    ``plural(3, "duplicate time")`` is ``"3 duplicate times"``.
    """
    if count == 1:
        return f"1 {noun}"
    if many is None:
        head, _, last = noun.rpartition(" ")
        last += "es" if last.endswith(("s", "x", "ch", "sh")) else "s"
        many = f"{head} {last}".strip()
    return f"{count} {many}"
