"""Unit-aware parsing: accepted forms, refused forms with their messages, and a fuzz of random text."""

from __future__ import annotations

import time

import pytest
from hypothesis import given, settings, strategies as st

from machines.errors import InputError
from machines.units import parse_quantity


@pytest.mark.parametrize("text, kind, unit, expected", [
    ("6.6 kV", "voltage", "V", 6600.0),
    ("6600 V", "voltage", "V", 6600.0),
    # 1 hp = 745.6999 W (NIST SP 811, B.8: horsepower, 550 ft·lbf/s)
    ("1500 hp", "active_power", "W", 1500 * 745.69987),
    ("1.1 MW", "active_power", "W", 1.1e6),
    ("1100 kW", "active_power", "W", 1.1e6),
    ("28 kg*m^2", "inertia", "kg*m^2", 28.0),
    ("28 kg·m²", "inertia", "kg*m^2", 28.0),
    # 1 lb·ft² = 0.04214011 kg·m² (NIST SP 811, B.8: pound-foot squared)
    ("675 lb*ft^2", "inertia", "kg*m^2", 675 * 0.04214011),
    ("12 %", "per_unit", "", 0.12),
    ("0.2 pu", "per_unit", "", 0.2),
    ("0.2", "per_unit", "", 0.2),
    ("1 p.u.", "per_unit", "", 1.0),
    ("12.5 MVA", "apparent_power", "VA", 12.5e6),
    ("250 MVA", "apparent_power", "MVA", 250.0),
    ("96 A", "current", "A", 96.0),
    ("6.3 kA", "current", "A", 6300.0),
    ("250 mA", "current", "A", 0.25),
    ("60 Hz", "frequency", "Hz", 60.0),
    ("2 min", "time", "s", 120.0),
    ("150 ms", "time", "s", 0.15),
    ("0.25 uF", "capacitance", "F", 0.25e-6),
    ("0.25 µF", "capacitance", "F", 0.25e-6),
    ("3.5 ohm", "impedance", "ohm", 3.5),
    ("3.5 Ω", "impedance", "ohm", 3.5),
    ("80 K", "temperature_rise", "K", 80.0),
    ("80 degC", "temperature_rise", "K", 80.0),  # a rise: 80 °C of rise is 80 K, not 353.15 K
    ("1e3 V", "voltage", "V", 1000.0),
    ("  4.16 kV  ", "voltage", "V", 4160.0),
])
def test_accepted_forms(text, kind, unit, expected):
    assert parse_quantity(text, kind, unit or None) == pytest.approx(expected, rel=1e-6)


def test_rpm_is_converted_to_radians_per_second():
    # 1 rpm = 2π/60 rad/s (definition of the revolution, NIST SP 811)
    assert parse_quantity("1800 rpm", "speed") == pytest.approx(1800 * 2 * 3.141592653589793 / 60)


def test_bare_number_takes_the_unit_shown():
    assert parse_quantity("4.16", "voltage", default_unit="kV") == pytest.approx(4160.0)
    assert parse_quantity(96, "current", default_unit="A") == 96.0


@pytest.mark.parametrize("text, kind, message", [
    ("245 V", "current", r"'245 V' is a voltage; expected a current such as '96 A'"),
    ("96 Amp", "current", r"unknown unit 'Amp' \(units are case-sensitive"),
    ("96 a", "current", r"'96 a' is a time \(units are case-sensitive: did you mean 'A'\?\)"),
    ("4.16 KV", "voltage", r"unknown unit 'KV' \(units are case-sensitive"),
    ("4,16 kV", "voltage", r"commas are not accepted"),
    ("4,160 V", "voltage", r"commas are not accepted"),
    ("nan A", "current", r"not a finite number"),
    ("inf A", "current", r"not a finite number"),
    ("1e999 A", "current", r"not a finite number"),
    ("-5 A", "current", r"a negative value is impossible"),
    ("0 A", "current", r"zero is impossible"),
    ("10 ** 10 ** 10 A", "current", r"is not a unit this tool reads"),
    ("3 m^10^10^10", "current", r"is not a unit this tool reads"),
    ("1 MVA", "active_power", r"apparent and reactive power"),
    ("1 MW", "apparent_power", r"written in VA, kVA or MVA"),
    ("60 Hz", "speed", r"not Hz"),
    ("96", "current", r"the unit is missing"),
    ("", "current", r"the value is empty"),
    ("kV 6.6", "voltage", r"does not start with a number"),
    ("3 pu", "current", r"'3 pu' is a plain number"),
    ("3 kg", "current", r"'3 kg' is a mass"),
    ("x" * 2000, "current", r"text is too long"),
])
def test_refused_forms_name_the_value_and_the_kind(text, kind, message):
    with pytest.raises(InputError, match=message) as err:
        parse_quantity(text, kind, key="machine.rated_current")
    line = str(err.value)
    assert line.startswith("machine.rated_current: ")
    assert "\n" not in line


def test_refused_bool_and_list():
    with pytest.raises(InputError, match="true/false is not a quantity"):
        parse_quantity(True, "current")
    with pytest.raises(InputError, match="a list is not a quantity"):
        parse_quantity([1], "current")


@settings(max_examples=400, deadline=None, derandomize=True)
@given(st.text(max_size=1024))
def test_fuzz_random_text_only_raises_our_error_and_is_fast(text):
    parse_quantity("1 A", "current")  # registry built outside the timed region
    assert _parse_time(text, "current") < 0.010


@settings(max_examples=300, deadline=None, derandomize=True)
@given(st.from_regex(r"[0-9. e*^/()A-Za-z%-]{0,60}", fullmatch=True))
def test_fuzz_unit_like_text(text):
    parse_quantity("1 A", "current")
    assert _parse_time(text, "voltage") < 0.010


def _parse_time(text: str, kind: str) -> float:
    """Seconds one parse takes; a slow first try is timed once more, so that a pause of the machine (another
    process, the garbage collector) is not taken for a slow parse. Only our own error may come out."""
    best = float("inf")
    for _ in range(2):
        start = time.perf_counter()
        try:
            parse_quantity(text, kind, key="k")
        except InputError:
            pass
        best = min(best, time.perf_counter() - start)
        if best < 0.010:
            break
    return best
