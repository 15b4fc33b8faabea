"""48 start supervision (incomplete sequence): the start current's I²t against the acceleration thermal limit.

Applies when 51LR needs a zero-speed switch: it is the unsupervised backup that still clears a stalled or
over-long start if the speed switch fails. Rule (METHODS.md §3.7) [P]: reference current I_s = the locked-rotor
current at rated voltage; permitted start time t_s such that I_s²·t_s is 1.1 × the rotor heat ∫I²dt of the longest
normal start (minimum or rated voltage, long end) — a normal start must not trip it — and at most 0.9 × the heat the
maker's accelerating thermal limit allows (IEEE Std 620), or without that curve the hot locked-rotor limit, so that a
stall with a failed speed switch is still cleared within it. When a normal start needs more than that, the element
cannot be set and the maker's acceleration thermal limit is the missing datum.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, FunctionSettings, Setting

FID = "48"
START_MARGIN = 1.1  #: the element's I²t ≥ this × the longest start's [-] [P]
LIMIT_SHARE = 0.9  #: the element's I²t ≤ this × the thermal limit's [-] [P]
TEST_FRACTION = 0.8  #: second test current, × I_s [-]


def operate_time(start_current: float, start_time: float, current: float) -> float | None:
    """Operate time of an I²t start supervision at a constant current, t = I_s²·t_s / I² [s].

    >>> round(operate_time(1000.0, 20.0, 800.0), 2)   # 1000² × 20 / 800²
    31.25
    """
    return start_current ** 2 * start_time / current ** 2 if current > 0.0 else None


def settings(ctx: StudyContext) -> FunctionSettings | None:
    if not chosen(ctx, "51LR").get("switch"):
        return None
    b = basis_of(ctx)
    ct = ctx.ct
    checks: list[Check] = []
    accel = b.acceleration_heat_limit("hot")
    stall = b.lr_high ** 2 * b.stall_time(b.lr_high, "hot")
    cap = LIMIT_SHARE * (accel if accel is not None else stall)
    heat = b.start_heat()
    need = START_MARGIN * heat
    i_s0 = b.lr_high
    k0 = need if heat > 0.0 and need <= cap else cap
    i_src = "maker-data" if ctx.case.machine.locked_rotor_current is not None else "standard"
    start_current, c_src = ctx.choose(FID, "start_current", i_s0, "current", "A", i_src, rounding="nearest")
    start_time, t_src = ctx.choose(FID, "start_time", k0 / i_s0 ** 2, "time", "s",
                                   "maker-data" if accel is not None else "common-practice",
                                   rounding="up" if heat > 0.0 and need <= cap else "down")
    k = start_current ** 2 * start_time
    limit_name = ("the maker's accelerating thermal limit" if accel is not None else
                  "the hot locked-rotor limit (no accelerating thermal limit given)")
    if heat <= 0.0:
        checks.append(Check("fail", "The start-supervision time cannot be set against a normal start: the start at "
                                    "the minimum voltage is not bounded (see the start finding)."))
    elif need > cap:
        missing = ("" if accel is not None else " The maker's acceleration thermal limit is needed (IEEE Std 620 "
                   "accelerating curve: [[machine.thermal_limit]] with curve = \"accelerating\").")
        checks.append(Check("fail", f"A normal start needs {heat / (cap / LIMIT_SHARE):.0%} of the rotor heat "
                                    f"{limit_name} allows: no start-supervision setting both lets it through and "
                                    f"protects the motor.{missing}"))
    else:
        if k < heat * (1 + 1e-9):
            checks.append(Check("fail", f"The start supervision ({start_current:.0f} A for {start_time:.1f} s) trips a "
                                        "normal start: its I²t is below the longest start's."))
        elif k < need * (1 - 1e-6):
            checks.append(Check("warn", f"The start supervision's I²t is only {k / heat - 1:.0%} above the longest "
                                        "start's: less than 10 % headroom."))
        if k > cap / LIMIT_SHARE:
            checks.append(Check("fail", f"The start supervision's I²t is above {limit_name}: a stall with a failed "
                                        "speed switch would exceed it."))
        elif k > cap * (1 + 1e-6):
            checks.append(Check("warn", f"The start supervision's I²t leaves less than 10 % margin to {limit_name}."))
        if not any(c.status != "ok" for c in checks):
            checks.append(Check("ok", f"I²t = {start_current:.0f}² A² × {start_time:.1f} s: {k / heat:.2f} × the "
                                      f"longest start's and {k / (cap / LIMIT_SHARE):.0%} of {limit_name}."))
    chosen(ctx, FID).update(start_current=start_current, start_time=start_time)
    s = {"start_current": current_setting(start_current, ct, c_src, "Reference start current I_s",
                                          note="the locked-rotor current at rated voltage"),
         "start_time": Setting(start_time, "s", t_src, label="Permitted start time at I_s (I²t)")}
    tps = []
    for frac in (1.0, TEST_FRACTION):
        i = frac * start_current
        t = operate_time(start_current, start_time, i)
        tps.append(timed_test_point("current", ct.to_secondary(i), "A", t, applied_primary=i, primary_unit="A",
                                    initial_state="start in progress, rotor turning",
                                    duration=round(t * 1.2 + 1.0, 1) if t and t > 60.0 else None,
                                    description=f"{frac:g} × I_s from standstill, speed-switch input open: operates "
                                                "on I²t"))
    basis = (f"Backup of the speed-switch-supervised stall timer: I²t = I_s²·t_s with I_s the locked-rotor current "
             f"{i_s0:.0f} A and t_s = {k0 / i_s0 ** 2:.1f} s, "
             + ("1.1 × the heat of the longest normal start" if heat > 0.0 and need <= cap else
                f"0.9 × {limit_name}") + f", against {limit_name}.")
    return FunctionSettings(FID, "Start supervision (I²t)", s, basis,
                            ["IEEE Std 620 (accelerating thermal limit)",
                             "IEEE Std C37.96 (motor protection guide) [value from memory]"], checks, tps)
