"""37 loss of load (undercurrent), when a minimum normal load is given.

Rule (METHODS.md §13.3) [P]: pickup 80 % of the lowest normal running current, 5 s, armed only after the start is
complete. A motor running unloaded still draws its magnetising current, which the model does not know: the pickup
must stay above the measured no-load current (check at commissioning), else use an underpower element.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, balanced, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, FunctionSettings, Setting

FID = "37"
FRACTION = 0.8  #: pickup / minimum load current [-] [P]
DELAY = 5.0  #: [s] [P]
NO_LOAD_ESTIMATE = 0.25  #: a typical no-load current of an MV motor [× FLC] [value from memory]
NO_LOAD_MARGIN = 1.25  #: pickup at least this × the no-load estimate, the estimate being uncertain [-] [P]


def settings(ctx: StudyContext) -> FunctionSettings | None:
    load = ctx.case.load
    if load is None or load.minimum_load is None:
        return None
    b = basis_of(ctx)
    flc, ct = b.flc, ctx.ct
    checks: list[Check] = []
    i_min = load.minimum_load * flc
    pickup, p_src = ctx.choose(FID, "pickup_current", FRACTION * i_min, "current", "A", "common-practice",
                               rounding="down")
    delay, d_src = ctx.choose(FID, "time_delay", DELAY, "time", "s", "common-practice")
    if pickup >= i_min:
        checks.append(Check("fail", f"The 37 pickup {pickup:.1f} A is not below the minimum normal load current "
                                    f"{i_min:.1f} A: it would trip in normal running."))
    no_load = NO_LOAD_ESTIMATE * flc
    if pickup <= no_load:
        checks.append(Check("warn", f"The 37 pickup {pickup / flc:.0%} of FLC is at or below a typical no-load current "
                                    f"(≈ {NO_LOAD_ESTIMATE:.0%} of FLC, value from memory): a motor that loses its "
                                    "load may never draw less than it. Measure the no-load current at commissioning "
                                    "or use an underpower element."))
    elif pickup < NO_LOAD_MARGIN * no_load:
        checks.append(Check("warn", f"The 37 pickup {pickup / flc:.0%} of FLC is less than {NO_LOAD_MARGIN - 1:.0%} "
                                    f"above a typical no-load current (≈ {NO_LOAD_ESTIMATE:.0%} of FLC, value from "
                                    "memory), too close for an estimate: measure the no-load current at "
                                    "commissioning."))
    else:
        checks.append(Check("ok", f"The 37 pickup {pickup / flc:.0%} of FLC is below the minimum load "
                                  f"{load.minimum_load:.0%} and at least {NO_LOAD_MARGIN - 1:.0%} above a typical "
                                  "no-load current; confirm the no-load current is below it at commissioning."))
    if pickup >= chosen(ctx, "49").get("pickup", 1e18):
        checks.append(Check("fail", "The 37 pickup is above the overload pickup."))
    tps = [
        timed_test_point("current", ct.to_secondary(1.1 * pickup), "A", None, applied_primary=1.1 * pickup,
                         primary_unit="A", initial_state="running, start complete", duration=round(delay + 2.0, 1),
                         description=f"1.1 × pickup for {delay + 2:g} s, start-complete input set: must not operate"),
        timed_test_point("current", ct.to_secondary(0.8 * pickup), "A", delay, applied_primary=0.8 * pickup,
                         primary_unit="A", initial_state="running, start complete",
                         prefault={"phases": balanced(ct.to_secondary(load.minimum_load * flc)), "duration": 1.0},
                         description="step from the minimum load to 0.8 × pickup: operates after the delay"),
    ]
    s = {"pickup_current": current_setting(pickup, ct, p_src, "Undercurrent pickup", note=f"{pickup / flc:.0%} of FLC"),
         "time_delay": Setting(delay, "s", d_src, label="Delay (armed after the start)")}
    basis = (f"Pickup {FRACTION:.0%} of the minimum normal load current {i_min:.1f} A for {delay:g} s, armed after "
             "the start.")
    return FunctionSettings(FID, "Loss of load (undercurrent)", s, basis, ["common practice"], checks, tps)
