"""Every setting the relay holds is a whole number of the relay's setting steps, and the study runs on those values.

The steps are the ``[relay]`` table of the machine file (defaults: common practice, no published source). The
property is arithmetic, not engineering: it holds for every machine, so it is checked over the examples and over
generated motors and generators.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import HealthCheck, given, settings

from machines.files import case_from_dict, load_case
from machines.protection.base import StudyContext
from machines.study import run_study

from conftest import EXAMPLES
from test_generator_properties import generators
from test_motor_properties import motors


def _numeric(v) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v)


def assert_stepped(record) -> None:
    for f in record.functions:
        for key, s in f.settings.items():
            if not s.keyed or s.source == "derived" or not _numeric(s.value):
                continue
            assert s.step is not None and s.step > 0, f"{f.id}.{key} carries no step"
            relay_side = s.secondary if s.secondary is not None else s.value
            n = relay_side / s.step
            assert abs(n - round(n)) < 1e-6 * max(1.0, abs(n)), f"{f.id}.{key} = {relay_side} is not a multiple of {s.step}"
        for i, tp in enumerate(f.test_points, 1):
            assert tp.id == f"{f.id}.{i}"
            if tp.applied_unit in ("A", "V"):
                assert tp.phases is not None and len(tp.phases) == 3, f"{tp.id} has no phases"
                for p in tp.phases:
                    assert p["magnitude"] >= 0 and -180.0 < p["angle"] <= 180.0


@pytest.mark.parametrize("path", sorted(EXAMPLES.glob("*.toml")), ids=lambda p: p.stem)
def test_examples_are_stepped(path):
    case, warnings = load_case(path)
    assert_stepped(run_study(case, warnings))


@settings(max_examples=30, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(motors())
def test_generated_motors_are_stepped(data):
    case, warnings = case_from_dict(data)
    assert_stepped(run_study(case, warnings))


@settings(max_examples=30, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(generators())
def test_generated_generators_are_stepped(data):
    case, warnings = case_from_dict(data)
    assert_stepped(run_study(case, warnings))


def test_coarse_relay_steps_from_the_file():
    # a relay with 0.05 A and 0.1 s steps: the 49 pickup and the 51LR delay land on them
    path = EXAMPLES / "chiller-compressor-motor.toml"
    import tomllib

    data = tomllib.loads(path.read_text("utf-8"))
    data["relay"] = {"current_step": "0.05 A", "time_step": "0.1 s"}
    case, warnings = case_from_dict(data)
    rec = run_study(case, warnings)
    p49 = rec.function("49").settings["pickup_current"]
    assert p49.step == pytest.approx(0.05) and round(p49.secondary / 0.05, 9).is_integer()
    d51 = rec.function("51LR").settings["time_delay"]
    assert d51.step == pytest.approx(0.1) and round(d51.value / 0.1, 9).is_integer()


def test_round_to_step_directions():
    # arithmetic of the rounding: nearest, up (keeps a lower bound), down (keeps an upper bound)
    assert StudyContext.round_to_step(9.935, 0.1) == pytest.approx(9.9)
    assert StudyContext.round_to_step(9.935, 0.1, rounding="up") == pytest.approx(10.0)
    assert StudyContext.round_to_step(9.935, 0.1, rounding="down") == pytest.approx(9.9)
    assert StudyContext.round_to_step(0.004, 0.01) == pytest.approx(0.01)  # a positive setting never becomes 0
