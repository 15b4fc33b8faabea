"""24 overexcitation (volts per hertz) protection of a generator and its step-up transformer.

The guide (METHODS.md §9.3): the generator's limit (IEEE C50.13: 1.05 pu on its base) and the step-up transformer's
(IEEE C57.12.00: 1.05 pu at rated load on its LV base) are moved to a common base, the generator's, and the lower
governs. An alarm at the governing limit; a first trip stage about 5 % above it with a delay of about 45 s and a
second, faster stage about 13 % above it (1.10 and 1.18 pu for a 1.05 pu limit).
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext, balanced, timed_test_point
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting
from machines.standards.generator_capability import rebase_voltage_pu, volts_per_hertz

FID = "24"
TRIP1_STEP = 0.05  #: trip stage 1 at limit + 0.05 pu (METHODS.md §9.3: ≈ 1.10 pu; value from memory)
TRIP2_STEP = 0.13  #: trip stage 2 at limit + 0.13 pu (METHODS.md §9.3: ≈ 1.18–1.20 pu; value from memory)
ALARM_DELAY = 45.0  #: [s] METHODS.md §9.3: 45–60 s (value from memory)
TRIP1_DELAY = 45.0  #: [s] METHODS.md §9.3: 45–60 s (value from memory)
TRIP2_DELAY = 2.0  #: [s] METHODS.md §9.3: 2–6 s (value from memory)
SQRT3 = math.sqrt(3.0)
NORMAL_VOLTAGE = 1.05  #: IEEE C50.13 and IEC 60034-1 zone A: rated output within ±5 % voltage


def settings(ctx: StudyContext) -> FunctionSettings:
    """24: alarm and two trip stages on the lower of the generator's and transformer's limits."""
    case = ctx.case
    m, s = case.machine, case.supply
    basis = ctx.extras["generator"]
    vt = basis.vt
    checks: list[Check] = []
    g_limit = m.vhz_limit
    if basis.unit_connected:
        lv = s.transformer_lv_voltage
        if lv is None:
            lv = m.rated_voltage
            checks.append(Check("warn", "Step-up transformer LV rating not given (supply.transformer_lv_voltage): "
                                        "taken equal to the generator's rated voltage."))
        t_limit = rebase_voltage_pu(s.transformer_vhz_limit, lv, m.rated_voltage)
        limit = min(g_limit, t_limit)
        governs = "generator" if g_limit <= t_limit else "step-up transformer"
        checks.append(Check("ok", f"Limits on the generator base: generator {g_limit:.4g} pu, transformer "
                                  f"{s.transformer_vhz_limit:.4g} pu on {lv / 1e3:.4g} kV = {t_limit:.4g} pu; the "
                                  f"{governs} governs ({limit:.4g} pu)."))
    else:
        lv = t_limit = None
        limit, governs = g_limit, "generator"
        checks.append(Check("ok", ("Bus-connected" if basis.connection == "bus" else "No transformer of this unit "
                                   "is known") + f": the generator's own limit {g_limit:.4g} pu governs; a "
                                  f"transformer elsewhere on the system has its own V/Hz protection."))
    # rounded down: every stage stays at or below its target above the limit
    alarm, a_src = ctx.choose(FID, "alarm_pickup", limit, "per_unit", "", "standard", rounding="down")
    trip, t_src = ctx.choose(FID, "trip_pickup", limit + TRIP1_STEP, "per_unit", "", "common-practice",
                              rounding="down")
    delay, d_src = ctx.choose(FID, "time_delay", TRIP1_DELAY, "time", "s", "common-practice")
    trip2, t2_src = ctx.choose(FID, "trip2_pickup", limit + TRIP2_STEP, "per_unit", "", "common-practice",
                                rounding="down")
    delay2, d2_src = ctx.choose(FID, "trip2_time_delay", TRIP2_DELAY, "time", "s", "common-practice")
    adelay, ad_src = ctx.choose(FID, "alarm_time_delay", ALARM_DELAY, "time", "s", "common-practice")
    if alarm > limit + 1e-9:
        checks.append(Check("warn", f"Alarm {alarm:.4g} pu is above the governing limit {limit:.4g} pu: "
                                    f"continuous overexcitation goes unannounced."))
    if not alarm < trip < trip2:
        checks.append(Check("fail", f"Expected alarm < trip stage 1 < trip stage 2, got {alarm:.4g} / {trip:.4g} / "
                                    f"{trip2:.4g} pu."))
    if not delay2 < delay:
        checks.append(Check("warn", f"Stage 2 delay {delay2:g} s is not shorter than stage 1's {delay:g} s."))
    if trip > 1.2 + 1e-9:
        checks.append(Check("warn", f"Trip stage 1 at {trip:.4g} pu is above 1.2 pu: overexcitation beyond the "
                                    f"usual short-time capability would be allowed for {delay:g} s."))
    if limit < NORMAL_VOLTAGE - 1e-9:
        checks.append(Check("warn", f"The {governs}'s limit is {limit:.4g} pu on the generator base, below the "
                                    f"{NORMAL_VOLTAGE:g} pu at which the generator may run (IEEE C50.13; IEC "
                                    f"60034-1 zone A): the alarm will "
                                    f"operate in normal service above {limit:.4g} pu voltage; limit the voltage "
                                    f"regulator's set point or re-tap the transformer."))
    v_sec = m.rated_voltage if vt is None else vt.to_secondary(m.rated_voltage)
    f0 = m.frequency

    def vhz(value: float, src: str, label: str, note: str = "") -> Setting:
        # the relay takes V/Hz in per unit of its nominal (VT secondary at rated frequency); the volts per hertz on
        # the VT secondary are shown beside it
        vhz_sec = f"{value * v_sec / f0:.4g} V/Hz on the VT secondary"
        return Setting(value, "pu V/Hz", src, label=label, note=f"{note}; {vhz_sec}" if note else vhz_sec)

    example = "IEEE C37.102 example, value from memory"
    values = {
        "alarm_pickup": vhz(alarm, a_src, "Alarm pickup", f"governing limit ({governs})"),
        "alarm_time_delay": Setting(adelay, "s", ad_src, label="Alarm delay", note=example),
        "trip_pickup": vhz(trip, t_src, "Trip stage 1 pickup", f"limit + {TRIP1_STEP:g} pu; {example}"),
        "time_delay": Setting(delay, "s", d_src, label="Trip stage 1 delay", note=example),
        "trip2_pickup": vhz(trip2, t2_src, "Trip stage 2 pickup", f"limit + {TRIP2_STEP:g} pu; {example}"),
        "trip2_time_delay": Setting(delay2, "s", d2_src, label="Trip stage 2 delay", note=example),
    }
    stages = ((trip, delay), (trip2, delay2))

    def trip_time(level: float) -> float | None:
        times = [t for p, t in stages if level > p]
        return min(times) if times else None

    unit = "V" if vt is not None else "V (primary)"
    tests = []
    for name, level, t in (("alarm", alarm, adelay), ("trip stage 1", trip, None), ("trip stage 2", trip2, None)):
        applied = 1.02 * level
        expected = t if name == "alarm" else trip_time(applied)
        tests.append(timed_test_point("phase-to-phase voltage at rated frequency", applied * v_sec, unit, expected,
                                      frequency=f0, description=f"{name}: 102 % of pickup, {f0:g} Hz "
                                      f"({volts_per_hertz(applied, 1.0):.4g} pu V/Hz)"))
    f_test = f0 / (1.02 * trip)
    tests.append(timed_test_point("frequency at rated voltage", f_test, "Hz", trip_time(1.02 * trip),
                                  frequency=f_test, voltage_phases=None if vt is None else
                                  balanced(v_sec / SQRT3, 30.0),
                                  description=f"trip stage 1 by frequency: rated voltage at {f_test:.4g} Hz"))
    tests.append(timed_test_point("phase-to-phase voltage at rated frequency", 0.98 * alarm * v_sec, unit, None,
                                  frequency=f0, description="98 % of the alarm pickup: must not operate",
                                  duration=hold_time(adelay)))
    limits = (f"the lower of the generator's {g_limit:.4g} pu and the transformer's {t_limit:.4g} pu (its "
              f"{s.transformer_vhz_limit:.4g} pu moved from {lv / 1e3:.4g} kV) governs" if t_limit is not None
              else f"the generator's own {g_limit:.4g} pu governs")
    basis_text = (f"Volts per hertz on the generator base; {limits}. Alarm at the limit after {adelay:g} s; trip {trip:.4g} pu after {delay:g} s "
                  f"and {trip2:.4g} pu after {delay2:g} s (steps and delays: IEEE C37.102 example, from memory), "
                  f"below typical short-time overexcitation curves; replace by an inverse curve fitted below the "
                  f"makers' curves where they are known.")
    refs = ["IEEE C37.102 (example values, from memory)", "IEEE C50.13"]
    if t_limit is not None:
        refs.append("IEEE C57.12.00")
    return FunctionSettings(FID, "Overexcitation (V/Hz)", values, basis_text, references=refs, checks=checks,
                            test_points=tests)
