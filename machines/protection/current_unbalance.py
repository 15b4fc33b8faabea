"""46 current unbalance / negative sequence of an induction motor.

Rule (METHODS.md §5.3, 5.4 [P]): alarm at I2 = 10 % of FLC for 10 s, trip at 20 % for 4 s (longer than external
unbalanced faults take to clear), single-phasing stage at I2/I1 ≥ 50 % for 2 s. The rotor heating weight
K = T_LR / (s_FL · I_LR²) (rotor resistance at 2f over that at rated slip) biases the replica,
I_eq² = I1² + K·I2², and the adiabatic I2²t limit K2 = I_LR²·t_sc bounds the definite trip. The NEMA MG 1
voltage-unbalance derating is recorded as a derived table beside the current unbalance each voltage unbalance causes.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, FunctionSettings, Setting
from machines.standards.nema import unbalance_derating_factor
from machines.standards.unbalance import (
    adiabatic_negative_sequence_constant, derating_from_heating_weight, heating_weight_175_rule,
    heating_weight_from_rotor_resistance, negative_sequence_current_ratio,
)

FID = "46"
ALARM = 0.10  #: alarm I2 [pu of FLC] [P]
TRIP = 0.20  #: trip I2 [pu of FLC] [P]
ALARM_DELAY = 10.0  #: [s] [P]
TRIP_DELAY = 4.0  #: [s] [P] (METHODS.md §5.4: 2–10 s)
SINGLE_PHASING_RATIO = 0.5  #: I2/I1 [-] [P] (METHODS.md §5.4: 40–50 %)
SINGLE_PHASING_DELAY = 2.0  #: [s] [P]
MIN_EXTERNAL_CLEARING = 1.0  #: delays shorter than this risk tripping on external unbalanced faults [s] [P]


def derating_table(lr_pu: float, heating_weight: float) -> list[dict]:
    """Rows of the voltage-unbalance derating table: NEMA curve, the K model and the current unbalance caused."""
    rows = []
    for vu in (0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 4.5, 5.0):
        rows.append({"voltage_unbalance_percent": vu, "derating_nema": unbalance_derating_factor(vu),
                     "derating_heating_weight": derating_from_heating_weight(heating_weight, lr_pu, vu / 100),
                     "current_unbalance_percent": 100 * negative_sequence_current_ratio(vu / 100, lr_pu)})
    return rows


def settings(ctx: StudyContext) -> FunctionSettings:
    m = ctx.case.machine
    b = basis_of(ctx)
    flc, ct = b.flc, ctx.ct
    lr_pu = b.lr_pu()
    checks: list[Check] = []
    k_weight = heating_weight_from_rotor_resistance(m.locked_rotor_torque, b.rated_slip, lr_pu)
    k2 = adiabatic_negative_sequence_constant(b.lr_low / flc, m.safe_stall_time_cold)
    alarm, a_src = ctx.choose(FID, "alarm_pickup_current", ALARM * flc, "current", "A", "common-practice")
    alarm_delay, ad_src = ctx.choose(FID, "alarm_time_delay", ALARM_DELAY, "time", "s", "common-practice")
    pickup, p_src = ctx.choose(FID, "pickup_current", TRIP * flc, "current", "A", "common-practice")
    delay, d_src = ctx.choose(FID, "time_delay", TRIP_DELAY, "time", "s", "common-practice")
    sp, sp_src = ctx.choose(FID, "single_phasing_ratio", SINGLE_PHASING_RATIO, "per_unit", "", "common-practice")
    sp_delay, spd_src = ctx.choose(FID, "single_phasing_time_delay", SINGLE_PHASING_DELAY, "time", "s",
                                   "common-practice")
    if alarm >= pickup:
        checks.append(Check("warn", f"The 46 alarm ({alarm:.1f} A) is not below the trip pickup ({pickup:.1f} A)."))
    if min(delay, sp_delay) < MIN_EXTERNAL_CLEARING:
        checks.append(Check("warn", f"A 46 delay below {MIN_EXTERNAL_CLEARING:g} s may trip the motor for an "
                                    "unbalanced fault elsewhere; coordinate with the feeder's earth-fault and phase "
                                    "protection clearing times."))
    else:
        checks.append(Check("ok", f"The 46 delays ({delay:g} s trip, {sp_delay:g} s single phasing) exceed "
                                  "typical external fault clearing times; confirm against the feeder protection."))
    heat = (pickup / flc) ** 2 * delay
    if heat >= k2:
        checks.append(Check("fail", f"At the 46 pickup the rotor gets I2²t = {heat:.1f} s before the trip, above the "
                                    f"adiabatic limit K2 = I_LR²·t_sc = {k2:.0f} s."))
    vu_alarm = 100 * (alarm / flc) / lr_pu
    vu_trip = 100 * (pickup / flc) / lr_pu
    if vu_trip > 5.0:
        checks.append(Check("warn", f"The 46 trip corresponds to a voltage unbalance of about {vu_trip:.1f} %, above "
                                    "the 5 % NEMA MG 1 does not recommend operating at: lower the pickup."))
    else:
        checks.append(Check("ok", f"The 46 alarm acts at about {vu_alarm:.1f} % voltage unbalance and the trip at "
                                  f"about {vu_trip:.1f} % (I2/I1 ≈ I_LR × V2/V1), where NEMA MG 1 derates the motor "
                                  f"to {unbalance_derating_factor(min(vu_trip, 5.0)):.2f}."))
    ctx.derived["voltage_unbalance_derating"] = Setting(
        derating_table(lr_pu, k_weight), "", "derived", label="Voltage-unbalance derating",
        note="NEMA MG 1 Fig. 14-1 digitised; K model d = 1/√(1 + K·(I_LR·u)²)")
    chosen(ctx, FID).update(pickup=pickup, k=k_weight)
    s = {
        "pickup_current": current_setting(pickup, ct, p_src, "Trip pickup, negative-sequence current I2",
                                          note=f"{pickup / flc:.0%} of FLC"),
        "time_delay": Setting(delay, "s", d_src, label="Trip delay"),
        "alarm_pickup_current": current_setting(alarm, ct, a_src, "Alarm pickup, I2", note=f"{alarm / flc:.0%} of FLC"),
        "alarm_time_delay": Setting(alarm_delay, "s", ad_src, label="Alarm delay"),
        "single_phasing_ratio": Setting(sp, "pu", sp_src, label="Single-phasing stage, I2/I1"),
        "single_phasing_time_delay": Setting(sp_delay, "s", spd_src, label="Single-phasing delay"),
        "heating_weight": Setting(k_weight, "", "derived", label="I2 heating weight K (replica bias)",
                                  note=f"K = T_LR/(s·I_LR²); the 175/I_LR² rule gives {heating_weight_175_rule(lr_pu):.2f}"),
        "k2_adiabatic": Setting(k2, "s", "derived", label="Rotor I2²t limit K2 = I_LR²·t_sc"),
    }
    tps = [
        timed_test_point("negative-sequence current", ct.to_secondary(0.9 * pickup), "A", None,
                         applied_primary=0.9 * pickup, primary_unit="A",
                         description="balanced set with phases B and C swapped: 0.9 × pickup must not trip"),
        timed_test_point("negative-sequence current", ct.to_secondary(1.5 * pickup), "A", delay,
                         applied_primary=1.5 * pickup, primary_unit="A",
                         description="negative-sequence set 1.5 × pickup: trip after the delay"),
        timed_test_point("negative-sequence current", ct.to_secondary(1.5 * alarm), "A", alarm_delay,
                         applied_primary=1.5 * alarm, primary_unit="A", description="alarm stage"),
        timed_test_point("current", ct.to_secondary(flc), "A", sp_delay, applied_primary=flc, primary_unit="A",
                         description="single phasing: FLC in phases B and C in antiphase, A open (I2/I1 = 1)"),
    ]
    basis = (f"Alarm at I2 = {alarm / flc:.0%} and trip at {pickup / flc:.0%} of FLC for {delay:g} s (longer than "
             f"external unbalanced faults take to clear); single phasing at I2/I1 ≥ {sp:.0%} for {sp_delay:g} s. "
             f"Heating weight K = T_LR/(s_FL·I_LR²) = {k_weight:.2f}; rotor limit K2 = I_LR²·t_sc = {k2:.0f} s.")
    return FunctionSettings(FID, "Current unbalance / negative sequence", s, basis,
                            ["NEMA MG 1 14.36 and Fig. 14-1 (voltage unbalance derating)", "IEC 60034-1",
                             "heating weight K = T_LR/(s·I_LR²) from the rotor equivalent circuit [derived]"], checks, tps)
