"""78 out-of-step (pole-slipping) protection of a generator, where the system impedance makes it relevant.

METHODS.md §9.7 (IEEE C37.102, out-of-step protection, single-blinder scheme from memory; geometry derived): when a
generator loses synchronism the impedance seen at its terminals sweeps across the impedance plane; with equal EMFs
the swing crosses the impedance axis at the electrical centre, (X_e − X'd)/2 from the terminals. If that lies in
the system beyond the step-up transformer, the system's own out-of-step protection deals with the swing; if it lies
in the generator or its step-up transformer (a strong system: X_e < X'd + 2·X_T), the generator needs its own.

The single-blinder scheme: a mho element reaching 2·X'd into the generator and 1.5·X_T into the system (on a bus,
the system's X_e); two blinders either side of the impedance axis at d = (X'd + X_e)/2 · tan(90° − δ/2) with
δ = 120°, the separation beyond which recovery is unlikely. The scheme trips when the impedance enters the mho on one
side of the blinders, crosses both and leaves the mho on the other side; a fault, which jumps into the mho between
the blinders, does not trip it.

Test injections: ``prefault`` holds ``sequence``, the states played in order before the test state, each with its
``phases`` (currents), ``voltage_phases`` and ``duration``.
"""

from __future__ import annotations

import math

from machines.model import Ratio
from machines.protection.base import StudyContext, timed_test_point
from machines.protection.generator_injection import hold_time, impedance_phasors, power_phasors
from machines.record import Check, FunctionSettings, Setting
from machines.standards import generator_capability as cap
from machines.standards.generator_impedance import blinder_distance, electrical_centre

FID = "78"
REVERSE = 2.0  #: mho reach into the generator, × X'd (IEEE C37.102, value from memory)
FORWARD = 1.5  #: mho reach into the system, × X_T (IEEE C37.102, value from memory)
SEPARATION = 120.0  #: [degrees] angle at which the blinders are crossed (IEEE C37.102, value from memory)
TYPICAL_TRANSFORMER = 0.15  #: [pu] upper end of typical step-up transformers, when not given (common practice)
OPERATE_TIME = 0.05  #: [s] typical operate time once the swing is confirmed (the maker's data govern)
STATE_TIME = 0.2  #: [s] each state of the swing sequence is held this long


def relevance(basis, m_xdt: float) -> tuple[bool | None, str]:
    """Whether the swing's electrical centre lies in the generator or its step-up transformer (None: not known),
    and why; ``m_xdt`` is the machine's X'd [pu]."""
    if basis.x_external is None:
        return None, ("the need for 78 cannot be judged: the system's fault level is not given (supply.fault_level)"
                      if basis.supply_given else "the need for 78 cannot be judged without [supply]")
    x_t = 0.0 if not basis.unit_connected else (basis.x_transformer if basis.x_transformer is not None
                                                else TYPICAL_TRANSFORMER)
    centre = electrical_centre(m_xdt, basis.x_external)
    where = ("in the generator" if centre < 0 else "in the step-up transformer" if centre <= x_t
             else "in the system")
    text = (f"the electrical centre of a swing lies {where}: (X_e − X'd)/2 = ({basis.x_external:.3g} − "
            f"{m_xdt:.3g})/2 = {centre:.3g} pu from the terminals"
            + (f", the step-up transformer being {x_t:.3g} pu" if basis.unit_connected else ""))
    if basis.unit_connected and basis.x_transformer is None:
        text += " (typical, not given)"
    return centre <= x_t, text


def settings(ctx: StudyContext) -> FunctionSettings | None:
    """78: mho reaches and blinder distance, or None (with a machine-wide finding) where it is not needed."""
    basis = ctx.extras["generator"]
    m = ctx.case.machine
    needed, why = relevance(basis, m.xd_transient)
    found = ctx.extras["checks"]
    if needed is None:
        found.append(Check("warn", f"78 out-of-step: {why}."))
        return None
    if not needed:
        found.append(Check("ok", f"78 out-of-step protection is not needed: {why}; the system's out-of-step "
                                 f"protection deals with such a swing."))
        return None
    zb, factor = basis.base_impedance, basis.impedance_factor
    checks: list[Check] = [Check("ok", f"78 applies: {why}.")]
    x_e = basis.x_external
    if basis.unit_connected:
        x_t = basis.x_transformer if basis.x_transformer is not None else TYPICAL_TRANSFORMER
        forward0 = FORWARD * x_t
        if basis.x_transformer is None:
            checks.append(Check("warn", "The step-up transformer's impedance is not given "
                                        "(supply.transformer_impedance): the forward reach uses a typical "
                                        f"{TYPICAL_TRANSFORMER:g} pu."))
    else:
        forward0 = x_e
    ohms = None if factor is None else Ratio(1.0, factor)
    fwd, f_src = ctx.choose(FID, "forward_reach", forward0 * zb, "impedance", "ohm", "standard", via=ohms)
    rev, r_src = ctx.choose(FID, "reverse_reach", REVERSE * m.xd_transient * zb, "impedance", "ohm", "standard",
                            via=ohms)
    d0 = blinder_distance(m.xd_transient, x_e, SEPARATION) * zb
    blinder, b_src = ctx.choose(FID, "blinder_distance", d0, "impedance", "ohm", "standard", via=ohms)
    centre_x = electrical_centre(m.xd_transient, x_e) * zb
    c, r = (0.0, (fwd - rev) / 2.0), (fwd + rev) / 2.0
    if abs(centre_x - c[1]) >= r:
        checks.append(Check("fail", "The swing's electrical centre lies outside the mho element: the scheme cannot "
                                    "see the swing; widen the reaches."))
        half_chord = 0.0
    else:
        half_chord = math.sqrt(r * r - (centre_x - c[1]) ** 2)
    if blinder >= half_chord:
        checks.append(Check("fail", f"The blinders ({blinder:.4g} Ω) lie outside the mho element where the swing "
                                    f"crosses it (half-width {half_chord:.4g} Ω): the swing cannot be traced."))
    else:
        checks.append(Check("ok", f"The swing crosses the mho between ±{half_chord:.4g} Ω; the blinders at "
                                  f"±{blinder:.4g} Ω are crossed at about {SEPARATION:g}° between the EMFs."))
    q = math.sqrt(max(0.0, 1.0 - m.power_factor ** 2))
    lr, lx = cap.load_impedance(m.power_factor, q)
    if cap.inside_circle((lr * zb, lx * zb), c, r):
        checks.append(Check("warn", "Rated load lies inside the mho element: a later fault could be taken for the "
                                    "first part of a swing; shorten the forward reach."))
    checks.append(Check("ok", "Trip as the impedance leaves the mho, when the angle between the EMFs has passed "
                              "180° and the breaker interrupts a smaller current; confirm the breaker's "
                              "out-of-phase rating."))
    sec = (lambda z: None) if factor is None else (lambda z: z * factor)
    sunit = "" if factor is None else "ohm"
    values = {
        "forward_reach": Setting(fwd, "ohm", f_src, secondary=sec(fwd), secondary_unit=sunit,
                                 label="Mho reach into the system (+X)"),
        "reverse_reach": Setting(rev, "ohm", r_src, secondary=sec(rev), secondary_unit=sunit,
                                 label="Mho reach into the generator (−X)", note=f"{REVERSE:g} × X'd"),
        "blinder_distance": Setting(blinder, "ohm", b_src, secondary=sec(blinder), secondary_unit=sunit,
                                    label="Blinders, either side of the X axis",
                                    note=f"crossed at {SEPARATION:g}° between the EMFs"),
    }
    tests = _tests(basis, c, r, blinder, centre_x, half_chord)
    basis_text = (f"Single-blinder out-of-step scheme: mho from {rev:.4g} Ω into the generator to {fwd:.4g} Ω into "
                  f"the system, blinders at ±{blinder:.4g} Ω (primary). Trips only when the impedance crosses both "
                  f"blinders inside the mho, as a slipping pole does; a fault inside the mho does not.")
    return FunctionSettings(FID, "Out of step (pole slipping)", values, basis_text,
                            references=["IEEE C37.102 (out-of-step protection, from memory)"], checks=checks,
                            test_points=tests)


def _tests(basis, c, r, blinder: float, centre_x: float, half_chord: float) -> list:
    """A pole slip played as a sequence of states, and a fault that jumps between the blinders (relay-side; none
    without a VT)."""
    factor = basis.impedance_factor
    if factor is None:
        return []
    v, i = basis.rated_secondary_voltage, basis.rated_secondary_current

    def state(z_primary: complex, duration: float) -> dict:
        phases, volts = impedance_phasors(z_primary * factor, v, i)
        return {"phases": phases, "voltage_phases": volts, "duration": duration}

    s_sec = basis.rated_power / basis.ct.factor / basis.vt.factor
    load_i, load_v = power_phasors(s_sec, 0.0, v)
    load = {"phases": load_i, "voltage_phases": load_v, "duration": 1.0}
    middle = complex(0.0, c[1] if abs(c[1]) > 1e-9 * r else -0.5 * r)  # inside the mho, between the blinders
    phases, volts = impedance_phasors(middle * factor, v, i)
    fault = timed_test_point("impedance swing", abs(middle) * factor, "ohm", None, phases=phases,
                             voltage_phases=volts, prefault={"sequence": [load]}, duration=hold_time(1.0),
                             description="a fault: rated load, then straight into the mho between the blinders: "
                                         "must not operate")
    if half_chord <= blinder:
        return [fault]
    mid = 0.5 * (blinder + half_chord)
    a, cc = complex(mid, centre_x), complex(-mid, centre_x)
    out_left = complex(-1.2 * half_chord, centre_x)
    swing = {"sequence": [load, state(a, STATE_TIME), state(middle, STATE_TIME), state(cc, STATE_TIME)]}
    phases, volts = impedance_phasors(out_left * factor, v, i)
    trip = timed_test_point("impedance swing", abs(out_left) * factor, "ohm", OPERATE_TIME, phases=phases,
                            voltage_phases=volts, prefault=swing,
                            description="a pole slip: rated load, then inside the mho right of the right blinder, "
                                        "between the blinders, left of the left blinder (each 0.2 s), then out of "
                                        "the mho on the left: trips")
    return [trip, fault]
