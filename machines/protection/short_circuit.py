"""50P instantaneous phase overcurrent (short circuit) of a motor, and the fused-contactor case.

Rule (METHODS.md §4.1):
- Pickup 1.8 × the symmetrical locked-rotor current (upper bound of the code range): the first-cycle rms of a fully
  offset starting current is up to √3 = 1.73 × its symmetrical value (IEC 60034-12 note: peak 1.8–2.8 ×), so 1.8
  keeps the element quiet with no intentional delay (guidance 1.6–2.0 × [M][P]).
- Sensitivity: the minimum phase-to-phase terminal fault current should be at least 2 × the pickup [P].
- Fused contactor: the contactor must never break more than its rating, so 50P is out of service and every relay
  trip is blocked above 90 % of the contactor's breaking current; the fuse clears those faults (take-over below the
  contactor rating, UL 347 practice [F-v][P]). With the fuse's minimum melting curve (``[supply.fuse]``) the fuse
  must withstand the start: the starting current at most 0.75 × the melting current at the acceleration time
  (IEC 60644 K factor for motor-circuit fuses, value from memory; METHODS.md §4.3), and a stall is cleared by the
  relay before the fuse melts.
A disabled 50P is not checked; its checks say only that it is out of service.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, current_setting, timed_test_point
from machines.protection.motor_basis import basis_of, chosen, computed
from machines.record import Check, FunctionSettings, Setting
from machines.standards.fault_current import (
    FULL_OFFSET_RMS_FACTOR, asymmetrical_rms_factor, phase_to_phase_fault_current,
)
from machines.standards.thermal_limit import loglog_current, loglog_time

FID = "50P"
ASYMMETRY_MARGIN = 1.8  #: pickup / symmetrical I_LR [-] (METHODS.md §4.1: 1.6–2.0) [P]
LOWEST_MARGIN = 1.6  #: below this a warning [-] [P]
SENSITIVITY_RATIO = 2.0  #: minimum phase-to-phase fault / pickup [-] (METHODS.md §4.1) [P]
BLOCK_FRACTION = 0.9  #: block trips above this × contactor breaking current [-] (METHODS.md §4.2: 10 % margin) [P]
FUSE_START_FACTOR = 0.75  #: starting current ≤ this × the fuse's melting current at the start time [-] (IEC 60644
#: K factor, value from memory; METHODS.md §4.3)


def block_threshold(contactor_breaking_current: float) -> float:
    """Current above which relay trips are blocked on a fused contactor, 0.9 × its breaking current [A].

    Examples
    --------
    >>> block_threshold(4000.0)   # METHODS.md §4.2: 3600 A
    3600.0
    """
    return BLOCK_FRACTION * contactor_breaking_current


def settings(ctx: StudyContext) -> FunctionSettings:
    case = ctx.case
    sup = case.supply
    b = basis_of(ctx)
    ct = ctx.ct
    checks: list[Check] = []
    fused = sup.starter == "fused-contactor"
    computed(ctx, FID).update(pickup=ASYMMETRY_MARGIN * b.lr_high, enabled=not fused)
    enabled, e_src = ctx.choose(FID, "enabled", not fused, "boolean", "", "common-practice")
    pickup, p_src = ctx.choose(FID, "pickup_current", ASYMMETRY_MARGIN * b.lr_high, "current", "A",
                               "common-practice", rounding="up")
    delay, d_src = ctx.choose(FID, "time_delay", 0.0, "time", "s", "common-practice")
    ratio = pickup / b.lr_high
    sens = None
    if enabled:
        sens = _enabled_checks(ctx, checks, pickup, delay, ratio)
    s = {
        "enabled": Setting(bool(enabled), "", e_src, label="In service"),
        "pickup_current": current_setting(pickup, ct, p_src, "Pickup",
                                          note=f"{ratio:.2f} × locked-rotor current (upper bound)"),
        "time_delay": Setting(delay, "s", d_src, label="Delay"),
    }
    if fused:
        basis = _fused(ctx, s, checks, enabled, pickup, b)
    else:
        basis = (f"Pickup {ratio:.2f} × the symmetrical locked-rotor current {b.lr_high:.0f} A: the first-cycle rms "
                 f"of a fully offset start is up to √3 = {FULL_OFFSET_RMS_FACTOR:.2f} ×, so no intentional delay is "
                 "needed" + (f"; minimum phase-to-phase fault {sens:.1f} × pickup." if sens else "."))
    if not enabled and not fused:
        checks.append(Check("warn", "50P is out of service (set by override): 87M or the upstream protection must "
                                    "clear terminal faults."))
    chosen(ctx, FID).update(pickup=pickup, delay=delay, enabled=bool(enabled))
    tps = [] if not enabled else [
        timed_test_point("current", ct.to_secondary(0.9 * pickup), "A", None, applied_primary=0.9 * pickup,
                         primary_unit="A", duration=0.5,
                         description="pickup test: 0.9 × pickup for 0.5 s must not operate"),
        timed_test_point("current", ct.to_secondary(1.2 * pickup), "A", delay if delay > 0 else 0.03,
                         applied_primary=1.2 * pickup, primary_unit="A",
                         description="1.2 × pickup operates instantaneously (relay's own time ≤ 30 ms)"
                         if delay == 0 else "1.2 × pickup operates after the delay"),
    ]
    block = chosen(ctx, FID).get("block")
    if block and 1.1 * block > (pickup if enabled else 0.0):
        i = 1.1 * block
        tps.append(timed_test_point("current", ct.to_secondary(i), "A", None, applied_primary=i, primary_unit="A",
                                    duration=round(_longest_delay(ctx) + 1.0, 1),
                                    description=f"1.1 × the trip block threshold: every trip output stays blocked "
                                                f"(inject for the longest relay delay + 1 s)"))
    return FunctionSettings(FID, "Instantaneous phase overcurrent (short circuit)", s, basis,
                            ["IEC 60034-12 (asymmetrical starting peak note)",
                             "IEEE Std C37.96 (motor protection guide) [value from memory]",
                             "UL 347 (fused contactors, take-over) [practice]"]
                            + (["IEC 60644 (motor-circuit fuse-links, K factor) [value from memory]"]
                               if fused and sup.fuse else []),
                            checks, tps, enabled=bool(enabled))


def _longest_delay(ctx: StudyContext) -> float:
    c = chosen(ctx, "51LR")
    return max(c.get("delay", 0.0), c.get("jam_delay", 0.0), 1.0)


def _enabled_checks(ctx: StudyContext, checks: list[Check], pickup: float, delay: float, ratio: float) -> float | None:
    case, b = ctx.case, basis_of(ctx)
    sup = case.supply
    half_cycle = asymmetrical_rms_factor(sup.x_over_r, 0.5 / case.machine.frequency, case.machine.frequency)
    if ratio <= half_cycle and delay < 0.05:
        checks.append(Check("fail", f"50P pickup {ratio:.2f} × locked-rotor current is below the half-cycle "
                                    f"asymmetrical factor {half_cycle:.2f} (X/R {sup.x_over_r:g}): it would trip on "
                                    "the starting inrush."))
    elif ratio < LOWEST_MARGIN and delay < 0.05:
        checks.append(Check("warn", f"50P pickup is only {ratio:.2f} × the locked-rotor current with no delay; "
                                    f"a fully offset start reaches {FULL_OFFSET_RMS_FACTOR:.2f} × in the first "
                                    "cycle. Use 1.6–2.0 × or add 50–100 ms with DC-offset filtering."))
    else:
        checks.append(Check("ok", f"50P pickup {ratio:.2f} × the locked-rotor current (upper bound) clears the "
                                  f"asymmetrical starting inrush ({half_cycle:.2f} × at half a cycle, "
                                  f"X/R {sup.x_over_r:g})."))
    p49, p51 = chosen(ctx, "49").get("pickup", 0.0), chosen(ctx, "51LR").get("pickup", 0.0)
    if pickup <= max(p49, p51):
        checks.append(Check("fail", f"50P pickup {pickup:.0f} A is not above the stall pickup {p51:.0f} A."))
    sens = None
    if b.fault_min:
        i_pp = phase_to_phase_fault_current(b.fault_min)
        sens = i_pp / pickup
        if sens < 1.5:
            checks.append(Check("fail", f"The minimum phase-to-phase fault ({i_pp / 1e3:.2f} kA) is only {sens:.2f} × "
                                        "the 50P pickup: terminal faults may not be cleared instantaneously; consider "
                                        "87M."))
        elif sens < SENSITIVITY_RATIO:
            checks.append(Check("warn", f"The minimum phase-to-phase fault is {sens:.2f} × the 50P pickup (aim ≥ 2)."))
        else:
            checks.append(Check("ok", f"The minimum phase-to-phase terminal fault ({i_pp / 1e3:.2f} kA) is "
                                      f"{sens:.1f} × the 50P pickup."))
    else:
        checks.append(Check("warn", "No minimum fault level: the 50P sensitivity cannot be checked."))
    if delay > 0.1:
        checks.append(Check("warn", f"A 50P delay of {delay:.2f} s is long for a short-circuit element."))
    return sens


def _fused(ctx: StudyContext, s: dict, checks: list[Check], enabled: bool, pickup: float, b) -> str:
    sup = ctx.case.supply
    if not enabled:
        checks.append(Check("ok", "50P is out of service on a fused contactor: short circuits above the contactor's "
                                  "breaking current are cleared by the fuses."))
    if sup.contactor_breaking_current is None:
        checks.append(Check("warn", "Fused contactor without supply.contactor_breaking_current: the current above "
                                    "which relay trips must be blocked cannot be set."))
        block = None
    else:
        block, b_src = ctx.choose(FID, "trip_block_current", block_threshold(sup.contactor_breaking_current),
                                  "current", "A", "common-practice", rounding="down")
        s["trip_block_current"] = current_setting(block, ctx.ct, b_src, "Block all relay trips above",
                                                  note=f"{block / sup.contactor_breaking_current:.0%} of the "
                                                       "contactor breaking current")
        if block >= sup.contactor_breaking_current:
            checks.append(Check("fail", f"The trip block threshold {block:.0f} A is not below the contactor's breaking "
                                        f"current {sup.contactor_breaking_current:.0f} A: the relay could ask the "
                                        "contactor to break a current it cannot."))
        chosen(ctx, FID)["block"] = block
        if enabled and pickup >= block:
            checks.append(Check("fail", f"50P is in service at {pickup:.0f} A, at or above the trip block threshold "
                                        f"{block:.0f} A: it would never act, or would ask the contactor to break "
                                        "more than its rating if not blocked."))
        if b.lr_high >= block:
            checks.append(Check("fail", f"The locked-rotor current {b.lr_high:.0f} A reaches the trip block threshold "
                                        f"{block:.0f} A: the contactor cannot interrupt a stalled motor."))
    if sup.fuse is not None:
        _fuse_checks(ctx, checks, sup.fuse, block)
    elif sup.fuse_rating is None or sup.contactor_breaking_current is None:
        checks.append(Check("warn", "The fuse take-over cannot be judged: give the fuse ([supply.fuse] with its "
                                    "minimum melting curve) and supply.contactor_breaking_current."))
    else:
        checks.append(Check("warn", f"Fuse {sup.fuse_rating:.0f} A with a contactor breaking "
                                    f"{sup.contactor_breaking_current / 1e3:.1f} kA: without the fuse's minimum melting "
                                    "curve ([supply.fuse] points) the study cannot check that it withstands the start "
                                    "and takes over below the block threshold."))
    return ("Fused contactor: the contactor may not be asked to break more than its rating, so 50P is "
            + ("out of service" if not enabled else "in service below the block threshold")
            + (f" and every relay trip is blocked above {block:.0f} A (0.9 × {sup.contactor_breaking_current:.0f} A); "
               if block else "; ")
            + "the fuses clear faults above that.")


def _fuse_checks(ctx: StudyContext, checks: list[Check], fuse, block: float | None) -> None:
    """The fuse withstands every start (K factor on the minimum melting curve) and lets the relay clear a stall."""
    b = basis_of(ctx)
    pts = fuse.points
    for start in b.heat_starts():
        i = float(start.currents[0])
        t = start.acceleration_time
        melt = loglog_current(pts, t)
        what = f"the start at {start.voltage:.2f} pu ({i:.0f} A for {t:.1f} s)"
        if melt is None:
            checks.append(Check("warn", f"The fuse's melting curve does not reach {t:.1f} s: {what} cannot be checked "
                                        "against it; extend [supply.fuse] points."))
            continue
        k = i / melt
        if k > 1.0:
            checks.append(Check("fail", f"The fuse melts during {what}: the starting current is {k:.2f} × its "
                                        f"minimum melting current at {t:.1f} s ({melt:.0f} A)."))
        elif k > FUSE_START_FACTOR:
            checks.append(Check("warn", f"During {what} the current is {k:.2f} × the fuse's minimum melting current at "
                                        f"that time, above the {FUSE_START_FACTOR:g} a fuse needs to stand repeated "
                                        "starts without ageing (IEC 60644 K factor, value from memory)."))
        else:
            checks.append(Check("ok", f"The fuse withstands {what}: {k:.2f} × its minimum melting current at "
                                      f"{t:.1f} s (≤ {FUSE_START_FACTOR:g})."))
    c51 = chosen(ctx, "51LR")
    if c51:
        t_fuse = loglog_time(pts, b.lr_high)
        trip = c51.get("delay", 0.0)
        if t_fuse is not None and t_fuse <= trip:
            checks.append(Check("warn", f"At the locked-rotor current ({b.lr_high:.0f} A) the fuse melts in "
                                        f"{t_fuse:.2f} s, before 51LR trips ({trip:.1f} s): a stall blows the fuses."))
        elif t_fuse is not None:
            checks.append(Check("ok", f"A stall is cleared by 51LR ({trip:.1f} s) before the fuse melts "
                                      f"({t_fuse:.1f} s at {b.lr_high:.0f} A)."))
    if block is not None:
        t_block = loglog_time(pts, block)
        if t_block is None:
            checks.append(Check("warn", f"The fuse's melting curve does not reach the trip block threshold "
                                        f"{block:.0f} A: the take-over cannot be checked."))
        else:
            checks.append(Check("ok", f"Above the trip block threshold {block:.0f} A the fuse clears the fault "
                                      f"(minimum melting {t_block:.3g} s there)."))
