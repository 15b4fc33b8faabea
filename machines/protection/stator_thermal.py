"""49 stator thermal protection of a generator: IEC 60255-149 replica against the armature's short-time capability.

The replica's pickup k·I_r is a little above rated current; its heating time constant is the largest for which the
replica, starting hot from rated current, trips with a margin inside the armature's short-time capability at every
point of the curve that applies to the machine (IEEE C50.13 for cylindrical rotors from 10 MVA: 226 % 10 s … 116 %
120 s, i.e. (I² − 1)·t ≈ 41 s; otherwise IEC 60034-1's 150 % for 30 s, which applies to every AC generator up to
1200 MVA; METHODS.md §10).
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, balanced, current_setting, timed_test_point
from machines.record import Check, FunctionSettings, Setting
from machines.standards.generator_capability import armature_capability_constant, armature_points
from machines.standards.thermal_replica import thermal_level, thermal_operate_time

FID = "49"
PICKUP = 1.05  #: k: pickup at 105 % of rated current (METHODS.md §2.4; common practice)
ALARM_LEVEL = 0.95  #: alarm at 95 % of the trip level (METHODS.md §2.4: 80–95 %; common practice)
TEST_MULTIPLES = (1.3, 1.54, 2.26)  #: test currents, pu of rated
#: the replica trips by this fraction of the capability time at each point, leaving room for the relay's timing
#: error and the replica's fit (common practice, no published source)
CAPABILITY_MARGIN = 0.9


def fitted_time_constant(k: float, points, margin: float = 1.0) -> float | None:
    """Largest τ [s] for which the hot replica (prior current 1 pu) trips within ``margin`` × each (I [pu], t [s])
    point; None when the pickup k is above every point (no τ protects any of them).

    Notes
    -----
    τ = min over the points of margin·t / ln[(I² − 1)/(I² − k²)], the hot operate time of IEC 60255-149 solved
    for τ.

    >>> round(fitted_time_constant(1.05, ((1.16, 120.0),)), 1)
    341.1
    """
    taus = [margin * t / math.log((i * i - 1.0) / (i * i - k * k)) for i, t in points if i > k]
    return min(taus) if taus else None


def settings(ctx: StudyContext) -> FunctionSettings:
    """49: pickup, heating and cooling time constants, checked against the armature's short-time capability."""
    basis, case = ctx.extras["generator"], ctx.case
    ir, ct = basis.rated_current, basis.ct
    practice = case.study.practice
    m = case.machine
    points, curve_ref = armature_points(practice, m.rotor, m.rated_apparent_power)
    checks: list[Check] = []
    pickup, p_src = ctx.choose(FID, "pickup_current", PICKUP * ir, "current", "A", "common-practice")
    k = pickup / ir
    if k <= 1.0:
        checks.append(Check("fail", f"Pickup {k:.3g} pu is not above rated current: the replica trips at rated "
                                    f"load."))
        tau0 = 600.0
    else:
        tau0 = fitted_time_constant(k, points, CAPABILITY_MARGIN)
        if tau0 is None:
            checks.append(Check("fail", f"Pickup {k:.3g} pu is above every point of the armature's short-time "
                                        f"capability ({curve_ref}): the replica protects none of it."))
            tau0 = 600.0
    maker_tau = m.heating_time_constant
    tau, tau_src = ctx.choose(FID, "heating_time_constant", maker_tau or tau0, "time", "s",
                              "maker-data" if maker_tau else "standard", rounding="down")
    tauc, tauc_src = ctx.choose(FID, "cooling_time_constant", m.cooling_time_constant or tau, "time", "s",
                                "maker-data" if m.cooling_time_constant else
                                "common-practice" if tau_src != "override" else "override")
    alarm, a_src = ctx.choose(FID, "alarm_level", ALARM_LEVEL, "per_unit", "", "common-practice")
    const = armature_capability_constant(practice, points)
    for i, t_cap in points:
        if i <= k:
            checks.append(Check("warn", f"At {i:.3g} pu the replica (pickup {k:.3g} pu) never trips: the armature's "
                                        f"{t_cap:.3g} s capability there is not protected."))
            continue
        t_hot = thermal_operate_time(i * ir, pickup, tau, ir)
        if t_hot <= CAPABILITY_MARGIN * t_cap * (1 + 1e-6):
            checks.append(Check("ok", f"At {i:.3g} pu the replica trips in {t_hot:.3g} s from rated load, within "
                                      f"{CAPABILITY_MARGIN:.0%} of the armature's {t_cap:.3g} s ({curve_ref})."))
        elif t_hot < t_cap:
            checks.append(Check("warn", f"At {i:.3g} pu the replica trips in {t_hot:.3g} s from rated load, within "
                                        f"the armature's {t_cap:.3g} s but with less than "
                                        f"{1 - CAPABILITY_MARGIN:.0%} margin for timing error."))
        else:  # with the maker's own constant the standard's curve is a reference, not the machine's limit
            checks.append(Check("warn" if tau_src == "maker-data" else "fail",
                                f"At {i:.3g} pu the replica trips in {t_hot:.3g} s from rated load, not before the "
                                f"armature's short-time capability {t_cap:.3g} s"
                                + (" in the standard; confirm the maker's time constant covers it." if
                                   tau_src == "maker-data" else ".")))
    level_rated = thermal_level(ir, pickup, tau, 20.0 * tau)
    if level_rated < alarm:
        checks.append(Check("ok", f"At rated current the replica settles at {level_rated:.1%}, below the alarm "
                                  f"level {alarm:.0%}."))
    else:
        checks.append(Check("warn", f"At rated current the replica settles at {level_rated:.1%}, at or above the "
                                    f"alarm level {alarm:.0%}: the alarm will stand in normal service."))
    checks.append(Check("ok", "Use RTDs in the stator slots where fitted: the replica does not see loss of cooling."))
    values = {
        "pickup_current": current_setting(pickup, ct, p_src, "Pickup k·I_r", f"{k:.3g} × rated current"),
        "heating_time_constant": Setting(tau, "s", tau_src, label="Heating time constant",
                                         note=f"fitted inside the armature short-time capability "
                                              f"((I²−1)·t ≈ {const:.3g} s; {curve_ref})" if tau_src == "standard" else
                                         "the maker's" if tau_src == "maker-data" else ""),
        "cooling_time_constant": Setting(tauc, "s", tauc_src, label="Cooling time constant",
                                         note="the maker's" if tauc_src == "maker-data" else
                                         "equal to heating while running; ask the maker for standstill"),
        "alarm_level": Setting(alarm, "pu", a_src, label="Alarm level (fraction of trip level)"),
    }
    tests = []
    hot = {"phases": balanced(ct.to_secondary(ir)), "duration": 5.0 * tau}
    for mult in TEST_MULTIPLES:
        i_a = mult * ir
        tests.append(timed_test_point("phase current", ct.to_secondary(i_a), "A",
                                      thermal_operate_time(i_a, pickup, tau, ir), applied_primary=i_a,
                                      primary_unit="A", initial_state="hot: steady at rated current",
                                      prefault=hot, description=f"{mult:g} × rated from rated load"))
    i_a = 2.0 * ir
    tests.append(timed_test_point("phase current", ct.to_secondary(i_a), "A",
                                  thermal_operate_time(i_a, pickup, tau), applied_primary=i_a, primary_unit="A",
                                  initial_state="cold: replica reset", description="2 × rated from cold"))
    if tau_src == "standard":
        why_tau = (f"the heating time constant {tau:.4g} s is the largest for which the replica, hot from rated load, "
                   f"trips within {CAPABILITY_MARGIN:.0%} of the armature short-time capability at each of its points "
                   f"({curve_ref})")
    else:
        why_tau = (f"the heating time constant {tau:.4g} s is the {'maker' if tau_src == 'maker-data' else 'engineer'}"
                   f"'s, checked against the armature short-time capability ({curve_ref})")
    cooling = ("the maker's cooling constant" if tauc_src == "maker-data" else
               "cooling constant equal to heating while the machine runs")
    basis_text = f"IEC 60255-149 thermal replica with pickup {k:.3g} × rated current; {why_tau}; {cooling}."
    return FunctionSettings(FID, "Stator thermal overload", values, basis_text,
                            references=["IEC 60255-149", curve_ref],
                            checks=checks, test_points=tests)
