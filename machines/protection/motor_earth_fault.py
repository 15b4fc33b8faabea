"""50G earth fault of a motor circuit, through a core-balance CT.

Rule (METHODS.md §7.2 [P][M]):
- The pickup stays above twice the motor circuit's own capacitive current 3·I_C0 (which flows through the
  core-balance CT for an earth fault elsewhere) and at most 10–20 % of the available earth-fault current.
- Low-resistance grounding: 10 % of the resistor's let-through current, 0.1 s. Solid grounding: 20 % of FLC, 0.1 s.
- High-resistance grounding (and distribution-transformer grounding) or ungrounded supplies: the fault current is a
  few amperes, the system can run with one earth fault and a trip would not be selective by current alone: an
  alarm-only stage at the same floor, 1 s.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, current_setting, single, timed_test_point
from machines.protection.motor_basis import basis_of, chosen, computed
from machines.record import Check, FunctionSettings, Setting
from machines.standards.grounding import charging_current

FID = "50G"
CHARGING_MARGIN = 2.0  #: pickup ≥ this × own 3·I_C0 [-] (METHODS.md §7.2: 2–3) [P]
LRG_FRACTION = 0.10  #: pickup = this × resistor current on LRG systems [-] (METHODS.md §7.2: 10–20 %) [P]
LRG_MAX_FRACTION = 0.20  #: pickup above this × fault current covers too little winding [-] [P]
SOLID_FRACTION_FLC = 0.20  #: pickup on solidly grounded supplies [× FLC] [P]
TRIP_DELAY = 0.1  #: [s] (METHODS.md §7.2: 0.1–0.5 s) [P]
ALARM_DELAY = 1.0  #: [s] [P]
CT_LOW_FRACTION = 0.05  #: pickups below this × CT primary need a check of relay range and CT accuracy [-] [P]
ALARM_METHODS = ("high-resistance", "distribution-transformer", "ungrounded")


def settings(ctx: StudyContext) -> FunctionSettings:
    case = ctx.case
    g, m = case.grounding, case.machine
    b = basis_of(ctx)
    checks: list[Check] = []
    ct = case.instruments.ground_ct
    if ct is None:
        ct = ctx.ct
        checks.append(Check("warn", "No core-balance CT (instruments.ground_ct): the element would use the residual "
                                    "of the phase CTs, acceptable only for high earth-fault currents and liable to "
                                    "false residual from CT saturation during starts."))
    v = case.supply.nominal_voltage
    own = charging_current(g.circuit_capacitance, v, m.frequency) if g.circuit_capacitance else 0.0
    floor = CHARGING_MARGIN * own
    if not g.circuit_capacitance:
        checks.append(Check("warn", "grounding.circuit_capacitance is missing: the motor circuit's own charging "
                                    "current is unknown, so the 50G floor for external faults cannot be checked."))
    alarm_only = g.method in ALARM_METHODS
    if g.method == "ungrounded":
        i_ef = charging_current(g.system_capacitance, v, m.frequency) + own if g.system_capacitance else None
    elif g.method == "solid":
        i_ef = b.fault_min
    else:
        i_ef = g.fault_current_limit
    if g.method == "low-resistance" and i_ef:
        p0, why = max(floor, LRG_FRACTION * i_ef), f"10 % of the {i_ef:.0f} A earth-fault current"
    elif g.method == "solid":
        p0, why = max(floor, SOLID_FRACTION_FLC * b.flc), "20 % of FLC on a solidly grounded supply"
    elif i_ef:
        p0, why = max(floor, LRG_FRACTION * i_ef), f"10 % of the {i_ef:.1f} A earth-fault current"
    else:
        p0, why = max(floor, 0.05 * b.flc), "5 % of FLC (no earth-fault current given)"
    if p0 == floor and floor > 0:
        why = f"twice the circuit's own charging current {own:.2f} A"
    computed(ctx, FID).update(pickup=p0)
    pickup, p_src = ctx.choose(FID, "pickup_current", p0, "current", "A", "common-practice", via=ct, rounding="up")
    delay, d_src = ctx.choose(FID, "time_delay", ALARM_DELAY if alarm_only else TRIP_DELAY, "time", "s",
                              "common-practice")
    action, a_src = ctx.choose(FID, "action", "alarm" if alarm_only else "trip", "text", "", "common-practice")
    if action not in ("trip", "alarm"):
        checks.append(Check("fail", f"50G action must be 'trip' or 'alarm', got {action!r}."))
    if own and pickup < floor:
        checks.append(Check("fail", f"The 50G pickup {pickup:.2f} A is below twice the circuit's own charging "
                                    f"current ({own:.2f} A): an earth fault elsewhere would trip this motor."))
    elif own:
        checks.append(Check("ok", f"The 50G pickup {pickup:.2f} A is {pickup / own:.1f} × the circuit's own "
                                  f"charging current {own:.2f} A."))
    if i_ef:
        share = pickup / i_ef
        if share > LRG_MAX_FRACTION:
            checks.append(Check("warn" if alarm_only else "fail",
                                f"The 50G pickup is {share:.0%} of the available earth-fault current "
                                f"({i_ef:.1f} A): faults near the star point would go undetected (aim ≤ 10–20 %)."))
        else:
            checks.append(Check("ok", f"The 50G pickup is {share:.1%} of the available earth-fault current "
                                      f"({i_ef:.1f} A)."))
    elif g.method == "low-resistance":
        checks.append(Check("warn", "grounding.fault_current_limit is missing: the 50G sensitivity cannot be judged."))
    if pickup < CT_LOW_FRACTION * ct.primary:
        checks.append(Check("warn", f"The 50G pickup {pickup:.2f} A is only {pickup / ct.primary:.1%} of the "
                                    f"{ct.primary:.0f} A CT primary: check the relay's sensitive earth-fault range "
                                    "and the CT's accuracy at that current, or use a lower-ratio core-balance CT."))
    if alarm_only:
        checks.append(Check("ok", f"{g.method.capitalize()} supply: the earth-fault current is small and the system "
                                  "may run with one earth fault, so 50G alarms only; locate the fault and trip by "
                                  "procedure."))
    fused = case.supply.starter == "fused-contactor"
    block = chosen(ctx, "50P").get("block")
    if fused and action == "trip" and g.method == "solid":
        checks.append(Check("warn", "Fused contactor on a solidly grounded supply: earth faults can exceed the "
                                    "contactor's breaking current; the relay must block trips above "
                                    + (f"{block:.0f} A." if block else "the contactor rating.")))
    s = {
        "pickup_current": current_setting(pickup, ct, p_src, "Pickup (core-balance CT)"),
        "time_delay": Setting(delay, "s", d_src, label="Delay"),
        "action": Setting(action, "", a_src, label="Action"),
    }
    if own:
        ctx.derived["charging_current"] = Setting(own, "A", "derived", label="Motor circuit's own 3·I_C0",
                                                  note="3·ω·C0·V_LN")
    channel = "ground" if case.instruments.ground_ct is not None else "phase"
    where = ("the core-balance CT input" if channel == "ground" else
             "phase A of the phase CTs only (residual measurement)")
    tps = [
        timed_test_point("earth-fault current", ct.to_secondary(0.9 * pickup), "A", None,
                         applied_primary=0.9 * pickup, primary_unit="A", input=channel,
                         phases=single(ct.to_secondary(0.9 * pickup)), duration=round(delay + 1.0, 1),
                         description=f"injection on {where}: 0.9 × pickup for {delay + 1:g} s must not operate"),
        timed_test_point("earth-fault current", ct.to_secondary(2.0 * pickup), "A", delay,
                         applied_primary=2.0 * pickup, primary_unit="A", input=channel,
                         phases=single(ct.to_secondary(2.0 * pickup)),
                         description=f"injection on {where}: 2 × pickup {action}s after the delay"),
    ]
    floor_text = (f", above twice the motor circuit's own charging current ({own:.2f} A)" if own else
                  "; the motor circuit's own charging current is not known (grounding.circuit_capacitance), so the "
                  "margin above it is not checked")
    basis = (f"Pickup {pickup:.2f} A: {why}{floor_text}; {action} after {delay:g} s"
             + (" (alarm only: " + g.method + " grounding)." if alarm_only else "."))
    return FunctionSettings(FID, "Earth fault (core-balance)", s, basis,
                            ["IEEE Std C37.96 (motor protection guide) [value from memory]",
                             "Breitkreutz & Frere, IEEE Trans. IA 31(6), 1995 (bounds of the pickup)"], checks, tps)
