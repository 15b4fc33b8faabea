"""Phase CT check: ratio against full-load current and the IEEE C37.110 saturation criterion for the 50P region.

The CT is not a protection function with settings, so this rule returns no function: its findings go to the
machine-wide checks (``ctx.extras["checks"]``) and its numbers to ``ctx.derived``, where the sheet prints them.
Saturation is a warning, not a failure: a saturated CT still delivers current far above a 50P pickup for part of
every cycle, so the element operates, later; whether that is acceptable is the relay maker's CT requirement.

Methods: machines/METHODS.md §11.1 (the criterion, the CT ratio and a fused contactor's trip block).
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, Setting
from machines.standards.ct_saturation import (SATURATION_LIMIT, c37110_saturation_index, c_class_voltage,
                                              is_iec_protective_class, time_to_saturate)

RATIO_LOW = 0.5  #: FLC / CT primary below this: poor resolution of the overload region [P]
RATIO_HIGH = 1.0  #: above this the CT runs beyond its rating at full load [P]


def settings(ctx: StudyContext) -> None:
    case = ctx.case
    ins = case.instruments
    b = basis_of(ctx)
    checks: list[Check] = ctx.extras.setdefault("checks", [])
    ct = ins.phase_ct
    share = b.flc / ct.primary
    if share < RATIO_LOW:
        checks.append(Check("warn", f"Phase CT {ct.primary:.0f}/{ct.secondary:g} A: full-load current is only "
                                    f"{share:.0%} of the CT primary, which coarsens the overload measurement."))
    elif share > RATIO_HIGH:
        checks.append(Check("warn", f"Phase CT {ct.primary:.0f}/{ct.secondary:g} A: full-load current is {share:.0%} "
                                    "of the CT primary; the CT needs a continuous thermal rating factor above 1."))
    else:
        checks.append(Check("ok", f"Phase CT {ct.primary:.0f}/{ct.secondary:g} A: full-load current is {share:.0%} of "
                                  "the CT primary."))
    block = chosen(ctx, "50P").get("block")
    if not ins.phase_ct_class or not ins.phase_ct_burden:
        if block:
            checks.append(Check("fail", f"The fused contactor's trip block at {block:.0f} A "
                                        f"({block / ct.primary:.0f} × the CT rating) rests on the phase CTs measuring "
                                        "that current, and on their not under-reading a larger fault as a smaller "
                                        "one; without the CT class and burden (instruments.phase_ct_class, "
                                        "phase_ct_burden) this cannot be checked (IEEE C37.110)."))
        else:
            checks.append(Check("warn", "The phase CT class or burden is missing (instruments.phase_ct_class, "
                                        "phase_ct_burden): the IEEE C37.110 saturation check was not made."))
        return None
    if is_iec_protective_class(ins.phase_ct_class):
        checks.append(Check("warn", f"Phase CT class {ins.phase_ct_class} is an IEC 61869-2 class: the IEEE C37.110 "
                                    "check needs a C57.13 voltage rating; compare the CT's knee-point voltage with "
                                    "(1 + X/R)·I_f·(R_ct + R_b) using the maker's data."))
        return None
    vc = c_class_voltage(ins.phase_ct_class)
    if block:
        _block_check(ctx, checks, block, vc)
    if b.fault_max is None:
        checks.append(Check("warn", "No fault level: the IEEE C37.110 saturation check was not made."))
        return None
    idx = c37110_saturation_index(b.fault_max, ct.primary, ins.phase_ct_burden, vc, b.x_over_r)
    sym = c37110_saturation_index(b.fault_max, ct.primary, ins.phase_ct_burden, vc, 0.0)
    ts = time_to_saturate(b.fault_max, ct.primary, ins.phase_ct_burden, vc, b.x_over_r, case.machine.frequency)
    ctx.derived["ct_saturation_index"] = Setting(idx, "", "derived", label="IEEE C37.110 (1 + X/R)·I_f·Z_b",
                                                 note="≤ 20 avoids saturation")
    if math.isfinite(ts):
        ctx.derived["ct_time_to_saturate"] = Setting(ts, "s", "derived", label="CT time to saturate, full offset")
    p50 = chosen(ctx, "50P")
    if idx <= SATURATION_LIMIT:
        checks.append(Check("ok", f"Phase CT {ins.phase_ct_class}: (1 + X/R)·I_f·Z_b = {idx:.1f} ≤ 20 at the maximum "
                                  f"fault {b.fault_max / 1e3:.1f} kA: no saturation expected (IEEE C37.110)."))
    elif sym <= SATURATION_LIMIT:
        cyc = ts * case.machine.frequency
        checks.append(Check("warn", f"Phase CT {ins.phase_ct_class}: (1 + X/R)·I_f·Z_b = {idx:.0f} > 20 at "
                                    f"{b.fault_max / 1e3:.1f} kA, so an offset fault saturates it after about "
                                    f"{ts * 1e3:.1f} ms ({cyc:.2f} cycles); the symmetrical check {sym:.1f} ≤ 20 "
                                    "passes. 50P" + (" (in service)" if p50.get("enabled") else "")
                                    + " must operate on the first unsaturated half cycle; check the relay maker's "
                                    "CT requirement or lower the burden."))
    else:
        checks.append(Check("warn", f"Phase CT {ins.phase_ct_class}: even the symmetrical fault current saturates it "
                                    f"(I_f·Z_b = {sym:.1f} > 20 at {b.fault_max / 1e3:.1f} kA): the secondary "
                                    "current is distorted from the first cycle and 50P may be delayed. Check the "
                                    "relay maker's CT requirement for instantaneous elements, or use a higher class "
                                    "or a lower burden."))
    return None


def _block_check(ctx: StudyContext, checks: list[Check], block: float, vc: float) -> None:
    """The CTs must measure the trip block level, and a fault above it must not read below it (IEEE C37.110:
    symmetrical current without saturation while I·Z_b ≤ 20 pu; beyond, the secondary current the CT can drive is
    about 20/(I·Z_b) of the ratio current)."""
    ins = ctx.case.instruments
    b = basis_of(ctx)
    ct = ins.phase_ct
    at_block = c37110_saturation_index(block, ct.primary, ins.phase_ct_burden, vc, 0.0)
    if at_block > SATURATION_LIMIT:
        checks.append(Check("fail", f"Phase CT {ins.phase_ct_class} ({ct.primary:.0f}/{ct.secondary:g} A) saturates "
                                    f"below the trip block threshold {block:.0f} A (I·Z_b = {at_block:.1f} > 20, "
                                    "IEEE C37.110): the relay may read a fault above the contactor's breaking current "
                                    "as one it may trip. Use a higher class or a lower burden, or move the block."))
        return
    worst = b.fault_max or block
    idx = c37110_saturation_index(worst, ct.primary, ins.phase_ct_burden, vc, 0.0)
    seen = worst * min(1.0, SATURATION_LIMIT / idx)
    if seen < block:
        checks.append(Check("fail", f"At the maximum fault current {worst / 1e3:.1f} kA the phase CT's symmetrical "
                                    f"output is limited to about {seen:.0f} A primary (I·Z_b = {idx:.0f} > 20, IEEE "
                                    f"C37.110), below the trip block threshold {block:.0f} A: the relay could trip the "
                                    "contactor on a fault it cannot break."))
    else:
        checks.append(Check("ok", f"Phase CT {ins.phase_ct_class} measures the trip block threshold {block:.0f} A "
                                  f"({block / ct.primary:.0f} × rating, I·Z_b = {at_block:.1f} ≤ 20) and reads the "
                                  f"maximum fault ({worst / 1e3:.1f} kA) above it (IEEE C37.110, symmetrical)."))
