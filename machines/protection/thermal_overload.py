"""49 stator thermal overload of an induction motor: an IEC 60255-149 thermal replica.

Rule (METHODS.md §2.4):
- Pickup k·I_B = (service factor + 0.05) × FLC and at least 1.10 × FLC (room for an alarm above full load on a
  service-factor 1.0 motor); common practice. Under IEEE practice NEC 430.32(A)(1) (a rule for motors up to
  600 V) is used as guidance for medium voltage: the pickup is kept within it and a value above it is a warning.
  Under IEC practice the NEC is not applied. A pickup above the highest value NEC 430.32(C) tolerates (1.30 ×
  FLC, 1.40 × FLC from service factor 1.15) leaves the motor to carry a sustained overload no rating allows: a
  failure in either practice.
- Heating time constant: the maker's, else the longest that keeps the replica, running hot at rated current,
  tripping at most 0.90 × the maker's limits: the hot safe stall time at locked-rotor current (10 % margin, common
  practice) and every point of the maker's IEEE Std 620 curves (running overload, locked rotor, accelerating).
  A start from hot at the minimum voltage may use at most 90 % of the capacity left; when it needs a longer time
  constant than the limits allow the longer one is used only if the start's rotor heat is within the stall limits
  (or the maker's accelerating limit), with a warning that the stall from hot is left to 51LR; otherwise the time
  constant protects the limits and the start fails its check (the maker's acceleration thermal limit is
  missing). Never above 180 min unless the maker gives it.
- Cooling (standstill) time constant: the maker's, else 3 × the heating constant (METHODS.md §2.3: 2–6 × [P]).
- Alarm at the thermal level reached, in steady running, halfway between 1.05 × FLC (a small overload) and the
  pickup: an alarm that stands at full load, or comes within 3 % of it, is a warning.
An override replaces its own value only: the time constants are fitted to the computed pickup.
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, balanced, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen, computed, seconds
from machines.record import Check, FunctionSettings, Setting
from machines.standards.accuracy import DEFAULT_TIME_ERROR, DEFAULT_TIME_FLOOR
from machines.standards.overload_limits import nec_overload_limit
from machines.standards.thermal_replica import (
    start_capacity, thermal_level, thermal_level_profile, thermal_operate_time, time_constant_from_trip_time,
)

FID = "49"
PICKUP_ABOVE_SF = 0.05  #: pickup = (service factor + this) × FLC [pu]; METHODS.md §2.4, common practice
PICKUP_FLOOR = 1.10  #: lowest computed pickup [× FLC]: room for an alarm above full load [P]
COOLING_RATIO = 3.0  #: standstill cooling constant / heating constant when the maker gives none; METHODS.md §2.3 [P]
LIMIT_SHARE = 0.90  #: the replica trips at most at this share of a maker's limit time (10 % margin) [P]
START_SHARE = 0.90  #: a hot start at minimum voltage may use at most this share of the capacity left [-] [P]
ALARM_FLOOR = 1.05  #: the alarm sits halfway between this × FLC (a small overload) and the pickup [P]
ALARM_HEADROOM = 0.03  #: the alarm current at least this far above full load [pu] [P]
TAU_MAX = 180.0 * 60.0  #: no computed heating constant above this [s] [P]
TEST_MULTIPLES = (2.0, 3.0, 5.0)  #: test currents, multiples of the pickup [-]
LONG_TEST = 60.0  #: tests longer than this state how long to inject [s]
#: the maker's curves the replica must stay below; a stall or an over-long start from cold is 51LR's (its delay is
#: below the hot stall limit), so cold locked-rotor and accelerating curves are checked but do not bind τ
BINDING = (("running", "hot"), ("running", "cold"), ("locked-rotor", "hot"), ("accelerating", "hot"))


def hard_limit(service_factor: float) -> float:
    """The highest overload pickup NEC 430.32(C) tolerates, as a fraction of FLC [pu]; beyond it the motor carries
    a sustained overload no rating allows.

    >>> hard_limit(1.0), hard_limit(1.15)
    (1.3, 1.4)
    """
    return 1.40 if service_factor >= 1.15 - 1e-9 else 1.30


def replica_through_start(start, pickup: float, tau: float, initial_level: float) -> tuple[float, float]:
    """(highest level during the start, level at its end) of the replica run through a simulated start that
    accelerates [-]."""
    lvl = thermal_level_profile(start.times, start.currents, pickup, tau, initial_level)
    return float(lvl.max()), float(lvl[-1])


def time_constant_for_start(start, pickup: float, initial_level: float, share: float = START_SHARE) -> float:
    """Shortest heating time constant whose replica, starting at ``initial_level``, uses at most ``share`` of the
    capacity left (1 − θ0) through ``start`` [s] (bisection on τ; the level falls as τ grows)."""
    peak = initial_level + share * (1.0 - initial_level)
    lo, hi = 1.0, 1e6
    for _ in range(30):  # brackets τ to a ratio of e^(13.8/2^30) ≈ 1 + 1.3e-8
        mid = math.sqrt(lo * hi)
        if replica_through_start(start, pickup, mid, initial_level)[0] > peak:
            lo = mid
        else:
            hi = mid
    return hi


def limit_constraints(b, pickup: float, flc: float) -> list[tuple[float, str]]:
    """The longest heating time constant each of the maker's limits allows (the replica trips at ≤ 0.90 × the
    limit's time), with a name for each [s]. Points at or below the pickup set no limit."""
    out = []
    t_sh = b.stall_time(b.lr_high, "hot")
    if b.lr_high > pickup:
        out.append((time_constant_from_trip_time(LIMIT_SHARE * t_sh, b.lr_high, pickup, flc),
                    f"0.90 × the hot locked-rotor limit {t_sh:.3g} s at {b.lr_high:.0f} A"))
    for kind, state in BINDING:
        for _, points in b.curve_points(kind, state):
            for current, t in points:
                if current > pickup * 1.0001:
                    prior = flc if state == "hot" else 0.0
                    out.append((time_constant_from_trip_time(LIMIT_SHARE * t, current, pickup, prior),
                                f"0.90 × the maker's {state} {kind} limit {t:.3g} s at {current:.0f} A"))
    return out


def settings(ctx: StudyContext) -> FunctionSettings:
    m = ctx.case.machine
    practice = ctx.case.study.practice
    b = basis_of(ctx)
    flc = b.flc
    checks: list[Check] = []

    # ---- the rule's values (computed, before overrides)
    nec = nec_overload_limit(m.service_factor, m.temperature_rise)
    k0 = max(m.service_factor + PICKUP_ABOVE_SF, PICKUP_FLOOR)
    if practice == "IEEE":
        k0 = min(k0, nec)
    pk0 = k0 * flc
    theta_hot0 = (flc / pk0) ** 2
    tau0, t_src, t_basis, tau_round = _heating_constant(ctx, b, pk0, checks)
    tc0, c_src = (m.cooling_time_constant, "maker-data") if m.cooling_time_constant else (COOLING_RATIO * tau0,
                                                                                       "common-practice")
    i_alarm0 = 0.5 * (ALARM_FLOOR * flc + pk0) if pk0 > ALARM_FLOOR * flc else 0.5 * (flc + pk0)
    alarm0 = (i_alarm0 / pk0) ** 2
    computed(ctx, FID).update(pickup=pk0, tau=tau0, tau_c=tc0)

    # ---- what the relay holds
    ct = ctx.ct
    pickup, p_src = ctx.choose(FID, "pickup_current", pk0, "current", "A", "common-practice", rounding="down")
    tau, t_src = ctx.choose(FID, "heating_time_constant", tau0, "time", "s", t_src, rounding=tau_round)
    if not tau > 0.0:
        checks.append(Check("fail", "The heating time constant must be positive."))
        tau = tau0
    tau_c, c_src = ctx.choose(FID, "cooling_time_constant", tc0, "time", "s", c_src, rounding="down")
    alarm, a_src = ctx.choose(FID, "alarm_level", alarm0, "per_unit", "", "common-practice", rounding="up")
    chosen(ctx, FID).update(pickup=pickup, tau=tau, tau_c=tau_c, alarm=alarm)

    _pickup_checks(checks, pickup, flc, m.service_factor, nec, practice)
    _alarm_checks(checks, alarm, pickup, flc, m.service_factor)
    if tau_c < tau:
        checks.append(Check("warn", f"The cooling time constant ({tau_c / 60:.1f} min) is shorter than the heating "
                                    f"time constant ({tau / 60:.1f} min); a stopped motor cools more slowly than a "
                                    "running one. Check the maker's data."))
    if tau > TAU_MAX and t_src != "maker-data":
        checks.append(Check("warn", f"A heating time constant of {tau / 60:.0f} min is longer than 180 min, beyond "
                                    "what a motor's winding shows: check it against the maker's data."))
    t_hot, t_cold = _stall_checks(checks, b, pickup, tau, flc, t_basis)
    _curve_checks(checks, b, pickup, tau, flc)
    _start_checks(checks, b, m, pickup, tau, flc)
    _record(ctx, b, pickup, tau, t_hot, t_cold, flc)

    s = {
        "pickup_current": current_setting(pickup, ct, p_src, "Pickup current k·I_B",
                                          note=f"{pickup / flc:.3f} × FLC"),
        "heating_time_constant": Setting(tau, "s", t_src, label="Heating time constant", note=f"{tau / 60:.1f} min"),
        "cooling_time_constant": Setting(tau_c, "s", c_src, label="Cooling time constant (standstill)",
                                         note=f"{tau_c / 60:.1f} min"),
        "alarm_level": Setting(alarm, "pu", a_src, label="Thermal alarm level",
                               note=f"alarms at {pickup * math.sqrt(alarm) / flc:.3f} × FLC in steady running"),
    }
    tps = _test_points(ct, pickup, tau, flc, b, t_hot, alarm)
    nec_text = (f", kept within the {nec:.0%} of NEC 430.32(A)(1) (guidance for medium voltage)"
                if practice == "IEEE" else "")
    basis = (f"Pickup {pk0 / flc:.2f} × FLC: the service factor {m.service_factor:g} + 0.05, at least 1.10 "
             f"× FLC (common practice){nec_text}. Heating time constant {tau0 / 60:.1f} min: {t_basis}. Cooling constant "
             + (f"{tc0 / 60:.1f} min (maker)" if c_src == "maker-data" else
                f"{tc0 / 60:.1f} min, 3 × the heating constant (common practice)")
             + f". Alarm at {alarm0:.0%} of the trip level: {i_alarm0 / flc:.3f} × FLC in steady running, halfway "
             "between a 5 % overload and the pickup (common practice).")
    refs = ["IEC 60255-149:2013 thermal replica", "IEEE Std 620 (thermal-limit curves)"]
    if practice == "IEEE":
        refs.append("NFPA 70 (NEC) 430.32(A)(1) and (C), as guidance for medium voltage")
    return FunctionSettings(FID, "Stator thermal overload (thermal replica)", s, basis, refs, checks, tps)


def _heating_constant(ctx: StudyContext, b, pk0: float, checks: list[Check]) -> tuple[float, str, str, str]:
    """(τ [s], source, why, rounding) of the rule, from the computed pickup."""
    m = ctx.case.machine
    flc = b.flc
    if m.heating_time_constant:
        return m.heating_time_constant, "maker-data", "the maker's heating time constant", "nearest"
    limits = limit_constraints(b, pk0, flc)
    if not limits:
        return 1800.0, "common-practice", "a 30 min default (the locked-rotor current is not above the pickup)", \
            "nearest"
    tau_up, which = min(limits)
    need = [time_constant_for_start(s, pk0, (flc / pk0) ** 2) for s in b.heat_starts()]
    tau_low = max(need, default=0.0)
    if tau_up > TAU_MAX:
        tau_up, which = TAU_MAX, "180 min, the longest the study proposes without the maker's figure"
    if tau_low <= tau_up:
        return tau_up, "derived", f"the longest that trips at {which} from hot", "down"
    # a start from hot needs a longer constant than the limits allow
    heat = b.start_heat()
    allowed = b.acceleration_heat_limit("hot") or b.lr_high ** 2 * b.stall_time(b.lr_high, "hot")
    if heat > allowed or tau_low > TAU_MAX:
        checks.append(Check("fail", f"The thermal replica cannot both protect the motor ({which}: τ ≤ "
                                    f"{tau_up / 60:.1f} min) and let a start from hot through (τ ≥ "
                                    f"{tau_low / 60:.1f} min): the time constant protects the limit and the start "
                                    "from hot would trip. The maker's acceleration thermal limit (IEEE Std 620) or a "
                                    "start-mode thermal model is needed."))
        return tau_up, "derived", f"the longest that trips at {which} from hot; a start from hot needs " \
                                  f"{tau_low / 60:.1f} min", "down"
    checks.append(Check("warn", f"The heating time constant is {tau_low / 60:.1f} min, longer than the "
                                f"{tau_up / 60:.1f} min that trips at {which}: a start from hot at minimum voltage "
                                "needs it (its rotor heat is within the stall limits). A stall from hot is then "
                                "protected by 51LR."))
    return tau_low, "derived", (f"lengthened beyond the {tau_up / 60:.1f} min that trips at {which}, so that a start "
                                f"from hot uses at most {START_SHARE:.0%} of the capacity left"), "up"


def _pickup_checks(checks: list[Check], pickup: float, flc: float, sf: float, nec: float, practice: str) -> None:
    hard = hard_limit(sf)
    k = pickup / flc
    if pickup <= flc:
        checks.append(Check("fail", f"The overload pickup {pickup:.1f} A is at or below the full-load current "
                                    f"{flc:.1f} A: the motor would trip at rated load."))
    elif k > hard + 1e-9:
        checks.append(Check("fail", f"The overload pickup {k:.2f} × FLC lets the motor carry a sustained overload of "
                                    f"{k - 1:.0%} without tripping: above {hard:.2f} × FLC no rating or code allows "
                                    f"(service factor {sf:g})."))
    elif practice == "IEEE" and k > nec + 1e-9:
        checks.append(Check("warn", f"The overload pickup {k:.2f} × FLC is above the {nec:.0%} NEC 430.32(A)(1) allows "
                                    "a motor up to 600 V (guidance for medium voltage): justify it from the maker's "
                                    "running overload curve."))
    elif pickup < sf * flc:
        checks.append(Check("warn", f"The overload pickup {pickup:.1f} A is below the service-factor load "
                                    f"{sf * flc:.1f} A: the motor may trip while running within its service "
                                    "factor."))
    else:
        checks.append(Check("ok", f"The overload pickup {k:.2f} × FLC is at or above the service-factor load"
                                  + (f" and within the NEC 430.32(A)(1) guidance of {nec:.0%}." if practice == "IEEE"
                                     else ".")))


def _alarm_checks(checks: list[Check], alarm: float, pickup: float, flc: float, sf: float) -> None:
    if alarm >= 1.0:
        checks.append(Check("warn", f"The thermal alarm level {alarm:.0%} is at or above the trip level: it gives no "
                                    "warning before the trip."))
        return
    i_alarm = pickup * math.sqrt(alarm)
    if i_alarm <= flc:
        checks.append(Check("warn", f"The thermal alarm acts at {i_alarm / flc:.3f} × FLC in steady running, at or "
                                    "below full load: it would stand in normal running."))
    elif i_alarm < flc * (1.0 + ALARM_HEADROOM):
        checks.append(Check("warn", f"The thermal alarm acts at {i_alarm / flc:.3f} × FLC, within 3 % of full load: it "
                                    "will alarm on small overloads and at low voltage."))
    else:
        checks.append(Check("ok", f"The thermal alarm acts at {i_alarm / flc:.3f} × FLC in steady running, above full "
                                  "load and below the pickup" + (f" (service factor {sf:g})." if sf > 1.0 else ".")))


def _stall_checks(checks: list[Check], b, pickup: float, tau: float, flc: float, why: str) -> tuple[float, float]:
    """Grade the operate times at locked-rotor current from hot and cold against the stall limits."""
    i_lr = b.lr_high
    t_hot = thermal_operate_time(i_lr, pickup, tau, flc)
    t_cold = thermal_operate_time(i_lr, pickup, tau)
    lim_hot, lim_cold = b.stall_time(i_lr, "hot"), b.stall_time(i_lr, "cold")
    if t_hot <= LIMIT_SHARE * lim_hot * (1 + 1e-9):
        checks.append(Check("ok", f"From hot the replica trips a locked rotor ({i_lr:.0f} A) in {seconds(t_hot)}, "
                                  f"{t_hot / lim_hot:.0%} of the hot stall limit {lim_hot:.3g} s."))
    elif t_hot < lim_hot:
        checks.append(Check("warn", f"From hot the replica trips a locked rotor in {seconds(t_hot)}, "
                                    f"{t_hot / lim_hot:.0%} of the hot stall limit {lim_hot:.3g} s: less than the 10 % "
                                    f"margin ({why}); the stall is covered by 51LR."))
    else:
        checks.append(Check("warn", f"From hot the replica trips a locked rotor in {seconds(t_hot)}, later than the "
                                    f"hot stall limit {lim_hot:.3g} s ({why}): the stall from hot is protected by "
                                    "51LR alone."))
    if t_cold > lim_cold:
        checks.append(Check("warn", f"From cold the replica trips a locked rotor in {seconds(t_cold)}, after the cold "
                                    f"stall limit {lim_cold:.3g} s: a single time constant cannot match both stall "
                                    "times, and the stall from cold is protected by 51LR."))
    return t_hot, t_cold


def _curve_checks(checks: list[Check], b, pickup: float, tau: float, flc: float) -> None:
    worst = cold = None
    for kind, state in (("running", "hot"), ("running", "cold"), ("locked-rotor", "hot"), ("accelerating", "hot"),
                        ("locked-rotor", "cold"), ("accelerating", "cold")):
        for _, points in b.curve_points(kind, state):
            for current, t in points:
                trip = thermal_operate_time(current, pickup, tau, flc if state == "hot" else 0.0)
                item = (trip / t, kind, state, current, t, trip)
                if (kind, state) not in BINDING:
                    cold = item if cold is None or item[0] > cold[0] else cold
                elif worst is None or item[0] > worst[0]:
                    worst = item
    if cold is not None and cold[0] > 1.0:
        _, kind, _, current, t, trip = cold
        checks.append(Check("warn", f"From cold the replica trips later than the maker's cold {kind} limit ({t:.3g} s "
                                    f"at {current:.0f} A; the replica {seconds(trip)}): a stall from cold is "
                                    "protected by 51LR."))
    if worst is None:
        return
    share, kind, state, current, t, trip = worst
    where = f"the maker's {state} {kind} limit ({t:.3g} s at {current:.0f} A; the replica trips in {seconds(trip)})"
    if share > 1.0:
        checks.append(Check("fail", f"The replica lies above {where}: the motor is not protected there."))
    elif share > LIMIT_SHARE * (1 + 1e-9):
        checks.append(Check("warn", f"The replica comes within 10 % of {where}."))
    else:
        checks.append(Check("ok", f"The replica trips at no more than {share:.0%} of every point of the maker's "
                                  f"thermal-limit curves (closest: {where})."))


def _start_checks(checks: list[Check], b, m, pickup: float, tau: float, flc: float) -> None:
    theta_hot = (flc / pickup) ** 2
    starts = b.heat_starts()
    if not starts:
        checks.append(Check("warn", "The replica could not be run through a start: the start at the minimum voltage "
                                    "is not bounded (see the start finding)."))
        return
    worst = None
    for start in starts:
        for state, theta0 in (("hot", theta_hot), ("cold", 0.0)):
            peak, _ = replica_through_start(start, pickup, tau, theta0)
            used = (peak - theta0) / (1.0 - theta0) if theta0 < 1.0 else math.inf
            if worst is None or (peak, used) > (worst[0], worst[1]):
                worst = (peak, used, state, start)
    peak, used, state, start = worst
    what = f"a start from {state} at {start.voltage:.3f} pu ({seconds(start.acceleration_time)})"
    if peak >= 1.0:
        checks.append(Check("fail", f"The thermal replica would trip during {what}."))
    elif used > START_SHARE:
        checks.append(Check("warn", f"During {what} the replica reaches {peak:.0%} of its trip level, using "
                                    f"{used:.0%} of the capacity left: less than 10 % headroom."))
    else:
        checks.append(Check("ok", f"The replica does not trip during a start: {what} takes it to {peak:.0%} of its "
                                  "trip level at most."))
    n = m.starts_cold
    if n > 1:
        level = 0.0
        for _ in range(n):
            p, level = replica_through_start(b.start_min if b.start_min.accelerates else start, pickup, tau, level)
            if p >= 1.0:
                checks.append(Check("warn", f"The replica would trip during start {_ + 1} of the {n} starts from cold "
                                            "the maker allows in succession."))
                break


def _share_of_limit(trip: float, limit: float, state: str) -> str:
    """The note beside a locked-rotor operate time: its share of the stall limit, in words when it never trips."""
    if not math.isfinite(trip):
        return f"never trips at locked-rotor current: the {state} stall limit {limit:.3g} s is not protected by 49"
    return f"{trip / limit:.0%} of the {state} stall limit {limit:.3g} s"


def _record(ctx: StudyContext, b, pickup: float, tau: float, t_hot: float, t_cold: float, flc: float) -> None:
    m = ctx.case.machine
    d = ctx.derived
    lim_hot, lim_cold = b.stall_time(b.lr_high, "hot"), b.stall_time(b.lr_high, "cold")
    d["thermal_trip_time_locked_rotor_hot"] = Setting(
        t_hot if math.isfinite(t_hot) else None, "s", "derived", label="49 operate time at I_LR from hot",
        note=_share_of_limit(t_hot, lim_hot, "hot"))
    d["thermal_trip_time_locked_rotor_cold"] = Setting(
        t_cold if math.isfinite(t_cold) else None, "s", "derived", label="49 operate time at I_LR from cold",
        note=_share_of_limit(t_cold, lim_cold, "cold"))
    if b.start_min.accelerates:
        _, end_c = replica_through_start(b.start_min, pickup, tau, 0.0)
        d["thermal_capacity_per_start"] = Setting(end_c, "pu", "derived",
                                                  label="Replica thermal capacity one start uses (cold)")
        i_lr = b.lr_high
        tau_cold_fit = time_constant_from_trip_time(m.safe_stall_time_cold, i_lr, pickup) if i_lr > pickup else tau
        d["start_capacity_reference"] = Setting(
            start_capacity(b.start_min.acceleration_time, m.safe_stall_time_cold, tau_cold_fit), "pu", "derived",
            label="Start capacity (replica fitted to cold stall)",
            note="(1 − e^(−t_st/τ))/(1 − e^(−t_sc/τ)), τ fitted to cold stall")


def _test_points(ct, pickup: float, tau: float, flc: float, b, t_hot: float, alarm: float) -> list:
    tps = []
    for mult in TEST_MULTIPLES:
        i = mult * pickup
        t = thermal_operate_time(i, pickup, tau)
        tps.append(timed_test_point("current", ct.to_secondary(i), "A", t, applied_primary=i, primary_unit="A",
                                    initial_state="cold", duration=_duration(t),
                                    description=f"{mult:g} × pickup, three-phase balanced, replica reset to cold"))
    i = 0.95 * pickup
    # with every stage in service the technician sees the alarm output too: say whether it operates in the injection
    t_alarm = thermal_operate_time(i, pickup * math.sqrt(alarm), tau) if alarm > 0.0 else 0.0
    reached = thermal_level(i, pickup, tau, 3.0 * tau)
    outcome = (f"the trip must not operate (the level settles at 90 % of trip); the thermal alarm "
               f"({alarm * 100:.0f} %) operates after {t_alarm / 60:.0f} min" if t_alarm < 3.0 * tau else
               f"neither the trip nor the thermal alarm ({alarm * 100:.0f} %) operates (the level reaches "
               f"{reached * 100:.0f} % of trip, settling at 90 %)")
    tps.append(timed_test_point("current", ct.to_secondary(i), "A", None, applied_primary=i, primary_unit="A",
                                initial_state="cold", duration=round(3.0 * tau),
                                description=f"0.95 × pickup from cold for 3τ ({3 * tau / 60:.0f} min): {outcome}"))
    if math.isfinite(t_hot):
        i_lr = b.lr_high
        theta = (flc / pickup) ** 2
        lim = b.stall_time(i_lr, "hot")
        tps.append(timed_test_point(
            "current", ct.to_secondary(i_lr), "A", t_hot, applied_primary=i_lr, primary_unit="A",
            initial_state="hot", duration=_duration(t_hot),
            prefault={"phases": balanced(ct.to_secondary(flc)), "duration": round(5.0 * tau),
                      "thermal_level": round(theta, 4)},
            description=f"from hot: preset the thermal level to {theta:.0%} (or inject FLC for 5τ, "
                        f"{5 * tau / 60:.0f} min), then step to the locked-rotor current: trips in "
                        f"{t_hot:.1f} s, {t_hot / lim:.0%} of the hot stall limit {lim:.3g} s"))
    for tp in tps:
        if tp.expected_time is not None:
            tp.tolerance_rule = TOLERANCE_RULE
    return tps


#: the accuracy template printed beside a thermal test (IEC 60255-149 declares the thermal element's operate-time
#: error as ± x % or ± y ms, whichever is greater; typical maker figures, common practice)
TOLERANCE_RULE = (f"±{DEFAULT_TIME_ERROR:.0%} or ±{DEFAULT_TIME_FLOOR * 1e3:.0f} ms, whichever is greater "
                  "(IEC 60255-149 template)")


def _duration(expected: float) -> float | None:
    """How long to inject a long timed test: the expected time plus its tolerance and 10 % [s]."""
    return round(expected * 1.2 + 1.0, 1) if expected > LONG_TEST else None


def operate_time(ctx: StudyContext, current: float, prior: float = 0.0) -> float:
    """The chosen replica's operate time at ``current`` [A] from a prior steady current [A] [s]."""
    c = chosen(ctx, FID)
    return thermal_operate_time(current, c["pickup"], c["tau"], prior) if c else math.inf
