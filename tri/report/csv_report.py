"""CSV report: one row per circuit, in the order of the schedule file.

Shape (RFC 4180: comma separated, fields quoted when needed, CRLF line
ends, one header row). The column names are fixed whatever the panel's
phase labels, so scripts and spreadsheets can rely on them:

==============  ==========================================================
column          meaning
==============  ==========================================================
``number``      1-based position of the circuit in the schedule file
``slot``        first slot of the breaker (empty on rail boards or if unplaced)
``phases``      phases it connects to, as labelled (``A``, ``CA``, ``L1-L2-L3``);
                empty if unplaced
``poles``       1, 2 or 3
``name``        the circuit's purpose, as in the panel directory
``load_value``  the load as written in the schedule
``load_unit``   ``VA``, ``W`` or ``A`` (line current)
``pf``          displacement power factor [-]
``leading``     ``true`` / ``false``
``profile``     harmonic profile name
``continuous``  ``true`` / ``false`` (3 h or more)
``locked``      ``true`` / ``false`` (the rebalancer must not move it)
``breaker_a``   breaker rating [A] (empty if not given)
``va``          apparent power of the whole circuit [VA]
``w``           real power [W]
``phase_1_va``  share of ``va`` the schedule puts on the first phase of
                ``phase_order`` (A or L1): all of a 1-pole circuit, half of a
                2-pole, a third of a 3-pole [VA]; ``phase_2_va`` and
                ``phase_3_va`` likewise. Column sums equal the report's
                per-phase ``va``.
``current_a``   fundamental line current of the circuit [A] (0 if unplaced)
``rms_a``       true-RMS line current with its harmonic profile [A]
                (3-pole circuits without triplen orders)
``placed``      ``true`` / ``false``
``note``        free text from the schedule
``neutral``     ``true`` for a 2- or 3-pole breaker with a neutral (one load
                to neutral per leg)
``shared_neutral``  name of the neutral a 1-pole circuit shares, else empty
``handle_tied`` ``true`` / ``false``
``spare``       ``true`` for a breaker with nothing connected
``rcd``         the RCD the circuit sits behind (rail boards), else empty
``legs``        the breaker's loads, e.g. ``A 1920 VA 16 A; B 1920 VA 16 A``
                (phases, VA, RMS A of each leg; one leg for most circuits)
``group_neutral_rms_a``  RMS current of the neutral the circuit's legs share
                with others (a shared neutral) [A], else empty
``high_leg``    on a high-leg delta, for a circuit with a pole on the high
                leg: ``B: 208 V to neutral, no 120 V loads``; else empty
==============  ==========================================================

After ``note``: ``calculated_a``, the circuit's calculated load (its
scheduled line current, times the continuous factor when continuous [A]:
what NEC 210.20(A) compares with the breaker; for a breaker with several
legs, that of its largest pole), and ``over_breaker`` (``true`` when
``calculated_a`` is above ``breaker_a``; empty without a breaker rating).
The columns from ``neutral`` on describe the panel as it is wired; they
come after the others so that scripts reading those keep working.

Numbers are written as in the JSON report (9 significant digits); a
missing value is an empty field. Per-phase and panel totals are in the JSON,
text and Markdown reports; this file is the circuit list only.
"""

from __future__ import annotations

import csv
import io
from typing import Any

#: Column names, in order (stable; see the module docstring).
COLUMNS: tuple[str, ...] = (
    "number",
    "slot",
    "phases",
    "poles",
    "name",
    "load_value",
    "load_unit",
    "pf",
    "leading",
    "profile",
    "continuous",
    "locked",
    "breaker_a",
    "va",
    "w",
    "phase_1_va",
    "phase_2_va",
    "phase_3_va",
    "current_a",
    "rms_a",
    "placed",
    "note",
    "calculated_a",
    "over_breaker",
    "neutral",
    "shared_neutral",
    "handle_tied",
    "spare",
    "rcd",
    "legs",
    "group_neutral_rms_a",
    "high_leg",
)


def _cell(x: Any) -> str:
    if x is None:
        return ""
    if isinstance(x, bool):
        return "true" if x else "false"
    if isinstance(x, float):
        return repr(int(x)) if x.is_integer() and abs(x) < 1e15 else repr(x)
    return str(x)


def csv_rows(data: dict[str, Any]) -> list[dict[str, str]]:
    """The CSV rows as dicts keyed by :data:`COLUMNS` (all values as written)."""
    labels = data["phase_order"]
    rows = []
    for c in data["circuits"]:
        row = {
            "number": c["number"],
            "slot": c["slot"],
            "phases": c["phases"],
            "poles": c["poles"],
            "name": c["name"],
            "load_value": c["load"]["value"],
            "load_unit": c["load"]["unit"],
            "pf": c["pf"],
            "leading": c["leading"],
            "profile": c["profile"],
            "continuous": c["continuous"],
            "locked": c["locked"],
            "breaker_a": c["breaker_a"],
            "va": c["va"],
            "w": c["w"],
            "phase_1_va": c["phase_va"][labels[0]],
            "phase_2_va": c["phase_va"][labels[1]],
            "phase_3_va": c["phase_va"][labels[2]],
            "current_a": c["current_a"],
            "rms_a": c["rms_a"],
            "placed": c["placed"],
            "note": c["note"],
            "calculated_a": c["calculated_a"],
            "over_breaker": c["over_breaker"],
            **_wiring_cells(data, c),
        }
        rows.append({k: _cell(v) for k, v in row.items()})
    return rows


def _wiring_cells(data: dict[str, Any], c: dict[str, Any]) -> dict[str, Any]:
    """The columns of the panel as wired (issue 12) for one circuit."""
    group = next((g for g in data["shared_neutrals"] if c["number"] in g["circuits"]), None)
    p = data["panel"]
    high = None
    if c["on_high_leg"]:
        high = f"{p['high_leg']}: {p['high_leg_to_neutral_v']:.0f} V to neutral, no 120 V loads"
    legs = "; ".join(
        f"{leg['phases']} {_cell(leg['va'])} VA {_cell(leg['rms_a'])} A" for leg in c["legs"]
    )
    return {
        "neutral": c["neutral"],
        "shared_neutral": c["shared_neutral"],
        "handle_tied": c["handle_tied"],
        "spare": c["spare"],
        "rcd": c["rcd"],
        "legs": legs,
        "group_neutral_rms_a": None if group is None else group["rms_a"],
        "high_leg": high,
    }


def render_csv(data: dict[str, Any]) -> str:
    """The circuit list as RFC 4180 CSV text (CRLF line ends, header first).

    Parameters
    ----------
    data : dict
        From :func:`tri.report.data.report_data` ([VA], [W], [A]).

    Returns
    -------
    str
        Write it with ``newline=""`` (or as bytes) to keep the CRLF line ends.
    """
    buf = io.StringIO(newline="")
    writer = csv.DictWriter(buf, fieldnames=COLUMNS, lineterminator="\r\n")
    writer.writeheader()
    writer.writerows(csv_rows(data))
    return buf.getvalue()
