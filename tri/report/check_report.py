"""Pass/fail limits for ``tri check``: which limits, their default values and sources.

Each limit compares one figure of the report (:func:`tri.report.data.report_data`)
with a maximum; a value equal to the maximum passes.

==================  =========================================  ===========  ====================
limit (option)      figure                                     default      source of the default
==================  =========================================  ===========  ====================
deviation           largest deviation of a phase RMS current   10 %         common practice
(--max-deviation)   from the mean of the three, % of the mean
vuf (--max-vuf)     voltage unbalance factor ``|V2|/|V1|`` of  2 %          EN 50160 (published),
                    the line voltages: computed at the panel                IEC 61000-2-2 (from
                    from ``[supply]``, and measured from                    memory)
                    ``[readings]`` line voltages (each checked;
                    skipped when neither exists)
neutral             neutral RMS current, % of its rating       100 %        equipment rating
(--max-neutral-pct) (skipped on a 3-wire system)                            (common practice)
loading             largest phase RMS current, % of the main   80 %         common practice;
(--max-loading-pct) breaker (bus rating without a main)                     NEC 210.20(A),
                                                                            215.2(A), 230.42(A)
                                                                            (from memory)
==================  =========================================  ===========  ====================

The 80 % loading limit is the everyday form of the continuous-load rule
(continuous load at 125 % within the rating, i.e. at most 80 % of it);
judged on the whole RMS current it is the stricter reading, so a panel that
passes it also passes the 125 % sizing check.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import Any, Literal

Status = Literal["pass", "fail", "skipped"]


@dataclass(frozen=True)
class Limit:
    """One checkable limit.

    Attributes
    ----------
    key : str
        Stable id (``deviation``, ``vuf``, ``neutral``, ``loading``).
    option : str
        Command-line option that sets it.
    title : str
        What is checked, in words.
    default_pct : float
        Default maximum [%].
    source : str
        Where the default comes from, with its tag (published / from memory /
        common practice).
    """

    key: str
    option: str
    title: str
    default_pct: float
    source: str


LIMITS: tuple[Limit, ...] = (
    Limit(
        "deviation",
        "--max-deviation",
        "largest deviation of a phase RMS current from the mean of the three, % of the mean",
        10.0,
        "common practice: about 10 % of the phase mean is a usual balancing target "
        "(a rule of thumb, not a code requirement)",
    ),
    Limit(
        "vuf",
        "--max-vuf",
        "voltage unbalance factor |V2|/|V1| of the line voltages, computed at the panel from "
        "[supply] and measured from [readings] line voltages (skipped without either)",
        2.0,
        "EN 50160, 2 % for 95 % of 10-minute values over a week (published); "
        "IEC 61000-2-2 compatibility level 2 % (from memory)",
    ),
    Limit(
        "neutral",
        "--max-neutral-pct",
        "neutral RMS current, % of the neutral rating (skipped on a 3-wire system)",
        100.0,
        "the neutral's own rating (equipment rating, common practice)",
    ),
    Limit(
        "loading",
        "--max-loading-pct",
        "largest phase RMS current, % of the main breaker (bus rating without a main)",
        80.0,
        "common practice: continuous load at most 80 % of the main (bus without one), the "
        "125 % continuous-load rule of NEC 210.20(A), 215.2(A), 230.42(A) (from memory)",
    ),
)
LIMITS_BY_KEY: dict[str, Limit] = {x.key: x for x in LIMITS}


@dataclass(frozen=True)
class CheckResult:
    """The outcome of one limit on one panel.

    Attributes
    ----------
    key : str
        Limit id (see :data:`LIMITS`).
    title : str
        What was checked.
    value_pct : float or None
        The panel's figure [%]; None when skipped.
    limit_pct : float
        The maximum used [%].
    status : {"pass", "fail", "skipped"}
    where : str
        Which phase, or computed / measured, or why it was skipped.
    source : str
        Source of the maximum: the default's source, or the option that set it.
    default : bool
        True when the maximum is the default.
    """

    key: str
    title: str
    value_pct: float | None
    limit_pct: float
    status: Status
    where: str
    source: str
    default: bool


def _result(
    limit: Limit, maximum: float, value: float | None, where: str, skip: str | None = None
) -> CheckResult:
    default = maximum == limit.default_pct
    source = (
        limit.source
        if default
        else f"set by {limit.option} (default {limit.default_pct:g} %: {limit.source})"
    )
    if skip is not None or value is None:
        return CheckResult(
            limit.key, limit.title, None, maximum, "skipped", skip or where, source, default
        )
    status: Status = "pass" if value <= maximum else "fail"
    return CheckResult(limit.key, limit.title, value, maximum, status, where, source, default)


def _furthest(data: dict[str, Any]) -> str:
    labels = data["phase_order"]
    rms = [data["phases"][lab]["rms_a"] for lab in labels]
    mean = sum(rms) / 3.0
    k = max(range(3), key=lambda i: abs(rms[i] - mean))
    return f"phase {labels[k]} furthest: {rms[k]:.1f} A, mean {mean:.1f} A"


def evaluate(data: dict[str, Any], maxima: dict[str, float] | None = None) -> list[CheckResult]:
    """Check one panel's report against the limits.

    Parameters
    ----------
    data : dict
        From :func:`tri.report.data.report_data` ([%], [A]).
    maxima : dict, optional
        Limit key -> maximum [%]; missing keys use the defaults.

    Returns
    -------
    list of CheckResult
        One per limit in :data:`LIMITS` order; ``vuf`` gives one result for the
        computed and one for the measured unbalance when both exist.
    """
    m = {x.key: x.default_pct for x in LIMITS}
    m.update(maxima or {})
    out: list[CheckResult] = []

    lim = LIMITS_BY_KEY["deviation"]
    out.append(
        _result(
            lim, m["deviation"], data["current_unbalance"]["max_deviation_pct"], _furthest(data)
        )
    )

    lim = LIMITS_BY_KEY["vuf"]
    v = data["voltage"]
    r = data["readings"]
    vuf_rows = []
    if v is not None:
        vuf_rows.append(_result(lim, m["vuf"], v["vuf_pct"], "computed at the panel from [supply]"))
    if r is not None and all(x is not None for x in r["volts_ll"].values()):
        if r["vuf_pct"] is None:
            vuf_rows.append(
                _result(
                    lim,
                    m["vuf"],
                    None,
                    "",
                    skip="measured line voltages cannot close a triangle; check the readings",
                )
            )
        else:
            vuf_rows.append(
                _result(lim, m["vuf"], r["vuf_pct"], "measured line voltages, [readings]")
            )
    partial = r is not None and any(x is not None for x in r["volts_ll"].values())
    if partial and not any("measured" in x.where for x in vuf_rows):
        vuf_rows.append(
            _result(
                lim,
                m["vuf"],
                None,
                "",
                skip="measured: only some line voltages are in [readings]; VUF needs all three",
            )
        )
    if not vuf_rows:
        vuf_rows.append(
            _result(
                lim,
                m["vuf"],
                None,
                "",
                skip="no [supply] table and no measured line voltages in [readings]",
            )
        )
    out.extend(vuf_rows)

    lim = LIMITS_BY_KEY["neutral"]
    n = data["neutral"]
    if n["present"]:
        out.append(
            _result(
                lim,
                m["neutral"],
                n["loading_pct"],
                f"{n['rms_a']:.1f} A RMS of {n['rating_a']:g} A",
            )
        )
    else:
        out.append(_result(lim, m["neutral"], None, "", skip="3-wire system: no neutral"))

    lim = LIMITS_BY_KEY["loading"]
    labels = data["phase_order"]
    k = max(range(3), key=lambda i: data["phases"][labels[i]]["loading_pct"])
    ph = data["phases"][labels[k]]
    p = data["panel"]
    out.append(
        _result(
            lim,
            m["loading"],
            ph["loading_pct"],
            f"phase {labels[k]}: {ph['rms_a']:.1f} A of {p['rating_a']:g} A {p['rating_basis']}",
        )
    )
    return out


def panel_status(results: list[CheckResult]) -> str:
    """``"fail"`` if any limit failed, else ``"pass"``."""
    return "fail" if any(r.status == "fail" for r in results) else "pass"


def result_dict(r: CheckResult) -> dict[str, Any]:
    """A check result as JSON-ready data (``value_pct``, ``limit_pct`` in [%])."""
    return asdict(r)


def render_check_text(
    entries: list[dict[str, Any]],
    *,
    caution: str,
    maxima: dict[str, float] | None = None,
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
        Limit key -> maximum used [%] (for the closing list of limits).
    width : int
        Wrap width [columns].

    Returns
    -------
    str
        Ends with a newline.
    """
    import textwrap

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
        failed = sum(1 for r in results if r.status == "fail")
        checked = sum(1 for r in results if r.status != "skipped")
        verdict = (
            f"FAIL, {failed} of {checked} checks over the limit"
            if failed
            else f"PASS, all {checked} checks within limits"
        )
        lines += wrap(f"{head}: {verdict}", "", "    ")
        for r in results:
            if r.status == "skipped":
                figure = "not checked"
            else:
                op = "<=" if r.status == "pass" else "> "
                figure = f"{r.value_pct:6.2f} % {op} {r.limit_pct:g} %"
            cells = f"  {r.status.upper():<8}{r.key:<10}{figure:<20}"
            lines += wrap(f"{cells}{r.where}", "", " " * 40)
        lines.append("")
    m = {x.key: x.default_pct for x in LIMITS}
    m.update(maxima or {})
    basis = sorted({e["basis"] for e in entries if e.get("basis")})
    lines.append("Limits (a value equal to the limit passes):")
    for x in LIMITS:
        used = m[x.key]
        origin = (
            f"default: {x.source}"
            if used == x.default_pct
            else f"set by {x.option}; the default {x.default_pct:g} % is {x.source}"
        )
        lines += wrap(f"{x.key} {used:g} % ({x.option}): {x.title}; {origin}.", "  ", "      ")
    lines.append("")
    if basis:
        lines += wrap("Currents computed at " + " / ".join(basis) + ".", "")
    lines += wrap(caution, "")
    return "\n".join(lines) + "\n"
