"""The demo panels live inside the package and the wheel's package data names each.

`.ci/wheel_check.py` builds and installs a real wheel and opens a demo from
it; these checks are the quick part that runs with the suite.
"""

from __future__ import annotations

import tomllib
from pathlib import Path

import tri
from tri.tui.demos import demo_files, demo_folder

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = Path(tri.__file__).resolve().parent


def test_demo_folder_is_inside_the_package() -> None:
    assert demo_folder().resolve().parent == PACKAGE
    names = {p.name for p in demo_files()}
    # the panels the README's "More" section lists (README.md), one file each
    assert {"bakery_208.toml", "garage_ev_208.toml", "woodshop_240d.toml"} <= names


def test_package_data_names_every_demo_file() -> None:
    """Every data file under tri/panels_demo/ matches a pattern setuptools ships."""
    config = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    patterns = config["tool"]["setuptools"]["package-data"]["tri"]
    data = [
        p
        for p in demo_folder().rglob("*")
        if p.is_file() and p.suffix != ".py" and "__pycache__" not in p.parts
    ]
    assert any(p.suffix == ".csv" for p in data), "the logged demo's CSV is demo data too"
    shipped = {p for pattern in patterns for p in PACKAGE.glob(pattern)}  # as setuptools globs
    missing = [p.relative_to(PACKAGE).as_posix() for p in data if p not in shipped]
    assert not missing, f"not in [tool.setuptools.package-data] tri: {missing}"
