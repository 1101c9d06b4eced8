"""The neutral's rules: when it counts as current-carrying, what the code sizes it on.

Three figures are kept apart, because a neutral sized from the wrong one can
overheat:

* the **physical** neutral current (the phasor sum of the line-to-neutral
  currents, with the triplen harmonics that add there), which a clamp meter
  shows;
* the **neutral load of the code's calculation**, the maximum unbalanced
  load (NEC 220.61): the largest line-to-neutral load on any one phase,
  whatever the others carry. A balanced panel's phasor sum can be near
  zero while this is large: the neutral must carry it when the other
  phases' loads are off;
* the **IEC 60364-5-52 Annex E basis**: by the third-harmonic content of the
  line current, the cable is sized on the line or on the neutral current,
  with a reduction factor.

Whether the neutral counts as a current-carrying conductor (for ampacity
adjustment) follows NEC 310.15(E): only from the share of non-linear
*line-to-neutral* load on a 4-wire wye, or always for two phases and the
neutral of a wye (a high-leg delta is 4-wire but not a wye: its neutral is
the centre tap of one winding, its 120 V legs in opposition, and neither
this rule nor IEC Annex E is applied to it); a 3-wire load (a six-pulse drive on three poles) draws
none of its harmonics through the neutral and never makes it count. On an
IEC-practice panel (50 Hz) the NEC rule is not cited: IEC 60364-5-52
523.6.3 and its Annex E say when the neutral is a loaded conductor.

References
----------
1. NEC 220.61, 215.2(A)(1) Exception No. 2 (published, secondary).
2. NEC 310.15(E), 310.15(B)(5) before 2017 (published).
3. IEC 60364-5-52:2009 Annex E, Table E.52.1 (published, secondary: BS 7671
   Table 4Aa).
"""

from __future__ import annotations

from dataclasses import dataclass

from tri.engine.limits import (
    IEC,
    LOCAL,
    SRC_IEC_LOADED_NEUTRAL,
    SRC_IEC_NEUTRAL,
    SRC_NEUTRAL_CALCULATED,
    SRC_NEUTRAL_CURRENT_CARRYING,
    SRC_NONLINEAR_READING,
    SRC_TRIPLENS,
    FindingLimits,
    HarmonicBand,
    exceeds,
    iec_band,
    practice_for,
)
from tri.engine.results import Finding, Level, PanelAnalysis


@dataclass(frozen=True)
class NeutralCount:
    """Whether a neutral counts as a current-carrying conductor, and why.

    Attributes
    ----------
    counts : bool
        True: count it when adjusting ampacity for the number of conductors.
    reason : str
        The rule that decided, in words.
    """

    counts: bool
    reason: str


def neutral_counts(
    phases_with_neutral: int,
    wye: bool,
    nonlinear_ln_share_pct: float,
    major_pct: float,
) -> NeutralCount:
    """NEC 310.15(E) for a circuit or feeder with a neutral.

    Parameters
    ----------
    phases_with_neutral : int
        Phase conductors that share the neutral (2 or 3; 1 is a plain
        2-wire circuit, whose neutral carries the line current and is
        outside this rule).
    wye : bool
        The neutral is that of a wye (4-wire wye system).
    nonlinear_ln_share_pct : float
        Share of the load that is non-linear and line-to-neutral [%].
    major_pct : float
        "Major portion" threshold [%].

    Returns
    -------
    NeutralCount
        (2) two phases and the neutral of a wye: always counted (the
        neutral carries about the line current); (3) three phases on a
        4-wire wye with the major portion non-linear line-to-neutral:
        counted; otherwise (1): it carries only the unbalanced current and
        is not counted.
    """
    if wye and phases_with_neutral == 2:
        return NeutralCount(
            True, "two phases and the neutral of a wye: the neutral carries about the line current"
        )
    if wye and phases_with_neutral >= 3 and nonlinear_ln_share_pct > major_pct:
        return NeutralCount(
            True,
            f"{nonlinear_ln_share_pct:.0f} % of the load is non-linear line-to-neutral load, "
            f"more than {major_pct:g} %: its harmonics flow in the neutral",
        )
    return NeutralCount(False, "the neutral carries only the unbalanced current")


@dataclass(frozen=True)
class IecNeutralBasis:
    """The IEC 60364-5-52 Annex E sizing basis of the panel's feeder.

    Attributes
    ----------
    third_pct : float
        Largest third-harmonic content of a phase current, ``100·I3/I1`` [%].
    phase : str
        The phase it was found on.
    band : HarmonicBand
        Table E.52.1 row (basis and reduction factor).
    basis_a : float
        The current the size is chosen on [A]: the largest phase RMS
        current (line basis), or the larger of the annex's neutral estimate
        ``3·(I3/I1)·I_line`` and the computed neutral RMS (neutral basis).
    design_a : float
        ``basis_a / factor``: the current-carrying capacity to look for [A].
    """

    third_pct: float
    phase: str
    band: HarmonicBand
    basis_a: float
    design_a: float


def iec_neutral_basis(a: PanelAnalysis) -> IecNeutralBasis | None:
    """Annex E basis from the phases' third-harmonic content (None without a neutral).

    Parameters
    ----------
    a : PanelAnalysis
        ``orders``, the phases' ``harmonic_a`` and ``rms_a``, the neutral.

    Returns
    -------
    IecNeutralBasis or None
        None on a 3-wire system or with no phase current.

    Notes
    -----
    Annex E is written for balanced circuits; the panel's worst phase is
    used (its third-harmonic content, and the largest line current), and
    on the neutral basis the computed neutral RMS (which includes the
    unbalance) when it is above the annex's ``3·h3·I_line``.
    """
    if not a.neutral.present:
        return None
    k3 = a.orders.index(3) if 3 in a.orders else None
    contents = [
        (100.0 * p.harmonic_a[k3] / p.harmonic_a[0] if k3 is not None else 0.0, p.label)
        for p in a.phases
        if p.harmonic_a[0] > 0
    ]
    if not contents:
        return None
    third, phase = max(contents)
    band = iec_band(third)
    line = max(p.rms_a for p in a.phases)
    basis = line if band.basis == "line current" else max(3 * third / 100 * line, a.neutral.rms_a)
    return IecNeutralBasis(third, phase, band, basis, basis / band.factor)


def _iec_finding(b: IecNeutralBasis, iec_practice: bool) -> Finding | None:
    """The Annex E basis as a finding: from 15 % on IEC panels; on NEC ones only when
    the neutral governs (over 33 %), the case that matters whatever the practice."""
    if b.band.factor == 1.0 and b.band.basis == "line current":
        return None
    if not iec_practice and b.band.basis == "line current":
        return None
    loaded = " The neutral then counts as a loaded conductor." if iec_practice else ""
    level: Level = "warning" if b.band.basis == "neutral current" else "info"
    size = (
        f"{b.basis_a:.1f} A / {b.band.factor:g} = {b.design_a:.1f} A"
        if b.band.factor != 1.0
        else f"{b.basis_a:.1f} A"
    )
    return Finding(
        level,
        f"Third-harmonic content of the line current up to {b.third_pct:.0f} % (phase "
        f"{b.phase}): IEC practice sizes a four- or five-core feeder on the {b.band.basis}"
        + (f" with a factor of {b.band.factor:g}" if b.band.factor != 1.0 else "")
        + f": {size}.{loaded}",
        f"{SRC_IEC_NEUTRAL}"
        + (f"; {SRC_IEC_LOADED_NEUTRAL}" if iec_practice else "")
        + f"; {LOCAL}",
    )


def neutral_findings(a: PanelAnalysis, limits: FindingLimits, wye: bool) -> list[Finding]:
    """Findings on the neutral: ratings, the code's neutral load, counting, IEC basis.

    Parameters
    ----------
    a : PanelAnalysis
        The panel's figures (``findings`` not used).
    limits : FindingLimits
        ``nonlinear_major_pct``.
    wye : bool
        The panel's neutral is that of a wye. False with a neutral present:
        a high-leg delta, whose neutral is the centre tap of one winding;
        310.15(E) and IEC Annex E, written for a wye's neutral, are then not
        applied.

    Returns
    -------
    list of Finding
        Empty on a 3-wire system.
    """
    n = a.neutral
    if not n.present:
        return []
    out: list[Finding] = []
    if n.loading_pct is not None and exceeds(n.loading_pct, 100.0):
        out.append(
            Finding(
                "limit",
                f"Neutral carries {n.rms_a:.1f} A RMS, {n.loading_pct:.1f} % of its "
                f"{n.rating_a:g} A rating.",
                f"equipment rating (common practice); {LOCAL}",
            )
        )
    if (
        n.calculated_a is not None
        and n.rating_a is not None
        and exceeds(n.calculated_a, n.rating_a)
    ):
        out.append(
            Finding(
                "limit",
                f"The neutral load of the code's calculation, {n.calculated_a:.1f} A (the "
                f"largest line-to-neutral load on one phase), exceeds the {n.rating_a:g} A "
                "neutral rating.",
                f"{SRC_NEUTRAL_CALCULATED}; {LOCAL}",
            )
        )
    max_phase = max(p.rms_a for p in a.phases)
    if max_phase > 0 and n.rms_a > max_phase * (1 + 1e-9):
        out.append(
            Finding(
                "warning",
                f"Neutral RMS {n.rms_a:.1f} A exceeds the largest phase current "
                f"({max_phase:.1f} A, ratio {n.ratio_to_max_phase:.2f}): triplen "
                "harmonics add in the neutral.",
                f"{SRC_TRIPLENS}; {LOCAL}",
            )
        )
    iec_practice = practice_for(a.frequency_hz) == IEC
    if not iec_practice:
        out.extend(_nec_count_findings(a, limits, wye))
    basis = iec_neutral_basis(a) if wye else None
    iec = None if basis is None else _iec_finding(basis, iec_practice)
    if iec is not None:
        out.append(iec)
    return out


def _nec_count_findings(a: PanelAnalysis, limits: FindingLimits, wye: bool) -> list[Finding]:
    """NEC 310.15(E) for the panel's feeder (three phases and the neutral)."""
    out: list[Finding] = []
    if not wye:
        return _centre_tap_findings(a, limits)
    rule = neutral_counts(3, wye, a.nonlinear_ln_share_pct, limits.nonlinear_major_pct)
    if rule.counts:
        out.append(
            Finding(
                "warning",
                f"{rule.reason}: count the neutral as a current-carrying conductor when "
                "adjusting ampacity.",
                f"{SRC_NEUTRAL_CURRENT_CARRYING}; {SRC_NONLINEAR_READING}; {LOCAL}",
            )
        )
    elif a.nonlinear_share_pct > limits.nonlinear_major_pct:
        out.append(
            Finding(
                "info",
                f"{a.nonlinear_share_pct:.0f} % of the load is non-linear, but only "
                f"{a.nonlinear_ln_share_pct:.0f} % is line-to-neutral: 3-wire loads send none "
                "of their harmonics through the neutral, which is not counted as "
                "current-carrying on their account.",
                f"{SRC_NEUTRAL_CURRENT_CARRYING}; {LOCAL}",
            )
        )
    return out


def _centre_tap_findings(a: PanelAnalysis, limits: FindingLimits) -> list[Finding]:
    """310.15(E) on a high-leg delta: its wye rules do not apply (said when it matters)."""
    if a.nonlinear_ln_share_pct <= limits.nonlinear_major_pct:
        return []
    return [
        Finding(
            "info",
            f"{a.nonlinear_ln_share_pct:.0f} % of the load is non-linear line-to-neutral, but "
            "the rule that then counts the neutral as current-carrying is written for a "
            "4-wire wye. On this high-leg delta the neutral is the centre tap of one "
            "winding: the two 120 V legs are in opposition, so it carries the difference of "
            "their currents (odd harmonics included), as the neutral figures show.",
            f"{SRC_NEUTRAL_CURRENT_CARRYING}; {LOCAL}",
        )
    ]


def three_pole_triplen_finding() -> Finding:
    """Info finding: 3-pole circuits' triplen harmonics were removed."""
    return Finding(
        "info",
        "Triplen harmonics (3rd, 9th, …) of 3-pole circuits were left out: a 3-wire load "
        "cannot draw zero-sequence current without a neutral.",
        "circuit theory (zero-sequence current needs a return path); "
        "Dugan et al., ch. 5 (from memory)",
    )
