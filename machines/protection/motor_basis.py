"""What every motor rule needs: locked-rotor current (range), system fault currents, the torque curve, the starts,
the thermal limits.

:func:`motor_basis` runs once per study (from ``machines.protection.motor.prepare``); the rules read the result from
``ctx.extras["motor"]``. Rules share values through two dictionaries: :func:`chosen` (the values a rule ended up
with, overrides included: for checks) and :func:`computed` (the values its guide's rule gives, before any override:
for computing other settings, so that an override changes only its own value).

The starting voltage (METHODS.md §3.3): the file's ``supply.minimum_starting_voltage`` when given; else no more
than 0.85 pu (large motors are specified to start at 80–85 % voltage; common practice) or the lower voltage the
minimum fault level gives with the bus at ``supply.voltage_before_start`` before the start.

The torque curve: the maker's (``machine.speed_curve``) when given; else the double-cage equivalent circuit fitted
to the data sheet (:mod:`machines.standards.equivalent_circuit`, METHODS.md §3.6). With the maker's pull-up torque
the circuit is fitted to it as well; without it the acceleration time is a range: the short end from the circuit
fitted to the data sheet alone (its own pull-up torque), the long end from the circuit fitted also to a pull-up
torque of 0.85 × the locked-rotor torque (common practice), and the study is set and checked against the long end.
Where the circuit cannot be fitted, the two-cage Kloss curve (:mod:`machines.standards.double_cage`) stands in
and a warning says so.
"""

from __future__ import annotations

import math
from dataclasses import field

import numpy as np

from machines.frozen import frozen
from machines.model import MachineCase, motor_poles, rated_slip, synchronous_speed
from machines.protection.base import StudyContext
from machines.record import Check, Setting
from machines.standards import fault_current as fc
from machines.standards.nema import HP, locked_rotor_current_range
from machines.standards.thermal_limit import heat_limit, thermal_limit_time
from machines.starting import (
    LB_FT2, MotorCurve, StartStudy, breakdown_slip, load_torque, maker_curve, model_curve, starting_voltage,
    study_start,
)
from machines.standards.equivalent_circuit import CONVERGED

#: the start is studied at no more than this voltage when the file gives no minimum starting voltage [pu]
DEFAULT_MINIMUM_STARTING_VOLTAGE = 0.85  # common practice, no published source
#: without the maker's pull-up torque, the lowest assumed pull-up torque, as a share of the locked-rotor torque [-]
PULL_UP_LOW = 0.85  # common practice, no published source
#: where the data sheet promises a start that the fitted curve does not make, the study takes the motor to have the
#: accelerating-torque margin motors are bought with at their specified starting voltage [pu of rated torque]
PURCHASE_MARGIN = 0.10  # API 541 style purchase requirement, value from memory


@frozen
class MotorBasis:
    """Derived motor quantities in SI (currents [A], times [s], voltages [pu of motor rated voltage])."""

    flc: float
    lr_current: float  #: locked-rotor current used for the start and for reach checks (upper bound) [A]
    lr_low: float  #: lower bound, for sensitivity checks [A]
    lr_high: float  #: upper bound [A]
    lr_from_code: bool
    lr_open_upper: bool  #: code letter V: no upper bound
    poles: int
    sync_speed: float  #: [rad/s]
    rated_torque: float  #: [N·m]
    rated_slip: float  #: [pu]
    horsepower: float
    total_inertia: float  #: [kg·m²]
    load_wk2: float  #: load inertia [lb·ft²]
    starting_voltage: float | None  #: from the minimum fault level with the bus at its pre-start voltage [pu]
    minimum_voltage: float  #: minimum starting voltage used by the study [pu]
    source_basis: str
    curve: MotorCurve  #: the torque curve at the long end of the range
    curve_short: MotorCurve  #: the torque curve at the short end (the same curve when there is no range)
    pull_up_range: tuple[float, float] | None  #: (long end, short end): the curves' pull-up torques [pu]; None: maker's
    start_min: StartStudy  #: start at the minimum starting voltage, long end
    start_min_short: StartStudy  #: the same at the short end of the range
    start_rated: StartStudy  #: start at rated voltage, long end
    fault_max: float | None  #: maximum three-phase fault current at the bus [A]
    fault_min: float | None  #: minimum three-phase fault current [A]
    x_over_r: float
    limits: dict = field(default_factory=dict)  #: IEEE 620 curves by (curve, state): [(voltage, points)]
    safe_stall_hot: float = 0.0  #: maker's hot safe stall time at rated voltage [s]
    safe_stall_cold: float = 0.0
    promised: bool = False  #: the fitted curve stalls but the data sheet promises the start: curve raised to a margin
    pull_up_datum: float | None = None  #: the pull-up torque the long end rests on: the maker's, else assumed [pu]

    def lr_pu(self) -> float:
        return self.lr_current / self.flc

    @property
    def bounded(self) -> bool:
        """The long end of the start is known: the start at minimum voltage accelerates."""
        return self.start_min.accelerates

    def heat_starts(self) -> list[StartStudy]:
        """The simulated starts that accelerate (minimum and rated voltage, long end), for heat checks."""
        return [s for s in (self.start_min, self.start_rated) if s.accelerates]

    def start_heat(self) -> float:
        """The largest rotor heat ∫I²dt of a start, minimum or rated voltage, long end [A²·s] (0 if none)."""
        return max((s.i2t() for s in self.heat_starts()), default=0.0)

    def curve_points(self, curve: str, state: str = "hot") -> list[tuple[float, list[tuple[float, float]]]]:
        """The maker's IEEE 620 curves of a kind and state, as (voltage, points), lowest voltage first."""
        return sorted(self.limits.get((curve, state), []))

    def stall_time(self, current: float, state: str = "hot") -> float:
        """Time the rotor may stay locked at ``current`` [s]: the maker's locked-rotor curve when given, else the
        safe stall time at the locked-rotor current with I²t held constant (adiabatic) [D]."""
        curves = self.curve_points("locked-rotor", state)
        if curves:
            return thermal_limit_time(curves[0][1], current)
        t = self.safe_stall_hot if state == "hot" else self.safe_stall_cold
        return t * (self.lr_high / current) ** 2

    def acceleration_heat_limit(self, state: str = "hot") -> float | None:
        """The rotor heat the maker's accelerating curve allows, its least I²t [A²·s]; None without one."""
        curves = self.curve_points("accelerating", state)
        return min(heat_limit(points) for _, points in curves) if curves else None


def _source(case: MachineCase) -> tuple[float | None, float | None, float | None, str]:
    """(source impedance for the start, max and min three-phase fault current, how they were found).

    The start is studied on the weakest source: the source impedance when given, else the minimum fault level,
    else the fault level.
    """
    s, vn = case.supply, case.supply.nominal_voltage
    fmax = fc.three_phase_fault_current(s.fault_level, vn) if s.fault_level else None
    fmin = fc.three_phase_fault_current(s.minimum_fault_level, vn) if s.minimum_fault_level else None
    if s.source_impedance:
        z = s.source_impedance
        zf = fc.three_phase_fault_current_from_impedance(z, vn)
        fmax = fmax or zf
        fmin = fmin or zf
        return z, fmax, fmin, "the source impedance given"
    if s.minimum_fault_level:
        return fc.source_impedance_from_fault_level(s.minimum_fault_level, vn), fmax, fmin, \
            "the minimum fault level"
    if s.fault_level:
        return fc.source_impedance_from_fault_level(s.fault_level, vn), fmax, fmax, "the fault level"
    return None, None, None, "no source data (stiff bus assumed)"


def _locked_rotor(case: MachineCase, flc: float, checks: list[Check]) -> tuple[float, float, float, bool, bool]:
    m = case.machine
    if m.locked_rotor_current is not None:
        i = m.locked_rotor_current
        return i, i, i, False, False
    lo, hi = locked_rotor_current_range(m.locked_rotor_code, m.rated_output, m.rated_voltage)
    open_upper = not math.isfinite(hi)
    if open_upper:
        hi = lo * 1.12  # one letter step wider, for a value to study with; the check says so
        checks.append(Check("warn", f"Code letter V has no upper bound: the study takes {hi:.0f} A (12 % above "
                                    "the lower bound) for reach checks; enter the maker's locked-rotor current."))
    if lo < 2.0 * flc:
        lo = 2.0 * flc
        checks.append(Check("warn", f"Code letter {m.locked_rotor_code} allows a locked-rotor current below 2 × FLC; "
                                    "sensitivity checks assume 2 × FLC. Enter the maker's locked-rotor current."))
    return hi, lo, hi, True, open_upper


def _minimum_voltage(case: MachineCase, lr: float, z_s: float | None, how: str,
                     checks: list[Check]) -> tuple[float | None, float, str]:
    """(voltage from the source, minimum starting voltage, its source kind)."""
    m, sup = case.machine, case.supply
    v_before = sup.voltage_before_start
    v_calc = None if z_s is None else starting_voltage(v_before * sup.nominal_voltage, m.rated_voltage, lr, z_s)
    if sup.minimum_starting_voltage is not None:
        v_min = sup.minimum_starting_voltage
        if v_calc is not None and v_calc < v_min:
            checks.append(Check("warn", f"The terminal voltage at locked rotor computed from {how} with the bus at "
                                        f"{v_before:.2f} pu before the start is {v_calc:.3f} pu, below the minimum "
                                        f"starting voltage entered ({v_min:.3f} pu): check the supply data."))
        return v_calc, v_min, "entered"
    if v_calc is not None and v_calc < DEFAULT_MINIMUM_STARTING_VOLTAGE:
        v_min, src = v_calc, "derived"
        why = (f"{v_calc:.3f} pu, what {how} gives with the bus at {v_before:.2f} pu before the start (below the "
               f"{DEFAULT_MINIMUM_STARTING_VOLTAGE:.2f} pu large motors are specified to start at)")
    else:
        v_min, src = DEFAULT_MINIMUM_STARTING_VOLTAGE, "common-practice"
        why = (f"{DEFAULT_MINIMUM_STARTING_VOLTAGE:.2f} pu: large motors are specified to start at 80–85 % voltage "
               "(common practice)" + (f"; {how} with the bus at {v_before:.2f} pu gives {v_calc:.3f} pu" if v_calc
                                      is not None else ""))
    checks.append(Check("warn", f"No supply.minimum_starting_voltage is given: the study starts the motor at {why}. "
                                "Enter the voltage the motor is specified to start at."))
    return v_calc, v_min, src


def _curves(case: MachineCase, flc: float, lr: float, slip: float) -> tuple[MotorCurve, MotorCurve,
                                                                           tuple[float, float] | None, float | None]:
    """(long end, short end, their pull-up torques, the pull-up torque the long end rests on)."""
    m = case.machine
    if m.speed_curve is not None:
        c = m.speed_curve
        curve = maker_curve(c.speed, c.torque, c.current, lr / flc, slip, m.power_factor)
        return curve, curve, None, None
    data = (m.locked_rotor_torque, m.breakdown_torque, slip, lr / flc, m.power_factor, m.efficiency)
    if m.pull_up_torque is not None:
        long = model_curve(*data, m.pull_up_torque)
        return long, long, (long.pull_up, long.pull_up), m.pull_up_torque
    short = model_curve(*data)
    assumed = PULL_UP_LOW * m.locked_rotor_torque
    # the data sheet alone may already give a curve that dips to the assumed pull-up torque or below: then it is the
    # long end as well
    long = short if short.pull_up <= assumed * (1.0 + 1e-3) else model_curve(*data, assumed)
    return long, short, (long.pull_up, short.pull_up), assumed


def motor_basis(ctx: StudyContext) -> MotorBasis:
    """Compute the motor basis, record the derived values in ``ctx.derived`` and the findings in the checks."""
    case = ctx.case
    m, load = case.machine, case.load
    checks: list[Check] = ctx.extras.setdefault("checks", [])
    flc = ctx.rated_current
    lr, lr_low, lr_high, from_code, open_upper = _locked_rotor(case, flc, checks)
    poles = motor_poles(m.frequency, m.rated_speed)
    ws = synchronous_speed(m.frequency, poles)
    slip = rated_slip(m.frequency, m.rated_speed)
    torque = m.rated_output / m.rated_speed
    j = m.rotor_inertia + load.inertia
    z_s, fmax, fmin, how = _source(case)
    if z_s is None:
        checks.append(Check("warn", "No fault level or source impedance is given: the voltage dip on starting "
                                    "cannot be computed; the study assumes a stiff bus and the 50P sensitivity "
                                    "cannot be checked."))
    v_calc, v_min, v_src = _minimum_voltage(case, lr, z_s, how, checks)
    curve, curve_short, pu_range, pu_datum = _curves(case, flc, lr, slip)
    common = dict(rated_current=flc, inertia=j, synchronous_speed=ws, rated_torque=torque, rated_slip=slip,
                  load_profile=load.torque_profile, load_torque_rated=load.torque_at_rated_speed,
                  load_breakaway=load.breakaway_torque)
    start_min = study_start(voltage=v_min, curve=curve, **common)
    start_short = start_min if curve_short is curve else study_start(voltage=v_min, curve=curve_short, **common)
    promised = False
    if not start_min.accelerates and pu_datum is not None and _promised(case, curve, pu_datum, slip, v_min):
        promised = True
        curve = _with_margin(curve, case, slip, v_min)
        start_min = study_start(voltage=v_min, curve=curve, **common)
        if not start_short.accelerates:
            curve_short, start_short = curve, start_min
    start_rated = study_start(voltage=1.0, curve=curve, **common)
    limits: dict = {}
    for c in m.thermal_limit:
        limits.setdefault((c.curve, c.state), []).append((c.voltage, list(c.points)))
    basis = MotorBasis(flc, lr, lr_low, lr_high, from_code, open_upper, poles, ws, torque, slip,
                       m.rated_output / HP, j, load.inertia / LB_FT2, v_calc, v_min, how, curve, curve_short,
                       pu_range, start_min, start_short, start_rated, fmax, fmin, case.supply.x_over_r, limits,
                       m.safe_stall_time_hot, m.safe_stall_time_cold, promised, pu_datum)
    _record(ctx, basis, v_src)
    _start_checks(basis, case, checks)
    _heat_checks(basis, checks)
    return basis


def _record(ctx: StudyContext, b: MotorBasis, v_min_source) -> None:
    d = ctx.derived
    m = ctx.case.machine
    note = (f"upper bound of NEMA MG 1 code letter {m.locked_rotor_code}" if b.lr_from_code else "as entered")
    d["rated_current"] = Setting(b.flc, "A", "entered" if m.rated_current else "derived", label="Full-load current")
    d["locked_rotor_current"] = Setting(b.lr_current, "A", "derived", label="Locked-rotor current", note=note)
    if b.lr_from_code:
        d["locked_rotor_current_low"] = Setting(b.lr_low, "A", "derived", label="Locked-rotor current, lower bound",
                                                note=f"NEMA MG 1 10.37.2 code {m.locked_rotor_code}")
        d["locked_rotor_current_high"] = Setting(b.lr_high, "A", "derived",
                                                 label="Locked-rotor current, upper bound",
                                                 note=f"NEMA MG 1 10.37.2 code {m.locked_rotor_code}")
    if b.starting_voltage is not None:
        d["starting_voltage"] = Setting(b.starting_voltage, "pu", "derived", label="Terminal voltage at locked rotor",
                                        note=f"from {b.source_basis}, bus at "
                                             f"{ctx.case.supply.voltage_before_start:.2f} pu before the start")
    d["minimum_starting_voltage"] = Setting(b.minimum_voltage, "pu", v_min_source, label="Minimum starting voltage",
                                            note={"entered": "as entered", "derived": "from the minimum fault level",
                                                  "common-practice": "large motors start at 80–85 % (common "
                                                                     "practice)"}[v_min_source])
    d["torque_curve"] = Setting(b.curve.source, "", "maker-data" if b.pull_up_range is None else "derived",
                                label="Torque–speed curve", note="" if b.pull_up_range is None else
                                "METHODS.md §3.6; the maker's curve (machine.speed_curve) would replace it")
    if b.pull_up_range is not None:
        given = m.pull_up_torque is not None
        d["pull_up_torque"] = Setting(b.curve.pull_up, "pu", "maker-data" if given else "common-practice",
                                      label="Pull-up torque studied (long end)", note=_pull_up_note(b, given))
        if not b.curve.fallback:
            short = b.curve_short
            d["torque_curve_departure"] = Setting(
                b.curve.departure, "pu", "derived", label="Largest departure of the torque curve from the data sheet",
                note=f"{b.curve.departure_from}, long end" + ("" if short is b.curve else
                                                              f"; short end {short.departure:.1%}"
                                                              + (f" ({short.departure_from})"
                                                                 if short.departure >= 0.0005 else "")))
    acc = b.start_min.acceleration_time
    short = b.start_min_short
    span = (f"{short.acceleration_time:.1f} s at a pull-up torque of {b.curve_short.pull_up:.2f} pu to {acc:.1f} s "
            f"at {b.curve.pull_up:.2f} pu (the long end, used)"
            if short is not b.start_min and short.accelerates and b.bounded else "")
    d["acceleration_time"] = Setting(acc if b.bounded else None, "s", "derived",
                                     label="Acceleration time at minimum starting voltage (long end)",
                                     note=span or ("does not accelerate" if not b.bounded else
                                                   "J·dω/dt integrated on the torque curve"))
    a2 = b.start_rated.acceleration_time
    d["acceleration_time_rated"] = Setting(a2 if b.start_rated.accelerates else None, "s", "derived",
                                           label="Acceleration time at rated voltage",
                                           note="" if b.start_rated.accelerates else "does not accelerate")
    d["total_inertia"] = Setting(b.total_inertia, "kg*m^2", "derived", label="Motor and load inertia")
    d["rated_torque"] = Setting(b.rated_torque, "N*m", "derived", label="Rated torque")
    if b.pull_up_range is None:
        d["breakdown_slip"] = Setting(breakdown_slip(b.rated_slip, max(m.breakdown_torque, 1.0 + 1e-6)), "pu",
                                      "derived", label="Breakdown slip (Kloss)")
    else:
        d["breakdown_slip"] = Setting(1.0 - float(b.curve.speeds[int(b.curve.torques.argmax())]), "pu", "derived",
                                      label="Breakdown slip", note="of the torque curve studied (long end)")
    if b.fault_max:
        d["fault_current_max"] = Setting(b.fault_max, "A", "derived", label="Maximum three-phase fault current")
    if b.fault_min:
        d["fault_current_min"] = Setting(b.fault_min, "A", "derived", label="Minimum three-phase fault current")


def _pull_up_note(b: MotorBasis, given: bool) -> str:
    """What the studied pull-up torque rests on: the maker's value or the assumption, and what the curve reaches."""
    c, datum = b.curve, b.pull_up_datum
    if c.fallback:
        reach = f"the two-cage Kloss curve reaches {c.pull_up:.2f} pu"
    elif c.target is None:
        reach = f"the circuit fitted to the data sheet alone already dips to {c.pull_up:.2f} pu"
    else:
        reach = (f"the circuit fitted to it reaches {c.pull_up:.2f} pu, departing from the data sheet by up to "
                 f"{c.departure:.1%} ({c.departure_from})")
    if given:
        return "the maker's" if abs(c.pull_up - datum) < 0.005 else f"the maker's {datum:.2f} pu; {reach}"
    return (f"assumed {datum:.2f} pu ({PULL_UP_LOW:.2f} × T_LR, common practice); {reach}; the short end, fitted to "
            f"the data sheet alone, has {b.curve_short.pull_up:.2f} pu")


def _load(case: MachineCase, speed, slip: float):
    load = case.load
    return load_torque(speed, load.torque_profile, load.torque_at_rated_speed, load.breakaway_torque, 1.0 - slip)


def _promised(case: MachineCase, curve: MotorCurve, pull_up: float, slip: float, v: float) -> bool:
    """Whether the data sheet's own torques, at the voltage ``v``, exceed the load torque at standstill, at the
    fitted curve's pull-up speed (the data sheet's pull-up torque ``pull_up``, the maker's or assumed) and at the
    curve's breakdown speed: the start the data sheet promises."""
    m = case.machine
    v2 = v * v
    n_b = float(curve.speeds[int(curve.torques.argmax())])
    below = curve.speeds <= n_b
    n_pu = float(curve.speeds[below][int(curve.torques[below].argmin())])
    return bool(m.locked_rotor_torque * v2 > _load(case, 0.0, slip) and pull_up * v2 > _load(case, n_pu, slip)
                and m.breakdown_torque * v2 > _load(case, n_b, slip))


def _with_margin(curve: MotorCurve, case: MachineCase, slip: float, v: float) -> MotorCurve:
    """The fitted curve raised, where it falls short, to the load torque plus the purchase margin at voltage ``v``
    (below breakdown speed only)."""
    n_b = float(curve.speeds[int(curve.torques.argmax())])
    floor = (_load(case, curve.speeds, slip) + PURCHASE_MARGIN) / (v * v)
    torques = curve.torques.copy()
    below = curve.speeds <= n_b
    torques[below] = np.maximum(curve.torques[below], floor[below])
    return curve.with_torques(torques, curve.source + f", raised where it stalls to the load torque + "
                                                      f"{PURCHASE_MARGIN:.2f} pu at {v:.2f} pu voltage (the margin the "
                                                      "data sheet's start promise implies)")


def _model_words(b: MotorBasis) -> str:
    """The model curve, as a finding names it."""
    if b.curve.fallback:
        return "the two-cage Kloss curve fitted to the data sheet's torques"
    return "the double-cage equivalent circuit fitted to the data sheet"


def _range_words(b: MotorBasis, m) -> str:
    """What the long end of the range rests on: the pull-up torque it was fitted to and how far the curve departs
    from the data sheet."""
    c = b.curve
    what = (f"the maker's pull-up torque {b.pull_up_datum:.2f} pu" if m.pull_up_torque is not None else
            f"a pull-up torque of {b.pull_up_datum:.2f} pu ({PULL_UP_LOW:.2f} × T_LR, assumed: common practice)")
    if c.fallback:
        return f"the long end fitted also to {what}"
    if c.target is None:
        return f"the circuit fitted to the data sheet alone already dips to {c.pull_up:.2f} pu, below {what}"
    return (f"the long end, fitted also to {what}, reaches {c.pull_up:.2f} pu and departs from the data sheet by up "
            f"to {c.departure:.1%} ({c.departure_from})")


def _start_checks(b: MotorBasis, case: MachineCase, checks: list[Check]) -> None:
    m = case.machine
    s = b.start_min
    v = b.minimum_voltage
    maker = b.pull_up_range is None
    settle = "the maker's torque–speed curve (machine.speed_curve)" + ("" if m.pull_up_torque is not None else
                                                                      " or pull-up torque (machine.pull_up_torque)")
    fallback = b.curve.fallback or b.curve_short.fallback
    if fallback:
        checks.append(Check("warn", f"The torque curve: {fallback}, so the study uses the two-cage Kloss curve fitted "
                                    "to the data sheet's torques and rated slip instead (METHODS.md §3.6). Its pull-up "
                                    "dip lies at high speed, where the load torque is large, so it is likely to "
                                    f"overstate the acceleration time; {settle} would settle it."))
    c = b.curve
    if m.pull_up_torque is not None and not maker and c.pull_up > m.pull_up_torque * (1.0 + CONVERGED):
        gave = f", already giving up {c.departure:.1%} of the data sheet ({c.departure_from})" if not c.fallback else ""
        checks.append(Check("warn", f"The maker's pull-up torque is {m.pull_up_torque:.2f} pu, but "
                                    f"{_model_words(b)}, fitted to it as well, reaches only {c.pull_up:.2f} pu{gave} "
                                    "(METHODS.md §3.6): between standstill and breakdown the studied torque may be "
                                    "higher than the motor's, and the start shorter. The maker's torque–speed curve "
                                    "(machine.speed_curve) would settle it."))
    if s.accelerates and b.promised:
        checks.append(Check("warn", f"At the minimum starting voltage {v:.3f} pu {_model_words(b)} (pull-up torque "
                                    f"{b.curve.pull_up:.2f} pu) would stall, although the "
                                    "data sheet's own torques exceed the load torque at standstill, pull-up and "
                                    "breakdown speed. The study takes the motor to start as a motor bought for this "
                                    f"duty would: with its torque at least {PURCHASE_MARGIN:.2f} pu above the load's "
                                    "(the usual purchase requirement at the specified starting voltage; API 541 style, "
                                    f"value from memory), which gives {s.acceleration_time:.1f} s. The result rests on "
                                    f"that assumption; {settle} would settle it."))
        return
    if s.accelerates:
        short = b.start_min_short
        free = b.curve_short
        rests = "" if maker else (
            f" The curve between the data sheet's points is {_model_words(b)} (METHODS.md §3.6)"
            + (f", which departs from it by up to {free.departure:.1%} ({free.departure_from})"
               if not free.fallback and free.departure > CONVERGED else "")
            + (f"; over the pull-up torque ({_range_words(b, m)}) the start takes {short.acceleration_time:.1f} s "
               f"at {free.pull_up:.2f} pu and {s.acceleration_time:.1f} s at {b.curve.pull_up:.2f} pu, and the study "
               "is set on the long end" if short is not s and short.accelerates else
               f"; {_range_words(b, m)}" if m.pull_up_torque is not None or b.curve is b.curve_short else "")
            + f": the result rests on that assumption, which {settle} would settle.")
        checks.append(Check("ok", f"The motor accelerates at the minimum starting voltage {v:.3f} pu in "
                                  f"{s.acceleration_time:.1f} s (hot safe stall time {m.safe_stall_time_hot:g} s)."
                          + rests))
        return
    where = ("at standstill (the motor cannot break the load away)" if s.stall_speed < 0.005 else
             f"at {s.stall_speed:.0%} of synchronous speed")
    if maker:
        checks.append(Check("fail", f"The motor does not accelerate at the minimum starting voltage {v:.3f} pu on the "
                                    f"maker's torque–speed curve: load torque meets motor torque {where}. Raise the "
                                    "starting voltage (stronger source), reduce the load during the start or ask "
                                    "the maker for a motor with more torque."))
    else:
        checks.append(Check("fail", f"The motor does not accelerate at the minimum starting voltage {v:.3f} pu: load "
                                    f"torque meets motor torque {where}, and the data sheet's own torques (locked "
                                    "rotor, pull-up, breakdown) do not all exceed the load torque at that voltage. "
                                    "Raise the starting voltage (stronger source), reduce the load during the start "
                                    "or ask the maker for a motor with more torque."))


def _heat_checks(b: MotorBasis, checks: list[Check]) -> None:
    """A start that needs more rotor heat than the stall limits allow is a failure unless the maker's
    accelerating thermal limit allows it (IEEE Std 620)."""
    heat = b.start_heat()
    if heat <= 0.0:
        return
    hot = b.lr_high ** 2 * b.stall_time(b.lr_high, "hot")
    cold = b.lr_high ** 2 * b.stall_time(b.lr_high, "cold")
    limit = b.acceleration_heat_limit("hot")
    share_hot, share_cold = heat / hot, heat / cold
    if limit is not None:
        use = heat / limit
        if use > 1.0:
            checks.append(Check("fail", f"The longest start needs {use:.0%} of the rotor heat the maker's accelerating "
                                        "thermal limit allows (IEEE Std 620 curve, from hot): the motor cannot start "
                                        "this load at the minimum voltage within its limit."))
        elif use > 0.9:
            checks.append(Check("warn", f"The longest start uses {use:.0%} of the maker's accelerating thermal limit "
                                        "(from hot): less than 10 % headroom."))
        else:
            checks.append(Check("ok", f"The longest start uses {use:.0%} of the maker's accelerating thermal limit "
                                      "(from hot)."))
        return
    if share_hot > 1.0:
        checks.append(Check("fail", f"One start needs {share_hot:.1f} × the rotor heat of a hot stall "
                                    f"({share_cold:.1f} × a cold stall): beyond the stall limits the data sheet gives, "
                                    "so nothing in the file shows the motor survives a start from hot. The maker's "
                                    "acceleration thermal limit is needed (IEEE Std 620 accelerating curve: "
                                    "[[machine.thermal_limit]] with curve = \"accelerating\")."))
    elif share_hot > 0.9:
        checks.append(Check("warn", f"One start needs {share_hot:.0%} of the rotor heat of a hot stall: less than 10 % "
                                    "headroom; ask the maker for the acceleration thermal limit (IEEE Std 620)."))


def chosen(ctx: StudyContext, fid: str) -> dict:
    """The values another rule chose, overrides included (SI floats by key), for checks; empty when that rule has
    not run or did not apply."""
    return ctx.extras.setdefault("chosen", {}).setdefault(fid, {})


def computed(ctx: StudyContext, fid: str) -> dict:
    """The values another rule's guide gives before any override (SI floats by key), for computing settings: an
    override of one setting then changes no other computed setting."""
    return ctx.extras.setdefault("computed", {}).setdefault(fid, {})


def basis_of(ctx: StudyContext) -> MotorBasis:
    return ctx.extras["motor"]


def seconds(t: float, never: str = "never") -> str:
    """A time for a message: ``"12.3 s"``, or a word when it is not finite (no "inf" on a sheet).

    >>> seconds(12.345), seconds(float("inf"), "does not accelerate")
    ('12.3 s', 'does not accelerate')
    """
    return f"{t:.1f} s" if math.isfinite(t) else never


__all__ = ["MotorBasis", "motor_basis", "chosen", "computed", "basis_of", "seconds"]
