"""Impossible machines and impossible overrides are refused naming the key (exit 2); merely unusual ones are
studied with a warning. Each case of the attack on the product is here, with the rule it rests on."""

from __future__ import annotations

import copy
import tomllib

import pytest

from machines.errors import InputError, printable
from machines.files import case_from_dict, parse_toml
from machines.study import run_study

from conftest import EXAMPLES

MOTOR = tomllib.loads((EXAMPLES / "chiller-compressor-motor.toml").read_text("utf-8"))
GAS = tomllib.loads((EXAMPLES / "gas-engine-generator.toml").read_text("utf-8"))
HYDRO = tomllib.loads((EXAMPLES / "small-hydro-generator.toml").read_text("utf-8"))


def edited(base: dict, **changes) -> dict:
    """``base`` with keys changed (``section__key=value``; None deletes)."""
    data = copy.deepcopy(base)
    for path, value in changes.items():
        *tables, last = path.split("__")
        table = data
        for t in tables:
            table = table.setdefault(t, {})
        if value is None:
            table.pop(last, None)
        else:
            table[last] = value
    return data


def with_override(base: dict, key: str, value) -> dict:
    data = copy.deepcopy(base)
    data.setdefault("overrides", {})[key] = value
    return data


def refused(data: dict) -> str:
    """The one-line message of the refusal (from reading the file or from the study)."""
    with pytest.raises(InputError) as err:
        run_study(*case_from_dict(data))
    message = str(err.value)
    assert "\n" not in message and message == printable(message)
    return message


BAND = {"allowed": "600 s"}

IMPOSSIBLE = [
    # the electrical input √3·V·I·cos φ·η is the shaft output: 1500 hp at 4.16 kV needs at least 155 A
    ("FLC 186 mA on 1500 hp", edited(MOTOR, machine__rated_current="186 mA"), "machine.rated_current"),
    # more than twice the current computed from the file's own efficiency and power factor
    ("FLC 400 A on 1500 hp", edited(MOTOR, machine__rated_current="400 A"), "machine.rated_current"),
    # IEEE C57.13: a CT carries at most 4 times its rating continuously (thermal rating factor ≤ 4.0)
    ("CT 10/5 A on 186 A", edited(MOTOR, instruments__phase_ct="10/5 A"), "instruments.phase_ct"),
    ("differential CT 50/5 A on 1046 A", edited(GAS, instruments__differential_ct="50/5 A"),
     "instruments.differential_ct"),
    # IEC 60034-1 zone B is ±10 %; a bus at another voltage level is a data error
    ("416 V motor on a 4.16 kV bus", edited(MOTOR, machine__rated_voltage="416 V", machine__rated_current=None),
     "machine.rated_voltage"),
    ("13.8 kV generator on a 4.16 kV bus", edited(GAS, supply__nominal_voltage="4.16 kV"), "machine.rated_voltage"),
    # IEC 61869-3: a VT runs at most at 1.2 times its rated primary continuously
    ("144/120 V VT on 13.8 kV", edited(GAS, instruments__vt="144/120 V"), "instruments.vt"),
    ("480/240 V grounding transformer on 13.8 kV", edited(GAS, grounding__transformer_ratio="480/240 V"),
     "grounding.transformer_ratio"),
    ("a load-shedding stage at 61 Hz on 60 Hz",
     edited(HYDRO, supply__load_shedding_stages=[{"frequency": "61 Hz", "time_delay": "0.2 s"}]),
     "supply.load_shedding_stages[0].frequency"),
    ("a motor underfrequency stage at 50 Hz on 50 Hz", edited(
        tomllib.loads((EXAMPLES / "raw-water-transfer-motor-50hz.toml").read_text("utf-8")),
        supply__underfrequency_stages=[{"frequency": "50 Hz", "time_delay": "1 s"}]),
     "supply.underfrequency_stages[0].frequency"),
    ("overlapping off-frequency bands", edited(HYDRO, machine__frequency_limits=[
        {"low": "57 Hz", "high": "58.5 Hz", **BAND}, {"low": "58 Hz", "high": "59 Hz", **BAND}]),
     "machine.frequency_limits[1]"),
    ("a restricted band containing nominal frequency",
     edited(HYDRO, machine__frequency_limits=[{"low": "59 Hz", "high": "61 Hz", **BAND}]),
     "machine.frequency_limits[0]"),
    ("an islanded system smaller than the machine", edited(GAS, supply__system_rating="5 MVA"),
     "supply.system_rating"),
    ("a fault level below the motor's own rating", edited(MOTOR, supply__fault_level="1 MVA",
                                                          supply__minimum_fault_level=None), "supply.fault_level"),
    ("a blank tag", edited(MOTOR, sheet__tag="   "), "sheet.tag"),
    ("a tag with no letter or digit", edited(MOTOR, sheet__tag=".."), "sheet.tag"),
    ("a tag that is one emoji", edited(MOTOR, sheet__tag="\U0001F525"), "sheet.tag"),
    ("revision 1.5", edited(MOTOR, sheet__revision=1.5), "sheet.revision"),
    ("revision true", edited(MOTOR, sheet__revision=True), "sheet.revision"),
    ("a 400-digit integer", edited(MOTOR, machine__rated_voltage=10 ** 400), "machine.rated_voltage"),
    ("66.starts_cold = 0", with_override(MOTOR, "66.starts_cold", 0), "overrides.66.starts_cold"),
    ("40.zone1_diameter = 0", with_override(GAS, "40.zone1_diameter", "0 ohm"), "overrides.40.zone1_diameter"),
    ("46.k_constant = 0", with_override(GAS, "46.k_constant", "0 s"), "overrides.46.k_constant"),
    ("49.pickup_current = 0", with_override(MOTOR, "49.pickup_current", "0 A"), "overrides.49.pickup_current"),
    ("49 heating time constant 0", with_override(MOTOR, "49.heating_time_constant", "0 min"),
     "overrides.49.heating_time_constant"),
    ("24 trip pickup 0", with_override(GAS, "24.trip_pickup", 0), "overrides.24.trip_pickup"),
    ("51V.time_dial = 0", with_override(GAS, "51V.time_dial", 0), "overrides.51V.time_dial"),
    ("46.continuous_i2 = 0", with_override(GAS, "46.continuous_i2", 0), "overrides.46.continuous_i2"),
    ("59N coverage above 100 %", with_override(GAS, "59N.coverage", "1.2"), "overrides.59N.coverage"),
    ("a 400-digit override", with_override(MOTOR, "49.pickup_current", 10 ** 400), "overrides.49.pickup_current"),
    # no relay current input is set beyond some tens of times its CT's rating (METHODS.md §14.7)
    ("49 pickup 1e30 A", with_override(MOTOR, "49.pickup_current", "1e30 A"), "overrides.49.pickup_current"),
    ("generator 49 pickup 1e30 A", with_override(GAS, "49.pickup_current", "1e30 A"),
     "overrides.49.pickup_current"),
    ("a time constant of a century", with_override(MOTOR, "49.heating_time_constant", "100 year"),
     "overrides.49.heating_time_constant"),
    ("starts as text", with_override(MOTOR, "66.starts_cold", "abc"), "overrides.66.starts_cold"),
    ("a blank CT class", edited(MOTOR, instruments__phase_ct_class=""), "instruments.phase_ct_class"),
    ("a curve name with an escape", with_override(GAS, "51V.curve", "x\x1b[2J"), "overrides.51V.curve"),
]


@pytest.mark.parametrize("name, data, key", IMPOSSIBLE, ids=[c[0] for c in IMPOSSIBLE])
def test_impossible_is_refused_naming_the_key(name, data, key):
    assert refused(data).startswith(f"{key}:")


def warnings_of(data: dict) -> list[str]:
    case, found = case_from_dict(data)
    run_study(case, found)  # studied, not refused
    return found


UNUSUAL = [
    # IEC 60034-1 zone B: ±10 % is what a machine runs at continuously; 12 % is unusual, not impossible
    ("a bus 12 % above the motor's rating", edited(MOTOR, supply__nominal_voltage="4.66 kV"),
     "supply.nominal_voltage"),
    ("a nameplate current 15 % above the computed one", edited(MOTOR, machine__rated_current="210 A"),
     "machine.rated_current"),
    ("a load-shedding stage more than 10 % below nominal",
     edited(HYDRO, supply__load_shedding_stages=[{"frequency": "53 Hz", "time_delay": "0.2 s"}]),
     "supply.load_shedding_stages[0].frequency"),
    ("more hot starts than cold", edited(MOTOR, machine__starts_hot=3), "machine.starts_hot"),
    # IEC 60050-411-48-05: the breakdown torque is not defined for a motor whose torque falls continually with
    # speed (a high-slip rotor); such a motor's largest torque is at standstill, which the study then takes
    ("locked-rotor torque above breakdown", edited(MOTOR, machine__locked_rotor_torque="2.5 pu"),
     "machine.locked_rotor_torque"),
]


@pytest.mark.parametrize("name, data, key", UNUSUAL, ids=[c[0] for c in UNUSUAL])
def test_unusual_is_studied_with_a_warning(name, data, key):
    assert any(w.startswith(key) for w in warnings_of(data))


def test_a_continuous_band_around_nominal_is_the_makers_continuous_range():
    bands = [{"low": "58.5 Hz", "high": "59.5 Hz", "allowed": "600 s"},
             {"low": "59.5 Hz", "high": "60.5 Hz", "allowed": "100000000 s"}]
    warnings_of(edited(HYDRO, machine__frequency_limits=bands))


def test_a_ct_primary_up_to_four_times_below_the_current_is_a_warning_not_a_refusal():
    # IEEE C57.13 thermal rating factors 1.33 … 4.0 exist; the CT check warns (machines/protection/ct_check.py)
    record = run_study(*case_from_dict(edited(MOTOR, instruments__phase_ct="100/5 A")))
    assert any("rating factor" in c.message and c.status == "warn" for _, c in record.all_checks())


@pytest.mark.parametrize("value, fragment", [
    ("a\x00b", "U+0000 (a control character) at position 2"),
    ("CH\x1b[2J", "U+001B (a control character)"),
    ("abc\u202edcba", "U+202E (an invisible formatting character)"),
])
def test_control_characters_in_text_are_named(value, fragment):
    # issue: a NUL reported "at most 500 characters, got 3"
    message = refused(edited(MOTOR, sheet__description=value))
    assert message.startswith("sheet.description:") and fragment in message


@pytest.mark.parametrize("text, fragment", [
    ('[machine]\nkind = "x"\nrated_current = "1 A"\nrated_current = "2 A"\n',
     "the key 'machine.rated_current' is given twice (line 4)"),
    ('[sheet]\ntag = "a"\n[supply]\nx = 1\n[sheet]\nb = 2\n', "the table [sheet] is given twice (line 5)"),
    ('format = "x"\n"format" = "y"\n', "the key '\"format\"' is given twice (line 2)"),
])
def test_duplicate_keys_are_named(text, fragment):
    # issue: tomllib says only "Cannot overwrite a value (at line 4, column 24)", or "at end of document"
    with pytest.raises(InputError) as err:
        parse_toml(text, "m.toml")
    assert str(err.value) == f"m.toml: not valid TOML: {fragment}"


def test_a_tag_clean_for_a_file_name_and_one_that_is_not_are_both_kept_as_written():
    case, _ = case_from_dict(edited(MOTOR, sheet__tag="P-101/A <spare>"))
    assert case.sheet.tag == "P-101/A <spare>"


def test_a_generator_49_pickup_above_the_whole_capability_curve_fails_in_words():
    # IEC 60034-1 §9.3.2: 150 % for 30 s; a replica picking up at 2.5 pu protects no point of it
    rated = 5.625e6 / (3 ** 0.5 * 13.8e3)  # the example's 5.625 MVA at 13.8 kV
    case, found = case_from_dict(with_override(GAS, "49.pickup_current", f"{2.5 * rated:.0f} A"))
    record = run_study(case, found)
    f49 = record.function("49")
    assert any(c.status == "fail" and "above every point" in c.message for c in f49.checks)


def test_a_motor_49_that_never_trips_at_locked_rotor_says_so_in_words():
    # the replica picks up above the locked-rotor current: its operate time there is not finite
    data = with_override(MOTOR, "49.pickup_current", "1500 A")
    record = run_study(*case_from_dict(data))
    note = record.derived["thermal_trip_time_locked_rotor_hot"].note
    assert note.startswith("never trips") and "inf" not in note
