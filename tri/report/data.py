"""One panel's analysis as plain data: the JSON report contract and a little more.

:func:`report_data` turns the engine's :class:`~tri.engine.results.PanelAnalysis`
and the :class:`~tri.schedule.model.Schedule` it came from into a dict of
plain numbers, strings, lists and ``None``. Every renderer (JSON, text,
Markdown, CSV) draws from this one dict, so the formats never disagree.

Contract keys (``shared/spec/schedule-format.md``, "Report contract")
--------------------------------------------------------------------
``panel`` {name, system, frequency_hz}; ``phase_order``; ``phases`` keyed in
``phase_order`` with {va, current_a, current_deg, rms_a, thd_pct,
loading_pct}; ``neutral`` {current_a, current_deg, rms_a, loading_pct};
``sequence`` {i0, i1, i2: {a, deg}}; ``current_unbalance``
{negative_sequence_pct, max_deviation_pct}; ``voltage`` (``None`` without a
``[supply]`` table) {phase_v, line_v, vuf_pct, line_deviation_pct,
phase_deviation_pct, motor_derating}; ``readings`` (``None`` without a
``[readings]`` table); ``findings`` [{level, message, source}].

Units are SI throughout and are in the key names: ``_a`` amperes [A],
``_v``/``v`` volts [V], ``va`` volt-amperes [VA], ``_w`` watts [W], ``deg``
degrees (A-B-C sequence, ``V_A`` at 0°), ``_pct`` percent [%], ``_ohm`` ohms.

Where the contract's numbers can be undefined they are ``None`` (JSON
``null``): ``neutral.loading_pct`` on a 3-wire system (no neutral);
``voltage.phase_deviation_pct`` without a neutral; ``voltage.motor_derating``
above 5 % unbalance, where NEMA MG 1 does not recommend running motors.

Added keys (beyond the contract)
--------------------------------
``report_version``
    1; bumped if a key changes meaning.
``panel``
    Also ``wiring``, ``v_ll``, ``v_ln`` [V] (``v_ln`` ``None`` on 3-wire),
    ``bus_a``, ``main_a`` (``None``: main lugs only), ``neutral_a`` [A],
    ``rating_a`` (what phase loading is judged against: the main, else the
    bus) [A], ``rating_basis`` (``"main breaker"`` or ``"bus (main lugs
    only)"``), ``spaces``, ``layout``, ``file`` (the schedule's file name, or
    ``None``).
``basis``
    How the figures were made: ``estimate`` (always true), ``currents``
    (the engine's current basis: ``"nominal voltage"`` or the iterated
    panel voltage), ``iterated`` (bool), ``continuous_factor`` [-],
    ``practice`` (``"NEC"`` or ``"IEC"``: whose rules the findings cite,
    from the frequency), ``headroom_pct`` (the design headroom of the
    status words) [%], ``phase_va`` and ``calculated`` (what
    ``phases.*.va`` and ``phases.*.calculated_a`` mean, in words).
``supply``
    The ``[supply]`` table as given (kVA, %, -, m, Ω/km), or ``None``.
``sizing``
    The sizing rule in words: ``per_phase`` (how the VA per phase becomes
    amperes: over V_LN; on a high-leg delta the 2- and 3-pole shares over
    V_LL/√3), ``method`` (``"noncontinuous plus 125 % of
    continuous"``, or ``"no continuous-load factor"``),
    ``clause`` (short name of the rule against the main or bus) and
    ``breaker_clause`` (against each breaker), ``over`` (labels of the
    phases whose ``calculated_a`` is over ``panel.rating_a``),
    ``breakers_rated`` and ``breakers_over`` (circuits with a breaker
    rating, and those whose ``calculated_a`` is over it).
``phases.*``
    Also ``calculated_a`` [A] and ``calculated_pct`` [%]: the code's
    calculated load (``basis.calculated``: noncontinuous plus
    ``basis.continuous_factor`` times continuous, scheduled VA over V_LN),
    the figure the sizing rule judges against ``panel.rating_a``;
    ``status`` (``"OVER"`` above 100 %, ``"NEAR"`` above
    ``basis.headroom_pct``, else ``"ok"``, on ``loading_pct``);
    ``design_a`` [A] and ``design_loading_pct`` [%]: the physical RMS
    current if every continuous circuit drew ``continuous_factor`` times its
    current (phasor sum; not the code's calculation).
``neutral``
    Also ``present`` (false on 3-wire), ``rating_a`` [A] (``None`` on
    3-wire), ``ratio_to_max_phase`` [-] (neutral RMS / largest phase RMS),
    ``calculated_a`` [A] (the neutral load of the code's calculation, NEC
    220.61: the largest scheduled line-to-neutral load on one phase;
    ``None`` on 3-wire), ``status`` (as ``phases.*.status``).
``current_unbalance``
    Also ``zero_sequence_pct`` (``|I0|/|I1|``),
    ``max_deviation_fundamental_pct`` (the deviation on fundamental
    magnitudes) and ``max_minus_min_pct`` (``(max − min) / mean`` of the
    phase RMS currents, as many meters show) [%]. ``max_deviation_pct`` is
    the largest ``|I − mean| / mean`` (NEMA definition).
``voltage``
    Also ``drop_pct`` {phase: %}, ``iterated``, ``iterations``,
    ``converged``, ``transformer_full_load_a`` [A], ``z_phase_ohm`` and
    ``z_neutral_ohm`` {r, x} [Ω].
``readings`` (its shape; the contract leaves it open)
    ``taken`` (free text), ``phases`` {phase: {measured_a, computed_rms_a,
    difference_pct}}, ``neutral`` {measured_a, computed_current_a (the
    fundamental estimate), computed_rms_a, difference_pct}, ``volts_ll``
    {line: V}, ``volts_ln`` {phase: V}, ``vuf_pct`` (from the three measured
    line magnitudes, IEC 61000-4-30 formula), ``line_deviation_pct``,
    ``phase_deviation_pct``, ``motor_derating``, ``computed_vuf_pct`` (the
    supply model's, ``None`` without a supply). ``difference_pct`` is
    ``(measured − computed RMS) / computed RMS`` [%]; anything not measured is
    ``None``.
``harmonics``
    ``orders`` and the magnitude at each order [A] for every phase and the
    neutral (order 1 is the fundamental).
``nonlinear_share_pct``
    Share of the placed connected VA on circuits with a harmonic profile [%].
``nonlinear_ln_share_pct``
    The same for line-to-neutral circuits only (whose harmonics reach the
    neutral; NEC 310.15(E)) [%].
``circuits``
    Every circuit in file order: ``number`` (1-based position in the file),
    ``name``, ``slot`` (first slot, ``None`` on rail boards), ``slots``,
    ``poles``, ``phases`` (label text, ``None`` if unplaced), ``placed``,
    ``load`` {value, unit: VA|W|A} as written, ``va`` (apparent power of the
    whole circuit) [VA], ``w`` [W], ``pf``, ``leading``, ``profile``,
    ``continuous``, ``locked``, ``breaker_a`` [A], ``note``, ``current_a``
    (fundamental line current) [A], ``rms_a`` [A], ``phase_va`` {phase: the
    share of ``va`` the schedule puts on it} [VA], ``calculated_a`` (the
    scheduled line current, times the continuous factor when continuous:
    what NEC 210.20(A) compares with the breaker) [A], ``over_breaker``
    (``calculated_a > breaker_a``; ``None`` without a breaker rating).
``unplaced``
    Names of circuits not on any phase (left out of every figure).
``panel`` (wiring, issue 12)
    Also ``high_leg`` (the high leg's label on a 240/120D high-leg delta,
    else ``None``), ``high_leg_to_neutral_v`` (its voltage to neutral,
    √3/2·V_LL, 207.8 V; ``None`` without a high leg) [V], ``right_column``
    (``"ABC"`` or ``"CBA"``), ``fed_from`` (source marking or ``None``),
    ``max_row_shift`` (rows, or ``None``).
``circuits`` (wiring, issue 12)
    Also ``neutral`` (a 2-/3-pole breaker with a neutral), ``shared_neutral``
    (name or ``None``), ``handle_tied``, ``spare``, ``load.legs`` (the
    per-leg values as written, or ``None``), ``rcd`` (name or
    ``None``), ``on_high_leg`` (a pole on the high leg), ``legs`` (the loads
    the breaker feeds, in pole order: {kind (``line-to-neutral``,
    ``line-to-line``, ``three-phase``), phases, va [VA], current_a, rms_a
    [A]}; one entry for an ordinary circuit, none if unplaced) and
    ``pole_currents`` ({phase: {current_a, current_deg, rms_a}} [A, deg] of a
    breaker with several legs, its legs summed; ``None`` otherwise). For such
    a breaker ``current_a`` and ``rms_a`` are those of its largest pole and
    ``phase_va`` follows its legs.
``shared_neutrals``
    Every neutral shared by several legs: {name (the ``shared_neutral`` name,
    or the breaker's name), shared_neutral, circuits (numbers), slots,
    phases, common_trip (a multi-pole breaker, or every leg
    ``handle_tied``), current_a, current_deg (fundamental), rms_a [A],
    harmonic_a (magnitude at each order of ``harmonics.orders``) [A]}.
``directory``
    ``fed_from``, ``spares`` [{number, slot, name, breaker_a}] (breakers with
    nothing connected) and ``spaces`` (empty slots of a two-column panel).
``rcds``
    RCD groups of a rail board: [{name, poles, phase (``None`` for 4-pole),
    circuits (numbers)}].
``caution``
    The safety caution shown with every report.

Numbers are rounded to 9 significant digits (far finer than any input or
measurement; it keeps the output identical from one machine to the next),
``-0.0`` is written as ``0.0`` and a non-finite number as ``None``.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from tri.engine.limits import DESIGN_HEADROOM_PCT, practice_for
from tri.engine.results import CurrentUnbalance, PanelAnalysis
from tri.report import wiring_data
from tri.report.figure_data import (
    circuit_data,
    line_labels,
    neutral_data,
    phases_data,
    phasor,
    readings_data,
    sizing_data,
    voltage_data,
)
from tri.report.numbers import num
from tri.schedule.model import Schedule
from tri.schedule.slots import TWO_COLUMN

#: Re-exported: renderers and other reports import these here.
__all__ = ["is_two_column", "line_labels", "num", "phasor", "report_data"]

#: Version of the report's key layout (added key ``report_version``).
REPORT_VERSION = 1
CALCULATED_MEANING = (
    "the code's calculated load: scheduled VA per phase (all of each 1-pole circuit, half "
    "of each 2-pole, a third of each 3-pole) with continuous loads at the continuous "
    "factor, over V_LN (on a high-leg delta the 2- and 3-pole shares over V_LL/√3); "
    "harmonics and --iterate do not change it"
)
PHASE_VA_MEANING = (
    "connected apparent power the schedule attributes to the phase: all of each 1-pole "
    "circuit, half of each 2-pole, a third of each 3-pole (schedule bookkeeping, not |I|·V)"
)


def report_data(
    analysis: PanelAnalysis,
    schedule: Schedule,
    *,
    caution: str,
    file: str | Path | None = None,
    headroom_pct: float = DESIGN_HEADROOM_PCT,
) -> dict[str, Any]:
    """The report of one panel as plain data (see the module docstring for every key).

    Parameters
    ----------
    analysis : PanelAnalysis
        The engine's result for ``schedule`` (``analyse_schedule``).
    schedule : Schedule
        The panel it was computed from (circuits in the same order).
    caution : str
        Safety caution to carry with the figures.
    file : str or Path, optional
        The schedule's path; only its file name is kept.
    headroom_pct : float
        Design headroom the status words use [%] (the findings' own setting).

    Returns
    -------
    dict
        JSON-ready: str, int, float, bool, None, lists and dicts only.
    """
    a = analysis
    labels = a.phase_labels
    n = a.neutral
    per_circuit = zip(a.circuit_current_a, a.circuit_rms_a, a.circuit_calculated_a, strict=True)
    circuits = [
        {
            **circuit_data(i + 1, c, schedule, currents),
            **wiring_data.circuit_wiring(i, c, schedule, a),
        }
        for i, (c, currents) in enumerate(zip(schedule.circuits, per_circuit, strict=True))
    ]
    supply = (
        None if schedule.supply is None else {k: num(v) for k, v in vars(schedule.supply).items()}
    )
    return {
        "report_version": REPORT_VERSION,
        "panel": _panel_data(a, schedule, file),
        "basis": _basis_data(a, headroom_pct),
        "supply": supply,
        "sizing": sizing_data(a, schedule, circuits),
        "phase_order": list(labels),
        "phases": phases_data(a, headroom_pct),
        "neutral": neutral_data(a, headroom_pct),
        "sequence": {
            "i0": phasor(a.sequence.i0, "a"),
            "i1": phasor(a.sequence.i1, "a"),
            "i2": phasor(a.sequence.i2, "a"),
        },
        "current_unbalance": _unbalance_data(a.current_unbalance),
        "voltage": voltage_data(a),
        "readings": readings_data(a, schedule),
        "findings": [
            {"level": f.level, "message": f.message, "source": f.source} for f in a.findings
        ],
        "harmonics": {
            "orders": list(a.orders),
            "phases": {ph.label: [num(x) for x in ph.harmonic_a] for ph in a.phases},
            "neutral": [num(x) for x in n.harmonic_a],
        },
        "nonlinear_share_pct": num(a.nonlinear_share_pct),
        "nonlinear_ln_share_pct": num(a.nonlinear_ln_share_pct),
        "circuits": circuits,
        "unplaced": [c["name"] for c in circuits if not c["placed"]],
        "shared_neutrals": wiring_data.shared_neutrals(a, schedule),
        "directory": wiring_data.directory(schedule),
        "rcds": wiring_data.rcds(schedule),
        "caution": caution,
    }


def _panel_data(a: PanelAnalysis, schedule: Schedule, file: str | Path | None) -> dict[str, Any]:
    """The ``panel`` block: name, system, voltages [V], ratings [A], layout, file name."""
    p = schedule.panel
    n = a.neutral
    return {
        "name": p.name,
        "system": p.system,
        "frequency_hz": num(a.frequency_hz),
        "wiring": "3-phase 4-wire" if schedule.system.has_neutral else "3-phase 3-wire",
        "v_ll": num(a.v_ll),
        "v_ln": num(a.v_ln),
        "bus_a": num(p.bus_a),
        "main_a": num(p.main_a),
        "neutral_a": num(n.rating_a),
        "rating_a": num(a.rating_a),
        "rating_basis": "main breaker" if p.main_a is not None else "bus (main lugs only)",
        "spaces": p.spaces,
        "layout": p.layout,
        "file": None if file is None else Path(file).name,
        **wiring_data.panel_wiring(schedule),
    }


def _basis_data(a: PanelAnalysis, headroom_pct: float) -> dict[str, Any]:
    """The ``basis`` block: what the figures are and the settings behind them."""
    return {
        "estimate": True,
        "currents": a.currents_basis,
        "iterated": a.voltage is not None and a.voltage.iterated,
        "continuous_factor": num(a.continuous_factor),
        "practice": practice_for(a.frequency_hz),
        "headroom_pct": num(headroom_pct),
        "phase_va": PHASE_VA_MEANING,
        "calculated": CALCULATED_MEANING,
    }


def _unbalance_data(cu: CurrentUnbalance) -> dict[str, Any]:
    """The ``current_unbalance`` block [%]."""
    return {
        "negative_sequence_pct": num(cu.negative_sequence_pct),
        "max_deviation_pct": num(cu.max_deviation_pct),
        "zero_sequence_pct": num(cu.zero_sequence_pct),
        "max_deviation_fundamental_pct": num(cu.max_deviation_fundamental_pct),
        "max_minus_min_pct": num(cu.max_minus_min_pct),
    }


def is_two_column(data: dict[str, Any]) -> bool:
    """True when the panel's circuits sit in numbered slots (two-column layout)."""
    return data["panel"]["layout"] == TWO_COLUMN
