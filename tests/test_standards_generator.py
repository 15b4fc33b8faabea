"""Generator capability equations against METHODS.md §9.6 and 10."""

from __future__ import annotations

import pytest

from machines.errors import InputError
from machines.standards import generator_capability as gc

ZB = gc.base_impedance(13.8e3, 100e6)
FACTOR = (5000 / 5) / (14400 / 120)


def test_base_impedance_and_ratio():
    # METHODS.md §9.6: 100 MVA, 13.8 kV → Z_b = 1.904 Ω; CTR 5000/5, VTR 14400/120 → factor 8.333
    assert ZB == pytest.approx(1.904, rel=5e-4)
    assert FACTOR == pytest.approx(8.333, rel=5e-4)


def test_loss_of_field_circles():
    # IEEE C37.102 two-zone offset mho (value from memory), check values METHODS.md §9.6 (X'd = 0.25, X_d = 1.8)
    offset = 0.25 / 2 * ZB
    assert offset == pytest.approx(0.2381, rel=5e-4)
    assert gc.secondary_ohms(offset, 1000, 120) == pytest.approx(1.984, rel=5e-4)
    assert gc.secondary_ohms(ZB, 1000, 120) == pytest.approx(15.87, rel=5e-4)
    assert 1.8 * ZB == pytest.approx(3.428, rel=5e-4)
    assert gc.secondary_ohms(1.8 * ZB, 1000, 120) == pytest.approx(28.57, rel=5e-4)
    # METHODS.md §9.6: far reach zone 1 −17.85 Ω sec; zone 2 −30.55 Ω sec
    for dia, reach in ((ZB, -17.85), (1.8 * ZB, -30.55)):
        (r, x), rad = gc.offset_mho_circle(offset * FACTOR, dia * FACTOR)
        assert r == 0.0
        assert x - rad == pytest.approx(reach, rel=5e-4)


@pytest.mark.parametrize("v, f, vhz", [
    # METHODS.md §9.6
    (1.10, 0.95, 1.158), (1.05, 1.0, 1.050), (1.0, 0.9, 1.111),
])
def test_volts_per_hertz(v, f, vhz):
    assert gc.volts_per_hertz(v, f) == pytest.approx(vhz, rel=5e-4)


def test_vhz_on_transformer_base():
    # IEEE C37.102 common base, METHODS.md §9.6: 1.05 pu of 13.8 kV on a 13.2 kV GSU LV → 1.098 pu
    assert gc.rebase_voltage_pu(1.05, 13.8e3, 13.2e3) == pytest.approx(1.098, rel=5e-4)


@pytest.mark.parametrize("v, pickup", [
    # Gers & Holmes §5.8 restraint, METHODS.md §9.6: I_r = 4184 A, 150 % → 6276 / 5020 / 2510 / 1569 A
    (1.0, 6276), (0.8, 5020), (0.4, 2510), (0.2, 1569),
])
def test_restrained_pickup(v, pickup):
    assert gc.restrained_pickup(1.5 * 4184.0, v) == pytest.approx(pickup, rel=5e-4)


def test_sustained_fault_current():
    # METHODS.md §9.6: E/X_d = 1/1.8 = 0.5556 pu = 2324 A; the 0.4 pu pickup (2510 A) is above it
    i = gc.sustained_fault_current(4184.0, 1.8)
    assert i / 4184.0 == pytest.approx(0.5556, rel=5e-4)
    assert i == pytest.approx(2324, rel=5e-4)
    assert gc.restrained_pickup(1.5 * 4184.0, 0.4) > i


@pytest.mark.parametrize("primary, secondary", [
    # P_sec = P / (CTR·VTR), check values METHODS.md §9.6 (CTR 1000, VTR 120)
    (0.8500e6, 7.083), (0.4250e6, 3.542), (10.62e6, 88.54), (21.25e6, 177.1),
])
def test_secondary_power(primary, secondary):
    assert gc.secondary_power(primary, 1000, 120) == pytest.approx(secondary, rel=5e-4)


@pytest.mark.parametrize("prime_mover, lowest, highest", [
    # IEEE C37.102 motoring power by prime mover (value from memory): steam 1–3 %, hydro 0.2–2 %, reciprocating
    # engines 5–25 %, gas turbines 10 % (two-shaft) to 100 % (single-shaft)
    ("steam-turbine", 0.01, 0.03), ("hydro", 0.002, 0.02), ("reciprocating-engine", 0.05, 0.25),
    ("gas-turbine", 0.10, 1.00),
])
def test_motoring_power_ranges(prime_mover, lowest, highest):
    assert gc.motoring_power_fraction(prime_mover) == (lowest, highest)


@pytest.mark.parametrize("restraint, threshold", [
    # METHODS.md §9.6: 87G pickup 0.3 A, slope 10 % → 0.3 / 0.5 / 1.0 / 2.0 A
    (1, 0.3), (5, 0.5), (10, 1.0), (20, 2.0),
])
def test_differential_threshold(restraint, threshold):
    assert gc.differential_operate_threshold(restraint, 0.3, 0.10) == pytest.approx(threshold)


def test_armature_capability():
    # IEEE C50.13 (value from memory), check values METHODS.md §10: 41.08 / 41.15 / 41.40 / 41.47 s
    got = [gc.armature_capability_product(i, t) for i, t in gc.C50_13_ARMATURE_POINTS]
    assert got == pytest.approx([41.08, 41.15, 41.40, 41.47], rel=5e-4)
    # IEC 60034-1 (value from memory), METHODS.md §10: 1.5 × for 30 s → 37.50 s
    assert gc.armature_capability_constant("IEC") == pytest.approx(37.50)
    assert gc.armature_capability_time(1.0, 41.0) == float("inf")


def test_steady_state_stability_circle():
    # classical SSSL: diameter from +jXs to −jXd (Blackburn & Domin, value from memory)
    (r, x), rad = gc.steady_state_stability_circle(1.8, 0.2)
    assert (r, x + rad, x - rad) == pytest.approx((0.0, 0.2, -1.8))


def test_bad_input():
    with pytest.raises(InputError, match="prime_mover"):
        gc.motoring_power_fraction("wind")
    with pytest.raises(InputError, match="practice"):
        gc.armature_capability_constant("ANSI")
