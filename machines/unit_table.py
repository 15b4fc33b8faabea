"""pint's answers for the unit spellings people write, stored so that a command need not import pint.

Importing pint takes about 0.1 s, as long as the interpreter and numpy together, and a command reads only a
handful of units. So every spelling in :data:`SPELLINGS` is parsed once by pint, from the same definitions file
the registry is built from (``machines/units.txt``), and pint's answers are kept in ``machines/units.json``:

- ``name``: pint's name of the unit (``"kilovolt"``);
- ``dims``: its dimensionality (``{"[current]": -1, "[length]": 2, ...}``);
- ``to``: the factor pint converts it by into the SI unit of each kind of quantity that has this dimensionality
  (``{"V": 1000.0}``); empty for a unit with an offset (an absolute temperature), which only pint converts.

``machines.units`` uses a stored answer when the unit text is one of these spellings and asks pint otherwise, so
pint stays the one authority: ``value * factor`` is exactly what ``Quantity(value, unit).m_as(si_unit)`` computes
(pint multiplies by the same factor), and ``tests/test_unit_definitions.py`` regenerates the table with the
installed pint and compares. The table records the SHA-256 of the definitions file; when the file has changed and
the table was not regenerated, the table is ignored (everything goes to pint) until it is::

    python -m machines.unit_table        # rewrite machines/units.json after editing units.txt or SPELLINGS
"""

from __future__ import annotations

import hashlib
import json
from functools import lru_cache
from pathlib import Path

HERE = Path(__file__).resolve().parent
DEFINITIONS = HERE / "units.txt"
TABLE = HERE / "units.json"

#: SI units a parse converts into (the ``si_unit`` of each kind in ``machines.units.KINDS``, and "pu").
SI_TARGETS = ("A", "V", "W", "VA", "s", "Hz", "rad/s", "kg*m^2", "ohm", "F", "", "pu", "K", "N*m")

#: Unit texts as they reach pint (after ``machines.units`` has applied its aliases and turned superscripts into
#: powers): what people write for each kind, and the common units of other kinds that must be refused by name.
SPELLINGS: tuple[str, ...] = (
    # current
    "A", "kA", "mA", "µA", "uA", "amp",
    # voltage
    "V", "kV", "mV", "MV",
    # active power
    "W", "kW", "MW", "GW", "mW", "hp",
    # apparent and reactive power
    "VA", "kVA", "MVA", "GVA", "var", "kvar", "Mvar", "VAr", "kVAr", "MVAr",
    # time
    "s", "ms", "µs", "us", "sec", "min", "h", "hr", "d", "a",
    # frequency and speed
    "Hz", "kHz", "mHz", "rpm", "rps", "rad/s",
    # moment of inertia (J, or WK² in lb*ft^2)
    "kg*m^2", "kg·m^2", "kg m^2", "kg*m**2", "g*cm^2",
    "lb*ft^2", "lb·ft^2", "lb ft^2", "lb*ft**2", "lb*in^2", "slug*ft^2",
    # impedance
    "ohm", "Ω", "kohm", "kΩ", "mohm", "mΩ", "Mohm", "MΩ",
    # capacitance
    "F", "mF", "uF", "µF", "μF", "nF", "pF",
    # per unit
    "pu", "%", "percent",
    # temperature (a rise) and absolute temperature
    "K", "kelvin", "degC", "°C", "delta_degC", "degF", "°F", "delta_degF",
    # torque
    "N*m", "N·m", "N m", "kN*m", "kN·m", "lbf*ft", "ft*lbf", "lbf·ft", "lbf*in", "kgf*m",
    # other kinds, refused by name
    "kg", "g", "lb", "m", "mm", "cm", "km", "ft", "in", "m^2", "m^3", "L",
    "J", "kJ", "N", "kN", "lbf", "C", "S", "H", "mH",
    "deg", "°", "degree", "rad", "radian", "turn",
)


class UnitInfo:
    """What a parse needs to know of a unit: pint's name, the dimensionality, the factors into SI units.

    Compares equal to another ``UnitInfo`` with the same name and dimensionality, whichever way it was obtained;
    ``str()`` is pint's name, as for a pint unit.
    """

    __slots__ = ("name", "dimensionality", "to", "text", "as_delta")

    def __init__(self, name: str, dims: dict, to: dict, text: str, as_delta: bool):
        self.name = name
        self.dimensionality = tuple(sorted(dims.items()))  #: ((base dimension, exponent), ...)
        self.to = dict(to)  #: SI unit -> pint's conversion factor
        self.text = text  #: the unit text as handed to pint
        self.as_delta = as_delta

    def __str__(self) -> str:
        return self.name

    def __repr__(self) -> str:
        return f"UnitInfo({self.text!r}: {self.name})"

    def __eq__(self, other) -> bool:
        return isinstance(other, UnitInfo) and (self.name, self.dimensionality) == (other.name, other.dimensionality)

    def __hash__(self) -> int:
        return hash((self.name, self.dimensionality))


def answer(ureg, units) -> dict:
    """pint's answer for one parsed unit: name, dimensionality and the factors into the SI units it matches."""
    dims = {str(k): v for k, v in units.dimensionality.items()}
    to = {}
    for si in SI_TARGETS:
        target = ureg.parse_units(si)
        if target.dimensionality != units.dimensionality:
            continue
        if ureg.Quantity(0.0, units).m_as(target) != 0.0:  # an offset unit (°C, °F): not a factor
            return {"name": str(units), "dims": dims, "to": {}}
        to[si] = float(ureg.Quantity(1.0, units).m_as(target))
    return {"name": str(units), "dims": dims, "to": to}


def info(entry: dict, text: str, as_delta: bool) -> UnitInfo:
    return UnitInfo(entry["name"], entry["dims"], entry["to"], text, as_delta)


def definitions_digest() -> str:
    return hashlib.sha256(DEFINITIONS.read_bytes()).hexdigest()


@lru_cache(maxsize=1)
def stored() -> dict:
    """The stored table, or an empty one when it is missing or was made from other definitions."""
    try:
        table = json.loads(TABLE.read_text("utf-8"))
    except (OSError, ValueError):
        return {"units": {}, "delta": {}}
    if table.get("definitions_sha256") != definitions_digest():
        return {"units": {}, "delta": {}}
    return table


def lookup(text: str, as_delta: bool) -> UnitInfo | None:
    """The stored answer for ``text``, or None when pint must be asked."""
    table = stored()
    entry = (table["delta"].get(text) if as_delta else None) or table["units"].get(text)
    return None if entry is None else info(entry, text, as_delta)


def build(ureg) -> dict:
    """The table for :data:`SPELLINGS`, asked of ``ureg`` (the registry built from the definitions file)."""
    units, delta = {}, {}
    for text in SPELLINGS:
        plain = answer(ureg, ureg.parse_units(text))
        units[text] = plain
        as_delta = answer(ureg, ureg.parse_units(text, as_delta=True))
        if as_delta != plain:
            delta[text] = as_delta
    return {"definitions_sha256": definitions_digest(), "units": units, "delta": delta}


def dumps(table: dict) -> str:
    """The table as JSON, one unit a line (readable diffs)."""

    def block(entries: dict) -> str:
        lines = [f" {json.dumps(k, ensure_ascii=False)}: {json.dumps(v, ensure_ascii=False, sort_keys=True)}"
                 for k, v in sorted(entries.items())]
        return "{\n" + ",\n".join(lines) + "\n}" if lines else "{}"

    return (f'{{"definitions_sha256": "{table["definitions_sha256"]}",\n"delta": {block(table["delta"])},\n'
            f'"units": {block(table["units"])}}}\n')


def main() -> int:
    from machines.units import registry

    TABLE.write_text(dumps(build(registry())), "utf-8")
    print(f"wrote {TABLE} ({len(SPELLINGS)} spellings)")
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
