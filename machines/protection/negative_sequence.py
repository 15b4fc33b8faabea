"""46 negative-sequence (unbalanced-load) protection of a generator.

The guide (METHODS.md §6.3): an alarm below the machine's continuous I2 rating; an inverse trip stage t = K_set/I2²
picked up at the continuous rating, with K_set a little below the machine's K so that relay error cannot let the
rotor exceed its I2²t capability, a minimum time that rides through external faults cleared by other protection and
a maximum time for long, light unbalance. The machine's continuous I2 and K are the maker's when the file gives them,
else from the IEEE C50.12/C50.13 or IEC 60034-1 table the study's practice selects.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, current_setting, from_sequence, timed_test_point
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting
from machines.standards.negative_sequence import negative_sequence_trip_time, phase_phase_fault_negative_sequence

FID = "46"
ALARM_FRACTION = 0.7  #: alarm at 70 % of the continuous rating (METHODS.md §6.3: 50–90 %; common practice)
ALARM_DELAY = 10.0  #: [s] common practice, no published source
K_FRACTION = 0.9  #: K_set = 0.9·K (METHODS.md §6.3: 0.8–1.0 × K; common practice)
MINIMUM_TIME = 0.5  #: [s] METHODS.md §6.3: 0.25–1 s (common practice)
MAXIMUM_TIME = 1000.0  #: [s] METHODS.md §6.3: 600–1000 s (common practice)
TEST_MULTIPLES = (2.0, 4.0, 8.0)  #: multiples of the pickup for the timing tests


def relay_trip_time(i2: float, k_set: float, minimum_time: float, maximum_time: float) -> float:
    """Operate time of the inverse stage, K_set/I2² held between the minimum and maximum times [s]."""
    return min(max(negative_sequence_trip_time(i2, k_set), minimum_time), maximum_time)


def settings(ctx: StudyContext) -> FunctionSettings:
    """46: continuous I2 pickup, K setting, alarm, minimum and maximum times, with checks and test points."""
    basis = ctx.extras["generator"]
    m = ctx.case.machine
    ir, ct = basis.rated_current, basis.ct
    cap = basis.unbalance
    cap_src = basis.unbalance_setting_source

    cont, cont_src = ctx.choose(FID, "continuous_i2", cap.continuous, "per_unit", "", cap_src, rounding="down")
    pickup, pick_src = ctx.choose(FID, "pickup_current", cont * ir, "current", "A", cont_src, rounding="down")
    if ctx.case.override(f"{FID}.pickup_current") is not None:
        cont, cont_src = pickup / ir, "override"
    k_set, k_src = ctx.choose(FID, "k_constant", K_FRACTION * cap.k, "time", "s", "common-practice",
                               rounding="down", step_kind="dial")
    alarm, alarm_src = ctx.choose(FID, "alarm_pickup_current", ALARM_FRACTION * pickup, "current", "A",
                                  "common-practice", rounding="down")
    alarm_delay, ad_src = ctx.choose(FID, "alarm_time_delay", ALARM_DELAY, "time", "s", "common-practice")
    tmin, tmin_src = ctx.choose(FID, "minimum_time", MINIMUM_TIME, "time", "s", "common-practice")
    tmax, tmax_src = ctx.choose(FID, "maximum_time", MAXIMUM_TIME, "time", "s", "common-practice")

    checks: list[Check] = []
    if cont <= cap.continuous * (1 + 1e-9):
        checks.append(Check("ok", f"Inverse-stage pickup {cont:.3g} pu is within the machine's continuous I2 "
                                  f"capability {cap.continuous:.3g} pu."))
    else:
        checks.append(Check("fail", f"Inverse-stage pickup {cont:.3g} pu is above the machine's continuous I2 "
                                    f"capability {cap.continuous:.3g} pu: the rotor can overheat without a trip."))
    if k_set <= cap.k * (1 + 1e-9):
        checks.append(Check("ok", f"K setting {k_set:.3g} s is within the machine's I2²t capability "
                                  f"{cap.k:.3g} s."))
    else:
        checks.append(Check("fail", f"K setting {k_set:.3g} s exceeds the machine's I2²t capability {cap.k:.3g} s: "
                                    f"the relay lets the rotor exceed its short-time limit."))
    if not alarm < pickup:
        checks.append(Check("warn", f"Alarm pickup {alarm:.4g} A is not below the trip pickup {pickup:.4g} A: the "
                                    f"alarm gives no warning before the trip stage starts timing."))
    if not 0.0 < tmin < tmax:
        checks.append(Check("fail", f"Minimum time {tmin:.3g} s must be positive and below the maximum time "
                                    f"{tmax:.4g} s."))
        tmin, tmax = min(tmin, tmax), max(tmin, tmax)
    # Terminal phase-to-phase fault (derived check): I2 = E / (X''d + X2), E = 1 pu.
    i2_fault = phase_phase_fault_negative_sequence(1.0, m.xd_subtransient, basis.x2)
    t_fault = relay_trip_time(i2_fault, k_set, max(tmin, 1e-6), tmax)
    t_limit = negative_sequence_trip_time(i2_fault, cap.k)
    x2_note = "" if basis.x2_entered else " (X2 taken as X''d: the file gives no x2)"
    status = "ok" if t_fault <= t_limit else "warn"
    checks.append(Check(status, f"Terminal phase-to-phase fault: I2 = {i2_fault:.3g} pu{x2_note}; 46 trips in "
                                f"{t_fault:.3g} s against the machine's {t_limit:.3g} s."
                                + ("" if status == "ok" else " The minimum time is longer than the machine "
                                                             "tolerates at this current.")))
    if basis.unbalance_source != "maker-data":
        checks.append(Check("warn", f"Machine I2 capability from the standard's table ({cap.reference}): confirm "
                                    f"continuous I2 and K with the maker."))
    if m.rotor == "salient-without-damper":
        checks.append(Check("warn", "Salient-pole rotor without damper (amortisseur) winding: negative-sequence "
                                    "currents heat the pole faces directly; the capability is low and the maker's "
                                    "values should replace the table's."))

    ctx.derived["phase_phase_fault_i2"] = Setting(i2_fault * ir, "A", "derived",
                                                  label="I2 of a terminal phase-to-phase fault",
                                                  note=f"E/(X''d + X2) = {i2_fault:.3g} pu")
    i1 = ct.to_secondary(ir)  # the tests inject rated positive-sequence current plus the I2 under test

    def tp(i2_primary: float, expected, description: str, state: str = "", duration=None):
        return timed_test_point("negative-sequence current", ct.to_secondary(i2_primary), "A", expected,
                                applied_primary=i2_primary, primary_unit="A", initial_state=state,
                                phases=from_sequence(complex(i1), complex(ct.to_secondary(i2_primary))),
                                description=description, duration=duration)

    # with every stage in service the alarm output is watched too: say what it does while the test is held
    alarm_says = (f"the alarm operates after {alarm_delay:g} s" if 0.95 * pickup > alarm
                  else "the alarm does not operate either (below its pickup)")
    tests = [tp(0.95 * pickup, None, "95 % of the inverse-stage pickup with rated I1: must not trip (the start "
                                     f"flag stays off); {alarm_says}", duration=hold_time(alarm_delay)),
             tp(1.1 * alarm, alarm_delay, "110 % of the alarm pickup with rated I1: alarm after its delay")]
    for mult in TEST_MULTIPLES:
        i_a = mult * pickup
        t = relay_trip_time(i_a / ir, k_set, max(tmin, 1e-6), tmax)
        tests.append(tp(i_a, t, f"{mult:g} × pickup ({i_a / ir:.3g} pu) with rated I1: trip, t = K/I2²",
                        "I2²t memory reset"))
    values = {
        "pickup_current": current_setting(pickup, ct, pick_src, "Inverse-stage pickup (I2)",
                                          f"{cont:.3g} pu of rated current"),
        "continuous_i2": Setting(cont, "pu", cont_src, label="Continuous I2 setting", note=cap.reference),
        "k_constant": Setting(k_set, "s", k_src, label="K setting (I2²t)",
                              note=f"{K_FRACTION:g} × machine K {cap.k:.3g} s" if k_src != "override" else ""),
        "alarm_pickup_current": current_setting(alarm, ct, alarm_src, "Alarm pickup (I2)"),
        "alarm_time_delay": Setting(alarm_delay, "s", ad_src, label="Alarm delay"),
        "minimum_time": Setting(tmin, "s", tmin_src, label="Minimum trip time"),
        "maximum_time": Setting(tmax, "s", tmax_src, label="Maximum trip time"),
    }
    basis_text = (f"Machine capability {cap.continuous:.3g} pu continuous and K = {cap.k:.3g} s ({cap.reference}). "
                  f"The inverse stage picks up at the continuous rating and trips on t = K_set/I2² with K_set = "
                  f"{K_FRACTION:g} × K to leave margin for measuring error, held between {tmin:.3g} s (rides "
                  f"through external faults cleared by other protection) and {tmax:.4g} s; the alarm at "
                  f"{ALARM_FRACTION:.0%} of the pickup warns of sustained unbalance. Use the relay's thermal "
                  f"(linear or exponential) reset as the maker states.")
    return FunctionSettings(FID, "Negative-sequence (unbalanced load)", values, basis_text,
                            references=["IEEE C50.12", "IEEE C50.13", "IEC 60034-1", "IEEE C37.102"],
                            checks=checks, test_points=tests)
