"""The question flow as plain functions: which questions are asked for which machine, defaults from earlier answers,
refusals in the file reader's words, cross-checks."""

from __future__ import annotations

import pytest

from machines.errors import InputError
from machines.files import case_from_dict, load_case, parse_toml, parse_value, read_text
from machines.record import inputs_fingerprint
from wizard import flow
from wizard.flow import Answers

from conftest import EXAMPLES


def answers(**sections) -> Answers:
    return Answers(data={k: dict(v) for k, v in sections.items()})


def keys_asked(a: Answers) -> set[str]:
    return {q.key for q in flow.applicable(a)}


MOTOR = {"kind": "induction-motor"}
GENERATOR = {"kind": "synchronous-generator"}


def test_before_the_kind_only_the_identification_is_asked():
    assert {q.section for q in flow.applicable(Answers())} == {"identification"}
    assert flow.next_question(Answers()).key == "machine.kind"


def test_motor_and_generator_get_their_own_questions():
    motor, gen = keys_asked(answers(machine=MOTOR)), keys_asked(answers(machine=GENERATOR))
    for key in ("machine.rated_output", "machine.efficiency", "load.inertia", "load.torque_profile",
                "supply.starter", "machine.safe_stall_time_hot", "supply.underfrequency_stages"):
        assert key in motor and key not in gen, key
    for key in ("machine.rated_apparent_power", "machine.xd", "machine.prime_mover", "machine.rotor",
                "instruments.neutral_vt", "supply.load_shedding_stages"):
        assert key in gen and key not in motor, key
    for key in ("sheet.tag", "machine.rated_voltage", "grounding.method", "instruments.phase_ct", "study.practice"):
        assert key in motor and key in gen, key


def test_every_question_names_a_key_the_machine_file_has():
    for kind in (flow.MOTOR, flow.GENERATOR):
        a = answers(machine={"kind": kind})
        for q in flow.QUESTIONS:
            if flow.applies(q, a) and not q.key.startswith("flow."):
                flow.spec_of(q.key, kind)  # KeyError when the question asks for a key the model lacks


@pytest.mark.parametrize("method, asked, not_asked", [
    ("solid", set(), {"grounding.fault_current_limit", "grounding.resistor", "grounding.circuit_capacitance"}),
    ("low-resistance", {"grounding.fault_current_limit"}, {"grounding.resistor", "grounding.transformer_ratio"}),
    ("high-resistance", {"grounding.fault_current_limit", "grounding.resistor", "grounding.system_capacitance"},
     {"grounding.transformer_ratio"}),
    ("ungrounded", {"grounding.system_capacitance"}, {"grounding.fault_current_limit", "grounding.resistor"}),
    ("distribution-transformer", {"grounding.transformer_ratio", "grounding.resistor"}, set()),
])
def test_grounding_questions_follow_the_method(method, asked, not_asked):
    got = keys_asked(answers(machine=MOTOR, grounding={"method": method}))
    assert asked <= got and not (not_asked & got)


def test_contactor_questions_only_for_a_fused_contactor():
    assert "supply.fuse_rating" not in keys_asked(answers(machine=MOTOR, supply={"starter": "breaker"}))
    got = keys_asked(answers(machine=MOTOR, supply={"starter": "fused-contactor"}))
    assert {"supply.fuse_rating", "supply.contactor_breaking_current"} <= got


def test_makers_data_questions_only_when_the_data_sheet_is_at_hand():
    without = keys_asked(answers(machine=MOTOR, sheet={}))
    a = answers(machine=MOTOR)
    a.flow["makers_data"] = True
    with_data = keys_asked(a)
    assert "machine.cooling_time_constant" in with_data - without
    g = answers(machine=GENERATOR)
    g.flow["makers_data"] = True
    assert "machine.frequency_limits" in keys_asked(g) - keys_asked(answers(machine=GENERATOR))


def test_locked_rotor_current_is_required_only_without_a_code_letter():
    q = flow.find("machine.locked_rotor_current")
    no_code = answers(machine=MOTOR)
    assert flow.applies(q, no_code) and flow.is_required(q, no_code)
    with_code = answers(machine={**MOTOR, "locked_rotor_code": "G"})
    assert not flow.applies(q, with_code)  # the code letter stands in for it when there is no data sheet
    with_code.flow["makers_data"] = True
    assert flow.applies(q, with_code) and not flow.is_required(q, with_code)


def test_stage_tables_and_prime_mover_rotor_default():
    g = answers(machine={**GENERATOR, "prime_mover": "hydro"})
    # salient poles behind a water turbine (common practice, no published source)
    assert flow.default(flow.find("machine.rotor", g), g) == "salient-with-damper"


# ---------------------------------------------------------------------------------------------------- defaults


def test_rated_current_default_from_output_voltage_efficiency_power_factor():
    # METHODS.md §3.4: 500 hp (at 746 W/hp = 373 kW), 4160 V, η 0.95, pf 0.88 → FLC 61.92 A
    a = answers(machine={**MOTOR, "rated_output": "373 kW", "rated_voltage": "4160 V", "efficiency": "0.95",
                         "power_factor": "0.88"})
    assert flow.default(flow.find("machine.rated_current", a), a) == "61.92 A"


def test_locked_rotor_current_blank_means_the_code_letter_range():
    # METHODS.md §3.4 (NEMA MG 1 10.37.2): 500 hp, 4160 V, code G → I_LR 388.6–437.2 A
    a = answers(machine={**MOTOR, "rated_output": "500 hp", "rated_voltage": "4.16 kV", "efficiency": "0.95",
                         "power_factor": "0.88", "locked_rotor_code": "G"})
    text = flow.blank_meaning(flow.find("machine.locked_rotor_current"), a)
    assert "code letter G" in text and "388.6 A" in text and "437.2 A" in text


@pytest.mark.parametrize("frequency, practice", [("50 Hz", "IEC"), ("60 Hz", "IEEE")])
def test_practice_default_from_frequency(frequency, practice):
    # the machine file reader's own rule (machine file rule: default IEC at 50 Hz, IEEE at 60 Hz)
    a = answers(machine={**MOTOR, "frequency": frequency})
    assert flow.default(flow.find("study.practice", a), a) == practice


def test_bus_voltage_default_is_the_rated_voltage_and_earlier_answers_win():
    a = answers(machine={**MOTOR, "rated_voltage": "6.6 kV"})
    assert flow.default(flow.find("supply.nominal_voltage", a), a) == "6.6 kV"
    a.set("supply.nominal_voltage", "6.9 kV")
    assert flow.default(flow.find("supply.nominal_voltage", a), a) == "6.9 kV"


# ---------------------------------------------------------------------------------------------------- answers


@pytest.mark.parametrize("key, typed, written", [
    ("machine.rated_output", "1500", "1500 kW"),      # a bare number takes the unit shown
    ("machine.rated_output", "1500 hp", "1500 hp"),   # any unit of the right kind, kept as written
    ("machine.rated_output", "1.12 MW", "1.12 MW"),
    ("machine.locked_rotor_current", "6.2", "6.2 pu"),
    ("machine.locked_rotor_current", "1150 A", "1150 A"),
    ("machine.locked_rotor_code", "g", "G"),
    ("machine.starts_cold", "3", 3),
    ("instruments.phase_ct", "200/1", "200/1 A"),
    ("machine.power_factor", "0.89", "0.89"),
])
def test_answers_are_written_as_a_person_writes_them(key, typed, written):
    a = answers(machine={**MOTOR, "rated_output": "500 kW", "rated_voltage": "6.6 kV", "efficiency": "0.95",
                         "power_factor": "0.88"})
    a.flow["makers_data"] = True
    assert flow.accept(flow.find(key, a), a, typed) == written


@pytest.mark.parametrize("key, typed", [
    ("machine.rated_current", "96 V"), ("machine.rated_voltage", "4,16 kV"), ("machine.frequency", "500 Hz"),
    ("machine.rated_output", "10 ** 10 ** 10 W"), ("machine.efficiency", "99.9 %"), ("instruments.phase_ct", "1/200 A"),
])
def test_a_refused_answer_reads_like_the_file_readers_refusal(key, typed):
    a = answers(machine=MOTOR)
    q = flow.find(key, a)
    s = flow.spec(q, a)
    with pytest.raises(InputError) as reader:
        parse_value(s, typed, key, default_unit=s.unit or None)
    assert flow.refusal(q, a, typed) == str(reader.value)


def test_a_bare_percentage_is_refused_with_a_tip_after_the_readers_message():
    a = answers(machine=MOTOR)
    q = flow.find("machine.efficiency", a)
    with pytest.raises(InputError) as reader:
        parse_value(flow.spec(q, a), "95.8", "machine.efficiency")
    assert flow.refusal(q, a, "95.8") == f"{reader.value} (for a percentage write '95.8 %')"


def test_a_required_answer_left_blank_is_refused_naming_the_key():
    a = answers(machine=MOTOR)
    with pytest.raises(InputError, match=r"^machine\.rated_voltage: required key is missing"):
        flow.accept(flow.find("machine.rated_voltage", a), a, "")
    assert flow.accept(flow.find("machine.temperature_rise", a), a, "") is None  # optional: blank


# ---------------------------------------------------------------------------------------------------- checks


def test_rated_current_far_from_the_computed_one_is_a_warning():
    a = answers(machine={**MOTOR, "rated_output": "373 kW", "rated_voltage": "4160 V", "efficiency": "0.95",
                         "power_factor": "0.88", "rated_current": "75 A"})
    (f,) = flow.findings(flow.find("machine.rated_current", a), a)
    # 75 / 61.92 − 1 = +21 %, beyond the ±10 % the file reader warns at
    assert f.level == "warn" and "+21%" in f.message
    a.set("machine.rated_current", "62 A")
    assert flow.findings(flow.find("machine.rated_current", a), a) == []


def test_what_the_file_reader_refuses_is_refused_at_the_question():
    # the wizard and the file reader share one rule (machines.model.motor_current_error, ct_primary_error): an
    # answer the file would refuse is refused at once, not offered to keep
    a = answers(machine={**MOTOR, "rated_output": "373 kW", "rated_voltage": "4160 V", "efficiency": "0.95",
                         "power_factor": "0.88"})
    q = flow.find("machine.rated_current", a)
    # 61.92 A computed; more than twice that contradicts the file's own efficiency and power factor
    assert flow.refusal(q, a, "130 A").startswith("machine.rated_current: expected near 61.92 A")
    # less than P/(√3·V) = 51.77 A needs cos φ·η above 1
    assert flow.refusal(q, a, "50 A").startswith("machine.rated_current: expected at least 51.77 A")
    assert flow.refusal(q, a, "68 A") is None
    a.set("machine.rated_current", "62 A")
    q = flow.find("instruments.phase_ct", a)
    # IEEE C57.13: a CT carries at most 4 times its rating continuously (thermal rating factor ≤ 4.0)
    assert flow.refusal(q, a, "15/1 A").startswith("instruments.phase_ct: expected a CT primary of at least 15.5 A")
    assert flow.refusal(q, a, "75/1 A") is None


def test_hot_stall_longer_than_cold_is_refused_at_once():
    a = answers(machine={**MOTOR, "safe_stall_time_cold": "15 s"})
    q = flow.find("machine.safe_stall_time_hot", a)
    assert flow.refusal(q, a, "18").startswith("machine.safe_stall_time_hot: expected at most the cold")
    assert flow.refusal(q, a, "12") is None


def test_locked_rotor_current_outside_the_code_letter_is_a_warning():
    # METHODS.md §3.4: code G at 500 hp, 4160 V allows 388.6–437.2 A; 600 A is outside, 420 A inside
    a = answers(machine={**MOTOR, "rated_output": "500 hp", "rated_voltage": "4.16 kV", "efficiency": "0.95",
                         "power_factor": "0.88", "locked_rotor_code": "G", "locked_rotor_current": "600 A"})
    a.flow["makers_data"] = True
    q = flow.find("machine.locked_rotor_current", a)
    (f,) = flow.findings(q, a)
    assert f.level == "warn" and "code letter G" in f.message
    a.set("machine.locked_rotor_current", "420 A")
    assert flow.findings(q, a) == []


def test_generator_reactances_out_of_order_are_refused():
    a = answers(machine={**GENERATOR, "xd": "1.8", "xd_transient": "0.25"})
    assert "xd'' ≤ xd' ≤ xd" in flow.refusal(flow.find("machine.xd_subtransient", a), a, "0.3")


# ---------------------------------------------------------------------------------------------------- results


def test_an_example_file_answers_every_question_and_keeps_its_fingerprint():
    path = EXAMPLES / "chiller-compressor-motor.toml"
    a = Answers(data=parse_toml(read_text(path)))
    assert flow.scripted(a) == []
    case, _ = case_from_dict(flow.machine_data(a))
    assert inputs_fingerprint(case) == inputs_fingerprint(load_case(path)[0])


def test_answers_that_no_longer_apply_are_left_out():
    path = EXAMPLES / "chiller-compressor-motor.toml"
    a = Answers(data=parse_toml(read_text(path)))
    flow.scripted(a)
    flow.record(flow.find("grounding.method", a), a, "solid")
    assert flow.machine_data(a)["grounding"] == {"method": "solid"}


def test_a_changed_answer_asks_again_the_answers_resting_on_it():
    a = answers(machine=MOTOR, grounding={"method": "low-resistance", "fault_current_limit": "300 A"})
    a.asked += ["grounding.method", "grounding.fault_current_limit"]
    flow.record(flow.find("grounding.method", a), a, "high-resistance")
    assert flow.next_question(a).key != "grounding.method"
    assert "grounding.fault_current_limit" not in a.asked and a.get("grounding.fault_current_limit") == "300 A"


def test_changing_the_machine_kind_asks_everything_after_the_identification_again():
    path = EXAMPLES / "chiller-compressor-motor.toml"
    a = Answers(data=parse_toml(read_text(path)))
    flow.scripted(a)
    flow.record(flow.find("machine.kind", a), a, flow.GENERATOR)
    assert flow.next_question(a).key == "machine.rated_apparent_power"
    assert "sheet.tag" in a.asked


def test_review_rows_follow_the_sections():
    a = Answers(data=parse_toml(read_text(EXAMPLES / "chiller-compressor-motor.toml")))
    flow.scripted(a)
    titles = [t for t, _ in flow.review_rows(a)]
    assert titles == ["Identification", "Nameplate and maker's data", "Driven load", "Supply and starter",
                      "Grounding", "Instrument transformers", "Curves and tables"]
    rows = dict(flow.review_rows(a)[1][1])
    # normalised: in the unit the question is asked in, with the form written where it differs
    assert rows["Rated output"] == "1119 kW (1500 hp)" and rows["Temperature rise"] == "80 K"
    assert rows["Locked-rotor current"] == "1153 A (6.2 pu)"  # 6.2 × 186 A
    assert dict(flow.review_rows(a)[2][1])["Load inertia"] == "67.42 kg·m² (1600 lb·ft²)"  # NIST SP 811, B.8


# ---------------------------------------------------------------------------------------------------- checks at once


def nameplate(**extra) -> Answers:
    return answers(machine={**MOTOR, "rated_output": "373 kW", "rated_voltage": "4160 V", "efficiency": "0.95",
                            "power_factor": "0.88", **extra})


def test_a_speed_that_does_not_fit_the_frequency_is_refused_as_soon_as_it_is_given():
    a = nameplate(frequency="60 Hz")
    q = flow.find("machine.rated_speed", a)
    # 1500 rpm at 60 Hz: the nearest synchronous speed is 1800 rpm (120·f/p, p = 4), a slip of 16.7 %
    assert flow.refusal(q, a, "1500") == ("machine.rated_speed: expected a full-load slip between 0 and 10 %, got "
                                          "16.7% (1500 rpm)")
    assert flow.refusal(q, a, "1785") is None


def test_a_generator_speed_must_be_synchronous_at_once():
    a = answers(machine={**GENERATOR, "frequency": "50 Hz"})
    q = flow.find("machine.rated_speed", a)
    assert "expected a synchronous speed 120·f/p at 50 Hz" in flow.refusal(q, a, "1480")
    assert flow.refusal(q, a, "1500") is None


def test_a_changed_frequency_warns_about_the_speed_given_before():
    a = nameplate(frequency="50 Hz", rated_speed="1485 rpm")
    q = flow.find("machine.frequency", a)
    (f,) = flow.findings(q, a.trial(q.key, "60 Hz"))
    assert f.level == "warn" and "machine.rated_speed" in f.message and "review" in f.message


def test_a_ct_primary_below_the_full_load_current_is_warned_at_once():
    # 373 kW, 4160 V, η 0.95, pf 0.88 → 61.92 A (METHODS.md §3.4); a 50/5 A CT carries 124 % at full load
    a = nameplate()
    q = flow.find("instruments.phase_ct", a)
    (f,) = flow.findings(q, a.trial(q.key, "50/5 A"))
    assert f.level == "warn" and "124% of the 50/5 A CT's primary" in f.message
    # 62 A on a 300/5 A CT is 21 %: below the half the study asks for (machines.protection.ct_check)
    (f,) = flow.findings(q, a.trial(q.key, "300/5 A"))
    assert "only 21%" in f.message
    assert flow.findings(q, a.trial(q.key, "100/5 A")) == []


@pytest.mark.parametrize("key, typed, other, message", [
    ("machine.locked_rotor_current", "1.5", {}, "expected at least 2 pu of rated current"),
    ("machine.breakdown_torque", "1.0", {}, "expected more than 1 pu of rated torque"),
])
def test_answers_the_file_reader_refuses_are_refused_at_once(key, typed, other, message):
    a = nameplate(**other)
    a.flow["makers_data"] = True
    assert message in flow.refusal(flow.find(key, a), a, typed)


def test_fault_levels_in_order_and_the_bus_voltage_near_the_rating():
    a = nameplate()
    a.set("supply.fault_level", "250 MVA")
    assert "expected at most the maximum fault level (250 MVA)" in flow.refusal(
        flow.find("supply.minimum_fault_level", a), a, "300 MVA")
    q = flow.find("supply.nominal_voltage", a)
    (f,) = flow.findings(q, a.trial(q.key, "13.8 kV"))
    assert f.level == "warn" and "more than 15 %" in f.message


def test_more_starts_from_hot_than_from_cold_is_warned():
    a = nameplate(starts_cold=2)
    a.flow["makers_data"] = True
    q = flow.find("machine.starts_hot", a)
    (f,) = flow.findings(q, a.trial(q.key, 3))
    assert f.level == "warn" and "3 starts from hot but 2 from cold" in f.message


# ---------------------------------------------------------------------------------------------------- forms


def test_forms_people_write_go_into_the_file_as_the_reader_keeps_them():
    a = nameplate()
    a.set("supply.nominal_voltage", "6.6 kV")
    # IEC 60909-0: S = √3·U·I: 25 kA at 6.6 kV = 285.8 MVA
    assert flow.accept(flow.find("supply.fault_level", a), a, "25 kA") == "285.8 MVA"
    assert flow.accept(flow.find("machine.temperature_rise", a), a, "80 C") == "80 K"
    assert flow.accept(flow.find("machine.temperature_rise", a), a, "80 °C") == "80 K"
    assert flow.accept(flow.find("instruments.phase_ct", a), a, "150:5") == "150/5 A"
    assert flow.accept(flow.find("instruments.phase_ct", a), a, "150:5 A") == "150/5 A"
    assert flow.accept(flow.find("sheet.date", a), a, "2026-11-20") == "2026-11-20"
    g = answers(machine={**GENERATOR, "rated_apparent_power": "12.5 MVA", "power_factor": "0.8"})
    # 15 % of the rated 10 MW (12.5 MVA × 0.8) = 1.5 MW
    q = flow.find("machine.motoring_power", g)
    assert flow.accept(q, g, "15 %") == "1500 kW"
    assert flow.understood(q, g, "15 %", "1500 kW") == ["15 % of the rated 10000 kW (12500 kVA × 0.8) = 1500 kW"]


@pytest.mark.parametrize("key, typed, message", [
    ("sheet.date", "02/12/2026", "can be read two ways"),
    ("machine.power_factor", "25.8 deg", "is an angle, not a per-unit value or a ratio"),
    ("load.breakaway_torque", "5 deg", "is an angle"),
])
def test_forms_that_read_two_ways_or_are_angles_are_refused(key, typed, message):
    a = nameplate()
    assert message in flow.refusal(flow.find(key, a), a, typed)


def test_a_fault_current_without_the_bus_voltage_is_refused_saying_why():
    a = nameplate()
    assert "with no bus voltage known" in flow.refusal(flow.find("supply.fault_level", a), a, "25 kA")


def test_a_share_of_the_rating_before_the_rating_is_known_is_refused():
    g = answers(machine=GENERATOR)
    assert "give kW" in flow.refusal(flow.find("machine.motoring_power", g), g, "15 %")


@pytest.mark.parametrize("key, typed, said", [
    ("machine.rated_output", "800 hp", "800 hp = 596.6 kW"),  # NIST SP 811, B.8: 1 hp = 745.7 W
    ("load.inertia", "420 lb-ft²", "420 lb·ft² = 17.7 kg·m²"),  # NIST SP 811, B.8: 1 lb·ft² = 0.04214 kg·m²
    ("machine.temperature_rise", "80 C", "'80 C' read as a temperature rise of 80 K"),
    ("machine.rated_speed", "1785", "1785 taken as 1785 rpm"),
    ("machine.efficiency", "95 %", "95 % = 0.95"),
    ("instruments.phase_ct", "150:5", "150:5 read as 150/5 A"),
])
def test_how_an_answer_was_read_is_said(key, typed, said):
    a = nameplate(frequency="60 Hz")
    q = flow.find(key, a)
    assert flow.understood(q, a, typed, flow.accept(q, a, typed)) == [said]


def test_nothing_is_said_when_the_answer_reads_as_written():
    a = nameplate()
    q = flow.find("machine.rated_voltage", a)
    assert flow.understood(q, a, "4.16 kV", "4.16 kV") == []


def test_the_review_shows_normalised_values():
    a = nameplate(safe_stall_time_cold="15 sec", temperature_rise="80K", locked_rotor_current="6.2 pu")
    a.flow["makers_data"] = True
    rows = dict(flow.review_rows(a)[1][1])
    assert rows["Safe stall time, cold"] == "15 s" and rows["Temperature rise"] == "80 K"
    assert rows["Locked-rotor current"] == "383.9 A (6.2 pu)"  # 6.2 × 61.92 A


# ---------------------------------------------------------------------------------------------------- help and back


def test_help_says_the_meaning_the_forms_the_range_and_the_way_back():
    a = nameplate()
    lines = flow.help_text(flow.find("supply.fault_level", a), a)
    text = " ".join(lines)
    assert "supply.fault_level" in text and "25 kA" in text and "Plausible:" in text
    assert lines[-1] == flow.NAVIGATION and "< and Enter (or Esc)" in flow.NAVIGATION


def test_going_back_reopens_the_last_answer_that_applies():
    a = Answers()
    for key, value in (("machine.kind", MOTOR["kind"]), ("sheet.tag", "M-1"), ("sheet.description", "pump")):
        flow.record(flow.find(key, a), a, value)
    assert flow.go_back(a, "sheet.site").key == "sheet.description"
    assert flow.next_question(a).key == "sheet.description" and a.get("sheet.description") == "pump"
    assert flow.go_back(Answers(), "machine.kind") is None


def test_a_blank_minimum_starting_voltage_says_what_the_study_assumes():
    # issue 10: without the specified starting voltage the study starts the motor at no more than 0.85 pu
    # (common practice, no published source); the wizard says so, not "computed from the fault level"
    from machines.protection.motor_basis import DEFAULT_MINIMUM_STARTING_VOLTAGE

    q = next(q for q in flow.QUESTIONS if q.key == "supply.minimum_starting_voltage")
    meaning = flow.blank_meaning(q, Answers())
    assert f"{DEFAULT_MINIMUM_STARTING_VOLTAGE:.2f} pu" in meaning
