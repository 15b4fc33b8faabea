"""51V voltage-restrained overcurrent: system backup for faults the generator feeds.

The guide (METHODS.md §9.4): pickup ≈ 150 % of rated current at rated voltage (IEEE C37.102), reduced in proportion
to the terminal voltage down to 25 % of the setting (linear restraint); inverse-time, graded above the slowest
downstream protection. The check that matters: with the field not forced, a sustained fault is fed with only
E/X_d, so the restrained pickup at the fault's voltage must stay below that current with margin (METHODS.md §9.6
shows a setting that fails it).
"""

from __future__ import annotations

from machines.errors import InputError
from machines.protection.backup_distance import proposed_reach
from machines.protection.base import StudyContext, balanced, current_setting, timed_test_point
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting
from machines.standards.generator_capability import restrained_pickup
from machines.standards.inverse_time import CURVES, curve_constants, inverse_operate_time, time_multiplier_for

FID = "51V"
PICKUP = 1.5  #: [pu of rated current] at rated voltage (METHODS.md §9.4, IEEE C37.102; value from memory)
FLOOR = 0.25  #: restraint floor, fraction of the pickup (METHODS.md §9.4; Gers & Holmes, section from memory)
TARGET_TIME = 1.0  #: [s] at the transient terminal-fault current, fully restrained (common practice)
MARGIN = 2.0  #: sustained fault current ≥ 2 × restrained pickup (METHODS.md §9.4 [derived])
CHECK_VOLTAGE = 0.0  #: [pu] terminal voltage of the fault checked: a terminal fault (restraint at its floor)
MIN_PICKUP = 1.25  #: [pu] below this the element may trip on overload near rated voltage (common practice)
TEST_MULTIPLES = (2.0, 3.0, 5.0)
FAULT_ANGLE = 80.0  #: [degrees] the test currents lag the voltage like a fault current (any angle will do)


def sustained_reach(pickup_pu: float, floor: float, xd: float) -> float:
    """Largest external reactance X_e [pu] for which the sustained current E/(X_d + X_e) still exceeds the
    restrained pickup at the terminal voltage X_e/(X_d + X_e) (E = 1 pu, no field forcing); 0 if none.

    The margin I − pickup falls monotonically with X_e, so bisection finds the crossing.

    >>> round(sustained_reach(1.5, 0.25, 1.8), 4)   # 1/1.5 in the proportional part of the restraint
    0.6667
    """
    def margin(xe: float) -> float:
        return 1.0 / (xd + xe) - restrained_pickup(pickup_pu, xe / (xd + xe), floor)

    if margin(0.0) <= 0.0:
        return 0.0
    lo, hi = 0.0, 10.0
    if margin(hi) > 0.0:
        return hi
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if margin(mid) > 0.0 else (lo, mid)
    return lo


def settings(ctx: StudyContext) -> FunctionSettings:
    """51V: pickup, restraint, curve and time multiplier, with the fault-current decrement check."""
    basis, case = ctx.extras["generator"], ctx.case
    ir, ct = basis.rated_current, basis.ct
    checks: list[Check] = []
    # rounded down: a lower pickup keeps the margin below the sustained fault current
    pickup, p_src = ctx.choose(FID, "pickup_current", PICKUP * ir, "current", "A", "standard", rounding="down")
    floor, f_src = ctx.choose(FID, "restraint_floor", FLOOR, "per_unit", "", "standard")
    if not 0.0 < floor <= 1.0:
        raise InputError("overrides.51V.restraint_floor", f"expected a fraction of the pickup from 0 to 1, got "
                                                          f"{floor:g}")
    curve0 = "IEEE-VI" if case.study.practice == "IEEE" else "IEC-VI"
    curve, c_src = ctx.choose(FID, "curve", curve0, "text", "", "common-practice")
    if curve not in CURVES:
        raise InputError("overrides.51V.curve", f"expected one of {', '.join(CURVES)}, got {curve!r}")
    constants = curve_constants(curve)
    key = "time_dial" if constants.family == "IEEE" else "time_multiplier"
    m_target = basis.transient_fault_current / (floor * pickup)
    tms0 = time_multiplier_for(TARGET_TIME, m_target, curve) if m_target > 1.0 else 1.0
    tms, t_src = ctx.choose(FID, key, tms0, "per_unit", "", "common-practice")
    # a study assumption, not a relay setting: it goes to the derived values
    v_check, _ = ctx.choose(FID, "check_voltage", CHECK_VOLTAGE, "per_unit", "", "common-practice")
    ctx.steps.pop((FID, "check_voltage"), None)
    if not 0.0 <= v_check < 1.0:
        raise InputError("overrides.51V.check_voltage", f"expected a terminal voltage during the fault from 0 to "
                                                        f"below 1 pu, got {v_check:g}")
    ctx.derived["voltage_restrained_check_voltage"] = Setting(
        v_check, "pu", "override" if case.override(f"{FID}.check_voltage") else "common-practice",
        label="51V check: terminal voltage during the fault", note="study assumption, not a relay setting")
    i_sus = basis.sustained_fault_current
    # A fault that leaves V at the terminals is fed through X_d by E = 1 pu: I = (1 − V)/X_d (reactive circuit);
    # at a terminal fault (V = 0) this is E/X_d.
    i_fault = (1.0 - v_check) * i_sus
    p_fault = restrained_pickup(pickup, v_check, floor)
    ratio = i_fault / p_fault
    at = (f"E/X_d = {i_sus:.4g} A ({i_sus / ir:.4g} pu)" if v_check == 0.0 else
          f"(1 − V)·E/X_d = {i_fault:.4g} A (E/X_d = {i_sus:.4g} A at a terminal fault)")
    text = (f"At {v_check:.2g} pu terminal voltage the restrained pickup is {p_fault:.4g} A; the sustained fault "
            f"current without field forcing is {at}, ratio {ratio:.3g}")
    static = basis.excitation == "static"
    inadequate: list[str] = []
    if ratio >= MARGIN and not static:
        checks.append(Check("ok", text + f" ≥ {MARGIN:g}."))
    elif ratio >= MARGIN:
        checks.append(Check("warn", text + f" ≥ {MARGIN:g}, but only while the field is held."))
    elif ratio > 1.0:
        checks.append(Check("warn", text + f", less than the margin {MARGIN:g}: operation for a sustained fault "
                                           f"relies on field forcing or the transient current; confirm the exciter."))
    else:
        checks.append(Check("fail", text + ": the pickup is above the sustained fault current, so the element "
                                           "would not operate for a sustained fault; lower the pickup, use "
                                           "voltage-controlled mode, or show that the exciter forces the field."))
        inadequate.append("the restrained pickup is above the sustained fault current")
    if static:
        reach, how = proposed_reach(basis, case.machine.power_factor)
        checks.append(Check("warn", "Static exciter fed from the generator terminals: during a close-in fault the "
                                    "terminal voltage, and with it the field supply, collapses, so the fault current "
                                    "decays from E/X'd well below E/X_d and the 51V may reset before it times out. "
                                    "Use voltage-controlled overcurrent (pickup below rated current, enabled only "
                                    f"below about 0.8 pu voltage) or the 21 backup set in this study (mho reach "
                                    f"{reach:.4g} Ω primary, {how}), unless the maker shows the exciter sustains "
                                    f"the fault current (field forcing from a separate or compounded supply)."))
        inadequate.append("the static exciter does not sustain the fault current")
    elif basis.excitation is None:
        checks.append(Check("warn", "The exciter is not known (machine.excitation): with a static exciter fed from "
                                    "the terminals the sustained current decays below E/X_d and this element may not "
                                    "operate; the 21 backup is the alternative."))
    reach = sustained_reach(pickup / ir, floor, ctx.case.machine.xd)
    inadequate += _reach_check(basis, reach, checks)
    if pickup < MIN_PICKUP * ir:
        checks.append(Check("warn", f"Pickup {pickup / ir:.3g} pu at rated voltage is below {MIN_PICKUP:g} pu: the "
                                    f"element may trip on overload at near-rated voltage."))
    if ratio > 1.0:
        t_sus = inverse_operate_time(ratio, curve, tms)
        checks.append(Check("ok" if t_sus < 30.0 else "warn",
                            f"Operate time at that sustained fault current: {t_sus:.3g} s."))
    checks.append(Check("ok", "Coordinate the operate time with the slowest downstream backup protection (grading "
                              "margin 0.2–0.4 s); the time multiplier here gives "
                              f"{TARGET_TIME:g} s at the transient terminal-fault current."))
    ctx.extras["backup_shortfall"] = inadequate
    values = {
        "pickup_current": current_setting(pickup, ct, p_src, "Pickup at rated voltage",
                                          f"{pickup / ir:.3g} pu of rated current"),
        "curve": Setting(curve, "", c_src, label="Curve", note=constants.name),
        key: Setting(tms, "", t_src, label="Time dial" if key == "time_dial" else "Time multiplier",
                     note=f"{TARGET_TIME:g} s at E/X'd with the restraint at its floor" if t_src != "override"
                     else ""),
        "restraint_floor": Setting(floor, "pu", f_src, label="Restraint floor (fraction of pickup)",
                                   note="pickup × V/V_rated, not below this"),
    }
    tests = _tests(basis, pickup, floor, curve, tms)
    basis_text = (f"Voltage-restrained overcurrent, {pickup / ir:.3g} pu at rated voltage, pickup proportional to "
                  f"voltage down to {floor:.0%} of the setting; {constants.name} with the time multiplier giving "
                  f"{TARGET_TIME:g} s at the transient terminal-fault current. Checked against the sustained fault "
                  f"current E/X_d (no field forcing) with margin {MARGIN:g}. Blocked, or switched to its unrestrained "
                  f"pickup, on loss of potential (60): a lost VT would otherwise restrain it to its floor.")
    return FunctionSettings(FID, "Voltage-restrained overcurrent", values, basis_text,
                            references=["IEEE C37.102", "Gers & Holmes, Protection of Electricity Distribution "
                                        "Networks (linear restraint; section number from memory)", "IEEE C37.112",
                                        "IEC 60255-151"],
                            checks=checks, test_points=tests)


#: step-up transformer reactances usually met, pu on their own rating (common practice, no published source)
TYPICAL_TRANSFORMER = (0.08, 0.15)


def _reach_check(basis, reach: float, checks: list[Check]) -> list[str]:
    """How far behind the terminals a three-phase fault still drives a sustained current above the restrained
    pickup, against the step-up transformer; the shortfalls (for the 21)."""
    if reach <= 0.0:
        return []
    head = (f"Without field forcing the sustained current exceeds the restrained pickup for three-phase faults "
            f"behind up to {reach:.3g} pu of external reactance (machine base)")
    if basis.unit_connected and basis.x_transformer is not None:
        if reach >= basis.x_transformer:
            checks.append(Check("ok", head + f": beyond the step-up transformer ({basis.x_transformer:.3g} pu), so "
                                             f"faults on its HV side are backed up."))
            return []
        checks.append(Check("warn", head + f", less than the step-up transformer's {basis.x_transformer:.3g} pu: "
                                           f"sustained faults on its HV side are not backed up; use the 21."))
        return ["it does not reach through the step-up transformer"]
    if basis.unit_connected:
        lo, hi = TYPICAL_TRANSFORMER
        if reach >= hi:
            checks.append(Check("ok", head + f", beyond a typical step-up transformer ({lo:g}–{hi:g} pu); enter "
                                             f"supply.transformer_impedance to confirm."))
            return []
        checks.append(Check("warn", head + f", not beyond a typical step-up transformer ({lo:g}–{hi:g} pu): "
                                           f"sustained faults on its HV side may not be backed up; enter "
                                           f"supply.transformer_impedance, or use the 21."))
        return ["it may not reach through the step-up transformer"]
    checks.append(Check("ok", head + ": faults further out are not seen once the current has decayed."))
    return []


def _tests(basis, pickup: float, floor: float, curve: str, tms: float) -> list:
    ct = basis.ct
    v_rated = basis.rated_secondary_voltage
    tests = []

    def tp(i_a: float, v_pu: float, description: str):
        volts = None if v_rated is None else balanced(v_pu * v_rated)
        m_eff = i_a / restrained_pickup(pickup, v_pu, floor)
        return timed_test_point("phase current", ct.to_secondary(i_a), "A", inverse_operate_time(m_eff, curve, tms),
                                applied_primary=i_a, primary_unit="A", initial_state=f"{v_pu:.0%} voltage applied",
                                phases=balanced(ct.to_secondary(i_a), -FAULT_ANGLE), voltage_phases=volts,
                                description=description)

    for mult in TEST_MULTIPLES:
        tests.append(tp(mult * pickup, 1.0, f"{mult:g} × pickup at rated voltage"))
    tests.append(tp(2.0 * restrained_pickup(pickup, 0.5, floor), 0.5, "2 × the restrained pickup at 50 % voltage"))
    i_hold = 0.9 * pickup
    tests.append(timed_test_point("phase current", ct.to_secondary(i_hold), "A", None, applied_primary=i_hold,
                                  primary_unit="A", initial_state="100% voltage applied",
                                  phases=balanced(ct.to_secondary(i_hold), -FAULT_ANGLE),
                                  voltage_phases=None if v_rated is None else balanced(v_rated),
                                  description="90 % of pickup at rated voltage: must not operate",
                                  duration=hold_time(inverse_operate_time(1.1, curve, tms))))
    return tests
