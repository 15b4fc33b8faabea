"""49 stator thermal overload of an induction motor: an IEC 60255-149 thermal replica.

Rule:
- Pickup k·I_B: service factor + 0.05 pu (1.05 × FLC for SF 1.0, 1.20 × FLC for SF 1.15; METHODS.md §2.4 [P]) and
  never above the NEC 430.32(A)(1) limit (1.25 / 1.15 × FLC).
- Heating time constant: the maker's, else fitted so that the replica, running hot at rated current, trips at the
  locked-rotor current (upper bound) in the hot safe stall time. A single time constant cannot honour both stall
  times (METHODS.md §2.2): fitted to the cold stall it trips a hot start far too early; fitted to the hot stall it is
  slow from cold. We fit to the hot stall so that a start the motor can take is never tripped, and leave the stall
  from cold to 51LR, whose delay is below the hot (and so the cold) safe stall time. The record shows the operate
  times at locked-rotor current from cold and hot with their margins.
- Cooling (standstill) time constant: the maker's, else 3 × heating (METHODS.md §2.3: 2–6 × [P]).
  When a start from hot at minimum voltage would use more than 90 % of the capacity left by that fitted τ, the
  computed τ is lengthened until it does not (a warning says so; the hot stall is then 51LR's alone).
- The replica is run through the computed starts (minimum and computed voltage), cold and hot; a trip there (with
  a maker's or overridden τ) fails the check. The alarm level (95 %) must lie above the level at service-factor
  load.
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, FunctionSettings, Setting
from machines.standards.overload_limits import nec_overload_limit
from machines.standards.thermal_replica import (
    start_capacity, thermal_level_profile, thermal_operate_time, time_constant_from_trip_time,
)

FID = "49"
PICKUP_ABOVE_SF = 0.05  #: pickup = (service factor + this) × FLC [pu]; METHODS.md §2.4, common practice
COOLING_RATIO = 3.0  #: standstill cooling constant / heating constant when the maker gives none; METHODS.md §2.3 [P]
ALARM_LEVEL = 0.95  #: thermal alarm level [-]; METHODS.md §2.4 (80–95 %), above the level at service-factor load [P]
START_SHARE = 0.90  #: a hot start at minimum voltage may use at most this share of the capacity left [-] [P]
TEST_MULTIPLES = (2.0, 3.0, 5.0)  #: test currents, multiples of the pickup [-]


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
    for _ in range(60):
        mid = math.sqrt(lo * hi)
        if replica_through_start(start, pickup, mid, initial_level)[0] > peak:
            lo = mid
        else:
            hi = mid
    return hi


def settings(ctx: StudyContext) -> FunctionSettings:
    m = ctx.case.machine
    b = basis_of(ctx)
    flc = b.flc
    checks: list[Check] = []
    limit = nec_overload_limit(m.service_factor, m.temperature_rise)
    k = min(m.service_factor + PICKUP_ABOVE_SF, limit)
    pickup, p_src = ctx.choose(FID, "pickup_current", k * flc, "current", "A", "common-practice")
    if pickup <= flc:
        checks.append(Check("fail", f"The overload pickup {pickup:.1f} A is at or below the full-load current "
                                    f"{flc:.1f} A: the motor would trip at rated load."))
    elif pickup > limit * flc * (1 + 1e-9):
        status = "fail" if ctx.case.study.practice == "IEEE" else "warn"
        checks.append(Check(status, f"The overload pickup {pickup:.1f} A is above the NEC 430.32(A)(1) limit of "
                                    f"{limit:.0%} of FLC ({limit * flc:.1f} A)."))
    elif pickup < m.service_factor * flc:
        checks.append(Check("warn", f"The overload pickup {pickup:.1f} A is below the service-factor load "
                                    f"{m.service_factor * flc:.1f} A: the motor may trip while running within its "
                                    "service factor."))
    else:
        checks.append(Check("ok", f"The overload pickup {pickup / flc:.2f} × FLC is above the service-factor load "
                                  f"and within the NEC 430.32(A)(1) limit of {limit:.0%}."))

    i_lr = b.lr_high
    if m.heating_time_constant:
        tau0, t_src, t_basis = m.heating_time_constant, "maker-data", "the maker's heating time constant"
    elif pickup > flc and i_lr > pickup:
        tau0 = time_constant_from_trip_time(m.safe_stall_time_hot, i_lr, pickup, flc)
        t_src, t_basis = "derived", "fitted to the hot safe stall time at locked-rotor current (single-body replica)"
        if b.start_min.accelerates:
            need = time_constant_for_start(b.start_min, pickup, (flc / pickup) ** 2)
            if need > tau0:
                tau0 = need
                t_basis = (f"lengthened beyond the hot-stall fit so that a start from hot at minimum voltage "
                           f"uses at most {START_SHARE:.0%} of the capacity left (the start takes longer than the "
                           "replica fitted to the hot stall allows; the stall is left to 51LR)")
                checks.append(Check("warn", "The heating time constant was lengthened beyond the hot-stall fit so "
                                            "that a start from hot does not trip: a stall from hot is then protected "
                                            "by 51LR alone. Ask the maker for the acceleration thermal limit."))
    else:
        tau0, t_src, t_basis = 1800.0, "common-practice", "a 30 min default (the fit needs FLC < pickup < I_LR)"
    tau, t_src = ctx.choose(FID, "heating_time_constant", tau0, "time", "s", t_src, rounding="down")
    if not tau > 0.0:
        checks.append(Check("fail", "The heating time constant must be positive."))
        tau = tau0
    if m.cooling_time_constant:
        tc0, c_src = m.cooling_time_constant, "maker-data"
    else:
        tc0, c_src = COOLING_RATIO * tau, "common-practice"
    tau_c, c_src = ctx.choose(FID, "cooling_time_constant", tc0, "time", "s", c_src)
    if tau_c < tau:
        checks.append(Check("warn", f"The cooling time constant ({tau_c / 60:.1f} min) is shorter than the heating "
                                    f"time constant ({tau / 60:.1f} min); a stopped motor cools more slowly than a "
                                    "running one. Check the maker's data."))

    alarm, a_src = ctx.choose(FID, "alarm_level", ALARM_LEVEL, "per_unit", "", "common-practice")
    theta_sf = (m.service_factor * flc / pickup) ** 2
    if alarm <= theta_sf:
        checks.append(Check("warn", f"The thermal alarm level {alarm:.0%} is not above the level reached at "
                                    f"service-factor load ({theta_sf:.0%}): the alarm would stand in normal running."))
    # operate times at locked-rotor current, cold and hot, against the stall times
    t_cold = thermal_operate_time(i_lr, pickup, tau)
    t_hot = thermal_operate_time(i_lr, pickup, tau, flc)
    margin_cold = m.safe_stall_time_cold - t_cold
    margin_hot = m.safe_stall_time_hot - t_hot
    if t_cold > m.safe_stall_time_cold:
        checks.append(Check("ok", f"From cold the replica trips a locked rotor in {t_cold:.1f} s, later than the cold "
                                  f"safe stall time {m.safe_stall_time_cold:.1f} s: a single time constant cannot "
                                  "match both stall times, and the stall from cold is left to 51LR."))
    if t_hot > m.safe_stall_time_hot * 1.001:
        checks.append(Check("warn", f"From hot the replica trips a locked rotor in {t_hot:.1f} s, later than the hot "
                                    f"safe stall time {m.safe_stall_time_hot:.1f} s: the stall relies on 51LR alone."))
    # no trip during a normal start
    theta_hot0 = (flc / pickup) ** 2
    for name, start in (("minimum", b.start_min), ("computed", b.start_normal)):
        if not start.accelerates:
            continue
        peak_c, _ = replica_through_start(start, pickup, tau, 0.0)
        peak_h, _ = replica_through_start(start, pickup, tau, theta_hot0)
        if peak_h >= 1.0 or peak_c >= 1.0:
            state = "cold" if peak_c >= 1.0 else "hot"
            checks.append(Check("fail", f"The thermal replica would trip during a normal start from {state} at the "
                                        f"{name} starting voltage ({start.voltage:.3f} pu, {start.acceleration_time:.1f}"
                                        " s): lengthen the heating time constant or use a start-mode thermal model."))
            break
    else:
        if b.start_min.accelerates:
            _, end_h = replica_through_start(b.start_min, pickup, tau, theta_hot0)
            checks.append(Check("ok", f"The replica does not trip during a start at minimum voltage: from hot it "
                                      f"reaches {end_h:.0%} of its trip level."))
    if b.start_min.accelerates:
        _, end_c = replica_through_start(b.start_min, pickup, tau, 0.0)
        ctx.derived["thermal_capacity_per_start"] = Setting(end_c, "pu", "derived",
                                                            label="Replica thermal capacity one start uses (cold)")
        heat = b.start_min.i2t() / (b.lr_current ** 2 * m.safe_stall_time_cold)
        ctx.derived["start_heat_fraction"] = Setting(heat, "pu", "derived",
                                                     label="Rotor heat of one start / cold stall heat",
                                                     note="∫I²dt / (I_LR²·t_sc), adiabatic")
        tau_cold_fit = time_constant_from_trip_time(m.safe_stall_time_cold, i_lr, pickup) if i_lr > pickup else tau
        ctx.derived["start_capacity_reference"] = Setting(
            start_capacity(b.start_min.acceleration_time, m.safe_stall_time_cold, tau_cold_fit), "pu", "derived",
            label="Start capacity (replica fitted to cold stall)", note="(1 − e^(−t_st/τ))/(1 − e^(−t_sc/τ)), τ fitted to cold stall")

    ct = ctx.ct
    s = {
        "pickup_current": current_setting(pickup, ct, p_src, "Pickup current k·I_B",
                                          note=f"{pickup / flc:.3f} × FLC"),
        "heating_time_constant": Setting(tau, "s", t_src, label="Heating time constant", note=f"{tau / 60:.1f} min"),
        "cooling_time_constant": Setting(tau_c, "s", c_src, label="Cooling time constant (standstill)",
                                         note=f"{tau_c / 60:.1f} min"),
        "alarm_level": Setting(alarm, "pu", a_src, label="Thermal alarm level"),
        "trip_time_locked_rotor_cold": Setting(t_cold, "s", "derived", label="Operate time at I_LR from cold",
                                               note=f"margin to cold stall {margin_cold:+.1f} s"),
        "trip_time_locked_rotor_hot": Setting(t_hot, "s", "derived", label="Operate time at I_LR from hot",
                                              note=f"margin to hot stall {margin_hot:+.1f} s"),
    }
    chosen(ctx, FID).update(pickup=pickup, tau=tau, tau_c=tau_c)
    tps = []
    for mult in TEST_MULTIPLES:
        i = mult * pickup
        t = thermal_operate_time(i, pickup, tau)
        tps.append(timed_test_point("current", ct.to_secondary(i), "A", t, applied_primary=i, primary_unit="A",
                                    initial_state="cold",
                                    description=f"{mult:g} × pickup, three-phase balanced, replica reset to cold"))
    tps.append(timed_test_point("current", ct.to_secondary(0.97 * pickup), "A", None, applied_primary=0.97 * pickup,
                                primary_unit="A", initial_state="cold",
                                description="0.97 × pickup: must not operate (level settles below trip)"))
    basis = (f"Pickup {pickup / flc:.2f} × FLC from the service factor {m.service_factor:g} (never above the NEC "
             f"430.32 limit {limit:.0%}). Heating time constant {tau / 60:.1f} min: {t_basis}; from hot it trips a "
             f"locked rotor in {t_hot:.1f} s (hot stall {m.safe_stall_time_hot:g} s), from cold in {t_cold:.1f} s "
             f"(cold stall {m.safe_stall_time_cold:g} s, covered by 51LR). Cooling constant {tau_c / 60:.1f} min.")
    return FunctionSettings(FID, "Stator thermal overload (thermal replica)", s, basis,
                            ["IEC 60255-149:2013 thermal replica", "NFPA 70 (NEC) 430.32(A)(1)"], checks, tps)


def operate_time(ctx: StudyContext, current: float, prior: float = 0.0) -> float:
    """The chosen replica's operate time at ``current`` [A] from a prior steady current [A] [s]."""
    c = chosen(ctx, FID)
    return thermal_operate_time(current, c["pickup"], c["tau"], prior) if c else math.inf
