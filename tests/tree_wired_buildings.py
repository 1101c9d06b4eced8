"""Small buildings with panels as they are wired, for the building rebalancer's enumeration.

Invented data (random loads and harmonic profiles from a seed), each kind
small enough for :mod:`tree_rebalance_reference` to list every arrangement:

* ``groups``: a parent with a breaker with a neutral and one load per leg,
  feeding a child whose 1-pole breakers side by side form a shared-neutral
  group (``N1``), with a 3-pole wye load (one load per leg) and 1-pole
  loads; an odd seed feeds the child through a ``Dyn`` transformer from a
  480Y/277 parent (its triplens and zero sequence stay in the delta), an
  even seed directly on 208Y/120; from seed 2 on the child reads C-B-A down
  its right column (a wired block there takes the reversed orders too);
* ``high-leg``: a 240/120D parent feeding a 240/120D child directly, each
  with 120 V loads (never on the high leg B), a 240 V 2-pole load, in the
  child a 2-pole breaker with a neutral (its legs to neutral on the low
  phases only) and a 3-pole delta load with one load per pole pair;
* ``high-leg-tx``: a transformer next to a high-leg delta (odd seeds: a
  480Y/277 parent feeding a 240/120D child through a ``Dd0`` transformer,
  its 120 V loads on the centre-tapped winding; even seeds: a 240/120D
  parent feeding a 208Y/120 child through a ``Dyn1`` one);
* ``rcd``: a 400Y/230 two-column parent feeding a rail board with a
  2-pole RCD (its circuit stays on the RCD's phase), a 4-pole RCD with two
  circuits behind it, and a shared-neutral group of two (odd seeds) or a
  2-pole breaker with a neutral and one load per leg (even seeds).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

PROFILES = ("linear", "electronics", "led-driver")
KINDS = ("groups", "high-leg", "rcd", "high-leg-tx")


def _panel(name: str, system: str, spaces: int, extra: str = "") -> str:
    return (
        f'format = 1\n\n[panel]\nname = "{name}"\nsystem = "{system}"\nspaces = {spaces}\n'
        f"bus_a = 400\n{extra}\n"
    )


def _circuit(rng, where: str, name: str, poles: int = 1, extra: str = "", legs: int = 0) -> str:
    """One circuit: ``where`` is ``slot = N`` or ``phases = "AB"``; ``legs``: one load each."""
    if legs:
        va = "[" + ", ".join(str(int(rng.integers(4, 30)) * 100) for _ in range(legs)) + "]"
    else:
        va = str(int(rng.integers(5, 40)) * 100 * poles)
    profile = PROFILES[int(rng.integers(0, 3))]
    return (
        f'[[circuit]]\n{where}\npoles = {poles}\nname = "{name}"\nload_va = {va}\n'
        f'pf = 0.9\nprofile = "{profile}"\n{extra}\n'
    )


def _feeder(child: str, transformer: bool = False, group: str = "Dyn", secondary="208Y/120") -> str:
    tx = (
        f'transformer = {{ kva = 30, z_pct = 4, x_r = 2, connection = "{group}", '
        f'secondary = "{secondary}" }}\n'
        if transformer
        else ""
    )
    return (
        f'[[circuit]]\nslot = 1\npoles = 3\nname = "Feeder to {child.upper()}"\n'
        f'feeds = "{child}.toml"\nfeeder = {{ length_m = 10, r_ohm_per_km = 0.5, '
        f"x_ohm_per_km = 0.1 }}\n{tx}\n"
    )


def _groups(folder: Path, rng, seed: int) -> None:
    through = seed % 2 == 1
    parent = _feeder("lp", transformer=through)
    parent += _circuit(rng, "slot = 2", "Parent legs", 2, "neutral = true", legs=2)
    parent += _circuit(rng, "slot = 6", "Parent load")
    system = "480Y/277" if through else "208Y/120"
    (folder / "main.toml").write_text(_panel("MAIN", system, 8) + parent)
    cba = 'right_column = "CBA"\n' if seed >= 2 else ""
    tie = 'shared_neutral = "N1"\nhandle_tied = true'
    child = _circuit(rng, "slot = 1", "Group leg 1", extra=tie)
    child += _circuit(rng, "slot = 3", "Group leg 2", extra=tie)
    child += _circuit(rng, "slot = 2", "LP load 1")
    child += _circuit(rng, "slot = 6", "LP load 2")
    child += _circuit(rng, "slot = 5", "Wye load", 3, "neutral = true\nlocked = true", legs=3)
    (folder / "lp.toml").write_text(_panel("LP", "208Y/120", 10, cba) + child)


def _high_leg(folder: Path, rng, seed: int) -> None:
    parent = _feeder("lp")
    parent += _circuit(rng, "slot = 2", "Parent 120 V load")  # row 1: phase A
    parent += _circuit(rng, "slot = 4", "Parent 240 V load", 2)  # rows 2-3: B-C
    (folder / "main.toml").write_text(_panel("MAIN", "240/120D", 8) + parent)
    child = _circuit(rng, "slot = 1", "LP 120 V load 1")  # A
    child += _circuit(rng, "slot = 2", "LP 120 V load 2")  # A
    child += _circuit(rng, "slot = 5", "LP legs", 2, "neutral = true", legs=2)  # C, A
    child += _circuit(rng, "slot = 4", "LP delta load", 3, "", legs=3)  # B, C, A
    if seed % 2:
        child += _circuit(rng, "slot = 11", "LP 120 V load 3")  # row 6: C
    (folder / "lp.toml").write_text(_panel("LP", "240/120D", 12) + child)


def _high_leg_tx(folder: Path, rng, seed: int) -> None:
    if seed % 2:
        parent = _feeder("lp", True, "Dd0", "240/120D")
        parent += _circuit(rng, "slot = 2", "Parent load 1") + _circuit(
            rng, "slot = 4", "Parent load 2"
        )
        (folder / "main.toml").write_text(_panel("MAIN", "480Y/277", 8) + parent)
        child = _circuit(rng, "slot = 1", "LP 120 V load 1")  # A
        child += _circuit(rng, "slot = 2", "LP 120 V load 2")  # A
        child += _circuit(rng, "slot = 6", "LP 120 V load 3")  # C
        child += _circuit(rng, "slot = 3", "LP 240 V load", 2)  # B-C
        (folder / "lp.toml").write_text(_panel("LP", "240/120D", 8) + child)
        return
    parent = _feeder("lp", True, "Dyn1", "208Y/120")
    parent += _circuit(rng, "slot = 2", "Parent 120 V load")  # A
    parent += _circuit(rng, "slot = 6", "Parent 240 V load", 2)  # C-A
    (folder / "main.toml").write_text(_panel("MAIN", "240/120D", 10) + parent)
    child = _circuit(rng, "slot = 1", "LP load 1") + _circuit(rng, "slot = 2", "LP load 2")
    child += _circuit(rng, "slot = 3", "LP load 3")
    child += _circuit(rng, "slot = 4", "LP legs", 2, "neutral = true", legs=2)
    (folder / "lp.toml").write_text(_panel("LP", "208Y/120", 8) + child)


def _rcd(folder: Path, rng, seed: int) -> None:
    parent = _feeder("rail")
    parent += _circuit(rng, "slot = 2", "Parent load")
    (folder / "main.toml").write_text(_panel("MAIN", "400Y/230", 8) + parent)
    phase = "ABC"[seed % 3]
    rcds = (
        f'[[rcd]]\nname = "R1"\npoles = 2\nphase = "{phase}"\n\n[[rcd]]\nname = "R2"\npoles = 4\n\n'
    )
    rail = _circuit(rng, f'phases = "{phase}"', "Behind R1", extra='rcd = "R1"')
    rail += _circuit(rng, 'phases = "A"', "Behind R2 1", extra='rcd = "R2"')
    rail += _circuit(rng, 'phases = "B"', "Behind R2 2", extra='rcd = "R2"')
    if seed % 2:
        tie = 'shared_neutral = "N1"\nhandle_tied = true'
        rail += _circuit(rng, 'phases = "C"', "Group leg 1", extra=tie)
        rail += _circuit(rng, 'phases = "A"', "Group leg 2", extra=tie)
    else:
        rail += _circuit(rng, 'phases = "CA"', "Legs", 2, "neutral = true", legs=2)
    head = _panel("RAIL", "400Y/230", 12, 'layout = "phases"\n')
    (folder / "rail.toml").write_text(head + rcds + rail)


def write_wired_building(folder: Path, kind: str, seed: int) -> Path:
    """The building of ``kind`` (module notes) for ``seed``; returns the parent's file."""
    rng = np.random.default_rng(3000 + seed)
    makers = {"groups": _groups, "high-leg": _high_leg, "rcd": _rcd, "high-leg-tx": _high_leg_tx}
    makers[kind](folder, rng, seed)
    return folder / "main.toml"
