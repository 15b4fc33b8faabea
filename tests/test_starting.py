"""Motor starting: acceleration by integration, torque/current models, starting voltage (METHODS.md §3.3, 3.4)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from machines.starting import (
    LB_FT2, acceleration_time_wk2, acceleration_times, breakdown_slip, first_crossing, kloss_torque, load_torque,
    motor_current, motor_torque, starting_voltage, study_start,
)

# METHODS.md §3.4 worked case: 1000 kW, 4-pole 60 Hz, rated speed 0.99 pu, J = 200 kg·m², maker's torque table
SPEEDS = [0, .1, .2, .3, .4, .5, .6, .7, .8, .85, .9, .95, .99]
TORQUES = [1.5, 1.45, 1.4, 1.38, 1.4, 1.45, 1.55, 1.7, 1.95, 2.1, 2.2, 1.7, 1.0]
WS = 4 * math.pi * 60 / 4
T_RATED = 1e6 / (0.99 * WS)


def reference_case(v: float, end: float = 0.95, points: int = 4001):
    n = np.linspace(0.0, end, points)
    acc = np.interp(n, SPEEDS, TORQUES) * v * v - (0.1 + 0.81 * (n / 0.99) ** 2)
    return n, acc


def test_rated_torque():
    # METHODS.md §3.4: T_rated = 5359 N·m
    assert T_RATED == pytest.approx(5359, abs=0.5)


@pytest.mark.parametrize("v, expected", [
    # Newton's law integrated over speed, check values METHODS.md §3.4 (time 0 → 0.95 pu speed)
    (1.0, 5.411), (0.9, 7.180), (0.85, 8.478), (0.8, 10.27),
])
def test_reference_acceleration_times(v, expected):
    n, acc = reference_case(v)
    assert acc.min() > 0
    assert acceleration_times(n, acc, 200.0, WS, T_RATED)[-1] == pytest.approx(expected, rel=5e-4)


def test_reference_does_not_accelerate_at_07():
    # METHODS.md §3.4: at V = 0.7 the motor does not accelerate to 0.95 pu
    n, acc = reference_case(0.7)
    assert first_crossing(n, acc) is not None and first_crossing(n, acc) < 0.95


def test_reference_equilibrium_at_08():
    # METHODS.md §3.4: at V = 0.8 the equilibrium speed is 0.9689 pu (cannot reach 0.97)
    n, acc = reference_case(0.8, end=0.99, points=99001)
    stable = n > 0.9
    assert first_crossing(n[stable], acc[stable]) == pytest.approx(0.9689, abs=5e-5)


def test_wk2_formula_and_si_cross_check():
    # METHODS.md §3.3/3.4: WK² 1000 lb·ft², ΔN 1780 rpm, T_acc 500 lb·ft → 11.56 s (US formula with 308)
    assert acceleration_time_wk2(1000.0, 1780.0, 500.0) == pytest.approx(11.56, abs=5e-3)
    # METHODS.md §3.4: SI cross-check with J = 42.14 kg·m² gives 11.59 s (1 lb·ft = 1.35582 N·m, NIST SP 811)
    j = 1000.0 * LB_FT2
    assert j == pytest.approx(42.14, abs=5e-3)
    t = j * (1780.0 * 2 * math.pi / 60) / (500.0 * 1.3558179)
    assert t == pytest.approx(11.59, abs=5e-3)


def test_integrator_exact_for_constant_torque():
    # Newton's law, analytic: J·Δω / T for constant accelerating torque
    n = np.linspace(0.0, 0.8, 7)
    assert acceleration_times(n, np.full(7, 0.5), 30.0, 157.08, 1000.0)[-1] == pytest.approx(30 * 0.8 * 157.08 /
                                                                                              500.0)


def test_kloss_rated_point_and_breakdown():
    # Kloss's equation (textbook): T = 1 at rated slip, T = T_b at breakdown slip
    sb = breakdown_slip(0.012, 2.2)
    assert float(kloss_torque(0.012, 2.2, sb)) == pytest.approx(1.0, rel=1e-12)
    assert float(kloss_torque(sb, 2.2, sb)) == pytest.approx(2.2, rel=1e-12)


def test_motor_torque_end_points():
    # model in machines.starting [D]: locked-rotor torque at standstill, T_b at breakdown, 1 pu at rated slip
    sb = breakdown_slip(0.01, 2.4)
    t = motor_torque([0.0, 1 - sb, 0.99], 0.9, 2.4, 0.01)
    assert list(t) == [pytest.approx(0.9), pytest.approx(2.4), pytest.approx(1.0)]


def test_motor_current_end_points():
    # model in machines.starting [D]: I_LR at standstill and rated current at rated slip
    i = motor_current([0.0, 0.988], 6.5, 0.012, 0.9)
    assert list(i) == [pytest.approx(6.5), pytest.approx(1.0)]


def test_vector_equals_scalar_loop():
    # STYLE 6: numpy over a grid equals a loop of scalar calls
    n = np.linspace(0.0, 0.99, 50)
    vec = motor_torque(n, 0.8, 2.2, 0.01)
    assert all(vec[j] == pytest.approx(float(motor_torque(n[j], 0.8, 2.2, 0.01))) for j in range(50))
    vec = load_torque(n, "quadratic", 0.9, 0.1, 0.99)
    assert all(vec[j] == pytest.approx(float(load_torque(n[j], "quadratic", 0.9, 0.1, 0.99))) for j in range(50))


@pytest.mark.parametrize("profile, expected", [
    # affinity law (quadratic) and the usual linear / constant load models, at half rated speed
    ("quadratic", 0.1 + 0.8 * 0.25), ("linear", 0.1 + 0.8 * 0.5), ("constant", 0.9),
])
def test_load_profiles(profile, expected):
    assert float(load_torque(0.495, profile, 0.9, 0.1, 0.99)) == pytest.approx(expected)


def test_starting_voltage():
    # voltage divider of source and locked-rotor impedance (magnitudes): 4.16 kV, I_LR 1153 A, 180 MVA bus
    z_lr = 4160 / (math.sqrt(3) * 1153.2)
    z_s = 4160 ** 2 / 180e6
    assert starting_voltage(4160.0, 4160.0, 1153.2, z_s) == pytest.approx(z_lr / (z_lr + z_s))
    # no source impedance: the full bus voltage
    assert starting_voltage(4160.0, 4000.0, 300.0, 0.0) == pytest.approx(1.04)


COMMON = dict(locked_rotor_current=600.0, rated_current=100.0, locked_rotor_torque=0.8, breakdown_torque=2.2,
              rated_slip=0.01, power_factor=0.88, inertia=100.0, synchronous_speed=188.5, rated_torque=5000.0,
              load_profile="quadratic", load_torque_rated=0.9, load_breakaway=0.1)


def test_start_slower_at_lower_voltage_and_current_scales():
    # torque ∝ V², current ∝ V (METHODS.md §3.3)
    hi, lo = study_start(voltage=1.0, **COMMON), study_start(voltage=0.85, **COMMON)
    assert hi.accelerates and lo.accelerates and lo.acceleration_time > hi.acceleration_time
    assert lo.currents[0] == pytest.approx(0.85 * 600.0) and hi.currents[0] == pytest.approx(600.0)
    assert lo.currents[-1] < 0.5 * lo.currents[0]
    assert np.all(np.diff(lo.times) > 0)


def test_does_not_accelerate():
    # METHODS.md §3.3: failure to accelerate when T_m·V² ≤ T_L below the end speed (here at standstill already)
    s = study_start(voltage=0.6, **{**COMMON, "load_profile": "constant", "load_torque_rated": 1.0})
    assert not s.accelerates and math.isinf(s.acceleration_time) and s.stall_speed == 0.0
    assert s.time_above(100.0) == math.inf


@pytest.mark.parametrize("v, table_time", [
    # check values METHODS.md §3.4 (maker-style torque table); the synthetic curve uses only its end points
    (1.0, 5.411), (0.9, 7.180), (0.85, 8.478), (0.8, 10.27),
])
def test_synthetic_curve_against_reference_table(v, table_time):
    # model in machines.starting [D]: from T_LR = 1.5, T_b = 2.2, s_r = 0.01 alone the acceleration time is
    # 0–3 % longer than with METHODS.md §3.4's full table (on the safe side for the 51LR window)
    n = np.linspace(0.0, 0.95, 4001)
    acc = motor_torque(n, 1.5, 2.2, 0.01) * v * v - (0.1 + 0.81 * (n / 0.99) ** 2)
    t = acceleration_times(n, acc, 200.0, WS, T_RATED)[-1]
    assert table_time <= t <= 1.03 * table_time
