"""JSON report: the contract of ``tri report FILE --format json``.

The object is :func:`tri.report.data.report_data` written as JSON: UTF-8,
two-space indent, the contract's keys in the contract's order with the
added keys (documented in :mod:`tri.report.data`) beside them, ``null`` for
missing figures and never ``NaN`` (strict JSON that any parser reads).
"""

from __future__ import annotations

import json
from typing import Any


def render_json(data: dict[str, Any]) -> str:
    """JSON text of a report dict, ending with a newline.

    Parameters
    ----------
    data : dict
        From :func:`tri.report.data.report_data` (units in the key names:
        [A], [V], [VA], [deg], [%]).

    Returns
    -------
    str
        Strict JSON (``allow_nan=False``), non-ASCII characters kept as is.
    """
    return json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False) + "\n"
