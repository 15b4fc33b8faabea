"""System frequency after a loss of generation, and off-frequency operation of turbines.

- Swing equation: the initial rate of change of frequency after a step power deficit (METHODS.md §8.3).
- The low-order system-frequency-response (SFR) model of Anderson and Mirheydar (IEEE Trans. Power Systems 5(3),
  1990): natural frequency, damping, steady-state deviation and the time and depth of the nadir.
- Off-frequency bands: which band a frequency lies in, the fraction of a band's accumulated-time allowance an event
  uses (IEEE C37.106 describes turbine limits as bands with a time allowance accumulated over the turbine's life;
  the numbers are the maker's).

Methods: machines/METHODS.md §8 (frequency; 8.1 bands, 8.3 swing equation and SFR model, 8.4 check values).
"""

from __future__ import annotations

import math

from machines.errors import InputError
from machines.frozen import frozen


def initial_rocof(power_deficit: float, inertia_constant: float, frequency: float) -> float:
    """Initial rate of change of frequency after a step power deficit, df/dt = −ΔP·f0 / (2·H) [Hz/s].

    Parameters
    ----------
    power_deficit : ΔP, generation lost [pu of the system's rating], positive for a deficit
    inertia_constant : H of the system on the same rating [s]
    frequency : f0, nominal frequency [Hz]

    Returns
    -------
    df/dt at t = 0+ [Hz/s], negative for a deficit

    References
    ----------
    Swing equation, e.g. P. Kundur, Power System Stability and Control (1994), ch. 3; METHODS.md §8.3, 8.4.

    Examples
    --------
    >>> initial_rocof(0.1, 4.0, 60.0)    # METHODS.md §8.4
    -0.75
    >>> initial_rocof(0.05, 5.0, 50.0)   # METHODS.md §8.4
    -0.25
    """
    if not (math.isfinite(inertia_constant) and inertia_constant > 0.0):
        raise InputError("supply.system_inertia", f"expected a positive inertia constant, got {inertia_constant!r}")
    return -power_deficit * frequency / (2.0 * inertia_constant)


@frozen
class SfrParameters:
    """Parameters of the Anderson–Mirheydar SFR model (all on the system base).

    h inertia [s]; r droop [pu]; fh HP-turbine fraction [-]; tr reheat time constant [s]; d load damping [pu];
    km mechanical power gain [-].
    """

    h: float
    r: float
    fh: float
    tr: float
    d: float
    km: float


def sfr_natural_frequency(p: SfrParameters) -> float:
    """ωn = √((D·R + Km) / (2·H·R·T_R)) [rad/s].

    Examples
    --------
    >>> round(sfr_natural_frequency(SfrParameters(4, 0.05, 0.3, 8, 1, 0.95)), 4)   # METHODS.md §8.4
    0.559
    """
    return math.sqrt((p.d * p.r + p.km) / (2.0 * p.h * p.r * p.tr))


def sfr_damping_ratio(p: SfrParameters) -> float:
    """ζ = ωn·(2·H·R + (D·R + Km·F_H)·T_R) / (2·(D·R + Km)) [-].

    Examples
    --------
    >>> round(sfr_damping_ratio(SfrParameters(4, 0.05, 0.3, 8, 1, 0.95)), 4)   # METHODS.md §8.4
    0.8609
    """
    wn = sfr_natural_frequency(p)
    return wn * (2.0 * p.h * p.r + (p.d * p.r + p.km * p.fh) * p.tr) / (2.0 * (p.d * p.r + p.km))


def sfr_steady_state_deviation(p: SfrParameters, disturbance: float) -> float:
    """Δω_ss = R·P_d / (D·R + Km) [pu]; P_d negative for a generation deficit.

    Examples
    --------
    >>> round(sfr_steady_state_deviation(SfrParameters(4, 0.05, 0.3, 8, 1, 0.95), -0.2) * 60, 4)   # METHODS.md §8.4
    -0.6
    """
    return p.r * disturbance / (p.d * p.r + p.km)


def sfr_deviation(p: SfrParameters, disturbance: float, t: float) -> float:
    """Frequency deviation Δω(t) of the SFR model after a step disturbance P_d [pu].

    Notes
    -----
    Δω(t) = Δω_ss·[1 + α·e^(−ζωn·t)·sin(ωr·t + φ)], ωr = ωn·√(1 − ζ²),
    α = √((1 − 2·T_R·ζ·ωn + T_R²·ωn²) / (1 − ζ²)), φ = atan2(ωr·T_R, 1 − ζ·ωn·T_R) − atan2(√(1 − ζ²), −ζ).
    Valid for ζ < 1.

    References
    ----------
    P. M. Anderson, M. Mirheydar, "A low-order system frequency response model", IEEE Trans. Power Systems 5(3),
    1990 (value from memory, verified numerically); METHODS.md §8.3.

    Examples
    --------
    >>> round(sfr_deviation(SfrParameters(4, 0.05, 0.3, 8, 1, 0.95), -0.2, 0.0), 9)
    0.0
    """
    wn, z = sfr_natural_frequency(p), sfr_damping_ratio(p)
    if z >= 1.0:
        raise InputError("sfr", f"expected an underdamped SFR model (ζ < 1), got ζ = {z:.4g}")
    wr = wn * math.sqrt(1.0 - z * z)
    alpha = math.sqrt((1.0 - 2.0 * p.tr * z * wn + p.tr ** 2 * wn ** 2) / (1.0 - z * z))
    phi = math.atan2(wr * p.tr, 1.0 - z * wn * p.tr) - math.atan2(math.sqrt(1.0 - z * z), -z)
    return sfr_steady_state_deviation(p, disturbance) * (1.0 + alpha * math.exp(-z * wn * t) * math.sin(wr * t + phi))


def sfr_nadir_time(p: SfrParameters) -> float:
    """Time of the frequency nadir: the first t > 0 with tan(ωr·t) = ωr·T_R / (ζ·ωn·T_R − 1) [s].

    Examples
    --------
    >>> round(sfr_nadir_time(SfrParameters(4, 0.05, 0.3, 8, 1, 0.95)), 3)   # METHODS.md §8.4
    2.369
    """
    wn, z = sfr_natural_frequency(p), sfr_damping_ratio(p)
    wr = wn * math.sqrt(1.0 - z * z)
    return math.atan2(wr * p.tr, z * wn * p.tr - 1.0) / wr % (math.pi / wr)


def sfr_nadir(p: SfrParameters, disturbance: float) -> float:
    """Deepest frequency deviation of the SFR model [pu].

    Examples
    --------
    >>> round(sfr_nadir(SfrParameters(4, 0.05, 0.3, 8, 1, 0.95), -0.2), 5)   # METHODS.md §8.4: −0.02166 pu
    -0.02166
    """
    return sfr_deviation(p, disturbance, sfr_nadir_time(p))


# ---------------------------------------------------------------------------------------------------- bands


def band_containing(frequency: float, bands) -> int | None:
    """Index of the band (objects with ``low``, ``high`` [Hz]) with low ≤ f < high, or None.

    >>> from machines.model import FrequencyBand
    >>> band_containing(58.0, [FrequencyBand(57.5, 58.5, 600.0), FrequencyBand(58.5, 59.5, 3600.0)])
    0
    """
    for i, b in enumerate(bands):
        if b.low <= frequency < b.high:
            return i
    return None


def band_consumption(time_in_band: float, allowance: float) -> float:
    """Fraction of a band's accumulated-time allowance used by ``time_in_band`` [-] (1.0 = allowance spent).

    Notes
    -----
    consumption = t_in_band / t_allowed; the life consumption of a band is the sum over events.

    References
    ----------
    IEEE C37.106 (band limits with an accumulated time allowance); METHODS.md §8.1 [derived].

    Examples
    --------
    >>> band_consumption(360.0, 3600.0)
    0.1
    >>> band_consumption(1.0, 0.0)
    inf
    """
    if allowance <= 0.0:
        return math.inf if time_in_band > 0.0 else 0.0
    return time_in_band / allowance


def accumulated_consumption(events, bands) -> list[float]:
    """Life consumption of each band from events (frequency [Hz], duration [s]) [-].

    >>> from machines.model import FrequencyBand
    >>> accumulated_consumption([(58.0, 60.0), (58.2, 120.0)], [FrequencyBand(57.5, 58.5, 600.0)])
    [0.3]
    """
    used = [0.0] * len(bands)
    for f, dt in events:
        i = band_containing(f, bands)
        if i is not None:
            used[i] += band_consumption(dt, bands[i].allowed)
    return used
