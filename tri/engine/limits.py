"""Every threshold, factor, limit source and status word, in one place.

The engine's findings, ``tri report``, ``tri check``, the terminal UI and the
rebalancer read their numbers and words from here, so that they never
disagree (a figure of exactly 80 % gets the same word everywhere). Each
figure carries its source with the tag of ``shared/spec/check-values.md``:
**published** (read in the named document), **published, secondary** (the
document's text or table as quoted or reproduced elsewhere, not read in the
original), **from memory** (recalled, not re-read), **common practice** (a
fact of the trade with no single source), or **tri's judgement** (a choice
made here, with its reason).

Comparisons: a figure *above* a threshold crosses it; a figure equal to it
does not, and neither does one above it by round-off alone (:func:`exceeds`:
a 32 A continuous charger on a 40 A breaker needs exactly 40 A, however the
floating-point sum lands), as ``tri check`` passes a value equal to its
limit.

References
----------
1. NFPA 70, *National Electrical Code* (NEC), 2014-2020 editions' section
   numbers: 210.20(A), 215.2(A)(1), 215.3, 230.42(A)(1), 408.30, 408.36,
   220.61, 310.15(E) (310.15(B)(5) before 2017).
2. IEC 60364-5-52:2009, Annex E, Table E.52.1 (reproduced as BS 7671
   Table 4Aa).
3. EN 50160, voltage characteristics at the supply terminals of public
   networks; IEC 61000-2-2 compatibility levels.
4. ANSI C84.1, voltage ratings for electric power systems, Annex D
   (voltage unbalance).
5. NEMA MG 1 Part 14, motors on unbalanced voltages.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final

#: Reminder carried by every finding's source.
LOCAL = "local code and a licensed practitioner decide"

# ---- practice ------------------------------------------------------------

#: North American practice (NEC): the default on 60 Hz systems.
NEC = "NEC"
#: IEC practice (IEC 60364): the default on 50 Hz systems.
IEC = "IEC"


def practice_for(frequency_hz: float) -> str:
    """Which body of rules a panel's findings cite by default.

    Parameters
    ----------
    frequency_hz : float
        System frequency [Hz].

    Returns
    -------
    str
        :data:`IEC` when nearer 50 Hz than 60 Hz, else :data:`NEC` (tri's
        judgement: 50 Hz systems are wired to IEC 60364 practice far more
        often than not; the continuous factor can always be set).
    """
    return IEC if abs(frequency_hz - 50.0) < abs(frequency_hz - 60.0) else NEC


# ---- factors -------------------------------------------------------------

#: Multiplier on continuous loads (3 h or more) in the sizing rule, NEC
#: practice [-].
CONTINUOUS_FACTOR = 1.25
#: The same in IEC practice [-]: IEC 60364-4-43 has the design current not
#: above the device's rated current, with no continuous-load factor.
IEC_CONTINUOUS_FACTOR = 1.0


def continuous_factor_for(practice: str) -> float:
    """Default continuous factor of a practice (:data:`NEC` 1.25, :data:`IEC` 1) [-]."""
    return IEC_CONTINUOUS_FACTOR if practice == IEC else CONTINUOUS_FACTOR


#: Accepted range of the continuous factor [-]: below 1 would count a
#: continuous load for less than its current; 3 is far above any code's 125 %.
CONTINUOUS_FACTOR_RANGE = (1.0, 3.0)

# ---- ratings and headroom ------------------------------------------------

#: A rating: a figure above 100 % of it is over [%].
RATING_PCT = 100.0
#: Design headroom on the phase and neutral RMS loading [%]: a margin many
#: designers keep, not a code rule.
DESIGN_HEADROOM_PCT = 80.0

# ---- balance ---------------------------------------------------------------

#: Balancing target on the largest deviation of a phase RMS current from
#: the mean [%] (the rebalancer's default target and the deviation check).
DEVIATION_TARGET_PCT = 10.0
#: Heaviest phase below this share of the rating: the deviation is shown but
#: not judged [%].
LIGHT_LOAD_PCT = 20.0
#: Example cap on the apparent power between phases some grid operators set
#: [kVA]; the check is a setting, off by default.
PHASE_KVA_EXAMPLE = 4.6

# ---- neutral ---------------------------------------------------------------

#: Non-linear share of the load above which it is the "major portion" [%].
NONLINEAR_MAJOR_PCT = 50.0


@dataclass(frozen=True)
class HarmonicBand:
    """One row of IEC 60364-5-52 Table E.52.1.

    Attributes
    ----------
    upto_pct : float
        Upper end of the band of third-harmonic content of the line current
        (``I3 / I1``), inclusive [%] (the first band starts at 0).
    factor : float
        Reduction factor on the current-carrying capacity [-].
    basis : str
        ``"line current"`` or ``"neutral current"``: which current the
        conductor size is chosen on.
    """

    upto_pct: float
    factor: float
    basis: str


#: IEC 60364-5-52 Table E.52.1, four- and five-core cables with four
#: conductors carrying current (published, secondary: as BS 7671 Table 4Aa).
IEC_THIRD_HARMONIC_BANDS: tuple[HarmonicBand, ...] = (
    HarmonicBand(15.0, 1.0, "line current"),
    HarmonicBand(33.0, 0.86, "line current"),
    HarmonicBand(45.0, 0.86, "neutral current"),
    HarmonicBand(math.inf, 1.0, "neutral current"),
)

# ---- voltage ---------------------------------------------------------------

#: Voltage unbalance factor |V2|/|V1| [%] (EN 50160; IEC 61000-2-2).
VUF_PCT = 2.0
#: Line-voltage unbalance (largest deviation from the mean) [%] (ANSI C84.1).
ANSI_UNBALANCE_PCT = 3.0
#: Motors are rated for this percent unbalance (NEMA definition) [%].
MOTOR_UNBALANCE_PCT = 1.0
#: Voltage drop at the panel worth a note [%] (NEC informational notes).
DROP_NOTE_PCT = 3.0

# ---- readings --------------------------------------------------------------

#: Measured against scheduled current worth a warning [%].
READINGS_MISMATCH_PCT = 25.0

# ---- sources (with their tags) ---------------------------------------------

SRC_SIZING_MAIN = (
    "NEC 215.2(A)(1) and 215.3 (feeder conductors and overcurrent device), 230.42(A)(1) "
    "(service conductors): the noncontinuous load plus 125 % of the continuous load "
    "(published, secondary)"
)
SRC_SIZING_BUS = (
    "NEC 408.30: a panelboard rated not less than the calculated load it feeds "
    "(published, secondary)"
)
SRC_MAIN_ABOVE_BUS = (
    "NEC 408.36: a panelboard protected by a device rated not above the panelboard "
    "(published, secondary)"
)
SRC_BRANCH = (
    "NEC 210.20(A): a branch circuit's breaker rated not less than the noncontinuous load "
    "plus 125 % of the continuous load (published, secondary); assemblies listed for 100 % "
    "operation are excepted (set the continuous factor to 1 for them)"
)
#: Short names of the sizing clauses, for one-line summaries (sources above).
CLAUSE_SIZING_MAIN = "NEC 215.3, 215.2(A)(1), 230.42(A)(1)"
CLAUSE_SIZING_BUS = "NEC 408.30"
CLAUSE_BRANCH = "NEC 210.20(A)"
CLAUSE_IEC_SIZING = "IEC 60364-4-43 433.1, from memory"
SRC_IEC_SIZING = (
    "IEC 60364-4-43 433.1: the design current not above the rated current of the protective "
    "device, no continuous-load factor (from memory)"
)
SRC_EQUIPMENT_RATING = "the equipment's own rating (common practice)"
SRC_HEADROOM = (
    f"design headroom of {DESIGN_HEADROOM_PCT:g} % (common practice; a margin, not a code rule)"
)
SRC_DEVIATION = (
    f"common practice: about {DEVIATION_TARGET_PCT:g} % of the phase mean is a usual "
    "balancing target (a rule of thumb, not a code requirement)"
)
SRC_LIGHT_LOAD = (
    f"tri's judgement: below {LIGHT_LOAD_PCT:g} % of the rating on the heaviest phase every "
    "phase is lightly loaded, so a large percentage of small currents is no risk to the "
    "ratings (the neutral has its own check)"
)
SRC_DEVIATION_DEFINITION = (
    "deviation from the mean: the largest |I - mean| / mean, the NEMA MG 1 definition "
    "(published); many meters show (max - min) / mean instead, 1.5 to 2 times as large"
)
SRC_PHASE_KVA = (
    f"some grid operators cap the apparent power between phases, e.g. {PHASE_KVA_EXAMPLE:g} "
    "kVA in German connection rules (VDE-AR-N 4100/4105, from memory); a setting"
)
SRC_NEUTRAL_CALCULATED = (
    "NEC 220.61(A): the feeder or service neutral load is the maximum unbalanced load, the "
    "largest net calculated load between the neutral and any one phase (published, "
    "secondary); no 220.61(B) reduction applied; a neutral not connected to an overcurrent "
    "device is sized at 100 % of its load, 215.2(A)(1) Exception No. 2 (published, "
    "secondary)"
)
SRC_NEUTRAL_CURRENT_CARRYING = (
    "NEC 310.15(E) (310.15(B)(5) in earlier editions): counted where the major portion of "
    "a 4-wire wye load is non-linear, and always for two phases and the neutral of a wye; "
    "not when it carries only the unbalanced current (published)"
)
SRC_IEC_NEUTRAL = (
    "IEC 60364-5-52 Annex E, Table E.52.1, four- and five-core cables (published, "
    "secondary: as BS 7671 Table 4Aa); a reduced neutral only with third-harmonic content "
    "up to 15 %, IEC 60364-5-52 524.2 (from memory)"
)
SRC_TRIPLENS = (
    "common practice; Dugan et al., Electrical Power Systems Quality, ch. 5 (from memory)"
)
SRC_EN50160 = (
    f"EN 50160: {VUF_PCT:g} % for 95 % of the 10-minute mean values of each week at the "
    "supply terminals (published); IEC 61000-2-2 compatibility level 2 % (from memory)"
)
SRC_ANSI = (
    f"ANSI C84.1 Annex D: supply systems designed to limit unbalance to "
    f"{ANSI_UNBALANCE_PCT:g} % at the revenue meter under no load (published, secondary); "
    "its voltage ranges apply at the service (from memory)"
)
SRC_NEMA_CURVE = "NEMA MG 1 Part 14 derating curve (published)"
SRC_NEMA_LIMIT = "NEMA MG 1 Part 14 (published)"
SRC_DROP = (
    "NEC informational notes to 210.19(A) and 215.2(A): 3 % feeder, 5 % total "
    "(from memory; advisory)"
)
SRC_IEC_LOADED_NEUTRAL = (
    "IEC 60364-5-52 523.6.3: a neutral carrying current without a matching reduction in the "
    "line conductors' load is taken into account (published, quoted in its Annex E)"
)
SRC_IEC_DROP = (
    "IEC 60364-5-52 Annex G: 3 % lighting, 5 % other uses from a public low-voltage supply "
    "(from memory; advisory)"
)
SRC_NONLINEAR_READING = (
    f"'major portion' read as more than {NONLINEAR_MAJOR_PCT:g} % (common practice)"
)

# ---- comparisons -----------------------------------------------------------

#: Relative round-off allowed before a figure counts as above a threshold [-]:
#: far above the ~1e-15 error of the few operations behind any figure here,
#: far below any difference that matters.
ROUND_OFF = 1e-12


def exceeds(value: float, threshold: float) -> bool:
    """True when ``value`` is above ``threshold`` by more than round-off.

    Parameters
    ----------
    value, threshold : float
        Figure and threshold, in the same unit.

    Returns
    -------
    bool
        ``value > threshold + ROUND_OFF·|threshold|``.
    """
    return value > threshold + ROUND_OFF * abs(threshold)


# ---- status words ----------------------------------------------------------

#: Above 100 % of the rating.
OVER = "OVER"
#: Above the design headroom, at most 100 %.
NEAR = "NEAR"
#: At or below the design headroom.
OK = "ok"

#: Check outcomes (``Final``: each keeps its literal type, e.g. ``Literal["pass"]``).
PASS: Final = "pass"
FAIL: Final = "fail"
SKIPPED: Final = "skipped"

#: Finding levels, most serious first, with the short words the UI shows.
LEVEL_RANK = {"limit": 0, "warning": 1, "info": 2}
LEVEL_WORD = {"limit": "LIMIT", "warning": "WARN", "info": "info"}


def loading_word(pct: float | None, headroom_pct: float = DESIGN_HEADROOM_PCT) -> str:
    """Status word of a loading figure, the same in the report and the UI.

    Parameters
    ----------
    pct : float or None
        Loading against a rating [%]; None when there is nothing to judge.
    headroom_pct : float
        Design headroom [%] (default :data:`DESIGN_HEADROOM_PCT`).

    Returns
    -------
    str
        :data:`OVER` above 100 %, :data:`NEAR` above ``headroom_pct``,
        :data:`OK` otherwise, ``""`` for None. A figure equal to a threshold
        does not cross it.
    """
    if pct is None:
        return ""
    if exceeds(pct, RATING_PCT):
        return OVER
    if exceeds(pct, headroom_pct):
        return NEAR
    return OK


def iec_band(third_pct: float) -> HarmonicBand:
    """The Table E.52.1 band of a third-harmonic content.

    Parameters
    ----------
    third_pct : float
        Third-harmonic content of the line current, ``100·I3/I1`` [%].

    Returns
    -------
    HarmonicBand
        The band whose upper end is the first at or above ``third_pct``.
    """
    return next(b for b in IEC_THIRD_HARMONIC_BANDS if third_pct <= b.upto_pct)


@dataclass(frozen=True)
class FindingLimits:
    """Thresholds of the findings, as settings (defaults from this module).

    Attributes
    ----------
    headroom_pct : float
        Design headroom on phase RMS loading [%] (:data:`SRC_HEADROOM`).
    deviation_warn_pct : float
        Balancing target on the deviation from the mean [%]
        (:data:`SRC_DEVIATION`).
    light_load_pct : float
        Heaviest phase below this share of the rating: deviation not judged
        [%] (:data:`SRC_LIGHT_LOAD`).
    nonlinear_major_pct : float
        Share of non-linear line-to-neutral load above which the neutral
        counts as current-carrying [%] (:data:`SRC_NEUTRAL_CURRENT_CARRYING`).
    vuf_warn_pct : float
        Voltage unbalance factor [%] (:data:`SRC_EN50160`).
    ansi_unbalance_pct : float
        Line-voltage deviation from the mean [%] (:data:`SRC_ANSI`).
    motor_unbalance_pct : float
        NEMA percent unbalance above which motors derate [%].
    drop_warn_pct : float
        Voltage drop at the panel worth a note [%] (:data:`SRC_DROP`).
    readings_mismatch_pct : float
        Measured against computed current worth a warning [%] (common
        practice for clamp readings against a schedule).
    phase_kva_limit : float or None
        Largest difference of the phases' scheduled apparent power [kVA]
        (:data:`SRC_PHASE_KVA`); None: not judged.
    """

    headroom_pct: float = DESIGN_HEADROOM_PCT
    deviation_warn_pct: float = DEVIATION_TARGET_PCT
    light_load_pct: float = LIGHT_LOAD_PCT
    nonlinear_major_pct: float = NONLINEAR_MAJOR_PCT
    vuf_warn_pct: float = VUF_PCT
    ansi_unbalance_pct: float = ANSI_UNBALANCE_PCT
    motor_unbalance_pct: float = MOTOR_UNBALANCE_PCT
    drop_warn_pct: float = DROP_NOTE_PCT
    readings_mismatch_pct: float = READINGS_MISMATCH_PCT
    phase_kva_limit: float | None = None
