"""Number formatting shared by the widgets (units always written out)."""

from __future__ import annotations

from tri.schedule.model import Circuit, Schedule


def num(value: float, digits: int = 1) -> str:
    """``value`` to ``digits`` decimals, never ``"-0.0"`` (a value that rounds to zero is 0)."""
    text = f"{value:.{digits}f}"
    if text.startswith("-") and float(text) == 0.0:
        text = text[1:]
    return text


def amps(value: float | None, width: int = 0) -> str:
    """``"112.4 A"``; ``"-"`` for None."""
    if value is None:
        return "-".rjust(width)
    text = f"{num(value)} A" if abs(value) < 1000 else f"{num(value, 0)} A"
    return text.rjust(width)


def pct(value: float | None, digits: int = 1) -> str:
    """``"12.3 %"``; ``"-"`` for None."""
    if value is None:
        return "-"
    return f"{num(value, digits)} %"


def deg(value: float) -> str:
    """``"∠-12.3°"``; an angle that rounds to zero is ``"∠0.0°"``, never ``"∠-0.0°"``."""
    return f"∠{num(value)}°"


def power(value: float, unit: str) -> str:
    """``"1200 VA"``, ``"12.5 kVA"`` (kilo above 10 000)."""
    if abs(value) >= 10_000:
        return f"{value / 1000:.1f} k{unit}"
    if float(value).is_integer():
        return f"{value:.0f} {unit}"
    return f"{value:.1f} {unit}"


def load_text(circuit: Circuit) -> str:
    """The load as the schedule gives it, with its unit (``"feeder"`` for a feeder circuit)."""
    if circuit.feed is not None:
        return "feeder"
    if circuit.spare:
        return "spare"
    if circuit.load_kind == "a":
        return f"{circuit.load_value:g} A"
    return power(circuit.load_value, "VA" if circuit.load_kind == "va" else "W")


def pf_text(circuit: Circuit) -> str:
    """``"0.95"`` (lagging) or ``"0.90ld"`` (leading); ``"1"`` for unity; ``"-"`` for a feeder."""
    if circuit.feed is not None or circuit.spare:
        return "-"
    if circuit.pf >= 0.9995:
        return "1"
    return f"{circuit.pf:.2f}" + ("ld" if circuit.leading else "")


def breaker_text(circuit: Circuit) -> str:
    """``"20A"``; ``"-"`` when the schedule gives no rating."""
    return "-" if circuit.breaker_a is None else f"{circuit.breaker_a:g}A"


def shorten(text: str, width: int, keep_from: int | None = None) -> str:
    """``text`` in at most ``width`` cells, an ellipsis wherever something was cut.

    ``keep_from`` is the index of the first character that tells this text
    apart from a similar one ("bay 3" in "EV charger, bay 3 (22 kW)"): the
    cut then goes before the word holding it (or the word before, when that
    word is short, like a number), so the distinguishing words stay visible.
    """
    if len(text) <= width:
        return text
    if width <= 1:
        return "…"[:width]
    if keep_from is None or keep_from < width - 1:
        return text[: width - 1] + "…"
    start = text.rfind(" ", 0, keep_from) + 1
    if keep_from - start <= 3 and start > 0:
        start = text.rfind(" ", 0, start - 1) + 1
    end = text.find(" ", keep_from)
    end = len(text) if end < 0 else end
    key, after = text[start:end], text[end:]
    room = width - 1 - len(key)  # cells left for the head and what follows the key
    if room < 3:
        return "…" + text[start : start + width - 2] + "…"
    if len(after) <= room - 4:
        return text[: room - len(after)].rstrip(" ,;-") + "…" + key + after
    head_cells = max(room - 1 - max(room // 2, 0), 3)
    after_cells = room - head_cells - 1
    if after_cells < 4:
        head_cells, after = room - 1, ""
    head = text[:head_cells].rstrip(" ,;-")
    tail = after[: width - len(head) - len(key) - 2] if after else ""
    return head + "…" + key + tail + "…"


def _first_difference(a: str, b: str) -> int:
    k = 0
    while k < len(a) and k < len(b) and a[k] == b[k]:
        k += 1
    return k


def fit_names(names: list[str], width: int) -> list[str]:
    """Every name shortened to ``width``, names that would look alike kept apart.

    A name cut at its end that would read the same as another's is cut in
    the middle instead, so the text where they differ stays on screen
    ("High-bay…bays 3-4", "High-bay…bays 5-6").
    """
    plain = [shorten(n, width) for n in names]
    groups: dict[str, set[str]] = {}
    for name, short in zip(names, plain, strict=True):
        groups.setdefault(short, set()).add(name)
    out = []
    for name, short in zip(names, plain, strict=True):
        others = groups[short] - {name}
        if len(name) <= width or not others:
            out.append(short)
            continue
        keep = max(_first_difference(name, o) for o in others)
        out.append(shorten(name, width, keep_from=min(keep, len(name) - 1)))
    return out


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
