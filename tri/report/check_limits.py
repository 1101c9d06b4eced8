"""The catalogue of ``tri check``'s pass/fail limits: which limits, their defaults and sources.

Each limit compares one figure of the report (:func:`tri.report.data.report_data`)
with a maximum; a value equal to the maximum passes. Defaults and sources
come from :mod:`tri.engine.limits` (the findings, the report and the UI use
the same ones).

===========  ========================================================  ========
limit        figure                                                     default
===========  ========================================================  ========
deviation    largest ``|I − mean| / mean`` of the phase RMS currents    10 %
             (NEMA definition); over the limit, not judged (skipped)
             when the heaviest phase is below ``--light-load-pct``
             (20 %) of the rating
vuf          ``|V2|/|V1|`` of the line voltages, computed (``[supply]``)  2 %
             and measured (``[readings]``); EN 50160's 2 % is a weekly
             statistic at the supply terminals, so both are indicative
neutral      neutral RMS current, % of its rating                       100 %
loading      the code's sizing rule: calculated load (noncontinuous     100 %
             plus 125 % of continuous, scheduled VA per phase) of the
             heaviest phase, % of the main (bus without a main)
current      largest phase RMS current, % of the main (bus); set 80     100 %
             for the usual design headroom (not a code rule)
breakers     largest circuit calculated load, % of its breaker          100 %
             (NEC 210.20(A)); skipped when no circuit has ``breaker_a``
phase-kva    largest minus smallest scheduled phase apparent power      off
             [kVA] (some grid operators cap it, e.g. 4.6 kVA)
===========  ========================================================  ========

A PASS is a promise only about what is listed; :data:`NOT_CHECKED` says
what is not. The evaluation is :mod:`tri.report.check_report`, the text
rendering :mod:`tri.report.check_text`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from tri.engine.limits import (
    DEVIATION_TARGET_PCT,
    PHASE_KVA_EXAMPLE,
    RATING_PCT,
    SRC_BRANCH,
    SRC_DEVIATION,
    SRC_EN50160,
    SRC_EQUIPMENT_RATING,
    SRC_IEC_SIZING,
    SRC_LIGHT_LOAD,
    SRC_PHASE_KVA,
    SRC_SIZING_BUS,
    SRC_SIZING_MAIN,
    VUF_PCT,
)

Status = Literal["pass", "fail", "skipped"]


#: What ``tri check`` does not look at: a PASS says nothing about these.
NOT_CHECKED = (
    "conductor ampacity, terminal ratings and adjustment factors; Article 220 demand "
    "factors (the calculated load is the scheduled load); equipment listed for 100 % "
    "operation (set --continuous-factor 1); available fault current, breaker interrupting "
    "ratings and coordination; harmonic voltage distortion; loads missing from the "
    "schedule"
)


@dataclass(frozen=True)
class Limit:
    """One checkable limit.

    Attributes
    ----------
    key : str
        Stable id (``deviation``, ``vuf``, ``neutral``, ``loading``,
        ``current``, ``breakers``, ``phase-kva``).
    option : str
        Command-line option that sets it.
    title : str
        What is checked, in words.
    default : float or None
        Default maximum [``unit``]; None: not checked unless set.
    unit : str
        ``"%"`` or ``"kVA"``.
    source : str
        Where the default comes from, with its tag.
    """

    key: str
    option: str
    title: str
    default: float | None
    unit: str
    source: str

    @property
    def default_text(self) -> str:
        """The default as printed (``"10 %"``, ``"off"``)."""
        return "off" if self.default is None else f"{self.default:g} {self.unit}"


LIMITS: tuple[Limit, ...] = (
    Limit(
        "deviation",
        "--max-deviation",
        "largest deviation of a phase RMS current from the mean of the three, % of the "
        "mean (|I - mean| / mean, the NEMA definition; (max - min) / mean is 1.5 to 2 times "
        "larger); not judged below the light-load threshold",
        DEVIATION_TARGET_PCT,
        "%",
        f"{SRC_DEVIATION}; light load: {SRC_LIGHT_LOAD}",
    ),
    Limit(
        "vuf",
        "--max-vuf",
        "voltage unbalance factor |V2|/|V1| of the line voltages, computed at the panel from "
        "[supply] and measured from [readings] line voltages (skipped without either); "
        "indicative, as EN 50160's limit is a weekly statistic at the supply terminals",
        VUF_PCT,
        "%",
        SRC_EN50160,
    ),
    Limit(
        "neutral",
        "--max-neutral-pct",
        "neutral RMS current, % of the neutral rating (skipped on a 3-wire system)",
        RATING_PCT,
        "%",
        "the neutral's own rating (equipment rating, common practice)",
    ),
    Limit(
        "loading",
        "--max-loading-pct",
        "the sizing rule: calculated load of the heaviest phase (noncontinuous plus the "
        "continuous factor times continuous, scheduled VA over V_LN; on a high-leg delta "
        "the 2- and 3-pole shares over V_LL/√3), % of the main "
        "breaker (bus rating without a main)",
        RATING_PCT,
        "%",
        f"60 Hz panels: {SRC_SIZING_MAIN}; without a main {SRC_SIZING_BUS}; 50 Hz panels: "
        f"{SRC_IEC_SIZING}",
    ),
    Limit(
        "current",
        "--max-current-pct",
        "largest phase RMS current, % of the main breaker (bus rating without a main); "
        "80 is the usual design headroom (a margin, not a code rule)",
        RATING_PCT,
        "%",
        SRC_EQUIPMENT_RATING,
    ),
    Limit(
        "breakers",
        "--max-breaker-pct",
        "largest calculated load of a circuit (its scheduled current, times the continuous "
        "factor when continuous), % of its breaker_a (skipped when no circuit gives one)",
        RATING_PCT,
        "%",
        f"60 Hz panels: {SRC_BRANCH}; 50 Hz panels: {SRC_IEC_SIZING}",
    ),
    Limit(
        "phase-kva",
        "--max-phase-kva",
        "largest minus smallest scheduled apparent power of the phases, kVA",
        None,
        "kVA",
        SRC_PHASE_KVA + f" (e.g. --max-phase-kva {PHASE_KVA_EXAMPLE:g})",
    ),
)


LIMITS_BY_KEY: dict[str, Limit] = {x.key: x for x in LIMITS}


def defaults() -> dict[str, float | None]:
    """Limit key -> default maximum."""
    return {x.key: x.default for x in LIMITS}
