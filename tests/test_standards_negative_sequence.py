"""Negative-sequence capability tables against METHODS.md §6.1, 6.2 and 6.4."""

from __future__ import annotations

import pytest

from machines.errors import InputError
from machines.standards import negative_sequence as ns


@pytest.mark.parametrize("mva, k", [
    # IEEE C50.13 K for directly cooled cylindrical rotors, check values METHODS.md §6.4 (value from memory)
    (500, 10.00), (800, 10.00), (1000, 8.750), (1200, 7.500), (1600, 5.000),
])
def test_c50_13_direct_k(mva, k):
    assert ns.c50_13_direct_k(mva * 1e6) == pytest.approx(k, rel=5e-4)


@pytest.mark.parametrize("mva, cont, k", [
    # IEC 60034-1 directly cooled cylindrical rotor, check values METHODS.md §6.4 (value from memory)
    (300, 0.08, 8.000), (600, 0.07167, 6.638), (900, 0.06167, 5.002), (1250, 0.05, 5.000),
])
def test_iec_direct(mva, cont, k):
    assert ns.iec_direct_continuous(mva * 1e6) == pytest.approx(cont, rel=5e-4)
    assert ns.iec_direct_k(mva * 1e6) == pytest.approx(k, rel=5e-4)


def test_c50_13_2005_continuous():
    # IEEE C50.13-2005 continuous I2 (value from memory), check values METHODS.md §6.4: 7.167 % / 5.833 %
    assert ns.c50_13_direct_continuous(600e6) == pytest.approx(0.07167, rel=5e-4)
    assert ns.c50_13_direct_continuous(1000e6) == pytest.approx(0.05833, rel=5e-4)


@pytest.mark.parametrize("practice, rotor, cont, k", [
    # IEEE C50.12 / C50.13 table, METHODS.md §6.1 (value from memory)
    ("IEEE", "salient-with-damper", 0.10, 40.0),
    ("IEEE", "salient-without-damper", 0.05, 40.0),
    ("IEEE", "cylindrical-indirect", 0.10, 30.0),
    # IEC 60034-1 table, METHODS.md §6.2 (value from memory): salient generator indirectly cooled 0.08 / 20 s
    ("IEC", "salient-with-damper", 0.08, 20.0),
    # IEC 60034-1 cylindrical indirectly cooled: hydrogen row (lower K) taken, METHODS.md §6.2
    ("IEC", "cylindrical-indirect", 0.10, 10.0),
    # common practice, no published source: salient without damper under IEC, continuous cut to C50.12's 5 %
    ("IEC", "salient-without-damper", 0.05, 20.0),
])
def test_fixed_rows(practice, rotor, cont, k):
    row = ns.table_capability(practice, rotor, 50e6)
    assert (row.continuous, row.k) == (cont, k)


def test_directly_cooled_above_800_mva_by_practice():
    # IEEE C50.13: K = 10 − 0.00625·(1000 − 800) = 8.75 s, METHODS.md §6.4
    assert ns.table_capability("IEEE", "cylindrical-direct", 1000e6).k == pytest.approx(8.75)
    # IEC 60034-1 at 1000 MVA: K = 5 s, I2 = 0.08 − 650/30000 = 0.05833, METHODS.md §6.2
    iec = ns.table_capability("IEC", "cylindrical-direct", 1000e6)
    assert (iec.k, iec.continuous) == pytest.approx((5.0, 0.058333), rel=1e-4)


def test_beyond_the_tables():
    # IEEE C50.13 and IEC 60034-1 tables end at 1600 MVA (METHODS.md §6.1, 6.2): the maker's value is required
    with pytest.raises(InputError, match="1600 MVA"):
        ns.table_capability("IEEE", "cylindrical-direct", 1700e6)
    with pytest.raises(InputError, match="1600 MVA"):
        ns.table_capability("IEC", "cylindrical-direct", 1700e6)


@pytest.mark.parametrize("i2, k, t", [
    # t = K/I2², check values METHODS.md §6.4
    (0.3, 10, 111.1), (0.5, 30, 120.0), (0.2, 8.75, 218.7),
])
def test_trip_time(i2, k, t):
    assert ns.negative_sequence_trip_time(i2, k) == pytest.approx(t, rel=5e-4)


def test_terminal_phase_phase_fault():
    # METHODS.md §6.4: X1 = X2 = 0.2 pu, E = 1 → I2 = 2.500 pu → t = 1.600 s at K = 10
    i2 = ns.phase_phase_fault_negative_sequence(1.0, 0.2, 0.2)
    assert i2 == pytest.approx(2.5)
    assert ns.negative_sequence_trip_time(i2, 10.0) == pytest.approx(1.6)


def test_bad_input():
    with pytest.raises(InputError, match="positive I2"):
        ns.negative_sequence_trip_time(0.0, 10.0)
