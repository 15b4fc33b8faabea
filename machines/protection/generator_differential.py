"""87G generator percentage differential, with the IEEE C37.110 check of the differential CTs.

METHODS.md §9.5 (common practice): single slope about 10 %, minimum pickup 0.1–0.3 A on 5 A CTs (here 6 % of the CT
secondary rating, 0.3 A on 5 A), unrestrained stage at 8 × rated current or more. For an external fault the
CTs at both ends carry the generator's own contribution; if one saturates, the false differential current can
operate the element, so the differential CTs are checked at that current with the C37.110 criterion.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, current_setting, timed_test_point
from machines.record import Check, FunctionSettings, Setting
from machines.standards.ct_saturation import (SATURATION_LIMIT, c37110_saturation_index, c_class_voltage,
                                              is_iec_protective_class)
from machines.standards.generator_capability import differential_operate_threshold

FID = "87G"
MIN_PICKUP_FRACTION = 0.06  #: of the CT secondary rating (0.3 A on 5 A; METHODS.md §9.5: 0.1–0.3 A)
SLOPE = 0.10  #: METHODS.md §9.5 (common practice)
UNRESTRAINED = 8.0  #: [× rated current] METHODS.md §9.5: ≥ 8–10 pu (common practice)
EXTERNAL_FAULT_EMF = 1.1  #: [pu] subtransient EMF of a loaded machine for the largest through fault (common practice)
OPERATE_TIME = 0.03  #: [s] typical operate time of a numerical differential (maker's data govern)


def _ct_check(ctx: StudyContext, checks: list[Check], ct) -> None:
    ins, basis = ctx.case.instruments, ctx.extras["generator"]
    cls, burden = ins.differential_ct_class, ins.differential_ct_burden
    if cls is None and burden is None:
        checks.append(Check("warn", "Differential CT class and burden not given (instruments.differential_ct_class, "
                                    "differential_ct_burden): CT saturation for external faults was not checked."))
        return
    if cls is None or burden is None:
        missing = "differential_ct_class" if cls is None else "differential_ct_burden"
        checks.append(Check("warn", f"instruments.{missing} is missing: the C37.110 check needs both class and "
                                    f"burden."))
        return
    if is_iec_protective_class(cls):
        checks.append(Check("warn", f"Differential CT class {cls} is an IEC 61869-2 class: the IEEE C37.110 check "
                                    "needs a C57.13 voltage rating; compare the CT's knee-point voltage with "
                                    "(1 + X/R)·I_f·(R_ct + R_b) using the maker's data."))
        return
    vc = c_class_voltage(cls, "instruments.differential_ct_class")
    i_f = EXTERNAL_FAULT_EMF * basis.subtransient_fault_current
    xr = ctx.case.supply.x_over_r
    idx = c37110_saturation_index(i_f, ct.primary, burden, vc, xr)
    sym = c37110_saturation_index(i_f, ct.primary, burden, vc, 0.0)
    ctx.derived["differential_ct_saturation_index"] = Setting(idx, "", "derived",
                                                              label="87G CTs: IEEE C37.110 (1 + X/R)·I_f·Z_b",
                                                              note="≤ 20 avoids saturation")
    head = (f"Differential CTs {cls}, {burden:g} Ω: through fault {i_f / 1e3:.3g} kA (E'' = {EXTERNAL_FAULT_EMF:g} pu "
            f"over X''d), X/R {xr:g} (supply.x_over_r; the machine's own X/R may be higher)")
    if idx <= SATURATION_LIMIT:
        checks.append(Check("ok", f"{head}: (1 + X/R)·I_f·Z_b = {idx:.3g} ≤ 20, no saturation expected."))
    elif sym <= SATURATION_LIMIT:
        checks.append(Check("warn", f"{head}: (1 + X/R)·I_f·Z_b = {idx:.3g} > 20, the DC offset can saturate a CT "
                                    f"(symmetrical {sym:.3g} ≤ 20): confirm the relay's CT requirement (through-"
                                    f"fault stability) or lower the burden."))
    else:
        checks.append(Check("fail", f"{head}: even the symmetrical through-fault current saturates the CTs "
                                    f"(I_f·Z_b = {sym:.3g} > 20): the false differential current can trip the "
                                    f"generator for an external fault; use a higher class or a lower burden."))


def settings(ctx: StudyContext) -> FunctionSettings:
    """87G: minimum pickup, slope and unrestrained stage, CT check and test points."""
    basis, ins = ctx.extras["generator"], ctx.case.instruments
    ir = basis.rated_current
    ct = ins.differential_ct or basis.ct
    checks: list[Check] = []
    if ins.differential_ct is None:
        checks.append(Check("warn", "No differential CTs given (instruments.differential_ct): the phase CT ratio is "
                                    "assumed at both ends of the winding."))
    pickup, p_src = ctx.choose(FID, "minimum_pickup", MIN_PICKUP_FRACTION * ct.primary, "current", "A",
                               "common-practice", via=ct)
    slope, s_src = ctx.choose(FID, "slope", SLOPE, "per_unit", "", "common-practice")
    high, h_src = ctx.choose(FID, "unrestrained_pickup", UNRESTRAINED * ir, "current", "A", "common-practice",
                             via=ct)
    share = pickup / ir
    if 0.05 <= share <= 0.30:
        checks.append(Check("ok", f"Minimum pickup {pickup:.4g} A is {share:.1%} of rated current."))
    elif share < 0.05:
        checks.append(Check("warn", f"Minimum pickup {pickup:.4g} A is only {share:.1%} of rated current: CT "
                                    f"mismatch at load may operate the element."))
    else:
        checks.append(Check("warn", f"Minimum pickup {pickup:.4g} A is {share:.0%} of rated current: faults near "
                                    f"the neutral are missed."))
    if not 0.0 < slope < 1.0:
        checks.append(Check("fail", f"Slope {slope:g} must be between 0 and 1."))
    if high < 4 * ir:
        checks.append(Check("warn", f"Unrestrained stage {high / ir:.3g} × rated is low: CT saturation on external "
                                    f"faults can operate it."))
    _ct_check(ctx, checks, ct)
    values = {
        "minimum_pickup": current_setting(pickup, ct, p_src, "Minimum operate current",
                                          f"{share:.1%} of rated; {MIN_PICKUP_FRACTION:.0%} of CT secondary rating"),
        "slope": Setting(slope, "pu", s_src, label="Percentage slope"),
        "unrestrained_pickup": current_setting(high, ct, h_src, "Unrestrained stage", f"{high / ir:.3g} × rated"),
    }
    to_sec = ct.to_secondary
    tests = [timed_test_point("differential current", to_sec(0.9 * pickup), "A", None, applied_primary=0.9 * pickup,
                              primary_unit="A", description="one side only, 0.9 × minimum pickup: must not operate"),
             timed_test_point("differential current", to_sec(1.2 * pickup), "A", OPERATE_TIME,
                              applied_primary=1.2 * pickup, primary_unit="A",
                              description="one side only, 1.2 × minimum pickup: operates instantaneously")]
    for mult in (2.0, 4.0):
        restraint = mult * ir
        threshold = differential_operate_threshold(restraint, pickup, slope)
        tests.append(timed_test_point("differential current", to_sec(1.1 * threshold), "A", OPERATE_TIME,
                                      applied_primary=1.1 * threshold, primary_unit="A",
                                      initial_state=f"through current {to_sec(restraint):.4g} A secondary",
                                      description=f"slope at {mult:g} × rated restraint: 110 % of the "
                                                  f"{to_sec(threshold):.4g} A threshold operates"))
        tests.append(timed_test_point("differential current", to_sec(0.9 * threshold), "A", None,
                                      applied_primary=0.9 * threshold, primary_unit="A",
                                      initial_state=f"through current {to_sec(restraint):.4g} A secondary",
                                      description=f"slope at {mult:g} × rated restraint: 90 % must not operate"))
    basis_text = (f"Percentage differential: operate when I_diff > max({pickup:.4g} A, {slope:.0%} × I_restraint) "
                  f"(restraint = average of the two end currents); minimum pickup {MIN_PICKUP_FRACTION:.0%} of the "
                  f"CT secondary rating, low enough for faults well into the winding and above CT mismatch; "
                  f"unrestrained stage {high / ir:.3g} × rated for heavy internal faults.")
    return FunctionSettings(FID, "Generator differential", values, basis_text,
                            references=["IEEE C37.102", "IEEE C37.110"], checks=checks, test_points=tests)
