"""Property tests over plausible induction motors: the protection invariants hold, or the finding is raised.

Invariants (issues 3 and 10; METHODS.md §2.4, 3.2, 4.1, 13):
- pickups ordered: 49 < 51LR < 50P (or a failed 51LR/50P check says why not);
- the 51LR delay is at least max(t_acc + 2 s, 1.2·t_acc) on the long end of the acceleration range at the minimum
  starting voltage and at most 0.9 × the hot locked-rotor limit, or a speed switch is required and a warning says
  so, or the start is not bounded and a failure says so;
- 49's hot trip at locked-rotor current is at most 0.90 × the hot stall limit, or a check says why not; no computed
  heating time constant above 180 min and no restart inhibit above a day;
- no element trips a normal start (49 replica run through the start, 51LR time above pickup, 50P against the
  asymmetrical inrush, 27 against the starting voltage), unless a failed check reports it;
- every current or voltage test point's phasors, read by an independent model of each function with all its
  stages enabled, give the operate time (or no operation) the test expects;
- one override leaves every other computed setting unchanged;
- the record is valid JSON, no message says "inf" or "nan", and every drawing point is positive and finite.
"""

from __future__ import annotations

import cmath
import json
import math
import re

from hypothesis import HealthCheck, given, settings, strategies as st

from machines.files import case_from_dict
from machines.protection import motor as family
from machines.standards.fault_current import asymmetrical_rms_factor
from machines.standards.thermal_replica import thermal_level, thermal_operate_time
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
    t_lr = draw(st.floats(0.5, 1.6))
    data = {
        "format": "relaywright.machine/1",
        "sheet": {"tag": "PROP-1"},
        "machine": {
            "kind": "induction-motor", "rated_output": f"{hp:.3f} hp", "rated_voltage": f"{v:.0f} V",
            "frequency": f"{f:g} Hz", "rated_speed": f"{120 * f / poles * (1 - slip):.4f} rpm",
            "power_factor": round(pf, 4), "efficiency": round(eff, 4),
            "service_factor": draw(st.sampled_from((1.0, 1.15))),
            "locked_rotor_torque": f"{t_lr:.3f} pu",
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
        data["machine"]["pull_up_torque"] = f"{t_lr * draw(st.floats(0.8, 1.0)):.3f} pu"
    if draw(st.integers(0, 3)) == 0:
        data["machine"]["thermal_limit"] = [{"curve": "running", "state": "hot", "points": [
            ["1.5 pu", f"{draw(st.floats(300.0, 1500.0)):.1f} s"], ["3 pu", f"{draw(st.floats(40.0, 250.0)):.1f} s"]]}]
    if draw(st.integers(0, 3)) == 0:
        data["load"]["minimum_load"] = f"{draw(st.floats(0.3, 0.8)):.2f} pu"
    if draw(st.integers(0, 3)) == 0:
        data["supply"].update(starter="fused-contactor", contactor_breaking_current="6 kA", fuse_rating="250 A")
        data["instruments"].update(phase_ct_class="C200", phase_ct_burden="0.2 ohm")
    return data


def _fails(record, fid=None) -> list[str]:
    return [c.message for f, c in record.all_checks() if c.status == "fail" and (fid is None or f == fid)]


def _warns(record, fid=None) -> list[str]:
    return [c.message for f, c in record.all_checks() if c.status == "warn" and (fid is None or f == fid)]


def _replica_peak(start, pickup, tau, theta0) -> float:
    """Independent scalar loop of the IEC 60255-149 level through the start."""
    theta, peak = theta0, theta0
    for j in range(start.times.size - 1):
        theta = thermal_level(float(start.currents[j]), pickup, tau, float(start.times[j + 1] - start.times[j]),
                              theta)
        peak = max(peak, theta)
    return peak


PROFILE = settings(max_examples=120, deadline=None, derandomize=True,
                   suppress_health_check=[HealthCheck.too_slow])
INF_NAN = re.compile(r"\b(inf|nan|infinity)\b", re.IGNORECASE)


def _texts(rec) -> list[str]:
    out = [c.message for _, c in rec.all_checks()]
    for f in rec.functions:
        out.append(f.basis)
        out += [s.note for s in f.settings.values()] + [t.description for t in f.test_points]
    out += [s.note for s in rec.derived.values()]
    return out


@PROFILE
@given(motors())
def test_protection_invariants(data):
    case, warnings = case_from_dict(data)
    rec = run_study(case, warnings)
    json.loads(rec.dumps())
    assert not [t for t in _texts(rec) if INF_NAN.search(t)]
    basis = family.prepare(case).extras["motor"]
    flc = basis.flc
    s49, s51, s50 = (rec.function(i).settings for i in ("49", "51LR", "50P"))
    p49, p51, p50 = s49["pickup_current"].value, s51["pickup_current"].value, s50["pickup_current"].value

    # pickups ordered, or the failed check says why
    assert (p49 < p51 < p50) or _fails(rec, "51LR") or _fails(rec, "50P")
    assert p49 > flc

    # the starting voltage: no more than 0.85 pu unless the file gives it
    if "minimum_starting_voltage" not in data["supply"]:
        assert rec.derived["minimum_starting_voltage"].value <= 0.85 + 1e-9

    # 51LR delay on the long end, or a speed switch with a warning, or the start is not bounded and fails
    acc = rec.derived["acceleration_time"].value
    t_stall = basis.stall_time(basis.lr_high, "hot")
    delay = s51["time_delay"].value
    if acc is None:
        assert any("does not accelerate" in m for m in _fails(rec))
    elif s51["speed_switch_required"].value:
        assert any("zero-speed switch" in m for m in _warns(rec, "51LR"))
        assert delay < t_stall and rec.function("48") is not None
    else:
        assert max(acc + 2.0, 1.2 * acc) - 1e-9 <= delay <= 0.9 * t_stall + 1e-9

    # 49: hot trip at locked-rotor current within 0.9 × the hot stall limit, or a check says why not
    tau = s49["heating_time_constant"].value
    t_hot = thermal_operate_time(basis.lr_high, p49, tau, flc)
    if t_hot > 0.9 * t_stall * (1 + 1e-6):
        assert any("stall" in m for m in _warns(rec, "49") + _fails(rec, "49"))
    assert tau <= 180 * 60 + 6.0 or _warns(rec, "49")
    assert rec.function("66").settings["minimum_time_between_starts"].value <= 86400.0

    # no trip during a normal start unless reported
    if basis.start_min.accelerates:
        peak = max(_replica_peak(basis.start_min, p49, tau, 0.0), _replica_peak(basis.start_min, p49, tau,
                                                                                (flc / p49) ** 2))
        if peak >= 1.0:
            assert any("would trip during" in m for m in _fails(rec, "49"))
        if not s51["speed_switch_required"].value and basis.start_min.time_above(p51) >= delay:
            assert any("would trip a normal start" in m for m in _fails(rec, "51LR"))
    k = asymmetrical_rms_factor(case.supply.x_over_r, 0.5 / case.machine.frequency, case.machine.frequency)
    assert p50 > k * basis.lr_high or _fails(rec, "50P") or not s50["enabled"].value
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
    assert [p["label"] for p in rec.start_profiles] == ["minimum", "rated"]


# ---------------------------------------------------------------------------------------------------- test points


def _z(p: dict) -> complex:
    return cmath.rect(p["magnitude"], math.radians(p["angle"]))


def _sequence(phases) -> tuple[float, float, float]:
    """|I0|, |I1|, |I2| of three phasors (Fortescue)."""
    a = cmath.rect(1.0, 2 * math.pi / 3)
    ia, ib, ic = (_z(p) for p in phases)
    return abs(ia + ib + ic) / 3, abs(ia + a * ib + a * a * ic) / 3, abs(ia + a * a * ib + a * ic) / 3


def _sec(s) -> float:
    return s.secondary if s.secondary is not None else s.value


def _expected(fid: str, f, tp, rec) -> float | None:
    """The operate time an independent model of function ``fid`` with every stage enabled gives for the test
    point's phasors (relay side), or None for no operation within the injection."""
    s = f.settings
    if fid == "49":
        i0, i1, i2 = _sequence(tp.phases)
        k = rec.derived["negative_sequence_heating_weight"].value
        i_eq = math.sqrt(i1 * i1 + k * i2 * i2)
        pk = _sec(s["pickup_current"])
        tau = s["heating_time_constant"].value
        prior = pk * math.sqrt(tp.prefault["thermal_level"]) if tp.prefault else 0.0
        t = thermal_operate_time(i_eq, pk, tau, prior)
        return t if math.isfinite(t) and (tp.duration is None or t <= tp.duration) else None
    if fid == "51LR":
        i = max(p["magnitude"] for p in tp.phases)
        state = tp.initial_state
        times = []
        switch = s["speed_switch_required"].value
        if i > _sec(s["pickup_current"]) and ("standstill" in state or (not switch and "start" in state)
                                              or not switch):
            times.append(s["time_delay"].value)
        if "start complete" in state and i > _sec(s["jam_pickup_current"]):
            times.append(s["jam_time_delay"].value)
        return min(times) if times else None
    if fid == "48":
        i = max(p["magnitude"] for p in tp.phases)
        return _sec(s["start_current"]) ** 2 * s["start_time"].value / i ** 2
    if fid == "50P":
        i = max(p["magnitude"] for p in tp.phases)
        block = s.get("trip_block_current")
        if block is not None and i > _sec(block):
            return None
        if not s["enabled"].value or i <= _sec(s["pickup_current"]):
            return None
        return max(s["time_delay"].value, 0.03)
    if fid == "46":
        _, i1, i2 = _sequence(tp.phases)
        times = []
        if i2 >= _sec(s["pickup_current"]) * (1 - 1e-9):
            times.append(s["time_delay"].value)
        if i1 > 0 and i2 / i1 >= s["single_phasing_ratio"].value * (1 - 1e-9):
            times.append(s["single_phasing_time_delay"].value)
        if "alarm output" in tp.quantity:
            return s["alarm_time_delay"].value if i2 >= _sec(s["alarm_pickup_current"]) and not times else -1.0
        return min(times) if times else None
    if fid == "50G":
        assert tp.phases[1]["magnitude"] == 0.0 and tp.phases[2]["magnitude"] == 0.0
        return s["time_delay"].value if tp.phases[0]["magnitude"] > _sec(s["pickup_current"]) else None
    if fid == "27":
        va, vb = _z(tp.phases[0]), _z(tp.phases[1])
        return s["time_delay"].value if abs(va - vb) < _sec(s["pickup_voltage"]) else None
    if fid == "37":
        i = max(p["magnitude"] for p in tp.phases)
        return s["time_delay"].value if i < _sec(s["pickup_current"]) else None
    if fid == "87M":
        side1 = [_z(p) for p in tp.phases]
        side2 = [_z(p) for p in tp.current_phases] if tp.current_phases else [0j, 0j, 0j]
        i_d = max(abs(x + y) for x, y in zip(side1, side2))
        i_r = max((abs(x) + abs(y)) / 2 for x, y in zip(side1, side2))
        slope = s["slope"].value
        return 0.03 if i_d > max(_sec(s["pickup_current"]), slope * i_r) else None
    raise AssertionError(f"no model for {fid}")


def check_test_points(rec) -> None:
    """Every current or voltage test point of the motor functions does what it says on a relay with all stages."""
    for f in rec.functions:
        for tp in f.test_points:
            if tp.applied_unit not in ("A", "V"):
                continue
            assert tp.phases and len(tp.phases) == 3, tp.id
            want = _expected(f.id, f, tp, rec)
            if tp.expected_time is None:
                assert want is None, f"{tp.id}: {tp.description} operates in {want} s"
                assert tp.duration, f"{tp.id}: a must-not-operate test states how long to inject"
            else:
                assert want is not None and want >= 0.0, f"{tp.id}: {tp.description} does not operate"
                assert abs(want - tp.expected_time) <= max(tp.tolerance_time, 1e-6) * 0.2 + 1e-6, \
                    f"{tp.id}: expected {tp.expected_time} s, the stages give {want} s"
            if tp.expected_time and tp.expected_time > 120.0:
                assert tp.duration, f"{tp.id}: a long test states how long to inject"


@PROFILE
@given(motors())
def test_every_test_point_satisfies_every_stage(data):
    case, warnings = case_from_dict(data)
    check_test_points(run_study(case, warnings))


def test_example_test_points_satisfy_every_stage(examples):
    from machines.files import load_case

    for path in sorted(examples.glob("*motor*.toml")):
        case, warnings = load_case(path)
        check_test_points(run_study(case, warnings))


# ---------------------------------------------------------------------------------------------------- overrides


def _keyed(rec) -> dict[str, object]:
    return {f"{f.id}.{k}": s.value for f in rec.functions for k, s in f.settings.items()}


@settings(max_examples=60, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(motors(), st.integers(0, 10_000), st.floats(0.5, 1.5))
def test_one_override_changes_only_itself(data, pick, factor):
    """An override replaces its own value; every other computed setting stays as it was (issue 10 item 6)."""
    case, w = case_from_dict(data)
    base = run_study(case, w)
    values = _keyed(base)
    numeric = sorted(k for k, v in values.items() if isinstance(v, float) and not isinstance(v, bool) and v > 0
                     and base.function(k.split(".")[0]).settings[k.split(".", 1)[1]].source != "derived")
    key = numeric[pick % len(numeric)]
    fid, name = key.split(".", 1)
    setting = base.function(fid).settings[name]
    unit = {"A": "A", "V": "V", "s": "s", "pu": "pu", "": "pu"}.get(setting.unit, setting.unit)
    case, w = case_from_dict({**data, "overrides": {key: f"{setting.value * factor:.6g} {unit}".strip()}})
    rec = run_study(case, w)
    after = _keyed(rec)
    assert rec.function(fid).settings[name].source == "override"
    for k, v in values.items():
        if k != key and k in after:
            assert after[k] == v, f"overriding {key} changed {k}: {v} → {after[k]}"


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
