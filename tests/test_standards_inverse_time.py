"""Inverse-time curves against the check values of METHODS.md §1.4 (IEC 60255-151, IEEE C37.112)."""

from __future__ import annotations

import pytest
from hypothesis import given, settings, strategies as st

from machines.errors import InputError
from machines.standards.accuracy import operate_time_tolerance
from machines.standards.inverse_time import (
    CURVES, curve_constants, inverse_operate_time, inverse_reset_time, time_multiplier_for,
)


@pytest.mark.parametrize("curve, multiple, expected", [
    # IEC 60255-151 SI, TMS 1, check values METHODS.md §1.4 (constants: value from memory)
    ("IEC-SI", 2, 10.03), ("IEC-SI", 5, 4.280), ("IEC-SI", 10, 2.971), ("IEC-SI", 20, 2.267),
    # IEC 60255-151 VI, METHODS.md §1.4
    ("IEC-VI", 2, 13.50), ("IEC-VI", 5, 3.375), ("IEC-VI", 10, 1.500), ("IEC-VI", 20, 0.7105),
    # IEC 60255-151 EI, METHODS.md §1.4
    ("IEC-EI", 2, 26.67), ("IEC-EI", 5, 3.333), ("IEC-EI", 10, 0.8081), ("IEC-EI", 20, 0.2005),
    # BS 142 long-time inverse, METHODS.md §1.4
    ("IEC-LTI", 2, 120.0), ("IEC-LTI", 5, 30.00), ("IEC-LTI", 10, 13.33),
    # IEEE C37.112, TD 1, METHODS.md §1.4
    ("IEEE-MI", 2, 3.803), ("IEEE-VI", 2, 7.028), ("IEEE-EI", 2, 9.522),
    ("IEEE-MI", 5, 1.688), ("IEEE-VI", 5, 1.308), ("IEEE-EI", 5, 1.297),
    ("IEEE-MI", 10, 1.207), ("IEEE-VI", 10, 0.6891), ("IEEE-EI", 10, 0.4065),
])
def test_operate_time_at_multiplier_one(curve, multiple, expected):
    assert inverse_operate_time(multiple, curve, 1.0) == pytest.approx(expected, rel=5e-4)


def test_operate_time_scales_with_multiplier():
    # IEC 60255-151, check value METHODS.md §1.4: IEC SI, TMS 0.1, M = 10 → 0.2971 s
    assert inverse_operate_time(10, "IEC-SI", 0.1) == pytest.approx(0.2971, rel=5e-4)
    # IEEE C37.112, check value METHODS.md §1.4: IEEE VI, TD 5, M = 3 → 14.71 s
    assert inverse_operate_time(3, "IEEE-VI", 5.0) == pytest.approx(14.71, rel=5e-4)


def test_time_multiplier_for_target():
    # IEC 60255-151, check value METHODS.md §1.4: TMS for IEC SI giving 0.5 s at M = 8 → 0.1517
    assert time_multiplier_for(0.5, 8.0, "IEC-SI") == pytest.approx(0.1517, rel=5e-4)


@pytest.mark.parametrize("multiple, expected", [
    # IEEE C37.112 reset, TD 1, check values METHODS.md §1.4 (MI / VI / EI)
    (0.0, (4.850, 21.60, 29.10)),
    (0.5, (6.467, 28.80, 38.80)),
    (0.9, (25.53, 113.7, 153.2)),
])
def test_reset_time(multiple, expected):
    got = tuple(inverse_reset_time(multiple, c, 1.0) for c in ("IEEE-MI", "IEEE-VI", "IEEE-EI"))
    assert got == pytest.approx(expected, rel=5e-4)


def test_reset_uses_square_not_curve_exponent():
    # IEEE C37.112 reset exponent 2, METHODS.md §1.2: with α = 0.02 the MI reset at M = 0.5 would be 352 s [derived]
    assert inverse_reset_time(0.5, "IEEE-MI", 1.0) == pytest.approx(6.467, rel=5e-4)
    assert 4.85 / (1 - 0.5 ** 0.02) == pytest.approx(352, rel=5e-3)


def test_definite_time_above_gd():
    # IEC 60255-151 "definite time above GD" (METHODS.md §1.2): beyond GD the time is held at t(GD)
    assert inverse_operate_time(40, "IEC-SI", 1.0, definite_above=20) == pytest.approx(
        inverse_operate_time(20, "IEC-SI", 1.0))


@pytest.mark.parametrize("call, match", [
    (lambda: inverse_operate_time(1.0, "IEC-SI", 1.0), "above 1"),  # no operation at or below pickup
    (lambda: inverse_operate_time(2.0, "IEC-XX", 1.0), "expected one of"),  # unknown curve
    (lambda: inverse_operate_time(2.0, "IEC-SI", 0.0), "positive time multiplier"),
    (lambda: inverse_reset_time(0.5, "IEC-SI", 1.0), "dependent reset"),  # IEC A/B/C have no disc reset
    (lambda: inverse_reset_time(1.2, "IEEE-VI", 1.0), "below 1"),
    (lambda: time_multiplier_for(-1.0, 5.0, "IEEE-VI"), "positive operate time"),
])
def test_bad_input(call, match):
    with pytest.raises(InputError, match=match):
        call()


def test_constants_are_data():
    # IEEE C37.112 table (value from memory): VI constants
    vi = curve_constants("IEEE-VI")
    assert (vi.k, vi.c, vi.alpha, vi.reset) == (19.61, 0.491, 2.0, 21.6)
    assert {c.family for c in CURVES.values()} == {"IEC", "IEEE"}


@settings(max_examples=200, deadline=None, derandomize=True)
@given(curve=st.sampled_from(sorted(CURVES)), m1=st.floats(1.05, 30.0), m2=st.floats(1.05, 30.0),
       tms=st.floats(0.02, 10.0))
def test_operate_time_falls_with_current_and_inverts(curve, m1, m2, tms):
    # IEC 60255-151 / C37.112: a dependent-time characteristic is monotone decreasing in M [derived]
    lo, hi = sorted((m1, m2))
    assert inverse_operate_time(lo, curve, tms) >= inverse_operate_time(hi, curve, tms)
    # TMS = t / t(M, 1) is the exact inverse of the operate time [derived]
    t = inverse_operate_time(lo, curve, tms)
    assert time_multiplier_for(t, lo, curve) == pytest.approx(tms, rel=1e-9)


@pytest.mark.parametrize("multiple, t_theo, band, widened", [
    # METHODS.md §12.3 (IEC SI, TMS 0.2, ε = 5 %, t_min = 30 ms, δ = 5 %), IEC 60255-151 accuracy template
    (2, 2.006, (1.906, 2.106), (1.773, 2.267)),
    (5, 0.8559, (0.8131, 0.8987), (0.7876, 0.9273)),
    (10, 0.5941, (0.5641, 0.6241), (0.5509, 0.6376)),
])
def test_commissioning_bands(multiple, t_theo, band, widened):
    t = inverse_operate_time(multiple, "IEC-SI", 0.2)
    assert t == pytest.approx(t_theo, rel=5e-4)
    tol = operate_time_tolerance(t)
    assert (t - tol, t + tol) == pytest.approx(band, rel=5e-4)
    # pickup tolerance ±δ: evaluate the curve at M/(1 ∓ δ), then apply the time tolerance (METHODS.md §12.2)
    lo = inverse_operate_time(multiple / 0.95, "IEC-SI", 0.2)
    hi = inverse_operate_time(multiple / 1.05, "IEC-SI", 0.2)
    assert (lo - operate_time_tolerance(lo), hi + operate_time_tolerance(hi)) == pytest.approx(widened, rel=5e-4)
