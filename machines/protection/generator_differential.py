"""87G generator percentage differential, with the IEEE C37.110 check of the differential CTs.

METHODS.md §9.5 (common practice): single slope about 10 %, minimum pickup 0.1–0.3 A on 5 A CTs (here 6 % of the CT
secondary rating, 0.3 A on 5 A). For an external fault the CTs at both ends carry the generator's own contribution,
up to E''/X''d with a fully offset first cycle; if one CT saturates, the whole of that current can appear as
differential current. The unrestrained stage, which has no bias to hold it, is therefore set above the largest
through-fault current with its DC offset (and at least 8 × rated), and the differential CTs are checked at that
current with the C37.110 criterion.

Test injections: ``phases`` are the currents of the terminal-side CTs and ``current_phases`` those of the
neutral-side CTs, both read as currents flowing into the winding, so that a through current is equal and opposite
on the two sides and the differential current is their sum.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, balanced, current_setting, single, timed_test_point
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting
from machines.standards.ct_saturation import (SATURATION_LIMIT, c37110_saturation_index, c_class_voltage,
                                              is_iec_protective_class)
from machines.standards.fault_current import FULL_OFFSET_RMS_FACTOR
from machines.standards.generator_capability import differential_operate_threshold

FID = "87G"
MIN_PICKUP_FRACTION = 0.06  #: of the CT secondary rating (0.3 A on 5 A; METHODS.md §9.5: 0.1–0.3 A)
SLOPE = 0.10  #: METHODS.md §9.5 (common practice)
UNRESTRAINED = 8.0  #: [× rated current] METHODS.md §9.5: ≥ 8–10 pu (common practice)
THROUGH_MARGIN = 1.2  #: unrestrained stage ≥ 1.2 × the offset through-fault current (common practice)
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
    through = EXTERNAL_FAULT_EMF * basis.subtransient_fault_current
    through_peak = FULL_OFFSET_RMS_FACTOR * through  # first-cycle rms, full offset, no decay: an upper bound
    ctx.derived["maximum_through_fault_current"] = Setting(
        through_peak, "A", "derived", label="Largest through-fault current, first-cycle rms with full DC offset",
        note=f"√3 × E''/X''d, E'' = {EXTERNAL_FAULT_EMF:g} pu")
    # rounded up: the unrestrained stage stays above the through-fault current
    high, h_src = ctx.choose(FID, "unrestrained_pickup", max(UNRESTRAINED * ir, THROUGH_MARGIN * through_peak),
                             "current", "A", "common-practice", via=ct, rounding="up")
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
    text = (f"Unrestrained stage {high:.4g} A ({high / ir:.3g} × rated) against the largest through-fault current "
            f"{through:.4g} A symmetrical (E''/X''d = {EXTERNAL_FAULT_EMF:g}/{ctx.case.machine.xd_subtransient:g} "
            f"pu), {through_peak:.4g} A with full DC offset")
    if high >= THROUGH_MARGIN * through_peak * (1 - 1e-9):
        checks.append(Check("ok", text + f": at least {THROUGH_MARGIN:g} × above it, so a saturated CT on an "
                                         f"external fault cannot operate it."))
    elif high > through_peak:
        checks.append(Check("warn", text + ": above it with little margin."))
    else:
        checks.append(Check("fail", text + ": not above it, so a CT saturating on an external fault can trip the "
                                           "generator."))
    _ct_check(ctx, checks, ct)
    values = {
        "minimum_pickup": current_setting(pickup, ct, p_src, "Minimum operate current",
                                          f"{share:.1%} of rated; {MIN_PICKUP_FRACTION:.0%} of CT secondary rating"),
        "slope": Setting(slope, "pu", s_src, label="Percentage slope"),
        "unrestrained_pickup": current_setting(high, ct, h_src, "Unrestrained stage", f"{high / ir:.3g} × rated"),
    }
    tests = _tests(ct, ir, pickup, slope, high)
    basis_text = (f"Percentage differential: operate when I_diff > max({pickup:.4g} A, {slope:.0%} × I_restraint) "
                  f"(restraint = average of the two end currents); minimum pickup {MIN_PICKUP_FRACTION:.0%} of the "
                  f"CT secondary rating, low enough for faults well into the winding and above CT mismatch; "
                  f"unrestrained stage {high / ir:.3g} × rated, above the largest through-fault current with its DC "
                  f"offset, for heavy internal faults.")
    return FunctionSettings(FID, "Generator differential", values, basis_text,
                            references=["IEEE C37.102", "IEEE C37.110"], checks=checks, test_points=tests)


def _tests(ct, ir: float, pickup: float, slope: float, high: float) -> list:
    """One-side, slope and unrestrained injections; expected times with every stage enabled."""
    to_sec = ct.to_secondary

    def operates(i_diff: float, i_restraint: float) -> bool:
        return i_diff > differential_operate_threshold(i_restraint, pickup, slope) or i_diff > high

    def tp(side1: float, side2: float, description: str, state: str = "", one_phase: bool = False):
        # side 1 (terminal CTs) carries side1 into the winding, side 2 (neutral CTs) carries side2 out of it
        i_diff, i_res = abs(side1 - side2), (abs(side1) + abs(side2)) / 2.0
        expected = OPERATE_TIME if operates(i_diff, i_res) else None
        phases = single(to_sec(side1)) if one_phase else balanced(to_sec(side1))
        other = None if side2 == 0 else balanced(to_sec(side2), 180.0)
        return timed_test_point("differential current", to_sec(i_diff), "A", expected, applied_primary=i_diff,
                                primary_unit="A", input="differential", phases=phases, current_phases=other,
                                initial_state=state, description=description,
                                duration=None if expected else hold_time(OPERATE_TIME))

    tests = [tp(0.9 * pickup, 0.0, "one side only, 0.9 × minimum pickup: must not operate"),
             tp(1.2 * pickup, 0.0, "one side only, 1.2 × minimum pickup: operates instantaneously")]
    for mult in (2.0, 4.0):
        restraint = mult * ir
        threshold = differential_operate_threshold(restraint, pickup, slope)
        for k, verdict in ((1.1, "operates"), (0.9, "must not operate")):
            d = k * threshold
            tests.append(tp(restraint + d / 2.0, restraint - d / 2.0,
                            f"slope at {mult:g} × rated restraint: {k:.0%} of the {to_sec(threshold):.4g} A "
                            f"threshold {verdict}", state=f"through current {to_sec(restraint):.4g} A secondary"))
    tests.append(tp(1.1 * high, 0.0, "unrestrained stage: 110 % of its pickup in phase A, one side",
                    one_phase=True))
    return tests
