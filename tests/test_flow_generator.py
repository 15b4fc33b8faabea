"""The generator questions: the neutral CT where the grounding calls for one, the connection and the exciter asked,
a blank step-up transformer meaning none, and words that fit the prime mover."""

from __future__ import annotations

import tomllib

import pytest

from machines.files import case_from_dict
from machines.study import run_study
from wizard import flow
from wizard.flow import Answers

from conftest import EXAMPLES


def answers(**sections) -> Answers:
    return Answers(data={k: dict(v) for k, v in sections.items()})


def keys_asked(a: Answers) -> set[str]:
    return {q.key for q in flow.applicable(a)}


GENERATOR = {"kind": "synchronous-generator"}


@pytest.mark.parametrize("method, neutral_ct", [
    ("low-resistance", True), ("solid", True), ("high-resistance", False), ("distribution-transformer", False),
])
def test_a_generator_is_asked_for_a_neutral_ct_not_a_core_balance_ct(method, neutral_ct):
    got = keys_asked(answers(machine=GENERATOR, grounding={"method": method}))
    assert ("instruments.neutral_ct" in got) == neutral_ct
    assert "instruments.ground_ct" not in got
    assert "instruments.ground_ct" in keys_asked(answers(machine={"kind": "induction-motor"}))


def test_connection_and_exciter_are_asked():
    got = keys_asked(answers(machine=GENERATOR))
    assert {"supply.connection", "machine.excitation", "supply.ride_through"} <= got
    assert flow.is_required(flow.find("supply.connection", answers(machine=GENERATOR)), answers(machine=GENERATOR))


def test_transformer_questions_only_for_a_unit_transformer():
    unit = keys_asked(answers(machine=GENERATOR, supply={"connection": "unit-transformer"},
                              grounding={"method": "high-resistance"}))
    bus = keys_asked(answers(machine=GENERATOR, supply={"connection": "bus"}, grounding={"method": "high-resistance"}))
    for key in ("supply.transformer_lv_voltage", "supply.transformer_impedance", "grounding.transformer_capacitance"):
        assert key in unit and key not in bus, key
    assert "grounding.system_capacitance" in bus and "grounding.system_capacitance" not in unit
    assert {"grounding.surge_capacitance", "grounding.bus_capacitance"} <= unit & bus


def test_motoring_power_blank_names_the_prime_movers_range():
    # IEEE C37.102 motoring power by prime mover (value from memory): 5 % at the low end for an engine
    a = answers(machine={**GENERATOR, "prime_mover": "reciprocating-engine"})
    meaning = flow.blank_meaning(flow.find("machine.motoring_power", a), a)
    assert "5.0% of rated power" in meaning and "an engine" in meaning and "turbine" not in meaning


def test_a_bus_connected_file_from_the_answers_has_no_transformer_findings():
    data = tomllib.loads((EXAMPLES / "small-hydro-generator.toml").read_text("utf-8"))
    assert data["supply"]["connection"] == "bus" and "transformer_lv_voltage" not in data["supply"]
    record = run_study(*case_from_dict(data))
    for _, c in record.all_checks():
        assert "step-up transformer" not in c.message, c.message
