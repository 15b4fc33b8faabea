"""87M motor differential: recommended from 1000 hp (746 kW), or whenever 50P cannot clear terminal faults fast.

Size threshold: the usual guidance recommends differential protection for large motors, commonly from about
1000 hp, where an internal fault is costly and the 50P pickup (above 1.6–2 × I_LR) leaves faults near the star point
unseen [value from memory]. It is also recommended whatever the size when 50P is in service and its sensitivity
ratio is below 2 (on a fused contactor the fuses clear short circuits).
Settings (IEEE C37.96-1988 §4.2.17, METHODS.md §9.5): percentage differential, 10 % slope, minimum pickup 15 % of
FLC (10–20 %); self-balancing (core-balance) schemes are set like 50G.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, balanced, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, computed
from machines.record import Check, FunctionSettings, Setting
from machines.standards.fault_current import phase_to_phase_fault_current

FID = "87M"
SIZE_THRESHOLD = 746e3  #: 1000 hp [W] [value from memory]
PICKUP = 0.15  #: [× FLC] (C37.96: 10–20 %)
SLOPE = 0.10  #: (C37.96: 10 %)
RESTRAINT_TEST = 2.0  #: restraint current of the slope test [× FLC]


def settings(ctx: StudyContext) -> FunctionSettings | None:
    m = ctx.case.machine
    b = basis_of(ctx)
    p50 = computed(ctx, "50P")  # the rule's 50P, so that an override of 50P changes no other computed setting
    weak50 = False  # on a fused contactor the fuses clear short circuits: that alone is no reason for 87M
    if b.fault_min and p50.get("pickup") and p50.get("enabled"):
        weak50 = phase_to_phase_fault_current(b.fault_min) / p50["pickup"] < 2.0
    if m.rated_output < SIZE_THRESHOLD and not weak50:
        return None
    ct = ctx.case.instruments.differential_ct or ctx.ct
    checks: list[Check] = []
    pickup, p_src = ctx.choose(FID, "pickup_current", PICKUP * b.flc, "current", "A", "standard", via=ct)
    slope, s_src = ctx.choose(FID, "slope", SLOPE, "per_unit", "", "standard")
    if ctx.case.instruments.differential_ct is None:
        checks.append(Check("warn", "87M is recommended but no differential CTs are given "
                                    "(instruments.differential_ct): add matched CTs at the star point."))
    if not 0.1 * b.flc <= pickup <= 0.2 * b.flc * 1.0001:
        checks.append(Check("warn", f"The 87M pickup {pickup / b.flc:.0%} of FLC is outside the 10–20 % of C37.96."))
    why = (f"rated output {m.rated_output / 1e3:.0f} kW ≥ 746 kW (1000 hp)" if m.rated_output >= SIZE_THRESHOLD
           else "50P cannot clear terminal faults fast enough")
    checks.append(Check("ok", f"87M recommended: {why}."))
    s = {"pickup_current": current_setting(pickup, ct, p_src, "Minimum operate current",
                                           note=f"{pickup / b.flc:.0%} of FLC"),
         "slope": Setting(slope, "pu", s_src, label="Percentage slope",
                          note="operates when |I1 + I2| > max(minimum operate, slope × (|I1| + |I2|)/2)")}
    tps = [timed_test_point("differential current", ct.to_secondary(0.9 * pickup), "A", None,
                            applied_primary=0.9 * pickup, primary_unit="A", input="differential", duration=1.0,
                            description="one side only, 0.9 × minimum operate for 1 s: must not operate"),
           timed_test_point("differential current", ct.to_secondary(2.0 * pickup), "A", 0.03,
                            applied_primary=2.0 * pickup, primary_unit="A", input="differential",
                            description="one side only, 2 × minimum operate: instantaneous (≤ 30 ms)")]
    i_r = max(RESTRAINT_TEST * b.flc, 1.5 * pickup / max(slope, 1e-6))
    for frac in (0.9, 1.1):
        i_d = frac * slope * i_r
        operate = i_d > max(pickup, slope * i_r)
        side1, side2 = i_r + 0.5 * i_d, i_r - 0.5 * i_d
        tps.append(timed_test_point(
            "differential current", ct.to_secondary(i_d), "A", 0.03 if operate else None, applied_primary=i_d,
            primary_unit="A", input="differential", phases=balanced(ct.to_secondary(side1)),
            current_phases=balanced(ct.to_secondary(side2), 180.0), duration=None if operate else 1.0,
            description=f"slope test: line side {side1 / b.flc:.2f} × FLC on the line-side CTs, neutral side "
                        f"{side2 / b.flc:.2f} × FLC in antiphase (the other side's CTs); restraint (|I1| + |I2|)/2 = "
                        f"{i_r / b.flc:.2f} × FLC, differential {frac:g} × slope × restraint: "
                        + ("operates (≤ 30 ms)" if operate else "must not operate")))
    basis = (f"Recommended ({why}). Percentage differential, slope {slope:.0%}, minimum operate {pickup / b.flc:.0%} "
             "of FLC (IEEE C37.96-1988 §4.2.17).")
    return FunctionSettings(FID, "Motor differential", s, basis,
                            ["IEEE Std C37.96-1988 §4.2.17"], checks, tps)
