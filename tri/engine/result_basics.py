"""The small values every engine result is built of: :class:`Phasor` (polar
form, degrees), :class:`Finding` (one observation with its level and source)
and the finding :data:`Level` words."""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass
from typing import Literal

Level = Literal["info", "warning", "limit"]


@dataclass(frozen=True)
class Phasor:
    """A phasor in polar form.

    Attributes
    ----------
    magnitude : float
        RMS magnitude [A or V].
    deg : float
        Angle, A-B-C sequence with ``V_A`` at 0° [deg], in (−180, 180].
    """

    magnitude: float
    deg: float

    @classmethod
    def of(cls, value: complex) -> Phasor:
        """Polar form of a complex phasor [A or V]."""
        value = complex(value)
        return cls(abs(value), math.degrees(cmath.phase(value)) if value != 0 else 0.0)

    @property
    def complex(self) -> complex:
        """Rectangular form [A or V]."""
        return cmath.rect(self.magnitude, math.radians(self.deg))


@dataclass(frozen=True)
class Finding:
    """One observation about the panel.

    Attributes
    ----------
    level : {"info", "warning", "limit"}
        ``limit``: a rating or published limit is exceeded; ``warning``: near
        one, or a rule applies; ``info``: context.
    message : str
        Plain sentence, using the panel's phase labels.
    source : str
        Where the rule comes from (code section, standard, or "common
        practice"), with the reminder that local code governs.
    """

    level: Level
    message: str
    source: str
