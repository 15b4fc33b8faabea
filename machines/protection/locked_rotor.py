"""51LR locked-rotor / stall protection and the running jam stage.

Rule (METHODS.md §3.2, IEEE C37.96-style guidance [M][P]):
- Pickup above the highest running overload (≥ 2 × FLC and above the 49 pickup) and at most 0.8 × the locked-rotor
  current at the minimum starting voltage (lower bound of the code range, for sensitivity); 2.5 × FLC when the window
  allows.
- Delay at least the larger of the acceleration time + 2 s and 1.2 × the acceleration time at the minimum starting
  voltage (long end of the acceleration range), and at most 0.9 × the hot locked-rotor limit at rated voltage (the
  maker's locked-rotor curve, else the hot safe stall time); common practice. With no such window (or no bounded
  start) a zero-speed switch is required: it supervises a short locked-rotor timer, and a start-supervision element
  (48, I²t on the acceleration thermal limit) is the unsupervised backup.
- Running jam stage, armed once the start is complete: 2 × FLC (METHODS.md §3.2: 1.5–2.5 × FLC [P]) with a delay
  that rides through the re-acceleration after a voltage dip 27 rides through (the drive coasts for the 27 delay
  with no voltage, then re-accelerates at the minimum starting voltage): at least the larger of that time above the
  jam pickup + 2 s and 1.2 × it, and no less than 2 s.
An override replaces its own value only: the jam pickup and the stall pickup rest on the computed 49 pickup.
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen, computed, seconds
from machines.record import Check, FunctionSettings, Setting
from machines.starting import speed_after_dip, study_start

FID = "51LR"
PICKUP_MIN = 2.0  #: lowest pickup [× FLC] (METHODS.md §3.2: ≥ 1.5–2) [P]
PICKUP_TARGET = 2.5  #: preferred pickup [× FLC] [P]
PICKUP_REACH = 0.8  #: pickup ≤ this × I_LR at minimum voltage [-] (METHODS.md §3.2) [P]
ACCEL_ADD = 2.0  #: delay ≥ acceleration time + this [s] [P]
ACCEL_FACTOR = 1.2  #: delay ≥ this × acceleration time [-] [P]
STALL_MARGIN = 0.9  #: delay ≤ this × hot stall limit [-] (METHODS.md §3.2: 0.8–0.9) [P]
SUPERVISED_FRACTION = 0.5  #: speed-switch-supervised delay as a fraction of the hot stall limit [-] [P]
SUPERVISED_MIN = 2.0  #: shortest supervised delay, time for the speed switch to open once turning [s] [P]
JAM_PICKUP = 2.0  #: running jam pickup [× FLC] [P]
JAM_DELAY = 2.0  #: shortest running jam delay [s] [P]


def delay_window(acceleration_time: float, hot_stall_time: float) -> tuple[float, float]:
    """(lowest, highest) definite delay of an unsupervised stall element [s].

    Examples
    --------
    >>> [round(x, 3) for x in delay_window(5.411, 10.0)]   # max(7.411, 6.493) … 0.9 × 10
    [7.411, 9.0]
    >>> [round(x, 3) for x in delay_window(12.0, 20.0)]    # max(14, 14.4) … 18
    [14.4, 18.0]
    """
    return max(acceleration_time + ACCEL_ADD, ACCEL_FACTOR * acceleration_time), STALL_MARGIN * hot_stall_time


def pickup_ceiling(locked_rotor_current: float, minimum_voltage: float) -> float:
    """Highest pickup that still sees a stall at the minimum voltage, 0.8 × I_LR × V_min [A or pu].

    Examples
    --------
    >>> round(pickup_ceiling(6.276, 0.85), 3)   # METHODS.md §3.4: 4.268 pu
    4.268
    """
    return PICKUP_REACH * locked_rotor_current * minimum_voltage


def reacceleration_time_above(ctx: StudyContext, dip_time: float, current: float) -> float:
    """How long the current stays above ``current`` [A] when the drive re-accelerates after losing its voltage
    for ``dip_time`` [s] (a dip 27 rides through), at the minimum starting voltage on the long-end curve [s];
    inf when it does not re-accelerate."""
    b = basis_of(ctx)
    load = ctx.case.load
    n_run = b.start_rated.running_speed or (1.0 - b.rated_slip)
    profile = (load.torque_profile, load.torque_at_rated_speed, load.breakaway_torque)
    n_dip = speed_after_dip(dip_time, n_run, b.total_inertia, b.sync_speed, b.rated_torque, *profile,
                            1.0 - b.rated_slip)
    again = study_start(voltage=b.minimum_voltage, curve=b.curve, rated_current=b.flc, inertia=b.total_inertia,
                        synchronous_speed=b.sync_speed, rated_torque=b.rated_torque, rated_slip=b.rated_slip,
                        load_profile=profile[0], load_torque_rated=profile[1], load_breakaway=profile[2],
                        initial_speed=min(n_dip, 0.999 * n_run))
    return again.time_above(current)


def _round_up(x: float, step: float = 0.1) -> float:
    return math.ceil(x / step - 1e-9) * step


def operate_time(s: dict, current: float, state: str) -> float | None:
    """Expected operate time of 51LR with every stage enabled, for a balanced phase current [A primary] in a
    given state: ``"starting"`` (start in progress, rotor at standstill: speed switch, if any, closed; jam not
    armed), ``"turning"`` (start in progress, rotor turning: speed switch open; jam not armed) or ``"running"``
    (start complete: speed switch open; jam armed) [s]; None when nothing operates."""
    times = []
    if current > s["pickup"] and (state == "starting" or not s["switch"]):
        times.append(s["delay"])
    if state == "running" and current > s["jam"]:
        times.append(s["jam_delay"])
    return min(times) if times else None


def settings(ctx: StudyContext) -> FunctionSettings:
    from machines.protection.motor_undervoltage import DELAY as UNDERVOLTAGE_DELAY

    b = basis_of(ctx)
    flc, ct = b.flc, ctx.ct
    p49_0 = computed(ctx, "49").get("pickup", 1.15 * flc)
    p49 = chosen(ctx, "49").get("pickup", p49_0)
    checks: list[Check] = []
    t_stall = b.stall_time(b.lr_high, "hot")

    # ---- the rule's values (computed, before overrides)
    lo = max(PICKUP_MIN * flc, 1.1 * p49_0)
    hi = pickup_ceiling(b.lr_low, b.minimum_voltage)
    pk0 = min(max(PICKUP_TARGET * flc, lo), max(hi, lo))
    t_acc = b.start_min.acceleration_time
    d_lo, d_hi = delay_window(t_acc, t_stall)
    window = b.bounded and d_lo <= d_hi
    if window:
        delay0, switch0, d_round = d_lo, False, "up"
        why = (f"delay at least max(t_acc + 2 s, 1.2 × t_acc) = {d_lo:.1f} s on the acceleration time "
               f"{t_acc:.1f} s at {b.minimum_voltage:.3f} pu (long end; common practice), below 0.9 × the hot "
               f"locked-rotor limit {t_stall:.3g} s ({d_hi:.1f} s)")
    else:
        delay0, switch0, d_round = min(max(SUPERVISED_MIN, SUPERVISED_FRACTION * t_stall), STALL_MARGIN * t_stall), \
            True, "down"
        why = ((f"no delay window (max(t_acc + 2 s, 1.2 × t_acc) = {d_lo:.1f} s > 0.9 × the hot locked-rotor limit "
                f"{d_hi:.1f} s)" if b.bounded else "the acceleration time at the minimum voltage is not bounded")
               + f": a zero-speed switch supervises a {delay0:.1f} s locked-rotor timer; the acceleration is left "
                 "to the thermal replica and the start-supervision element (48)")
    jam0 = max(JAM_PICKUP * flc, 1.1 * p49_0)
    above0 = reacceleration_time_above(ctx, UNDERVOLTAGE_DELAY, jam0)
    if math.isfinite(above0):
        jd = max(JAM_DELAY, above0 + ACCEL_ADD, ACCEL_FACTOR * above0)
        jam_delay0 = jd if jd <= STALL_MARGIN * t_stall else JAM_DELAY
    else:
        jam_delay0 = JAM_DELAY
    computed(ctx, FID).update(pickup=pk0, delay=delay0, switch=switch0, jam=jam0, jam_delay=jam_delay0)

    # ---- what the relay holds
    pickup, p_src = ctx.choose(FID, "pickup_current", pk0, "current", "A", "common-practice", rounding="down")
    switch, sw_src = ctx.choose(FID, "speed_switch_required", switch0, "boolean", "", "common-practice")
    delay, d_src = ctx.choose(FID, "time_delay", delay0, "time", "s", "common-practice", rounding=d_round)
    jam, j_src = ctx.choose(FID, "jam_pickup_current", jam0, "current", "A", "common-practice", rounding="up")
    jam_delay, jd_src = ctx.choose(FID, "jam_time_delay", jam_delay0, "time", "s", "common-practice", rounding="up")
    chosen(ctx, FID).update(pickup=pickup, delay=delay, switch=bool(switch), jam=jam, jam_delay=jam_delay)

    if lo > hi:
        checks.append(Check("fail", f"No pickup window: the locked-rotor current at minimum voltage "
                                    f"({b.lr_low * b.minimum_voltage:.0f} A) is too close to the overload region; "
                                    f"a stall pickup between {lo:.0f} A and {hi:.0f} A does not exist."))
    if pickup <= p49:
        checks.append(Check("fail", f"The stall pickup {pickup:.0f} A is not above the overload pickup {p49:.0f} A."))
    elif pickup > hi:
        checks.append(Check("fail", f"The stall pickup {pickup:.0f} A is above {hi:.0f} A (0.8 × the lowest "
                                    "locked-rotor current at minimum voltage): a stall at low voltage may not pick "
                                    "it up."))
    else:
        checks.append(Check("ok", f"Stall pickup {pickup / flc:.2f} × FLC lies between the overload region and "
                                  f"0.8 × the locked-rotor current at minimum voltage ({hi:.0f} A)."))
    _delay_checks(checks, b, pickup, delay, bool(switch), window, t_acc, d_lo, d_hi, t_stall)
    if jam <= p49:
        checks.append(Check("fail", f"The running jam pickup {jam:.0f} A is not above the overload pickup "
                                    f"{p49:.0f} A."))
    if jam_delay >= STALL_MARGIN * t_stall:
        checks.append(Check("fail" if jam_delay >= t_stall else "warn",
                            f"The running jam delay {jam_delay:.1f} s leaves less than 10 % margin to the hot "
                            f"locked-rotor limit {t_stall:.3g} s."))
    if not math.isfinite(above0):
        checks.append(Check("warn", f"After a voltage dip of {UNDERVOLTAGE_DELAY:g} s (what 27 rides through) the "
                                    "drive does not re-accelerate at the minimum voltage: the jam stage trips it, "
                                    "as it should."))
    elif jam_delay0 < above0 + ACCEL_ADD:
        checks.append(Check("warn", f"After a voltage dip of {UNDERVOLTAGE_DELAY:g} s (what 27 rides through) the "
                                    f"re-acceleration keeps the current above the jam pickup for {above0:.1f} s, "
                                    "longer than a jam delay below the stall limit allows: block the jam stage "
                                    "while the motor re-accelerates (the relay's start logic)."))
    ctx.derived["stall_delay_window"] = Setting(
        f"{d_lo:.1f} s to {d_hi:.1f} s" if b.bounded else f"not bounded, up to {d_hi:.1f} s", "", "derived",
        label="51LR delay window", note="from max(t_acc + 2 s, 1.2 × t_acc) to 0.9 × the hot locked-rotor limit")

    s = {
        "pickup_current": current_setting(pickup, ct, p_src, "Stall pickup", note=f"{pickup / flc:.2f} × FLC"),
        "time_delay": Setting(delay, "s", d_src, label="Stall delay (definite time)"),
        "speed_switch_required": Setting(bool(switch), "", sw_src, label="Zero-speed switch required"),
        "jam_pickup_current": current_setting(jam, ct, j_src, "Running jam pickup (armed after the start)",
                                              note=f"{jam / flc:.2f} × FLC"),
        "jam_time_delay": Setting(jam_delay, "s", jd_src, label="Running jam delay",
                                  note="rides through the re-acceleration after a dip 27 rides through"
                                  if math.isfinite(above0) and jam_delay0 > JAM_DELAY else ""),
    }
    tps = _test_points(ct, b, chosen(ctx, FID), bool(switch))
    basis = (f"Pickup {pk0 / flc:.2f} × FLC: above the overload region, below 0.8 × the locked-rotor current at "
             f"minimum voltage; {why}. Running jam stage {jam0 / flc:.1f} × FLC for {jam_delay0:.1f} s once the start "
             "is complete" + (f", longer than the {above0:.1f} s the current stays above it while the drive "
                              f"re-accelerates after a {UNDERVOLTAGE_DELAY:g} s dip (the 27 delay)"
                              if math.isfinite(above0) and jam_delay0 > JAM_DELAY else "") + ".")
    return FunctionSettings(FID, "Locked rotor / stall and running jam", s, basis,
                            ["IEEE Std C37.96 (motor protection guide), stall protection [value from memory]",
                             "IEEE Std 620 (thermal-limit curves)"], checks, tps)


def _delay_checks(checks: list[Check], b, pickup: float, delay: float, switch: bool, window: bool, t_acc: float,
                  d_lo: float, d_hi: float, t_stall: float) -> None:
    if not window:
        if b.bounded:
            checks.append(Check("warn", f"The acceleration time at minimum voltage ({t_acc:.1f} s) leaves no delay "
                                        f"window below 0.9 × the hot locked-rotor limit ({d_hi:.1f} s): a zero-speed "
                                        "switch is required, with the start-supervision element (48) as backup."))
        else:
            checks.append(Check("warn", "The start at minimum voltage is not bounded, so no stall delay can separate "
                                        "a start from a stall: a zero-speed switch is required (the delay shown is "
                                        "the speed-switch-supervised one)."))
        if not switch:
            checks.append(Check("fail", "speed_switch_required was set false although no delay window exists: the "
                                        "stall element either trips normal starts or lets a stall exceed the hot "
                                        "locked-rotor limit."))
    if delay >= t_stall:
        checks.append(Check("fail", f"The stall delay {delay:.1f} s is not below the hot locked-rotor limit "
                                    f"{t_stall:.3g} s."))
    elif delay > d_hi * (1 + 1e-9):
        checks.append(Check("warn", f"The stall delay {delay:.1f} s leaves less than 10 % margin to the hot "
                                    f"locked-rotor limit {t_stall:.3g} s."))
    if switch or not b.bounded:
        return
    above = b.start_min.time_above(pickup)
    need = max(above + ACCEL_ADD, ACCEL_FACTOR * above)
    if above >= delay:
        checks.append(Check("fail", f"The starting current stays above the stall pickup for {seconds(above)} at "
                                    f"minimum voltage, at or beyond the delay {delay:.1f} s: 51LR would trip a normal "
                                    "start."))
    elif delay < need - 1e-6:
        checks.append(Check("warn", f"During a start at minimum voltage the current stays above the stall pickup for "
                                    f"{above:.1f} s; the delay {delay:.1f} s is less than max(+2 s, × 1.2) beyond "
                                    "it."))
    else:
        checks.append(Check("ok", f"During a start at minimum voltage the current stays above the stall pickup for "
                                  f"{above:.1f} s; the delay {delay:.1f} s is at least max(+2 s, × 1.2) beyond it."))


def _test_points(ct, b, s: dict, switch: bool) -> list:
    pickup, delay, jam = s["pickup"], s["delay"], s["jam"]
    sw = " (speed-switch input: zero speed)" if switch else ""

    def tp(i: float, state: str, description: str, **kw):
        t = operate_time(s, i, state)
        return timed_test_point("current", ct.to_secondary(i), "A", t, applied_primary=i, primary_unit="A",
                                initial_state={"starting": "start in progress, rotor at standstill",
                                               "turning": "start in progress, rotor turning",
                                               "running": "running, start complete"}[state], description=description,
                                duration=None if t is not None else round(delay + 2.0, 1), **kw)

    i_test = max(2.0 * pickup, b.lr_low * b.minimum_voltage)
    tps = [
        tp(0.95 * pickup, "starting", f"pickup test, start in progress{sw}: 0.95 × pickup must not operate"),
        tp(1.05 * pickup, "starting", f"pickup test, start in progress{sw}: 1.05 × pickup operates after the delay"),
        tp(i_test, "starting", f"delay test at the stall current at minimum voltage, start in progress{sw}"),
    ]
    if switch:
        tps.append(tp(i_test, "turning", "start in progress, speed-switch input open (rotor turning): the "
                                         "supervised stall timer must not operate"))
    tps.append(tp(1.1 * jam, "running", "running jam stage, start complete" + (", speed-switch input open"
                                                                               if switch else "")))
    return tps
