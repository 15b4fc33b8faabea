"""The induction-motor study end to end: settings, checks, test points, drawings and the edge cases of issue 3.

Motors are built in code from :func:`motor_data` (a plain machine-file dict), so each test states the one thing
it changes.
"""

from __future__ import annotations

import copy
import json
import math

import pytest

from machines.errors import InputError
from machines.files import case_from_dict
from machines.standards.nema import HP
from machines.standards.thermal_replica import thermal_operate_time
from machines.study import run_study

from conftest import FINE_RELAY

#: half a current step in primary amperes (0.0001 A secondary on the 100/5 CT of the base motor): settings are rounded
#: to the relay's step, so values computed from a rule are compared within it
HALF_STEP_A = 0.5 * 0.0001 * 20.0
#: half a voltage step in primary volts (0.001 V on the 4200/120 VT)
HALF_STEP_V = 0.5 * 0.001 * 35.0

BASE = {
    "format": "relaywright.machine/1",
    "sheet": {"tag": "TEST-M-1"},
    "machine": {
        "kind": "induction-motor", "rated_output": "500 hp", "rated_voltage": "4.16 kV", "frequency": "60 Hz",
        "rated_speed": "1785 rpm", "power_factor": 0.88, "efficiency": "95 %", "service_factor": 1.0,
        "locked_rotor_current": "6.2 pu", "locked_rotor_torque": "0.9 pu", "breakdown_torque": "2.3 pu",
        "safe_stall_time_cold": "20 s", "safe_stall_time_hot": "14 s", "rotor_inertia": "12 kg*m^2",
    },
    "load": {"inertia": "20 kg*m^2", "torque_profile": "quadratic", "torque_at_rated_speed": "0.9 pu",
             "breakaway_torque": "0.1 pu"},
    "supply": {"nominal_voltage": "4.16 kV", "fault_level": "250 MVA", "minimum_fault_level": "150 MVA",
               "x_over_r": 15, "minimum_starting_voltage": "0.85 pu"},
    "grounding": {"method": "low-resistance", "fault_current_limit": "400 A", "circuit_capacitance": "0.1 uF"},
    "instruments": {"phase_ct": "100/5 A", "ground_ct": "50/5 A", "vt": "4200/120 V"},
    "relay": FINE_RELAY,
}


def motor_data(**changes) -> dict:
    """A copy of BASE with ``section__key=value`` changes (value None deletes the key)."""
    data = copy.deepcopy(BASE)
    for name, value in changes.items():
        section, _, key = name.partition("__")
        if value is None:
            data[section].pop(key, None)
        else:
            data.setdefault(section, {})[key] = value
    return data


def study(**changes):
    case, warnings = case_from_dict(motor_data(**changes))
    return run_study(case, warnings)


def messages(record, status=None, fid=None) -> list[str]:
    return [c.message for f, c in record.all_checks() if (status is None or c.status == status)
            and (fid is None or f == fid)]


def value(record, fid, key):
    return record.function(fid).settings[key].value


# ---------------------------------------------------------------------------------------------------- the record


def test_ids_and_required_keys():
    # DEVELOPERS.md table of stable ids and required keys
    rec = study(load__minimum_load="0.4 pu")
    need = {"49": {"pickup_current", "heating_time_constant", "cooling_time_constant"},
            "51LR": {"pickup_current", "time_delay", "speed_switch_required"},
            "50P": {"enabled", "pickup_current", "time_delay"}, "46": {"pickup_current"},
            "50G": {"pickup_current", "time_delay"}, "27": {"pickup_voltage", "time_delay"},
            "66": {"starts_cold", "starts_hot", "minimum_time_between_starts"}, "37": {"pickup_current", "time_delay"}}
    for fid, keys in need.items():
        assert keys <= set(rec.function(fid).settings), fid
    for key in ("locked_rotor_current", "acceleration_time", "starting_voltage", "thermal_capacity_per_start"):
        s = rec.derived[key]
        assert s.source in ("derived", "entered") and s.unit
    assert rec.function("81U") is None  # no load-shedding stages given
    json.loads(rec.dumps())  # the record is valid JSON (no NaN / inf)


def test_secondary_values_through_cts():
    # secondary = primary / ratio (IEEE C57.13 ratio definition): 100/5, 50/5, 4200/120
    rec = study()
    p = rec.function("49").settings["pickup_current"]
    assert p.secondary == pytest.approx(p.value / 20.0)
    g = rec.function("50G").settings["pickup_current"]
    assert g.secondary == pytest.approx(g.value / 10.0)
    v = rec.function("27").settings["pickup_voltage"]
    assert v.secondary == pytest.approx(v.value / 35.0)


def test_thermal_test_points_from_cold_and_hot():
    # IEC 60255-149 cold and hot curves; tolerance ± 5 % or ± 30 ms (IEC 60255-149 template, METHODS.md §12.2)
    rec = study()
    f = rec.function("49")
    pk, tau = f.settings["pickup_current"].value, f.settings["heating_time_constant"].value
    flc = rec.derived["rated_current"].value
    cold = [t for t in f.test_points if t.expected_time is not None and t.initial_state == "cold"]
    assert len(cold) >= 3
    for t in cold:
        assert t.secondary and "IEC 60255-149" in t.tolerance_rule
        assert t.expected_time == pytest.approx(thermal_operate_time(t.applied_primary, pk, tau))
        assert t.tolerance_time == pytest.approx(max(0.05 * t.expected_time, 0.03))
        assert t.applied == pytest.approx(t.applied_primary / 20.0)
    (hot,) = [t for t in f.test_points if t.initial_state == "hot"]
    # the hot test starts from the level FLC holds, (I_B/k·I_B)², and trips at ≤ 0.9 × the hot stall time
    assert hot.prefault["thermal_level"] == pytest.approx((flc / pk) ** 2, abs=1e-4)
    assert hot.prefault["phases"][0]["magnitude"] == pytest.approx(flc / 20.0)
    assert hot.expected_time == pytest.approx(thermal_operate_time(hot.applied_primary, pk, tau, flc))
    assert hot.expected_time <= 0.9 * 14.0


def test_definite_time_test_points():
    # METHODS.md §12: definite-time elements get a pickup test and a delay test
    rec = study()
    for fid in ("51LR", "50G", "27", "46"):
        tps = rec.function(fid).test_points
        assert any(t.expected_time is None for t in tps), fid
        assert any(t.expected_time for t in tps), fid


def test_drawing_points_positive_and_in_range():
    # reportlab log axes refuse values ≤ 0 (measured: values ≤ 0 raise in LogValueAxis): every point positive, finite and inside the range
    rec = study()
    (d,) = [d for d in rec.drawings if d.kind == "time-current"]
    assert d.log_x and d.log_y and d.x_label == "Current [A primary]" and d.y_label == "Time [s]"
    labels = " ".join(s.label for s in d.series)
    for want in ("Start", "49 from cold", "49 from hot", "Safe stall, cold", "Safe stall, hot", "51LR", "50P"):
        assert want in labels
    for s in d.series:
        for x, y in s.points:
            assert x > 0 and y > 0 and math.isfinite(x) and math.isfinite(y)
            assert d.x_range[0] <= x <= d.x_range[1] and d.y_range[0] <= y <= d.y_range[1]
    assert [s.style for s in d.series if s.label.startswith("Safe stall")] == ["points", "points"]


# ---------------------------------------------------------------------------------------------------- 49


def test_sf_115_vs_10():
    # common practice, no published source: (SF + 0.05) × FLC, at least 1.10 × FLC (room for an alarm above full
    # load); NEC 430.32(A)(1) as guidance under IEEE practice: SF 1.0 ≤ 115 %, SF 1.15 ≤ 125 %
    r10, r115 = study(), study(machine__service_factor=1.15)
    flc = r10.derived["rated_current"].value
    assert value(r10, "49", "pickup_current") == pytest.approx(1.10 * flc, abs=2 * HALF_STEP_A)
    assert value(r115, "49", "pickup_current") == pytest.approx(1.20 * flc, abs=2 * HALF_STEP_A)
    assert value(r115, "49", "pickup_current") <= 1.25 * flc
    # the alarm sits halfway between 1.05 × FLC and the pickup in steady running: 1.075 × FLC on SF 1.0
    alarm = value(r10, "49", "alarm_level")
    assert value(r10, "49", "pickup_current") * math.sqrt(alarm) / flc == pytest.approx(1.075, abs=5e-3)
    assert not messages(r10, "warn", "49") or not any("alarm" in m for m in messages(r10, "warn", "49"))


def test_49_override_above_nec_warns_on_ieee_practice_and_1_5_flc_fails():
    # NFPA 70 (NEC) 430.32(A)(1) (SF 1.0 → at most 115 % of FLC) is guidance for medium voltage: a warning
    case, w = case_from_dict({**motor_data(), "study": {"practice": "IEEE"}, "overrides": {"49.pickup_current": "75 A"}})
    rec = run_study(case, w)
    assert rec.function("49").settings["pickup_current"].source == "override"
    assert any("NEC 430.32" in m for m in messages(rec, "warn", "49"))
    # 1.5 × FLC on a service-factor 1.0 motor: beyond NEC 430.32(C)'s 130 % in either practice, a failure
    for practice in ("IEEE", "IEC"):
        case, w = case_from_dict({**motor_data(), "study": {"practice": practice},
                                  "overrides": {"49.pickup_current": f"{1.5 * 61.92:.2f} A"}})
        rec = run_study(case, w)
        assert any("sustained overload" in m for m in messages(rec, "fail", "49")), practice
        assert rec.worst == "fail"


def test_49_shows_locked_rotor_times_and_margins():
    # METHODS.md §2.2 [D], common practice (10 % margin): fitted so the replica trips hot at I_LR in 0.9 × t_sh;
    # from cold much later (a derived value, not a setting)
    rec = study()
    assert "trip_time_locked_rotor_hot" not in rec.function("49").settings
    hot, cold = (rec.derived[f"thermal_trip_time_locked_rotor_{k}"] for k in ("hot", "cold"))
    # (τ is rounded down to the 0.1 s step, so the hot trip comes a little before 0.9 × t_sh)
    assert hot.value == pytest.approx(0.9 * 14.0, abs=0.01) and hot.value <= 0.9 * 14.0
    assert cold.value > 20.0
    assert any("stall from cold is protected by 51LR" in m for m in messages(rec, "warn", "49"))


def test_49_below_pickup_test_says_what_the_alarm_does():
    # IEC 60255-149 replica from cold at 0.95 × pickup: θ(t) = 0.9025·(1 − e^(−t/τ)), 86 % of trip after 3τ; an alarm
    # level a below that operates within the 3τ injection, after τ·ln(0.9025 / (0.9025 − a))
    def point(rec):
        return next(tp for tp in rec.function("49").test_points if tp.id == "49.4")

    rec = study()
    assert value(rec, "49", "alarm_level") > 0.86
    assert point(rec).expected_time is None and "neither the trip nor the thermal alarm" in point(rec).description
    rec = study(**{"overrides__49.alarm_level": "0.8 pu"})
    tau = value(rec, "49", "heating_time_constant")
    minutes = tau * math.log(0.9025 / (0.9025 - 0.8)) / 60
    assert point(rec).expected_time is None
    assert f"the thermal alarm (80 %) operates after {minutes:.0f} min" in point(rec).description


def test_46_below_pickup_test_says_what_the_alarm_does():
    # the 46 alarm stage is definite time above its pickup: within the injection only when its delay is shorter
    def point(rec):
        return next(tp for tp in rec.function("46").test_points if tp.id == "46.1")

    rec = study()
    assert value(rec, "46", "alarm_time_delay") > value(rec, "46", "time_delay") + 2.0
    assert point(rec).expected_time is None and "the alarm output does not operate either" in point(rec).description
    rec = study(**{"overrides__46.alarm_time_delay": "3 s"})
    assert point(rec).expected_time is None and "the alarm output operates after 3 s" in point(rec).description


def test_49_short_time_constant_trips_start():
    # IEC 60255-149 replica run through the start: a τ fitted to the cold stall trips a hot start (METHODS.md §2.2)
    rec = study(**{"overrides__49.heating_time_constant": "60 s"})
    assert any("would trip during a start from hot" in m for m in messages(rec, "fail", "49"))


def test_maker_time_constant_is_used():
    # DEVELOPERS.md: the maker's data take precedence over a fitted value
    rec = study(machine__heating_time_constant="40 min")
    s = rec.function("49").settings["heating_time_constant"]
    assert s.value == pytest.approx(2400.0) and s.source == "maker-data"


# ---------------------------------------------------------------------------------------------------- 51LR


def test_51lr_window_and_order():
    # METHODS.md §3.2, common practice: pickup between overload and 0.8·I_LR·V_min; delay in
    # [max(t_acc + 2 s, 1.2·t_acc), 0.9·t_sh] on the long end of the acceleration range
    rec = study()
    f = rec.function("51LR")
    acc = rec.derived["acceleration_time"].value
    assert not f.settings["speed_switch_required"].value
    assert max(acc + 2.0, 1.2 * acc) <= f.settings["time_delay"].value <= 0.9 * 14.0
    assert "delay_window_low" not in f.settings
    assert value(rec, "49", "pickup_current") < f.settings["pickup_current"].value < value(rec, "50P", "pickup_current")


def test_acceleration_longer_than_hot_stall_needs_speed_switch():
    # METHODS.md §3.2/3.4: no delay window → zero-speed switch
    rec = study(load__inertia="400 kg*m^2")
    acc = rec.derived["acceleration_time"].value
    assert acc > 14.0
    f = rec.function("51LR")
    assert f.settings["speed_switch_required"].value is True
    assert f.settings["time_delay"].value < 14.0
    assert any("zero-speed switch" in m for m in messages(rec, "warn"))


def test_speed_switch_override_false_fails():
    # METHODS.md §3.2 [P]: with no delay window a zero-speed switch is needed; an override cannot remove the need
    rec = study(load__inertia="400 kg*m^2", **{"overrides__51LR.speed_switch_required": "false"})
    assert any("speed_switch_required was set false" in m for m in messages(rec, "fail", "51LR"))


# ---------------------------------------------------------------------------------------------------- starting


def test_cannot_accelerate_at_minimum_voltage():
    # METHODS.md §3.3: T_m·V² ≤ T_L below breakdown speed → failed check
    rec = study(supply__minimum_starting_voltage="0.6 pu", load__torque_profile="constant",
                load__torque_at_rated_speed="0.95 pu")
    assert rec.derived["acceleration_time"].value is None
    assert any("does not accelerate" in m for m in messages(rec, "fail"))
    assert rec.worst == "fail"
    json.loads(rec.dumps())
    for d in rec.drawings:
        for s in d.series:
            assert all(x > 0 and y > 0 for x, y in s.points)


def test_starting_voltage_from_fault_level_when_not_given():
    # voltage divider of source and locked-rotor impedance, source = minimum fault level, bus at 0.95 pu before the
    # start; with no minimum starting voltage the study takes no more than 0.85 pu (common practice) and says so
    rec = study(supply__minimum_starting_voltage=None)
    flc = rec.derived["rated_current"].value
    z_lr = 4160 / (math.sqrt(3) * 6.2 * flc)
    z_s = 4160 ** 2 / 150e6
    assert rec.derived["starting_voltage"].value == pytest.approx(0.95 * z_lr / (z_lr + z_s))
    assert rec.derived["minimum_starting_voltage"].value == pytest.approx(0.85)
    assert rec.derived["minimum_starting_voltage"].source == "common-practice"
    assert any("No supply.minimum_starting_voltage" in m for m in messages(rec, "warn"))
    # a weak source gives a lower voltage, which the study takes instead
    weak = study(supply__minimum_starting_voltage=None, supply__minimum_fault_level="20 MVA")
    v = weak.derived["starting_voltage"].value
    assert v < 0.85 and weak.derived["minimum_starting_voltage"].value == pytest.approx(v)


def test_inertia_in_wk2():
    # METHODS.md §3.3: J [kg·m²] = 0.04214 × WK² [lb·ft²]
    a = study(load__inertia="40 kg*m^2").derived["acceleration_time"].value
    b = study(load__inertia=f"{40 / 0.0421401101:.6f} lb*ft^2").derived["acceleration_time"].value
    assert a == pytest.approx(b, rel=1e-6)


# ---------------------------------------------------------------------------------------------------- code letter


def test_code_letter_instead_of_current():
    # NEMA MG 1 10.37.2: code G = 5.6–6.3 kVA/hp; upper bound for reach (50P), lower for sensitivity (51LR)
    rec = study(machine__locked_rotor_current=None, machine__locked_rotor_code="G")
    lo = 1000 * 5.6 * 500 / (math.sqrt(3) * 4160)
    hi = 1000 * 6.3 * 500 / (math.sqrt(3) * 4160)
    assert rec.derived["locked_rotor_current_low"].value == pytest.approx(lo, rel=1e-6)
    assert rec.derived["locked_rotor_current_high"].value == pytest.approx(hi, rel=1e-6)
    assert rec.derived["locked_rotor_current"].value == pytest.approx(hi, rel=1e-6)
    assert value(rec, "50P", "pickup_current") == pytest.approx(1.8 * hi, rel=1e-6)
    assert value(rec, "51LR", "pickup_current") <= 0.8 * lo * 0.85


def test_code_letter_v_warns():
    # NEMA MG 1 10.37.2: code V is "22.4 kVA/hp and up", no upper bound
    rec = study(machine__locked_rotor_current=None, machine__locked_rotor_code="V")
    assert any("Code letter V has no upper bound" in m for m in messages(rec, "warn"))


# ---------------------------------------------------------------------------------------------------- 50P, fused


def test_50p_breaker():
    # METHODS.md §4.1: 1.8 × symmetrical I_LR, no delay, sensitivity ≥ 2 × against the min phase-to-phase fault
    rec = study()
    f = rec.function("50P")
    flc = rec.derived["rated_current"].value
    assert f.enabled and f.settings["enabled"].value is True
    assert f.settings["pickup_current"].value == pytest.approx(1.8 * 6.2 * flc, abs=HALF_STEP_A)
    assert f.settings["time_delay"].value == 0.0
    assert any("minimum phase-to-phase terminal fault" in m for m in messages(rec, "ok", "50P"))


def test_50p_low_pickup_fails():
    # METHODS.md §4.2: the half-cycle asymmetrical factor at X/R 15 is about 1.5 × I_LR
    rec = study(**{"overrides__50P.pickup_current": f"{1.3 * 6.2 * 61.9:.1f} A"})
    assert any("would trip on the starting inrush" in m for m in messages(rec, "fail", "50P"))


def test_fused_contactor_complete_data():
    # METHODS.md §4.1/4.2: 50P out of service, trips blocked above 0.9 × the contactor breaking current
    rec = study(supply__starter="fused-contactor", supply__contactor_breaking_current="4 kA",
                supply__fuse_rating="200 A")
    f = rec.function("50P")
    assert not f.enabled and f.settings["enabled"].value is False
    assert f.settings["trip_block_current"].value == pytest.approx(3600.0)
    assert "Fused contactor" in f.basis
    assert not any("take-over cannot be judged" in m for m in messages(rec, "warn", "50P"))


def test_fused_contactor_missing_fuse_data_warns():
    # METHODS.md §4.1 (UL 347 practice [F-v][P]): take-over needs the fuse and the contactor data
    rec = study(supply__starter="fused-contactor")
    assert any("take-over cannot be judged" in m for m in messages(rec, "warn", "50P"))
    assert any("block" in m for m in messages(rec, "warn", "50P"))


def test_fused_contactor_50p_enabled_above_block_fails():
    # METHODS.md §4.1 [P]: an enabled 50P must sit below the trip block threshold
    rec = study(supply__starter="fused-contactor", supply__contactor_breaking_current="4 kA",
                supply__fuse_rating="200 A", **{"overrides__50P.enabled": "true", "overrides__50P.pickup_current": "3800 A"})
    assert any("at or above the trip block threshold" in m for m in messages(rec, "fail", "50P"))
    ok = study(supply__starter="fused-contactor", supply__contactor_breaking_current="4 kA",
               supply__fuse_rating="200 A", **{"overrides__50P.enabled": "true"})
    assert ok.function("50P").enabled and not messages(ok, "fail", "50P")


def test_fused_contactor_that_cannot_break_locked_rotor_current():
    # METHODS.md §4.1 [P]: the contactor must interrupt at least the locked-rotor current
    rec = study(supply__starter="fused-contactor", supply__contactor_breaking_current="0.4 kA",
                supply__fuse_rating="200 A")
    assert any("cannot interrupt a stalled motor" in m for m in messages(rec, "fail", "50P"))


# ---------------------------------------------------------------------------------------------------- 46, 50G, 27


def test_46_heating_weight_and_derating_table():
    # METHODS.md §5.3 [D]: K = T_LR/(s·I_LR²); NEMA MG 1 Fig. 14-1 digitised as a derived table
    rec = study()
    s = rec.function("46").settings
    slip = (1800 - 1785) / 1800
    assert rec.derived["negative_sequence_heating_weight"].value == pytest.approx(0.9 / (slip * 6.2 ** 2))
    rows = rec.derived["voltage_unbalance_derating"].value
    assert rows[-1]["voltage_unbalance_percent"] == 5.0 and rows[-1]["derating_nema"] == pytest.approx(0.76)
    assert s["pickup_current"].value > s["alarm_pickup_current"].value


def test_50g_low_resistance():
    # METHODS.md §7.2 [P]: ≥ 2 × own charging current, ≤ 10–20 % of the earth-fault current; check value METHODS.md §7.3
    rec = study(grounding__circuit_capacitance="0.155 uF")
    # METHODS.md §7.3: 4.16 kV, 0.155 µF → own 3·I_C0 = 0.4210 A → floor 0.8421 A
    assert rec.derived["charging_current"].value == pytest.approx(0.4210, abs=5e-4)
    f = rec.function("50G")
    assert f.settings["pickup_current"].value == pytest.approx(40.0)
    assert f.settings["action"].value == "trip" and f.settings["time_delay"].value == pytest.approx(0.1)


def test_50g_high_resistance_is_alarm_only():
    # METHODS.md §7.2 [P][M]: on HRG systems choose between alarm and selective trip; we alarm
    rec = study(grounding__method="high-resistance", grounding__fault_current_limit="5 A")
    f = rec.function("50G")
    assert f.settings["action"].value == "alarm"
    assert "alarm only" in f.basis


def test_50g_pickup_below_charging_floor_fails():
    # METHODS.md §7.2 [P]: pickup above twice the circuit's own 3·I_C0
    rec = study(grounding__circuit_capacitance="2 uF", **{"overrides__50G.pickup_current": "1 A"})
    assert any("below twice the circuit's own charging current" in m for m in messages(rec, "fail", "50G"))


def test_27_below_starting_voltage():
    # METHODS.md §13 [P]: 0.70–0.80 pu; must not trip a normal start
    rec = study(supply__minimum_starting_voltage="0.78 pu")
    pu = value(rec, "27", "pickup_voltage") / 4160.0
    assert pu == pytest.approx(0.73, abs=HALF_STEP_V / 4160.0) and pu < 0.78


def test_27_override_above_starting_voltage_fails():
    rec = study(**{"overrides__27.pickup_voltage": "3700 V", "overrides__27.blocked_during_start": "false"})
    assert any("picks up during every start" in m for m in messages(rec, "fail", "27"))
    # an override changes only its own value: the pickup alone leaves "blocked while starting" as computed, and the
    # whole set is checked (issue 10 item 6)
    rec = study(**{"overrides__27.pickup_voltage": "3700 V"})
    assert rec.function("27").settings["blocked_during_start"].value is False
    assert any("picks up during every start" in m for m in messages(rec, "fail", "27"))
    # the rule blocks 27 while starting when the starting voltage is close to its pickup
    rec = study(supply__minimum_starting_voltage="0.68 pu")
    assert rec.function("27").settings["blocked_during_start"].value is True
    assert any("blocked while the motor starts" in m for m in messages(rec, "warn", "27"))


# ---------------------------------------------------------------------------------------------------- 66, 81U, 37, 87M


def test_66_starts_default_and_mg10():
    # NEMA MG 1 12.54 / IEC 60034-12 standard duty (value from memory): 2 cold, 1 hot
    rec = study(machine__rated_output="200 hp", machine__locked_rotor_current="6 pu", load__inertia="2 kg*m^2")
    f = rec.function("66")
    assert f.settings["starts_cold"].value == 2 and f.settings["starts_cold"].source == "standard"
    # NEMA MG 10 Table 2-3 applies to a 200 hp 4-pole motor (between the 100 and 250 hp rows)
    from machines.standards.nema import mg10_row
    assert "starts_per_hour" in f.settings
    rest = mg10_row(200.0, 4)[2]
    assert f.settings["minimum_time_between_starts"].value >= rest - 1e-3


def test_66_wait_from_cooling():
    # METHODS.md §2.3 [D]: after the maker's one hot start the rotor cools at standstill back to its hot heat,
    # t = τc·ln((θ_hot + Δθ)/θ_hot), θ_hot = 1 − t_sh/t_sc; never zero
    rec = study(machine__cooling_time_constant="120 min")
    f = rec.function("66")
    heat = rec.derived["start_heat_fraction"].value
    hot = 1 - 14 / 20
    exact = 7200.0 * math.log((hot + heat) / hot)
    # rounded up to the relay's time-constant step (a restart inhibit is set beside the replica's constants),
    # never shorter than the need
    wait = f.settings["minimum_time_between_starts"]
    assert exact <= wait.value < exact + wait.step
    assert "standstill cooling" in f.basis and "120 min" in f.basis


def test_81u_only_with_stages():
    # issue 3: 81U only when the motor takes part in load shedding; stages as entered (METHODS.md §8.2)
    rec = study(supply__underfrequency_stages=[{"frequency": "58.8 Hz", "time_delay": "0.3 s"},
                                               {"frequency": "58.4 Hz", "time_delay": "0.2 s"}])
    f = rec.function("81U")
    assert [s["frequency"] for s in f.settings["stages"].value] == [58.8, 58.4]
    assert len([t for t in f.test_points if t.expected_time]) == 2


def test_37_only_with_minimum_load():
    # common practice, no published source: 37 at 80 % of the minimum load current, only when one is given
    assert study().function("37") is None
    rec = study(load__minimum_load="0.5 pu")
    assert value(rec, "37", "pickup_current") == pytest.approx(0.4 * rec.derived["rated_current"].value,
                                                               abs=2 * HALF_STEP_A)


def test_87m_by_size():
    # IEEE C37.96-1988 §4.2.17 settings; size threshold 1000 hp (value from memory)
    assert study().function("87M") is None
    rec = study(machine__rated_output="1500 hp", machine__rated_current="186 A")
    f = rec.function("87M")
    assert f.settings["slope"].value == pytest.approx(0.10)
    assert f.settings["pickup_current"].value == pytest.approx(0.15 * 186.0)


# ---------------------------------------------------------------------------------------------------- CT


def test_ct_c37110_check():
    # IEEE C37.110: (1 + X/R)·I_f·Z_b ≤ 20
    rec = study(instruments__phase_ct="1200/5 A", instruments__phase_ct_class="C400", instruments__phase_ct_burden=
                "0.5 ohm", supply__fault_level="180 MVA", supply__x_over_r=15)
    i_f = 180e6 / (math.sqrt(3) * 4160) / 1200
    assert rec.derived["ct_saturation_index"].value == pytest.approx(16 * i_f * 0.125)
    assert any("C37.110" in m or "saturat" in m for m in messages(rec))


def test_ct_bad_class_is_input_error():
    # IEEE C57.13 classes C10 … C800; bad input is an InputError naming the key
    with pytest.raises(InputError, match="phase_ct_class"):
        study(instruments__phase_ct_class="X9", instruments__phase_ct_burden="0.5 ohm")


def test_ct_missing_class_warns():
    # IEEE C37.110 needs the class and the burden
    assert any("C37.110 saturation check was not made" in m for m in messages(study(), "warn"))


def test_unknown_override_is_refused():
    # DEVELOPERS.md: overrides name a function id and one of its settings
    with pytest.raises(InputError, match="has no setting"):
        study(**{"overrides__49.bogus": "1 A"})


def test_example_file_runs():
    # the demo file: 6.2 pu of 186 A; 1500 hp at 745.7 W (NIST SP 811) round-trips exactly
    from machines.files import load_case
    from pathlib import Path
    case, w = load_case(Path(__file__).resolve().parent.parent / "examples" / "chiller-compressor-motor.toml")
    rec = run_study(case, w)
    assert rec.function("49") and rec.derived["locked_rotor_current"].value == pytest.approx(6.2 * 186.0)
    assert case.machine.rated_output / HP == pytest.approx(1500.0)


# ---------------------------------------------------------------------------------------------------- METHODS.md §3.4, 4.2


def test_stall_window_reference_values():
    from machines.protection.locked_rotor import delay_window, pickup_ceiling
    # common practice, no published source: delay ≥ max(t_acc + 2 s, 1.2·t_acc), ≤ 0.9 × hot stall; acceleration
    # times METHODS.md §3.4: at V = 1.0 (5.411 s) → 7.411 … 9.000 s
    lo, hi = delay_window(5.411, 10.0)
    assert (lo, hi) == (pytest.approx(7.411, abs=5e-4), pytest.approx(9.000))
    # at V = 0.85 (8.478 s) → 10.478 > 9.000 s → no window → speed switch
    lo, hi = delay_window(8.478, 10.0)
    assert lo == pytest.approx(10.478, abs=5e-4) and lo > hi
    # check value METHODS.md §3.4: pickup upper bound 0.8 × 6.276 × 0.85 = 4.268 pu
    assert pickup_ceiling(6.276, 0.85) == pytest.approx(4.268, abs=5e-4)


@pytest.mark.parametrize("margin, primary, secondary", [
    # common practice [M][P], check values METHODS.md §4.2: I_LR 437.2 A, CT 400/5
    (1.6, 699.5, 8.744), (1.8, 787.0, 9.837), (2.0, 874.4, 10.93),
])
def test_50p_reference_values(margin, primary, secondary):
    from machines.model import Ratio
    assert margin * 437.2 == pytest.approx(primary, abs=0.05)
    assert Ratio(400.0, 5.0).to_secondary(margin * 437.2) == pytest.approx(secondary, rel=5e-4)


def test_50p_default_margin_and_block_reference():
    from machines.protection.short_circuit import ASYMMETRY_MARGIN, block_threshold
    # METHODS.md §4.1: 1.6–2.0 × I_LR with no delay; we take 1.8, above the full-offset first-cycle factor √3
    assert 1.6 <= ASYMMETRY_MARGIN <= 2.0 and ASYMMETRY_MARGIN > math.sqrt(3)
    # check value METHODS.md §4.2: contactor interrupting 4 kA, 10 % margin → block trips above 3600 A
    assert block_threshold(4000.0) == pytest.approx(3600.0)


def test_hot_start_longer_than_the_limits_allow_is_not_stretched():
    # issue 10 item 4: a start that needs more heat than the stall limits allow fails, naming the missing datum; the
    # time constant is not stretched into hours
    rec = study(load__inertia="400 kg*m^2")
    assert rec.derived["acceleration_time"].value > 14.0
    assert any("acceleration thermal limit" in m for m in messages(rec, "fail"))
    assert value(rec, "49", "heating_time_constant") <= 180 * 60


def test_50g_charging_floor_reference():
    # METHODS.md §7.2 [P], check value METHODS.md §7.3: own 3·I_C0 = 0.4210 A → 50G pickup ≥ 0.8421 A (×2)
    from machines.protection.motor_earth_fault import CHARGING_MARGIN
    rec = study(grounding__circuit_capacitance="0.155 uF", **{"overrides__50G.pickup_current": "0.8 A"})
    assert CHARGING_MARGIN * rec.derived["charging_current"].value == pytest.approx(0.8421, abs=5e-4)
    assert any("below twice the circuit's own charging current" in m for m in messages(rec, "fail", "50G"))


def test_fused_contactor_block_override_above_rating_fails():
    # METHODS.md §4.1 (UL 347 practice): the contactor must never be asked to break more than its rating
    rec = study(supply__starter="fused-contactor", supply__contactor_breaking_current="4 kA",
                supply__fuse_rating="200 A", **{"overrides__50P.trip_block_current": "4200 A"})
    assert rec.function("50P").settings["trip_block_current"].source == "override"
    assert any("not below the contactor's breaking current" in m for m in messages(rec, "fail", "50P"))


def test_no_source_data():
    # common practice, no published source: with no fault level the study assumes a stiff bus and 0.85 pu minimum
    rec = study(supply__fault_level=None, supply__minimum_fault_level=None, supply__minimum_starting_voltage=None)
    assert rec.derived["minimum_starting_voltage"].value == pytest.approx(0.85)
    assert rec.derived["minimum_starting_voltage"].source == "common-practice"
    assert any("stiff bus" in m for m in messages(rec, "warn"))
    assert any("sensitivity cannot be checked" in m for m in messages(rec, "warn", "50P"))


def test_27_without_vt_warns():
    # METHODS.md §13: 27 needs a voltage input
    rec = study(instruments__vt=None)
    s = rec.function("27").settings["pickup_voltage"]
    assert s.secondary is None
    assert any("No VT" in m for m in messages(rec, "warn", "27"))


def test_49_nec_not_applied_on_iec_practice():
    # NFPA 70 (NEC) 430.32 is a US low-voltage rule: under IEC practice it is not applied
    case, w = case_from_dict({**motor_data(), "study": {"practice": "IEC"}, "overrides": {"49.pickup_current": "75 A"}})
    rec = run_study(case, w)
    assert not any("NEC" in m for m in messages(rec, fid="49"))
    assert not any("NEC" in r for r in rec.function("49").references)
    assert not messages(rec, "fail", "49")
