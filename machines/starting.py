"""Motor starting: locked-rotor current, voltage at the terminals, torque–speed model, acceleration and current.

Three layers, as elsewhere: plain float/array functions (one per equation), a :class:`StartStudy` holding the
result, and :func:`study_start`, which builds everything from the machine model for one voltage.

Models used (and stated on the sheet):

- **Terminal voltage during the start**: the motor at standstill is a constant impedance Z_LR = V_n/(√3·I_LR);
  with the source impedance Z_s the terminal voltage is V = V_bus·Z_LR/(Z_LR + Z_s), the two magnitudes added
  arithmetically because their angles are unknown (conservative: it gives the lower voltage).
- **Torque–speed curve** (pu of rated torque against pu of synchronous speed): Kloss's equation
  T = 2·T_b / (s/s_b + s_b/s) between breakdown and synchronous speed, with the breakdown slip found from the
  rated point, s_b = s_r·(T_b + √(T_b² − 1)). Kloss's equation is the textbook single-cage result (e.g. Boldea &
  Nasar, *The Induction Machine Handbook*, torque–slip chapter). It badly underrates the torque of a deep-bar or
  double-cage rotor at standstill, so from standstill to breakdown (x = n/n_b) the curve is ours [D]: the
  locked-rotor torque with a pull-up dip, T = T_LR·(1 − 0.08·sin(π·x/0.5)) up to half the breakdown speed, then a
  parabolic rise T = T_LR + (T_b − T_LR)·u², u = (x − 0.5)/0.5, to the breakdown torque. The shape constants were
  chosen so that, given only the end points of METHODS.md §3.4's maker-style torque table, the acceleration times
  come out 1–2 % longer than with the full table (tests/test_starting.py): an estimate on the safe side for the
  51LR window, not a substitute for the maker's curve.
- **Current–slip curve**: I² = I_0² + (I_LR² − I_0²)·(1 + a²)/((a/s)² + 1), a magnetising current
  I_0 = sin φ_rated plus a rotor branch R/s + jX whose ratio a = R/X is chosen so the curve passes through I_LR at
  standstill and rated current at rated slip [D].
- **Torque ∝ V², current ∝ V** at a given slip; the voltage is held at its starting value (conservative).
- **Acceleration**: J·dω/dt = T_m(ω)·(V/V_n)² − T_L(ω), integrated over speed, t = ∫ J dω / T_acc(ω)
  (trapezoidal rule on a speed grid, numpy). The start "does not accelerate" when T_acc ≤ 0 below breakdown speed.
  The start ends at the slip 1.5 × the running slip (the current is then back near load current).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

GRID_POINTS = 600  #: speed points of the integration grid [-]
END_SLIP_FACTOR = 1.5  #: the start ends at this multiple of the running slip [-]
LB_FT2 = 0.0421401101  #: one lb·ft² (WK²) in kg·m² [kg·m²]


# ---------------------------------------------------------------------------------------------------- equations


def locked_rotor_impedance(rated_voltage: float, locked_rotor_current: float) -> float:
    """Per-phase impedance of the motor at standstill, Z_LR = V_n / (√3 · I_LR) [Ω].

    Examples
    --------
    >>> round(locked_rotor_impedance(4160.0, 1153.2), 4)
    2.0827
    """
    return rated_voltage / (math.sqrt(3.0) * locked_rotor_current)


def starting_voltage(bus_voltage: float, rated_voltage: float, locked_rotor_current: float,
                     source_impedance: float) -> float:
    """Terminal voltage at locked rotor, in pu of the motor's rated voltage [pu].

    Parameters
    ----------
    bus_voltage : open-circuit source (bus) voltage, line-to-line [V]
    rated_voltage : motor rated voltage [V]
    locked_rotor_current : I_LR at rated voltage [A]
    source_impedance : Z_s per phase [Ω]

    Notes
    -----
    V = (V_bus / V_n) · Z_LR / (Z_LR + Z_s), magnitudes added arithmetically (conservative).

    Examples
    --------
    >>> round(starting_voltage(4160.0, 4160.0, 1153.2, 4160.0 ** 2 / 180e6), 4)   # 180 MVA bus
    0.9559
    """
    z_lr = locked_rotor_impedance(rated_voltage, locked_rotor_current)
    return bus_voltage / rated_voltage * z_lr / (z_lr + source_impedance)


def breakdown_slip(rated_slip: float, breakdown_torque: float) -> float:
    """Breakdown slip from the rated point by Kloss's equation, s_b = s_r·(T_b + √(T_b² − 1)) [pu].

    Notes
    -----
    Kloss: T/T_b = 2 / (s/s_b + s_b/s); at rated slip T = 1 pu, solved for s_b (the root above s_r).

    Examples
    --------
    >>> round(breakdown_slip(0.01, 2.0), 5)
    0.03732
    """
    return rated_slip * (breakdown_torque + math.sqrt(breakdown_torque ** 2 - 1.0))


def kloss_torque(slip, breakdown_torque: float, breakdown_slip_: float):
    """Kloss's equation, T = 2·T_b / (s/s_b + s_b/s) [pu of rated torque] (0 at s = 0).

    Examples
    --------
    >>> round(float(kloss_torque(0.01, 2.0, breakdown_slip(0.01, 2.0))), 6)   # the rated point
    1.0
    """
    s = np.maximum(np.asarray(slip, dtype=float), 1e-12)
    return 2.0 * breakdown_torque / (s / breakdown_slip_ + breakdown_slip_ / s)


PULL_UP_DIP = 0.08  #: depth of the pull-up dip below T_LR [-] [D], see the module notes
DIP_END = 0.5  #: the dip spans standstill to this fraction of breakdown speed [-] [D]


def motor_torque(speed, locked_rotor_torque: float, breakdown_torque: float, rated_slip: float) -> np.ndarray:
    """Motor torque against speed at rated voltage [pu of rated torque] (model in the module notes).

    Parameters
    ----------
    speed : n, pu of synchronous speed (array)
    locked_rotor_torque, breakdown_torque : T_LR, T_b [pu of rated torque]
    rated_slip : s_r [pu]

    Examples
    --------
    >>> [round(float(t), 3) for t in motor_torque([0.0, 0.25, 0.75, 0.99], 0.8, 2.2, 0.01)]
    [0.8, 0.736, 1.247, 1.0]
    """
    n = np.asarray(speed, dtype=float)
    sb = breakdown_slip(rated_slip, breakdown_torque)
    nb = 1.0 - sb
    x = np.clip(n / nb, 0.0, 1.0)
    dip = locked_rotor_torque * (1.0 - PULL_UP_DIP * np.sin(np.pi * np.minimum(x / DIP_END, 1.0)))
    u = np.clip((x - DIP_END) / (1.0 - DIP_END), 0.0, 1.0)
    rise = locked_rotor_torque + (breakdown_torque - locked_rotor_torque) * u * u
    below = np.where(x < DIP_END, dip, rise)
    return np.where(n < nb, below, kloss_torque(1.0 - n, breakdown_torque, sb))


def load_torque(speed, profile: str, torque_at_rated_speed: float, breakaway_torque: float,
                rated_speed: float) -> np.ndarray:
    """Load torque against speed [pu of motor rated torque].

    Parameters
    ----------
    speed : n, pu of synchronous speed (array)
    profile : "quadratic" (fans, pumps, compressors), "linear", "constant" (conveyors, positive-displacement)
    torque_at_rated_speed : T_r [pu]
    breakaway_torque : T_0, torque to start turning [pu]
    rated_speed : n_r, pu of synchronous speed

    Notes
    -----
    quadratic / linear: T = T_0 + (T_r − T_0)·(n/n_r)^k, k = 2 / 1; constant: T = T_r, and T_0 when larger below
    2 % speed (breakaway). The law T ∝ n² for fans and pumps is the affinity law.

    Examples
    --------
    >>> [round(float(t), 4) for t in load_torque([0.0, 0.5, 0.99], "quadratic", 0.91, 0.1, 0.99)]
    [0.1, 0.3066, 0.91]
    """
    n = np.asarray(speed, dtype=float)
    if profile == "constant":
        return np.where(n < 0.02, max(torque_at_rated_speed, breakaway_torque), torque_at_rated_speed)
    k = {"quadratic": 2.0, "linear": 1.0}[profile]
    return breakaway_torque + (torque_at_rated_speed - breakaway_torque) * (n / rated_speed) ** k


def motor_current(speed, locked_rotor_current: float, rated_slip: float, power_factor: float) -> np.ndarray:
    """Motor current against speed at rated voltage [pu of rated current] (model in the module notes).

    Examples
    --------
    >>> [round(float(i), 3) for i in motor_current([0.0, 0.99], 6.0, 0.01, 0.88)]
    [6.0, 1.0]
    """
    s = np.maximum(1.0 - np.asarray(speed, dtype=float), 1e-9)
    i0 = math.sqrt(max(1.0 - power_factor ** 2, 0.0))
    c = (1.0 - i0 * i0) / (locked_rotor_current ** 2 - i0 * i0)
    a2 = (1.0 - c) / (c / rated_slip ** 2 - 1.0)
    f = (1.0 + a2) / (a2 / (s * s) + 1.0)
    # the fit needs c < s_r² < 1 (true of real motors); outside it keep the current between no-load and locked rotor
    f = np.clip(np.nan_to_num(f, nan=1.0, posinf=1.0, neginf=0.0), 0.0, 1.0)
    return np.sqrt(i0 * i0 + (locked_rotor_current ** 2 - i0 * i0) * f)


def acceleration_times(speed, accelerating_torque, inertia: float, synchronous_speed: float,
                       rated_torque: float) -> np.ndarray:
    """Time to reach each speed of a grid from its first point, t = ∫ J·ω_s dn / (T_rated·T_acc) [s].

    Parameters
    ----------
    speed : n grid, pu of synchronous speed, increasing
    accelerating_torque : T_acc on the grid, pu of rated torque, > 0
    inertia : J, total of motor and load [kg·m²]
    synchronous_speed : ω_s [rad/s]
    rated_torque : T_rated [N·m]

    Notes
    -----
    J·dω/dt = T_acc ⇒ dt = J·dω / T_acc (trapezoidal rule on the grid).

    References
    ----------
    Newton's law for rotation; METHODS.md §3.3.

    Examples
    --------
    >>> n = np.linspace(0.0, 0.5, 11)
    >>> round(float(acceleration_times(n, np.ones(11), 10.0, 100.0, 100.0)[-1]), 6)   # J·Δω / T = 10·50/100
    5.0
    """
    n = np.asarray(speed, dtype=float)
    inv = 1.0 / np.asarray(accelerating_torque, dtype=float)
    steps = 0.5 * (inv[1:] + inv[:-1]) * np.diff(n)
    out = np.empty(n.size)
    out[0] = 0.0
    np.cumsum(steps, out=out[1:])
    return out * inertia * synchronous_speed / rated_torque


def acceleration_time_wk2(wk2: float, speed_change_rpm: float, accelerating_torque_lbft: float) -> float:
    """Acceleration time in US units, t = WK² · ΔN / (308 · T_acc) [s].

    Parameters
    ----------
    wk2 : inertia [lb·ft²]; speed_change_rpm : ΔN [rpm]; accelerating_torque_lbft : mean T_acc [lb·ft]

    References
    ----------
    Standard mechanics (308 ≈ 60·g/2π = 307.2 rounded); METHODS.md §3.3, 3.4.

    Examples
    --------
    >>> round(acceleration_time_wk2(1000.0, 1780.0, 500.0), 2)   # METHODS.md §3.4: 11.56 s
    11.56
    """
    return wk2 * speed_change_rpm / (308.0 * accelerating_torque_lbft)


def first_crossing(speed: np.ndarray, accelerating_torque: np.ndarray) -> float | None:
    """The lowest speed at which the accelerating torque reaches zero (linear between grid points), or None."""
    bad = np.nonzero(accelerating_torque <= 0.0)[0]
    if bad.size == 0:
        return None
    j = int(bad[0])
    if j == 0:
        return float(speed[0])
    t0, t1 = accelerating_torque[j - 1], accelerating_torque[j]
    return float(speed[j - 1] + (speed[j] - speed[j - 1]) * t0 / (t0 - t1))


# ---------------------------------------------------------------------------------------------------- the study


@dataclass(frozen=True)
class StartStudy:
    """One start at one terminal voltage.

    ``times`` [s], ``speeds`` [pu of synchronous] and ``currents`` [A] run from standstill to the end of the start
    (or to the stall speed when the motor does not accelerate).
    """

    voltage: float  #: terminal voltage during the start [pu of rated voltage]
    accelerates: bool
    acceleration_time: float  #: standstill to end of start [s] (inf when it does not accelerate)
    stall_speed: float | None  #: speed where the load torque meets the motor torque [pu], None when it runs
    running_speed: float | None  #: equilibrium speed at this voltage [pu of synchronous]
    end_speed: float  #: speed at which the start is counted complete [pu]
    breakdown_speed: float  #: [pu]
    times: np.ndarray
    speeds: np.ndarray
    currents: np.ndarray
    running_current: float  #: current after the start at rated voltage [A]

    def time_above(self, current: float) -> float:
        """How long the starting current stays above ``current`` [A] (inf when the motor stalls above it) [s]."""
        above = np.nonzero(self.currents > current)[0]
        if above.size == 0:
            return 0.0
        if not self.accelerates:
            return math.inf
        j = int(above[-1])
        if j + 1 >= self.times.size:
            return float(self.times[-1])
        i0, i1 = self.currents[j], self.currents[j + 1]
        return float(self.times[j] + (self.times[j + 1] - self.times[j]) * (i0 - current) / (i0 - i1))

    def i2t(self) -> float:
        """∫ I² dt over the start [A²·s]."""
        i2 = self.currents ** 2
        return float(np.sum(0.5 * (i2[1:] + i2[:-1]) * np.diff(self.times)))


def study_start(*, voltage: float, locked_rotor_current: float, rated_current: float, locked_rotor_torque: float,
                breakdown_torque: float, rated_slip: float, power_factor: float, inertia: float,
                synchronous_speed: float, rated_torque: float, load_profile: str, load_torque_rated: float,
                load_breakaway: float) -> StartStudy:
    """Simulate a start at a constant terminal ``voltage`` [pu] (all other inputs SI or pu as named).

    >>> s = study_start(voltage=1.0, locked_rotor_current=600.0, rated_current=100.0, locked_rotor_torque=0.8,
    ...                 breakdown_torque=2.2, rated_slip=0.01, power_factor=0.88, inertia=100.0,
    ...                 synchronous_speed=188.5, rated_torque=5000.0, load_profile="quadratic",
    ...                 load_torque_rated=0.9, load_breakaway=0.1)
    >>> s.accelerates, round(s.acceleration_time, 1)
    (True, 5.9)
    """
    v2 = voltage * voltage
    n_rated = 1.0 - rated_slip
    sb = breakdown_slip(rated_slip, breakdown_torque)
    nb = 1.0 - sb
    probe = np.linspace(0.0, 1.0 - 1e-6, GRID_POINTS * 2)
    tm = motor_torque(probe, locked_rotor_torque, breakdown_torque, rated_slip)
    tl = load_torque(probe, load_profile, load_torque_rated, load_breakaway, n_rated)
    crossing = first_crossing(probe, v2 * tm - tl)
    running_full = first_crossing(probe, tm - tl)
    s_run_full = 1.0 - (running_full if running_full is not None else n_rated)
    running_current = float(motor_current(1.0 - s_run_full, locked_rotor_current / rated_current, rated_slip,
                                          power_factor)) * rated_current
    if crossing is None or crossing < nb:
        stall = 0.0 if crossing is None else crossing
        n = np.linspace(0.0, max(stall, 1e-6) * 0.999, GRID_POINTS)
        acc = v2 * motor_torque(n, locked_rotor_torque, breakdown_torque, rated_slip) - \
            load_torque(n, load_profile, load_torque_rated, load_breakaway, n_rated)
        ok = acc > 0.0
        times = np.zeros(n.size) if not ok.all() else acceleration_times(n, acc, inertia, synchronous_speed,
                                                                          rated_torque)
        i = motor_current(n, locked_rotor_current / rated_current, rated_slip, power_factor) * rated_current * voltage
        return StartStudy(voltage, False, math.inf, stall, None, stall, nb, times, n, i, running_current)
    s_eq = 1.0 - crossing
    end = 1.0 - END_SLIP_FACTOR * s_eq
    if end <= nb:
        end = 0.5 * (nb + crossing)
    # a grid denser towards the end, where the current falls fast
    u = np.linspace(0.0, 1.0, GRID_POINTS)
    n = end * (1.0 - (1.0 - u) ** 2) * 0.5 + end * u * 0.5
    acc = v2 * motor_torque(n, locked_rotor_torque, breakdown_torque, rated_slip) - \
        load_torque(n, load_profile, load_torque_rated, load_breakaway, n_rated)
    times = acceleration_times(n, acc, inertia, synchronous_speed, rated_torque)
    i = motor_current(n, locked_rotor_current / rated_current, rated_slip, power_factor) * rated_current * voltage
    return StartStudy(voltage, True, float(times[-1]), None, crossing, end, nb, times, n, i, running_current)
