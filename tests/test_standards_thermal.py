"""Thermal replica equations (IEC 60255-149) against METHODS.md §2.5 check values."""

from __future__ import annotations

import math

import numpy as np
import pytest

from machines.standards.thermal_replica import (
    cooling_time, heat_stored_at_rated_load, restart_wait, start_capacity, steady_state_level, thermal_level,
    thermal_level_profile, thermal_operate_time, time_constant_from_trip_time,
)

TAU = 30 * 60.0


@pytest.mark.parametrize("current, prior, expected", [
    # IEC 60255-149, check value METHODS.md §2.5 (τ = 30 min, k·IB = 1.05, I = 1.5, cold)
    (1.5, 0.0, 1212.0),
    # IEC 60255-149, check value METHODS.md §2.5 (hot, Ip = 0.9)
    (1.5, 0.9, 408.7),
    # IEC 60255-149, check value METHODS.md §2.5 (hot, Ip = 1.0)
    (1.5, 1.0, 154.0),
    # IEC 60255-149, check value METHODS.md §2.5 (I = 2.0 cold)
    (2.0, 0.0, 580.4),
    # IEC 60255-149, check value METHODS.md §2.5 (I = 2.0 hot, Ip = 1.0)
    (2.0, 1.0, 62.58),
])
def test_operate_time(current, prior, expected):
    assert thermal_operate_time(current, 1.05, TAU, prior) == pytest.approx(expected, rel=5e-4)


@pytest.mark.parametrize("current, prior, expected, why", [
    (1.05, 0.0, math.inf, "at pickup the level only approaches 1"),
    (0.5, 0.0, math.inf, "below pickup never trips"),
    (2.0, 1.1, 0.0, "prior current above pickup: already at trip level"),
])
def test_operate_time_edges(current, prior, expected, why):
    # analytic edge cases of the IEC 60255-149 equation
    assert thermal_operate_time(current, 1.05, TAU, prior) == expected, why


@pytest.mark.parametrize("current, expected", [
    # IEC 60255-149, check value METHODS.md §2.5: θ∞ at 0.8 / 1.0 / 1.05 pu with k·IB = 1.05
    (0.8, 0.5805), (1.0, 0.9070), (1.05, 1.0),
])
def test_steady_state_level(current, expected):
    assert steady_state_level(current, 1.05) == pytest.approx(expected, abs=5e-5)


def test_fit_to_cold_stall():
    # METHODS.md §2.2 [D], check value METHODS.md §2.5: t_sc = 15 s at I_LR = 6, k = 1.05 → τ = 482.3 s
    tau = time_constant_from_trip_time(15.0, 6.0, 1.05)
    assert tau == pytest.approx(482.3, abs=0.05)
    # check value METHODS.md §2.5: that τ trips from hot (Ip = 1.0) at 6 pu in 1.414 s
    assert thermal_operate_time(6.0, 1.05, tau, 1.0) == pytest.approx(1.414, abs=5e-4)
    # check value METHODS.md §2.5: adiabatic approximation τ·k²/I_LR² gives 14.77 s
    assert tau * 1.05 ** 2 / 36.0 == pytest.approx(14.77, abs=5e-3)


def test_fit_to_hot_stall():
    # METHODS.md §2.2 [D], check value METHODS.md §2.5: t_sh = 10 s (Ip = 1.0) → τ = 3410 s (56.83 min)
    tau = time_constant_from_trip_time(10.0, 6.0, 1.05, 1.0)
    assert tau / 60 == pytest.approx(56.83, abs=5e-3)
    # check value METHODS.md §2.5: that τ trips from cold at 6 pu in 106.1 s
    assert thermal_operate_time(6.0, 1.05, tau) == pytest.approx(106.1, abs=0.05)


def test_fit_rejects_impossible_point():
    # common practice, no published source: a fit below pickup has no solution
    with pytest.raises(ValueError, match="pickup < current"):
        time_constant_from_trip_time(10.0, 1.0, 1.05)


def test_start_capacity():
    # METHODS.md §2.3 [D], check value METHODS.md §2.5: 33.68 % exact, 33.33 % approximation
    assert start_capacity(5.0, 15.0, 482.3) == pytest.approx(0.3368, abs=5e-5)
    assert 5.0 / 15.0 == pytest.approx(0.3333, abs=5e-5)


def test_restart_wait_and_cooling():
    # METHODS.md §2.3 [D], check value METHODS.md §2.5: θ = 0.6667, allow ≤ 0.6333 (m = 1.1), τc = 60 min → 3.078 min
    assert restart_wait(2 / 3, 1 / 3, 3600.0, 1.1) / 60 == pytest.approx(3.078, abs=5e-4)
    # check value METHODS.md §2.5: cooling 90 % → 40 % at τc = 60 min takes 48.66 min
    assert cooling_time(0.9, 0.4, 3600.0) / 60 == pytest.approx(48.66, abs=5e-3)
    # the same through the level equation with zero current (IEC 60255-149 model)
    assert thermal_level(0.0, 1.05, 3600.0, cooling_time(0.9, 0.4, 3600.0), 0.9) == pytest.approx(0.4)


def test_heat_stored_at_rated_load():
    # METHODS.md §2.2 [P]: 10 s hot / 15 s cold → 33.33 % used at full load
    assert heat_stored_at_rated_load(10.0, 15.0) == pytest.approx(0.3333, abs=5e-5)


def test_numeric_ode_matches_analytic():
    # METHODS.md §2.5: numeric ODE vs analytic, I = 1.5, τ = 30 min → 1212 s both
    t = np.linspace(0.0, 1300.0, 13001)
    lvl = thermal_level_profile(t, np.full(t.size, 1.5), 1.05, TAU)
    trip = t[np.argmax(lvl >= 1.0)]
    assert trip == pytest.approx(1212.0, abs=0.5)


def test_profile_equals_scalar_loop():
    # vector equals scalar loop (STYLE 6): the profile is the level equation applied step by step
    t = [0.0, 3.0, 7.5, 20.0]
    i = [6.0, 4.0, 1.0, 1.0]
    lvl = thermal_level_profile(t, i, 1.2, 900.0, 0.3)
    theta = 0.3
    for j in range(3):
        theta = thermal_level(i[j], 1.2, 900.0, t[j + 1] - t[j], theta)
        assert lvl[j + 1] == pytest.approx(theta, rel=1e-12)


def test_profile_long_horizon_matches_step_form():
    # the closed-form sum and the step-by-step recurrence are the same IEC 60255-149 model (t/τ beyond exp range)
    t = np.linspace(0.0, 2000.0, 201)
    lvl = thermal_level_profile(t, np.full(t.size, 1.0), 1.2, 2.0, 0.5)
    assert lvl[-1] == pytest.approx((1.0 / 1.2) ** 2)
    assert thermal_level_profile(t[:3], [1.0, 1.0, 1.0], 1.2, 2.0, 0.5)[2] == pytest.approx(
        thermal_level(1.0, 1.2, 2.0, t[2], 0.5))
