"""Catalogue of supply systems a panel may be fed from.

Nominal voltages per IEC 60038 (400/230 V) [published] and North American
practice (208Y/120, 480Y/277, 600Y/347 V, and the 240/120 V high-leg
delta of older shops) [common practice]; 415/240 V is an older IEC /
Australian nominal [from memory].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from tri.engine.inputs import SystemVoltages


@dataclass(frozen=True)
class SupplySystem:
    """One entry of the supply-system catalogue.

    Attributes
    ----------
    key : str
        Catalogue key used in schedule files, e.g. ``"208Y/120"``.
    description : str
        Plain words for people.
    v_ll : float
        Nominal line-to-line voltage [V].
    v_ln : float or None
        Nominal line-to-neutral voltage [V]; ``None`` on a 3-wire system.
    default_frequency_hz : float
        Frequency assumed when the file does not give one [Hz].
    high_leg_delta : bool
        A 4-wire delta with a centre-tapped winding (240/120 V): ``v_ln``
        is half a winding, the high leg sits at ``sqrt(3)/2 * v_ll`` to
        neutral and line-to-line circuits see ``v_ll`` (see
        :mod:`tri.engine.high_leg`).
    """

    key: str
    description: str
    v_ll: float
    v_ln: float | None
    default_frequency_hz: float
    high_leg_delta: bool = False

    @property
    def has_neutral(self) -> bool:
        """True for a 4-wire system (line-to-neutral circuits allowed)."""
        return self.v_ln is not None

    @property
    def wires(self) -> int:
        """Number of current-carrying supply conductors (3 or 4)."""
        return 4 if self.has_neutral else 3

    def voltages(self, frequency_hz: float | None = None) -> SystemVoltages:
        """The engine's view of this system [V, Hz]."""
        f = self.default_frequency_hz if frequency_hz is None else frequency_hz
        return SystemVoltages(v_ll=self.v_ll, v_ln=self.v_ln, frequency_hz=f)

    def circuit_voltage(self, poles: int) -> float:
        """Voltage across a circuit of the given pole count [V].

        Line-to-neutral for 1 pole (derived ``V_LL/sqrt(3)`` on a 3-wire
        system), line-to-line for 2 and 3 poles.

        Notes
        -----
        On a wye system the line-to-line magnitude used here is that of the
        engine's nominal phasors, ``|V_A - V_B| = sqrt(3) * V_LN`` (207.85 V
        on 208Y/120, 398.4 V on 400Y/230), not the rounded name of the
        system. A load given in amperes then gives back exactly that current.
        On a high-leg delta every line-to-line voltage is ``v_ll`` (240 V).
        """
        v_ln = self.v_ln if self.v_ln is not None else self.v_ll / math.sqrt(3.0)
        if self.high_leg_delta:
            return v_ln if poles == 1 else self.v_ll  # every line pair of a delta: v_ll
        return v_ln if poles == 1 else v_ln * math.sqrt(3.0)


def _wye(v_ll: float, v_ln: float, f: float, where: str) -> SupplySystem:
    key = f"{v_ll:g}Y/{v_ln:g}"
    return SupplySystem(key, f"3-phase 4-wire wye, {where}", v_ll, v_ln, f)


def _delta(v_ll: float, f: float, where: str) -> SupplySystem:
    return SupplySystem(f"{v_ll:g}D", f"3-phase 3-wire, no neutral, {where}", v_ll, None, f)


SYSTEMS: dict[str, SupplySystem] = {
    s.key: s
    for s in (
        _wye(208, 120, 60, "North American commercial"),
        _wye(480, 277, 60, "North American commercial and industrial"),
        _wye(600, 347, 60, "Canadian industrial"),
        _wye(400, 230, 50, "IEC 60038 low voltage"),
        _wye(415, 240, 50, "older IEC / Australian low voltage"),
        _wye(380, 220, 50, "older IEC low voltage"),
        _wye(220, 127, 60, "Latin American commercial"),
        _delta(480, 60, "North American industrial"),
        _delta(600, 60, "Canadian industrial"),
        _delta(240, 60, "North American (no high-leg loads)"),
        _delta(400, 50, "IEC low voltage without neutral"),
        SupplySystem(
            "240/120D",
            "3-phase 4-wire high-leg delta (centre-tapped winding), North American",
            240,
            120,
            60,
            high_leg_delta=True,
        ),
    )
}


def system_names() -> list[str]:
    """Catalogue keys in display order."""
    return list(SYSTEMS)
