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
