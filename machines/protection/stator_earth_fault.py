"""Stator earth-fault protection: 59N and 27TN on high-resistance grounding, 51N/50N on low-resistance grounding.

High-resistance (or distribution-transformer) grounding, METHODS.md §7.1: the resistor is sized so that its current
is at least the capacitive current of everything galvanically connected (R_N ≤ X_C0/3, referred to the neutral:
the stator, the surge capacitors, the generator's bus and, on a unit-connected machine, the step-up transformer's
LV winding); a fundamental-frequency neutral overvoltage element (59N) picked up at 5 % of the phase voltage covers
95 % of the winding from the terminals; a third-harmonic neutral undervoltage element (27TN) set at half the lowest
healthy third-harmonic neutral voltage covers the part near the neutral, supervised by the terminal voltage. Both
are selective only on a unit-connected machine: on a shared bus the neutral voltage rises for an earth fault
anywhere on the bus.

Low-resistance or solid grounding: a neutral overcurrent element (51N/50N) on the neutral CT, inverse-time with a
definite-time high set, whose pickup fixes the fraction of the winding covered; 87N (``neutral_differential``)
adds the selective element.
"""

from __future__ import annotations

from machines.errors import InputError
from machines.model import Ratio
from machines.protection.base import (StudyContext, balanced, current_setting, single, timed_test_point,
                                     voltage_setting)
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting
from machines.standards import grounding as gnd
from machines.standards.inverse_time import CURVES, curve_constants, inverse_operate_time, time_multiplier_for

HIGH_RESISTANCE = ("distribution-transformer", "high-resistance", "ungrounded")
COVERAGE = 0.95  #: METHODS.md §7.1: 59N at 5 % of V_LN (value from memory)
NEUTRAL_DELAY = 2.0  #: [s] METHODS.md §7.1: 1–5 s, coordinated with VT fuses and HV-side faults (common practice)
THIRD_HARMONIC_FRACTION = 0.5  #: 27TN at 50 % of the lowest healthy V3N (METHODS.md §7.1, value from memory)
THIRD_HARMONIC_DELAY = 5.0  #: [s] common practice, no published source
SUPERVISION_VOLTAGE = 0.9  #: 27TN enabled above 90 % terminal voltage (common practice, no published source)
NEUTRAL_OC_FRACTION = 0.10  #: 51N at 10 % of the available earth-fault current (METHODS.md §7.2; common practice)
NEUTRAL_OC_TARGET = 1.0  #: [s] 51N time at the full earth-fault current (common practice)
HIGH_SET_FRACTION = 0.5  #: 50N at 50 % of the earth-fault current (common practice, no published source)
HIGH_SET_DELAY = 0.5  #: [s] above feeder instantaneous earth-fault clearing (common practice)

_PARTS = {"machine.stator_capacitance": "the stator", "grounding.surge_capacitance": "the surge capacitors "
          "(0 uF if none are fitted)", "grounding.bus_capacitance": "the generator's bus or cables",
          "grounding.transformer_capacitance": "the step-up transformer's LV winding",
          "grounding.system_capacitance": "the rest of the bus"}


def _neutral_ratio(ctx: StudyContext) -> tuple[Ratio | None, str]:
    """The ratio between the neutral voltage and what the relay sees, and where it comes from."""
    inst, g = ctx.case.instruments, ctx.case.grounding
    if inst.neutral_vt is not None:
        return inst.neutral_vt, "instruments.neutral_vt"
    if g.method == "distribution-transformer" and g.transformer_ratio is not None:
        return g.transformer_ratio, "grounding.transformer_ratio (relay across the secondary resistor)"
    return None, ""


def _missing_text(keys) -> str:
    return "; ".join(f"{k} ({_PARTS.get(k, k)})" for k in keys)


def _resistor(ctx: StudyContext, checks: list[Check]) -> dict[str, Setting]:
    """Check the grounding resistor (installed or sized in prepare) against X_C0/3; the record entries."""
    basis, case = ctx.extras["generator"], ctx.case
    g = case.grounding
    n = basis.grounding_turns
    out: dict[str, Setting] = {}
    if g.method == "ungrounded":
        return out
    if g.method == "distribution-transformer" and g.transformer_ratio is None:
        checks.append(Check("warn", "grounding.transformer_ratio is missing: the resistor is sized as if it sat "
                                    "directly in the neutral."))
    limit, r_n = basis.resistance_limit, basis.neutral_resistance
    missing = basis.capacitance_missing
    if basis.capacitance is None:
        checks.append(Check("warn", "No capacitance data (" + _missing_text(missing) + "): the grounding resistor "
                                    "cannot be sized or checked and the charging current is unknown."))
    elif missing:
        what = ("is sized" if basis.neutral_resistance_source == "standard" else "is checked")
        checks.append(Check("warn", f"The grounding resistor {what} on part of the capacitance only "
                                    f"({', '.join(basis.capacitance_parts)}); not given: {_missing_text(missing)}. "
                                    f"The whole zone's capacitance is larger, so the resistor must be smaller than "
                                    f"X_C0/3 = {limit:.4g} Ω found here."))
    if r_n is None:
        return out
    if basis.neutral_resistance_source == "entered":
        label = "Grounding resistor as installed"
        if limit is not None:
            if r_n <= limit * 1.0001:
                checks.append(Check("ok", f"Installed resistor {r_n:.4g} Ω (neutral-referred) is at most X_C0/3 = "
                                          f"{limit:.4g} Ω: resistive current ≥ capacitive current."))
            else:
                checks.append(Check("warn", f"Installed resistor {r_n:.4g} Ω (neutral-referred) exceeds X_C0/3 = "
                                            f"{limit:.4g} Ω: the resistive current is below the capacitive current "
                                            f"and arcing faults can cause transient overvoltages; a resistor of at "
                                            f"most {limit / n / n:.4g} Ω "
                                            f"{'on the transformer secondary ' if n != 1 else ''}is advised."))
    else:
        label = "Grounding resistor (R_N = X_C0/3)"
    out["grounding_resistor"] = Setting(r_n, "ohm", basis.neutral_resistance_source,
                                        secondary=r_n / (n * n) if n != 1 else None,
                                        secondary_unit="ohm" if n != 1 else "", label=label,
                                        note="secondary: on the grounding transformer's secondary"
                                        if n != 1 else "in the neutral", keyed=False)
    return out


def _derive_fault(ctx: StudyContext) -> None:
    basis, m = ctx.extras["generator"], ctx.case.machine
    d, n, r_n = ctx.derived, basis.grounding_turns, basis.neutral_resistance
    if r_n is None:
        return
    i_c = d["charging_current"].value if "charging_current" in d else None
    i_r = gnd.resistor_current(m.rated_voltage, r_n)
    d["resistor_current"] = Setting(i_r, "A", "derived", secondary=i_r * n if n != 1 else None,
                                    secondary_unit="A" if n != 1 else "", label="Resistor current, terminal fault",
                                    note="V_LN/R_N; secondary: in the resistor" if n != 1 else "V_LN/R_N")
    d["resistor_power"] = Setting(gnd.resistor_power(m.rated_voltage, i_r), "W", "derived",
                                  label="Resistor power, terminal fault", note="V_LN·I_R")
    if i_c is not None:
        d["earth_fault_current"] = Setting(gnd.earth_fault_current(i_r, i_c), "A", "derived",
                                           label="Earth-fault current, terminal fault", note="|I_R + j·3I_C0|")
    d["neutral_voltage"] = Setting(basis.phase_voltage, "V", "derived",
                                   secondary=basis.phase_voltage / n if n != 1 else None,
                                   secondary_unit="V" if n != 1 else "", label="Neutral voltage, terminal fault")


def _selectivity(basis, checks: list[Check]) -> None:
    if basis.connection == "unit-transformer":
        checks.append(Check("ok", "Unit-connected: the neutral voltage rises only for earth faults on the "
                                  "generator, its bus and the step-up transformer's LV winding, so 59N is "
                                  "selective."))
    elif basis.connection == "bus":
        checks.append(Check("warn", "Bus-connected: the neutral voltage rises for an earth fault anywhere on the "
                                    "galvanically connected bus, so 59N is not selective; use it to alarm or as "
                                    "time-graded backup, and find the faulted circuit with directional or "
                                    "core-balance earth-fault elements on each circuit. 27TN is not applied: the "
                                    "third-harmonic neutral voltage depends on the other machines on the bus."))
    else:
        checks.append(Check("warn", "The connection is not known (supply.connection): 59N is selective only on a "
                                    "unit-connected machine; on a shared bus it sees earth faults anywhere on the "
                                    "bus."))


def neutral_overvoltage(ctx: StudyContext) -> FunctionSettings | None:
    """59N: fundamental neutral overvoltage for 95 % of the winding, with the grounding resistor sized."""
    case = ctx.case
    if case.grounding.method not in HIGH_RESISTANCE:
        return None
    basis, m = ctx.extras["generator"], case.machine
    checks: list[Check] = []
    values = _resistor(ctx, checks)
    _derive_fault(ctx)
    v_ln = basis.phase_voltage
    coverage, cov_src = ctx.choose("59N", "coverage", COVERAGE, "per_unit", "", "standard")
    if not 0.0 < coverage < 1.0:
        raise InputError("overrides.59N.coverage", f"expected a fraction of the winding between 0 and 1, got "
                                                   f"{coverage:g}")
    ratio, ratio_from = _neutral_ratio(ctx)
    # rounded down: a lower pickup keeps at least the coverage asked for
    pickup, p_src = ctx.choose("59N", "pickup_voltage", gnd.neutral_pickup_for_coverage(m.rated_voltage, coverage),
                               "voltage", "V", cov_src, via=ratio, rounding="down")
    # the coverage is what the rounded (or overridden) pickup achieves; it is not keyed into the relay
    coverage = gnd.coverage_for_neutral_pickup(m.rated_voltage, pickup)
    cov_src = "derived" if case.override("59N.pickup_voltage") is not None else cov_src
    ctx.steps.pop(("59N", "coverage"), None)
    delay, d_src = ctx.choose("59N", "time_delay", NEUTRAL_DELAY, "time", "s", "common-practice")
    if ratio is None:
        checks.append(Check("warn", "No neutral VT or grounding-transformer ratio: the 59N pickup is given in "
                                    "primary neutral volts only."))
    if coverage >= 0.9:
        checks.append(Check("ok", f"59N covers {coverage:.1%} of the winding from the terminals (faults more than "
                                  f"{1 - coverage:.1%} from the neutral)."))
    else:
        checks.append(Check("warn", f"59N covers only {coverage:.1%} of the winding from the terminals; 95 % is "
                                    f"usual."))
    _selectivity(basis, checks)
    if basis.connection != "bus" and (m.third_harmonic_neutral_min is None or case.grounding.method == "ungrounded"):
        checks.append(Check("warn", f"No third-harmonic data (machine.third_harmonic_neutral_min): 27TN is left "
                                    f"out and the {1 - coverage:.0%} of the winding nearest the neutral is "
                                    f"unprotected against earth faults."))
    checks.append(Check("ok", "The 59N element must reject third harmonic (fundamental-frequency filtering): the "
                              "healthy neutral carries several per cent third harmonic."))
    if case.grounding.method == "ungrounded":
        checks.append(Check("warn", "Ungrounded machine: 59N measures the residual (broken-delta) voltage; arcing "
                                    "earth faults can cause transient overvoltages: high-resistance grounding is "
                                    "advised."))
    values["pickup_voltage"] = voltage_setting(pickup, ratio, p_src, "Pickup (neutral voltage)",
                                               f"{pickup / v_ln:.1%} of V_LN" + (f"; secondary via {ratio_from}"
                                                                                 if ratio else ""))
    values["coverage"] = Setting(coverage, "pu", cov_src, label="Winding covered from the terminals", keyed=False)
    values["time_delay"] = Setting(delay, "s", d_src, label="Time delay")
    sec = (lambda v: v) if ratio is None else ratio.to_secondary
    unit_note = "V" if ratio else "V (primary)"

    def tp(v: float, expected, description: str, duration=None):
        return timed_test_point("neutral voltage", sec(v), unit_note, expected, applied_primary=v, primary_unit="V",
                                input="neutral", phases=single(sec(v)), description=description, duration=duration)

    tests = [tp(0.9 * pickup, None, "90 % of pickup, fundamental: must not trip", hold_time(delay)),
             tp(1.2 * pickup, delay, "120 % of pickup: trips after the delay")]
    for x in (0.05, 0.10, 0.50):
        v = gnd.neutral_voltage_for_fault(m.rated_voltage, x)
        if v > 1.1 * pickup:  # a simulated fault only where it trips beyond the relay's pickup tolerance
            tests.append(tp(v, delay, f"simulated fault {x:.0%} of the winding from the neutral"))
    why_delay = (" and earth faults on the step-up transformer's HV side coupled through its inter-winding "
                 "capacitance (check the coupled voltage)" if basis.connection != "bus" else "")
    basis_text = (f"Neutral overvoltage at {1 - coverage:.0%} of the phase voltage ({pickup:.4g} V primary) covers "
                  f"{coverage:.0%} of the winding from the terminals. Delay {delay:g} s rides through VT secondary "
                  f"fuse operation{why_delay}.")
    if "grounding_resistor" in values and values["grounding_resistor"].source == "standard":
        basis_text += (" The resistor is the largest that keeps the resistive current at least equal to the "
                       "capacitive current (R_N ≤ X_C0/3), limiting transient overvoltages on arcing faults.")
    return FunctionSettings("59N", "Stator earth fault, neutral overvoltage (95 %)", values, basis_text,
                            references=["IEEE C37.101", "IEEE C62.92.2", "IEEE C37.102"], checks=checks,
                            test_points=tests)


def third_harmonic(ctx: StudyContext) -> FunctionSettings | None:
    """27TN: third-harmonic neutral undervoltage for the winding near the neutral (None without V3N data or on a
    shared bus)."""
    case = ctx.case
    m = case.machine
    basis = ctx.extras["generator"]
    if case.grounding.method not in ("distribution-transformer", "high-resistance") or basis.connection == "bus":
        return None
    if m.third_harmonic_neutral_min is None:
        return None
    checks: list[Check] = []
    v3 = m.third_harmonic_neutral_min
    ratio, ratio_from = _neutral_ratio(ctx)
    # rounded down: a lower pickup keeps the margin below the healthy V3N
    pickup, p_src = ctx.choose("27TN", "pickup_voltage", THIRD_HARMONIC_FRACTION * v3, "voltage", "V", "standard",
                               via=ratio, rounding="down")
    delay, d_src = ctx.choose("27TN", "time_delay", THIRD_HARMONIC_DELAY, "time", "s", "common-practice")
    sup, s_src = ctx.choose("27TN", "supervision_voltage", SUPERVISION_VOLTAGE * m.rated_voltage, "voltage", "V",
                            "common-practice")
    vt = case.instruments.vt
    if pickup < v3:
        checks.append(Check("ok", f"Pickup {pickup:.4g} V is {pickup / v3:.0%} of the lowest healthy third-harmonic "
                                  f"neutral voltage {v3:.4g} V: no operation in healthy service."))
    else:
        checks.append(Check("fail", f"Pickup {pickup:.4g} V is not below the lowest healthy third-harmonic neutral "
                                    f"voltage {v3:.4g} V: the element trips a healthy machine."))
    if ratio is not None and ratio.to_secondary(pickup) < 0.3:
        checks.append(Check("warn", f"Secondary pickup {ratio.to_secondary(pickup):.3g} V is below about 0.3 V: "
                                    f"check the relay's third-harmonic setting range."))
    checks.append(Check("ok", "Overlap with 59N near the neutral must be confirmed at commissioning (neutral-end "
                              "fault test), because the third-harmonic distribution is machine-specific."))
    values = {
        "pickup_voltage": voltage_setting(pickup, ratio, p_src, "Pickup (third-harmonic neutral voltage)",
                                          f"{THIRD_HARMONIC_FRACTION:.0%} of the lowest healthy V3N"
                                          if p_src != "override" else ""),
        "time_delay": Setting(delay, "s", d_src, label="Time delay"),
        "supervision_voltage": voltage_setting(sup, vt, s_src, "Terminal-voltage supervision (enable above)"),
    }
    sec = (lambda v: v) if ratio is None else ratio.to_secondary
    unit_note = "V" if ratio else "V (primary)"
    v_rated = basis.rated_secondary_voltage
    v_low = None if vt is None else vt.to_secondary(0.9 * sup / 3 ** 0.5)

    def tp(v: float, expected, terminal, state: str, description: str, duration=None):
        return timed_test_point("third-harmonic neutral voltage", sec(v), unit_note, expected, applied_primary=v,
                                primary_unit="V", input="neutral", phases=single(sec(v)),
                                frequency=3.0 * m.frequency, initial_state=state,
                                voltage_phases=None if terminal is None else balanced(terminal),
                                description=description, duration=duration)

    tests = [tp(0.8 * pickup, delay, v_rated, "terminal voltage rated",
                "80 % of pickup at 3f with rated terminal voltage: trips"),
             tp(1.2 * pickup, None, v_rated, "terminal voltage rated", "120 % of pickup: must not trip",
                hold_time(delay)),
             tp(0.5 * pickup, None, v_low, "terminal voltage below supervision",
                "supervision blocks below the terminal-voltage threshold", hold_time(delay))]
    basis_text = (f"Third-harmonic neutral undervoltage at {THIRD_HARMONIC_FRACTION:.0%} of the lowest healthy V3N "
                  f"measured over the load range ({v3:.4g} V) detects faults near the neutral, where 59N is blind; "
                  f"enabled only above {sup / m.rated_voltage:.0%} terminal voltage so that it does not trip a "
                  f"de-excited machine. A forward-power window may be added where V3N falls at light load.")
    return FunctionSettings("27TN", "Stator earth fault, third-harmonic neutral undervoltage (100 %)", values,
                            basis_text, references=["IEEE C37.101", "IEEE C37.102"], checks=checks,
                            test_points=tests)


def neutral_ct(ctx: StudyContext) -> tuple[Ratio, str, str]:
    """The CT a generator's neutral overcurrent measures through, the relay input and a note:
    the neutral CT; else a core-balance CT at the terminals; else the residual of the phase CTs."""
    ins, basis = ctx.case.instruments, ctx.extras["generator"]
    if ins.neutral_ct is not None:
        return ins.neutral_ct, "neutral", ""
    if ins.ground_ct is not None:
        return ins.ground_ct, "ground", ("No neutral CT (instruments.neutral_ct): the element is set on the "
                                         "core-balance CT at the terminals (instruments.ground_ct), which carries the "
                                         "system's contribution to an internal fault rather than the neutral current.")
    return basis.ct, "phase", ("No neutral CT (instruments.neutral_ct): the element is set on the residual of the "
                               "phase CTs, which limits its sensitivity; a neutral CT also allows 87N.")


def neutral_overcurrent(ctx: StudyContext) -> FunctionSettings | None:
    """51N/50N for low-resistance or solidly grounded machines."""
    case = ctx.case
    g = case.grounding
    if g.method not in ("low-resistance", "solid"):
        return None
    basis = ctx.extras["generator"]
    checks: list[Check] = []
    ct, channel, ct_note = neutral_ct(ctx)
    if ct_note:
        checks.append(Check("warn", ct_note))
    if g.fault_current_limit is not None:
        i_g, ig_note = g.fault_current_limit, "grounding.fault_current_limit"
    else:
        i_g, ig_note = basis.rated_current, "rated current (no fault-current limit given)"
        checks.append(Check("warn", "No earth-fault current limit (grounding.fault_current_limit): pickup set from "
                                    "the rated current; coverage of the winding cannot be judged."))
    curve = "IEEE-VI" if case.study.practice == "IEEE" else "IEC-VI"
    # rounded down: a lower pickup keeps the coverage
    pickup, p_src = ctx.choose("51N", "pickup_current", NEUTRAL_OC_FRACTION * i_g, "current", "A", "common-practice",
                               via=ct, rounding="down")
    curve, c_src = ctx.choose("51N", "curve", curve, "text", "", "standard")
    if curve not in CURVES:
        raise InputError("overrides.51N.curve", f"expected one of {', '.join(CURVES)}, got {curve!r}")
    mult_key = "time_dial" if curve.startswith("IEEE") else "time_multiplier"
    m_at_fault = i_g / pickup
    tms0 = time_multiplier_for(NEUTRAL_OC_TARGET, m_at_fault, curve) if m_at_fault > 1.0 else 1.0
    tms, t_src = ctx.choose("51N", mult_key, tms0, "per_unit", "", "common-practice")
    hs, hs_src = ctx.choose("51N", "definite_pickup_current", HIGH_SET_FRACTION * i_g, "current", "A",
                            "common-practice", via=ct)
    hsd, hsd_src = ctx.choose("51N", "definite_time_delay", HIGH_SET_DELAY, "time", "s", "common-practice")
    coverage = max(0.0, 1.0 - pickup / i_g)
    if coverage >= 0.85:
        checks.append(Check("ok", f"51N covers {coverage:.0%} of the winding from the terminals ({ig_note})."))
    else:
        checks.append(Check("warn", f"51N covers only {coverage:.0%} of the winding from the terminals; lower the "
                                    f"pickup or add a restricted earth-fault element (87N)."))
    if hs <= pickup:
        checks.append(Check("warn", f"The definite-time stage {hs:.4g} A is not above the inverse stage's pickup "
                                    f"{pickup:.4g} A."))
    checks.append(Check("ok", "51N sees earth faults anywhere on the galvanically connected system: grade its time "
                              "and the 50N delay above the slowest feeder earth-fault protection (margin 0.2–0.4 s)."))
    values = {
        "pickup_current": current_setting(pickup, ct, p_src, "51N pickup",
                                          f"{pickup / i_g:.0%} of the earth-fault current"),
        "curve": Setting(curve, "", c_src, label="Curve", note=curve_constants(curve).name),
        mult_key: Setting(tms, "", t_src, label="Time dial" if mult_key == "time_dial" else "Time multiplier",
                          note=f"{NEUTRAL_OC_TARGET:g} s at the full earth-fault current" if t_src != "override"
                          else ""),
        "coverage": Setting(coverage, "pu", "derived", label="Winding covered from the terminals", keyed=False),
        "definite_pickup_current": current_setting(hs, ct, hs_src, "50N definite-time pickup"),
        "definite_time_delay": Setting(hsd, "s", hsd_src, label="50N delay"),
    }

    def operate(i_a: float) -> float | None:
        times = []
        if i_a > pickup:
            times.append(inverse_operate_time(i_a / pickup, curve, tms))
        if i_a > hs:
            times.append(hsd)
        return min(times) if times else None

    tests = [timed_test_point("neutral current", ct.to_secondary(0.9 * pickup), "A", None,
                              applied_primary=0.9 * pickup, primary_unit="A", input=channel,
                              phases=single(ct.to_secondary(0.9 * pickup)),
                              description="51N at 90 % of pickup: must not operate",
                              duration=hold_time(inverse_operate_time(1.1, curve, tms)))]
    for mult in (2.0, 5.0, 10.0):
        i_a = mult * pickup
        t = operate(i_a)
        stage = "50N" if i_a > hs and hsd <= inverse_operate_time(mult, curve, tms) else "51N"
        tests.append(timed_test_point("neutral current", ct.to_secondary(i_a), "A", t, applied_primary=i_a,
                                      primary_unit="A", input=channel, phases=single(ct.to_secondary(i_a)),
                                      description=f"{mult:g} × the 51N pickup ({stage} operates first)"))
    i_a = 1.2 * hs
    tests.append(timed_test_point("neutral current", ct.to_secondary(i_a), "A", operate(i_a), applied_primary=i_a,
                                  primary_unit="A", input=channel, phases=single(ct.to_secondary(i_a)),
                                  description="120 % of the 50N pickup (the faster of 50N and 51N)"))
    basis_text = (f"Neutral overcurrent at {pickup / i_g:.0%} of the available earth-fault current ({i_g:.4g} A, "
                  f"{ig_note}) covers {coverage:.0%} of the winding; {curve_constants(curve).name} with "
                  f"{NEUTRAL_OC_TARGET:g} s at the full fault current; a definite-time stage at "
                  f"{hs / i_g:.0%} clears heavy faults in {hsd:g} s.")
    return FunctionSettings("51N", "Stator earth fault, neutral overcurrent (51N/50N)", values, basis_text,
                            references=["IEEE C37.102", "IEEE C37.101", "IEC 60255-151", "IEEE C37.112"],
                            checks=checks, test_points=tests)
