"""Motor starting: acceleration by integration, the maker's curve, the model curves (the double-cage equivalent
circuit, and its sibling of two Kloss cages), starting voltage (METHODS.md §3.3, 3.4, 3.6)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from machines.standards.double_cage import (
    breakdown_slip, fit_two_cage, kloss_torque, outer_slip_for_pull_up, pull_up_torque,
)
from machines.starting import (
    CIRCUIT_SOURCE, LB_FT2, acceleration_time_wk2, acceleration_times, first_crossing, load_torque, maker_curve,
    model_curve, motor_current, speed_after_dip, starting_voltage, study_start,
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


@pytest.mark.parametrize("v, expected", [
    # the same maker's table entered as machine.speed_curve (METHODS.md §3.4 check values, 0 → 0.95 pu speed)
    (1.0, 5.411), (0.85, 8.478),
])
def test_reference_from_the_maker_curve(v, expected):
    curve = maker_curve(tuple(SPEEDS[:-1]), tuple(TORQUES[:-1]), (), 6.0, 0.01, 0.88)
    n = np.linspace(0.0, 0.95, 4001)
    acc = curve.torque(n) * v * v - load_torque(n, "quadratic", 0.91, 0.1, 0.99)
    assert acceleration_times(n, acc, 200.0, WS, T_RATED)[-1] == pytest.approx(expected, rel=5e-4)


def test_no_load_start_on_kloss_curve_closed_form():
    # Newton's law with Kloss's curve and no load, integrated in closed form (the textbook no-load starting time,
    # e.g. W. Leonhard, Control of Electrical Drives, induction motor starting — chapter from memory):
    # t = J·ω_s / (2·T_b·T_r) · [(1 − s₁²) / (2·s_b) + s_b·ln(1/s₁)]
    # Here a maker's curve tabulated from Kloss's equation every 0.01 pu speed is integrated to s₁ = 0.05.
    s_b, t_b, j = 0.1, 2.5, 50.0
    speeds = tuple(np.round(np.arange(0.0, 0.991, 0.01), 4))
    torques = tuple(float(kloss_torque(1.0 - n, t_b, s_b)) for n in speeds)
    curve = maker_curve(speeds, torques, (), 6.0, 0.02, 0.88)
    s1 = 0.05
    n = np.linspace(0.0, 1.0 - s1, 20001)
    t = acceleration_times(n, curve.torque(n), j, WS, T_RATED)[-1]
    closed = j * WS / (2 * t_b * T_RATED) * ((1 - s1 ** 2) / (2 * s_b) + s_b * math.log(1 / s1))
    assert t == pytest.approx(closed, rel=2e-3)


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
    # Baldor, "Basic Motor Formulas and Calculations" (high-inertia loads): t = WK²·ΔN / (308·T_av);
    # METHODS.md §3.3/3.4: WK² 1000 lb·ft², ΔN 1780 rpm, T_acc 500 lb·ft → 11.56 s
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


# ---------------------------------------------------------------------------------------------------- two Kloss cages
# the sibling model (machines.standards.double_cage), used where the equivalent circuit cannot be fitted


@pytest.mark.parametrize("s_r, t_lr, t_b, pull_up", [
    (0.01, 0.8, 2.2, 0.72), (0.0067, 0.8, 2.2, 0.76), (0.005, 1.5, 2.6, 1.3), (0.02, 0.6, 2.8, 0.6),
])
def test_double_cage_fit_honours_the_data_sheet(s_r, t_lr, t_b, pull_up):
    # METHODS.md §3.6: through the rated point, T_LR at standstill, maximum T_b, the pull-up torque asked for
    so, reached = outer_slip_for_pull_up(s_r, t_lr, t_b, pull_up)
    c = fit_two_cage(s_r, t_lr, t_b, so)
    s = np.geomspace(s_r, 1.0, 20001)
    t = c.torque(s)
    assert float(c.torque(s_r)) == pytest.approx(1.0, rel=1e-4)
    assert float(c.torque(1.0)) == pytest.approx(t_lr, rel=1e-4)
    assert t.max() == pytest.approx(t_b, rel=1e-3)
    assert pull_up_torque(c, s_r) == pytest.approx(min(pull_up, t_lr), rel=2e-3)


def test_double_cage_equals_the_circuit_without_stator_impedance():
    # the double-cage equivalent circuit with the stator impedance left out: each cage R_k/s + jX_k across V = 1 pu,
    # air-gap power Σ (R_k/s)/((R_k/s)² + X_k²); Kloss's peak T_m = 1/(2·X_k) at s_m = R_k/X_k (circuit algebra)
    r_o, x_o, r_i, x_i = 0.9, 0.35, 0.012, 0.26
    s = np.geomspace(0.005, 1.0, 50)
    circuit = sum((r / s) / ((r / s) ** 2 + x ** 2) for r, x in ((r_o, x_o), (r_i, x_i)))
    kloss = kloss_torque(s, 1 / (2 * x_o), r_o / x_o) + kloss_torque(s, 1 / (2 * x_i), r_i / x_i)
    assert np.allclose(circuit, kloss, rtol=1e-12)


def test_pull_up_range_of_the_circuit():
    # METHODS.md §3.6: the deeper the dip the circuit is fitted to, the lower its pull-up torque and the slower the
    # start (the chiller's data sheet: s_r 12/1800, cos φ 0.89, η 0.958, I_LR 6.2, T_LR 0.8, T_b 2.2)
    times, pull_ups = [], []
    for pu in (0.68, 0.72, 0.76, None):
        c = model_curve(0.8, 2.2, 12 / 1800, 6.2, 0.89, 0.958, pu)
        assert c.source == CIRCUIT_SOURCE and c.target == pu and not c.fallback
        s = study_start(voltage=1.0, curve=c, rated_current=186.0, inertia=101.4, synchronous_speed=WS,
                        rated_torque=5974.0, rated_slip=12 / 1800, load_profile="quadratic", load_torque_rated=0.95,
                        load_breakaway=0.08)
        times.append(s.acceleration_time)
        pull_ups.append(c.pull_up)
    assert times == sorted(times, reverse=True) and pull_ups == sorted(pull_ups)
    assert pull_ups[-1] == pytest.approx(0.8, abs=1e-3)  # the data sheet alone: no dip below T_LR


def test_circuit_curve_uses_its_own_current():
    # METHODS.md §3.6: with the circuit the current–speed curve is the circuit's own |I1|: I_LR at standstill, 1 pu
    # at rated slip and, near synchronous speed (the rotor nearly open), the magnetising current 1/|R1 + j(X1 + Xm)|
    from machines.standards.equivalent_circuit import fit_double_cage
    c = model_curve(0.8, 2.2, 12 / 1800, 6.2, 0.89, 0.958)
    fit = fit_double_cage(12 / 1800, 0.89, 0.958, 6.2, 0.8, 2.2)
    assert float(c.current(0.0)) == pytest.approx(6.2, rel=1e-6)
    assert float(c.current(1 - 12 / 1800)) == pytest.approx(1.0, rel=1e-3)
    assert c.speeds[-1] > 0.9998 and float(c.torques[-1]) < 0.02
    assert float(c.currents[-1]) == pytest.approx(1 / abs(fit.r1 + 1j * (fit.x1 + fit.xm)), rel=0.01)


def test_maker_curve_past_its_last_point():
    # model in machines.starting [D]: the rated point and zero torque at synchronous speed close the curve
    c = maker_curve((0.0, 0.5, 0.9), (0.8, 0.7, 2.0), (6.0, 5.5, 4.0), 6.0, 0.01, 0.88)
    assert float(c.torque(0.99)) == pytest.approx(1.0) and float(c.current(0.99)) == pytest.approx(1.0)
    assert float(c.torque(1.0)) == 0.0 and c.pull_up == pytest.approx(0.7)


def test_motor_current_end_points():
    # model in machines.starting [D]: I_LR at standstill and rated current at rated slip
    i = motor_current([0.0, 0.988], 6.5, 0.012, 0.9)
    assert list(i) == [pytest.approx(6.5), pytest.approx(1.0)]


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


def test_coast_down_quadratic_load_closed_form():
    # J·ω_s·dn/dt = −T_r·k·n² (no motor torque, load ∝ n²) → 1/n = 1/n0 + k·T_r·t/(J·ω_s) (separable ODE);
    # Euler steps overstate the fall slightly (the safe side), so within 0.5 %
    n = speed_after_dip(2.0, 0.99, 100.0, 188.5, 5000.0, "quadratic", 0.9, 0.0, 0.99)
    k = 0.9 / 0.99 ** 2
    exact = 1.0 / (1.0 / 0.99 + k * 5000.0 * 2.0 / (100.0 * 188.5))
    assert n == pytest.approx(exact, rel=5e-3) and n <= exact


COMMON = dict(rated_current=100.0, inertia=100.0, synchronous_speed=188.5, rated_torque=5000.0, rated_slip=0.01,
              load_profile="quadratic", load_torque_rated=0.9, load_breakaway=0.1)


def test_start_slower_at_lower_voltage_and_current_scales():
    # torque ∝ V², current ∝ V (METHODS.md §3.3)
    curve = model_curve(0.8, 2.2, 0.01, 6.0, 0.88, 0.95)
    hi, lo = study_start(voltage=1.0, curve=curve, **COMMON), study_start(voltage=0.9, curve=curve, **COMMON)
    assert hi.accelerates and lo.accelerates and lo.acceleration_time > hi.acceleration_time
    assert lo.currents[0] == pytest.approx(0.9 * 600.0, rel=1e-6) and hi.currents[0] == pytest.approx(600.0, rel=1e-6)
    assert lo.currents[-1] < 0.5 * lo.currents[0]
    assert np.all(np.diff(lo.times) > 0)
    again = study_start(voltage=1.0, curve=curve, initial_speed=0.7, **COMMON)
    assert again.accelerates and again.acceleration_time < hi.acceleration_time


def test_does_not_accelerate():
    # METHODS.md §3.3: failure to accelerate when T_m·V² ≤ T_L below the end speed (here at standstill already)
    curve = model_curve(0.8, 2.2, 0.01, 6.0, 0.88, 0.95)
    s = study_start(voltage=0.6, curve=curve, **{**COMMON, "load_profile": "constant", "load_torque_rated": 1.0})
    assert not s.accelerates and math.isinf(s.acceleration_time) and s.stall_speed == 0.0
    assert s.time_above(100.0) == math.inf
