"""Degenerate and bad input: sensible numbers, no division by zero, no warnings.

Each test runs with numpy floating-point errors raised and Python warnings
turned into errors, so a silent 0/0 would fail it.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest

from tri.engine import analyse, analyse_batch
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    UNPLACED,
    CircuitArrays,
    MeasuredReadings,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)

SYS = SystemVoltages(v_ll=208.0, v_ln=120.0)
DELTA = SystemVoltages(v_ll=480.0, v_ln=None)
RATINGS = Ratings(bus_a=100.0)
SUPPLY = SupplyImpedance(transformer_kva=45.0, transformer_z_pct=4.0, transformer_x_r=2.0)


@pytest.fixture(autouse=True)
def strict():
    with warnings.catch_warnings(), np.errstate(all="raise"):
        warnings.simplefilter("error")
        yield


def arrays(s, conn, p, q=None, h=0) -> CircuitArrays:
    n = len(s)
    return CircuitArrays(
        s_va=np.asarray(s, dtype=complex),
        connection=np.asarray(conn, dtype=int),
        phase_p=np.asarray(p, dtype=int),
        phase_q=np.asarray(p if q is None else q, dtype=int),
        harmonics=np.full((n, h), 0.5, dtype=complex),
        orders=np.arange(3, 3 + h, dtype=int),
    )


def all_finite(a) -> None:
    """Every float in the analysis is finite (None allowed)."""
    for ph in a.phases:
        for x in (ph.va, ph.current.magnitude, ph.current.deg, ph.rms_a, ph.thd_pct):
            assert math.isfinite(x)
        assert math.isfinite(ph.loading_pct) and math.isfinite(ph.design_loading_pct)
    n = a.neutral
    assert math.isfinite(n.rms_a) and math.isfinite(n.ratio_to_max_phase)
    cu = a.current_unbalance
    for x in (cu.negative_sequence_pct, cu.zero_sequence_pct, cu.max_deviation_pct):
        assert math.isfinite(x)
    for s in (a.sequence.i0, a.sequence.i1, a.sequence.i2):
        assert math.isfinite(s.magnitude) and math.isfinite(s.deg)
    if a.voltage is not None:
        assert math.isfinite(a.voltage.vuf_pct) and math.isfinite(a.voltage.line_deviation_pct)


def test_empty_panel():
    """No circuits at all: everything zero, no findings beyond none."""
    a = analyse(arrays([], [], []), SYS, RATINGS, SUPPLY)
    all_finite(a)
    assert [p.rms_a for p in a.phases] == [0.0, 0.0, 0.0]
    assert a.current_unbalance.negative_sequence_pct == 0.0
    # no current, no drop: V = E, a balanced set whose V2 is round-off of 208 V phasors
    # (~1e-14 %); 1e-12 % is that round-off with margin
    assert a.voltage.vuf_pct == pytest.approx(0.0, abs=1e-12)
    # no unbalance, no derating: the NEMA MG 1 curve is flat at 1.00 up to 1 % [published]
    assert a.voltage.motor_derating == 1.0
    assert a.findings == ()
    assert a.circuit_current_a == ()


def test_zero_loads():
    """Circuits placed but all at 0 VA, with harmonic profiles: zeros, THD 0."""
    a = analyse(arrays([0, 0, 0], [1, 2, 3], [0, 1, 0], [0, 2, 0], h=3), SYS, RATINGS, SUPPLY)
    all_finite(a)
    assert all(p.thd_pct == 0.0 for p in a.phases)
    assert a.neutral.rms_a == 0.0 and a.neutral.ratio_to_max_phase == 0.0


def test_all_on_one_phase():
    """All load on phase A: I0 = I1 = I2 = I_A/3, unbalance 100 %, deviation 200 % [computed].

    Mean of (I, 0, 0) is I/3; deviation of A is 2I/3, i.e. 200 % of the mean.
    I = 3600 VA / 120 V. Tolerances pytest's default 1e-6 relative: the values are
    exact up to round-off.
    """
    a = analyse(arrays([1200, 2400], [1, 1], [0, 0], h=1), SYS, RATINGS, SUPPLY)
    all_finite(a)
    i = 3600 / 120
    for s in (a.sequence.i0, a.sequence.i1, a.sequence.i2):
        assert s.magnitude == pytest.approx(i / 3)
    assert a.current_unbalance.negative_sequence_pct == pytest.approx(100.0)
    assert a.current_unbalance.max_deviation_fundamental_pct == pytest.approx(200.0)
    assert a.phases[1].thd_pct == 0.0 and a.phases[1].rms_a == 0.0
    assert a.neutral.current_a == pytest.approx(i)


def test_three_wire_system():
    """480 V delta: 2- and 3-pole loads only; neutral absent; phase deviation None."""
    c = arrays([10e3, 5e3], [LINE_TO_LINE, THREE_PHASE], [0, 0], [1, 0], h=2)
    a = analyse(c, DELTA, RATINGS, SUPPLY, MeasuredReadings(neutral_amps=3.0))
    all_finite(a)
    assert a.v_ln is None
    assert not a.neutral.present and a.neutral.loading_pct is None and a.neutral.rating_a is None
    assert a.neutral.rms_a == 0.0
    assert a.voltage.phase_deviation_pct is None
    assert a.voltage.z_neutral_ohm == 0
    # V_LN = 480/√3 for the phasors: a 3-pole 5 kVA draws 5000/(√3·480) per line
    # [computed]; 1e-12 relative (round-off)
    assert a.circuit_current_a[1] == pytest.approx(5e3 / (math.sqrt(3) * 480), rel=1e-12)


def test_three_wire_refuses_line_to_neutral():
    """A line-to-neutral circuit on a 3-wire system is an input error, said clearly."""
    with pytest.raises(ValueError, match="3-wire"):
        analyse(arrays([100], [LINE_TO_NEUTRAL], [0]), DELTA, RATINGS)


def test_unplaced_rows_contribute_nothing():
    """New circuits not yet placed are left out and counted (padding rows, S = 0, are not)."""
    c = arrays([1000, 5000, 0], [LINE_TO_NEUTRAL, UNPLACED, UNPLACED], [0, 0, 0])
    a = analyse(c, SYS, RATINGS)
    assert a.phases[0].rms_a == pytest.approx(1000 / 120, rel=1e-12)  # [computed], round-off
    assert a.unplaced_count == 1
    assert a.circuit_current_a[1] == 0.0
    assert any("not placed" in f.message for f in a.findings)


def test_no_supply_no_readings():
    a = analyse(arrays([1000], [1], [0]), SYS, RATINGS)
    assert a.voltage is None and a.readings is None


def test_iterate_without_supply_is_harmless():
    a = analyse(arrays([1000], [1], [0]), SYS, RATINGS, iterate_voltage=True)
    assert a.voltage is None and a.currents_basis == "nominal voltage"
    assert any("no supply" in f.message for f in a.findings)


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"conn": [7]}, "connection code"),
        ({"p": [3]}, "phase_p"),
        ({"conn": [LINE_TO_LINE], "q": [0]}, "two different phases"),
        ({"s": [complex("nan")]}, "finite"),
    ],
)
def test_bad_arrays_raise(kwargs, match):
    base = {"s": [100], "conn": [LINE_TO_NEUTRAL], "p": [0], "q": None}
    base.update(kwargs)
    with pytest.raises(ValueError, match=match):
        analyse(arrays(base["s"], base["conn"], base["p"], base["q"]), SYS, RATINGS)


def test_bad_ratings_and_batch_misuse():
    with pytest.raises(ValueError, match="bus_a"):
        analyse(arrays([100], [1], [0]), SYS, Ratings(bus_a=0.0))
    c = arrays([100], [1], [0])
    batch = CircuitArrays(
        s_va=c.s_va[None],
        connection=c.connection[None],
        phase_p=c.phase_p[None],
        phase_q=c.phase_q[None],
        harmonics=c.harmonics[None],
        orders=c.orders,
    )
    with pytest.raises(ValueError, match="analyse_batch"):
        analyse(batch, SYS, RATINGS)
    assert analyse_batch(batch, SYS, RATINGS).batch_shape == (1,)


def test_collapsed_voltage_gives_zero_current_not_inf():
    """An element voltage of 0 (e.g. a collapsed iteration) yields 0 A, not a division error."""
    from tri.engine.phasors import element_currents

    c = arrays([100, 100, 100], [LINE_TO_NEUTRAL, LINE_TO_LINE, THREE_PHASE], [0, 0, 0], [0, 1, 0])
    i = element_currents(c, np.zeros(3, dtype=complex))
    assert np.all(i == 0)
