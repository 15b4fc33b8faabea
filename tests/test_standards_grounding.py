"""Grounding equations against METHODS.md §7.3 (18 kV, 60 Hz, C0 = 0.25 µF, 18000/240 V distribution transformer)."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings, strategies as st

from machines.errors import InputError
from machines.standards import grounding as g

V, F, C0, N = 18e3, 60.0, 0.25e-6, 18000 / 240


def test_reactance_and_charging_current():
    # IEEE C62.92.2 / C37.101 equations, check values METHODS.md §7.3
    assert g.capacitive_reactance(C0, F) == pytest.approx(10610, rel=5e-4)
    assert g.charging_current(C0, V, F) == pytest.approx(2.938, rel=5e-4)


def test_resistor_sizing_and_reflection():
    # R_N ≤ X_C0/3 (value from memory), check values METHODS.md §7.3
    r_n = g.neutral_resistance_limit(C0, F)
    assert r_n == pytest.approx(3537, rel=5e-4)
    assert g.reflected_secondary_resistance(r_n, N) == pytest.approx(0.6288, rel=5e-4)
    assert g.primary_resistance(g.reflected_secondary_resistance(r_n, N), N) == pytest.approx(r_n)


def test_terminal_fault_quantities():
    # METHODS.md §7.3: I_R = 2.938 A; I_fault = 4.155 A; secondary 220.4 A; P_R = 30.54 kW; V_N,sec = 138.6 V
    r_n = g.neutral_resistance_limit(C0, F)
    i_r = g.resistor_current(V, r_n)
    assert i_r == pytest.approx(2.938, rel=5e-4)
    assert g.earth_fault_current(i_r, g.charging_current(C0, V, F)) == pytest.approx(4.155, rel=5e-4)
    assert i_r * N == pytest.approx(220.4, rel=5e-4)
    assert g.resistor_power(V, i_r) == pytest.approx(30.54e3, rel=5e-4)
    assert g.neutral_voltage_for_fault(V, 1.0) / N == pytest.approx(138.6, rel=5e-4)


@pytest.mark.parametrize("x, expected", [
    # METHODS.md §7.3: faults at 5 % / 10 % / 50 % from the neutral give 6.928 / 13.86 / 69.28 V secondary
    (0.05, 6.928), (0.10, 13.86), (0.50, 69.28),
])
def test_neutral_voltage_along_the_winding(x, expected):
    assert g.neutral_voltage_for_fault(V, x) / N == pytest.approx(expected, rel=5e-4)


def test_59n_pickup_and_coverage():
    # METHODS.md §7.3: 59N at 5 % → 6.928 V secondary; the inverse gives back 95 % coverage [derived]
    p = g.neutral_pickup_for_coverage(V, 0.95)
    assert p / N == pytest.approx(6.928, rel=5e-4)
    assert g.coverage_for_neutral_pickup(V, p) == pytest.approx(0.95)


def test_motor_circuit_charging_current():
    # METHODS.md §7.3: 4.16 kV motor, cable 300 m × 0.35 µF/km + motor 0.05 µF → 3·I_C0 = 0.4210 A
    assert g.charging_current(0.3 * 0.35e-6 + 0.05e-6, 4160.0, 60.0) == pytest.approx(0.4210, rel=5e-4)


@pytest.mark.parametrize("call, match", [
    (lambda: g.charging_current(0.0, V, F), "capacitance_per_phase"),
    (lambda: g.capacitive_reactance(C0, -60.0), "frequency"),
    (lambda: g.neutral_voltage_for_fault(V, 1.5), "fraction of the winding"),
    (lambda: g.neutral_pickup_for_coverage(V, 1.0), "coverage"),
    (lambda: g.reflected_secondary_resistance(100.0, math.nan), "turns_ratio"),
])
def test_bad_input(call, match):
    with pytest.raises(InputError, match=match):
        call()


@settings(max_examples=200, deadline=None, derandomize=True)
@given(c0=st.floats(0.01e-6, 5e-6), v=st.floats(2.4e3, 25e3), f=st.sampled_from([50.0, 60.0]))
def test_resistor_at_limit_matches_capacitive_current(c0, v, f):
    # R_N = X_C0/3 makes I_R equal to 3·I_C0 and the fault current √2 times either [derived]
    i_r = g.resistor_current(v, g.neutral_resistance_limit(c0, f))
    i_c = g.charging_current(c0, v, f)
    assert i_r == pytest.approx(i_c, rel=1e-9)
    assert g.earth_fault_current(i_r, i_c) == pytest.approx(math.sqrt(2) * i_c, rel=1e-9)
