"""NEMA tables, unbalance, fault-current and NEC equations against METHODS.md §2.3, 3.1, 3.4, 4.2, 5.2, 5.5, 10."""

from __future__ import annotations

import math

import pytest

from machines.model import rated_current_from_output
from machines.standards.fault_current import (
    FULL_OFFSET_PEAK_FACTOR, FULL_OFFSET_RMS_FACTOR, asymmetrical_rms_factor, phase_to_phase_fault_current,
    source_impedance_from_fault_level, three_phase_fault_current, three_phase_fault_current_from_impedance,
)
from machines.standards.nema import (
    CODE_LETTERS, HP, code_letter_for, code_letter_range, locked_rotor_current_range, mg10_row,
    mg10_starts_per_hour, unbalance_derating_factor, voltage_unbalance_percent,
)
from machines.standards.overload_limits import nec_overload_limit
from machines.standards.negative_sequence import negative_sequence_trip_time
from machines.standards.unbalance import (
    adiabatic_negative_sequence_constant, derating_from_heating_weight, equivalent_heating_current,
    heating_weight_175_rule, heating_weight_from_rotor_resistance, negative_sequence_current_ratio,
    sequence_components, voltage_unbalance_factor,
)


def test_code_letter_table_shape():
    # NEMA MG 1 10.37.2: 19 letters, I, O and Q unused, ranges contiguous
    assert len(CODE_LETTERS) == 19 and not set("IOQ") & set(CODE_LETTERS)
    ranges = list(CODE_LETTERS.values())
    assert all(a[1] == b[0] for a, b in zip(ranges, ranges[1:]))


def test_code_letter_boundaries():
    # NEMA MG 1 10.37.2, METHODS.md §3.1: lower figure included, upper excluded (3.14 → A, 3.15 → B)
    assert code_letter_for(3.14) == "A" and code_letter_for(3.15) == "B"
    # NEMA MG 1 10.37.2: V is "22.4 and up"
    assert code_letter_for(30.0) == "V" and code_letter_range("v") == (22.4, math.inf)


def test_code_letter_lookup_error():
    # NEMA MG 1 10.37.2: I is not a code letter
    with pytest.raises(ValueError, match="not I, O, Q"):
        code_letter_range("I")


@pytest.mark.parametrize("letter, lo, hi", [
    # NEMA MG 1 10.37.2, check value METHODS.md §3.4: 500 hp, 4160 V, codes F / G / H
    ("F", 347.0, 388.6), ("G", 388.6, 437.2), ("H", 437.2, 492.7),
])
def test_locked_rotor_current_500hp(letter, lo, hi):
    a, b = locked_rotor_current_range(letter, 500 * HP, 4160.0)
    assert (a, b) == (pytest.approx(lo, abs=0.05), pytest.approx(hi, abs=0.05))


def test_locked_rotor_current_50hp():
    # NEMA MG 1 10.37.2, check value METHODS.md §3.4: 50 hp, 460 V, code G → 351.4–395.4 A
    a, b = locked_rotor_current_range("G", 50 * HP, 460.0)
    assert (a, b) == (pytest.approx(351.4, abs=0.05), pytest.approx(395.4, abs=0.05))


def test_code_g_in_pu_of_flc():
    # METHODS.md §3.4: 500 hp, 4160 V, η 0.95, pf 0.88 → FLC 61.92 A and code G → 6.276–7.060 pu; METHODS.md takes
    # 1 hp = 746 W for the FLC. With the exact horsepower (550 ft·lbf/s = 745.70 W, NIST SP 811) the FLC is 61.90 A
    # and, since I_LR from the code letter does not depend on the watt value of a horsepower, the ratios are
    # 6.278–7.063 pu: we use the exact value.
    assert rated_current_from_output(500 * 746.0, 4160.0, 0.95, 0.88) == pytest.approx(61.92, abs=0.005)
    a, b = locked_rotor_current_range("G", 500 * HP, 4160.0)
    flc_746 = rated_current_from_output(500 * 746.0, 4160.0, 0.95, 0.88)
    assert (a / flc_746, b / flc_746) == (pytest.approx(6.276, abs=5e-4), pytest.approx(7.060, abs=5e-4))
    flc = rated_current_from_output(500 * HP, 4160.0, 0.95, 0.88)
    assert flc == pytest.approx(61.90, abs=0.005)
    # exact horsepower, independently: 5.6 kVA/hp · 1000 · η · pf / 745.70 W/hp (the √3·V cancels)
    assert (a / flc, b / flc) == (pytest.approx(5.6e3 * 0.95 * 0.88 / 745.69987, rel=1e-7),
                                  pytest.approx(6.3e3 * 0.95 * 0.88 / 745.69987, rel=1e-7))


@pytest.mark.parametrize("volts, nema, vuf", [
    # NEMA MG 1 14.36 definition and symmetrical components, check values METHODS.md §5.5
    ((462.0, 463.0, 455.0), 1.087, 1.091),
    ((480.0, 476.0, 472.0), 0.8403, 0.9704),
    ((460.0, 467.0, 450.0), 1.961, 2.146),
    ((4160.0, 4160.0, 4000.0), 2.597, 2.581),
])
def test_voltage_unbalance(volts, nema, vuf):
    assert voltage_unbalance_percent(*volts) == pytest.approx(nema, rel=5e-4)
    assert 100 * voltage_unbalance_factor(*volts) == pytest.approx(vuf, rel=5e-4)


def test_positive_sequence_of_line_voltages():
    # symmetrical components (Fortescue), check value METHODS.md §5.5: V1 = 460.0 V for 462 / 463 / 455 V
    import cmath
    a, b, c = 462.0, 463.0, 455.0
    cos_c = (a * a + b * b - c * c) / (2 * a * b)
    bc = cmath.rect(b, math.pi - math.acos(cos_c))
    _, x1, x2 = sequence_components(complex(a), bc, -(a + bc))
    # this triangle is drawn with the negative phase order, so the larger sequence is the positive one
    assert max(abs(x1), abs(x2)) == pytest.approx(460.0, abs=0.05)


def test_single_phasing():
    # symmetrical components, check value METHODS.md §5.5: Ia = 0, Ib = −Ic = 1 → I1 = I2 = 0.5774
    _, i1, i2 = sequence_components(0, 1, -1)
    assert abs(i1) == pytest.approx(0.5774, abs=5e-5) and abs(i2) / abs(i1) == pytest.approx(1.0)


@pytest.mark.parametrize("vu, factor", [
    # NEMA MG 1 Fig. 14-1 digitised, METHODS.md §5.2
    (0.0, 1.00), (0.5, 1.00), (1.5, 0.97), (2.0, 0.95), (3.0, 0.89), (4.0, 0.82), (5.0, 0.76),
])
def test_derating_table(vu, factor):
    assert unbalance_derating_factor(vu) == pytest.approx(factor)


def test_derating_interpolates_and_refuses_above_5():
    # NEMA MG 1 Fig. 14-1 digitised (METHODS.md §5.2: "interpolate linearly"); MG 1: no operation above 5 %
    assert unbalance_derating_factor(3.25) == pytest.approx(0.87)
    with pytest.raises(ValueError, match="above 5 %"):
        unbalance_derating_factor(5.5)


@pytest.mark.parametrize("lr, expected", [
    # METHODS.md §5.3 [D], check value METHODS.md §5.5: VU 2 %, I_LR 5 / 6 / 7 → I2/I1 ≈ 10 / 12 / 14 %
    (5.0, 0.10), (6.0, 0.12), (7.0, 0.14),
])
def test_current_unbalance_from_voltage(lr, expected):
    assert negative_sequence_current_ratio(0.02, lr) == pytest.approx(expected)


@pytest.mark.parametrize("lr, expected", [
    # rule of thumb from maker literature [F-v], check value METHODS.md §5.5: K = 175/I_LR²
    (5.0, 7.000), (6.0, 4.861), (7.0, 3.571),
])
def test_k_175_rule(lr, expected):
    assert heating_weight_175_rule(lr) == pytest.approx(expected, abs=5e-4)


@pytest.mark.parametrize("t_lr, slip, lr, expected", [
    # METHODS.md §5.3 [D], check value METHODS.md §5.5: K = T_LR / (s·I_LR²)
    (1.75, 0.01, 6.0, 4.861), (1.5, 0.008, 6.5, 4.438), (2.0, 0.015, 6.0, 3.704),
])
def test_k_from_rotor_resistance(t_lr, slip, lr, expected):
    assert heating_weight_from_rotor_resistance(t_lr, slip, lr) == pytest.approx(expected, abs=5e-4)


def test_equivalent_current_and_derating():
    # METHODS.md §5.3 [D], check value METHODS.md §5.5: I1 = 1, I2 = 0.1, K = 6 → I_eq = 1.030
    assert equivalent_heating_current(1.0, 0.1, 6.0) == pytest.approx(1.030, abs=5e-4)
    # check value METHODS.md §5.5: derating with K = 175/I_LR² at 2 / 3 / 5 % → 0.9667 / 0.9295 / 0.8341
    k = heating_weight_175_rule(6.0)
    got = [derating_from_heating_weight(k, 6.0, u) for u in (0.02, 0.03, 0.05)]
    assert got == [pytest.approx(v, abs=5e-5) for v in (0.9667, 0.9295, 0.8341)]


@pytest.mark.parametrize("vu, implied", [
    # METHODS.md §5.3 [D], check value METHODS.md §5.5: K·I_LR² implied by the NEMA table at 2 / 3 / 5 %
    (2.0, 270.1), (3.0, 291.6), (5.0, 292.5),
])
def test_k_implied_by_nema_curve(vu, implied):
    d = unbalance_derating_factor(vu)
    assert (1 / d ** 2 - 1) / (vu / 100) ** 2 == pytest.approx(implied, abs=0.05)


def test_adiabatic_k2():
    # METHODS.md §5.4 [D], check value METHODS.md §5.5: I_LR 6, t_sc 15 s → K2 = 540 s; t at I2 0.3 / 1.0 = 6000 / 540 s
    k2 = adiabatic_negative_sequence_constant(6.0, 15.0)
    assert k2 == pytest.approx(540.0)
    assert negative_sequence_trip_time(0.3, k2) == pytest.approx(6000.0)
    assert negative_sequence_trip_time(1.0, k2) == pytest.approx(540.0)


def test_46_alarm_in_voltage_unbalance():
    # METHODS.md §5.3 [D], check value METHODS.md §5.5: alarm at I2 = 10 %, I_LR = 6.276 → VU ≈ 1.593 %
    assert 100 * 0.10 / 6.276 == pytest.approx(1.593, abs=5e-4)


def test_mg10():
    # NEMA MG 10 Table 2-3 (EASA handbook), check value METHODS.md §2.5: 100 hp 4-pole, WK² 200 → 2.205/h, rest 110 s
    starts, rest = mg10_starts_per_hour(100.0, 4, 200.0)
    assert starts == pytest.approx(2.205, abs=5e-4) and rest == 110.0
    # NEMA MG 10 Table 2-3 row: 250 hp 6-pole A/B/C = 4.2 / 2744 / 440 (METHODS.md §2.3)
    assert mg10_row(250.0, 6) == (4.2, 2744.0, 440.0)
    with pytest.raises(ValueError, match="covers 2-, 4- and 6-pole"):
        mg10_row(1500.0, 4)


def test_fault_currents():
    # IEC 60909 S = √3·U·I
    assert three_phase_fault_current(250e6, 4160.0) == pytest.approx(34697, abs=1)
    z = source_impedance_from_fault_level(250e6, 4160.0)
    assert three_phase_fault_current_from_impedance(z, 4160.0) == pytest.approx(34697, abs=1)
    # METHODS.md §4.2: min 3-ph fault 8 kA, 50 pickup 874 A → phase-to-phase / pickup = 7.927
    assert phase_to_phase_fault_current(8000.0) / 874.0 == pytest.approx(7.927, abs=5e-4)


def test_asymmetry_factors():
    # METHODS.md §4.2: X/R 10, t = 1/120 s → 1.438; full offset rms / peak → 1.732 / 2.828
    assert asymmetrical_rms_factor(10.0, 1 / 120, 60.0) == pytest.approx(1.438, abs=5e-4)
    assert (FULL_OFFSET_RMS_FACTOR, FULL_OFFSET_PEAK_FACTOR) == (pytest.approx(1.732, abs=5e-4),
                                                                 pytest.approx(2.828, abs=5e-4))


@pytest.mark.parametrize("flc, sf, rise, expected", [
    # NFPA 70 (NEC) 430.32(A)(1), check values METHODS.md §10: FLA 24 A SF 1.15 → 30.00 A; FLA 26 A SF 1.0 → 29.90 A
    (24.0, 1.15, None, 30.00), (26.0, 1.0, None, 29.90),
    # NEC 430.32(A)(1): a marked rise ≤ 40 °C alone qualifies for 125 % (METHODS.md §10)
    (26.0, 1.0, 40.0, 32.50),
])
def test_nec_limit(flc, sf, rise, expected):
    assert flc * nec_overload_limit(sf, rise) == pytest.approx(expected, abs=0.005)
