"""Pure numerical engine: no I/O, no UI imports, plain data in, frozen results out.

Entry points: :func:`analyse` (one panel, with findings) and
:func:`analyse_batch` (arrays, any leading batch shape). Inputs are in
:mod:`tri.engine.inputs`, results in :mod:`tri.engine.results`.
"""

from tri.engine.analysis import analyse, analyse_batch
from tri.engine.limits import FindingLimits
from tri.engine.results import BatchAnalysis, Finding, PanelAnalysis, Phasor

__all__ = [
    "BatchAnalysis",
    "Finding",
    "FindingLimits",
    "PanelAnalysis",
    "Phasor",
    "analyse",
    "analyse_batch",
]
