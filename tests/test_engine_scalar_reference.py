"""A plain scalar per-circuit implementation the vectorised engine must equal.

The reference below is written straight from shared/spec/engine.md with
``cmath`` and Python loops, one circuit and one order at a time; it shares no
code with ``tri.engine`` (second opinion). Hypothesis draws random panels and
the engine must agree with it, and a batch of panels must agree with the
panels analysed one at a time.

Rows may also carry a breaker number and a shared-neutral group (issue 12):
the reference adds each row's line currents into its breaker's poles and
its line-to-neutral current into its group's neutral, order by order. On a
high-leg delta the phase voltages are written out by hand (120∠0°,
207.85∠−90°, 120∠180°) and a 3-pole load draws a balanced set at the
wye-equivalent of the line voltages, ``V_k − V_0`` (a 3-wire load sees only
line voltages; on a wye ``V_0 = 0``).
"""

from __future__ import annotations

import cmath
import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from tri.engine import analyse, analyse_batch
from tri.engine.inputs import (
    LINE_TO_LINE,
    LINE_TO_NEUTRAL,
    THREE_PHASE,
    UNPLACED,
    CircuitArrays,
    Ratings,
    SupplyImpedance,
    SystemVoltages,
)

ORDERS = [2, 3, 5, 7, 9, 15]
SYS = SystemVoltages(v_ll=480.0, v_ln=277.0)
RATINGS = Ratings(bus_a=400.0, main_a=300.0, neutral_a=400.0, continuous_factor=1.25)
SUPPLY = SupplyImpedance(
    transformer_kva=150.0,
    transformer_z_pct=4.5,
    transformer_x_r=2.5,
    feeder_length_m=40.0,
    feeder_r_ohm_per_km=0.1,
    feeder_x_ohm_per_km=0.08,
    neutral_r_ohm_per_km=0.1,
    neutral_x_ohm_per_km=0.08,
)
ANGLES = (0.0, -120.0, 120.0)


# --------------------------------------------------------------------------
# scalar reference (engine.md, literally)
# --------------------------------------------------------------------------
def ref_panel(
    circuits: list[dict], v_ln: float, orders: list[int], zp=None, zn=None, v=None
) -> dict:
    """Everything for one panel, one circuit and one order at a time."""
    all_orders = [1, *orders]
    if v is None:
        v = [cmath.rect(v_ln, math.radians(a)) for a in ANGLES]
    v0 = sum(v) / 3
    n_b = 1 + max([c.get("b", 0) for c in circuits], default=-1)
    n_g = 1 + max([c.get("g", -1) for c in circuits], default=-1)
    poles = [[[0j] * len(all_orders) for _ in range(3)] for _ in range(n_b)]
    groups = [[0j] * len(all_orders) for _ in range(n_g)]
    lines = [[0j] * len(all_orders) for _ in range(3)]
    design = [[0j] * len(all_orders) for _ in range(3)]
    neutral = [0j] * len(all_orders)
    va = [0.0, 0.0, 0.0]
    circ_fund, circ_rms = [], []
    for c in circuits:
        s, conn, p, q, harm, w = c["s"], c["conn"], c["p"], c["q"], c["harm"], c["w"]
        rel = [1 + 0j, *harm]  # order 1 has m = 1, δ = 0

        def at(i: complex, k: int, rel=rel) -> complex:
            h = all_orders[k]
            return rel[k] * abs(i) * cmath.exp(1j * h * cmath.phase(i)) if i != 0 else 0j

        if conn == UNPLACED:
            circ_fund.append(0.0)
            circ_rms.append(0.0)
            continue
        pole = poles[c.get("b", 0)]
        if conn == LINE_TO_NEUTRAL:
            i = (s / v[p]).conjugate()
            va[p] += abs(s)
            for k in range(len(all_orders)):
                lines[p][k] += at(i, k)
                design[p][k] += w * at(i, k)
                neutral[k] += at(i, k)
                pole[p][k] += at(i, k)
                if c.get("g", -1) >= 0:
                    groups[c["g"]][k] += at(i, k)
            circ_fund.append(abs(i))
            circ_rms.append(math.sqrt(sum(abs(at(i, k)) ** 2 for k in range(len(all_orders)))))
        elif conn == LINE_TO_LINE:
            i = (s / (v[p] - v[q])).conjugate()
            va[p] += abs(s) / 2
            va[q] += abs(s) / 2
            for k in range(len(all_orders)):
                lines[p][k] += at(i, k)
                lines[q][k] -= at(i, k)
                pole[p][k] += at(i, k)
                pole[q][k] -= at(i, k)
                design[p][k] += w * at(i, k)
                design[q][k] -= w * at(i, k)
            circ_fund.append(abs(i))
            circ_rms.append(math.sqrt(sum(abs(at(i, k)) ** 2 for k in range(len(all_orders)))))
        else:  # THREE_PHASE: each line conj((S/3)/(V_k − V_0)); zero sequence removed
            per_line = [(s / 3 / (v[m] - v0)).conjugate() for m in range(3)]
            sq = 0.0
            for k in range(len(all_orders)):
                e = [at(per_line[m], k) for m in range(3)]
                zero = sum(e) / 3
                for m in range(3):
                    lines[m][k] += e[m] - zero
                    pole[m][k] += e[m] - zero
                    design[m][k] += w * (e[m] - zero)
                sq += abs(e[0] - zero) ** 2
            for m in range(3):
                va[m] += abs(s) / 3
            circ_fund.append(abs(per_line[0]))
            circ_rms.append(math.sqrt(sq))
    a = cmath.rect(1, 2 * math.pi / 3)
    ia, ib, ic = (lines[m][0] for m in range(3))
    seq = [(ia + ib + ic) / 3, (ia + a * ib + a * a * ic) / 3, (ia + a * a * ib + a * ic) / 3]
    rms = [math.sqrt(sum(abs(x) ** 2 for x in lines[m])) for m in range(3)]
    out = {
        "lines": lines,
        "neutral": neutral,
        "va": va,
        "rms": rms,
        "design": [math.sqrt(sum(abs(x) ** 2 for x in design[m])) for m in range(3)],
        "thd": [
            100 * math.sqrt(sum(abs(x) ** 2 for x in lines[m][1:])) / abs(lines[m][0])
            if abs(lines[m][0]) > 0
            else 0.0
            for m in range(3)
        ],
        "neutral_rms": math.sqrt(sum(abs(x) ** 2 for x in neutral)),
        "seq": seq,
        "circ_fund": circ_fund,
        "circ_rms": circ_rms,
        "poles": poles,
        "groups": groups,
    }
    mean = sum(rms) / 3
    out["dev"] = 100 * max(abs(r - mean) for r in rms) / mean if mean > 0 else 0.0
    if zp is not None:
        i_n = sum(
            (c["s"] / v[c["p"]]).conjugate() for c in circuits if c["conn"] == LINE_TO_NEUTRAL
        )
        vp = [v[m] - zp * lines[m][0] - zn * i_n for m in range(3)]
        vl = [vp[0] - vp[1], vp[1] - vp[2], vp[2] - vp[0]]
        v1 = (vl[0] + a * vl[1] + a * a * vl[2]) / 3
        v2 = (vl[0] + a * a * vl[1] + a * vl[2]) / 3
        out["v_phase"] = vp
        out["vuf"] = 100 * abs(v2) / abs(v1)
    return out


# --------------------------------------------------------------------------
# random panels
# --------------------------------------------------------------------------
@st.composite
def circuit(draw, with_neutral: bool = True) -> dict:
    conns = [UNPLACED, LINE_TO_LINE, THREE_PHASE] + ([LINE_TO_NEUTRAL] if with_neutral else [])
    conn = draw(st.sampled_from(conns))
    p = draw(st.integers(0, 2))
    q = (p + draw(st.integers(1, 2))) % 3 if conn == LINE_TO_LINE else p
    kva = draw(st.floats(0.0, 20.0))
    pf = draw(st.floats(0.3, 1.0))
    sign = draw(st.sampled_from([1.0, -1.0]))  # lagging / leading
    s = 1000 * kva * complex(pf, sign * math.sqrt(1 - pf * pf))
    mags = draw(st.lists(st.floats(0.0, 1.0), min_size=len(ORDERS), max_size=len(ORDERS)))
    angs = draw(st.lists(st.floats(-180, 180), min_size=len(ORDERS), max_size=len(ORDERS)))
    zero = draw(st.booleans())  # many real circuits are linear
    harm = [0j if zero else cmath.rect(m, math.radians(d)) for m, d in zip(mags, angs, strict=True)]
    cont = draw(st.booleans())
    b = draw(st.integers(0, 3))  # rows sharing a breaker number are its legs
    g = draw(st.integers(-1, 2))  # shared neutral (only line-to-neutral rows count)
    return {
        "s": s,
        "conn": conn,
        "p": p,
        "q": q,
        "harm": harm,
        "cont": cont,
        "w": 1.0,
        "b": b,
        "g": g,
    }


def to_arrays(circuits: list[dict], n: int | None = None, wiring: bool = False) -> CircuitArrays:
    """Engine arrays, padded to n rows with UNPLACED zero rows (breaker 0, no group)."""
    n = len(circuits) if n is None else n
    pad = n - len(circuits)
    extra = {}
    if wiring:
        extra = {
            "breaker": np.array([c["b"] for c in circuits] + [0] * pad, dtype=int),
            "neutral_group": np.array([c["g"] for c in circuits] + [-1] * pad, dtype=int),
        }
    return CircuitArrays(
        s_va=np.array([c["s"] for c in circuits] + [0j] * pad, dtype=complex),
        connection=np.array([c["conn"] for c in circuits] + [UNPLACED] * pad, dtype=int),
        phase_p=np.array([c["p"] for c in circuits] + [0] * pad, dtype=int),
        phase_q=np.array([c["q"] for c in circuits] + [0] * pad, dtype=int),
        harmonics=np.array(
            [c["harm"] for c in circuits] + [[0j] * len(ORDERS)] * pad, dtype=complex
        ).reshape(n, len(ORDERS)),
        orders=np.array(ORDERS),
        continuous=np.array([c["cont"] for c in circuits] + [False] * pad, dtype=bool),
        **extra,
    )


def stack(panels: list[CircuitArrays]) -> CircuitArrays:
    wiring = {}
    if panels[0].breaker is not None:
        wiring = {
            "breaker": np.stack([p.breaker for p in panels]),
            "neutral_group": np.stack([p.neutral_group for p in panels]),
        }
    return CircuitArrays(
        s_va=np.stack([p.s_va for p in panels]),
        connection=np.stack([p.connection for p in panels]),
        phase_p=np.stack([p.phase_p for p in panels]),
        phase_q=np.stack([p.phase_q for p in panels]),
        harmonics=np.stack([p.harmonics for p in panels]),
        orders=panels[0].orders,
        continuous=np.stack([p.continuous for p in panels]),
        **wiring,
    )


def close(x, y, scale: float) -> None:
    """Agreement to 1e-9 of the panel's total current (round-off of two summation orders)."""
    np.testing.assert_allclose(np.asarray(x), np.asarray(y), rtol=1e-9, atol=1e-9 * scale + 1e-12)


@settings(max_examples=60, deadline=None)
@given(st.lists(circuit(), max_size=12))
def test_engine_equals_scalar_reference(circuits):
    """Vectorised engine == per-circuit loop on random panels (all figures)."""
    for c in circuits:
        c["w"] = RATINGS.continuous_factor if c["cont"] else 1.0
    ref = ref_panel(circuits, SYS.v_ln, ORDERS, *_z())
    b = analyse_batch(to_arrays(circuits), SYS, RATINGS, SUPPLY)
    scale = sum(ref["circ_rms"]) + 1.0
    close(b.phase_spectrum, ref["lines"], scale)
    close(b.neutral_spectrum, ref["neutral"], scale)
    close(b.phase_va, ref["va"], sum(abs(c["s"]) for c in circuits) + 1.0)
    close(b.phase_rms_a, ref["rms"], scale)
    close(b.phase_design_a, ref["design"], scale)
    close(b.neutral_rms_a, ref["neutral_rms"], scale)
    close(b.sequence, ref["seq"], scale)
    # I_N = 3·I_0 (engine.md): 2-pole and 3-pole circuits add nothing to the neutral
    close(b.neutral_spectrum[0], 3 * b.sequence[0], scale)
    close(b.circuit_current_a, ref["circ_fund"], scale)
    close(b.circuit_rms_a, ref["circ_rms"], scale)
    close(b.phase_loading_pct, np.array(ref["rms"]) / 300 * 100, scale)
    close(b.v_phase, ref["v_phase"], 277.0)
    # VUF = 100·|V2|/|V1| from voltages that agree to round-off: rtol 1e-6 is generous
    # for VUFs of a few %, and atol 1e-9 % covers near-balanced panels, where V2 is
    # itself little more than round-off of ~480 V line voltages (~1e-13 V → 1e-14 %)
    np.testing.assert_allclose(float(b.vuf_pct), ref["vuf"], rtol=1e-6, atol=1e-9)
    # THD and deviation are ratios; compare where the denominator is not round-off
    fund = np.abs(np.array([ref["lines"][m][0] for m in range(3)]))
    ok = fund > 1e-6 * scale
    # atol 1e-4 %: the engine zeroes phasors below 1e-12 of the panel current
    # (round-off); relative to a fundamental of at least 1e-6 of it that is 1e-6.
    np.testing.assert_allclose(b.phase_thd_pct[ok], np.array(ref["thd"])[ok], rtol=1e-6, atol=1e-4)
    if min(ref["rms"]) > 1e-6 * scale:
        # the deviation is a difference of RMS currents that agree to 1e-9 of the panel
        # current, divided by their mean: its error is amplified by scale / mean (≤ 1e6
        # by the guard above) — rtol 1e-6 and atol 1e-7 % cover that round-off
        np.testing.assert_allclose(float(b.max_deviation_pct), ref["dev"], rtol=1e-6, atol=1e-7)


def _z() -> tuple[complex, complex]:
    """Supply impedances by hand: percent Z to ohms plus feeder r·L (engine.md)."""
    z_base = 480.0**2 / 150e3
    z = 0.045 * z_base
    r = z / math.sqrt(1 + 2.5**2)
    zt = complex(r, 2.5 * r)
    return zt + complex(0.1, 0.08) * 0.04, complex(0.1, 0.08) * 0.04


@settings(max_examples=30, deadline=None)
@given(st.lists(st.lists(circuit(), max_size=10), min_size=1, max_size=5), st.booleans())
def test_batch_equals_one_at_a_time(panels, wiring):
    """A padded batch of panels gives each panel's own figures.

    Tolerance 1e-12 relative (atol 1e-12 of the panel's current): the stacked
    matrix product may sum in another order than the single one; in practice
    the results are bit-identical. With breaker numbers and shared neutrals
    the batch has as many breakers and groups as its largest panel; a panel's
    own come first and the rest are zero.
    """
    n = max(len(p) for p in panels)
    batch = stack([to_arrays(p, n, wiring) for p in panels])
    b = analyse_batch(batch, SYS, RATINGS, SUPPLY, iterate_voltage=True)
    for k, p in enumerate(panels):
        one = analyse_batch(to_arrays(p, None, wiring), SYS, RATINGS, SUPPLY, iterate_voltage=True)
        bk = b.take(k)
        scale = float(np.sum(one.circuit_rms_a)) + 1.0
        for name in one.__dataclass_fields__:
            x, y = getattr(bk, name), getattr(one, name)
            if y is None:
                assert x is None, name
                continue
            if name.startswith("circuit_"):
                x = x[: len(p)]
            if name in ("breaker_pole_spectrum", "shared_neutral_spectrum"):
                assert np.all(x[len(y) :] == 0), name
                x = x[: len(y)]
            np.testing.assert_allclose(
                x, y, rtol=1e-12, atol=1e-12 * scale, err_msg=name, equal_nan=True
            )


@settings(max_examples=20, deadline=None)
@given(st.lists(circuit(with_neutral=False), max_size=10))
def test_three_wire_system_matches_reference(circuits):
    """480 V delta (no neutral): V_LN = V_LL/√3 for the phasors; neutral figures 0."""
    sys3 = SystemVoltages(v_ll=480.0, v_ln=None)
    ref = ref_panel(circuits, 480.0 / math.sqrt(3), ORDERS)
    a = analyse(to_arrays(circuits), sys3, Ratings(bus_a=400.0))
    scale = sum(ref["circ_rms"]) + 1.0
    close([p.rms_a for p in a.phases], ref["rms"], scale)
    assert not a.neutral.present and a.neutral.rms_a == 0.0 and a.neutral.loading_pct is None


@settings(max_examples=40, deadline=None)
@given(st.lists(circuit(), max_size=12), st.sampled_from([None, 1, 2]))
def test_breakers_and_shared_neutrals_equal_scalar_reference(circuits, high_leg):
    """Breaker pole currents and shared-neutral currents == the reference, wye and high-leg delta.

    The high-leg phasors are written out by hand here (not taken from the engine):
    B high: 120∠0°, 207.85∠−90°, 120∠180°; C high: 120∠0°, 120∠180°, 207.85∠+90°.
    Tolerance as :func:`close` (round-off of two summation orders).
    """
    if high_leg is None:
        system, v = SYS, None
    else:
        system = SystemVoltages(v_ll=240.0, v_ln=120.0, high_leg=high_leg)
        high = 120 * math.sqrt(3) * (-1j if high_leg == 1 else 1j)
        v = [120 + 0j, high, -120 + 0j] if high_leg == 1 else [120 + 0j, -120 + 0j, high]
    ref = ref_panel(circuits, system.v_ln, ORDERS, v=v)
    b = analyse_batch(to_arrays(circuits, wiring=True), system, RATINGS)
    scale = sum(ref["circ_rms"]) + 1.0
    close(b.phase_spectrum, ref["lines"], scale)
    close(b.neutral_spectrum, ref["neutral"], scale)
    close(b.circuit_current_a, ref["circ_fund"], scale)
    close(b.circuit_rms_a, ref["circ_rms"], scale)
    n_b = len(ref["poles"])
    if n_b:
        close(b.breaker_pole_spectrum[:n_b], ref["poles"], scale)
    assert np.all(b.breaker_pole_spectrum[n_b:] == 0)
    n_g = len(ref["groups"])
    if n_g:
        close(b.shared_neutral_spectrum[:n_g], ref["groups"], scale)
    # the breakers' poles add up to the panel's lines, order by order
    close(np.sum(b.breaker_pole_spectrum, axis=0), b.phase_spectrum, scale)
