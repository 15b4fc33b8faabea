"""Frequency equations against METHODS.md §8.4: swing-equation RoCoF, the SFR model, band accumulation."""

from __future__ import annotations

import pytest
from hypothesis import given, settings, strategies as st

from machines.errors import InputError
from machines.model import FrequencyBand
from machines.standards import frequency as fq

SFR = fq.SfrParameters(h=4.0, r=0.05, fh=0.3, tr=8.0, d=1.0, km=0.95)


@pytest.mark.parametrize("f0, h, dp, rocof", [
    # swing equation (Kundur), check values METHODS.md §8.4
    (60, 4, 0.1, -0.7500), (50, 5, 0.05, -0.2500), (60, 3, 0.2, -2.000),
])
def test_initial_rocof(f0, h, dp, rocof):
    assert fq.initial_rocof(dp, h, f0) == pytest.approx(rocof, rel=5e-4)


def test_sfr_closed_form():
    # Anderson & Mirheydar 1990 SFR model (value from memory), check values METHODS.md §8.4
    assert fq.sfr_natural_frequency(SFR) == pytest.approx(0.5590, rel=5e-4)
    assert fq.sfr_damping_ratio(SFR) == pytest.approx(0.8609, rel=5e-4)
    assert fq.sfr_steady_state_deviation(SFR, -0.2) * 60 == pytest.approx(-0.6000, rel=5e-4)
    assert fq.sfr_nadir_time(SFR) == pytest.approx(2.369, rel=5e-4)
    assert fq.sfr_nadir(SFR, -0.2) == pytest.approx(-0.02166, rel=5e-4)
    assert fq.sfr_nadir(SFR, -0.2) * 60 == pytest.approx(-1.300, rel=5e-4)


def _integrate(p: fq.SfrParameters, pd: float, t_end: float, dt: float = 1e-3) -> list[tuple[float, float]]:
    """Euler integration of the SFR block diagram (independent of the closed form):
    2H·dΔω/dt = Pm + Pd − D·Δω;  T_R·dx/dt = −Δω/R − x;  Pm = Km·(x + F_H·T_R·dx/dt)."""
    w = x = 0.0
    out = []
    for i in range(int(t_end / dt)):
        dx = (-w / p.r - x) / p.tr
        pm = p.km * (x + p.fh * p.tr * dx)
        dw = (pm + pd - p.d * w) / (2 * p.h)
        w, x = w + dw * dt, x + dx * dt
        out.append(((i + 1) * dt, w))
    return out


def test_sfr_against_numeric_integration():
    # METHODS.md §8.4: numeric integration (dt = 1 ms) gives nadir −0.02167 pu at 2.368 s, final −0.01000 pu
    trace = _integrate(SFR, -0.2, 60.0)
    t_nadir, nadir = min(trace, key=lambda tw: tw[1])
    assert nadir == pytest.approx(-0.02167, rel=1e-3)
    assert t_nadir == pytest.approx(2.368, abs=0.01)
    assert trace[-1][1] == pytest.approx(-0.01000, rel=1e-3)
    # and the closed form agrees with it along the way [derived]
    for t, w in trace[::5000]:
        assert fq.sfr_deviation(SFR, -0.2, t) == pytest.approx(w, abs=5e-5)


def test_sfr_initial_slope():
    # METHODS.md §8.4: initial slope −1.500 Hz/s, the swing equation with ΔP = 0.2, H = 4 at 60 Hz
    dt = 1e-4
    slope = fq.sfr_deviation(SFR, -0.2, dt) / dt * 60
    assert slope == pytest.approx(-1.500, rel=2e-3)
    assert fq.initial_rocof(0.2, 4.0, 60.0) == pytest.approx(-1.5)


BANDS = [FrequencyBand(56.0, 57.5, 0.0), FrequencyBand(57.5, 58.5, 600.0), FrequencyBand(58.5, 59.5, 3600.0)]


def test_band_lookup_and_consumption():
    # IEEE C37.106 accumulated-time bands; consumption = time in band / allowance (METHODS.md §8.1, derived)
    assert fq.band_containing(58.0, BANDS) == 1
    assert fq.band_containing(58.5, BANDS) == 2  # low edge belongs to the band
    assert fq.band_containing(60.0, BANDS) is None
    assert fq.band_consumption(60.0, 600.0) == pytest.approx(0.1)
    assert fq.accumulated_consumption([(58.0, 30.0), (58.4, 30.0), (59.0, 360.0)], BANDS) == pytest.approx(
        [0.0, 0.1, 0.1])


def test_bad_inertia():
    with pytest.raises(InputError, match="system_inertia"):
        fq.initial_rocof(0.1, 0.0, 60.0)


@settings(max_examples=100, deadline=None, derandomize=True)
@given(h=st.floats(1.0, 10.0), dp=st.floats(0.01, 0.5), f0=st.sampled_from([50.0, 60.0]))
def test_rocof_scales(h, dp, f0):
    # swing equation: doubling the deficit doubles the RoCoF; doubling H halves it [derived]
    r = fq.initial_rocof(dp, h, f0)
    assert r < 0
    assert fq.initial_rocof(2 * dp, h, f0) == pytest.approx(2 * r)
    assert fq.initial_rocof(dp, 2 * h, f0) == pytest.approx(r / 2)
