"""The settings record of every example has the keys the record format promises (relaywright.settings/1)."""

from __future__ import annotations

import json

import pytest

from machines.files import load_case
from machines.study import run_study

from conftest import EXAMPLES

REQUIRED = {  # function id -> setting keys every record must carry (the format's table of stable ids)
    "49": {"pickup_current", "heating_time_constant", "cooling_time_constant"},
    "51LR": {"pickup_current", "time_delay", "speed_switch_required"},
    "50P": {"enabled", "pickup_current", "time_delay"},
    "46": {"pickup_current"},
    "50G": {"pickup_current", "time_delay"},
    "27": {"pickup_voltage", "time_delay"},
    "66": {"starts_cold", "starts_hot", "minimum_time_between_starts"},
    "81U": {"stages"},
    "59N": {"pickup_voltage", "coverage", "time_delay"},
    "27TN": {"pickup_voltage", "time_delay"},
    "32": {"pickup_power", "time_delay"},
    "40": {"zone1_offset", "zone1_diameter", "zone1_time_delay", "zone2_offset", "zone2_diameter",
           "zone2_time_delay"},
    "24": {"alarm_pickup", "trip_pickup", "time_delay"},
    "51V": {"pickup_current", "curve"},
}
MOTOR_FUNCTIONS = {"49", "51LR", "50P", "46", "27", "66"}
GENERATOR_FUNCTIONS = {"49", "46", "27", "81U", "32", "40", "24", "51V"}
DERIVED = {"induction-motor": {"locked_rotor_current", "acceleration_time", "starting_voltage"},
           "synchronous-generator": {"base_impedance"}}

EXAMPLE_FILES = sorted(EXAMPLES.glob("*.toml"))


@pytest.fixture(scope="module", params=EXAMPLE_FILES, ids=lambda p: p.stem)
def record_json(request):
    case, warnings = load_case(request.param)
    return json.loads(run_study(case, warnings).dumps())


def test_examples_cover_motors_and_generators():
    kinds = {load_case(p)[0].machine.kind for p in EXAMPLE_FILES}
    assert kinds == {"induction-motor", "synchronous-generator"}
    assert len(EXAMPLE_FILES) >= 5


def test_top_level_keys(record_json):
    for key in ("format", "tag", "kind", "revision", "practice", "inputs_fingerprint", "derived", "functions",
                "checks"):
        assert key in record_json
    assert record_json["format"] == "relaywright.settings/1"
    assert record_json["inputs_fingerprint"].startswith("sha256:") and len(record_json["inputs_fingerprint"]) == 71
    assert DERIVED[record_json["kind"]] <= set(record_json["derived"])


def test_machine_gets_the_functions_it_needs(record_json):
    ids = {f["id"] for f in record_json["functions"]}
    expected = MOTOR_FUNCTIONS if record_json["kind"] == "induction-motor" else GENERATOR_FUNCTIONS
    assert expected <= ids, f"missing functions: {expected - ids}"


def test_every_function_has_the_promised_keys(record_json):
    for f in record_json["functions"]:
        for key in ("id", "title", "settings", "basis", "references", "checks", "test_points"):
            assert key in f, (f["id"], key)
        assert f["basis"].strip(), f["id"]
        assert REQUIRED.get(f["id"], set()) <= set(f["settings"]), (f["id"], REQUIRED[f["id"]] - set(f["settings"]))
        for name, s in f["settings"].items():
            assert {"value", "unit", "source"} <= set(s), (f["id"], name)
            assert s["source"] in {"standard", "common-practice", "maker-data", "entered", "override", "derived"}
        for c in f["checks"]:
            assert c["status"] in {"ok", "warn", "fail"} and c["message"].strip()


def test_enabled_functions_have_test_points(record_json):
    for f in record_json["functions"]:
        if f.get("enabled", True) and f["id"] in REQUIRED and f["id"] not in ("66",):
            assert f["test_points"], f"{f['id']} has no commissioning test point"
            for t in f["test_points"]:
                assert {"quantity", "applied", "applied_unit", "expected_time", "tolerance_time"} <= set(t)
