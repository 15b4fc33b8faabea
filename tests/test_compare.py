"""What changed between two revisions: machines.compare and reports.changes.

The equivalences checked here are unit definitions, not the project's own numbers: the SI prefixes (SI Brochure,
9th edition, table 7) and the horsepower (NIST SP 811, appendix B.8: 1 hp = 745.7 W).
"""

from __future__ import annotations

import copy
import re
import tomllib
from pathlib import Path

import pytest

from machines.compare import ABSENT, Change, Changes, compare, input_changes, setting_changes, show_value
from machines.files import case_from_dict
from machines.record import Check, FunctionSettings, Setting, SettingsRecord
from machines.study import run_study
from reports.changes import format_changes

EXAMPLE = Path(__file__).resolve().parents[1] / "examples" / "chiller-compressor-motor.toml"


@pytest.fixture(scope="module")
def base() -> dict:
    return tomllib.loads(EXAMPLE.read_text("utf-8"))


def studied(data: dict):
    case, warnings = case_from_dict(copy.deepcopy(data))
    return case, run_study(case, warnings)


def edited(data: dict, **sections) -> dict:
    out = copy.deepcopy(data)
    for section, values in sections.items():
        out.setdefault(section, {}).update(values)
    return out


def test_same_file_has_no_changes(base):
    old, new = studied(base), studied(base)
    changes = compare(*old, *new)
    assert changes.empty
    assert format_changes(changes) == ["no changes"]


def test_changed_rating_is_shown_as_entered(base):
    changes = compare(*studied(base), *studied(edited(base, machine={"rated_current": "190 A"})))
    assert Change("machine.rated_current", "186 A", "190 A") in changes.inputs
    assert "  Rated current (machine): 186 A → 190 A" in format_changes(changes)
    labelled = compare(*studied(base), *studied(edited(base, machine={"rated_current": "190 A"})),
                       labels={"machine.rated_current": "Full-load current"})
    assert "  Full-load current: 186 A → 190 A" in format_changes(labelled)


@pytest.mark.parametrize("section, key, one, other", [
    # SI Brochure, 9th ed., table 7: kilo = 10^3
    ("machine", "rated_voltage", "4.16 kV", "4160 V"),
    # SI Brochure, 9th ed., table 7: mega = 10^6, kilo = 10^3
    ("supply", "fault_level", "250 MVA", "250000 kVA"),
    ("machine", "rated_output", "1120 kW", "1.12 MW"),
    # percent is 1/100 (SI Brochure, 9th ed., 5.4.7): 95.8 % = 0.958
    ("machine", "efficiency", "95.8 %", 0.958),
    # NIST SP 811, B.8: 1 lb = 0.45359237 kg and 1 ft = 0.3048 m exactly, so 1600 lb·ft² = 67.42417615 kg·m²
    ("load", "inertia", "1600 lb*ft^2", "67.42417615 kg*m^2"),
])
def test_same_value_in_other_units_is_no_change(base, section, key, one, other):
    old = edited(base, **{section: {key: one}})
    changes = compare(*studied(old), *studied(edited(old, **{section: {key: other}})))
    assert [c.key for c in changes.inputs] == []


def test_default_written_out_is_no_change(base):
    # machine.service_factor defaults to "1.0" (DEVELOPERS.md glossary); writing the default is not a change
    no_sf = copy.deepcopy(base)
    del no_sf["machine"]["service_factor"]
    changes = compare(*studied(no_sf), *studied(edited(no_sf, machine={"service_factor": "1.0"})))
    assert changes.empty


def test_missing_input_reads_not_given(base):
    no_min = copy.deepcopy(base)
    del no_min["supply"]["minimum_fault_level"]
    changes = compare(*studied(base), *studied(no_min))
    assert changes.inputs == [Change("supply.minimum_fault_level", "180 MVA", ABSENT)]


def test_same_text_read_differently_shows_the_value(base):
    # 6.2 pu of 186 A against 6.2 pu of 190 A: the locked-rotor current in amperes changed too
    changes = compare(*studied(base), *studied(edited(base, machine={"rated_current": "190 A"})))
    lrc = next(c for c in changes.inputs if c.key == "machine.locked_rotor_current")
    # 6.2 × 186 A = 1153.2 A and 6.2 × 190 A = 1178 A (per-unit definition)
    assert (lrc.old, lrc.new) == ("6.2 pu (= 1153 A)", "6.2 pu (= 1178 A)")


def test_sheet_bookkeeping_is_not_a_change_but_the_description_is(base):
    new = edited(base, sheet={"revision": 2, "date": "2026-12-01", "description": "Chiller 1 motor"})
    changes = compare(*studied(base), *studied(new))
    assert [c.key for c in changes.inputs] == ["sheet.description"]


def test_ct_ratio_change(base):
    changes = compare(*studied(base), *studied(edited(base, instruments={"phase_ct": "400/5 A"})))
    assert Change("instruments.phase_ct", "300/5 A", "400/5 A") in changes.inputs


def record(functions, derived=None) -> SettingsRecord:
    return SettingsRecord(tag="T-1", kind="induction-motor", revision=1, practice="IEC", inputs_fingerprint="x",
                          derived=derived or {}, functions=functions, checks=[Check("ok", "fine")])


def thermal(pickup: float, secondary: float, source="standard", tau=612.0) -> FunctionSettings:
    return FunctionSettings("49", "Stator thermal overload", {
        "pickup_current": Setting(pickup, "A", source, secondary=secondary, secondary_unit="A"),
        "heating_time_constant": Setting(tau, "s"),
    }, basis="")


def test_setting_value_changes_with_its_relay_side_value():
    # 105.6 A and 110 A on a 150/1 A CT are 0.704 A and 0.7333 A on the relay (ratio definition)
    changes = setting_changes(record([thermal(105.6, 0.704)]), record([thermal(110.0, 0.7333)]))
    assert changes == [Change("49.pickup_current", "105.6 A (0.704 A secondary)", "110 A (0.7333 A secondary)")]


def test_setting_without_a_relay_side_value():
    changes = setting_changes(record([thermal(105.6, 0.704, tau=612.0)]), record([thermal(105.6, 0.704, tau=900.0)]))
    assert changes == [Change("49.heating_time_constant", "612 s", "900 s")]


def test_change_below_four_figures_is_shown_with_six():
    changes = setting_changes(record([thermal(1.0, 1.0, tau=612.01)]), record([thermal(1.0, 1.0, tau=612.04)]))
    assert changes == [Change("49.heating_time_constant", "612.01 s", "612.04 s")]


def test_setting_float_noise_below_record_precision_is_no_change():
    # the record keeps six significant figures (DEVELOPERS.md, settings record)
    assert setting_changes(record([thermal(105.6, 0.704)]), record([thermal(105.6000001, 0.704)])) == []


def test_only_the_secondary_changed_shows_it():
    # same primary, new CT: 105.6 A on 150/1 A is 0.704 A, on 200/1 A 0.528 A (ratio definition)
    changes = setting_changes(record([thermal(105.6, 0.704)]), record([thermal(105.6, 0.528)]))
    assert changes == [Change("49.pickup_current", "105.6 A (0.704 A secondary)", "105.6 A (0.528 A secondary)")]


def test_source_change_is_shown():
    changes = setting_changes(record([thermal(105.6, 0.704)]), record([thermal(110.0, 0.704, "override")]))
    assert changes == [Change("49.pickup_current", "105.6 A [standard]", "110 A [override]")]


def test_functions_added_and_removed():
    lr = FunctionSettings("51LR", "Locked rotor", {"time_delay": Setting(12.0, "s")}, basis="")
    added = setting_changes(record([thermal(1.0, 1.0)]), record([thermal(1.0, 1.0), lr]))
    removed = setting_changes(record([thermal(1.0, 1.0), lr]), record([thermal(1.0, 1.0)]))
    assert added == [Change("51LR", "not in the study", "added to the study")]
    assert removed == [Change("51LR", "in the study", "removed from the study")]
    assert added[0].name == removed[0].name == "51LR Locked rotor"


def test_setting_added_within_a_function():
    lr_old = FunctionSettings("51LR", "Locked rotor", {"time_delay": Setting(12.0, "s")}, basis="")
    lr_new = FunctionSettings("51LR", "Locked rotor", {"time_delay": Setting(12.0, "s"),
                                                       "speed_switch_required": Setting(True)}, basis="")
    assert setting_changes(record([lr_old]), record([lr_new])) == [
        Change("51LR.speed_switch_required", "—", "yes")]


def test_derived_values_compared(base):
    case, _ = case_from_dict(copy.deepcopy(base))
    old = record([], {"acceleration_time": Setting(7.9, "s", "derived")})
    new = record([], {"acceleration_time": Setting(8.4, "s", "derived")})
    changes = compare(case, old, case, new)
    assert changes.derived == [Change("derived.acceleration_time", "7.9 s", "8.4 s")]
    assert changes.inputs == [] and changes.settings == []


def test_override_written_differently_with_the_same_value_is_no_change(base):
    old_case, _ = case_from_dict(edited(base, overrides={"49.pickup_current": "180 A"}))
    new_case, _ = case_from_dict(edited(base, overrides={"49.pickup_current": "0.18 kA"}))
    # SI Brochure table 7: 0.18 kA = 180 A; both records carry 180 A
    old_r, new_r = record([thermal(180.0, 3.6)]), record([thermal(180.0, 3.6)])
    assert input_changes(old_case, new_case, old_r, new_r) == []
    changed_r = record([thermal(190.0, 3.8)])
    assert input_changes(old_case, new_case, old_r, changed_r) == [
        Change("overrides.49.pickup_current", "180 A", "0.18 kA")]


def test_override_added(base):
    old_case, _ = case_from_dict(copy.deepcopy(base))
    new_case, _ = case_from_dict(edited(base, overrides={"49.pickup_current": "180 A"}))
    assert input_changes(old_case, new_case) == [Change("overrides.49.pickup_current", ABSENT, "180 A")]


def test_show_value_stages():
    assert show_value([{"frequency": 57.5, "time_delay": 10.0}, {"frequency": 57.0, "time_delay": 0.5}]) == \
        "57.5 Hz / 10 s; 57 Hz / 0.5 s"


def test_settings_to_rekey_come_first_then_inputs_then_derived_values(base):
    changes = compare(*studied(base), *studied(edited(base, machine={"rated_current": "190 A"})))
    lines = format_changes(changes)
    heads = [line for line in lines if not line.startswith("  ")]
    assert heads[0].startswith("Settings to key into the relay") and heads[1].startswith("Inputs")
    assert heads[-1].startswith("Derived values (not keyed into the relay)")
    body = [line for line in lines if line.startswith("  ")]
    # labels, not internal keys; no two lines alike (nothing cut into duplicates)
    assert not any(re.match(r"\s+[\w.]*\.[a-z]+_[\w.]*:", line) for line in body)  # no 'derived.xyz_abc:' key
    assert len(body) == len(set(body))
    assert any(line.startswith("  49 ") and "Pickup" in line for line in body)


def test_a_setting_not_keyed_goes_with_the_derived_values():
    old = record([FunctionSettings("59N", "Stator earth fault", {
        "coverage": Setting(0.95, "pu", "derived", label="Winding covered", keyed=False),
        "pickup_voltage": Setting(5.0, "V", label="Pickup voltage")}, basis="")])
    new = record([FunctionSettings("59N", "Stator earth fault", {
        "coverage": Setting(0.9, "pu", "derived", label="Winding covered", keyed=False),
        "pickup_voltage": Setting(10.0, "V", label="Pickup voltage")}, basis="")])
    from machines.files import case_from_dict as read

    case, _ = read(tomllib.loads(EXAMPLE.read_text("utf-8")))
    changes = compare(case, old, case, new)
    assert [c.name for c in changes.settings] == ["59N Stator earth fault · Pickup voltage"]
    assert [c.name for c in changes.derived] == ["59N Stator earth fault · Winding covered"]


def test_different_kinds_of_machine_are_warned(base):
    gen = tomllib.loads((EXAMPLE.parent / "gas-engine-generator.toml").read_text("utf-8"))
    changes = compare(*studied(base), *studied(gen))
    assert changes.warnings and "different kinds of machine" in changes.warnings[0]
    assert format_changes(changes)[0].startswith("warning: these are different kinds of machine")


def test_user_text_is_printed_as_it_is(base):
    lines = format_changes(Changes(inputs=[Change("sheet.tag", "M-1 [spare]", "M-2", "Tag")]))
    assert lines == ["Inputs (1):", "  Tag: M-1 [spare] → M-2"]
    assert format_changes(Changes()) == ["no changes"]
