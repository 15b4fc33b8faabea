"""46 current unbalance / negative sequence of an induction motor.

Rule (METHODS.md §5.3, 5.4 [P]): alarm at I2 = 10 % of FLC for 10 s, trip at 20 % for 4 s (longer than external
unbalanced faults take to clear), single-phasing stage at I2/I1 ≥ 50 % for 2 s. The rotor heating weight
K = T_LR / (s_FL · I_LR²) (rotor resistance at 2f over that at rated slip) biases the replica,
I_eq² = I1² + K·I2², and the adiabatic I2²t limit K2 = I_LR²·t_sc bounds the definite trip. The voltage-unbalance
derating is recorded as a derived table beside the current unbalance each voltage unbalance causes: NEMA MG 1
Fig. 14-1 under IEEE practice, IEC 60034-26 under IEC practice.

Every test point injects a positive-sequence current of about FLC plus the negative-sequence current under test,
so that the sequence quantities it makes satisfy every stage as the test expects (:func:`operate_time`).
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, current_setting, from_sequence, timed_test_point
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, FunctionSettings, Setting
from machines.standards.nema import unbalance_derating_factor
from machines.standards.unbalance import (
    adiabatic_negative_sequence_constant, derating_from_heating_weight, heating_weight_175_rule,
    heating_weight_from_rotor_resistance, iec_unbalance_derating_factor, negative_sequence_current_ratio,
)

FID = "46"
ALARM = 0.10  #: alarm I2 [pu of FLC] [P]
TRIP = 0.20  #: trip I2 [pu of FLC] [P]
ALARM_DELAY = 10.0  #: [s] [P]
TRIP_DELAY = 4.0  #: [s] [P] (METHODS.md §5.4: 2–10 s)
SINGLE_PHASING_RATIO = 0.5  #: I2/I1 [-] [P] (METHODS.md §5.4: 40–50 %)
SINGLE_PHASING_DELAY = 2.0  #: [s] [P]
MIN_EXTERNAL_CLEARING = 1.0  #: delays shorter than this risk tripping on external unbalanced faults [s] [P]


def derating_table(lr_pu: float, heating_weight: float, practice: str = "IEEE") -> list[dict]:
    """Rows of the voltage-unbalance derating table: the practice's curve (NEMA MG 1 or IEC 60034-26), the K model
    and the current unbalance caused."""
    rows = []
    for vu in (0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 4.5, 5.0):
        row = {"voltage_unbalance_percent": vu}
        if practice == "IEC":
            row["derating_iec_60034_26"] = iec_unbalance_derating_factor(vu)
        else:
            row["derating_nema"] = unbalance_derating_factor(vu)
        row["derating_heating_weight"] = derating_from_heating_weight(heating_weight, lr_pu, vu / 100)
        row["current_unbalance_percent"] = 100 * negative_sequence_current_ratio(vu / 100, lr_pu)
        rows.append(row)
    return rows


def operate_time(s: dict, i1: float, i2: float) -> float | None:
    """Expected trip time of 46 with every stage enabled, for positive- and negative-sequence currents [A primary]
    [s]; None when no trip stage operates (the alarm stage is an alarm, not a trip).

    >>> operate_time({"pickup": 20.0, "delay": 4.0, "ratio": 0.5, "ratio_delay": 2.0}, 100.0, 30.0)
    4.0
    >>> operate_time({"pickup": 20.0, "delay": 4.0, "ratio": 0.5, "ratio_delay": 2.0}, 57.7, 57.7)
    2.0
    """
    times = []
    if i2 >= s["pickup"]:
        times.append(s["delay"])
    if i1 > 0.0 and i2 / i1 >= s["ratio"] or i1 == 0.0 and i2 > 0.0:
        times.append(s["ratio_delay"])
    return min(times) if times else None


def settings(ctx: StudyContext) -> FunctionSettings:
    m = ctx.case.machine
    practice = ctx.case.study.practice
    b = basis_of(ctx)
    flc, ct = b.flc, ctx.ct
    lr_pu = b.lr_pu()
    checks: list[Check] = []
    k_weight = heating_weight_from_rotor_resistance(m.locked_rotor_torque, b.rated_slip, lr_pu)
    k2 = adiabatic_negative_sequence_constant(b.lr_low / flc, m.safe_stall_time_cold)
    alarm, a_src = ctx.choose(FID, "alarm_pickup_current", ALARM * flc, "current", "A", "common-practice",
                              rounding="down")
    alarm_delay, ad_src = ctx.choose(FID, "alarm_time_delay", ALARM_DELAY, "time", "s", "common-practice")
    pickup, p_src = ctx.choose(FID, "pickup_current", TRIP * flc, "current", "A", "common-practice",
                               rounding="down")
    delay, d_src = ctx.choose(FID, "time_delay", TRIP_DELAY, "time", "s", "common-practice")
    sp, sp_src = ctx.choose(FID, "single_phasing_ratio", SINGLE_PHASING_RATIO, "per_unit", "", "common-practice")
    sp_delay, spd_src = ctx.choose(FID, "single_phasing_time_delay", SINGLE_PHASING_DELAY, "time", "s",
                                   "common-practice")
    stages = {"pickup": pickup, "delay": delay, "ratio": sp, "ratio_delay": sp_delay}
    if alarm >= pickup:
        checks.append(Check("warn", f"The 46 alarm ({alarm:.1f} A) is not below the trip pickup ({pickup:.1f} A)."))
    if min(delay, sp_delay) < MIN_EXTERNAL_CLEARING:
        checks.append(Check("warn", f"A 46 delay below {MIN_EXTERNAL_CLEARING:g} s may trip the motor for an "
                                    "unbalanced fault elsewhere; coordinate with the feeder's earth-fault and phase "
                                    "protection clearing times."))
    else:
        checks.append(Check("ok", f"The 46 delays ({delay:g} s trip, {sp_delay:g} s single phasing) exceed "
                                  "typical external fault clearing times; confirm against the feeder protection."))
    if sp_delay > delay:
        checks.append(Check("warn", f"The single-phasing delay {sp_delay:g} s is longer than the trip delay {delay:g} s: "
                                    "a lost phase at load is tripped by the I2 stage first."))
    heat = (pickup / flc) ** 2 * delay
    if heat >= k2:
        checks.append(Check("fail", f"At the 46 pickup the rotor gets I2²t = {heat:.1f} s before the trip, above the "
                                    f"adiabatic limit K2 = I_LR²·t_sc = {k2:.0f} s."))
    vu_alarm = 100 * (alarm / flc) / lr_pu
    vu_trip = 100 * (pickup / flc) / lr_pu
    derate = (iec_unbalance_derating_factor if practice == "IEC" else unbalance_derating_factor)
    curve = "IEC 60034-26" if practice == "IEC" else "NEMA MG 1"
    if vu_trip > 5.0:
        checks.append(Check("warn", f"The 46 trip corresponds to a voltage unbalance of about {vu_trip:.1f} %, above "
                                    f"the 5 % {curve} does not recommend operating at: lower the pickup."))
    else:
        checks.append(Check("ok", f"The 46 alarm acts at about {vu_alarm:.1f} % voltage unbalance and the trip at "
                                  f"about {vu_trip:.1f} % (I2/I1 ≈ I_LR × V2/V1), where {curve} derates the motor "
                                  f"to {derate(min(vu_trip, 5.0)):.2f}."))
    ctx.derived["voltage_unbalance_derating"] = Setting(
        derating_table(lr_pu, k_weight, practice), "", "derived", label="Voltage-unbalance derating",
        note=("IEC 60034-26 figure digitised [from memory]" if practice == "IEC" else "NEMA MG 1 Fig. 14-1 digitised")
        + "; K model d = 1/√(1 + K·(I_LR·u)²)")
    ctx.derived["negative_sequence_heating_weight"] = Setting(
        k_weight, "", "derived", label="I2 heating weight K (replica bias)",
        note=f"K = T_LR/(s·I_LR²); the 175/I_LR² rule gives {heating_weight_175_rule(lr_pu):.2f}")
    ctx.derived["negative_sequence_k2"] = Setting(k2, "s", "derived", label="Rotor I2²t limit K2 = I_LR²·t_sc")
    chosen(ctx, FID).update(k=k_weight, alarm=alarm, **stages)
    s = {
        "pickup_current": current_setting(pickup, ct, p_src, "Trip pickup, negative-sequence current I2",
                                          note=f"{pickup / flc:.0%} of FLC"),
        "time_delay": Setting(delay, "s", d_src, label="Trip delay"),
        "alarm_pickup_current": current_setting(alarm, ct, a_src, "Alarm pickup, I2", note=f"{alarm / flc:.0%} of FLC"),
        "alarm_time_delay": Setting(alarm_delay, "s", ad_src, label="Alarm delay"),
        "single_phasing_ratio": Setting(sp, "pu", sp_src, label="Single-phasing stage, I2/I1"),
        "single_phasing_time_delay": Setting(sp_delay, "s", spd_src, label="Single-phasing delay"),
    }
    tps = _test_points(ct, flc, stages, alarm, alarm_delay)
    basis = (f"Alarm at I2 = {alarm / flc:.0%} and trip at {pickup / flc:.0%} of FLC for {delay:g} s (longer than "
             f"external unbalanced faults take to clear); single phasing at I2/I1 ≥ {sp:.0%} for {sp_delay:g} s. "
             f"Heating weight K = T_LR/(s_FL·I_LR²) = {k_weight:.2f}; rotor limit K2 = I_LR²·t_sc = {k2:.0f} s.")
    refs = (["IEC 60034-26 (voltage unbalance derating) [figure from memory]", "IEC 60034-1"] if practice == "IEC"
            else ["NEMA MG 1 14.36 and Fig. 14-1 (voltage unbalance derating)", "IEC 60034-1"])
    return FunctionSettings(FID, "Current unbalance / negative sequence", s, basis,
                            refs + ["heating weight K = T_LR/(s·I_LR²) from the rotor equivalent circuit [derived]"],
                            checks, tps)


def _test_points(ct, flc: float, stages: dict, alarm: float, alarm_delay: float) -> list:
    """Tests at I1 = FLC with the I2 under test (and the single-phasing test at I1 = I2), each expected time from
    every stage."""
    pickup, delay, sp_delay = stages["pickup"], stages["delay"], stages["ratio_delay"]
    longest = max(delay, sp_delay)

    def tp(i1: float, i2: float, description: str, angle2: float = 0.0, quantity: str = "negative-sequence current",
           applied: float | None = None):
        t = operate_time(stages, i1, i2)
        phases = from_sequence(ct.to_secondary(i1), ct.to_secondary(i2) * complex(math.cos(math.radians(angle2)),
                                                                                   math.sin(math.radians(angle2))))
        shown = i2 if applied is None else applied
        return timed_test_point(quantity, ct.to_secondary(shown), "A", t, applied_primary=shown, primary_unit="A",
                                phases=phases, duration=None if t is not None else round(longest + 2.0, 1),
                                description=description)

    def alarm_in(i2: float, injected: float) -> str:
        """What the alarm output does in the injection: with every stage in service the technician sees it too."""
        if i2 <= alarm:
            return "the alarm output does not operate either (below its pickup)"
        if alarm_delay <= injected:
            return f"the alarm output operates after {alarm_delay:g} s"
        return f"the alarm output does not operate either (its delay, {alarm_delay:g} s, is longer)"

    i1 = flc
    out = [
        tp(i1, 0.9 * pickup, f"I1 = FLC with I2 = 0.9 × pickup ({0.9 * pickup / i1:.0%} of I1): the trip must not "
                             f"operate (inject {longest + 2:g} s); {alarm_in(0.9 * pickup, longest + 2.0)}"),
        tp(i1, 1.5 * pickup, f"I1 = FLC with I2 = 1.5 × pickup ({1.5 * pickup / i1:.0%} of I1): trips after the "
                             "I2 delay"),
    ]
    if 1.5 * alarm < pickup:
        t_alarm = alarm_delay
        phases = from_sequence(ct.to_secondary(i1), ct.to_secondary(1.5 * alarm))
        out.append(timed_test_point("negative-sequence current (alarm output)", ct.to_secondary(1.5 * alarm), "A",
                                    t_alarm, applied_primary=1.5 * alarm, primary_unit="A", phases=phases,
                                    description=f"I1 = FLC with I2 = 1.5 × the alarm pickup: the alarm output "
                                                f"operates after {alarm_delay:g} s; the trip must not operate"))
    # phase A open with FLC flowing in B and C in antiphase: I2 = −I1, |I1| = |I2| = FLC/√3, I2/I1 = 1
    i_seq = flc / math.sqrt(3.0)
    out.append(tp(i_seq, i_seq, "single phasing: phase A open, FLC in phases B and C in antiphase (I2/I1 = 1)",
                  angle2=180.0, quantity="current", applied=flc))
    return out
