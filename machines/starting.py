"""Motor starting: locked-rotor current, voltage at the terminals, torque– and current–speed curves, the start.

Three layers, as elsewhere: plain float/array functions (one per equation), a :class:`MotorCurve` (torque and
current against speed at rated voltage) with a :class:`StartStudy` holding one simulated start, and
:func:`study_start`, which integrates a start on a curve at one voltage.

Models used (and stated on the sheet):

- **Terminal voltage during the start**: the motor at standstill is a constant impedance Z_LR = V_n/(√3·I_LR);
  with the source impedance Z_s the terminal voltage is V = V_bus·Z_LR/(Z_LR + Z_s), the two magnitudes added
  arithmetically because their angles are unknown (conservative: it gives the lower voltage).
- **Torque–speed curve**: the maker's curve where the file gives it (:func:`maker_curve`, linear between its
  points, joined to the rated point and to zero torque at synchronous speed), else the double-cage equivalent
  circuit of :mod:`machines.standards.equivalent_circuit` fitted to the data sheet — rated slip, power factor and
  efficiency, locked-rotor current and torque, breakdown torque and, for the long end of the range, a pull-up
  torque (:func:`model_curve`, METHODS.md §3.6). Where the circuit cannot be fitted to the data sheet the sibling
  model of :mod:`machines.standards.double_cage` (two cages by Kloss's equation) stands in, and says so.
- **Current–speed curve**: the maker's where given; with the circuit its own stator current |I1(s)|; else (the
  maker's torques without currents, or the sibling model) I² = I_0² + (I_LR² − I_0²)·(1 + a²)/((a/s)² + 1), a
  magnetising current I_0 = sin φ_rated plus one rotor branch R/s + jX whose ratio a = R/X puts the curve through
  I_LR at standstill and rated current at rated slip (the approximate equivalent circuit with one rotor branch)
  [D]. A double-cage rotor's current falls earlier in the start than this one's, so the heat a start puts into
  the motor is, if anything, overstated.
- **Torque ∝ V², current ∝ V** at a given slip; the voltage is held at its starting value (conservative).
- **Acceleration**: J·dω/dt = T_m(ω)·(V/V_n)² − T_L(ω), integrated over speed, t = ∫ J dω / T_acc(ω)
  (trapezoidal rule on a speed grid, numpy). The start "does not accelerate" when T_acc ≤ 0 below the end of the
  start. The start ends at the slip 1.5 × the running slip (the current is then back near load current).
"""

from __future__ import annotations

import math
from dataclasses import replace
from functools import lru_cache

import numpy as np

from machines.frozen import frozen
from machines.standards.double_cage import (  # noqa: F401  (re-exported)
    TwoCage, breakdown_slip, fit_two_cage, kloss_torque, outer_slip_for_pull_up, pull_up_torque,
)
from machines.standards.equivalent_circuit import EQUATIONS, fit_double_cage

#: what the sheet calls the model curve
CIRCUIT_SOURCE = ("double-cage equivalent circuit fitted to the data sheet (stator impedance, magnetising reactance, "
                  "two rotor cages)")
KLOSS_SOURCE = "double-cage curve (two cages by Kloss's equation) fitted to the data sheet's torques and rated slip"
#: the data-sheet equations of the fit, as the sheet names them
DATUM_NAMES = dict(zip(EQUATIONS, ("rated power factor (active current)", "rated power factor (reactive current)",
                                   "rated torque (efficiency)", "locked-rotor current", "locked-rotor torque",
                                   "breakdown torque", "pull-up torque")))

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


def speed_after_dip(dip_time: float, initial_speed: float, inertia: float, synchronous_speed: float,
                    rated_torque: float, profile: str, torque_at_rated_speed: float, breakaway_torque: float,
                    rated_speed: float, steps: int = 200) -> float:
    """Speed the drive coasts down to when the voltage is lost for ``dip_time`` [pu of synchronous speed].

    Notes
    -----
    With no motor torque J·ω_s·dn/dt = −T_L(n)·T_rated, integrated by explicit Euler steps (the load torque falls
    with speed, so the steps overstate the deceleration slightly: the safe side for a ride-through check).

    Examples
    --------
    >>> round(speed_after_dip(1.0, 0.99, 10.0, 100.0, 100.0, "constant", 1.0, 1.0, 0.99), 4)   # J·ω_s/T = 10 s
    0.89
    """
    n = initial_speed
    dt = dip_time / steps
    k = dt * rated_torque / (inertia * synchronous_speed)
    grid = np.linspace(0.0, initial_speed, 401)  # the load torque tabulated once, read by interpolation
    table = load_torque(grid, profile, torque_at_rated_speed, breakaway_torque, rated_speed)
    for _ in range(steps):
        n = max(n - k * float(np.interp(n, grid, table)), 0.0)
    return n


# ---------------------------------------------------------------------------------------------------- the curves


def sorted_distinct(values: np.ndarray) -> np.ndarray:
    """The distinct values in rising order (what ``np.unique`` returns, without its import of ``numpy.ma``)."""
    s = np.sort(np.asarray(values, dtype=float))
    return s[np.concatenate(([True], s[1:] != s[:-1]))] if s.size else s


#: speeds of a tabulated motor curve: even from standstill, denser near synchronous speed [pu]
_CURVE_SPEEDS = sorted_distinct(np.concatenate((np.linspace(0.0, 0.9, 181), 1.0 - np.geomspace(0.1, 1e-4, 220))))


@frozen
class MotorCurve:
    """Torque [pu of rated torque] and current [pu of full-load current] against speed [pu of synchronous], at
    rated voltage, tabulated; ``source`` says where the curve comes from, ``pull_up`` is its least torque from
    standstill to breakdown speed [pu].

    A model curve also carries ``target``, the pull-up torque it was fitted to [pu] (None: none), ``departure``,
    the largest relative departure of the model from the data sheet's own values [-], ``departure_from``, which
    datum that is, and ``fallback``, why the sibling model stands in for the circuit (empty when it does not).
    """

    speeds: np.ndarray
    torques: np.ndarray
    currents: np.ndarray
    source: str
    pull_up: float
    target: float | None = None
    departure: float = 0.0
    departure_from: str = ""
    fallback: str = ""

    def torque(self, speed) -> np.ndarray:
        return np.interp(speed, self.speeds, self.torques)

    def current(self, speed) -> np.ndarray:
        return np.interp(speed, self.speeds, self.currents)

    def with_torques(self, torques: np.ndarray, source: str) -> MotorCurve:
        """The same curve with other torques (the currents kept)."""
        return replace(self, torques=torques, source=source)


def _frozen(*arrays: np.ndarray) -> None:
    for a in arrays:
        a.setflags(write=False)


@lru_cache(maxsize=128)
def model_curve(locked_rotor_torque: float, breakdown_torque: float, rated_slip: float, locked_rotor_current: float,
                power_factor: float, efficiency: float, pull_up: float | None = None) -> MotorCurve:
    """The double-cage equivalent circuit fitted to the data sheet (:func:`fit_double_cage`; METHODS.md §3.6),
    tabulated: its torque and its own stator current against speed; ``pull_up`` [pu] is the pull-up torque to fit
    to (the long end of the range), None for the fit to the data sheet alone (the short end).

    When the fit to the data sheet alone departs from it by more than
    :data:`~machines.standards.equivalent_circuit.ACCEPTED`, the sibling model of
    :mod:`machines.standards.double_cage` (two cages by Kloss's equation, exact at T_LR, the rated point and T_b,
    with the one-branch current model) is used instead and ``fallback`` says why.

    Examples
    --------
    >>> c = model_curve(0.8, 2.2, 12 / 1800, 6.2, 0.89, 0.958)
    >>> round(float(c.torque(0.0)), 3), round(c.pull_up, 3), round(float(c.current(0.0)), 3), c.fallback
    (0.8, 0.8, 6.2, '')
    """
    t_b = max(breakdown_torque, locked_rotor_torque * 1.0001)
    data = (rated_slip, power_factor, efficiency, locked_rotor_current, locked_rotor_torque, t_b)
    free = fit_double_cage(*data)
    n = _CURVE_SPEEDS
    slips = np.maximum(1.0 - n, 1e-9)
    if not free.usable:
        why = (f"the double-cage equivalent circuit departs from the data sheet by {free.worst:.0%} "
               f"({DATUM_NAMES[free.worst_equation]}) at best")
        return _kloss_curve(locked_rotor_torque, t_b, rated_slip, locked_rotor_current, power_factor, pull_up, why)
    fit = free if pull_up is None else fit_double_cage(*data, pull_up)
    torques = fit.torque(slips)
    torques[-1] = 0.0 if n[-1] >= 1.0 else torques[-1]
    # the long end gives up a few per cent of the data sheet (mostly T_LR and I_LR) to reach its pull-up target; its
    # current is taken as the larger of its own and the data-sheet fit's at each speed, so the heat of the longer
    # start is never understated
    currents = fit.current(slips) if fit is free else np.maximum(fit.current(slips), free.current(slips))
    _frozen(torques, currents)
    return MotorCurve(n, torques, currents, CIRCUIT_SOURCE, fit.pull_up, pull_up, fit.worst,
                      DATUM_NAMES[fit.worst_equation])


def _kloss_curve(locked_rotor_torque: float, breakdown_torque: float, rated_slip: float, locked_rotor_current: float,
                 power_factor: float, pull_up: float | None, why: str) -> MotorCurve:
    """The sibling model: two cages by Kloss's equation through T_LR, the rated point and T_b whose pull-up torque is
    nearest ``pull_up`` (T_LR when None: no dip), with the one-branch current model."""
    outer, reached = outer_slip_for_pull_up(rated_slip, locked_rotor_torque, breakdown_torque,
                                            locked_rotor_torque if pull_up is None else pull_up)
    cage = fit_two_cage(rated_slip, locked_rotor_torque, breakdown_torque, outer)
    n = _CURVE_SPEEDS
    torques = cage.torque(np.maximum(1.0 - n, 1e-9))
    torques[-1] = 0.0 if n[-1] >= 1.0 else torques[-1]
    currents = motor_current(n, locked_rotor_current, rated_slip, power_factor)
    _frozen(torques, currents)
    return MotorCurve(n, torques, currents, KLOSS_SOURCE, float(reached), pull_up, 0.0, "", why)


def maker_curve(speed: tuple[float, ...], torque: tuple[float, ...], current: tuple[float, ...],
                locked_rotor_current: float, rated_slip: float, power_factor: float) -> MotorCurve:
    """The maker's curve at rated voltage, linear between its points; past the last point it runs to the rated
    point (1 pu torque and current at rated slip) and on to zero torque and the magnetising current sin φ at
    synchronous speed. Without the maker's currents the one-branch current model is used.

    Examples
    --------
    >>> c = maker_curve((0, 0.5, 0.9), (0.8, 0.7, 2.0), (6.0, 5.5, 4.0), 6.0, 0.01, 0.88)
    >>> [round(float(x), 3) for x in c.torque([0.25, 0.95, 0.99])], round(c.pull_up, 3)
    ([0.75, 1.444, 1.0], 0.7)
    """
    n_r = 1.0 - rated_slip
    sp, tq = list(speed), list(torque)
    cu = list(current) if current else [float(x) for x in motor_current(sp, locked_rotor_current, rated_slip,
                                                                       power_factor)]
    if sp[-1] < n_r:
        sp, tq, cu = sp + [n_r], tq + [1.0], cu + [1.0]
    i0 = math.sqrt(max(1.0 - power_factor ** 2, 0.0))
    sp, tq, cu = sp + [1.0], tq + [0.0], cu + [i0]
    n = sorted_distinct(np.concatenate((_CURVE_SPEEDS, sp)))
    torques = np.interp(n, sp, tq)
    top = int(np.argmax(torques))
    return MotorCurve(n, torques, np.interp(n, sp, cu), "the maker's speed curve", float(torques[:top + 1].min()))


# ---------------------------------------------------------------------------------------------------- the study


@frozen
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


def study_start(*, voltage: float, curve: MotorCurve, rated_current: float, inertia: float,
                synchronous_speed: float, rated_torque: float, rated_slip: float, load_profile: str,
                load_torque_rated: float, load_breakaway: float, initial_speed: float = 0.0) -> StartStudy:
    """Simulate a start on ``curve`` at a constant terminal ``voltage`` [pu], from ``initial_speed`` [pu] (0 for
    a start from standstill, above 0 for a re-acceleration); other inputs SI or pu as named.

    >>> c = model_curve(0.8, 2.2, 0.01, 6.0, 0.88, 0.95)
    >>> s = study_start(voltage=1.0, curve=c, rated_current=100.0, inertia=100.0, synchronous_speed=188.5,
    ...                 rated_torque=5000.0, rated_slip=0.01, load_profile="quadratic", load_torque_rated=0.9,
    ...                 load_breakaway=0.1)
    >>> s.accelerates, round(s.acceleration_time, 1)
    (True, 3.6)
    """
    v2 = voltage * voltage
    n_rated = 1.0 - rated_slip
    probe = curve.speeds[curve.speeds < 1.0]
    tl_probe = load_torque(probe, load_profile, load_torque_rated, load_breakaway, n_rated)
    running_full = first_crossing(probe, curve.torque(probe) - tl_probe)
    s_run_full = max(1.0 - (running_full if running_full is not None else float(probe[-1])), 1e-6)
    running_current = float(curve.current(1.0 - s_run_full)) * rated_current
    above = probe >= initial_speed
    crossing = first_crossing(probe[above], v2 * curve.torque(probe[above]) - tl_probe[above])
    if crossing is None:  # no load torque to meet: it runs up to (nearly) synchronous speed
        crossing = float(probe[-1])
    nb = float(curve.speeds[int(np.argmax(curve.torques))])
    if crossing is not None and crossing > nb:
        s_eq = 1.0 - crossing
        end = max(1.0 - END_SLIP_FACTOR * s_eq, 0.5 * (nb + crossing))
        # a grid denser towards the end, where the current falls fast
        u = np.linspace(0.0, 1.0, GRID_POINTS)
        n = initial_speed + (end - initial_speed) * ((1.0 - (1.0 - u) ** 2) * 0.5 + u * 0.5)
        acc = v2 * curve.torque(n) - load_torque(n, load_profile, load_torque_rated, load_breakaway, n_rated)
        if np.all(acc > 0.0):
            times = acceleration_times(n, acc, inertia, synchronous_speed, rated_torque)
            i = curve.current(n) * rated_current * voltage
            return StartStudy(voltage, True, float(times[-1]), None, crossing, end, nb, times, n, i, running_current)
        crossing = first_crossing(n, acc)
    stall = initial_speed if crossing is None else crossing
    n = np.linspace(initial_speed, max(stall, initial_speed + 1e-6) * 0.999, GRID_POINTS)
    acc = v2 * curve.torque(n) - load_torque(n, load_profile, load_torque_rated, load_breakaway, n_rated)
    times = np.zeros(n.size) if not (acc > 0.0).all() else acceleration_times(n, acc, inertia, synchronous_speed,
                                                                              rated_torque)
    i = curve.current(n) * rated_current * voltage
    return StartStudy(voltage, False, math.inf, stall, None, stall, nb, times, n, i, running_current)
