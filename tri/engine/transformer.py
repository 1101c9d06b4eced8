"""A three-phase transformer between two panels: vector group, ratio, sequence transfer.

The transformer is modelled as an ideal three-phase transformer (the turns
ratio and the phase shift of its vector group) in series with its
short-circuit impedance referred to the secondary (percent impedance on its
own kVA base, split by X/R; magnetising current and losses left out). Each
harmonic order is transferred through it sequence by sequence, which is
exact for the ideal part at any frequency.

Frames
------
Every panel's figures are reported in its own frame: its nominal ``V_A`` at
0°. A transformer whose secondary lags its primary by ``ψ = clock·30°``
(IEC 60076-1 clock number) puts the child's frame ``ψ`` behind the parent's.
For a current spectrum given in the child's frame:

* a time shift of the fundamental by ``ψ`` shifts order h by ``h·ψ``, so the
  child's order-h currents are ``I·e^{−j·h·ψ}`` in absolute terms
  (``ψ`` counted as a lag);
* on its way to the primary the ideal transformer advances a
  positive-sequence set by ``ψ`` and retards a negative-sequence set by ``ψ``
  (the delta combination ``I_a − I_b`` of a positive set leads by 30°, of a
  negative set lags), and divides it by the line-voltage ratio ``n``;
* zero sequence reaches the primary only when both windings are wye with the
  neutral connected (``YNyn``); a delta winding keeps it circulating inside
  (it is the triplen current of balanced non-linear loads), and a wye primary
  without its neutral has nowhere to take it.

Together, for the sequence ``s`` of order ``h`` (``ψ`` in rad, lag positive):

``I_prim,1 = I_child,1·e^{−j(h−1)ψ}/n``, ``I_prim,2 = I_child,2·e^{−j(h+1)ψ}/n``,
``I_prim,0 = zero_pass·I_child,0·e^{−j(h−1)ψ}/n``,

and the open-circuit secondary voltage in the child's frame from the
primary's (fundamental): ``V_1/n``, ``V_2·e^{+j2ψ}/n``, ``zero_pass·V_0/n``.
At h = 1 the factors conserve complex power exactly, and for two six-pulse
drives behind a Dy and a Yy transformer they cancel the 5th and 7th
harmonics on the common primary (the twelve-pulse result).

The turns ratio ``n`` is the ratio of the two systems' nominal line-to-line
voltages as the engine defines them (``√3·V_LN`` on a wye system), so a
child at no load sees exactly its nominal voltage. For a 480 V delta to
208Y/120 transformer that is ``480 / (120·√3)``, a winding ratio of 480:120
= 4.

References
----------
1. IEC 60076-1, *Power transformers - General*, vector groups and clock
   numbers (from memory).
2. IEEE C57.12.00: on delta-wye and wye-delta step-down transformers the
   low-voltage side lags the high-voltage side by 30° (from memory).
3. J. D. Glover, M. S. Sarma, T. J. Overbye, *Power System Analysis and
   Design*, ch. 8: phase shift of positive and negative sequence through a
   Δ-Y transformer, zero-sequence equivalent circuits (from memory).
4. J. Arrillaga, N. R. Watson, *Power System Harmonics*, twelve-pulse
   cancellation of the 5th and 7th through Y-y and Y-d transformers
   (from memory; it follows from the factors above, [computed]).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from tri.engine.sequence import phase_components, sequence_components
from tri.engine.supply import transformer_impedance

#: Primary (high-voltage) winding letters: delta, wye, wye with neutral.
PRIMARY_WINDINGS = ("D", "Y", "YN")
#: Secondary (low-voltage) winding letters.
SECONDARY_WINDINGS = ("d", "y", "yn")
#: Clock numbers allowed for windings of the same kind (Dd, Yy, YNyn) and of
#: different kinds (Dy, Yd); the usual ones of IEC 60076-1 [1].
SAME_KIND_CLOCKS = (0, 6)
MIXED_KIND_CLOCKS = (1, 5, 7, 11)
#: Clock number assumed when none is written: 0 for same-kind windings; 1 (low
#: voltage lagging by 30°, IEEE C57.12.00 [2]) for delta-wye and wye-delta.
DEFAULT_MIXED_CLOCK = 1

_GROUP = re.compile(r"^(YN|Y|D)(yn|y|d)(\d{1,2})?$", re.IGNORECASE)


@dataclass(frozen=True)
class VectorGroup:
    """Winding connections and phase shift of a three-phase transformer.

    Attributes
    ----------
    primary : {"D", "Y", "YN"}
        Primary winding: delta, wye, wye with its neutral connected.
    secondary : {"d", "y", "yn"}
        Secondary winding.
    clock : int
        The secondary lags the primary by ``clock·30°`` [-].
    """

    primary: str
    secondary: str
    clock: int

    @property
    def text(self) -> str:
        """IEC notation, e.g. ``"Dyn1"``."""
        return f"{self.primary}{self.secondary}{self.clock}"

    @property
    def lag_rad(self) -> float:
        """Phase lag of the secondary behind the primary [rad]."""
        return math.radians(30.0 * self.clock)

    @property
    def zero_sequence_passes(self) -> bool:
        """True when zero-sequence current reaches the primary (``YNyn``)."""
        return self.primary == "YN" and self.secondary == "yn"

    @property
    def secondary_has_neutral(self) -> bool:
        """True when the secondary is a 4-wire wye with its neutral brought out."""
        return self.secondary == "yn"

    @property
    def primary_needs_neutral(self) -> bool:
        """True when the primary neutral is connected to the supply's neutral."""
        return self.primary == "YN"

    @property
    def delta_primary(self) -> bool:
        """True when the primary is delta-connected."""
        return self.primary == "D"


def parse_vector_group(text: str) -> VectorGroup:
    """Read a vector group such as ``"Dyn"``, ``"Dyn11"``, ``"Yyn0"``, ``"Dd"``, ``"Yd1"``.

    Parameters
    ----------
    text : str
        Primary letters (``D``, ``Y``, ``YN``), secondary letters (``d``,
        ``y``, ``yn``), optional clock number. Letters are read case-blind,
        the first winding being the primary.

    Returns
    -------
    VectorGroup

    Raises
    ------
    ValueError
        With a plain message naming what was expected.
    """
    m = _GROUP.match(text.strip())
    if m is None:
        raise ValueError(
            f"'{text}' is not a vector group; expected e.g. Dyn1, Dyn11, Yyn0, YNyn0, Dd0, Yd1"
        )
    primary, secondary = m.group(1).upper(), m.group(2).lower()
    same = (primary == "D") == (secondary == "d")
    allowed = SAME_KIND_CLOCKS if same else MIXED_KIND_CLOCKS
    default_clock = 0 if same else DEFAULT_MIXED_CLOCK
    clock = default_clock if m.group(3) is None else int(m.group(3))
    if clock not in allowed:
        raise ValueError(
            f"clock number {clock} is not one of {', '.join(map(str, allowed))} for "
            f"{primary}{secondary} windings"
        )
    return VectorGroup(primary, secondary, clock)


@dataclass(frozen=True)
class TransformerLink:
    """A transformer between a parent panel and the child it feeds.

    Attributes
    ----------
    kva : float
        Three-phase rating [kVA].
    z_pct : float
        Percent impedance on its own base [%].
    x_r : float
        X/R ratio of that impedance [-].
    group : VectorGroup
        Winding connections and phase shift.
    """

    kva: float
    z_pct: float
    x_r: float
    group: VectorGroup

    def impedance_ohm(self, secondary_v_ll: float) -> complex:
        """Series impedance referred to the secondary ``R + jX`` [Ω].

        Parameters
        ----------
        secondary_v_ll : float
            Secondary nominal line-to-line voltage [V] (the base).
        """
        return transformer_impedance(self.kva, self.z_pct, self.x_r, secondary_v_ll).z_ohm

    def rated_current_a(self, secondary_v_ll: float) -> float:
        """Rated secondary line current ``1000·kVA / (√3·V_LL)`` [A]."""
        return 1000.0 * self.kva / (math.sqrt(3.0) * secondary_v_ll)


def current_factors(
    lag_rad: np.ndarray, ratio: np.ndarray, zero_pass: np.ndarray, orders_all: np.ndarray
) -> np.ndarray:
    """Per-sequence factors from child-frame secondary to parent-frame primary currents.

    Parameters
    ----------
    lag_rad : float ndarray, shape (L,)
        Secondary lag behind the primary ``ψ`` [rad] (0 without a transformer).
    ratio : float ndarray, shape (L,)
        Line-voltage ratio ``n = V_LL,primary / V_LL,secondary`` [-] (1 without).
    zero_pass : bool ndarray, shape (L,)
        Zero sequence reaches the primary.
    orders_all : int ndarray, shape (H,)
        Orders, the fundamental first.

    Returns
    -------
    complex ndarray, shape (L, H, 3)
        Factors on ``I_0, I_1, I_2`` of each order (module docstring) [-].
    """
    h = np.asarray(orders_all, dtype=float)[None, :]
    psi = np.asarray(lag_rad, dtype=float)[:, None]
    inv_n = 1.0 / np.asarray(ratio, dtype=float)[:, None]
    pos = np.exp(-1j * (h - 1.0) * psi) * inv_n
    neg = np.exp(-1j * (h + 1.0) * psi) * inv_n
    zero = np.where(np.asarray(zero_pass, dtype=bool)[:, None], pos, 0.0)
    return np.stack([zero, pos, neg], axis=-1)


def voltage_factors(lag_rad: np.ndarray, ratio: np.ndarray, zero_pass: np.ndarray) -> np.ndarray:
    """Per-sequence factors from parent-frame primary to child-frame secondary voltages.

    Parameters
    ----------
    lag_rad, ratio, zero_pass : ndarray, shape (L,)
        As for :func:`current_factors` [rad], [-], [-].

    Returns
    -------
    complex ndarray, shape (L, 3)
        Factors on ``V_0, V_1, V_2`` of the fundamental [-]: ``zero_pass/n``,
        ``1/n``, ``e^{+j2ψ}/n`` (open circuit).
    """
    psi = np.asarray(lag_rad, dtype=float)
    inv_n = 1.0 / np.asarray(ratio, dtype=float)
    zero = np.where(np.asarray(zero_pass, dtype=bool), inv_n, 0.0)
    return np.stack([zero + 0j, inv_n + 0j, np.exp(2j * psi) * inv_n], axis=-1)


def transfer_currents(spectrum: np.ndarray, factors: np.ndarray) -> np.ndarray:
    """Line-current spectra through transformers, sequence by sequence.

    Parameters
    ----------
    spectrum : complex ndarray, shape (L, 3, H)
        Child-frame secondary line currents, phases × orders [A].
    factors : complex ndarray, shape (L, H, 3)
        From :func:`current_factors`.

    Returns
    -------
    complex ndarray, shape (L, 3, H)
        Parent-frame primary line currents [A].
    """
    seq = sequence_components(np.swapaxes(spectrum, -1, -2))  # (L, H, 3)
    return np.swapaxes(phase_components(seq * factors), -1, -2)


def transfer_voltages(v_phase: np.ndarray, factors: np.ndarray) -> np.ndarray:
    """Open-circuit secondary phase voltages from primary phase voltages.

    Parameters
    ----------
    v_phase : complex ndarray, shape (L, 3)
        Parent-frame primary phase-to-neutral voltages [V].
    factors : complex ndarray, shape (L, 3)
        From :func:`voltage_factors`.

    Returns
    -------
    complex ndarray, shape (L, 3)
        Child-frame secondary phase-to-neutral voltages at no load [V].
    """
    return phase_components(sequence_components(v_phase) * factors)


def delta_circulating_a(spectrum: np.ndarray, winding_ratio: np.ndarray) -> np.ndarray:
    """RMS current circulating in a delta primary to balance secondary zero sequence.

    Parameters
    ----------
    spectrum : complex ndarray, shape (L, 3, H)
        Secondary line currents [A].
    winding_ratio : float ndarray, shape (L,)
        Primary winding turns per secondary winding turn [-]
        (``V_LL,primary / V_LN,secondary`` for a Dyn transformer).

    Returns
    -------
    float ndarray, shape (L,)
        ``sqrt(Σ_h |I_0,h|²) / N`` in each delta winding [A].

    Notes
    -----
    Ampere-turn balance of each limb: the zero-sequence part of the
    secondary winding current, ``I_0 = (I_a + I_b + I_c)/3`` at each order,
    is matched by a current ``I_0/N`` that flows round the delta and into no
    line [3].
    """
    i0 = np.mean(spectrum, axis=-2)  # (L, H)
    return np.sqrt(np.sum(np.abs(i0) ** 2, axis=-1)) / np.asarray(winding_ratio, dtype=float)
