"""27 undervoltage of a motor.

Rule (METHODS.md §13 [P][M]): 0.75 pu of the motor's rated voltage for 2 s, riding through faults elsewhere and letting
the motor reaccelerate; coordinate with bus transfer. The element must not trip a normal start: when the minimum
starting voltage is near the pickup the pickup drops to 0.05 pu below it (not under 0.65 pu), and where that is not
enough 27 is blocked while the motor starts (``blocked_during_start``).
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, timed_test_point, voltage_setting
from machines.protection.motor_basis import basis_of, chosen, seconds
from machines.record import Check, FunctionSettings, Setting

FID = "27"
PICKUP = 0.75  #: [pu of rated voltage] (METHODS.md §13: 0.70–0.80) [P]
PICKUP_FLOOR = 0.65  #: lowest automatic pickup [pu] [P]
START_MARGIN = 0.05  #: pickup at least this below the minimum starting voltage [pu] [P]
DELAY = 2.0  #: [s] (METHODS.md §13: 1–3 s) [P]


def settings(ctx: StudyContext) -> FunctionSettings:
    m = ctx.case.machine
    b = basis_of(ctx)
    vt = ctx.case.instruments.vt
    vn = m.rated_voltage
    checks: list[Check] = []
    p_pu = PICKUP if b.minimum_voltage - START_MARGIN >= PICKUP else max(PICKUP_FLOOR,
                                                                         b.minimum_voltage - START_MARGIN)
    pickup, p_src = ctx.choose(FID, "pickup_voltage", p_pu * vn, "voltage", "V", "common-practice")
    delay, d_src = ctx.choose(FID, "time_delay", DELAY, "time", "s", "common-practice")
    pu = pickup / vn
    block, b_src = ctx.choose(FID, "blocked_during_start", p_pu > b.minimum_voltage - START_MARGIN, "boolean", "",
                              "common-practice")
    if vt is None:
        checks.append(Check("warn", "No VT (instruments.vt): 27 needs a voltage input; secondary values are not "
                                    "given."))
    t_acc = b.start_min.acceleration_time
    if block:
        checks.append(Check("warn", f"27 ({pu:.2f} pu) is blocked while the motor starts (start-in-progress input), "
                                    f"because the minimum starting voltage {b.minimum_voltage:.3f} pu is close to or "
                                    "below its pickup: wire the relay's start-in-progress logic."))
    elif pu >= b.minimum_voltage:
        status = "fail" if t_acc > delay else "warn"
        checks.append(Check(status, f"The 27 pickup {pu:.2f} pu is at or above the minimum starting voltage "
                                    f"{b.minimum_voltage:.3f} pu: it picks up during every start at that voltage "
                                    f"(start: {seconds(t_acc, 'not bounded')}; delay {delay:g} s). Block 27 while "
                                    "starting or lower the pickup."))
    elif pu > b.minimum_voltage - START_MARGIN:
        checks.append(Check("warn", f"The 27 pickup {pu:.2f} pu is within 0.05 pu of the minimum starting voltage "
                                    f"{b.minimum_voltage:.3f} pu."))
    else:
        checks.append(Check("ok", f"The 27 pickup {pu:.2f} pu is below the minimum starting voltage "
                                  f"{b.minimum_voltage:.3f} pu."))
    if pu < 0.70:
        checks.append(Check("warn", f"The 27 pickup {pu:.2f} pu is below the usual 0.70–0.80 pu: the motor may "
                                    "stall before 27 acts at low voltage; 51LR and 49 then protect it."))
    if delay < 1.0:
        checks.append(Check("warn", f"A 27 delay of {delay:g} s may trip the motor for a fault cleared elsewhere."))
    _jam_check(ctx, checks, delay)
    sec = (lambda v: vt.to_secondary(v)) if vt else (lambda v: v)
    unit_note = "" if vt else " (no VT given: primary volts)"
    tps = [
        timed_test_point("phase-to-phase voltage", sec(1.05 * pickup), "V", None, applied_primary=1.05 * pickup,
                         primary_unit="V", duration=round(delay + 2.0, 1),
                         description=f"three-phase, 1.05 × pickup for {delay + 2:g} s: must not operate" + unit_note),
        timed_test_point("phase-to-phase voltage", sec(0.95 * pickup), "V", delay, applied_primary=0.95 * pickup,
                         primary_unit="V", prefault={"phases": _rated_phases(sec(vn)), "duration": 1.0},
                         description="step from rated to 0.95 × pickup: operates after the delay" + unit_note),
    ]
    s = {"pickup_voltage": voltage_setting(pickup, vt, p_src, "Pickup (line-to-line)", note=f"{pu:.2f} pu"),
         "time_delay": Setting(delay, "s", d_src, label="Delay"),
         "blocked_during_start": Setting(bool(block), "", b_src, label="Blocked while starting")}
    basis = (f"Pickup {pu:.2f} pu for {delay:g} s: rides through faults cleared elsewhere and lets the motor "
             f"reaccelerate; below the minimum starting voltage {b.minimum_voltage:.3f} pu so starts do not trip.")
    return FunctionSettings(FID, "Undervoltage", s, basis,
                            ["IEEE Std C37.96 (motor protection guide) [value from memory]"],
                            checks, tps)


def _rated_phases(v_line: float) -> list[dict]:
    """The balanced phase-to-neutral set of a line-to-line voltage (relay side)."""
    from machines.protection.base import balanced

    return balanced(v_line / math.sqrt(3.0), 30.0)


def _jam_check(ctx: StudyContext, checks: list[Check], delay: float) -> None:
    """27 rides through dips shorter than its delay; the running jam stage must ride through the re-acceleration
    that follows (METHODS.md §3.2)."""
    from machines.protection.locked_rotor import reacceleration_time_above

    jam = chosen(ctx, "51LR")
    if not jam:
        return
    above = reacceleration_time_above(ctx, delay, jam["jam"])
    if not math.isfinite(above):
        checks.append(Check("warn", f"After a dip of {delay:g} s (which 27 rides through) the drive does not "
                                    "re-accelerate at the minimum voltage: the motor stalls and 51LR trips it."))
    elif jam["jam_delay"] <= above:
        checks.append(Check("warn", f"After a dip of {delay:g} s (which 27 rides through) the current stays above the "
                                    f"running jam pickup for {above:.1f} s while the drive re-accelerates, longer "
                                    f"than the jam delay {jam['jam_delay']:g} s: the jam stage trips the ride-through. "
                                    "Lengthen the jam delay or block it during re-acceleration."))
    else:
        checks.append(Check("ok", f"After a dip of {delay:g} s (which 27 rides through) the re-acceleration keeps the "
                                  f"current above the jam pickup for {above:.1f} s, less than the jam delay "
                                  f"{jam['jam_delay']:g} s."))
