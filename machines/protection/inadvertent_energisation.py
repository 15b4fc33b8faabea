"""50/27 inadvertent-energisation protection of a generator.

METHODS.md §9.8 (IEEE C37.102, inadvertent energising, scheme from memory): an overcurrent element armed by an
undervoltage element. While the machine stands still or turns slowly its voltage is low; once it has stayed below
the arming voltage longer than the arming delay, any current above the pickup (the breaker closed on a dead
machine by mistake) trips at once. When the voltage comes back the element stays armed for the disarming delay, so
that the energisation itself, which raises the terminal voltage to X2/(X2 + X_e), is still caught.

- Pickup: half the smallest energising current I = E/(X2 + X_e) with the weakest source (the machine at standstill
  is about its negative-sequence reactance); it may be below rated current because the element is armed only
  while the machine is off line.
- Arming voltage 50 % of rated; arming delay longer than any voltage dip of a machine on line that protection
  clears (the undervoltage element's delay and system backup), disarming delay 1 s.
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, balanced, current_setting, timed_test_point, voltage_setting
from machines.protection.generator_findings import pickup_share
from machines.protection.generator_injection import hold_time, zeros
from machines.record import Check, FunctionSettings, Setting
from machines.standards.generator_impedance import energising_current

FID = "50/27"
PICKUP_SHARE = 0.5  #: of the smallest energising current (IEEE C37.102, value from memory)
UNKNOWN_PICKUP = 0.5  #: [pu of rated] when the system is not known (common practice, no published source)
ARMING_VOLTAGE = 0.5  #: [pu] (common practice, no published source)
ARMING_DELAY = 5.0  #: [s] (common practice, no published source)
ARMING_MARGIN = 1.0  #: [s] the arming delay exceeds the undervoltage element's by this much (common practice)
DISARMING_DELAY = 1.0  #: [s] (common practice, no published source)
OPERATE_TIME = 0.05  #: [s] typical instantaneous overcurrent operate time (the maker's data govern)
SQRT3 = math.sqrt(3.0)


def settings(ctx: StudyContext) -> FunctionSettings:
    """50/27: overcurrent pickup, arming voltage and the arming and disarming delays."""
    basis, case = ctx.extras["generator"], ctx.case
    m, vt, ct, ir = case.machine, basis.vt, basis.ct, basis.rated_current
    checks: list[Check] = []
    x_weak = basis.x_external_weak
    if x_weak is None and basis.unit_connected and basis.x_transformer is not None:
        x_weak_note = "the step-up transformer only (the system's fault level is not given: an upper bound)"
        x_weak, known = basis.x_transformer, False
    else:
        x_weak_note, known = "the weakest source (supply.minimum_fault_level, else supply.fault_level)", True
    if x_weak is not None:
        i_en = energising_current(basis.x2, x_weak) * ir
        ctx.derived["energising_current"] = Setting(i_en, "A", "derived", label="Inadvertent energising current",
                                                    note=f"E/(X2 + X_e), X2 = {basis.x2:g} pu, X_e = {x_weak:.3g} pu "
                                                         f"from {x_weak_note}")
        target, t_src = PICKUP_SHARE * i_en, "standard"
        if not known:
            target = min(target, UNKNOWN_PICKUP * ir)
            checks.append(Check("warn", "The system's fault level is not given: the energising current is bounded "
                                        "by the step-up transformer alone, so the pickup is also held at "
                                        f"{UNKNOWN_PICKUP:g} pu of rated current."))
    else:
        i_en, target, t_src = None, UNKNOWN_PICKUP * ir, "common-practice"
        checks.append(Check("warn", "The energising current is not known (supply.fault_level, "
                                    "supply.minimum_fault_level): the pickup is set at "
                                    f"{UNKNOWN_PICKUP:g} pu of rated current; check it is below half the current of an "
                                    "energisation from the weakest source."))
    # rounded down: the pickup stays below half the energising current
    pickup, p_src = ctx.choose(FID, "pickup_current", target, "current", "A", t_src, rounding="down")
    arm_v, av_src = ctx.choose(FID, "arming_voltage", ARMING_VOLTAGE * m.rated_voltage, "voltage", "V",
                               "common-practice")
    uv_delay = ctx.extras.get("undervoltage_delay", 0.0)
    arm_t, at_src = ctx.choose(FID, "arming_time_delay", max(ARMING_DELAY, uv_delay + ARMING_MARGIN), "time", "s",
                               "common-practice", rounding="up")
    dis_t, dt_src = ctx.choose(FID, "disarming_time_delay", DISARMING_DELAY, "time", "s", "common-practice")
    if i_en is not None:
        checks.append(pickup_share(f"Pickup {pickup:.4g} A", pickup / i_en, f"the energising current {i_en:.4g} A",
                                   PICKUP_SHARE, "an inadvertent energisation is not detected"))
    if arm_t > uv_delay:
        checks.append(Check("ok", f"Arming delay {arm_t:g} s is longer than the undervoltage element's {uv_delay:g} s: "
                                  f"a voltage dip on line that protection clears does not arm it."))
    else:
        checks.append(Check("fail", f"Arming delay {arm_t:g} s is not longer than the undervoltage element's "
                                    f"{uv_delay:g} s: a dip on line could arm the element and trip the loaded "
                                    f"machine."))
    if dis_t <= OPERATE_TIME:
        checks.append(Check("fail", f"Disarming delay {dis_t:g} s is not longer than the overcurrent element's "
                                    f"operate time: the energisation itself would disarm it."))
    checks.append(Check("ok", "Block the arming on loss of potential (60): a blown VT fuse would otherwise arm the "
                              "element on a loaded machine. Supply the scheme from a source that survives the "
                              "machine's own trip (breaker failure initiation recommended)."))
    values = {
        "pickup_current": current_setting(pickup, ct, p_src, "Overcurrent pickup",
                                          f"{pickup / ir:.3g} pu of rated" + (f", {pickup / i_en:.0%} of the "
                                                                             f"energising current" if i_en else "")),
        "arming_voltage": voltage_setting(arm_v, vt, av_src, "Arming undervoltage (phase-to-phase)",
                                          f"{arm_v / m.rated_voltage:.0%} of rated"),
        "arming_time_delay": Setting(arm_t, "s", at_src, label="Arming delay (voltage low this long)"),
        "disarming_time_delay": Setting(dis_t, "s", dt_src, label="Disarming delay (after the voltage returns)"),
    }
    tests = _tests(basis, pickup, x_weak, arm_t, dis_t)
    basis_text = (f"Armed once the voltage has been below {arm_v / m.rated_voltage:.0%} for {arm_t:g} s; then a current "
                  f"above {pickup:.4g} A ({pickup / ir:.3g} pu) trips at once, and the element stays armed {dis_t:g} s "
                  f"after the voltage returns, so the energisation itself is caught.")
    return FunctionSettings(FID, "Inadvertent energisation (50/27)", values, basis_text,
                            references=["IEEE C37.102 (inadvertent energising, from memory)"], checks=checks,
                            test_points=tests)


def _tests(basis, pickup: float, x_weak, arm_t: float, dis_t: float) -> list:
    ct, vt = basis.ct, basis.vt
    v_rated = basis.rated_secondary_voltage
    i_test = 2.0 * pickup
    v_en = basis.x2 / (basis.x2 + x_weak) if x_weak is not None else 0.3  # terminal voltage on energisation [pu]
    volts = (lambda pu: None) if v_rated is None else (lambda pu: balanced(pu * v_rated))

    def tp(expected, state: str, prefault: dict, v_pu: float, description: str):
        return timed_test_point("phase current", ct.to_secondary(i_test), "A", expected, applied_primary=i_test,
                                primary_unit="A", initial_state=state, phases=balanced(ct.to_secondary(i_test), -80.0),
                                voltage_phases=volts(v_pu), prefault=prefault, description=description,
                                duration=None if expected else hold_time(dis_t, OPERATE_TIME))

    dead = {"phases": zeros(), "voltage_phases": None if v_rated is None else zeros()}
    running = {"phases": zeros(), "voltage_phases": volts(1.0)}
    return [tp(OPERATE_TIME, "machine dead longer than the arming delay", {**dead, "duration": arm_t + 1.0}, v_en,
               f"voltage first (0 V for {arm_t + 1.0:g} s), then 2 × pickup at {v_en:.0%} voltage: trips"),
            tp(None, "machine dead for half the arming delay", {**dead, "duration": 0.5 * arm_t}, 1.0,
               "voltage first (0 V for half the arming delay), then 2 × pickup at rated voltage: not armed, must "
               "not trip"),
            tp(None, "machine running at rated voltage", {**running, "duration": arm_t + 1.0}, 1.0,
               "rated voltage first, then 2 × pickup at rated voltage: must not trip")]
