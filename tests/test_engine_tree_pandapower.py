"""The tree against an independent three-phase unbalanced power flow (pandapower).

pandapower (a general-purpose power-system analysis library from the package
index, a test dependency only) solves the same small networks with its
three-phase unbalanced Newton-Raphson power flow (``runpp_3ph``): a stiff
source, a feeder line, a transformer, and constant-power wye loads. The
tree is solved with ``iterate_voltage=True`` (constant power at the panel
voltage), the same load model.

Modelling that is made to match on purpose: pandapower's 208 V bus has
``V_LN = 208/√3``, so the tree's 208 V panels are given that nominal
voltage here; the magnetising branch is left out (``i0_percent = 0``,
``pfe_kw = 0``, a zero-sequence magnetising impedance 10⁷ times the leakage one); the
line's capacitance is zero; the source is a 10⁶ MVA grid (its impedance
shifts voltages by ~1e-7 pu). pandapower reports angles in its own absolute
frame: a Dyn secondary with ``shift_degree = 30`` lags by 30°, and the
tree's child frame is turned back by that to compare.

Tolerance: 1e-5 relative on voltages and currents, far above the grid
impedance (~1e-7) and pandapower's default convergence (1e-8 MVA), far
below any modelling difference worth a test.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
from tree_support import arrays

from tri.engine.inputs import LINE_TO_NEUTRAL, Ratings, SystemVoltages
from tri.engine.transformer import TransformerLink, parse_vector_group
from tri.engine.tree_inputs import FeederImpedance, PanelLink, TreeInputs, TreeNode
from tri.engine.tree_results import analyse_tree

RTOL = 1e-5
KVA, Z_PCT, X_R = 45.0, 3.5, 2.0
#: unbalanced wye loads on the child, per phase (P [W], Q [var])
LOADS = ((12_000.0, 3_000.0), (4_000.0, 1_000.0), (8_000.0, -2_000.0))
#: feeder: 60 m, phase 0.25 + j0.09 ohm/km, neutral 0.30 + j0.10 ohm/km
FEEDER = FeederImpedance(60.0, 0.25, 0.09, 0.30, 0.10)

SYS_480 = SystemVoltages(480.0, 480.0 / math.sqrt(3.0))
SYS_208 = SystemVoltages(208.0, 208.0 / math.sqrt(3.0))


@pytest.fixture(scope="module")
def pp():
    """pandapower, imported by the tests that use it (about 2 s, so not at collection)."""
    return pytest.importorskip("pandapower")


def pandapower_net(pp, group: str | None, shift: float):
    """Grid — line — (transformer) — loaded bus, as pandapower sees it."""
    runpp_3ph = pytest.importorskip("pandapower.pf.runpp_3ph").runpp_3ph
    net = pp.create_empty_network(sn_mva=1.0)
    hv = 0.48 if group else 0.208
    b0 = pp.create_bus(net, vn_kv=hv)
    b1 = pp.create_bus(net, vn_kv=hv)
    pp.create_ext_grid(net, b0, s_sc_max_mva=1e6, rx_max=0.1, x0x_max=1.0, r0x0_max=0.1)
    f = FEEDER
    pp.create_line_from_parameters(
        net,
        b0,
        b1,
        length_km=f.length_m / 1000.0,
        r_ohm_per_km=f.r_ohm_per_km,
        x_ohm_per_km=f.x_ohm_per_km,
        c_nf_per_km=0.0,
        max_i_ka=1.0,
        # zero sequence of a line with a neutral return: Z0 = Z + 3·Z_N
        r0_ohm_per_km=f.r_ohm_per_km + 3 * f.neutral_r_ohm_per_km,
        x0_ohm_per_km=f.x_ohm_per_km + 3 * f.neutral_x_ohm_per_km,
        c0_nf_per_km=0.0,
    )
    load_bus = b1
    if group:
        load_bus = pp.create_bus(net, vn_kv=0.208)
        r = Z_PCT / math.sqrt(1 + X_R**2)
        pp.create_transformer_from_parameters(
            net,
            b1,
            load_bus,
            sn_mva=KVA / 1000.0,
            vn_hv_kv=0.48,
            vn_lv_kv=0.208,
            vkr_percent=r,
            vk_percent=Z_PCT,
            pfe_kw=0.0,
            i0_percent=0.0,
            shift_degree=shift,
            vector_group=group,
            vk0_percent=Z_PCT,
            vkr0_percent=r,
            mag0_percent=1e9,
            mag0_rx=0.0,
            si0_hv_partial=0.5,
        )
    (pa, qa), (pb, qb), (pc, qc) = LOADS
    pp.create_asymmetric_load(
        net,
        load_bus,
        p_a_mw=pa / 1e6,
        q_a_mvar=qa / 1e6,
        p_b_mw=pb / 1e6,
        q_b_mvar=qb / 1e6,
        p_c_mw=pc / 1e6,
        q_c_mvar=qc / 1e6,
        type="wye",
    )
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        runpp_3ph(net, numba=False)
    return net, load_bus


def tri_tree(group: str | None) -> TreeInputs:
    child = arrays([(complex(p, q), LINE_TO_NEUTRAL, k, k) for k, (p, q) in enumerate(LOADS)])
    parent = arrays([(0, 3, 0, 0)])
    big = Ratings(2000.0)
    tx = None if group is None else TransformerLink(KVA, Z_PCT, X_R, parse_vector_group(group))
    parent_sys = SYS_480 if group else SYS_208
    return TreeInputs(
        (
            TreeNode(parent, parent_sys, big),
            TreeNode(child, SYS_208, big, PanelLink(0, 0, FEEDER, tx)),
        )
    )


@pytest.mark.parametrize(
    ("group", "shift"),
    [(None, 0.0), ("Dyn", 30.0), ("YNyn", 0.0)],
)
def test_child_voltages_and_feeder_currents_agree(pp, group, shift):
    net, load_bus = pandapower_net(pp, group, shift)
    tri_group = {None: None, "Dyn": "Dyn1", "YNyn": "YNyn0"}[group]
    result = analyse_tree(tri_tree(tri_group), iterate_voltage=True, tol=1e-12)
    assert result.solution.converged
    child = result.nodes[1]
    v_ln = 208.0 / math.sqrt(3.0)
    res = net.res_bus_3ph.loc[load_bus]
    turn = np.exp(-1j * math.radians(shift))  # child frame -> pandapower's absolute frame
    for k, ph in enumerate("abc"):
        want = res[f"vm_{ph}_pu"] * v_ln * np.exp(1j * math.radians(res[f"va_{ph}_degree"]))
        got = child.analysis.voltage.phase_v[k].complex * turn
        assert abs(got - want) <= RTOL * v_ln, (ph, got, want)
    # the feeder's line currents at the parent (pandapower: the line's from-end)
    line = net.res_line_3ph.loc[0]
    for k, ph in enumerate("abc"):
        assert child.feeder.rms_a[k] == pytest.approx(
            1000.0 * line[f"i_{ph}_from_ka"], rel=RTOL, abs=1e-9
        )
    # and the neutral of the feeder: pandapower's i_n is the line's neutral current
    if "i_n_from_ka" in line:
        assert child.feeder.neutral_rms_a == pytest.approx(
            1000.0 * line["i_n_from_ka"], rel=RTOL, abs=1e-6
        )
