"""Number formatting shared by the widgets (units always written out)."""

from __future__ import annotations

from tri.schedule.model import Circuit, Schedule


def amps(value: float | None, width: int = 0) -> str:
    """``"112.4 A"``; ``"-"`` for None."""
    if value is None:
        return "-".rjust(width)
    text = f"{value:.1f} A" if abs(value) < 1000 else f"{value:.0f} A"
    return text.rjust(width)


def pct(value: float | None, digits: int = 1) -> str:
    """``"12.3 %"``; ``"-"`` for None."""
    if value is None:
        return "-"
    return f"{value:.{digits}f} %"


def deg(value: float) -> str:
    """``"∠-12.3°"``."""
    return f"∠{value:.1f}°"


def power(value: float, unit: str) -> str:
    """``"1200 VA"``, ``"12.5 kVA"`` (kilo above 10 000)."""
    if abs(value) >= 10_000:
        return f"{value / 1000:.1f} k{unit}"
    if float(value).is_integer():
        return f"{value:.0f} {unit}"
    return f"{value:.1f} {unit}"


def load_text(circuit: Circuit) -> str:
    """The load as the schedule gives it, with its unit."""
    if circuit.load_kind == "a":
        return f"{circuit.load_value:g} A"
    return power(circuit.load_value, "VA" if circuit.load_kind == "va" else "W")


def pf_text(circuit: Circuit) -> str:
    """``"0.95"`` (lagging) or ``"0.90 ld"`` (leading); ``"1"`` for unity."""
    if circuit.pf >= 0.9995:
        return "1"
    return f"{circuit.pf:.2f}" + (" ld" if circuit.leading else "")


def place_text(circuit: Circuit, schedule: Schedule) -> str:
    """Slot (two-column) or phases (rail board); ``"new"`` when unplaced."""
    if circuit.slot is not None:
        return str(circuit.slot)
    if circuit.phases is None:
        return "new"
    return schedule.phase_text(circuit.phases)


def parse_number(text: str) -> int | float | str | None:
    """A number typed in a field: ``""`` is None, ``"1.2k"`` is 1200; else the text itself.

    The text is returned unchanged when it is not a number, so the schedule
    loader's own rules report it ("found 'abc' (text), expected a number").
    """
    t = text.strip().replace("_", "").replace(",", ".") if text.count(",") == 1 else text.strip()
    if not t:
        return None
    scale = 1.0
    if t[-1] in "kK":
        scale, t = 1000.0, t[:-1].strip()
    try:
        value = float(t) * scale
    except ValueError:
        return text.strip()
    if value.is_integer() and "." not in t and scale == 1.0 and "e" not in t.lower():
        return int(value)
    return value
