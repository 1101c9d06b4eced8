"""Golden files: every demo panel in every report format, compared byte for byte.

The text format is rendered at a fixed width of 80 columns with no colour.
To regenerate after a deliberate change (engine numerics, renderer layout,
demo readings), run ``TRI_UPDATE_GOLDEN=1 pytest tests/test_report_golden.py``
and review ``git diff tests/golden/`` (see ``tests/golden/README.md``).
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from tri.cli.report import build_data, render

ROOT = Path(__file__).parents[1]
GOLDEN = Path(__file__).parent / "golden"
DEMOS = sorted((ROOT / "tri" / "panels_demo").glob("*.toml"))
EXT = {"text": "txt", "json": "json", "markdown": "md", "csv": "csv"}
UPDATE = os.environ.get("TRI_UPDATE_GOLDEN") == "1"


def golden_path(demo: Path, fmt: str) -> Path:
    """Where the golden file of ``demo`` in ``fmt`` lives."""
    return GOLDEN / f"{demo.stem}.{EXT[fmt]}"


@pytest.fixture(scope="module")
def data_by_demo() -> dict[str, dict]:
    # Only the file name of the path reaches the report, so any path gives the same bytes.
    # The continuous factor is the command's default (the panel's practice: 1.25 on the
    # 60 Hz demos, 1 on the 50 Hz studio), so the goldens are what `tri report` prints.
    return {d.stem: build_data(str(d), iterate=False) for d in DEMOS}


@pytest.mark.parametrize("fmt", list(EXT))
@pytest.mark.parametrize("demo", DEMOS, ids=lambda p: p.stem)
def test_golden(demo: Path, fmt: str, data_by_demo: dict[str, dict]) -> None:
    out = render(data_by_demo[demo.stem], fmt).encode("utf-8")
    path = golden_path(demo, fmt)
    if UPDATE:
        path.write_bytes(out)
    assert path.exists(), f"missing {path}; run with TRI_UPDATE_GOLDEN=1 to create it"
    expected = path.read_bytes()
    assert out == expected, (
        f"{path.name} differs from the report; if the change is deliberate, regenerate with "
        "TRI_UPDATE_GOLDEN=1 (tests/golden/README.md)"
    )


def test_every_golden_file_belongs_to_a_demo() -> None:
    stems = {d.stem for d in DEMOS}
    for f in GOLDEN.iterdir():
        if f.name in ("README.md", ".gitattributes"):
            continue
        assert f.name.rsplit(".", 1)[0] in stems, f"stale golden file {f.name}"


def test_no_report_writes_a_hedged_plural() -> None:
    """Every count in every format is a real plural ("1 circuit", "2 circuits"), never "(s)"."""
    hedged = [p.name for p in GOLDEN.iterdir() if "(s)" in p.read_text(encoding="utf-8")]
    assert hedged == []
