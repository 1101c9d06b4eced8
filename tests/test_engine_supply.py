"""Supply impedance and panel voltages.

Tags as in shared/spec/check-values.md.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tri.engine import analyse, analyse_batch
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    CircuitArrays,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)
from tri.engine.phasors import element_currents, line_voltages
from tri.engine.supply import (
    effective_z_ohm,
    solve_voltages,
    supply_impedances,
    transformer_impedance,
)
from tri.engine.unbalance import vuf_from_line_magnitudes

SYS = SystemVoltages(v_ll=208.0, v_ln=120.0)
SUPPLY = SupplyImpedance(
    transformer_kva=75.0,
    transformer_z_pct=5.0,
    transformer_x_r=2.0,
    feeder_length_m=30.0,
    feeder_r_ohm_per_km=0.2,
    feeder_x_ohm_per_km=0.08,
    neutral_r_ohm_per_km=0.2,
    neutral_x_ohm_per_km=0.08,
)


def unbalanced_panel() -> CircuitArrays:
    """Unbalanced lagging loads: 1-pole on A, A, B and a 2-pole on B-C."""
    s = np.array([9000 * (0.9 + 0.436j), 6000, 4000 * (0.8 + 0.6j), 8000 * (0.85 + 0.527j)])
    return CircuitArrays(
        s_va=s,
        connection=np.array([LINE_TO_NEUTRAL, LINE_TO_NEUTRAL, LINE_TO_NEUTRAL, LINE_TO_LINE]),
        phase_p=np.array([0, 0, 1, 1]),
        phase_q=np.array([0, 0, 1, 2]),
        harmonics=np.zeros((4, 0), dtype=complex),
        orders=np.zeros(0, dtype=int),
    )


def test_transformer_percent_impedance_example():
    """75 kVA, 208 V, 5 %, X/R 2 [computed]: Z_base = 0.5769 Ω, Z = 0.02884 Ω,
    R = 0.01290 Ω, X = 0.02580 Ω, full load 208.2 A.

    Recomputed: Z_base = 208²/75 000; Z = 0.05·Z_base; R = Z/√(1+2²); X = 2R;
    I_FL = 75 000/(√3·208). Recomputed values to 1e-12 relative (round-off);
    printed to 4 significant digits: tolerance half a unit there.
    """
    t = transformer_impedance(75.0, 5.0, 2.0, 208.0)
    z_base = 208.0**2 / 75e3
    z = 0.05 * z_base
    r = z / math.sqrt(1 + 2.0**2)
    assert t.z_base_ohm == pytest.approx(z_base, rel=1e-12)
    assert abs(t.z_ohm) == pytest.approx(z, rel=1e-12)
    assert t.r_ohm == pytest.approx(r, rel=1e-12)
    assert t.x_ohm == pytest.approx(2 * r, rel=1e-12)
    assert t.full_load_a == pytest.approx(75e3 / (math.sqrt(3) * 208.0), rel=1e-12)
    assert t.z_base_ohm == pytest.approx(0.5769, abs=5e-5)
    assert abs(t.z_ohm) == pytest.approx(0.02884, abs=5e-6)
    assert t.r_ohm == pytest.approx(0.01290, abs=5e-6)
    assert t.x_ohm == pytest.approx(0.02580, abs=5e-6)
    assert t.x_ohm / t.r_ohm == pytest.approx(2.0, rel=1e-12)
    assert t.full_load_a == pytest.approx(208.2, abs=0.05)


def test_transformer_rejects_zero_kva():
    with pytest.raises(ValueError, match="transformer_kva"):
        transformer_impedance(0.0, 5.0, 2.0, 208.0)


@pytest.mark.parametrize(
    ("r", "x", "expect", "tol"),
    [
        # NEC Chapter 9 Table 9, Cu in PVC, Ω/1000 ft [published]; effective Z at PF 0.85
        (2.0, 0.054, 1.7, 0.05),  # 12 AWG: table prints 1.7 (2 significant digits)
        (0.052, 0.041, 0.066, 5e-4),  # 250 kcmil: table prints 0.066
    ],
)
def test_effective_z_nec_table_9(r, x, expect, tol):
    # R and X [published]; the table's effective Z is R·cos θ + X·sin θ (check-values.md),
    # recomputed here (1e-12 relative, round-off): 1.728 for 12 AWG, 0.0658 for 250 kcmil
    z = r * 0.85 + x * math.sin(math.acos(0.85))
    assert float(effective_z_ohm(r, x, 0.85)) == pytest.approx(z, rel=1e-12)
    assert float(effective_z_ohm(r, x, 0.85)) == pytest.approx(expect, abs=tol)


def test_panel_voltage_formula_by_hand():
    """V_p' = E_p − Z_phase·I_p − Z_N·I_N (engine.md), currents at nominal [computed].

    Hand route: element currents at nominal voltage, summed per line in plain
    Python; impedances from the transformer formula plus feeder r·L. Tolerance
    1e-9 V: round-off only.
    """
    c = unbalanced_panel()
    a = analyse(c, SYS, Ratings(bus_a=225.0), SUPPLY)
    e = 120.0 * np.exp(1j * np.deg2rad([0.0, -120.0, 120.0]))
    i_e = element_currents(c, e)
    i_line = [i_e[0] + i_e[1], i_e[2] + i_e[3], -i_e[3]]
    i_n = i_e[0] + i_e[1] + i_e[2]
    zt = transformer_impedance(75.0, 5.0, 2.0, 208.0).z_ohm
    z_ph = zt + complex(0.2, 0.08) * 0.030
    z_n = complex(0.2, 0.08) * 0.030
    assert supply_impedances(SUPPLY, SYS) == pytest.approx((z_ph, z_n), rel=1e-12)
    for k in range(3):
        expect = e[k] - z_ph * i_line[k] - z_n * i_n
        assert a.voltage.phase_v[k].complex == pytest.approx(expect, abs=1e-9)
    assert a.voltage.iterations == 0 and not a.voltage.iterated
    assert a.currents_basis == "nominal voltage"
    # drop: |E| − |V'| over |E| [computed]; 1e-12 relative (one subtraction of
    # numbers ~120 V apart by a few volts: round-off ~1e-14 relative)
    assert a.voltage.drop_pct[0] == pytest.approx(
        100 * (120 - a.voltage.phase_v[0].magnitude) / 120, rel=1e-12
    )


def test_vuf_two_routes_agree():
    """VUF from the computed line phasors == β formula on their magnitudes (engine.md).

    Tolerance 1e-9 %: both are exact for the fundamental (IEC 61000-4-30).
    """
    a = analyse(unbalanced_panel(), SYS, Ratings(bus_a=225.0), SUPPLY)
    mags = [p.magnitude for p in a.voltage.line_v]
    assert a.voltage.vuf_pct > 0.1
    assert float(vuf_from_line_magnitudes(*mags)) == pytest.approx(a.voltage.vuf_pct, abs=1e-9)


def test_iteration_reaches_a_fixed_point():
    """Iterated constant power: at the solution each load draws its S at the panel voltage.

    The converged voltages must reproduce themselves, V = E − Z_ph·I(V) − Z_N·I_N(V)
    (engine.md), recomputed here by hand: the iteration stops when a step moves
    no voltage by more than tol·V_LN = 1e-12·120 V, and each step contracts by
    about the per-unit drop (a few %), so the residual is below that; 1e-9 V
    leaves margin for round-off of ~120 V phasors. The loads' complex power at
    those voltages equals the schedule's S by construction (I = conj(S/V)), so
    that identity holds to round-off (1e-12 relative).
    """
    c = unbalanced_panel()
    sol = solve_voltages(c, SYS, SUPPLY, iterate=True, tol=1e-12)
    assert bool(sol.converged) and 1 <= int(sol.iterations) < 50
    v = sol.v_phase
    i_e = element_currents(c, v)
    v_el = np.array([v[0], v[0], v[1], v[1] - v[2]])
    np.testing.assert_allclose(v_el * np.conj(i_e), c.s_va, rtol=1e-12)
    # fixed point by hand: line currents and neutral from the element currents at V
    e = 120.0 * np.exp(1j * np.deg2rad([0.0, -120.0, 120.0]))
    i_line = [i_e[0] + i_e[1], i_e[2] + i_e[3], -i_e[3]]
    i_n = i_e[0] + i_e[1] + i_e[2]
    z_ph, z_n = supply_impedances(SUPPLY, SYS)
    for k in range(3):
        assert v[k] == pytest.approx(e[k] - z_ph * i_line[k] - z_n * i_n, abs=1e-9)
    a = analyse(c, SYS, Ratings(bus_a=225.0), SUPPLY, iterate_voltage=True)
    assert a.currents_basis.startswith("panel voltage")
    assert a.voltage.iterated and a.voltage.converged
    # a lower panel voltage means more current for the same power
    nominal = analyse(c, SYS, Ratings(bus_a=225.0), SUPPLY)
    assert a.phases[0].current_a > nominal.phases[0].current_a


def test_iteration_reports_non_convergence():
    """A supply far too weak for the load: the iteration stops at its limit and says so."""
    weak = SupplyImpedance(transformer_kva=1.0, transformer_z_pct=30.0, transformer_x_r=1.0)
    a = analyse(unbalanced_panel(), SYS, Ratings(bus_a=225.0), weak, iterate_voltage=True)
    assert a.voltage is not None
    # 1 kVA at 30 %: Z = 0.30·208²/1000 = 13 Ω per phase [computed] against ~25 kVA
    # of load; the fixed point does not exist (the load exceeds the maximum power
    # transfer). 100 is the engine's iteration limit (solve_voltages max_iter).
    assert not a.voltage.converged and a.voltage.iterations == 100
    assert any("did not converge" in f.message and f.level == "warning" for f in a.findings)
    assert all(np.isfinite(p.magnitude) for p in a.voltage.phase_v)


def test_batch_iteration_equals_single():
    """Batched iteration: each panel's voltages and iteration count equal its own run."""
    c = unbalanced_panel()
    scale = np.array([[1.0], [0.2], [2.0]])
    batch = CircuitArrays(
        s_va=c.s_va * scale,
        connection=np.tile(c.connection, (3, 1)),
        phase_p=np.tile(c.phase_p, (3, 1)),
        phase_q=np.tile(c.phase_q, (3, 1)),
        harmonics=np.zeros((3, 4, 0), dtype=complex),
        orders=c.orders,
    )
    b = analyse_batch(batch, SYS, Ratings(bus_a=225.0), SUPPLY, iterate_voltage=True)
    for k in range(3):
        one = CircuitArrays(
            s_va=batch.s_va[k],
            connection=c.connection,
            phase_p=c.phase_p,
            phase_q=c.phase_q,
            harmonics=c.harmonics,
            orders=c.orders,
        )
        s = analyse_batch(one, SYS, Ratings(bus_a=225.0), SUPPLY, iterate_voltage=True)
        # 1e-13: the same arithmetic per panel; batched and single runs may only
        # sum in another order (an ulp or two per step over a few iterations)
        np.testing.assert_allclose(b.v_phase[k], s.v_phase, rtol=1e-13)
        assert int(b.iterations[k]) == int(s.iterations)


def test_line_voltages_lead_by_30():
    """Balanced set: V_AB = √3·V_A∠30° (engine.md) [computed]; 1e-12 relative (round-off)."""
    e = 120.0 * np.exp(1j * np.deg2rad([0.0, -120.0, 120.0]))
    vl = line_voltages(e)
    assert vl[0] == pytest.approx(math.sqrt(3) * 120 * np.exp(1j * math.radians(30)), rel=1e-12)
