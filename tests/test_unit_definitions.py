"""The units relaywright reads (machines/units.txt) and pint's stored answers (machines/units.json).

The independent reference is pint's own default registry: every spelling a person may write must give the same SI
value through relaywright as through it. pint's default registry lacks the per-unit and reactive-power units
(its ``pu`` is a pico unified atomic mass unit), so the reference gets the same two definitions relaywright has
always added to it.
"""

from __future__ import annotations

import json
import warnings
from functools import lru_cache

import pint
import pytest

from machines import unit_table
from machines.units import KINDS, parse_quantity, registry


@lru_cache(maxsize=1)
def reference():
    """pint's default registry, with per_unit and var as relaywright defines them."""
    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=False, on_redefinition="ignore")
    ureg.define("per_unit = 1 = pu")
    ureg.define("volt_ampere_reactive = volt_ampere = var = VAr")
    return ureg


# (unit as written, kind, unit the reference converts from when pint spells it otherwise)
WRITTEN = [
    *[(u, "current", None) for u in ("A", "kA", "mA", "µA", "uA", "amp")],
    *[(u, "voltage", None) for u in ("V", "kV", "mV", "MV")],
    *[(u, "active_power", None) for u in ("W", "kW", "MW", "GW", "mW", "hp")],
    *[(u, "apparent_power", None) for u in ("VA", "kVA", "MVA", "GVA")],
    *[(u, "time", None) for u in ("s", "ms", "µs", "us", "sec", "min", "h", "hr", "d")],
    *[(u, "frequency", None) for u in ("Hz", "kHz", "mHz")],
    *[(u, "speed", None) for u in ("rpm", "rps", "rad/s")],
    ("r/min", "speed", "rpm"), ("RPM", "speed", "rpm"),
    *[(u, "inertia", None) for u in ("kg*m^2", "kg·m^2", "kg m^2", "kg*m**2", "g*cm^2", "lb*ft^2", "lb·ft^2",
                                     "lb ft^2", "lb*ft**2", "lb*in^2", "slug*ft^2")],
    ("kg·m²", "inertia", "kg*m^2"), ("lb·ft²", "inertia", "lb*ft^2"), ("lb*ft²", "inertia", "lb*ft^2"),
    *[(u, "impedance", None) for u in ("ohm", "Ω", "kohm", "kΩ", "mohm", "mΩ", "Mohm", "MΩ")],
    ("ohms", "impedance", "ohm"), ("Ohm", "impedance", "ohm"),
    *[(u, "capacitance", None) for u in ("F", "mF", "uF", "µF", "μF", "nF", "pF")],
    *[(u, "per_unit", None) for u in ("pu", "%", "percent")],
    ("p.u.", "per_unit", "pu"),
    ("K", "temperature_rise", None), ("kelvin", "temperature_rise", None),
    ("degC", "temperature_rise", "delta_degC"), ("delta_degC", "temperature_rise", None),
    ("degF", "temperature_rise", "delta_degF"), ("delta_degF", "temperature_rise", None),
    *[(u, "torque", None) for u in ("N*m", "N·m", "N m", "kN*m", "kN·m", "lbf*ft", "ft*lbf", "lbf·ft", "lbf*in",
                                    "kgf*m")],
    ("GΩ", "impedance", None),  # not a stored spelling: pint reads it from the definitions file
]


@pytest.mark.parametrize("unit, kind, as_pint", WRITTEN)
def test_every_written_unit_gives_the_si_value_of_pints_default_registry(unit, kind, as_pint):
    value = 1.7
    ours = parse_quantity(f"{value} {unit}", kind)
    expected = reference().Quantity(value, as_pint or unit).m_as(KINDS[kind].si_unit)
    assert ours == pytest.approx(expected, rel=1e-12)


def test_every_kind_reads_its_example_and_its_si_unit():
    for kind in KINDS.values():
        number, unit = kind.example.split(" ", 1)
        expected = reference().Quantity(float(number), unit).m_as(kind.si_unit)
        assert parse_quantity(kind.example, kind.name) == pytest.approx(expected, rel=1e-12), kind.name
        assert kind.si_unit in unit_table.SI_TARGETS


@pytest.mark.parametrize("text", unit_table.SPELLINGS)
def test_each_stored_spelling_is_what_pints_default_registry_says(text):
    """Name, dimensionality and factor into SI: the stored answer agrees with the independent registry."""
    entry = json.loads(unit_table.TABLE.read_text("utf-8"))["units"][text]
    ref = reference()
    units = ref.parse_units(text)
    assert entry["name"] == str(units)
    assert entry["dims"] == {str(k): v for k, v in units.dimensionality.items()}
    for si, factor in entry["to"].items():
        assert factor == pytest.approx(ref.Quantity(1.0, units).m_as(si), rel=1e-12)


def test_the_stored_table_is_pints_answer_from_the_definitions_file():
    """Regenerated with the installed pint, the table is the same to the last bit (else run the module)."""
    stored = json.loads(unit_table.TABLE.read_text("utf-8"))
    built = unit_table.build(registry())
    assert stored == json.loads(unit_table.dumps(built)), "run: python -m machines.unit_table"
    assert unit_table.TABLE.read_text("utf-8") == unit_table.dumps(built)


def test_the_definitions_file_builds_a_registry_without_warnings():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        ureg = pint.UnitRegistry(str(unit_table.DEFINITIONS))
    assert str(ureg.parse_units("var")) == "volt_ampere_reactive"


@pytest.mark.parametrize("text, name", [("deg", "degree"), ("°", "degree"), ("rad", "radian"),
                                        ("kg", "kilogram"), ("m^3", "meter ** 3"), ("lb", "pound")])
def test_units_of_other_kinds_are_known_by_name(text, name):
    """Angles, masses, volumes: known, so that the parser can say what was written instead."""
    assert str(registry().parse_units(text)) == name


def test_a_stored_answer_converts_exactly_as_pint_does():
    """value * stored factor is bit for bit pint's m_as (pint multiplies by the same factor)."""
    ureg = registry()
    for text in unit_table.SPELLINGS:
        found = unit_table.lookup(text, False)
        for si, factor in found.to.items():
            for value in (1.7, 4160.0, 0.0125, 1e6 / 3):
                assert value * factor == ureg.Quantity(value, text).m_as(si), (text, si, value)


def test_a_spelling_not_stored_goes_to_pint():
    assert unit_table.lookup("GΩ", False) is None
    assert parse_quantity("2 GΩ", "impedance") == 2e9


def test_a_table_made_from_other_definitions_is_ignored(monkeypatch):
    unit_table.stored.cache_clear()
    monkeypatch.setattr(unit_table, "definitions_digest", lambda: "0" * 64)
    try:
        assert unit_table.lookup("kV", False) is None
    finally:
        monkeypatch.undo()
        unit_table.stored.cache_clear()
    assert unit_table.lookup("kV", False).to == {"V": 1000.0}
