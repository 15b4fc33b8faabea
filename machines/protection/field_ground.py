"""64F field-ground protection of a generator whose field winding is reachable through slip rings.

METHODS.md §9.11 (common practice; IEEE C37.102 describes field-ground detection, from memory): the field circuit is
ungrounded, so a first earth fault does no harm but a second one shorts part of the winding and unbalances the
rotor. A relay that injects a voltage between the field circuit and earth measures the insulation resistance; an
alarm stage warns of deteriorating insulation and a trip stage (or an alarm and a planned shutdown, as the owner
decides) acts on a solid fault. It applies where the field can be reached: a static exciter or a rotating DC exciter
(slip rings or a commutator). A brushless machine needs the maker's rotating detector (prepare says so).
"""

from __future__ import annotations

from machines.protection.base import StudyContext, timed_test_point
from machines.protection.generator_injection import hold_time
from machines.record import Check, FunctionSettings, Setting

FID = "64F"
ALARM_RESISTANCE = 40e3  #: [ohm] (common practice, no published source)
ALARM_DELAY = 10.0  #: [s] (common practice, no published source)
TRIP_RESISTANCE = 5e3  #: [ohm] (common practice, no published source)
TRIP_DELAY = 1.0  #: [s] (common practice, no published source)
HEALTHY = 1e6  #: [ohm] a healthy field's insulation resistance is of this order or above (common practice)


def settings(ctx: StudyContext) -> FunctionSettings | None:
    """64F: alarm and trip stages on the field's insulation resistance (None unless the field is reachable)."""
    m = ctx.case.machine
    if m.excitation not in ("static", "rotating-dc"):
        return None
    checks: list[Check] = []
    alarm, a_src = ctx.choose(FID, "alarm_resistance", ALARM_RESISTANCE, "impedance", "ohm", "common-practice",
                              via=None)
    adelay, ad_src = ctx.choose(FID, "alarm_time_delay", ALARM_DELAY, "time", "s", "common-practice")
    trip, t_src = ctx.choose(FID, "trip_resistance", TRIP_RESISTANCE, "impedance", "ohm", "common-practice", via=None)
    tdelay, td_src = ctx.choose(FID, "trip_time_delay", TRIP_DELAY, "time", "s", "common-practice")
    if trip < alarm < HEALTHY:
        checks.append(Check("ok", f"Trip {trip / 1e3:.4g} kΩ < alarm {alarm / 1e3:.4g} kΩ, both well below a "
                                  f"healthy field's insulation (of the order of {HEALTHY / 1e6:g} MΩ or more)."))
    else:
        checks.append(Check("fail", f"Expected trip < alarm < {HEALTHY / 1e6:g} MΩ, got trip {trip:.4g} Ω and alarm "
                                    f"{alarm:.4g} Ω."))
    checks.append(Check("ok", "Measure the field's insulation resistance at commissioning and keep the alarm well "
                              "below it; with a static exciter, confirm the injection relay tolerates its "
                              "thyristor ripple."))
    values = {
        "alarm_resistance": Setting(alarm, "ohm", a_src, label="Alarm: insulation resistance below"),
        "alarm_time_delay": Setting(adelay, "s", ad_src, label="Alarm delay"),
        "trip_resistance": Setting(trip, "ohm", t_src, label="Trip: insulation resistance below"),
        "trip_time_delay": Setting(tdelay, "s", td_src, label="Trip delay"),
    }

    def tp(r: float, expected, description: str):
        return timed_test_point("field-to-earth resistance", r, "ohm", expected, description=description,
                                duration=None if expected else hold_time(adelay, tdelay))

    tests = [tp(0.8 * trip, tdelay, "80 % of the trip resistance between the field and earth: trip"),
             tp(0.8 * alarm if 0.8 * alarm > trip else 0.5 * (alarm + trip), adelay,
                "between the two settings: alarm only"),
             tp(1.25 * alarm, None, "125 % of the alarm resistance: neither alarm nor trip")]
    basis_text = (f"Insulation of the field circuit to earth, measured by injection: alarm below "
                  f"{alarm / 1e3:.4g} kΩ after {adelay:g} s, trip below {trip / 1e3:.4g} kΩ after {tdelay:g} s. A first "
                  f"field earth fault does no harm; a second shorts part of the winding and unbalances the rotor.")
    return FunctionSettings(FID, "Field ground (rotor earth fault)", values, basis_text,
                            references=["IEEE C37.102 (field ground protection, from memory)"], checks=checks,
                            test_points=tests)
