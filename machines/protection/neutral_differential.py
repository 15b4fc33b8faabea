"""87N restricted earth-fault (neutral differential) protection of a resistance- or solidly grounded generator.

METHODS.md §9.9 (common practice; IEEE C37.102 describes the ground differential of a resistance-grounded machine,
from memory): the current in the neutral CT is compared with the residual current of the phase CTs at the
terminals. For an earth fault outside the winding both carry the same current and the difference is zero; for a
fault in the winding the neutral carries the fault current that the terminals do not. So the element is selective
on a bus shared with other grounded machines and feeders, where 51N is not, and it can be set well below the
grounding's earth-fault current: pickup 10 % of it (90 % of the winding), not below 5 % of the phase CTs' rating
(their residual error under load), with a 10 % bias on the largest phase current for stability when the phase
CTs saturate on external faults.

Polarity as tested: the neutral CT and the phase CTs read a current flowing from the neutral towards the terminals
in the same direction, so that an external earth fault gives no difference.
"""

from __future__ import annotations

from machines.protection.base import StudyContext, balanced, current_setting, phasor, single, timed_test_point
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting

FID = "87N"
PICKUP_FRACTION = 0.10  #: of the terminal earth-fault current: 90 % of the winding (common practice)
RESIDUAL_FLOOR = 0.05  #: of the phase CTs' primary rating: their residual error under load (common practice)
SLOPE = 0.10  #: bias on the largest phase current (common practice, no published source)
DELAY = 0.1  #: [s] rides through CT transients on external faults (common practice, no published source)


def settings(ctx: StudyContext) -> FunctionSettings | None:
    """87N: pickup, bias and delay on the neutral CT; None without a neutral CT or where it cannot work."""
    case, basis = ctx.case, ctx.extras["generator"]
    ncts = case.instruments.neutral_ct
    if ncts is None or case.grounding.method == "ungrounded":
        return None
    pct = basis.ct
    floor = RESIDUAL_FLOOR * pct.primary
    i_g = basis.earth_fault_current
    if i_g is not None and i_g < 2.0 * floor:
        ctx.extras["checks"].append(Check(
            "ok", f"87N is not applied: the earth-fault current {i_g:.4g} A is less than twice the least current the "
                  f"phase CTs' residual measures reliably ({floor:.4g} A, {RESIDUAL_FLOOR:.0%} of "
                  f"{pct.primary:g} A); the stator earth-fault elements on the neutral cover the winding."))
        return None
    checks: list[Check] = []
    target = floor if i_g is None else max(PICKUP_FRACTION * i_g, floor)
    # rounded down: a lower pickup keeps the coverage
    pickup, p_src = ctx.choose(FID, "pickup_current", target, "current", "A", "common-practice", via=ncts,
                               rounding="down")
    slope, s_src = ctx.choose(FID, "slope", SLOPE, "per_unit", "", "common-practice")
    delay, d_src = ctx.choose(FID, "time_delay", DELAY, "time", "s", "common-practice")
    if i_g is None:
        checks.append(Check("warn", "The earth-fault current is not known (grounding.fault_current_limit): the "
                                    f"pickup is the phase CTs' floor {floor:.4g} A and the winding covered cannot "
                                    "be judged."))
        coverage = None
    else:
        coverage = max(0.0, 1.0 - pickup / i_g)
        status = "ok" if coverage >= 0.85 else "warn"
        checks.append(Check(status, f"87N picks up at {pickup:.4g} A, {pickup / i_g:.0%} of the {i_g:.4g} A "
                                    f"earth-fault current ({basis.earth_fault_note}): it covers {coverage:.0%} of the "
                                    f"winding from the terminals at no load."))
    if pickup < floor * (1 - 1e-9):
        checks.append(Check("warn", f"Pickup {pickup:.4g} A is below {RESIDUAL_FLOOR:.0%} of the phase CTs' rating "
                                    f"({floor:.4g} A): their residual error under load may operate the element."))
    if ncts.primary > 0 and i_g is not None and i_g > 20.0 * ncts.primary:
        checks.append(Check("warn", f"The neutral CT {ncts.primary:g}/{ncts.secondary:g} A carries {i_g / ncts.primary:.3g}"
                                    f" × its rating in a terminal fault: check it does not saturate."))
    if basis.connection == "bus":
        checks.append(Check("ok", "Bus-connected: 87N trips only for earth faults inside the winding, where the 51N "
                                  "on the neutral sees faults anywhere on the bus."))
    values = {
        "pickup_current": current_setting(pickup, ncts, p_src, "Pickup (neutral − residual current)",
                                          f"on the neutral CT {ncts.primary:g}/{ncts.secondary:g} A"),
        "slope": Setting(slope, "pu", s_src, label="Bias (fraction of the largest phase current)"),
        "time_delay": Setting(delay, "s", d_src, label="Time delay"),
    }
    if coverage is not None:
        values["coverage"] = Setting(coverage, "pu", "derived", label="Winding covered from the terminals (no load)",
                                     keyed=False)
    to_n = ncts.to_secondary
    tests = [timed_test_point("neutral current", to_n(1.2 * pickup), "A", delay, applied_primary=1.2 * pickup,
                              primary_unit="A", input="neutral", phases=single(to_n(1.2 * pickup)),
                              current_phases=balanced(0.0),
                              description="internal fault fed by the machine alone: 120 % of pickup in the "
                                          "neutral, no residual at the terminals"),
             timed_test_point("neutral current", to_n(0.9 * pickup), "A", None, applied_primary=0.9 * pickup,
                              primary_unit="A", input="neutral", phases=single(to_n(0.9 * pickup)),
                              current_phases=balanced(0.0), description="90 % of pickup: must not operate",
                              duration=hold_time(delay))]
    i_ext = i_g if i_g is not None else 5.0 * pickup
    tests.append(timed_test_point(
        "neutral current", to_n(i_ext), "A", None, applied_primary=i_ext, primary_unit="A", input="neutral",
        phases=single(to_n(i_ext)), current_phases=[phasor(pct.to_secondary(i_ext)), phasor(0.0), phasor(0.0)],
        description="external earth fault: the same current in the neutral and in phase A at the terminals "
                    "(polarity as in the basis): must not operate", duration=hold_time(delay)))
    covered = "" if coverage is None else f", {coverage:.0%} of the winding"
    basis_text = (f"Restricted earth fault: operates when |I_neutral − 3I0| exceeds {pickup:.4g} A primary{covered}, "
                  f"biased by {slope:.0%} of the largest phase current, after {delay:g} s. The neutral CT and the "
                  f"phase CTs read a current from the neutral towards the terminals in the same direction, so an "
                  f"external earth fault gives no difference; confirm the relay's own polarity convention.")
    return FunctionSettings(FID, "Restricted earth fault (neutral differential)", values, basis_text,
                            references=["IEEE C37.102 (ground differential, from memory)", "IEEE C37.101"],
                            checks=checks, test_points=tests)
