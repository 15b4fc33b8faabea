"""32 reverse-power (anti-motoring) protection of a generator.

The guide (METHODS.md §9.1): the power that motors the unit at synchronous speed depends on the prime mover (the
maker's figure when the file gives it, else the handbook range); the pickup is a stated fraction of it; a long delay
rides through power swings and synchronising when the element acts alone, a short one when it is supervised by a
turbine-valves-closed (gate or fuel) signal for sequential tripping. The relay-side pickup is three-phase secondary
watts, P_sec = P_pri / (CTR · VTR), checked against the measuring range of the CT/VT circuit.
"""

from __future__ import annotations

import math

from machines.model import Ratio
from machines.protection.base import StudyContext, timed_test_point
from machines.record import Check, FunctionSettings, Setting
from machines.standards.generator_capability import motoring_power_fraction, secondary_power

FID = "32"
PICKUP_FRACTION = 0.5  #: pickup at 50 % of the motoring power (METHODS.md §9.1: 30–50 %; common practice)
UNSUPERVISED_DELAY = 10.0  #: [s] METHODS.md §9.1: 5–30 s (common practice)
SUPERVISED_DELAY = 2.0  #: [s] METHODS.md §9.1: ≈ 1–3 s with valves-closed supervision (common practice)
RANGE_OK = 0.01  #: pickup ≥ 1 % of the relay's nominal three-phase power: ordinary accuracy (common practice)
RANGE_FAIL = 0.001  #: below 0.1 %: beyond what the measuring chain resolves (common practice)


def settings(ctx: StudyContext) -> FunctionSettings:
    """32: pickup from the motoring power, delays with and without valve supervision, measuring-range check."""
    basis, m = ctx.extras["generator"], ctx.case.machine
    lowest, typical = motoring_power_fraction(m.prime_mover)
    checks: list[Check] = []
    if m.motoring_power is not None:
        motoring, mot_src, mot_note = m.motoring_power, "maker-data", "maker's motoring power"
    else:
        motoring, mot_src = typical * basis.rated_power, "standard"
        mot_note = f"{typical:.1%} of rated power, typical for a {m.prime_mover.replace('-', ' ')} (handbook range)"
    ctx.derived["motoring_power"] = Setting(motoring, "W", mot_src, label="Motoring power", note=mot_note)
    watts = None if basis.vt is None else Ratio(basis.ct.factor * basis.vt.factor, 1.0)  # P_sec = P / (CTR·VTR)
    pickup, p_src = ctx.choose(FID, "pickup_power", PICKUP_FRACTION * motoring, "active_power", "W",
                               "common-practice", via=watts, rounding="down")
    delay, d_src = ctx.choose(FID, "time_delay", UNSUPERVISED_DELAY, "time", "s", "common-practice")
    sdelay, sd_src = ctx.choose(FID, "supervised_time_delay", SUPERVISED_DELAY, "time", "s", "common-practice")
    if pickup <= 0:
        checks.append(Check("fail", "The reverse-power pickup must be a positive power."))
    if pickup < motoring:
        checks.append(Check("ok", f"Pickup {pickup / 1e3:.4g} kW is {pickup / motoring:.0%} of the motoring power "
                                  f"{motoring / 1e3:.4g} kW."))
    else:
        checks.append(Check("fail", f"Pickup {pickup / 1e3:.4g} kW is not below the motoring power "
                                    f"{motoring / 1e3:.4g} kW: motoring would not be detected."))
    if m.motoring_power is None and pickup > lowest * basis.rated_power:
        checks.append(Check("warn", f"A {m.prime_mover.replace('-', ' ')} can motor with as little as {lowest:.1%} "
                                    f"of rated power ({lowest * basis.rated_power / 1e3:.4g} kW), below this pickup: "
                                    f"enter the maker's motoring power (machine.motoring_power)."))
    vt = basis.vt
    sec = None
    if vt is None:
        checks.append(Check("warn", "No VT ratio: the secondary pickup in watts and the measuring range cannot be "
                                    "checked."))
    else:
        sec = secondary_power(pickup, basis.ct.factor, vt.factor)
        nominal = math.sqrt(3.0) * vt.secondary * basis.ct.secondary
        share = sec / nominal
        text = (f"Secondary pickup {sec:.4g} W three-phase is {share:.2%} of the relay's nominal "
                f"{nominal:.4g} W (√3·{vt.secondary:g} V·{basis.ct.secondary:g} A)")
        if share >= RANGE_OK:
            checks.append(Check("ok", text + "."))
        elif share >= RANGE_FAIL:
            checks.append(Check("warn", text + ": a sensitive, phase-angle-compensated element and metering-class "
                                               "CTs are advisable."))
        else:
            checks.append(Check("fail", text + ": below what the CT/VT and relay measure reliably; use dedicated "
                                               "CTs or a lower CT ratio."))
    if sdelay >= delay:
        checks.append(Check("warn", f"Supervised delay {sdelay:g} s is not shorter than the unsupervised {delay:g} s."))
    values = {
        "pickup_power": Setting(pickup, "W", p_src, secondary=sec, secondary_unit="" if sec is None else "W",
                                label="Pickup (reverse power, three-phase)",
                                note=f"{PICKUP_FRACTION:.0%} of the motoring power" if p_src != "override" else ""),
        "time_delay": Setting(delay, "s", d_src, label="Delay, unsupervised"),
        "supervised_time_delay": Setting(sdelay, "s", sd_src, label="Delay with turbine valves (gates, fuel) closed"),
    }
    to_sec = (lambda p: p) if vt is None else (lambda p: secondary_power(p, basis.ct.factor, vt.factor))
    unit = "W" if vt is not None else "W (primary)"
    tests = [timed_test_point("reverse active power", to_sec(0.8 * pickup), unit, None, applied_primary=0.8 * pickup,
                              primary_unit="W", description="80 % of pickup, reverse: must not trip"),
             timed_test_point("reverse active power", to_sec(1.5 * pickup), unit, delay,
                              applied_primary=1.5 * pickup, primary_unit="W", initial_state="valves open",
                              description="150 % of pickup, no valve supervision"),
             timed_test_point("reverse active power", to_sec(1.5 * pickup), unit, sdelay,
                              applied_primary=1.5 * pickup, primary_unit="W", initial_state="valves-closed input on",
                              description="150 % of pickup with the valves-closed input")]
    basis_text = (f"Motoring power {motoring / 1e3:.4g} kW ({mot_note}); pickup {PICKUP_FRACTION:.0%} of it so that "
                  f"motoring is seen with margin for measuring error. {delay:g} s alone rides through power swings "
                  f"and synchronising; {sdelay:g} s with a turbine-valves-closed signal gives sequential tripping.")
    return FunctionSettings(FID, "Reverse power (anti-motoring)", values, basis_text,
                            references=["IEEE C37.102", "Blackburn & Domin, Protective Relaying (generator "
                                        "protection)"], checks=checks, test_points=tests)
