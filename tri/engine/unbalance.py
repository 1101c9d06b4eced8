"""Voltage and current unbalance figures and the motor derating curve.

References
----------
1. IEC 61000-4-30, *Testing and measurement techniques - Power quality
   measurement methods*, supply voltage unbalance: ``u2 = |U2|/|U1|`` and
   the formula from the three line-voltage magnitudes (β) (published).
2. NEMA MG 1, *Motors and Generators*, Part 14 (14.35, "Effects of
   unbalanced voltages on the performance of polyphase induction motors"),
   percent voltage unbalance = max deviation from the average / average,
   worked example 460, 467, 450 V → 1.96 %, and the derating figure
   (Fig. 14-1) (published; the clause and figure numbers are from memory).
3. IEEE Std 112 / IEEE usage: phase-voltage unbalance rate on the
   line-to-neutral magnitudes (from memory).
"""

from __future__ import annotations

import numpy as np

from tri.engine.sequence import sequence_components, unbalance_pct

#: NEMA MG 1 Fig. 14-1 derating curve, points read off the published figure
#: (percent voltage unbalance [%], derating factor [-]); at 3 % and 5 % the
#: reading is a range (0.88-0.89, 0.75-0.76) and its middle is used. Between
#: points the factor is interpolated linearly; read-off accuracy ±0.02, as
#: ``shared/spec/check-values.md`` allows.
NEMA_DERATING_POINTS: tuple[tuple[float, float], ...] = (
    (0.0, 1.00),
    (1.0, 1.00),
    (2.0, 0.95),
    (3.0, 0.885),
    (4.0, 0.82),
    (5.0, 0.755),
)
#: Above this percent unbalance NEMA MG 1 does not recommend operating a motor [%].
NEMA_MAX_UNBALANCE_PCT = 5.0


def vuf_pct(v_line: np.ndarray) -> np.ndarray:
    """Voltage unbalance factor from line-voltage phasors (IEC definition).

    Parameters
    ----------
    v_line : complex ndarray, shape (..., 3)
        ``V_AB, V_BC, V_CA`` [V].

    Returns
    -------
    float ndarray, shape (...)
        ``100·|V_2| / |V_1|`` [%]; 0 when ``V_1 = 0``.

    Notes
    -----
    Line voltages carry no zero sequence, and their negative-to-positive
    ratio equals that of the phase voltages [1].
    """
    return unbalance_pct(sequence_components(v_line), which=2)


def vuf_from_line_magnitudes(
    u12: np.ndarray | float, u23: np.ndarray | float, u31: np.ndarray | float
) -> np.ndarray:
    """Voltage unbalance factor from the three line-voltage magnitudes (β formula).

    Parameters
    ----------
    u12, u23, u31 : float or ndarray
        Line-to-line voltage magnitudes [V].

    Returns
    -------
    float ndarray
        ``u2`` [%]; 0 when all three are zero.

    Notes
    -----
    IEC 61000-4-30 [1]:

    ``β = (U12⁴ + U23⁴ + U31⁴) / (U12² + U23² + U31²)²``,
    ``u2 = sqrt((1 − sqrt(3 − 6β)) / (1 + sqrt(3 − 6β)))``.

    Exact for the fundamental, because three line voltages always close a
    triangle (they sum to zero). ``β`` lies in [1/3, 1/2] for any triangle.

    Evaluated in an algebraically identical form that avoids the
    cancellation in ``1 − sqrt(3 − 6β)`` near balance: with ``x = 3 − 6β``,

    ``1 − x = 2·Σ_{i<j} (U_i² − U_j²)² / (Σ U_i²)²`` and
    ``u2 = sqrt(1 − x) / (1 + sqrt(x))``

    (since ``(1 − √x)/(1 + √x) = (1 − x)/(1 + √x)²``), so the result keeps
    full precision down to ``u2 → 0``. Magnitudes that cannot close a
    triangle (``x < 0``, only from bad readings) are clipped to the
    degenerate triangle, ``u2 = 100 %``.
    """
    u = np.stack(np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (u12, u23, u31))))
    sq = np.sum(u**2, axis=0)
    ok = sq > 0
    d = sum(((u[i] - u[j]) * (u[i] + u[j])) ** 2 for i, j in ((0, 1), (1, 2), (2, 0)))
    one_minus_x = np.clip(np.where(ok, 2.0 * d / np.where(ok, sq, 1.0) ** 2, 0.0), 0.0, 1.0)
    root = np.sqrt(1.0 - one_minus_x)
    return 100.0 * np.sqrt(one_minus_x) / (1.0 + root)


def deviation_rate_pct(magnitudes: np.ndarray) -> np.ndarray:
    """Maximum deviation from the mean, as a percent of the mean.

    Parameters
    ----------
    magnitudes : float ndarray, shape (..., 3)
        Three magnitudes (line voltages, phase voltages or phase currents)
        [V or A].

    Returns
    -------
    float ndarray, shape (...)
        ``100·max|x_k − x̄| / x̄`` [%] (NEMA MG 1 "percent unbalance" on line
        voltages [2]); 0 when the mean is zero.
    """
    x = np.asarray(magnitudes, dtype=float)
    mean = np.mean(x, axis=-1)
    dev = np.max(np.abs(x - mean[..., None]), axis=-1)
    return np.where(mean > 0, 100.0 * dev / np.where(mean > 0, mean, 1.0), 0.0)


def max_minus_min_pct(magnitudes: np.ndarray) -> np.ndarray:
    """Largest minus smallest magnitude, as a percent of the mean.

    Parameters
    ----------
    magnitudes : float ndarray, shape (..., 3)
        Three magnitudes [V or A].

    Returns
    -------
    float ndarray, shape (...)
        ``100·(max − min) / x̄`` [%], the figure many meters show (older
        IEEE usage for phase voltages [3]); between 1.5 and 2 times
        :func:`deviation_rate_pct` whenever the mean is above zero
        [computed]; 0 when the mean is zero.
    """
    x = np.asarray(magnitudes, dtype=float)
    mean = np.mean(x, axis=-1)
    spread = np.max(x, axis=-1) - np.min(x, axis=-1)
    return np.where(mean > 0, 100.0 * spread / np.where(mean > 0, mean, 1.0), 0.0)


def nema_derating(unbalance_pct: np.ndarray | float) -> np.ndarray:
    """Motor derating factor for a percent voltage unbalance (NEMA MG 1).

    Parameters
    ----------
    unbalance_pct : float or ndarray
        NEMA percent voltage unbalance, i.e. the line-voltage deviation rate
        (:func:`deviation_rate_pct` of the line-voltage magnitudes) [%].

    Returns
    -------
    float ndarray
        Derating factor [-], linear between the points of
        :data:`NEMA_DERATING_POINTS`; 1 up to 1 %; ``NaN`` above 5 %, where
        NEMA MG 1 does not recommend operation [2].
    """
    x = np.asarray(unbalance_pct, dtype=float)
    xp, fp = (np.array(c) for c in zip(*NEMA_DERATING_POINTS, strict=True))
    out = np.interp(x, xp, fp)
    return np.where(x <= NEMA_MAX_UNBALANCE_PCT, out, np.nan)
