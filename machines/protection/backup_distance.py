"""21 backup distance protection of a generator: the alternative to 51V.

METHODS.md §9.12 (IEEE C37.102 system backup, from memory; common practice): a mho element on the generator's
terminal VTs and CTs, looking into the system with its characteristic angle at 85°, delayed beyond the system
protection it backs up. Unlike 51V it does not depend on the fault current being sustained, so it is the backup of
choice where the exciter does not sustain the fault current (a static exciter fed from the terminals) or where the
51V does not see through the step-up transformer.

- Reach: 120 % of the step-up transformer's impedance on a unit-connected machine, so that faults on the HV bus are
  covered; otherwise (bus-connected, or the transformer's impedance not given), the largest reach the load allows.
- Load: the reach along the rated-load angle stays within 67 % (target) and at most 80 % of the load impedance at
  rated output and 0.95 pu voltage.

The element is enabled when the 51V check finds the 51V wanting, and listed but not enabled otherwise.
"""

from __future__ import annotations

import cmath
import math
import re

from machines.errors import InputError
from machines.model import Ratio
from machines.protection.base import StudyContext, timed_test_point
from machines.protection.generator_injection import hold_time, impedance_phasors, power_phasors
from machines.record import Check, FunctionSettings, Setting
from machines.standards.generator_impedance import mho_reach_at_angle

FID = "21"
ANGLE = 85  #: [degrees] characteristic angle (common practice)
TRANSFORMER_REACH = 1.2  #: × the step-up transformer's impedance (IEEE C37.102, value from memory)
LOAD_TARGET = 0.67  #: reach along the load angle, fraction of the load impedance, when set by the load
LOAD_LIMIT = 0.8  #: the most the reach along the load angle may be (common practice, no published source)
LOAD_VOLTAGE = 0.95  #: [pu] the load impedance is taken at rated output and this voltage
DELAY = 1.0  #: [s] beyond the system's zone 2 and breaker failure times (common practice, no published source)
PROBE = 0.05


def _angle(value) -> int:
    """The characteristic angle as written in an override ('85', '85 deg', '85°'), in whole degrees."""
    if isinstance(value, int):
        return value
    m = re.fullmatch(r"\s*(\d{1,2})\s*(?:°|deg|degrees?)?\s*", str(value))
    if m is None or not 45 <= int(m.group(1)) <= 90:
        raise InputError(f"overrides.{FID}.characteristic_angle", f"expected whole degrees from 45 to 90 such as "
                                                                  f"'85 deg', got {value!r}")
    return int(m.group(1))


def load_angle(power_factor: float) -> float:
    """Angle of the rated-load impedance [degrees]."""
    return math.degrees(math.acos(power_factor))


def proposed_reach(basis, power_factor: float) -> tuple[float, str]:
    """The mho diameter the rule proposes [ohm primary] and how it was found."""
    zb = basis.base_impedance
    if basis.unit_connected and basis.x_transformer is not None:
        return (TRANSFORMER_REACH * basis.x_transformer * zb / math.cos(math.radians(90 - ANGLE)),
                f"{TRANSFORMER_REACH:.0%} of the step-up transformer's {basis.x_transformer:.3g} pu")
    theta = load_angle(power_factor)
    return (LOAD_TARGET * LOAD_VOLTAGE ** 2 * zb / math.cos(math.radians(ANGLE - theta)),
            f"the largest the load allows ({LOAD_TARGET:.0%} of the load impedance along the load angle)"
            + ("; the step-up transformer's impedance is not given (supply.transformer_impedance)"
               if basis.unit_connected else "; check it against the feeders it backs up"))


def settings(ctx: StudyContext) -> FunctionSettings:
    """21: reach, characteristic angle and delay; enabled where 51V falls short."""
    basis, m = ctx.extras["generator"], ctx.case.machine
    zb, factor = basis.base_impedance, basis.impedance_factor
    checks: list[Check] = []
    theta = load_angle(m.power_factor)
    z_load = LOAD_VOLTAGE ** 2 * zb
    target, how = proposed_reach(basis, m.power_factor)
    if not (basis.unit_connected and basis.x_transformer is not None):
        if basis.unit_connected:
            checks.append(Check("warn", "The step-up transformer's impedance is not given "
                                        "(supply.transformer_impedance): the reach is set by the load, not to the "
                                        "HV bus."))
    ohms = None if factor is None else Ratio(1.0, factor)
    angle, a_src = ctx.choose(FID, "characteristic_angle", ANGLE, "text", "", "common-practice")
    angle = _angle(angle)
    ctx.steps[(FID, "characteristic_angle")] = 1.0  # whole degrees
    # rounded down: the reach keeps its distance from the load
    reach, r_src = ctx.choose(FID, "reach", target, "impedance", "ohm", "common-practice", via=ohms,
                              rounding="down")
    delay, d_src = ctx.choose(FID, "time_delay", DELAY, "time", "s", "common-practice")
    along_load = mho_reach_at_angle(reach, angle, theta)
    share = along_load / z_load
    text = (f"Reach along the rated-load angle ({theta:.3g}°) is {along_load:.4g} Ω, {share:.0%} of the load "
            f"impedance {z_load:.4g} Ω at rated output and {LOAD_VOLTAGE:g} pu voltage")
    if share <= LOAD_LIMIT:
        checks.append(Check("ok", text + f" (at most {LOAD_LIMIT:.0%})."))
    elif share < 1.0:
        checks.append(Check("warn", text + f": more than {LOAD_LIMIT:.0%}, little margin against heavy load at low "
                                           f"voltage; add load encroachment or shorten the reach."))
    else:
        checks.append(Check("fail", text + ": the load lies inside the element, which would trip the loaded "
                                           "machine after its delay."))
    shortfall = ctx.extras.get("backup_shortfall", [])
    enabled = bool(shortfall)
    if enabled:
        checks.append(Check("ok", "Enabled as the system backup because the 51V is wanting: " + "; ".join(shortfall)
                                  + "."))
    else:
        checks.append(Check("ok", "Listed as the alternative to the 51V, not enabled: enable one of the two."))
    checks.append(Check("ok", f"Coordinate the {delay:g} s delay with the system protection it backs up (line zone 2 "
                              f"and breaker failure); blocked on loss of potential (60)."))
    values = {
        "reach": Setting(reach, "ohm", r_src, secondary=None if factor is None else reach * factor,
                         secondary_unit="" if factor is None else "ohm", label="Mho reach (diameter)", note=how),
        "characteristic_angle": Setting(angle, "deg", a_src, label="Characteristic angle"),
        "time_delay": Setting(delay, "s", d_src, label="Time delay"),
    }
    tests = _tests(basis, reach, angle, delay, theta)
    basis_text = (f"Mho element through the origin, diameter {reach:.4g} Ω primary at {angle}° ({how}), delayed "
                  f"{delay:g} s: system backup that does not rely on a sustained fault current.")
    return FunctionSettings(FID, "Backup distance (alternative to 51V)", values, basis_text,
                            references=["IEEE C37.102 (system backup, from memory)"], checks=checks,
                            test_points=tests, enabled=enabled)


def _tests(basis, reach: float, angle: int, delay: float, theta: float) -> list:
    factor = basis.impedance_factor
    scale = 1.0 if factor is None else factor
    unit = "ohm" if factor is not None else "ohm (primary)"
    tests = []
    for k, expected, what in ((1 - PROBE, delay, "5 % inside the reach: trips"),
                              (1 + PROBE, None, "5 % beyond the reach: must not operate")):
        z = k * reach * scale * cmath.exp(1j * math.radians(angle))
        phases = volts = None
        if factor is not None:
            phases, volts = impedance_phasors(z, basis.rated_secondary_voltage, basis.rated_secondary_current)
        tests.append(timed_test_point(f"impedance at {angle}°", abs(z), unit, expected, phases=phases,
                                      voltage_phases=volts, description=what,
                                      duration=None if expected else hold_time(delay)))
    if factor is not None:
        v = LOAD_VOLTAGE * basis.rated_secondary_voltage
        s_sec = basis.rated_power / basis.ct.factor / basis.vt.factor
        q_sec = s_sec * math.tan(math.radians(theta))
        phases, volts = power_phasors(s_sec, q_sec, v)
        z_load = LOAD_VOLTAGE ** 2 * basis.base_impedance * scale
        tests.append(timed_test_point(f"impedance at {theta:.3g}°", z_load, unit, None, phases=phases,
                                      voltage_phases=volts, description="rated load at 0.95 pu voltage: must not "
                                                                        "operate", duration=hold_time(delay)))
    return tests
