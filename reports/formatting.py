"""How values read on screen and on paper: SI numbers from the record in the units a practitioner writes.

Layout only: no pint, no calculation beyond choosing a unit prefix and rounding for print.
"""

from __future__ import annotations

import math
import re
from typing import Any

NBSP = "\u00a0"  #: a space a line never breaks at (between a number and its unit)

# SI unit -> list of (threshold, display unit, factor); first threshold the magnitude reaches wins.
_SCALES: dict[str, list[tuple[float, str, float]]] = {
    "V": [(1e3, "kV", 1e-3), (0.0, "V", 1.0)],
    "W": [(1e6, "MW", 1e-6), (1e3, "kW", 1e-3), (0.0, "W", 1.0)],
    "VA": [(1e6, "MVA", 1e-6), (1e3, "kVA", 1e-3), (0.0, "VA", 1.0)],
    "A": [(1e4, "kA", 1e-3), (0.0, "A", 1.0)],
    "F": [(1e-8, "µF", 1e6), (0.0, "nF", 1e9)],
    "ohm": [(1e3, "kΩ", 1e-3), (0.0, "Ω", 1.0)],
    "s": [(0.0, "s", 1.0)],
    "kg*m^2": [(0.0, "kg·m²", 1.0)],
}
_PLAIN = {"pu": "pu", "": "", "Hz": "Hz", "Hz/s": "Hz/s", "%": "%", "K": "K", "rpm": "rpm", "N*m": "N·m",
          "pu V/Hz": "pu V/Hz", "s/h": "s/h", "1/h": "per hour"}


def number(x: float, digits: int = 4) -> str:
    """A float to ``digits`` significant figures, without exponent for everyday magnitudes.

    >>> number(105.6123), number(0.0004321), number(612.0), number(1e7)
    ('105.6', '0.0004321', '612', '1.000e+07')
    """
    if x == 0:
        return "0"
    if not math.isfinite(x):
        return "—"
    mag = abs(x)
    if mag >= 1e6 or mag < 1e-4:
        return f"{x:.{digits - 1}e}"
    decimals = max(digits - 1 - int(math.floor(math.log10(mag))), 0)
    text = f"{x:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text


def quantity(value: Any, unit: str, digits: int = 4) -> str:
    """A record value with its unit, e.g. ``quantity(4160.0, "V") == "4.16 kV"``.

    >>> quantity(4160.0, "V"), quantity(1.2e6, "W"), quantity(2.5e-7, "F"), quantity(True, "")
    ('4.16 kV', '1.2 MW', '0.25 µF', 'yes')
    """
    if isinstance(value, bool):
        return "yes" if value else "no"
    if value is None:
        return "—"
    if isinstance(value, str):
        return value
    if isinstance(value, (list, tuple)):
        return "; ".join(_stage(v) for v in value)
    if not isinstance(value, (int, float)):
        return str(value)
    if unit in _SCALES:
        for threshold, shown, factor in _SCALES[unit]:
            if abs(value) >= threshold:
                return f"{number(value * factor, digits)} {shown}"
    shown = _PLAIN.get(unit, unit)
    return f"{number(float(value), digits)} {shown}".strip()


def _stage(v: Any) -> str:
    if isinstance(v, dict):
        parts = []
        for k, x in v.items():
            unit = {"frequency": "Hz", "time_delay": "s", "low": "Hz", "high": "Hz", "allowed": "s"}.get(k, "")
            parts.append(quantity(x, unit) if isinstance(x, (int, float)) else str(x))
        return " / ".join(parts)
    return quantity(v, "")


def glue_units(text: str) -> str:
    """``text`` with a no-break space between each number and the unit after it, so no line ends between them.

    >>> glue_units("margin +0.0 s, 22.5 min") == "margin +0.0\u00a0s, 22.5\u00a0min"
    True
    """
    return _NUMBER_UNIT.sub(NBSP, text)


_NUMBER_UNIT = re.compile(r"(?<=[0-9]) (?=(?:[kMmµ]?(?:A|V|W|VA|Hz|Ω|s|min|h|pu|%|var|VAr)|°C|K)(?![A-Za-z0-9]))")


def setting_primary(s: dict) -> str:
    """Primary value of a record setting (JSON form)."""
    return quantity(s.get("value"), s.get("unit", ""))


def setting_secondary(s: dict) -> str:
    """Relay-side value of a record setting, or '' where no instrument transformer applies."""
    if s.get("secondary") is None:
        return ""
    return quantity(s["secondary"], s.get("secondary_unit", ""))


def label_of(key: str, s: dict | None = None) -> str:
    """The printed name of a setting key: its label, else the key in words.

    >>> label_of("pickup_current")
    'Pickup current'
    """
    if s and s.get("label"):
        return s["label"]
    text = key.replace("_", " ")
    return text[:1].upper() + text[1:]
