"""CT saturation (IEEE C37.110) against METHODS.md §11.2 check values."""

from __future__ import annotations

import math

import pytest

from machines.errors import InputError
from machines.standards.ct_saturation import (
    c37110_saturation_index, c_class_voltage, required_secondary_voltage, standard_burden, tap_class_voltage,
    time_to_saturate,
)


@pytest.mark.parametrize("fault, primary, burden, vc, xr, expected", [
    # IEEE C37.110, check value METHODS.md §11.2: 25 kA, 1200/5 C400, 0.5 Ω, X/R 15 → 41.67
    (25e3, 1200.0, 0.5, 400.0, 15.0, 41.67),
    # IEEE C37.110, check value METHODS.md §11.2: same, symmetrical → 2.604
    (25e3, 1200.0, 0.5, 400.0, 0.0, 2.604),
    # IEEE C37.110, check value METHODS.md §11.2: 600/5 tap (C200 effective) → 166.7
    (25e3, 600.0, 0.5, 200.0, 15.0, 166.7),
    # IEEE C37.110, check value METHODS.md §11.2: 8 kA, 600/5 C200, 0.4 Ω, X/R 10 → 29.33
    (8e3, 600.0, 0.4, 200.0, 10.0, 29.33),
    # IEEE C37.110, check value METHODS.md §11.2: 40 kA, 2000/5 C800, 0.3 Ω, X/R 30 → 23.25
    (40e3, 2000.0, 0.3, 800.0, 30.0, 23.25),
    # IEEE C37.110, check value METHODS.md §11.2: 20 kA, 2000/5 C400, 0.2 Ω, X/R 10 → 5.500
    (20e3, 2000.0, 0.2, 400.0, 10.0, 5.500),
])
def test_saturation_index(fault, primary, burden, vc, xr, expected):
    assert c37110_saturation_index(fault, primary, burden, vc, xr) == pytest.approx(expected, rel=5e-4)


def test_required_voltage():
    # IEEE C37.110, check value METHODS.md §11.2: 833.3 V for the first case on the full ratio
    assert required_secondary_voltage(25e3, 1200 / 5, 0.5, 15.0) == pytest.approx(833.3, abs=0.05)


def test_time_to_saturate():
    # IEEE C37.110 annex formula, value from memory; check value METHODS.md §11.2: 0.02345 s = 1.407 cycles
    ts = time_to_saturate(25e3, 1200.0, 0.5, 400.0, 15.0, 60.0)
    assert ts == pytest.approx(0.02345, abs=5e-6)
    assert ts * 60 == pytest.approx(1.407, abs=5e-4)


@pytest.mark.parametrize("fault, expected, why", [
    (1e3, math.inf, "small current: the offset never saturates the CT"),
    (600e3, 0.0, "symmetrical current alone exceeds 20 × standard burden voltage"),
])
def test_time_to_saturate_edges(fault, expected, why):
    # analytic edge cases of the C37.110 time-to-saturate formula (value from memory)
    assert time_to_saturate(fault, 1200.0, 0.5, 400.0, 15.0, 60.0) == expected, why


def test_standard_burden_and_tap():
    # IEEE C57.13 standard burdens B-1 … B-8 ↔ C100 … C800 (value from memory, METHODS.md §11.1)
    assert [standard_burden(v) for v in (100, 200, 400, 800)] == [1.0, 2.0, 4.0, 8.0]
    # METHODS.md §11.1 [M]: on a half tap the usable class voltage halves (1200/5 C400 → 600/5 C200)
    assert tap_class_voltage(400.0, 120, 240) == 200.0


@pytest.mark.parametrize("text, volts", [("C200", 200.0), ("c400", 400.0), ("K 800", 800.0), ("T100", 100.0)])
def test_c_class_voltage(text, volts):
    # IEEE C57.13 relaying class designations
    assert c_class_voltage(text) == volts


@pytest.mark.parametrize("text", ["200", "C250", "X200", "C 2000", "", "C200V"])
def test_c_class_voltage_rejects(text):
    # IEEE C57.13 defines only C10 … C800
    with pytest.raises(InputError, match="phase_ct_class: expected an IEEE C57.13 relaying class"):
        c_class_voltage(text)
