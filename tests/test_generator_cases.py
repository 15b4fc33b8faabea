"""Generator test cases built in code, and checks that the two example generators study cleanly.

The builders are imported by the other generator tests. The numbers are invented for the tests (plausible, not from
any real machine) except where a test says it reproduces a check value of METHODS.md.
"""

from __future__ import annotations

import copy
import tomllib

from machines.files import case_from_dict, load_case
from machines.protection import generator
from machines.study import run_study

from conftest import EXAMPLES, FINE_RELAY

BASE = {
    "format": "relaywright.machine/1",
    "sheet": {"tag": "TEST-G-1", "site": "Harbourside District Cooling and Water Plant"},
    "study": {"practice": "IEEE"},
    "machine": {
        "kind": "synchronous-generator", "rated_apparent_power": "100 MVA", "rated_voltage": "13.8 kV",
        "power_factor": 0.85, "frequency": "60 Hz", "rated_speed": "3600 rpm", "prime_mover": "steam-turbine",
        "rotor": "cylindrical-indirect", "xd": "1.8 pu", "xd_transient": "0.25 pu", "xd_subtransient": "0.18 pu",
        "x2": "0.2 pu", "stator_capacitance": "0.2 uF", "third_harmonic_neutral_min": "300 V",
        "excitation": "rotating-dc",
    },
    "supply": {"nominal_voltage": "13.8 kV", "connection": "unit-transformer", "fault_level": "1500 MVA",
               "x_over_r": 40, "transformer_lv_voltage": "13.8 kV"},
    "grounding": {"method": "distribution-transformer", "system_capacitance": "0.05 uF",
                  "transformer_ratio": "13800/240 V"},
    "instruments": {"phase_ct": "5000/5 A", "vt": "14400/120 V", "neutral_vt": "13800/240 V"},
    "relay": FINE_RELAY,
}


def generator_data(**changes) -> dict:
    """The base test generator as plain machine-file data; ``changes`` maps ``"section.key"`` to a new value
    (None deletes the key)."""
    data = copy.deepcopy(BASE)
    for path, value in changes.items():
        section, _, key = path.partition(".")
        table = data.setdefault(section, {})
        if value is None:
            table.pop(key, None)
        else:
            table[key] = value
    return data


def generator_case(**changes):
    """A validated MachineCase from :func:`generator_data`."""
    case, _ = case_from_dict(generator_data(**changes))
    return case


def study(**changes):
    """The settings record of the changed base generator."""
    case, warnings = case_from_dict(generator_data(**changes))
    return run_study(case, warnings)


def context(**changes):
    """The prepared StudyContext of the changed base generator."""
    return generator.prepare(generator_case(**changes))


def test_example_generators_study_without_failures():
    # common practice, no published source: the demo machines are meant to be workable as delivered
    for name in ("gas-engine-generator.toml", "small-hydro-generator.toml"):
        case, warnings = load_case(EXAMPLES / name)
        record = run_study(case, warnings)
        assert record.kind == "synchronous-generator"
        assert record.worst != "fail", [c.message for _, c in record.all_checks() if c.status == "fail"]
        assert case.sheet.site == "Harbourside District Cooling and Water Plant"


def test_example_gas_engine_has_third_harmonic_and_transformer_grounding():
    data = tomllib.loads((EXAMPLES / "gas-engine-generator.toml").read_text("utf-8"))
    assert data["machine"]["prime_mover"] == "reciprocating-engine"
    assert data["grounding"]["method"] == "distribution-transformer"
    record = run_study(*load_case(EXAMPLES / "gas-engine-generator.toml"))
    assert record.function("27TN") is not None and record.function("59N") is not None


def test_example_hydro_is_salient_with_damper():
    data = tomllib.loads((EXAMPLES / "small-hydro-generator.toml").read_text("utf-8"))
    assert (data["machine"]["prime_mover"], data["machine"]["rotor"]) == ("hydro", "salient-with-damper")
