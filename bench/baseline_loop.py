"""Baseline for the engine benchmark: a plain per-circuit Python loop.

Written straight from ``shared/spec/engine.md`` with ``cmath``: for every
circuit, for every order, add its current to the lines and the neutral.
It computes the same core figures as ``tri.engine.analyse_batch`` (line
and neutral spectra, RMS, THD, schedule VA, sequence components) so the
timing ratio compares like with like. No numpy in the hot loop.
"""

from __future__ import annotations

import cmath
import math

LINE_TO_NEUTRAL, LINE_TO_LINE, THREE_PHASE = 1, 2, 3
_A = cmath.rect(1.0, 2.0 * math.pi / 3.0)
_ANG = (0.0, -2.0 * math.pi / 3.0, 2.0 * math.pi / 3.0)


def analyse_loop(
    s_va: list[complex],
    connection: list[int],
    phase_p: list[int],
    phase_q: list[int],
    harmonics: list[list[complex]],
    orders: list[int],
    v_ln: float,
) -> dict:
    """One panel, one circuit and one order at a time.

    Parameters
    ----------
    s_va : list of complex
        ``P + jQ`` per circuit [VA].
    connection, phase_p, phase_q : list of int
        Engine connection codes and phase indices.
    harmonics : list of list of complex
        ``m_h·e^{jδ_h}`` per circuit and order [pu].
    orders : list of int
        Harmonic orders (> 1).
    v_ln : float
        Line-to-neutral voltage [V].

    Returns
    -------
    dict
        ``lines`` (3 × H complex), ``neutral`` (H), ``rms`` (3), ``thd`` (3) [%],
        ``neutral_rms``, ``va`` (3) [VA], ``seq`` (I0, I1, I2).
    """
    all_orders = [1, *orders]
    n_h = len(all_orders)
    v = [cmath.rect(v_ln, a) for a in _ANG]
    lines = [[0j] * n_h for _ in range(3)]
    neutral = [0j] * n_h
    va = [0.0, 0.0, 0.0]
    for c in range(len(s_va)):
        conn = connection[c]
        s = s_va[c]
        if conn == LINE_TO_NEUTRAL:
            p = phase_p[c]
            i = (s / v[p]).conjugate()
            mag, th = abs(i), cmath.phase(i)
            lines[p][0] += i
            neutral[0] += i
            for k in range(1, n_h):
                e = harmonics[c][k - 1] * cmath.rect(mag, all_orders[k] * th)
                lines[p][k] += e
                neutral[k] += e
            va[p] += abs(s)
        elif conn == LINE_TO_LINE:
            p, q = phase_p[c], phase_q[c]
            i = (s / (v[p] - v[q])).conjugate()
            mag, th = abs(i), cmath.phase(i)
            lines[p][0] += i
            lines[q][0] -= i
            for k in range(1, n_h):
                e = harmonics[c][k - 1] * cmath.rect(mag, all_orders[k] * th)
                lines[p][k] += e
                lines[q][k] -= e
            va[p] += abs(s) / 2
            va[q] += abs(s) / 2
        elif conn == THREE_PHASE:
            for m in range(3):
                va[m] += abs(s) / 3
            per = [(s / 3 / v[m]).conjugate() for m in range(3)]
            for k in range(n_h):
                h = all_orders[k]
                rel = 1.0 if k == 0 else harmonics[c][k - 1]
                e = [rel * cmath.rect(abs(x), h * cmath.phase(x)) for x in per]
                zero = (e[0] + e[1] + e[2]) / 3
                for m in range(3):
                    lines[m][k] += e[m] - zero
    rms = [math.sqrt(sum(abs(x) ** 2 for x in lines[m])) for m in range(3)]
    thd = []
    for m in range(3):
        f = abs(lines[m][0])
        thd.append(100 * math.sqrt(sum(abs(x) ** 2 for x in lines[m][1:])) / f if f else 0.0)
    ia, ib, ic = lines[0][0], lines[1][0], lines[2][0]
    seq = (
        (ia + ib + ic) / 3,
        (ia + _A * ib + _A * _A * ic) / 3,
        (ia + _A * _A * ib + _A * ic) / 3,
    )
    return {
        "lines": lines,
        "neutral": neutral,
        "rms": rms,
        "thd": thd,
        "neutral_rms": math.sqrt(sum(abs(x) ** 2 for x in neutral)),
        "va": va,
        "seq": seq,
    }
