"""40 loss-of-field protection: two-zone negative-offset mho (IEEE C37.102 approach, from memory).

METHODS.md §9.2: both circles are offset down the −X axis by X'd/2; zone 1 has a diameter of 1.0 pu of the machine's
base impedance and a short delay (loss of field from heavy load); zone 2 a diameter of X_d and a longer delay that
rides through stable power swings. Relay-side ohms are Z_sec = Z_pri · CTR / VTR. The zones are checked against the
rated load, the maker's capability curve and the voltage regulator's under-excitation limiter (UEL) mapped into the
impedance plane at rated voltage, Z = V²·(P + jQ)/|S|² (METHODS.md §9.2): the machine may run anywhere inside its
capability, and the limiter must act before the impedance reaches zone 2.
"""

from __future__ import annotations

import math

from machines.model import CapabilityPoint, Ratio
from machines.protection.base import StudyContext, timed_test_point
from machines.protection.generator_injection import hold_time, impedance_phasors
from machines.record import Check, FunctionSettings, Setting
from machines.standards import generator_capability as cap

FID = "40"
ZONE1_DIAMETER = 1.0  #: [pu of Z_b] METHODS.md §9.2 (IEEE C37.102, value from memory)
ZONE1_DELAY = 0.1  #: [s] METHODS.md §9.2 (IEEE C37.102, value from memory)
ZONE2_DELAY = 0.5  #: [s] METHODS.md §9.2: 0.5–0.6 s (IEEE C37.102, value from memory)
PROBE = 0.05  #: test points 5 % inside and outside the far reach
SMALL_GAIN = 0.2  #: zone 2 reaching less than 20 % beyond zone 1 adds little (common practice)
UEL_MARGIN = 0.1  #: the UEL at least 10 % of zone 2's radius outside it (common practice, no published source)


def _ohm(value: float, factor: float | None, source: str, label: str, note: str = "") -> Setting:
    return Setting(value, "ohm", source, secondary=None if factor is None else value * factor,
                   secondary_unit="" if factor is None else "ohm", label=label, note=note)


def pq_impedance(point: CapabilityPoint, zb: float) -> tuple[float, float] | None:
    """The impedance (R, X) [ohm primary] seen at rated voltage for an underexcited operating point, or None at
    P = Q = 0."""
    if point.active_power <= 0.0 and point.reactive_absorbed <= 0.0:
        return None
    r, x = cap.load_impedance(point.active_power, -point.reactive_absorbed)
    return r * zb, x * zb


def _capability_at(rows, p: float) -> float | None:
    """The reactive power absorbed the capability allows at active power ``p`` (linear between rows), or None."""
    rows = sorted(rows, key=lambda r: r.active_power)
    for a, b in zip(rows, rows[1:]):
        if a.active_power <= p <= b.active_power:
            t = (p - a.active_power) / (b.active_power - a.active_power)
            return a.reactive_absorbed + t * (b.reactive_absorbed - a.reactive_absorbed)
    if len(rows) == 1 and abs(rows[0].active_power - p) < 1e-9:
        return rows[0].reactive_absorbed
    return None


def _zone_checks(ctx, zones, checks: list[Check]) -> None:
    basis, m = ctx.extras["generator"], ctx.case.machine
    zb = basis.base_impedance
    circles = {name: cap.offset_mho_circle(o, d) for name, o, d, _ in zones}
    # rated load, overexcited (lagging pf): outside both circles
    q = math.sqrt(max(0.0, 1.0 - m.power_factor ** 2))
    r_pu, x_pu = cap.load_impedance(m.power_factor, q)
    load = (r_pu * zb, x_pu * zb)
    for name, (c, rad) in circles.items():
        if cap.inside_circle(load, c, rad):
            checks.append(Check("fail", f"Rated load ({load[0]:.4g} + j{load[1]:.4g} Ω) lies inside {name}: the "
                                        f"element trips a healthy machine."))
    if m.capability:
        inside = []
        for pt in m.capability:
            z = pq_impedance(pt, zb)
            hit = [name for name, (c, rad) in circles.items() if z is not None and cap.inside_circle(z, c, rad)]
            if hit:
                inside.append(f"P {pt.active_power:g} / Q −{pt.reactive_absorbed:g} pu in {' and '.join(hit)}")
        if inside:
            checks.append(Check("fail", "Points of the maker's capability curve lie inside the loss-of-field zones ("
                                        + "; ".join(inside) + "): the element would trip the machine where it may "
                                        "run."))
        else:
            checks.append(Check("ok", f"The maker's capability curve ({len(m.capability)} points, mapped at rated "
                                      f"voltage) lies outside both zones."))
    else:
        lead = cap.load_impedance(m.power_factor, -m.power_factor * math.tan(math.acos(0.95)))
        c2, r2 = circles["zone 2"]
        if cap.inside_circle((lead[0] * zb, lead[1] * zb), c2, r2):
            checks.append(Check("warn", "Underexcited operation at rated power and 0.95 leading power factor lies "
                                        "inside zone 2; the capability curve is not given (machine.capability)."))
        else:
            checks.append(Check("warn", "The maker's capability curve is not given (machine.capability): only rated "
                                        "load and rated power at 0.95 leading power factor were checked outside "
                                        "the zones."))
    if m.uel:
        c2, r2 = circles["zone 2"]
        worst = math.inf
        for pt in m.uel:
            z = pq_impedance(pt, zb)
            if z is not None:
                worst = min(worst, (math.hypot(z[0] - c2[0], z[1] - c2[1]) - r2) / r2)
        if not math.isfinite(worst):
            pass
        elif worst <= 0.0:
            checks.append(Check("fail", "The under-excitation limiter (machine.uel) lets the machine into zone 2: "
                                        "40 would trip before the limiter acts; raise the limiter or shrink zone 2."))
        elif worst < UEL_MARGIN:
            checks.append(Check("warn", f"The under-excitation limiter comes within {worst:.0%} of zone 2's radius "
                                        f"of the circle: little margin between the limiter and the trip."))
        else:
            checks.append(Check("ok", f"The under-excitation limiter stays at least {worst:.0%} of zone 2's radius "
                                      f"outside zone 2: it acts before the element."))
        beyond = [pt for pt in m.uel if (qc := _capability_at(m.capability, pt.active_power)) is not None
                  and pt.reactive_absorbed > qc * (1 + 1e-9)]
        if beyond:
            checks.append(Check("warn", "The under-excitation limiter allows more reactive absorption than the "
                                        "capability curve at P = " + ", ".join(f"{p.active_power:g}" for p in beyond)
                                        + " pu: set it inside the capability."))
    else:
        checks.append(Check("warn", "The under-excitation limiter is not given (machine.uel): check that it acts "
                                    "before zone 2."))


def settings(ctx: StudyContext) -> FunctionSettings:
    """40: offsets, diameters and delays of both zones in primary and secondary ohms."""
    basis, m = ctx.extras["generator"], ctx.case.machine
    zb, factor = basis.base_impedance, basis.impedance_factor
    checks: list[Check] = []
    offset = m.xd_transient / 2.0 * zb
    ohms = None if factor is None else Ratio(1.0, factor)  # relay-side ohms = primary ohms × CTR/VTR
    # diameters rounded down: the zones keep their distance from the load and the capability
    z1o, z1o_src = ctx.choose(FID, "zone1_offset", offset, "impedance", "ohm", "standard", via=ohms)
    z1d, z1d_src = ctx.choose(FID, "zone1_diameter", ZONE1_DIAMETER * zb, "impedance", "ohm", "standard", via=ohms,
                              rounding="down")
    z1t, z1t_src = ctx.choose(FID, "zone1_time_delay", ZONE1_DELAY, "time", "s", "standard")
    z2o, z2o_src = ctx.choose(FID, "zone2_offset", offset, "impedance", "ohm", "standard", via=ohms)
    z2d, z2d_src = ctx.choose(FID, "zone2_diameter", m.xd * zb, "impedance", "ohm", "standard", via=ohms,
                              rounding="down")
    z2t, z2t_src = ctx.choose(FID, "zone2_time_delay", ZONE2_DELAY, "time", "s", "standard")
    reach1, reach2 = z1o + z1d, z2o + z2d
    if reach2 <= reach1:
        checks.append(Check("warn", f"Zone 2 reaches {reach2:.4g} Ω, not beyond zone 1's {reach1:.4g} Ω "
                                    f"(X_d = {m.xd:g} pu ≤ 1 pu): zone 2 adds no reach; use one zone with the "
                                    f"zone 2 delay, or supervise a fast zone by undervoltage."))
    elif reach2 < (1.0 + SMALL_GAIN) * reach1:
        checks.append(Check("warn", f"Zone 2 reaches only {reach2 / reach1 - 1:.0%} beyond zone 1 (X_d = {m.xd:g} pu "
                                    f"against 1.0 pu): the two zones nearly coincide and zone 2 adds little for "
                                    f"loss of field at light load; consider one zone with the zone 2 delay, or a "
                                    f"fast zone supervised by undervoltage."))
    if z2t <= z1t:
        checks.append(Check("warn", f"Zone 2 delay {z2t:g} s is not longer than zone 1's {z1t:g} s."))
    zones = (("zone 1", z1o, z1d, z1t), ("zone 2", z2o, z2d, z2t))
    _zone_checks(ctx, zones, checks)
    if factor is None:
        checks.append(Check("warn", "No VT ratio: zones are given in primary ohms only."))
    values = {
        "zone1_offset": _ohm(z1o, factor, z1o_src, "Zone 1 offset (−X)", "X'd/2" if z1o_src != "override" else ""),
        "zone1_diameter": _ohm(z1d, factor, z1d_src, "Zone 1 diameter", "1.0 pu of Z_b" if z1d_src != "override"
                               else ""),
        "zone1_time_delay": Setting(z1t, "s", z1t_src, label="Zone 1 delay"),
        "zone2_offset": _ohm(z2o, factor, z2o_src, "Zone 2 offset (−X)", "X'd/2" if z2o_src != "override" else ""),
        "zone2_diameter": _ohm(z2d, factor, z2d_src, "Zone 2 diameter", "X_d" if z2d_src != "override" else ""),
        "zone2_time_delay": Setting(z2t, "s", z2t_src, label="Zone 2 delay"),
    }
    tests = _tests(basis, zones)
    basis_text = (f"Two offset-mho zones offset by X'd/2 = {m.xd_transient / 2:g} pu; zone 1 diameter "
                  f"{ZONE1_DIAMETER:g} pu of Z_b = {zb:.4g} Ω with {z1t:g} s detects loss of field from heavy load; "
                  f"zone 2 diameter X_d = {m.xd:g} pu with {z2t:g} s detects it at light load and rides through "
                  f"stable swings. Secondary ohms = primary × CTR/VTR. Blocked by loss of potential (60).")
    return FunctionSettings(FID, "Loss of field (two-zone offset mho)", values, basis_text,
                            references=["IEEE C37.102 (two-zone offset mho, from memory)"], checks=checks,
                            test_points=tests)


def _tests(basis, zones) -> list:
    """Points on the −X axis inside and beyond each zone's far reach and just inside its top; the expected time is
    that of the fastest zone the point lies in (every zone enabled)."""
    factor = basis.impedance_factor
    scale = 1.0 if factor is None else factor
    unit = "ohm" if factor is not None else "ohm (primary)"
    candidates = []
    for name, o, d, _ in zones:
        candidates += [((1 - PROBE) * (o + d), f"{name}: 5 % inside the far reach"),
                       ((1 + PROBE) * (o + d), f"{name}: 5 % beyond the far reach"),
                       (o + PROBE * d, f"{name}: just inside the offset")]
    tests, seen = [], set()
    longest = max(t for *_, t in zones)
    for x, what in candidates:
        key = round(x, 9)
        if key in seen:
            continue
        seen.add(key)
        inside = [(t, name) for name, o, d, t in zones if o < x < o + d]
        expected = min(inside)[0] if inside else None
        why = (f"{min(inside)[1]} operates" if inside else "outside every zone: must not operate")
        phases = volts = None
        if factor is not None:
            phases, volts = impedance_phasors(complex(0.0, -x * scale), basis.rated_secondary_voltage,
                                              basis.rated_secondary_current)
        tests.append(timed_test_point("impedance at −90°", x * scale, unit, expected, phases=phases,
                                      voltage_phases=volts, description=f"{what} ({why})",
                                      duration=None if inside else hold_time(longest)))
    return tests
