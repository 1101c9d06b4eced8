"""Plain text of ``tri check``: each file, each limit, its value and verdict, then the sources.

The limits, their defaults and sources are :mod:`tri.report.check_report`'s;
this module only lays them out (80 columns by default).
"""

from __future__ import annotations

import textwrap
from typing import Any

from tri.engine.limits import FAIL, PASS, SKIPPED
from tri.report.check_report import LIMITS, NOT_CHECKED, CheckResult, defaults


def _figure(r: CheckResult) -> str:
    if r.status == SKIPPED:
        return "not checked"
    op = "<=" if r.status == PASS else "> "
    unit = " %" if r.unit == "%" else " kVA"
    return f"{r.value:6.2f}{unit} {op} {r.limit:g}{unit}"


def render_check_text(
    entries: list[dict[str, Any]],
    *,
    caution: str,
    maxima: dict[str, float | None] | None = None,
    width: int = 80,
) -> str:
    """Plain text for ``tri check``: each file, each limit, value, pass/fail; then the sources.

    Parameters
    ----------
    entries : list of dict
        One per file: ``file``, ``panel`` (name or None), ``status``
        (pass/fail/error), ``error`` (message or None), ``results`` (list of
        :class:`CheckResult`), ``basis`` (current basis text or None).
    caution : str
        Printed once at the end.
    maxima : dict, optional
        Limit key -> maximum used (for the closing list of limits).
    width : int
        Wrap width [columns].

    Returns
    -------
    str
        Ends with a newline.
    """

    def wrap(text: str, indent: str, hang: str | None = None) -> list[str]:
        return textwrap.wrap(
            text,
            width=width,
            initial_indent=indent,
            subsequent_indent=indent if hang is None else hang,
            break_on_hyphens=False,
        ) or [indent.rstrip()]

    lines: list[str] = []
    for e in entries:
        head = f"{e['file']}"
        if e["panel"]:
            head += f" ({e['panel']})"
        if e["status"] == "error":
            error = " ".join(str(e["error"]).split())
            lines += wrap(f"{head}: ERROR, not checked: {error}", "", "    ")
            lines.append("")
            continue
        results: list[CheckResult] = e["results"]
        failed = sum(1 for r in results if r.status == FAIL)
        checked = sum(1 for r in results if r.status != SKIPPED)
        verdict = (
            f"FAIL, {failed} of {checked} checks over the limit"
            if failed
            else f"PASS, all {checked} checks within limits"
        )
        lines += wrap(f"{head}: {verdict}", "", "    ")
        for r in results:
            cells = f"  {r.status.upper():<8}{r.key:<10}{_figure(r):<22}"
            lines += wrap(f"{cells}{r.where}", "", " " * 42)
        lines.append("")
    m = defaults()
    m.update(maxima or {})
    basis = sorted({e["basis"] for e in entries if e.get("basis")})
    lines.append("Limits (a value equal to the limit passes):")
    for x in LIMITS:
        used = m[x.key]
        shown = "off" if used is None else f"{used:g} {x.unit}"
        origin = (
            f"default: {x.source}"
            if used == x.default
            else f"set by {x.option}; the default {x.default_text}: {x.source}"
        )
        lines += wrap(f"{x.key} {shown} ({x.option}): {x.title}; {origin}.", "  ", "      ")
    lines.append("")
    lines += wrap(f"Not checked: {NOT_CHECKED}.", "")
    if basis:
        lines += wrap("Currents computed at " + " / ".join(basis) + ".", "")
    lines += wrap(caution, "")
    return "\n".join(lines) + "\n"
