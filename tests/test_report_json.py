"""The JSON report against the contract of shared/spec/schedule-format.md, for every demo.

Keys and types are checked by hand-written rules (no schema library), then the
identities the contract implies: keys under ``phases`` in ``phase_order``, SI
units, ``voltage`` null without ``[supply]``, ``readings`` null without
``[readings]``, ``I_N = 3·I0``, ``max_deviation_pct`` on the phases' ``rms_a``.
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import pytest
import tomlkit

import tri.report.data as report_data_module
from tri.cli.report import build_data
from tri.report.json_report import render_json

ROOT = Path(__file__).parents[1]
DEMOS = sorted((ROOT / "tri" / "panels_demo").glob("*.toml"))
LEVELS = {"info", "warning", "limit"}
# The report rounds every number to 9 significant digits; identities between
# rounded numbers therefore hold to a few parts in 1e9. 1e-7 relative leaves
# margin and is still far finer than any figure a person reads.
REL = 1e-7


def is_num(x: Any) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)


def check_num(x: Any, where: str) -> None:
    assert is_num(x), f"{where}: expected a finite number, got {x!r}"


def check_polar(d: Any, unit: str, where: str) -> None:
    assert isinstance(d, dict) and set(d) == {unit, "deg"}, f"{where}: {d!r}"
    check_num(d[unit], f"{where}.{unit}")
    check_num(d["deg"], f"{where}.deg")
    assert d[unit] >= 0, where
    assert -180.0 <= d["deg"] <= 180.0, where


def strict_loads(text: str) -> dict[str, Any]:
    def no_constant(name: str) -> None:
        raise AssertionError(f"non-standard JSON constant {name}")

    return json.loads(text, parse_constant=no_constant)


def validate_contract(doc: dict[str, Any]) -> None:
    """Every key and type the contract names (extra keys are allowed)."""
    for key in (
        "panel",
        "phase_order",
        "phases",
        "neutral",
        "sequence",
        "current_unbalance",
        "voltage",
        "readings",
        "findings",
    ):
        assert key in doc, f"missing top-level key {key}"
    panel = doc["panel"]
    assert isinstance(panel["name"], str) and panel["name"]
    assert isinstance(panel["system"], str) and panel["system"]
    check_num(panel["frequency_hz"], "panel.frequency_hz")

    order = doc["phase_order"]
    assert isinstance(order, list) and len(order) == 3 and all(isinstance(x, str) for x in order)
    assert list(doc["phases"]) == order, "keys under phases must follow phase_order"
    for lab in order:
        ph = doc["phases"][lab]
        for key in ("va", "current_a", "current_deg", "rms_a", "thd_pct", "loading_pct"):
            check_num(ph[key], f"phases.{lab}.{key}")
        assert ph["rms_a"] >= ph["current_a"] * (1 - REL), "RMS includes the fundamental"

    n = doc["neutral"]
    for key in ("current_a", "current_deg", "rms_a"):
        check_num(n[key], f"neutral.{key}")
    assert "loading_pct" in n
    if n["loading_pct"] is not None:
        check_num(n["loading_pct"], "neutral.loading_pct")

    for key in ("i0", "i1", "i2"):
        check_polar(doc["sequence"][key], "a", f"sequence.{key}")
    cu = doc["current_unbalance"]
    check_num(cu["negative_sequence_pct"], "current_unbalance.negative_sequence_pct")
    check_num(cu["max_deviation_pct"], "current_unbalance.max_deviation_pct")

    v = doc["voltage"]
    if v is not None:
        assert list(v["phase_v"]) == order
        for lab, pv in v["phase_v"].items():
            check_polar(pv, "v", f"voltage.phase_v.{lab}")
        assert len(v["line_v"]) == 3
        for lab, lv in v["line_v"].items():
            check_polar(lv, "v", f"voltage.line_v.{lab}")
        for key in ("vuf_pct", "line_deviation_pct"):
            check_num(v[key], f"voltage.{key}")
        for key in ("phase_deviation_pct", "motor_derating"):
            assert v[key] is None or is_num(v[key]), key

    r = doc["readings"]
    assert r is None or isinstance(r, dict)

    assert isinstance(doc["findings"], list)
    for f in doc["findings"]:
        assert set(f) >= {"level", "message", "source"}
        assert f["level"] in LEVELS
        assert isinstance(f["message"], str) and f["message"]
        assert isinstance(f["source"], str) and f["source"]


@pytest.fixture(scope="module")
def docs() -> dict[str, dict[str, Any]]:
    return {
        d.stem: strict_loads(render_json(build_data(str(d), iterate=False, continuous_factor=1.25)))
        for d in DEMOS
    }


@pytest.mark.parametrize("demo", DEMOS, ids=lambda p: p.stem)
def test_demo_json_follows_the_contract(demo: Path, docs: dict[str, dict[str, Any]]) -> None:
    validate_contract(docs[demo.stem])


@pytest.mark.parametrize("demo", DEMOS, ids=lambda p: p.stem)
def test_contract_identities(demo: Path, docs: dict[str, dict[str, Any]]) -> None:
    doc = docs[demo.stem]
    order = doc["phase_order"]
    ph = [doc["phases"][lab] for lab in order]
    # I_N = I_A + I_B + I_C = 3·I0 (engine.md, "Circuits to line currents").
    assert doc["neutral"]["current_a"] == pytest.approx(3 * doc["sequence"]["i0"]["a"], rel=REL)
    # max_deviation_pct is computed on the phases' rms_a (schedule-format.md). rel 1e-6:
    # the deviation is a difference of RMS figures rounded to 9 digits, so their
    # rounding grows by mean / deviation (≤ ~20 for these demos, deviations 6-52 %).
    rms = [p["rms_a"] for p in ph]
    mean = sum(rms) / 3
    dev = max(abs(x - mean) for x in rms) / mean * 100
    assert doc["current_unbalance"]["max_deviation_pct"] == pytest.approx(dev, rel=1e-6)
    # Current unbalance factor |I2|/|I1| in percent (engine.md); a ratio of two rounded
    # numbers, so REL holds.
    s = doc["sequence"]
    assert doc["current_unbalance"]["negative_sequence_pct"] == pytest.approx(
        100 * s["i2"]["a"] / s["i1"]["a"], rel=REL
    )
    # Loading against the main (else the bus), neutral against its rating.
    rating = doc["panel"]["main_a"] or doc["panel"]["bus_a"]
    for p in ph:
        assert p["loading_pct"] == pytest.approx(100 * p["rms_a"] / rating, rel=REL)
    n = doc["neutral"]
    assert n["loading_pct"] == pytest.approx(100 * n["rms_a"] / n["rating_a"], rel=REL)
    # Phase VA is the schedule's bookkeeping: the placed circuits' shares add up to it.
    for lab, p in zip(order, ph, strict=True):
        share = sum(c["phase_va"][lab] for c in doc["circuits"] if c["placed"])
        assert p["va"] == pytest.approx(share, rel=REL)
    # SI units: volts, not kilovolts. The band (−20 %, +10 % of nominal) is only wide
    # enough for a panel's voltage drop; a kV/V mix-up would be 1000 times off.
    if doc["voltage"] is not None:
        vln = doc["panel"]["v_ln"]
        for pv in doc["voltage"]["phase_v"].values():
            assert 0.8 * vln < pv["v"] < 1.1 * vln


def test_voltage_is_null_without_supply_and_set_with_it(docs: dict[str, dict[str, Any]]) -> None:
    # The garage demo has no [supply]; the other three have one.
    assert docs["garage_ev_208"]["voltage"] is None
    for stem in ("bakery_208", "machine_shop_480", "studio_400_rail"):
        assert docs[stem]["voltage"] is not None


def test_readings_and_voltage_null_when_the_tables_are_removed(tmp_path: Path) -> None:
    doc = tomlkit.parse((ROOT / "tri" / "panels_demo" / "bakery_208.toml").read_text("utf-8"))
    del doc["supply"]
    del doc["readings"]
    bare = tmp_path / "bare.toml"
    bare.write_text(tomlkit.dumps(doc), "utf-8")
    out = strict_loads(render_json(build_data(str(bare), iterate=False, continuous_factor=1.25)))
    validate_contract(out)
    assert out["voltage"] is None
    assert out["readings"] is None
    assert out["supply"] is None


def test_readings_shape(docs: dict[str, dict[str, Any]]) -> None:
    r = docs["machine_shop_480"]["readings"]
    assert list(r["phases"]) == docs["machine_shop_480"]["phase_order"]
    assert r["phases"]["A"]["measured_a"] == 236.0  # from the file's [readings]
    assert set(r["volts_ll"]) == {"AB", "BC", "CA"}
    assert set(r["volts_ln"]) == {"A", "B", "C"}
    assert r["vuf_pct"] is not None and r["computed_vuf_pct"] is not None
    for lab, x in r["phases"].items():
        comp = docs["machine_shop_480"]["phases"][lab]["rms_a"]
        assert x["computed_rms_a"] == comp
        # rel 1e-6: a difference with a 9-digit rounded figure, relative rounding
        # grown by comp / |measured − comp| (about 5 here)
        assert x["difference_pct"] == pytest.approx(100 * (x["measured_a"] - comp) / comp, rel=1e-6)
    # Rail board with L-labels: line names joined by a hyphen.
    assert set(docs["studio_400_rail"]["readings"]["volts_ll"]) == {"L1-L2", "L2-L3", "L3-L1"}


def test_phase_order_follows_the_panel_labels(docs: dict[str, dict[str, Any]]) -> None:
    assert docs["studio_400_rail"]["phase_order"] == ["L1", "L2", "L3"]
    assert list(docs["studio_400_rail"]["voltage"]["line_v"]) == ["L1-L2", "L2-L3", "L3-L1"]
    assert docs["bakery_208"]["phase_order"] == ["A", "B", "C"]


def test_unplaced_circuits_are_listed_and_carry_nothing(docs: dict[str, dict[str, Any]]) -> None:
    doc = docs["garage_ev_208"]
    assert doc["unplaced"] == ["EV charger, bay 3 (planned)"]
    (c,) = [c for c in doc["circuits"] if not c["placed"]]
    assert c["phases"] is None and c["current_a"] == 0 and set(c["phase_va"].values()) == {0}


def test_every_top_level_key_is_documented(docs: dict[str, dict[str, Any]]) -> None:
    text = report_data_module.__doc__ or ""
    for key in docs["bakery_208"]:
        assert f"``{key}``" in text, f"key {key} is not documented in tri/report/data.py"


def test_basis_says_estimate_and_which_currents(docs: dict[str, dict[str, Any]]) -> None:
    b = docs["bakery_208"]["basis"]
    assert b["estimate"] is True and b["currents"] == "nominal voltage" and not b["iterated"]
    it = build_data(
        str(ROOT / "tri" / "panels_demo" / "bakery_208.toml"), iterate=True, continuous_factor=1.25
    )
    assert it["basis"]["iterated"] is True
    assert "iterated" in it["basis"]["currents"]
    assert it["voltage"]["iterations"] > 0
