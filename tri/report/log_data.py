"""The ``log`` key of the report: a logged series' figures as plain data.

Keys (units in the names; times are text in the log's zone, ISO 8601):
``file``, ``rows``, ``interval_s``, ``start``, ``end``, ``zone`` (zone name,
offset text, or ``None`` for the logger's own clock), ``span_days``,
``recorded_days``; ``gaps`` {count, missing_intervals, longest {start,
minutes, after_line}}; ``duplicates`` {count, first_line};
``max_shift_s``; ``demand`` {minutes, window, phases {label: {a, start,
end, mean_a, max_interval_a, loading_pct}}, neutral (same or ``None``)};
``deviation_pct`` and ``vuf_pct`` {aggregate_minutes, p50, p95, p99, max,
weekly_p95 [...], limit_pct, source} (``vuf_pct`` ``None`` without line
voltages); ``capacity`` (NEC 220.87: demand_a, existing_a, new_load_a,
total_a by phase, rating_a, worst_phase, spare_a, within_rating, is_basis,
not_basis_reasons, new_circuits); ``shares`` {logged_pct, scheduled_pct,
difference_pts by phase, most_over}; ``duration`` {levels_a, hours_above
{A, B, C, N}}; ``findings`` [{level, message, source}].
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from tri.engine.capacity import (
    NEC_220_87_MIN_DAYS,
    added_load_capacity,
    phase_shares,
)
from tri.engine.log_analysis import LogAnalysis
from tri.engine.results import PanelAnalysis
from tri.report.data import num
from tri.schedule.log_file import LoadedLog
from tri.schedule.model import Schedule
from tri.words import plural

#: A phase whose logged share is this many points above its scheduled share
#: gets a finding [percentage points] (a tri setting, not a standard).
SHARE_FINDING_PTS = 5.0
#: EN 50160 limit on the 95th percentile of weekly 10-minute VUF values [%].
EN50160_VUF_PCT = 2.0
EN50160_SOURCE = "EN 50160, 2 % for 95 % of the 10-minute values of each week (published)"
NEC_SOURCE = (
    "NEC 220.87, 125 % of the maximum demand (15-minute, at least 30 days) plus the new "
    "load (from memory; the enforced edition decides)"
)


def _zone_text(log: LoadedLog) -> str | None:
    if log.zone is not None:
        return log.zone
    if log.offset_s is not None:
        sign = "+" if log.offset_s >= 0 else "-"
        h, m = divmod(int(abs(log.offset_s)) // 60, 60)
        return f"UTC{sign}{h:02d}:{m:02d}"
    return None


def _channel(log: LoadedLog, a: LogAnalysis, ch: Any, rating: float | None) -> dict[str, Any]:
    ok = ch.start_index >= 0
    return {
        "a": num(ch.value_a) if ok else None,
        "start": log.time_text(ch.start_index) if ok else None,
        "end": log.time_text(ch.start_index + a.window_intervals) if ok else None,
        "mean_a": num(ch.mean_a),
        "max_interval_a": num(ch.max_interval_a),
        "loading_pct": num(100.0 * ch.value_a / rating) if ok and rating else None,
    }


def _over_time(ot: Any, limit: float | None, source: str | None) -> dict[str, Any]:
    q = ot.percentiles
    return {
        "aggregate_minutes": num(ot.aggregate_s / 60.0),
        "p50": num(q[50.0]),
        "p95": num(q[95.0]),
        "p99": num(q[99.0]),
        "max": num(q[100.0]),
        "weekly_p95": [num(float(v)) for v in ot.weekly_95],
        "limit_pct": limit,
        "source": source,
    }


def new_load_a(schedule: Schedule) -> tuple[float, list[str]]:
    """Line current of the circuits not yet placed, counted on every phase [A].

    A new circuit's phase is not known yet, so its line current (scheduled
    load over the circuit voltage, fundamental) is counted on each phase:
    the worst case, whichever phase it lands on.
    """
    system = schedule.system
    total = 0.0
    names = []
    for c in schedule.circuits:
        if c.is_placed:
            continue
        v = system.circuit_voltage(c.poles)
        root = math.sqrt(3.0) if c.poles == 3 else 1.0
        total += c.apparent_power_va(system) / (v * root)
        names.append(c.name)
    return total, names


def log_data(
    log: LoadedLog, a: LogAnalysis, panel: PanelAnalysis, schedule: Schedule
) -> dict[str, Any]:
    """The ``log`` key (see the module docstring)."""
    labels = panel.phase_labels
    rating = panel.rating_a
    neutral_rating = panel.neutral.rating_a
    gaps = log.gaps
    longest = max(gaps, key=lambda g: g.intervals) if gaps else None
    out: dict[str, Any] = {
        # As written in [log] file (relative to the schedule): stable wherever it is run.
        "file": schedule.log.file if schedule.log is not None else log.path,
        "rows": log.rows,
        "interval_s": num(log.interval_s),
        "start": log.time_text(0),
        "end": log.time_text(a.n_intervals),
        "zone": _zone_text(log),
        "span_days": num(a.span_days),
        "recorded_days": num(a.recorded_days),
        "gaps": {
            "count": len(gaps),
            "missing_intervals": log.placement.missing_intervals,
            "longest": None
            if longest is None
            else {
                "start": log.time_text(longest.start_index),
                "minutes": num(longest.intervals * log.interval_s / 60.0),
                "after_line": longest.after_line,
            },
        },
        "duplicates": {
            "count": log.placement.duplicates,
            "first_line": log.placement.first_duplicate_line,
        },
        "max_shift_s": num(log.placement.max_shift_s),
        "demand": {
            "minutes": num(a.demand_minutes),
            "window": a.window,
            "phases": {labels[k]: _channel(log, a, a.phases[k], rating) for k in range(3)},
            "neutral": None if a.neutral is None else _channel(log, a, a.neutral, neutral_rating),
        },
        "deviation_pct": _over_time(a.deviation, None, None),
        "vuf_pct": None if a.vuf is None else _over_time(a.vuf, EN50160_VUF_PCT, EN50160_SOURCE),
        "capacity": _capacity_data(a, schedule, labels, rating),
        "shares": _shares_data(a, panel, labels),
        "duration": {
            "levels_a": [num(float(x)) for x in a.duration_levels_a],
            "hours_above": {
                name: [num(float(h)) for h in a.hours_above[k]]
                for k, name in enumerate([*labels, "N"])
                if not (name == "N" and a.neutral is None)
            },
        },
    }
    out["findings"] = log_findings(out)
    return out


def _capacity_data(
    a: LogAnalysis, schedule: Schedule, labels: tuple[str, ...], rating: float
) -> dict[str, Any]:
    """The ``capacity`` block: NEC 220.87 room for the schedule's new circuits [A]."""
    demand = np.array([p.value_a for p in a.phases])
    new_a, new_names = new_load_a(schedule)
    cap = added_load_capacity(
        np.nan_to_num(demand),
        np.full(3, new_a),
        rating,
        log_days=a.recorded_days,
        demand_minutes=a.demand_minutes,
    )
    return {
        "demand_a": _by(labels, cap.demand_a),
        "existing_a": _by(labels, cap.existing_a),
        "new_load_a": _by(labels, cap.new_load_a),
        "total_a": _by(labels, cap.total_a),
        "rating_a": num(cap.rating_a),
        "factor": cap.factor,
        "worst_phase": labels[cap.worst_phase],
        "spare_a": num(cap.spare_a),
        "within_rating": cap.within_rating,
        "is_basis": cap.is_basis,
        "not_basis_reasons": list(cap.not_basis_reasons),
        "new_circuits": new_names,
        "source": NEC_SOURCE,
    }


def _shares_data(a: LogAnalysis, panel: PanelAnalysis, labels: tuple[str, ...]) -> dict[str, Any]:
    """The ``shares`` block: each phase's share of the logged and the scheduled current [%]."""
    shares = phase_shares(
        np.array([p.mean_a for p in a.phases]), np.array([p.rms_a for p in panel.phases])
    )
    return {
        "basis": "average logged current against the schedule's phase RMS current (connected load)",
        "logged_pct": _by(labels, shares.logged_pct),
        "scheduled_pct": _by(labels, shares.scheduled_pct),
        "difference_pts": _by(labels, shares.difference_pts),
        "most_over": labels[shares.most_over],
    }


def _by(labels: tuple[str, ...], values: tuple[float, ...]) -> dict[str, Any]:
    return {lab: num(v) for lab, v in zip(labels, values, strict=True)}


def log_findings(d: dict[str, Any]) -> list[dict[str, str]]:
    """Findings of the log section, most serious first."""
    out = []
    cap = d["capacity"]
    if not cap["within_rating"]:
        worst = cap["worst_phase"]
        out.append(
            _f(
                "limit",
                "125 % of the logged demand plus the new load reaches "
                f"{cap['total_a'][worst]:.1f} A on phase {worst}, over the "
                f"{cap['rating_a']:g} A rating.",
                NEC_SOURCE,
            )
        )
    if not cap["is_basis"]:
        out.append(
            _f(
                "warning",
                "This log is not a basis for the NEC 220.87 method: "
                + "; ".join(cap["not_basis_reasons"])
                + ". The capacity figures are shown for information only.",
                NEC_SOURCE,
            )
        )
    vuf = d["vuf_pct"]
    if vuf is not None and vuf["p95"] is not None and vuf["p95"] > EN50160_VUF_PCT:
        out.append(
            _f(
                "warning",
                f"The 95th percentile of the {vuf['aggregate_minutes']:g}-minute voltage "
                f"unbalance values is {vuf['p95']:.2f} %, above {EN50160_VUF_PCT:g} %.",
                EN50160_SOURCE,
            )
        )
    if vuf is not None and d["span_days"] < 7:
        out.append(
            _f(
                "info",
                f"The log covers {d['span_days']:.1f} days; EN 50160 assesses a whole week.",
                EN50160_SOURCE,
            )
        )
    sh = d["shares"]
    over = sh["most_over"]
    if sh["difference_pts"][over] > SHARE_FINDING_PTS:
        out.append(
            _f(
                "warning",
                f"Phase {over} carries {sh['logged_pct'][over]:.1f} % of the logged current "
                f"but {sh['scheduled_pct'][over]:.1f} % of the scheduled: load the schedule "
                "does not show there (or shows on another phase).",
                f"tri: logged against scheduled phase shares, more than {SHARE_FINDING_PTS:g} "
                "points apart (a tri setting)",
            )
        )
    gaps = d["gaps"]
    if gaps["count"] or d["duplicates"]["count"]:
        longest = gaps["longest"]
        text = (
            f"The log has {plural(gaps['count'], 'gap')}, "
            f"{plural(gaps['missing_intervals'], 'interval')} missing"
        )
        if longest:
            text += f" (longest {longest['minutes']:g} min from {longest['start']})"
        text += f", and {plural(d['duplicates']['count'], 'duplicate time')}"
        if d["duplicates"]["first_line"]:
            text += f" (first at line {d['duplicates']['first_line']}; the first row was kept)"
        out.append(
            _f("info", text + ". Demand windows with a missing interval are skipped.", "tri")
        )
    return out


def _f(level: str, message: str, source: str) -> dict[str, str]:
    return {"level": level, "message": message, "source": source}


__all__ = ["NEC_220_87_MIN_DAYS", "log_data", "log_findings", "new_load_a"]
