"""No merge conflict markers in the project's text files.

A merge that leaves ``<<<<<<<`` / ``>>>>>>>`` lines in a Markdown file
passes every other test (one did, in DEVELOPERS.md); this test reads every
text file git tracks. [common practice: git's conflict marker format]
"""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

ROOT = Path(__file__).parents[1]
MARKER = re.compile(r"^(<{7} |>{7} |={7}$)", re.MULTILINE)
TEXT = {".py", ".md", ".toml", ".tcss", ".csv", ".txt", ".json", ".cfg", ""}


def _tracked() -> list[Path]:
    out = subprocess.run(
        ["git", "ls-files"], cwd=ROOT, capture_output=True, text=True, check=False
    ).stdout.split()
    return [ROOT / p for p in out if Path(p).suffix in TEXT and (ROOT / p).is_file()]


def test_no_file_carries_conflict_markers() -> None:
    files = _tracked()
    if not files:  # not a git checkout (an unpacked sdist): nothing to read
        return
    bad = []
    for path in files:
        try:
            text = path.read_text(encoding="utf-8")
        except UnicodeDecodeError:
            continue
        for m in MARKER.finditer(text):
            line = text.count("\n", 0, m.start()) + 1
            bad.append(f"{path.relative_to(ROOT)}:{line}")
    assert not bad, "conflict markers at " + ", ".join(bad)
