"""Unit-aware parsing: the one place where text from people and files becomes SI floats.

The pint registry is built from relaywright's own definitions file, ``machines/units.txt`` (the units people write
for each kind, and the common units of other kinds so that a wrong kind is refused by name), on first use; pint's
answers for the usual spellings are also stored beside it (``machines/unit_table.py``), so that most commands never
import pint at all. Text never reaches pint whole: a linear regular expression splits it into a number and a
unit first, the number is read by Python's ``float`` and only the unit (a short, checked string of names, powers
and operators) is handed to ``UnitRegistry.parse_units``. That keeps pathological text such as ``10 ** 10 ** 10 A``
from ever being evaluated and bounds the time of a parse.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from machines.errors import InputError, one_line
from machines.frozen import frozen
from machines.unit_table import DEFINITIONS, UnitInfo, answer, info, lookup

MAX_TEXT = 120  # characters; a quantity a person writes is far shorter


@frozen
class Kind:
    """A kind of quantity a field expects."""

    name: str  #: canonical name, e.g. "current"
    noun: str  #: "a current"
    si_unit: str  #: the unit floats are returned in
    example: str  #: shown in error messages
    reference: str  #: a unit of this kind's dimensionality (pint syntax)
    positive: bool = True  #: negative values are impossible


KINDS: dict[str, Kind] = {
    k.name: k
    for k in (
        Kind("current", "a current", "A", "96 A", "A"),
        Kind("voltage", "a voltage", "V", "6.6 kV", "V"),
        Kind("active_power", "an active or shaft power", "W", "1500 hp", "W"),
        Kind("apparent_power", "an apparent power", "VA", "12.5 MVA", "W"),
        Kind("time", "a time", "s", "12 s", "s"),
        Kind("frequency", "a frequency", "Hz", "60 Hz", "Hz"),
        Kind("speed", "a rotational speed", "rad/s", "1785 rpm", "Hz"),
        Kind("inertia", "a moment of inertia", "kg*m^2", "28 kg*m^2", "kg*m^2"),
        Kind("impedance", "an impedance", "ohm", "0.5 ohm", "ohm"),
        Kind("capacitance", "a capacitance", "F", "0.25 uF", "F"),
        Kind("per_unit", "a per-unit value", "", "0.2 pu", "pu"),
        Kind("temperature_rise", "a temperature rise", "K", "80 K", "K"),
        Kind("torque", "a torque", "N*m", "5000 N*m", "N*m"),
    )
}

# What a person wrote instead, by reference unit (first match wins).
_NOUNS = (
    ("A", "a current"), ("V", "a voltage"), ("W", "a power"), ("s", "a time"), ("Hz", "a frequency or speed"),
    ("kg*m^2", "a moment of inertia"), ("ohm", "an impedance"), ("F", "a capacitance"), ("pu", "a plain number"),
    ("K", "a temperature"), ("N*m", "a torque or energy"), ("kg", "a mass"), ("m", "a length"),
    ("m^2", "an area"), ("m^3", "a volume"),
)


@lru_cache(maxsize=None)
def _dimensionality(unit: str):
    return _parse_units(unit, False).dimensionality


# number, then an optional unit; both parts linear, no nested optional groups.
_NUMBER = re.compile(r"[+-]?(?:\d{1,30}(?:\.\d{0,30})?|\.\d{1,30})(?:[eE][+-]?\d{1,4})?")
_NAME = r"(?:[A-Za-zµμΩ°%_]{1,16})"
_POWER = r"(?:(?:\^|\*\*)-?[1-4])?"
_UNIT = re.compile(rf"{_NAME}{_POWER}(?:\s*[*/·]\s*{_NAME}{_POWER}|\s+{_NAME}{_POWER}){{0,5}}")
_SUPERSCRIPTS = str.maketrans({"²": "^2", "³": "^3", "⁻": "-", "¹": "^1"})
_ALIASES = {"p.u.": "pu", "p.u": "pu", "Ohm": "ohm", "ohms": "ohm", "Ohms": "ohm", "r/min": "rpm", "RPM": "rpm"}
#: a hyphen between two unit names is a product, as in "lb-ft²" (pound-foot squared) or "N-m"
_HYPHEN_PRODUCT = re.compile(r"(?<=[A-Za-zµμΩ°])-(?=[A-Za-zµμΩ°])")
#: how people write a temperature rise in degrees: a rise of 80 °C is a rise of 80 K (a difference, not a
#: temperature); "C" alone is the coulomb to pint, but no one gives a temperature rise in coulombs
_RISE_UNITS = {
    **dict.fromkeys(("C", "°C", "ºC", "degC", "deg C", "deg_C", "Celsius", "celsius", "degree_Celsius",
                     "degrees C", "degree C"), "delta_degC"),
    **dict.fromkeys(("°F", "ºF", "degF", "deg F", "Fahrenheit", "fahrenheit", "degree_Fahrenheit"), "delta_degF"),
}
#: what a per-unit (or a ratio) may be written in; other dimensionless units (degrees, radians, turns) are angles
#: or counts, never per-unit: "25.8 deg" for a power factor is refused, not read as 0.45
_PER_UNIT_NAMES = {"per_unit", "percent", "permille", "dimensionless"}
_ANGLE_NAMES = ("degree", "radian", "arcminute", "arcsecond", "turn", "revolution", "gradian", "grade", "steradian",
                "cycle")


@lru_cache(maxsize=1)
def registry():
    """The process's single pint ``UnitRegistry``, built on first call from ``machines/units.txt``.

    The file holds only the units relaywright reads (``per_unit = pu``, reactive power ``var``, ``%``, ``µ`` and
    ``Ω`` among them), so the registry builds in about 10 ms where pint's full default one takes about 150 ms.
    """
    import pint

    return pint.UnitRegistry(str(DEFINITIONS), autoconvert_offset_to_baseunit=False)


def quantity(value: float, unit: str):
    """Build a pint quantity in code (display edges only)."""
    return registry().Quantity(value, unit)


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """Convert a float between two units of the same kind, through pint."""
    if from_unit == to_unit:
        return float(value)
    return float(registry().Quantity(value, from_unit).m_as(to_unit))


def _kind(expected: str | Kind) -> Kind:
    if isinstance(expected, Kind):
        return expected
    try:
        return KINDS[expected]
    except KeyError:
        raise ValueError(f"unknown kind of quantity {expected!r}") from None


def _fail(key: str, text: str, detail: str, kind: Kind) -> InputError:
    return InputError(key, f"{detail}; expected {kind.noun} such as '{kind.example}', got {one_line(text)}")


@lru_cache(maxsize=512)
def _parse_units(unit_text: str, as_delta: bool) -> UnitInfo:
    """pint's reading of a unit text: the stored answer for a usual spelling, else pint asked (see unit_table)."""
    found = lookup(unit_text, as_delta)
    if found is not None:
        return found
    ureg = registry()
    return info(answer(ureg, ureg.parse_units(unit_text, as_delta=as_delta)), unit_text, as_delta)


def _magnitude(value: float, units: UnitInfo, to_unit: str) -> float:
    """``value`` in ``units`` expressed in ``to_unit``: pint's factor when stored, else pint converts."""
    factor = units.to.get(to_unit)
    if factor is not None:
        return value * factor  # what pint computes: value times the same conversion factor
    target = lookup(to_unit, False)  # a display unit (kV, µF, min): through the SI unit both have a factor to
    if target is not None and target.dimensionality == units.dimensionality:
        for si, f in units.to.items():
            g = target.to.get(si)
            if g:
                return value * f / g
    ureg = registry()
    return ureg.Quantity(value, ureg.parse_units(units.text, as_delta=units.as_delta)).m_as(to_unit)


def _case_hint(unit_text: str, kind: Kind) -> str:
    """' (units are case-sensitive: did you mean 'kA'?)' when another spelling has the expected kind."""
    for cand in (unit_text.upper(), unit_text.lower(), unit_text[:1].lower() + unit_text[1:].upper()):
        if cand == unit_text or not _UNIT.fullmatch(cand):
            continue
        try:
            if _parse_units(cand, False).dimensionality == _dimensionality(kind.reference):
                return f" (units are case-sensitive: did you mean '{cand}'?)"
        except Exception:
            continue
    return ""


def parse_quantity(
    text: str | int | float,
    expected_dimension: str | Kind,
    to_unit: str | None = None,
    *,
    key: str = "",
    default_unit: str | None = None,
    allow_negative: bool = False,
    allow_zero: bool = False,
) -> float:
    """Read a quantity written by a person and return its magnitude in ``to_unit`` (SI by default).

    Parameters
    ----------
    text : the quantity as written, e.g. ``"6.6 kV"``, ``"1500 hp"``, ``"28 kg*m^2"``, ``"12 %"``, ``"0.2 pu"``.
        A TOML number (int or float) or a bare number takes ``default_unit``; without one, a bare number is
        accepted only for per-unit kinds.
    expected_dimension : a kind name from ``KINDS`` (``"current"``, ``"voltage"``, ``"active_power"``, ...).
    to_unit : unit of the returned float; the kind's SI unit when omitted.
    key : key path named in errors, e.g. ``"machine.rated_current"``.
    default_unit : unit that a bare number is taken in (the wizard shows it beside the question).
    allow_negative, allow_zero : whether such values make physical sense for the field.

    Raises
    ------
    InputError with a one-line message naming the key, the value and what was expected.

    Examples
    --------
    >>> parse_quantity("6.6 kV", "voltage")
    6600.0
    >>> round(parse_quantity("1500 hp", "active_power", "kW"), 2)
    1118.55
    >>> parse_quantity("12 %", "per_unit")
    0.12
    """
    kind = _kind(expected_dimension)
    to_unit = kind.si_unit if to_unit is None else to_unit
    if isinstance(text, bool):
        raise _fail(key, str(text), "true/false is not a quantity", kind)
    if isinstance(text, (int, float)):
        value = float(text)
        unit_text = ""
        shown = repr(text)
    elif isinstance(text, str):
        shown = text
        if len(text) > MAX_TEXT:
            raise _fail(key, text, f"text is too long ({len(text)} characters, at most {MAX_TEXT})", kind)
        s = text.strip()
        if not s:
            raise _fail(key, text, "the value is empty", kind)
        if "," in s:
            raise _fail(key, text, "commas are not accepted (write '4.16 kV', not '4,16 kV' or '4,160 V')", kind)
        if re.match(r"[+-]?(nan|inf)", s, re.IGNORECASE):
            raise _fail(key, text, "not a finite number", kind)
        m = _NUMBER.match(s)
        if not m:
            raise _fail(key, text, "it does not start with a number", kind)
        try:
            value = float(m.group(0))
        except ValueError:  # pragma: no cover - the pattern admits only float syntax
            raise _fail(key, text, "it does not start with a number", kind) from None
        unit_text = s[m.end():].strip()
    else:
        raise _fail(key, repr(text), f"a {type(text).__name__} is not a quantity", kind)

    if not math.isfinite(value):
        raise _fail(key, shown, "not a finite number", kind)

    if not unit_text:
        if default_unit is not None:
            unit_text = default_unit
        elif kind.name == "per_unit":
            unit_text = "pu"
        else:
            raise _fail(key, shown, "the unit is missing", kind)

    unit_text = _HYPHEN_PRODUCT.sub("*", _ALIASES.get(unit_text, unit_text).translate(_SUPERSCRIPTS))
    if kind.name == "temperature_rise":  # a rise is a difference: 80 °C of rise is 80 K
        unit_text = _RISE_UNITS.get(unit_text, unit_text)
    if not _UNIT.fullmatch(unit_text):
        raise _fail(key, shown, f"'{unit_text[:30]}' is not a unit this tool reads", kind)
    try:
        units = _parse_units(unit_text, kind.name == "temperature_rise")
    except Exception:  # pint raises several types; any of them means the unit is not known
        hint = _case_hint(unit_text, kind) or " (units are case-sensitive: 'A', 'kV', 'MVA', 'mA')"
        raise _fail(key, shown, f"unknown unit '{unit_text[:30]}'{hint}", kind) from None

    dim = units.dimensionality
    if dim != _dimensionality(kind.reference):
        what = next((noun for ref, noun in _NOUNS if _dimensionality(ref) == dim), "a quantity of another kind")
        raise _fail(key, shown, f"{one_line(shown)} is {what}{_case_hint(unit_text, kind)}", kind)
    unit_names = str(units)
    if kind.name == "per_unit" and unit_names not in _PER_UNIT_NAMES:
        if any(name in unit_names for name in _ANGLE_NAMES):
            tip = ""
            if key.endswith("power_factor") and unit_names in ("degree", "radian"):
                phi = float(_magnitude(value, units, "radian"))
                tip = f"; a power factor is cos φ (the cosine of {one_line(shown.strip())} is {math.cos(phi):.3f})"
            raise _fail(key, shown, f"{one_line(shown)} is an angle, not a per-unit value or a ratio{tip}", kind)
        raise _fail(key, shown, f"'{unit_text[:30]}' is not a per-unit unit (write pu or %)", kind)
    if kind.name == "apparent_power" and "volt_ampere" not in unit_names:
        raise _fail(key, shown, "an apparent power is written in VA, kVA or MVA", kind)
    if kind.name == "active_power" and "volt_ampere" in unit_names:
        raise _fail(key, shown, "VA and var are apparent and reactive power; give W, kW, MW or hp", kind)
    if kind.name == "speed" and units == _parse_units("Hz", False):
        raise _fail(key, shown, "give a speed in rpm or rad/s, not Hz", kind)

    try:
        result = float(_magnitude(value, units, to_unit))
    except Exception:
        raise _fail(key, shown, f"cannot be expressed in {to_unit}", kind) from None
    if not math.isfinite(result):
        raise _fail(key, shown, "not a finite number", kind)
    if result < 0 and not (allow_negative or not kind.positive):
        raise _fail(key, shown, "a negative value is impossible here", kind)
    if result == 0 and not allow_zero:
        raise _fail(key, shown, "zero is impossible here", kind)
    return result


_ISO_DATE = re.compile(r"\d{4}-\d{2}-\d{2}")


def parse_date(text: object, key: str = "") -> str:
    """A calendar date written year-month-day (ISO 8601, e.g. ``"2026-11-20"``); returned in that form.

    Day-month and month-day forms such as ``"02/12/2026"`` are refused: the same text means 2 December in most of
    the world and February 12 in the United States, and a settings sheet must not be read two ways.

    >>> parse_date(" 2026-11-20 ")
    '2026-11-20'
    >>> parse_date("02/12/2026", "sheet.date")
    Traceback (most recent call last):
    ...
    machines.errors.InputError: sheet.date: '02/12/2026' can be read two ways (day/month or month/day); expected \
an ISO date year-month-day such as '2026-11-20'
    """
    import datetime as _dt

    example = "expected an ISO date year-month-day such as '2026-11-20'"
    if not isinstance(text, str):
        if isinstance(text, _dt.date):  # a TOML date literal
            return text.isoformat()
        raise InputError(key, f"{example}, got {one_line(text)}")
    s = text.strip()
    if re.fullmatch(r"\d{1,2}[./-]\d{1,2}[./-]\d{2,4}", s):
        raise InputError(key, f"{one_line(text)} can be read two ways (day/month or month/day); {example}")
    if not _ISO_DATE.fullmatch(s):
        raise InputError(key, f"{example}, got {one_line(text)}")
    try:
        return _dt.date.fromisoformat(s).isoformat()
    except ValueError:
        raise InputError(key, f"{one_line(text)} is not a day of the calendar; {example}") from None


def parse_fault_level(text: str | int | float, line_voltage: float | None, *, key: str = "") -> tuple[float, str]:
    """A three-phase fault level [VA], written as an apparent power (``"250 MVA"``) or, with the bus voltage known,
    as the fault current (``"25 kA"``: S = √3·U_n·I_k, IEC 60909-0). Returns the value and how it was read ('' when
    it was written as a power).

    >>> s, note = parse_fault_level("25 kA", 6600.0)
    >>> round(s / 1e6, 1), note
    (285.8, '25 kA at 6.6 kV = 285.8 MVA')
    >>> parse_fault_level("250 MVA", None)
    (250000000.0, '')
    """
    from machines.standards.fault_current import three_phase_fault_current

    try:
        return parse_quantity(text, "apparent_power", key=key), ""
    except InputError as as_power:
        try:
            current = parse_quantity(text, "current", key=key)
        except InputError:
            raise as_power from None
    if line_voltage is None:
        raise InputError(key, f"{one_line(text)} is a fault current; with no bus voltage known it cannot be turned "
                              "into a fault level: give it in MVA, e.g. '250 MVA'")
    level = current / three_phase_fault_current(1.0, line_voltage)  # S = √3·U_n·I_k
    return level, f"{str(text).strip()} at {line_voltage / 1e3:.4g} kV = {level / 1e6:.4g} MVA"


def rise_note(text: object) -> str:
    """How a temperature rise written in degrees was read ('' when it was written in kelvin).

    >>> rise_note("80 C")
    "'80 C' read as a temperature rise of 80 K"
    >>> rise_note("80 K")
    ''
    """
    if not isinstance(text, str):
        return ""
    m = _NUMBER.match(text.strip())
    unit = text.strip()[m.end():].strip() if m else ""
    if _RISE_UNITS.get(unit) is None:
        return ""
    return f"{one_line(text.strip())} read as a temperature rise of {parse_quantity(text, 'temperature_rise'):.4g} K"


def written_unit(text: object) -> str:
    """The unit of a quantity as written, '' for a bare number or text that does not start with a number.

    >>> written_unit("1500 hp"), written_unit(" 80K"), written_unit("6.2"), written_unit(0.89)
    ('hp', 'K', '', '')
    """
    if not isinstance(text, str):
        return ""
    s = text.strip()
    m = _NUMBER.match(s)
    return s[m.end():].strip() if m else ""


_PREFIXES = re.compile(r"\b(?:yotta|zetta|exa|peta|tera|giga|mega|kilo|hecto|deca|deci|centi|milli|micro|nano|pico)")


def same_unit(a: str, b: str) -> bool:
    """Whether two written units name the same unit up to an SI prefix and spelling ('kV' and 'V', 'sec' and 's').

    >>> same_unit("sec", "s"), same_unit("kV", "V"), same_unit("hp", "kW"), same_unit("lb*ft^2", "kg*m^2")
    (True, True, False, False)
    """
    if a == b:
        return True
    try:
        names = [_PREFIXES.sub("", str(_parse_units(_HYPHEN_PRODUCT.sub("*", _ALIASES.get(u, u).translate(
            _SUPERSCRIPTS)), False))) for u in (a, b)]
    except Exception:  # pint raises several types; an unreadable unit is not the same as any other
        return False
    return names[0] == names[1]
