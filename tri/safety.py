"""The safety caution every face of ``tri`` carries (command line and terminal UI).

One text in one place, below both the command line and the UI, so neither
imports the other to show it. Panel work can kill: the caution stays
wherever figures or suggestions are shown.
"""

from __future__ import annotations

SAFETY_CAUTION = (
    "Figures are engineering estimates from the schedule, not measurements. "
    "Panel work can kill: de-energise and lock out before moving any breaker, "
    "and let a qualified person do the work. The local electrical code and the "
    "authority having jurisdiction decide; nothing here is approval to work."
)
