"""51LR locked-rotor / stall protection and the running jam stage.

Rule (METHODS.md §3.2, IEEE C37.96-style guidance [M][P]):
- Pickup above the highest running overload (≥ 2 × FLC and above the 49 pickup) and at most 0.8 × the locked-rotor
  current at the minimum starting voltage (lower bound of the code range, for sensitivity); 2.5 × FLC when the window
  allows.
- Delay longer than the acceleration time at minimum voltage × 1.1 and shorter than the hot safe stall time × 0.9.
  With no such window a zero-speed switch is needed: the switch supervises a short locked-rotor timer and the long
  acceleration is left to the thermal replica (and the maker's acceleration thermal-limit curve, IEEE Std 620).
- Running jam stage, armed once the start is complete: 2 × FLC for 2 s (METHODS.md §3.2: 1.5–2.5 × FLC, 1–5 s [P]).
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, FunctionSettings, Setting

FID = "51LR"
PICKUP_MIN = 2.0  #: lowest pickup [× FLC] (METHODS.md §3.2: ≥ 1.5–2) [P]
PICKUP_TARGET = 2.5  #: preferred pickup [× FLC] [P]
PICKUP_REACH = 0.8  #: pickup ≤ this × I_LR at minimum voltage [-] (METHODS.md §3.2) [P]
ACCEL_MARGIN = 1.1  #: delay ≥ this × acceleration time [-] (METHODS.md §3.2: 1.1–1.2) [P]
STALL_MARGIN = 0.9  #: delay ≤ this × hot safe stall time [-] (METHODS.md §3.2: 0.8–0.9) [P]
SUPERVISED_FRACTION = 0.5  #: speed-switch-supervised delay as a fraction of the hot stall time [-] [P]
SUPERVISED_MIN = 2.0  #: shortest supervised delay, time for the speed switch to open once turning [s] [P]
JAM_PICKUP = 2.0  #: running jam pickup [× FLC] [P]
JAM_DELAY = 2.0  #: running jam delay [s] [P]


def delay_window(acceleration_time: float, hot_stall_time: float) -> tuple[float, float]:
    """(lowest, highest) definite delay of an unsupervised stall element [s].

    Examples
    --------
    >>> [round(x, 3) for x in delay_window(5.411, 10.0)]   # METHODS.md §3.4: 5.952 … 9.000 s
    [5.952, 9.0]
    """
    return ACCEL_MARGIN * acceleration_time, STALL_MARGIN * hot_stall_time


def pickup_ceiling(locked_rotor_current: float, minimum_voltage: float) -> float:
    """Highest pickup that still sees a stall at the minimum voltage, 0.8 × I_LR × V_min [A or pu].

    Examples
    --------
    >>> round(pickup_ceiling(6.276, 0.85), 3)   # METHODS.md §3.4: 4.268 pu
    4.268
    """
    return PICKUP_REACH * locked_rotor_current * minimum_voltage


def _round_up(x: float, step: float = 0.1) -> float:
    return math.ceil(x / step - 1e-9) * step


def settings(ctx: StudyContext) -> FunctionSettings:
    m = ctx.case.machine
    b = basis_of(ctx)
    flc, ct = b.flc, ctx.ct
    p49 = chosen(ctx, "49").get("pickup", 1.15 * flc)
    checks: list[Check] = []
    lo = max(PICKUP_MIN * flc, 1.1 * p49)
    hi = pickup_ceiling(b.lr_low, b.minimum_voltage)
    if lo > hi:
        checks.append(Check("fail", f"No pickup window: the locked-rotor current at minimum voltage "
                                    f"({b.lr_low * b.minimum_voltage:.0f} A) is too close to the overload region; "
                                    f"a stall pickup between {lo:.0f} A and {hi:.0f} A does not exist."))
    pickup, p_src = ctx.choose(FID, "pickup_current", min(max(PICKUP_TARGET * flc, lo), max(hi, lo)), "current",
                               "A", "common-practice")
    if pickup <= p49:
        checks.append(Check("fail", f"The stall pickup {pickup:.0f} A is not above the overload pickup {p49:.0f} A."))
    elif pickup > hi:
        checks.append(Check("fail", f"The stall pickup {pickup:.0f} A is above {hi:.0f} A (0.8 × the lowest "
                                    "locked-rotor current at minimum voltage): a stall at low voltage may not pick "
                                    "it up."))
    else:
        checks.append(Check("ok", f"Stall pickup {pickup / flc:.2f} × FLC lies between the overload region and "
                                  f"0.8 × the locked-rotor current at minimum voltage ({hi:.0f} A)."))

    t_acc = b.start_min.acceleration_time
    t_sh = m.safe_stall_time_hot
    d_lo, d_hi = delay_window(t_acc, t_sh)
    window = math.isfinite(d_lo) and d_lo <= d_hi
    if window:
        delay0, switch0 = min(_round_up(d_lo), d_hi), False
        why = (f"delay {delay0:.1f} s between 1.1 × the acceleration time ({t_acc:.2f} s at "
               f"{b.minimum_voltage:.3f} pu) and 0.9 × the hot safe stall time ({t_sh:g} s)")
    else:
        delay0 = min(max(SUPERVISED_MIN, SUPERVISED_FRACTION * t_sh), STALL_MARGIN * t_sh)
        switch0 = True
        why = (f"no delay window (1.1 × acceleration {d_lo:.1f} s > 0.9 × hot stall {d_hi:.1f} s): a zero-speed "
               f"switch supervises a {delay0:.1f} s locked-rotor timer; the acceleration itself is left to the "
               "thermal replica and the maker's acceleration thermal-limit curve")
    switch, sw_src = ctx.choose(FID, "speed_switch_required", switch0, "boolean", "", "common-practice")
    delay, d_src = ctx.choose(FID, "time_delay", delay0, "time", "s", "common-practice", rounding="up")
    if not b.start_min.accelerates:
        checks.append(Check("warn", "The motor does not accelerate at the minimum starting voltage, so no stall delay "
                                    "can separate a start from a stall; the delay shown is the speed-switch-supervised "
                                    "one."))
    elif not window:
        checks.append(Check("warn", f"The acceleration time at minimum voltage ({t_acc:.1f} s) leaves no delay "
                                    f"window below 0.9 × the hot safe stall time ({d_hi:.1f} s): a zero-speed "
                                    "switch is required, and the maker must confirm the acceleration thermal "
                                    "limit (IEEE Std 620)."))
        if not switch:
            checks.append(Check("fail", "speed_switch_required was set false although no delay window exists: the "
                                        "stall element either trips normal starts or lets a stall exceed the hot "
                                        "safe stall time."))
    if delay >= t_sh:
        checks.append(Check("fail", f"The stall delay {delay:.1f} s is not below the hot safe stall time {t_sh:g} s."))
    elif delay > d_hi + 1e-9:
        checks.append(Check("warn", f"The stall delay {delay:.1f} s leaves less than 10 % margin to the hot safe "
                                    f"stall time {t_sh:g} s."))
    above = b.start_min.time_above(pickup)
    if not switch:
        if above >= delay:
            checks.append(Check("fail", f"The starting current stays above the stall pickup for {above:.1f} s at "
                                        f"minimum voltage, longer than the delay {delay:.1f} s: 51LR would trip a "
                                        "normal start."))
        else:
            checks.append(Check("ok", f"During a start at minimum voltage the current stays above the stall pickup "
                                      f"for {above:.1f} s, less than the delay {delay:.1f} s."))

    jam, j_src = ctx.choose(FID, "jam_pickup_current", max(JAM_PICKUP * flc, 1.1 * p49), "current", "A",
                            "common-practice")
    jam_delay, jd_src = ctx.choose(FID, "jam_time_delay", JAM_DELAY, "time", "s", "common-practice")
    if jam <= p49:
        checks.append(Check("fail", f"The running jam pickup {jam:.0f} A is not above the overload pickup "
                                    f"{p49:.0f} A."))
    if jam_delay >= t_sh:
        checks.append(Check("fail", f"The running jam delay {jam_delay:.1f} s is not below the hot safe stall time."))

    chosen(ctx, FID).update(pickup=pickup, delay=delay, switch=switch, jam=jam, jam_delay=jam_delay)
    s = {
        "pickup_current": current_setting(pickup, ct, p_src, "Stall pickup", note=f"{pickup / flc:.2f} × FLC"),
        "time_delay": Setting(delay, "s", d_src, label="Stall delay (definite time)"),
        "speed_switch_required": Setting(bool(switch), "", sw_src, label="Zero-speed switch required"),
        "jam_pickup_current": current_setting(jam, ct, j_src, "Running jam pickup (armed after the start)",
                                              note=f"{jam / flc:.2f} × FLC"),
        "jam_time_delay": Setting(jam_delay, "s", jd_src, label="Running jam delay"),
        "delay_window_low": Setting(d_lo if math.isfinite(d_lo) else None, "s", "derived",
                                    label="Delay window, lower end (1.1 × acceleration time)"),
        "delay_window_high": Setting(d_hi, "s", "derived", label="Delay window, upper end (0.9 × hot stall time)"),
    }
    i_test = max(2.0 * pickup, b.lr_low * b.minimum_voltage)
    tps = [
        timed_test_point("current", ct.to_secondary(0.95 * pickup), "A", None, applied_primary=0.95 * pickup,
                         primary_unit="A", description="pickup test: 0.95 × pickup must not operate"),
        timed_test_point("current", ct.to_secondary(1.05 * pickup), "A", delay, applied_primary=1.05 * pickup,
                         primary_unit="A", description="pickup test: 1.05 × pickup operates after the delay"
                         + (" (speed-switch input closed)" if switch else "")),
        timed_test_point("current", ct.to_secondary(i_test), "A", delay, applied_primary=i_test, primary_unit="A",
                         description="delay test at the stall current at minimum voltage"),
        timed_test_point("current", ct.to_secondary(1.1 * jam), "A", jam_delay, applied_primary=1.1 * jam,
                         primary_unit="A", description="running jam stage, start-complete input set"),
    ]
    basis = (f"Pickup {pickup / flc:.2f} × FLC: above the overload region, below 0.8 × the locked-rotor current at "
             f"minimum voltage; {why}. Running jam stage {jam / flc:.1f} × FLC for {jam_delay:g} s once the start is "
             "complete.")
    return FunctionSettings(FID, "Locked rotor / stall and running jam", s, basis,
                            ["IEEE Std C37.96 (motor protection guide), stall protection [value from memory]",
                             "IEEE Std 620 (thermal-limit curves)"], checks, tps)
