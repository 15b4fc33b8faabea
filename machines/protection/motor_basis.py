"""What every motor rule needs: locked-rotor current (range), system fault currents, the start simulations.

:func:`motor_basis` runs once per study (from ``machines.protection.motor.prepare``); the rules read the result from
``ctx.extras["motor"]`` and share their chosen values through ``ctx.extras["chosen"][fid]``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from machines.model import MachineCase, motor_poles, rated_slip, synchronous_speed
from machines.protection.base import StudyContext
from machines.record import Check, Setting
from machines.standards import fault_current as fc
from machines.standards.nema import HP, locked_rotor_current_range
from machines.starting import LB_FT2, StartStudy, breakdown_slip, starting_voltage, study_start

#: the start counts as "normal" down to this voltage when neither the file nor the source gives one [pu]
DEFAULT_MINIMUM_STARTING_VOLTAGE = 0.85  # common practice, no published source


@dataclass(frozen=True)
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
    starting_voltage: float  #: computed from the source [pu]
    minimum_voltage: float  #: minimum starting voltage used by the study [pu]
    source_basis: str
    start_min: StartStudy  #: start at the minimum starting voltage
    start_normal: StartStudy  #: start at the computed starting voltage
    fault_max: float | None  #: maximum three-phase fault current at the bus [A]
    fault_min: float | None  #: minimum three-phase fault current [A]
    x_over_r: float

    def lr_pu(self) -> float:
        return self.lr_current / self.flc


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


def motor_basis(ctx: StudyContext) -> MotorBasis:
    """Compute the motor basis, record the derived values in ``ctx.derived`` and the findings in the checks."""
    case = ctx.case
    m, load, sup = case.machine, case.load, case.supply
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
        v_start = sup.nominal_voltage / m.rated_voltage
        checks.append(Check("warn", "No fault level or source impedance is given: the voltage dip on starting "
                                    "cannot be computed; the study assumes a stiff bus and the 50P sensitivity "
                                    "cannot be checked."))
    else:
        v_start = starting_voltage(sup.nominal_voltage, m.rated_voltage, lr, z_s)
    if sup.minimum_starting_voltage is not None:
        v_min, v_min_source = sup.minimum_starting_voltage, "entered"
        if v_start < v_min:
            checks.append(Check("warn", f"The computed starting voltage {v_start:.3f} pu (from {how}) is below the "
                                        f"minimum starting voltage entered ({v_min:.3f} pu): check the supply data."))
    else:
        v_min, v_min_source = (v_start, "derived") if z_s is not None else (DEFAULT_MINIMUM_STARTING_VOLTAGE,
                                                                             "common-practice")
    common = dict(locked_rotor_current=lr, rated_current=flc, locked_rotor_torque=m.locked_rotor_torque,
                  breakdown_torque=m.breakdown_torque, rated_slip=slip, power_factor=m.power_factor, inertia=j,
                  synchronous_speed=ws, rated_torque=torque, load_profile=load.torque_profile,
                  load_torque_rated=load.torque_at_rated_speed, load_breakaway=load.breakaway_torque)
    start_min = study_start(voltage=v_min, **common)
    start_normal = start_min if abs(v_start - v_min) < 1e-9 else study_start(voltage=v_start, **common)
    basis = MotorBasis(flc, lr, lr_low, lr_high, from_code, open_upper, poles, ws, torque, slip,
                       m.rated_output / HP, j, load.inertia / LB_FT2, v_start, v_min, how, start_min, start_normal,
                       fmax, fmin, sup.x_over_r)
    _record(ctx, basis, v_min_source)
    _start_checks(basis, m, checks)
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
    d["starting_voltage"] = Setting(b.starting_voltage, "pu", "derived", label="Terminal voltage at locked rotor",
                                    note=f"from {b.source_basis}")
    d["minimum_starting_voltage"] = Setting(b.minimum_voltage, "pu", v_min_source, label="Minimum starting voltage")
    acc = b.start_min.acceleration_time
    d["acceleration_time"] = Setting(acc if math.isfinite(acc) else None, "s", "derived",
                                     label="Acceleration time at minimum starting voltage",
                                     note="does not accelerate" if not b.start_min.accelerates else
                                     "Kloss torque curve, J·dω/dt integrated")
    if b.start_normal is not b.start_min:
        a2 = b.start_normal.acceleration_time
        d["acceleration_time_normal"] = Setting(a2 if math.isfinite(a2) else None, "s", "derived",
                                                label="Acceleration time at the computed starting voltage")
    d["total_inertia"] = Setting(b.total_inertia, "kg*m^2", "derived", label="Motor and load inertia")
    d["rated_torque"] = Setting(b.rated_torque, "N*m", "derived", label="Rated torque")
    d["breakdown_slip"] = Setting(breakdown_slip(b.rated_slip, m.breakdown_torque), "pu", "derived",
                                  label="Breakdown slip (Kloss)")
    if b.fault_max:
        d["fault_current_max"] = Setting(b.fault_max, "A", "derived", label="Maximum three-phase fault current")
    if b.fault_min:
        d["fault_current_min"] = Setting(b.fault_min, "A", "derived", label="Minimum three-phase fault current")


def _start_checks(b: MotorBasis, m, checks: list[Check]) -> None:
    s = b.start_min
    if not s.accelerates:
        where = ("at standstill (the motor cannot break the load away)" if s.stall_speed < 0.005 else
                 f"at {s.stall_speed:.1%} of synchronous speed, below breakdown speed")
        checks.append(Check("fail", f"The motor does not accelerate at the minimum starting voltage "
                                    f"{b.minimum_voltage:.3f} pu: load torque meets motor torque {where}. Raise the "
                                    "starting voltage (stronger source), reduce the load during the start or ask "
                                    "the maker for a motor with more torque."))
    elif s.acceleration_time > m.safe_stall_time_hot:
        checks.append(Check("warn", f"The acceleration time at minimum starting voltage ({s.acceleration_time:.1f} s) "
                                    f"exceeds the hot safe stall time ({m.safe_stall_time_hot:.1f} s): the motor "
                                    "needs a zero-speed switch, and the maker must confirm the acceleration "
                                    "thermal-limit curve (IEEE Std 620)."))
    else:
        checks.append(Check("ok", f"The motor accelerates at the minimum starting voltage {b.minimum_voltage:.3f} pu "
                                  f"in {s.acceleration_time:.1f} s (hot safe stall time "
                                  f"{m.safe_stall_time_hot:.1f} s)."))


def chosen(ctx: StudyContext, fid: str) -> dict:
    """The values another rule chose (SI floats by key); empty when that rule has not run or did not apply."""
    return ctx.extras.setdefault("chosen", {}).setdefault(fid, {})


def basis_of(ctx: StudyContext) -> MotorBasis:
    return ctx.extras["motor"]


__all__ = ["MotorBasis", "motor_basis", "chosen", "basis_of"]
