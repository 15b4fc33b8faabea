"""60 loss-of-potential (VT supervision) of a generator relay.

METHODS.md §9.10 (common practice; IEEE C37.102 calls for loss-of-potential blocking of the voltage-dependent
elements, from memory): a blown VT fuse leaves negative-sequence voltage at the relay without the
negative-sequence current a fault would drive. The element declares loss of potential when V2 exceeds its pickup
while I2 stays below a threshold, blocks at once the elements a wrong voltage would make trip (21, 27, 32, 40, the
arming of 50/27, and 51V, which a lost voltage restrains to its floor) and alarms after a delay.

- V2 pickup: 10 % of V_LN, a third of what one lost phase gives (V/3) and five times a normal system's unbalance.
- I2 threshold: above twice the machine's continuous I2 (unbalance it may carry without a fault), but below half the
  I2 with which a fault outside the machine drives V2 to the pickup at the terminals (V2 = I2·X2).
"""

from __future__ import annotations

from machines.protection.base import StudyContext, balanced, current_setting, phasor, timed_test_point, voltage_setting
from machines.protection.generator_injection import hold_time, one_phase_lost
from machines.record import Check, FunctionSettings, Setting

FID = "60"
V2_PICKUP = 0.10  #: [pu of V_LN] (common practice, no published source)
I2_CONTINUOUS_MULTIPLE = 2.0  #: I2 threshold ≥ 2 × the continuous I2 capability (common practice)
I2_FAULT_SHARE = 0.5  #: I2 threshold ≤ 0.5 × V2 pickup / X2 (derived)
ALARM_DELAY = 5.0  #: [s] (common practice, no published source)
BLOCKS = "21, 27, 32, 40, 50/27 arming, 51V"


def settings(ctx: StudyContext) -> FunctionSettings:
    """60: V2 pickup, I2 threshold, alarm delay and the elements blocked."""
    basis, case = ctx.extras["generator"], ctx.case
    vt, ct, ir = basis.vt, basis.ct, basis.rated_current
    checks: list[Check] = []
    v_ln = basis.phase_voltage
    # rounded down: a lost phase (V/3) clears the pickup by more
    v2, v_src = ctx.choose(FID, "negative_sequence_voltage", V2_PICKUP * v_ln, "voltage", "V", "common-practice",
                           rounding="down")
    cont = basis.unbalance.continuous
    fault_i2 = I2_FAULT_SHARE * (v2 / v_ln) / basis.x2
    target = min(I2_CONTINUOUS_MULTIPLE * cont, fault_i2)
    i2, i_src = ctx.choose(FID, "negative_sequence_current", target * ir, "current", "A", "common-practice")
    delay, d_src = ctx.choose(FID, "alarm_time_delay", ALARM_DELAY, "time", "s", "common-practice")
    blocks, b_src = ctx.choose(FID, "blocks", BLOCKS, "text", "", "common-practice")
    if vt is None:
        checks.append(Check("warn", "No VT (instruments.vt): there is no voltage to supervise; the settings are in "
                                    "primary terms for when a VT is fitted."))
    lost = v_ln / 3.0
    if v2 < lost:
        checks.append(Check("ok", f"One lost VT phase gives V2 = {lost:.4g} V, {lost / v2:.3g} × the pickup "
                                  f"{v2:.4g} V."))
    else:
        checks.append(Check("fail", f"One lost VT phase gives V2 = {lost:.4g} V, not above the pickup {v2:.4g} V: "
                                    f"a blown fuse is not detected."))
    i2_pu = i2 / ir
    if i2_pu > cont * 1.2:
        checks.append(Check("ok", f"The I2 threshold {i2_pu:.3g} pu is above the machine's continuous I2 "
                                  f"{cont:.3g} pu: loss of potential is declared under any load the machine may "
                                  f"carry."))
    else:
        checks.append(Check("warn", f"The I2 threshold {i2_pu:.3g} pu is close to the machine's continuous I2 "
                                    f"{cont:.3g} pu: under heavy unbalance a blown fuse may go undetected."))
    if i2_pu <= fault_i2 * (1 + 1e-9):
        checks.append(Check("ok", f"A fault outside the machine that drives V2 to the pickup carries I2 = "
                                  f"{fault_i2 / I2_FAULT_SHARE:.3g} pu (V2/X2, X2 = {basis.x2:g} pu), above the "
                                  f"threshold: faults are not taken for loss of potential."))
    else:
        checks.append(Check("warn", f"A fault that drives V2 to the pickup carries only {fault_i2 / I2_FAULT_SHARE:.3g}"
                                    f" pu of I2 (X2 = {basis.x2:g} pu), not twice the threshold {i2_pu:.3g} pu: a "
                                    f"fault may be taken for loss of potential and block the backup elements."))
    checks.append(Check("ok", "Wire the VT circuit breaker's auxiliary contact to the relay: losing all three "
                              "phases leaves no negative sequence to detect."))
    values = {
        "negative_sequence_voltage": voltage_setting(v2, vt, v_src, "V2 pickup (phase-to-neutral)",
                                                     f"{v2 / v_ln:.0%} of V_LN"),
        "negative_sequence_current": current_setting(i2, ct, i_src, "I2 threshold (fault, not loss of potential)",
                                                     f"{i2_pu:.3g} pu of rated current"),
        "alarm_time_delay": Setting(delay, "s", d_src, label="Alarm delay (blocking is instantaneous)"),
        "blocks": Setting(blocks, "", b_src, label="Elements blocked on loss of potential"),
    }
    tests = _tests(basis, v2, i2, delay)
    basis_text = (f"Loss of potential when V2 > {v2 / v_ln:.0%} of V_LN with I2 < {i2_pu:.3g} pu: blocks {blocks} at "
                  f"once and alarms after {delay:g} s. The I2 threshold separates a blown VT fuse from a fault: "
                  f"above the unbalance the machine may carry, below the I2 of any fault that gives that V2.")
    return FunctionSettings(FID, "Loss of potential (VT supervision)", values, basis_text,
                            references=["IEEE C37.102 (loss-of-potential blocking, from memory)"], checks=checks,
                            test_points=tests)


def _tests(basis, v2: float, i2: float, delay: float) -> list:
    vt, ct = basis.vt, basis.ct
    to_v = (lambda v: v) if vt is None else vt.to_secondary
    unit = "V" if vt is not None else "V (primary)"
    v_ln = to_v(basis.phase_voltage)
    i_rated = ct.to_secondary(basis.rated_current)
    rated_currents = balanced(i_rated)

    def tp(volts: list[dict], currents: list[dict], v2_applied: float, expected, description: str):
        return timed_test_point("negative-sequence voltage", v2_applied, unit, expected, phases=volts,
                                current_phases=currents, description=description,
                                duration=None if expected else hold_time(delay))

    tests = [tp(one_phase_lost(v_ln), rated_currents, v_ln / 3.0, delay,
                "phase A voltage lost, balanced rated currents: loss-of-potential alarm (blocking at once)")]
    # phase A to earth fault: V_A collapses and I_A rises so that I2 = 2 × the threshold
    extra = 3.0 * 2.0 * ct.to_secondary(i2)
    fault = [phasor(i_rated + extra, 0.0), *rated_currents[1:]]
    tests.append(tp(one_phase_lost(v_ln), fault, v_ln / 3.0, None,
                    "phase A voltage lost with I2 at twice the threshold (a fault): must not declare"))
    dip = 3.0 * 0.8 * to_v(v2)  # V2 = dip/3 = 80 % of the pickup
    volts = balanced(v_ln)
    volts[0] = phasor(v_ln - dip, 0.0)
    tests.append(tp(volts, rated_currents, dip / 3.0, None,
                    "phase A voltage reduced so that V2 is 80 % of the pickup: must not declare"))
    return tests
