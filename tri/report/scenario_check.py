"""``tri check`` over every case: the connected load and each named scenario.

Each limit is evaluated in every case with :func:`tri.report.check_report.evaluate`;
the result kept is the worst case's (a failure before a pass, then the
highest figure), and its ``where`` names that case and the others' figures.
With no scenarios the results are exactly the connected load's.
"""

from __future__ import annotations

import dataclasses
from typing import Any

from tri.report.check_report import CheckResult, evaluate


def _rank(r: CheckResult) -> tuple[int, float]:
    order = {"fail": 2, "pass": 1, "skipped": 0}
    return order[r.status], r.value if r.value is not None else float("-inf")


def worst_results(
    per_case: list[tuple[str, list[CheckResult]]],
) -> list[CheckResult]:
    """The worst case's result for each limit row.

    Parameters
    ----------
    per_case : list of (case name, results)
        Results of :func:`evaluate` for each case, same rows in the same order.

    Returns
    -------
    list of CheckResult
        One per row; ``where`` says which case decided when there are several.
    """
    if len(per_case) == 1:
        return per_case[0][1]
    out = []
    for i in range(len(per_case[0][1])):
        row = [(name, results[i]) for name, results in per_case if i < len(results)]
        name, worst = max(row, key=lambda nr: _rank(nr[1]))
        others = ", ".join(
            f"{n} {r.value:.2f} {r.unit}" for n, r in row if n != name and r.value is not None
        )
        judged = [n for n, r in row if r.status != "skipped"]
        if worst.status == "skipped" or len(judged) < 2:
            out.append(worst)  # judged in one case only (e.g. measured readings)
            continue
        where = f"{worst.where}; worst case: {name}" + (f" (also {others})" if others else "")
        out.append(dataclasses.replace(worst, where=where))
    return out


def evaluate_cases(
    data: dict[str, Any],
    case_reports: list[tuple[str, dict[str, Any]]],
    maxima: dict[str, float | None],
    *,
    light_load_pct: float,
) -> list[CheckResult]:
    """Every limit over the connected load (``data``) and every scenario's report.

    Parameters
    ----------
    data : dict
        The connected-load report.
    case_reports : list of (name, dict)
        Each scenario's report (:func:`tri.report.data.report_data`).
    maxima : dict
        Limit key -> maximum [%] (None: not judged).
    light_load_pct : float
        Below this loading the deviation is not judged [%].
    """
    per_case = [("connected", evaluate(data, maxima, light_load_pct=light_load_pct))]
    per_case += [
        (name, evaluate(d, maxima, light_load_pct=light_load_pct)) for name, d in case_reports
    ]
    return worst_results(per_case)
