"""27 undervoltage and 59 overvoltage protection of a generator (two function ids, one module).

Common practice (METHODS.md §13): undervoltage at 0.80 pu with a delay longer than system backup clearing;
overvoltage in two stages, about 1.10 pu for a few seconds and 1.30 pu fast (hydro units after load rejection need
it most). The maker's data govern.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, timed_test_point, voltage_setting
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting

UNDER_PICKUP = 0.80  #: [pu] common practice, no published source
UNDER_DELAY = 3.0  #: [s] common practice, no published source
OVER_PICKUP = 1.10  #: [pu] METHODS.md §13 (common practice)
OVER_DELAY = 3.0  #: [s] METHODS.md §13: "a few seconds" (common practice)
OVER_HIGH = 1.30  #: [pu] METHODS.md §13: 1.3–1.4 pu (common practice)
OVER_HIGH_DELAY = 0.1  #: [s] common practice
NORMAL_BAND = 0.05  #: IEEE C50.13: rated kVA within ±5 % voltage


def _tests(vt, stages: list[tuple[float, float]], index: int, under: bool, name: str, hold: bool = True) -> list:
    """Tests of stage ``index``: 5 % beyond its pickup (the fastest stage crossed operates, every stage enabled)
    and, with ``hold``, 5 % short of it (must not operate)."""
    sec = (lambda v: v) if vt is None else vt.to_secondary
    unit = "V" if vt is not None else "V (primary)"
    pickup = stages[index][0]
    trip, keep = (0.95, 1.05) if under else (1.05, 0.95)

    def operate(v: float) -> float | None:
        times = [t for p, t in stages if (v < p if under else v > p)]
        return min(times) if times else None

    out = [timed_test_point("phase-to-phase voltage", sec(trip * pickup), unit, operate(trip * pickup),
                            applied_primary=trip * pickup, primary_unit="V",
                            description=f"{name}: {trip:.0%} of pickup")]
    if hold:
        v = keep * pickup
        out.append(timed_test_point("phase-to-phase voltage", sec(v), unit, operate(v), applied_primary=v,
                                    primary_unit="V", description=f"{name}: {keep:.0%} of pickup: must not operate",
                                    duration=hold_time(*(t for _, t in stages))))
    return out


def undervoltage(ctx: StudyContext) -> FunctionSettings:
    """27: one definite-time stage."""
    m, vt = ctx.case.machine, ctx.case.instruments.vt
    vr = m.rated_voltage
    # rounded down: the pickup keeps its distance below the normal operating band
    pickup, p_src = ctx.choose("27", "pickup_voltage", UNDER_PICKUP * vr, "voltage", "V", "common-practice",
                               rounding="down")
    delay, d_src = ctx.choose("27", "time_delay", UNDER_DELAY, "time", "s", "common-practice")
    ctx.extras["undervoltage_delay"] = delay  # the 50/27 arming delay must be longer
    checks = []
    if pickup < (1.0 - NORMAL_BAND) * vr:
        checks.append(Check("ok", f"Pickup {pickup / vr:.3g} pu is below the normal operating band (±5 %)."))
    else:
        checks.append(Check("fail", f"Pickup {pickup / vr:.3g} pu is inside the normal operating band "
                                    f"(±5 %, IEEE C50.13; IEC 60034-1 zone A): the element trips a healthy machine."))
    checks.append(Check("ok", "The delay must exceed the clearing time of system faults and the 51V backup; "
                              "block the element while the machine is de-excited or not synchronised, and on loss "
                              "of potential (60)."))
    values = {"pickup_voltage": voltage_setting(pickup, vt, p_src, "Pickup (phase-to-phase)", f"{pickup / vr:.3g} pu"),
              "time_delay": Setting(delay, "s", d_src, label="Time delay")}
    return FunctionSettings("27", "Undervoltage", values,
                            f"Undervoltage at {pickup / vr:.0%} of rated voltage after {delay:g} s: detects sustained "
                            f"low voltage (regulator failure, uncleared faults) while riding through faults that "
                            f"system protection clears.", references=["IEEE C37.102"], checks=checks,
                            test_points=_tests(vt, [(pickup, delay)], 0, True, "27"))


def overvoltage(ctx: StudyContext) -> FunctionSettings:
    """59: a time-delayed stage and a fast high stage."""
    m, vt = ctx.case.machine, ctx.case.instruments.vt
    vr = m.rated_voltage
    # rounded up: the pickups keep their distance above the normal operating band
    pickup, p_src = ctx.choose("59", "pickup_voltage", OVER_PICKUP * vr, "voltage", "V", "common-practice",
                               rounding="up")
    delay, d_src = ctx.choose("59", "time_delay", OVER_DELAY, "time", "s", "common-practice")
    high, h_src = ctx.choose("59", "high_pickup_voltage", OVER_HIGH * vr, "voltage", "V", "common-practice",
                             rounding="up")
    hdelay, hd_src = ctx.choose("59", "high_time_delay", OVER_HIGH_DELAY, "time", "s", "common-practice")
    checks = []
    if pickup > (1.0 + NORMAL_BAND) * vr:
        checks.append(Check("ok", f"Pickup {pickup / vr:.3g} pu is above the normal operating band (±5 %)."))
    else:
        checks.append(Check("fail", f"Pickup {pickup / vr:.3g} pu is inside the normal operating band "
                                    f"(±5 %, IEEE C50.13; IEC 60034-1 zone A): the element trips a healthy machine."))
    if not high > pickup:
        checks.append(Check("fail", f"High stage {high / vr:.3g} pu must be above the time-delayed stage "
                                    f"{pickup / vr:.3g} pu."))
    if m.prime_mover == "hydro":
        checks.append(Check("ok", "Hydro unit: the fast high stage protects against the voltage rise after load "
                                  "rejection while the unit overspeeds."))
    values = {"pickup_voltage": voltage_setting(pickup, vt, p_src, "Pickup (phase-to-phase)", f"{pickup / vr:.3g} pu"),
              "time_delay": Setting(delay, "s", d_src, label="Time delay"),
              "high_pickup_voltage": voltage_setting(high, vt, h_src, "High-stage pickup", f"{high / vr:.3g} pu"),
              "high_time_delay": Setting(hdelay, "s", hd_src, label="High-stage delay")}
    stages = [(pickup, delay), (high, hdelay)]
    tests = _tests(vt, stages, 0, False, "59") + _tests(vt, stages, 1, False, "59 high stage", hold=False)
    unit = ctx.extras["generator"].unit_connected
    return FunctionSettings("59", "Overvoltage", values,
                            f"Overvoltage at {pickup / vr:.0%} for {delay:g} s and {high / vr:.0%} after {hdelay:g} s: "
                            f"protects the insulation{' and the step-up transformer' if unit else ''} against "
                            f"regulator failure and load rejection; the maker's data govern.",
                            references=["IEEE C37.102"], checks=checks, test_points=tests)
