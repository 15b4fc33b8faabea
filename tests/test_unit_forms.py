"""The forms people write quantities in: each accepted or refused as it is meant, in files and in answers."""

from __future__ import annotations

import math

import pytest

from machines.errors import InputError
from machines.files import case_from_dict, load_case, parse_ratio, parse_toml, parse_value
from machines.model import Ratio
from machines.units import parse_date, parse_fault_level, parse_quantity, rise_note

from conftest import EXAMPLES


# ---------------------------------------------------------------------------------------------------- temperature rise


@pytest.mark.parametrize("text", ["80 K", "80K", "80 °C", "80 C", "80C", "80 degC", "80 deg C", "80 ºC"])
def test_a_temperature_rise_in_degrees_celsius_is_a_rise_in_kelvin(text):
    # a difference of 1 °C equals a difference of 1 K (SI Brochure, 9th ed., 2.3.1: the degree Celsius is equal in
    # magnitude to the kelvin); a rise is a difference, so 80 °C of rise is 80 K, never 353.15 K
    assert parse_quantity(text, "temperature_rise") == pytest.approx(80.0)


def test_a_temperature_rise_in_fahrenheit_degrees():
    # a difference of 1 °F is 5/9 K (NIST SP 811, B.9: degree Fahrenheit, temperature interval)
    assert parse_quantity("144 °F", "temperature_rise") == pytest.approx(80.0)


def test_how_a_rise_in_degrees_was_read_is_said():
    assert rise_note("80 C") == "'80 C' read as a temperature rise of 80 K"
    assert rise_note("80 °C") == "'80 °C' read as a temperature rise of 80 K"
    assert rise_note("80 K") == ""


# ---------------------------------------------------------------------------------------------------- inertia


@pytest.mark.parametrize("text", ["420 lb-ft²", "420 lb-ft^2", "420 lb*ft^2", "420 lb·ft²"])
def test_wk2_with_a_hyphen(text):
    # 1 lb·ft² = 0.04214011 kg·m² (NIST SP 811, B.8: pound-foot squared)
    assert parse_quantity(text, "inertia") == pytest.approx(420 * 0.04214011, rel=1e-6)


# ---------------------------------------------------------------------------------------------------- fault level


def test_a_fault_level_in_ka_with_the_bus_voltage_known():
    # IEC 60909-0: S_k = √3·U_n·I_k; 25 kA at 6.6 kV = √3 × 6600 × 25000 = 285.79 MVA
    level, note = parse_fault_level("25 kA", 6600.0, key="supply.fault_level")
    assert level == pytest.approx(math.sqrt(3) * 6600 * 25000)
    assert note == "25 kA at 6.6 kV = 285.8 MVA"
    assert parse_fault_level("250 MVA", 6600.0) == (250e6, "")


def test_a_fault_level_in_ka_without_a_voltage_is_refused_saying_why():
    with pytest.raises(InputError, match=r"^supply\.fault_level: '25 kA' is a fault current; with no bus voltage"):
        parse_fault_level("25 kA", None, key="supply.fault_level")


def test_a_fault_level_in_mw_is_refused_as_before():
    with pytest.raises(InputError, match=r"written in VA, kVA or MVA"):
        parse_fault_level("250 MW", 6600.0)


# ---------------------------------------------------------------------------------------------------- ratios


@pytest.mark.parametrize("text", ["150/5 A", "150:5", "150:5 A", " 150 : 5 A "])
def test_a_ct_ratio_with_a_colon(text):
    assert parse_ratio(text, "instruments.phase_ct", "A") == Ratio(150.0, 5.0)


def test_a_vt_ratio_with_a_colon():
    assert parse_ratio("6600:110 V", "instruments.vt", "V") == Ratio(6600.0, 110.0)


# ---------------------------------------------------------------------------------------------------- per-unit


def test_a_percentage_where_a_per_unit_is_asked():
    assert parse_quantity("15 %", "per_unit") == pytest.approx(0.15)


@pytest.mark.parametrize("text", ["25.8 deg", "25.8 degree", "0.45 rad", "0.45 radian"])
def test_an_angle_is_not_a_power_factor(text):
    # cos 25.8° = 0.9003: the angle is refused, never read as 25.8° = 0.450 rad
    with pytest.raises(InputError) as err:
        parse_quantity(text, "per_unit", key="machine.power_factor")
    assert "is an angle, not a per-unit value or a ratio" in str(err.value)
    assert "0.900" in str(err.value)


def test_an_angle_in_a_machine_file_is_refused(tmp_path):
    text = (EXAMPLES / "chiller-compressor-motor.toml").read_text("utf-8")
    path = tmp_path / "m.toml"
    path.write_text(text.replace("power_factor = 0.89", 'power_factor = "25.8 deg"'), "utf-8")
    with pytest.raises(InputError, match=r"machine\.power_factor: '25\.8 deg' is an angle"):
        load_case(path)


@pytest.mark.parametrize("text", ["80 deg", "3 turn"])
def test_angles_are_refused_for_every_per_unit_key(text):
    with pytest.raises(InputError, match="is an angle"):
        parse_quantity(text, "per_unit", key="supply.x_over_r")


def test_a_bare_number_for_a_current_or_per_unit_key_in_a_file_is_per_unit():
    data = parse_toml((EXAMPLES / "chiller-compressor-motor.toml").read_text("utf-8"))
    data["machine"]["locked_rotor_current"] = "6.0"
    case, _ = case_from_dict(data)
    # 6.0 pu of the nameplate's 186 A
    assert case.machine.locked_rotor_current == pytest.approx(6.0 * 186.0)


def test_a_bare_number_for_a_current_or_per_unit_key_takes_the_unit_shown():
    from machines.model import FieldSpec

    s = FieldSpec("current_or_pu", "pu")
    assert parse_value(s, "6", "k", rated_current=100.0) == pytest.approx(600.0)
    assert parse_value(s, "600", "k", rated_current=100.0, default_unit="A") == pytest.approx(600.0)


# ---------------------------------------------------------------------------------------------------- dates


def test_an_iso_date_is_accepted():
    assert parse_date("2026-11-20") == "2026-11-20"


@pytest.mark.parametrize("text", ["02/12/2026", "2/12/26", "12.02.2026", "02-12-2026"])
def test_a_date_that_reads_two_ways_is_refused(text):
    with pytest.raises(InputError, match=r"^sheet\.date: .* can be read two ways"):
        parse_date(text, "sheet.date")


@pytest.mark.parametrize("text", ["2026-02-30", "20 November 2026", "2026-11"])
def test_a_date_that_is_not_iso_or_not_a_day_is_refused(text):
    with pytest.raises(InputError, match=r"^sheet\.date: .*ISO date year-month-day"):
        parse_date(text, "sheet.date")
