"""Thermal replica of a machine winding: the single-body first-order model of IEC 60255-149.

The thermal level θ is the winding's heat as a fraction of the trip level (θ = 1 trips). With a constant current I
and the pickup (maximum continuous) current I_p = k·I_B the level obeys

    dθ/dt = [ (I / I_p)² − θ ] / τ

so a step of current gives θ(t) = θ0·e^(−t/τ) + (I/I_p)²·(1 − e^(−t/τ)). Everything here is equations; which τ to
use and why is the protection rule's business (``machines.protection.thermal_overload``).

Glossary: ``current`` I [A or pu], ``pickup_current`` k·I_B [same unit as I], ``time_constant`` τ [s],
``prior_current`` I_P, the steady current before the overload [same unit as I], θ thermal level [-].

Methods: machines/METHODS.md §2 (thermal replica; 2.1 equations, 2.2 fitting, 2.3 starts, 2.5 check values).
"""

from __future__ import annotations

import math

import numpy as np


def thermal_operate_time(current: float, pickup_current: float, time_constant: float,
                         prior_current: float = 0.0) -> float:
    """Operate time of the thermal replica after a step to a constant current [s].

    Parameters
    ----------
    current : I, the overload current [A, or pu of any base]
    pickup_current : k·I_B, the current at which the steady level is the trip level [same unit as ``current``]
    time_constant : τ, heating time constant [s]
    prior_current : I_P, the steady load current before the step (0 for "cold") [same unit as ``current``]

    Returns
    -------
    float
        t [s]; ``inf`` when I ≤ k·I_B (never trips), 0.0 when the prior level is already at the trip level.

    Notes
    -----
    t = τ · ln[ (I² − I_P²) / (I² − (k·I_B)²) ]; cold: I_P = 0.

    References
    ----------
    IEC 60255-149:2013, thermal electrical relays, operate-time equation (same form as IEC 60255-8). METHODS.md §2.1.

    Examples
    --------
    >>> round(thermal_operate_time(1.5, 1.05, 1800.0), 1)          # METHODS.md §2.5: 1212 s
    1212.1
    >>> round(thermal_operate_time(2.0, 1.05, 1800.0, 1.0), 2)     # METHODS.md §2.5: 62.58 s
    62.58
    >>> thermal_operate_time(1.0, 1.05, 1800.0)
    inf
    """
    i2, p2, ip2 = current * current, pickup_current * pickup_current, prior_current * prior_current
    if i2 <= p2:
        return math.inf
    if ip2 >= p2:
        return 0.0
    return time_constant * math.log((i2 - ip2) / (i2 - p2))


def thermal_level(current: float, pickup_current: float, time_constant: float, elapsed: float,
                  initial_level: float = 0.0) -> float:
    """Thermal level after ``elapsed`` seconds at a constant current [-] (1.0 = trip level).

    Parameters
    ----------
    current : I [A or pu]
    pickup_current : k·I_B [same unit]
    time_constant : τ [s] (the heating constant while current flows, the cooling constant at standstill)
    elapsed : t [s]
    initial_level : θ0 [-]

    Notes
    -----
    θ(t) = θ0·e^(−t/τ) + (I/(k·I_B))²·(1 − e^(−t/τ)).

    References
    ----------
    IEC 60255-149:2013, thermal model differential equation. METHODS.md §2.1.

    Examples
    --------
    >>> round(thermal_level(1.5, 1.05, 1800.0, 1212.1), 4)   # the cold operate time of METHODS.md §2.5 reaches 1.0
    1.0
    >>> round(thermal_level(0.0, 1.05, 3600.0, 2919.6, 0.9), 4)   # cooling 90 % → 40 % at τc = 60 min
    0.4
    """
    decay = math.exp(-elapsed / time_constant)
    return initial_level * decay + (current / pickup_current) ** 2 * (1.0 - decay)


def steady_state_level(current: float, pickup_current: float) -> float:
    """Final thermal level at a constant current, θ∞ = (I / (k·I_B))² [-].

    References
    ----------
    IEC 60255-149:2013. METHODS.md §2.5 (θ∞ at 0.8 / 1.0 / 1.05 pu with k·I_B = 1.05: 58.05 / 90.70 / 100 %).

    Examples
    --------
    >>> round(steady_state_level(0.8, 1.05), 4)
    0.5805
    """
    return (current / pickup_current) ** 2


def time_constant_from_trip_time(trip_time: float, current: float, pickup_current: float,
                                 prior_current: float = 0.0) -> float:
    """The heating time constant that makes the replica trip in ``trip_time`` at ``current`` [s].

    Used to fit τ to a point of the machine's thermal-limit curve, e.g. the cold safe stall time at the locked-rotor
    current (I_P = 0) or the hot one (I_P = 1 pu).

    Notes
    -----
    τ = t / ln[ (I² − I_P²) / (I² − (k·I_B)²) ]  (the operate-time equation solved for τ).

    References
    ----------
    IEC 60255-149:2013 operate-time equation; METHODS.md §2.2 [D].

    Examples
    --------
    >>> round(time_constant_from_trip_time(15.0, 6.0, 1.05), 1)       # METHODS.md §2.5: 482.3 s
    482.3
    >>> round(time_constant_from_trip_time(10.0, 6.0, 1.05, 1.0), 0)  # METHODS.md §2.5: 3410 s
    3410.0
    """
    i2, p2, ip2 = current ** 2, pickup_current ** 2, prior_current ** 2
    if i2 <= p2 or ip2 >= p2:
        raise ValueError("the fit needs pickup < current and prior < pickup")
    return trip_time / math.log((i2 - ip2) / (i2 - p2))


def cooling_time(from_level: float, to_level: float, cooling_time_constant: float) -> float:
    """Time for the level to fall from ``from_level`` to ``to_level`` with no current [s].

    Notes
    -----
    t = τc · ln(θ_from / θ_to); 0 when θ_from ≤ θ_to.

    References
    ----------
    IEC 60255-149:2013 model with the standstill (cooling) constant; METHODS.md §2.1, 2.3.

    Examples
    --------
    >>> round(cooling_time(0.9, 0.4, 3600.0) / 60, 2)         # METHODS.md §2.5: 48.66 min
    48.66
    >>> cooling_time(0.3, 0.4, 3600.0)
    0.0
    """
    if from_level <= to_level:
        return 0.0
    if to_level <= 0.0:
        return math.inf
    return cooling_time_constant * math.log(from_level / to_level)


def start_capacity(start_time: float, stall_time: float, time_constant: float) -> float:
    """Share of the trip capacity one start uses, referred to the cold safe stall time [-].

    Notes
    -----
    Δθ_start = (1 − e^(−t_st/τ)) / (1 − e^(−t_sc/τ)) ≈ t_st / t_sc for τ ≫ t: the start heats like a stall of its
    own length, and a stall of t_sc from cold uses the whole capacity.

    References
    ----------
    METHODS.md §2.3 [D], built on the IEC 60255-149 model.

    Examples
    --------
    >>> round(start_capacity(5.0, 15.0, 482.3), 4)   # METHODS.md §2.5: 33.68 %
    0.3368
    """
    return (1.0 - math.exp(-start_time / time_constant)) / (1.0 - math.exp(-stall_time / time_constant))


def restart_wait(level_now: float, start_use: float, cooling_time_constant: float, margin: float = 1.1) -> float:
    """Standstill wait before one more start is allowed [s].

    Notes
    -----
    A start is allowed when θ + m·Δθ_start ≤ 1; the wait is τc·ln(θ / θ_allow), θ_allow = 1 − m·Δθ_start.

    References
    ----------
    METHODS.md §2.3 [D][P].

    Examples
    --------
    >>> round(restart_wait(2 / 3, 1 / 3, 3600.0) / 60, 3)   # METHODS.md §2.5: 3.078 min
    3.078
    """
    allow = 1.0 - margin * start_use
    if allow <= 0.0:
        return math.inf
    return cooling_time(level_now, allow, cooling_time_constant)


def heat_stored_at_rated_load(stall_time_hot: float, stall_time_cold: float) -> float:
    """Share of the trip capacity held at rated load, from the hot/cold safe stall times [-].

    Notes
    -----
    θ_rated ≈ 1 − t_sh / t_sc (thermal-limit-curve practice: hot stall time is what is left of the cold one).

    References
    ----------
    METHODS.md §2.2 [P].

    Examples
    --------
    >>> round(heat_stored_at_rated_load(10.0, 15.0), 4)
    0.3333
    """
    return 1.0 - stall_time_hot / stall_time_cold


def thermal_level_profile(times, currents, pickup_current: float, time_constant: float,
                          initial_level: float = 0.0) -> np.ndarray:
    """Thermal level along a current profile, exact for a current held constant over each step [-].

    Parameters
    ----------
    times : t_0 … t_n, increasing [s]
    currents : I over each step (I[j] holds from t[j] to t[j+1]; the last value is unused) [A or pu]
    pickup_current : k·I_B [same unit]
    time_constant : τ [s]
    initial_level : θ at t_0 [-]

    Returns
    -------
    numpy.ndarray of θ at each time.

    Notes
    -----
    θ_{j+1} = θ_j·e^(−Δt/τ) + (I_j/(k·I_B))²·(1 − e^(−Δt/τ)) — the IEC 60255-149 step applied piece by piece,
    summed in closed form: θ(t_n) = e^(−t_n/τ)·[θ_0 + Σ_{j<n} q_j·(e^(t_{j+1}/τ) − e^(t_j/τ))], q_j = (I_j/(k·I_B))²,
    with times taken from t_0.

    Examples
    --------
    >>> lvl = thermal_level_profile([0.0, 600.0, 1212.1], [1.5, 1.5, 1.5], 1.05, 1800.0)
    >>> round(float(lvl[-1]), 4)
    1.0
    """
    t = np.asarray(times, dtype=float)
    t = t - t[0]
    i = np.asarray(currents, dtype=float)
    q = (i[:-1] / pickup_current) ** 2
    if t[-1] / time_constant > 500.0:  # e^(t/τ) would overflow: step by step instead
        decay = np.exp(-np.diff(t) / time_constant)
        out = np.empty(t.size)
        out[0] = level = initial_level
        for j in range(decay.size):
            level = level * decay[j] + q[j] * (1.0 - decay[j])
            out[j + 1] = level
        return out
    grow = np.exp(t / time_constant)
    acc = np.empty(t.size)
    acc[0] = initial_level
    np.cumsum(q * np.diff(grow), out=acc[1:])
    acc[1:] += initial_level
    return acc / grow
