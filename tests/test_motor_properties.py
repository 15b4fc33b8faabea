"""Property tests over plausible induction motors: the protection invariants hold, or the finding is raised.

Invariants (issue 3; METHODS.md §3.2, 4.1, 13):
- pickups ordered: 49 < 51LR < 50P (or a failed 51LR/50P check says why not);
- the 51LR delay lies in [1.1 × acceleration time, 0.9 × hot stall time], or a speed switch is required and a
  warning says so, or the motor does not accelerate and a failure says so;
- no element trips a normal start (49 replica run through the start, 51LR time above pickup, 50P against the
  asymmetrical inrush, 27 against the starting voltage), unless a failed check reports it;
- the record is valid JSON and every drawing point is positive and finite.
"""

from __future__ import annotations

import json
import math

from hypothesis import HealthCheck, given, settings, strategies as st

from machines.files import case_from_dict
from machines.protection import motor as family
from machines.standards.fault_current import asymmetrical_rms_factor
from machines.standards.thermal_replica import thermal_level
from machines.study import run_study

VOLTAGES = (2300.0, 4160.0, 6600.0, 11000.0)


@st.composite
def motors(draw) -> dict:
    f = draw(st.sampled_from((50.0, 60.0)))
    poles = draw(st.sampled_from((2, 4, 6, 8)))
    slip = draw(st.floats(0.004, 0.02))
    v = draw(st.sampled_from(VOLTAGES))
    hp = draw(st.floats(250.0, 6000.0))
    pf, eff = draw(st.floats(0.80, 0.92)), draw(st.floats(0.93, 0.97))
    flc = hp * 745.7 / (math.sqrt(3) * v * pf * eff)
    t_sc = draw(st.floats(8.0, 40.0))
    t_sh = t_sc * draw(st.floats(0.5, 0.95))
    j_rotor = draw(st.floats(0.5, 5.0)) * hp / 100.0
    ct = max(5, round(flc / draw(st.floats(0.55, 0.95)) / 5) * 5)
    fault = draw(st.floats(60.0, 600.0))
    data = {
        "format": "relaywright.machine/1",
        "sheet": {"tag": "PROP-1"},
        "machine": {
            "kind": "induction-motor", "rated_output": f"{hp:.3f} hp", "rated_voltage": f"{v:.0f} V",
            "frequency": f"{f:g} Hz", "rated_speed": f"{120 * f / poles * (1 - slip):.4f} rpm",
            "power_factor": round(pf, 4), "efficiency": round(eff, 4),
            "service_factor": draw(st.sampled_from((1.0, 1.15))),
            "locked_rotor_torque": f"{draw(st.floats(0.5, 1.6)):.3f} pu",
            "breakdown_torque": f"{draw(st.floats(1.8, 3.0)):.3f} pu",
            "safe_stall_time_cold": f"{t_sc:.3f} s", "safe_stall_time_hot": f"{t_sh:.3f} s",
            "rotor_inertia": f"{j_rotor:.4f} kg*m^2",
        },
        "load": {"inertia": f"{j_rotor * draw(st.floats(0.0, 8.0)):.4f} kg*m^2",
                 "torque_profile": draw(st.sampled_from(("quadratic", "linear", "constant"))),
                 "torque_at_rated_speed": f"{draw(st.floats(0.5, 1.0)):.3f} pu",
                 "breakaway_torque": f"{draw(st.floats(0.0, 0.25)):.3f} pu"},
        "supply": {"nominal_voltage": f"{v:.0f} V", "fault_level": f"{fault:.2f} MVA",
                   "minimum_fault_level": f"{fault * draw(st.floats(0.5, 1.0)):.2f} MVA",
                   "x_over_r": round(draw(st.floats(5.0, 30.0)), 2)},
        "grounding": {"method": draw(st.sampled_from(("low-resistance", "high-resistance", "solid"))),
                      "fault_current_limit": "400 A", "circuit_capacitance": f"{draw(st.floats(0.02, 0.5)):.3f} uF"},
        "instruments": {"phase_ct": f"{ct}/5 A", "ground_ct": "50/5 A", "vt": f"{v:.0f}/120 V"},
    }
    if draw(st.booleans()):
        data["machine"]["locked_rotor_current"] = f"{draw(st.floats(4.5, 7.5)):.3f} pu"
    else:
        data["machine"]["locked_rotor_code"] = draw(st.sampled_from("EFGHJ"))
    if draw(st.booleans()):
        data["supply"]["minimum_starting_voltage"] = f"{draw(st.floats(0.7, 0.95)):.3f} pu"
    if draw(st.integers(0, 3)) == 0:
        data["supply"].update(starter="fused-contactor", contactor_breaking_current="6 kA", fuse_rating="250 A")
    return data


def _fails(record, fid=None) -> list[str]:
    return [c.message for f, c in record.all_checks() if c.status == "fail" and (fid is None or f == fid)]


def _warns(record) -> list[str]:
    return [c.message for _, c in record.all_checks() if c.status == "warn"]


def _replica_peak(start, pickup, tau, theta0) -> float:
    """Independent scalar loop of the IEC 60255-149 level through the start."""
    theta, peak = theta0, theta0
    for j in range(start.times.size - 1):
        theta = thermal_level(float(start.currents[j]), pickup, tau, float(start.times[j + 1] - start.times[j]),
                              theta)
        peak = max(peak, theta)
    return peak


PROFILE = settings(max_examples=150, deadline=None, derandomize=True,
                   suppress_health_check=[HealthCheck.too_slow])


@PROFILE
@given(motors())
def test_protection_invariants(data):
    case, warnings = case_from_dict(data)
    rec = run_study(case, warnings)
    json.loads(rec.dumps())
    basis = family.prepare(case).extras["motor"]
    flc = basis.flc
    s49, s51, s50 = (rec.function(i).settings for i in ("49", "51LR", "50P"))
    p49, p51, p50 = s49["pickup_current"].value, s51["pickup_current"].value, s50["pickup_current"].value

    # pickups ordered, or the failed check says why
    assert (p49 < p51 < p50) or _fails(rec, "51LR") or _fails(rec, "50P")
    assert p49 > flc

    # 51LR delay in its window, or speed switch with a warning, or the start fails
    acc = rec.derived["acceleration_time"].value
    t_sh = case.machine.safe_stall_time_hot
    delay = s51["time_delay"].value
    if acc is None:
        assert any("does not accelerate" in m for m in _fails(rec))
    elif s51["speed_switch_required"].value:
        assert any("zero-speed switch" in m for m in _warns(rec))
        assert delay < t_sh
    else:
        assert 1.1 * acc - 1e-9 <= delay <= 0.9 * t_sh + 1e-9

    # no trip during a normal start unless reported
    if basis.start_min.accelerates:
        tau = s49["heating_time_constant"].value
        peak = max(_replica_peak(basis.start_min, p49, tau, 0.0), _replica_peak(basis.start_min, p49, tau,
                                                                                (flc / p49) ** 2))
        if peak >= 1.0:
            assert any("trip during a normal start" in m for m in _fails(rec, "49"))
        if not s51["speed_switch_required"].value and basis.start_min.time_above(p51) >= delay:
            assert any("would trip a normal start" in m for m in _fails(rec, "51LR"))
    k = asymmetrical_rms_factor(case.supply.x_over_r, 0.5 / case.machine.frequency, case.machine.frequency)
    assert p50 > k * basis.lr_high or _fails(rec, "50P")
    u27 = rec.function("27").settings["pickup_voltage"].value / case.machine.rated_voltage
    blocked = rec.function("27").settings["blocked_during_start"].value
    assert u27 < basis.minimum_voltage or blocked or _fails(rec, "27")

    # fused contactor: 50P out of service and the reason is on the record
    if case.supply.starter == "fused-contactor":
        assert not s50["enabled"].value and "Fused contactor" in rec.function("50P").basis

    # every drawing point positive and finite
    for d in rec.drawings:
        for series in d.series:
            for x, y in series.points:
                assert x > 0 and y > 0 and math.isfinite(x) and math.isfinite(y)


@settings(max_examples=40, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(motors(), st.floats(0.2, 3.0))
def test_overridden_values_are_checked(data, factor):
    """An engineer's value replaces the computed one and is checked like it (DEVELOPERS.md, overrides)."""
    case, w = case_from_dict(data)
    base = run_study(case, w)
    p51 = base.function("51LR").settings["pickup_current"].value
    data = {**data, "overrides": {"51LR.pickup_current": f"{p51 * factor:.3f} A"}}
    case, w = case_from_dict(data)
    rec = run_study(case, w)
    s = rec.function("51LR").settings["pickup_current"]
    # the override is rounded to the nearest relay step (0.01 A secondary by default)
    step = case.relay.current_step * case.instruments.phase_ct.factor
    assert s.source == "override" and abs(s.value - round(p51 * factor, 3)) <= 0.5 * step + 1e-9
    p49 = rec.function("49").settings["pickup_current"].value
    if s.value <= p49:
        assert any("not above the overload pickup" in m for m in _fails(rec, "51LR"))
