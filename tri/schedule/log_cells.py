"""Every row of a logger's CSV has as many cells as its header: checked before reading.

pandas, asked for some columns only (``usecols``), silently drops a row's
extra cells, and takes a first column as the index when the first data row
has one cell more than the header. Either way a row such as ``12,5`` written
with a decimal comma in a comma-separated file would be read with its
values shifted into the wrong columns: wrong figures, not an error. This
module counts the separators of every line with numpy (about 0.1 s for a
million rows) and refuses a line whose count differs from the header's,
naming the line.

Files with quoted cells (a ``"`` anywhere) are left to the CSV reader: a
quoted cell may hold the separator.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from tri.schedule.errors import ScheduleError
from tri.schedule.log_spec import log_issue

#: Lines reported at most in one error.
SHOWN_LINES = 3


def line_cell_counts(data: bytes, sep: str) -> np.ndarray:
    """Cells on each line of ``data`` (a line with no text counts 0).

    Parameters
    ----------
    data : bytes
        The file's bytes (UTF-8; ``\\r\\n`` or ``\\n`` line ends).
    sep : str
        The one-character cell separator.

    Returns
    -------
    int ndarray, shape (lines,)
        Separators + 1 on each non-empty line, 0 on empty ones.
    """
    raw = np.frombuffer(data, dtype=np.uint8)
    newline = np.flatnonzero(raw == ord("\n"))
    ends = np.append(newline, raw.size) if raw.size and raw[-1] != ord("\n") else newline
    starts = np.concatenate(([0], ends[:-1] + 1))
    seps = np.concatenate(([0], np.cumsum(raw == ord(sep))))
    counts = seps[ends] - seps[starts] + 1
    length = ends - starts
    has_cr = (length > 0) & (raw[np.maximum(ends - 1, 0)] == ord("\r"))
    empty = (length - has_cr) <= 0
    return np.where(empty, 0, counts)


def check_cell_counts(path: Path, shown: str, sep: str) -> None:
    """Refuse a line whose number of cells differs from the header's.

    Raises
    ------
    ScheduleError
        Naming the first lines at fault (the header is line 1) and the likely
        cause.
    """
    data = path.read_bytes()
    if b'"' in data:
        return
    counts = line_cell_counts(data, sep)
    if counts.size == 0:
        return
    header = int(counts[0])
    bad = np.flatnonzero((counts != header) & (counts != 0))
    if bad.size == 0:
        return
    hint = "; a decimal comma needs decimal = \",\" and ';' between cells"
    issues = [
        log_issue(shown, f"{int(counts[k])} cells where the header has {header}{hint}", int(k) + 1)
        for k in bad[:SHOWN_LINES]
    ]
    if bad.size > SHOWN_LINES:
        issues.append(
            log_issue(shown, f"{bad.size - SHOWN_LINES} more lines with another number of cells")
        )
    raise ScheduleError(issues)
