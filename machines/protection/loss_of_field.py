"""40 loss-of-field protection: two-zone negative-offset mho (IEEE C37.102 approach).

METHODS.md §9.2: both circles are offset down the −X axis by X'd/2; zone 1 has a diameter of 1.0 pu of the machine's
base impedance and a short delay (loss of field from heavy load); zone 2 a diameter of X_d and a longer delay that
rides through stable power swings. Relay-side ohms are Z_sec = Z_pri · CTR / VTR.
"""

from __future__ import annotations

import math

from machines.model import Ratio
from machines.protection.base import StudyContext, timed_test_point
from machines.record import Check, FunctionSettings, Setting
from machines.standards import generator_capability as cap

FID = "40"
ZONE1_DIAMETER = 1.0  #: [pu of Z_b] METHODS.md §9.2 (value from memory)
ZONE1_DELAY = 0.1  #: [s] METHODS.md §9.2 (value from memory)
ZONE2_DELAY = 0.5  #: [s] METHODS.md §9.2: 0.5–0.6 s (value from memory)
PROBE = 0.05  #: test points 5 % inside and outside the far reach


def _ohm(value: float, factor: float | None, source: str, label: str, note: str = "") -> Setting:
    return Setting(value, "ohm", source, secondary=None if factor is None else value * factor,
                   secondary_unit="" if factor is None else "ohm", label=label, note=note)


def settings(ctx: StudyContext) -> FunctionSettings:
    """40: offsets, diameters and delays of both zones in primary and secondary ohms."""
    basis, m = ctx.extras["generator"], ctx.case.machine
    zb, factor = basis.base_impedance, basis.impedance_factor
    checks: list[Check] = []
    offset = m.xd_transient / 2.0 * zb
    ohms = None if factor is None else Ratio(1.0, factor)  # relay-side ohms = primary ohms × CTR/VTR
    z1o, z1o_src = ctx.choose(FID, "zone1_offset", offset, "impedance", "ohm", "standard", via=ohms)
    z1d, z1d_src = ctx.choose(FID, "zone1_diameter", ZONE1_DIAMETER * zb, "impedance", "ohm", "standard", via=ohms)
    z1t, z1t_src = ctx.choose(FID, "zone1_time_delay", ZONE1_DELAY, "time", "s", "standard")
    z2o, z2o_src = ctx.choose(FID, "zone2_offset", offset, "impedance", "ohm", "standard", via=ohms)
    z2d, z2d_src = ctx.choose(FID, "zone2_diameter", m.xd * zb, "impedance", "ohm", "standard", via=ohms)
    z2t, z2t_src = ctx.choose(FID, "zone2_time_delay", ZONE2_DELAY, "time", "s", "standard")
    if z2d <= z1d:
        checks.append(Check("warn", f"Zone 2 diameter {z2d:.4g} Ω is not larger than zone 1's {z1d:.4g} Ω "
                                    f"(X_d = {m.xd:g} pu ≤ 1 pu): zone 2 adds no reach; consider a single zone."))
    if z2t <= z1t:
        checks.append(Check("warn", f"Zone 2 delay {z2t:g} s is not longer than zone 1's {z1t:g} s."))
    # Rated load, overexcited (lagging pf): must lie outside both circles.
    q = math.sqrt(max(0.0, 1.0 - m.power_factor ** 2))
    r_pu, x_pu = cap.load_impedance(m.power_factor, q)
    load = (r_pu * zb, x_pu * zb)
    for name, o, d in (("zone 1", z1o, z1d), ("zone 2", z2o, z2d)):
        c, rad = cap.offset_mho_circle(o, d)
        if cap.inside_circle(load, c, rad):
            checks.append(Check("fail", f"Rated load ({load[0]:.4g} + j{load[1]:.4g} Ω) lies inside {name}: the "
                                        f"element trips a healthy machine."))
    # Underexcited operation at rated power and 0.95 leading power factor (common capability corner): outside zone 2.
    lead = cap.load_impedance(m.power_factor, -m.power_factor * math.tan(math.acos(0.95)))
    lead_z = (lead[0] * zb, lead[1] * zb)
    c2, r2 = cap.offset_mho_circle(z2o, z2d)
    if cap.inside_circle(lead_z, c2, r2):
        checks.append(Check("warn", "Underexcited operation at rated power and 0.95 leading power factor lies inside "
                                    "zone 2: check against the capability curve and the under-excitation limiter."))
    else:
        checks.append(Check("ok", "Rated load and underexcited operation at 0.95 leading power factor lie outside "
                                  "both zones; set the under-excitation limiter to act before zone 2."))
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
    scale = 1.0 if factor is None else factor
    unit = "ohm" if factor is not None else "ohm (primary)"
    tests = []
    for z, o, d, t in (("1", z1o, z1d, z1t), ("2", z2o, z2d, z2t)):
        reach = (o + d) * scale
        top = o * scale
        tests.append(timed_test_point("impedance at −90°", (1 - PROBE) * reach, unit, t,
                                      description=f"zone {z}: 5 % inside the far reach"))
        tests.append(timed_test_point("impedance at −90°", (1 + PROBE) * reach, unit, None,
                                      description=f"zone {z}: 5 % beyond the far reach: must not operate"))
        tests.append(timed_test_point("impedance at −90°", top + PROBE * d * scale, unit, t,
                                      description=f"zone {z}: just below the offset"))
    basis_text = (f"Two offset-mho zones offset by X'd/2 = {m.xd_transient / 2:g} pu; zone 1 diameter "
                  f"{ZONE1_DIAMETER:g} pu of Z_b = {zb:.4g} Ω with {z1t:g} s detects loss of field from heavy load; "
                  f"zone 2 diameter X_d = {m.xd:g} pu with {z2t:g} s detects it at light load and rides through "
                  f"stable swings. Secondary ohms = primary × CTR/VTR.")
    return FunctionSettings(FID, "Loss of field (two-zone offset mho)", values, basis_text,
                            references=["IEEE C37.102"], checks=checks, test_points=tests)
