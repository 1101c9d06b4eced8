"""``tri check``'s evaluation: each limit of :mod:`tri.report.check_limits` (the
catalogue, with its defaults and sources) applied to one panel's report
data (:func:`tri.report.data.report_data`), one :class:`CheckResult` per limit,
and the panel's status. A value equal to the maximum passes.

A PASS is a promise only about what is listed; :data:`NOT_CHECKED` says
what is not. The text rendering is :mod:`tri.report.check_text`.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import Any

from tri.engine.limits import (
    FAIL,
    LIGHT_LOAD_PCT,
    PASS,
    SKIPPED,
    exceeds,
)
from tri.report.check_limits import (
    LIMITS,
    LIMITS_BY_KEY,
    NOT_CHECKED,
    Limit,
    Status,
    defaults,
)

#: Re-exported: the command line, the UI and the tests import these here.
__all__ = [
    "LIMITS",
    "LIMITS_BY_KEY",
    "NOT_CHECKED",
    "CheckResult",
    "Limit",
    "defaults",
    "evaluate",
    "panel_status",
    "result_dict",
]


@dataclass(frozen=True)
class CheckResult:
    """The outcome of one limit on one panel.

    Attributes
    ----------
    key : str
        Limit id (see :data:`LIMITS`).
    title : str
        What was checked.
    value : float or None
        The panel's figure [``unit``]; None when skipped.
    limit : float or None
        The maximum used [``unit``]; None when the limit is off.
    unit : str
        ``"%"`` or ``"kVA"``.
    status : {"pass", "fail", "skipped"}
    where : str
        Which phase or circuit, or computed / measured, or why it was skipped.
    source : str
        Source of the maximum: the default's source, or the option that set it.
    default : bool
        True when the maximum is the default.
    """

    key: str
    title: str
    value: float | None
    limit: float | None
    unit: str
    status: Status
    where: str
    source: str
    default: bool


def _result(
    limit: Limit,
    maximum: float | None,
    value: float | None,
    where: str,
    skip: str | None = None,
) -> CheckResult:
    default = maximum == limit.default
    source = (
        limit.source
        if default
        else f"set by {limit.option} (default {limit.default_text}: {limit.source})"
    )
    if skip is not None or value is None or maximum is None:
        why = skip or where
        return CheckResult(
            limit.key, limit.title, None, maximum, limit.unit, SKIPPED, why, source, default
        )
    status: Status = FAIL if exceeds(value, maximum) else PASS
    return CheckResult(
        limit.key, limit.title, value, maximum, limit.unit, status, where, source, default
    )


def _deviation(data: dict[str, Any], m: dict[str, float | None], light: float) -> CheckResult:
    lim = LIMITS_BY_KEY["deviation"]
    labels = data["phase_order"]
    ph = data["phases"]
    cu = data["current_unbalance"]
    rms = [ph[lab]["rms_a"] for lab in labels]
    mean = sum(rms) / 3.0
    k = max(range(3), key=lambda i: abs(rms[i] - mean))
    where = (
        f"phase {labels[k]} furthest: {rms[k]:.1f} A, mean {mean:.1f} A; (max - min)/mean "
        f"{cu['max_minus_min_pct']:.1f} %"
    )
    heaviest = max(ph[lab]["loading_pct"] for lab in labels)
    within = m["deviation"] is not None and not exceeds(cu["max_deviation_pct"], m["deviation"])
    if heaviest < light and not within:
        skip = (
            f"lightly loaded: heaviest phase {heaviest:.1f} % of the rating, below "
            f"{light:g} % (--light-load-pct); deviation {cu['max_deviation_pct']:.1f} % not "
            "judged"
        )
        return _result(lim, m["deviation"], None, "", skip=skip)
    return _result(lim, m["deviation"], cu["max_deviation_pct"], where)


def _vuf(data: dict[str, Any], maximum: float | None) -> list[CheckResult]:
    lim = LIMITS_BY_KEY["vuf"]
    v, r = data["voltage"], data["readings"]
    rows = []
    if v is not None:
        rows.append(_result(lim, maximum, v["vuf_pct"], "computed at the panel from [supply]"))
    measured = r is not None and any(x is not None for x in r["volts_ll"].values())
    if measured and all(x is not None for x in r["volts_ll"].values()):
        if r["vuf_pct"] is None:
            skip = "measured line voltages cannot close a triangle; check the readings"
            rows.append(_result(lim, maximum, None, "", skip=skip))
        else:
            rows.append(_result(lim, maximum, r["vuf_pct"], "measured line voltages, [readings]"))
    elif measured:
        skip = "measured: only some line voltages are in [readings]; VUF needs all three"
        rows.append(_result(lim, maximum, None, "", skip=skip))
    if not rows:
        skip = "no [supply] table and no measured line voltages in [readings]"
        rows.append(_result(lim, maximum, None, "", skip=skip))
    return rows


def _neutral(data: dict[str, Any], maximum: float | None) -> CheckResult:
    lim = LIMITS_BY_KEY["neutral"]
    n = data["neutral"]
    if not n["present"]:
        return _result(lim, maximum, None, "", skip="3-wire system: no neutral")
    where = f"{n['rms_a']:.1f} A RMS of {n['rating_a']:g} A"
    return _result(lim, maximum, n["loading_pct"], where)


def _phase_rows(data: dict[str, Any], m: dict[str, float | None]) -> list[CheckResult]:
    labels = data["phase_order"]
    ph = data["phases"]
    p = data["panel"]
    of = f"of {p['rating_a']:g} A {p['rating_basis']}"
    k = max(range(3), key=lambda i: ph[labels[i]]["calculated_pct"])
    calc = ph[labels[k]]
    factor = data["basis"]["continuous_factor"]
    how = "scheduled" if factor == 1 else f"continuous at {factor * 100:g} %"
    loading = _result(
        LIMITS_BY_KEY["loading"],
        m["loading"],
        calc["calculated_pct"],
        f"phase {labels[k]}: {calc['calculated_a']:.1f} A calculated ({how}) {of}",
    )
    j = max(range(3), key=lambda i: ph[labels[i]]["loading_pct"])
    cur = ph[labels[j]]
    current = _result(
        LIMITS_BY_KEY["current"],
        m["current"],
        cur["loading_pct"],
        f"phase {labels[j]}: {cur['rms_a']:.1f} A RMS {of}",
    )
    return [loading, current]


def _breakers(data: dict[str, Any], maximum: float | None) -> CheckResult:
    lim = LIMITS_BY_KEY["breakers"]
    rated = [c for c in data["circuits"] if c["breaker_a"] is not None and c["placed"]]
    if not rated:
        return _result(lim, maximum, None, "", skip="no circuit gives a breaker rating")
    worst = max(rated, key=lambda c: c["calculated_a"] / c["breaker_a"])
    pct = 100.0 * worst["calculated_a"] / worst["breaker_a"]
    where_slot = (
        f"slot {worst['slot']}" if worst["slot"] is not None else f"phases {worst['phases']}"
    )
    over = sum(
        1 for c in rated if exceeds(100.0 * c["calculated_a"] / c["breaker_a"], maximum or 0.0)
    )
    where = (
        f"{where_slot} {worst['name']!r}: {worst['calculated_a']:.1f} A of "
        f"{worst['breaker_a']:g} A; {over} of {len(rated)} over"
    )
    return _result(lim, maximum, pct, where)


def _phase_kva(data: dict[str, Any], maximum: float | None) -> CheckResult:
    lim = LIMITS_BY_KEY["phase-kva"]
    if maximum is None:
        return _result(lim, None, None, "", skip=f"off (set {lim.option} to check)")
    labels = data["phase_order"]
    va = {lab: data["phases"][lab]["va"] for lab in labels}
    hi = max(labels, key=lambda lab: va[lab])
    lo = min(labels, key=lambda lab: va[lab])
    gap = (va[hi] - va[lo]) / 1000.0
    where = f"{hi} {va[hi] / 1000:.2f} kVA, {lo} {va[lo] / 1000:.2f} kVA"
    return _result(lim, maximum, gap, where)


def evaluate(
    data: dict[str, Any],
    maxima: dict[str, float | None] | None = None,
    *,
    light_load_pct: float = LIGHT_LOAD_PCT,
) -> list[CheckResult]:
    """Check one panel's report against the limits.

    Parameters
    ----------
    data : dict
        From :func:`tri.report.data.report_data` ([%], [A], [VA]).
    maxima : dict, optional
        Limit key -> maximum [%, or kVA for ``phase-kva``]; missing keys use
        the defaults.
    light_load_pct : float
        Heaviest phase below this share of the rating: deviation not judged [%].

    Returns
    -------
    list of CheckResult
        One per limit in :data:`LIMITS` order; ``vuf`` gives one result for the
        computed and one for the measured unbalance when both exist.
    """
    m = defaults()
    m.update(maxima or {})
    out = [_deviation(data, m, light_load_pct), *_vuf(data, m["vuf"]), _neutral(data, m["neutral"])]
    out += _phase_rows(data, m)
    out += [_breakers(data, m["breakers"]), _phase_kva(data, m["phase-kva"])]
    return out


def panel_status(results: list[CheckResult]) -> str:
    """``"fail"`` if any limit failed, else ``"pass"``."""
    return FAIL if any(r.status == FAIL for r in results) else PASS


def result_dict(r: CheckResult) -> dict[str, Any]:
    """A check result as JSON-ready data.

    ``value`` and ``limit`` are in ``unit``; ``value_pct`` and ``limit_pct``
    repeat them for percentage limits (None for ``phase-kva``), as before.
    """
    out = asdict(r)
    pct = r.unit == "%"
    out["value_pct"] = r.value if pct else None
    out["limit_pct"] = r.limit if pct else None
    return out
