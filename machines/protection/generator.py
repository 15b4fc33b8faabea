"""Synchronous-generator family: preparation, the rules in sheet order, drawings.

``prepare`` derives what every generator rule shares (rated and fault currents, base impedance, the instrument
transformers, the machine's negative-sequence capability, the charging current and the system's initial rate of
change of frequency) and keeps it in ``ctx.extras["generator"]`` as a :class:`GeneratorBasis`; the rule modules
read that object and never import this module. ``drawings`` turns the rules' settings into the sheet's curves.

Methods: machines/METHODS.md §9 (common quantities, the connection and the system seen from the terminals), §6
(negative-sequence capability), §7.1 (capacitance of the zone and the grounding resistor), §8.3 (initial RoCoF).
"""

from __future__ import annotations

import math

from machines.frozen import frozen
from machines.model import MachineCase, Ratio, generator_rated_current
from machines.protection import (
    backup_distance, field_ground, frequency, generator_differential, inadvertent_energisation, loss_of_field,
    negative_sequence, neutral_differential, out_of_step, overexcitation, reverse_power, stator_earth_fault,
    stator_thermal, voltage, voltage_restrained, vt_supervision,
)
from machines.protection.base import StudyContext, current_setting
from machines.record import Check, Circle, Drawing, FunctionSettings, Series, Setting
from machines.standards import frequency as freq_eq
from machines.standards import generator_capability as cap
from machines.standards import generator_impedance as gz
from machines.standards import grounding as gnd
from machines.standards.grounding import charging_current
from machines.standards.inverse_time import inverse_operate_time
from machines.standards.negative_sequence import UnbalanceCapability, table_capability

SQRT3 = math.sqrt(3.0)


@frozen
class GeneratorBasis:
    """What every generator rule shares [SI; reactances pu on the machine base]."""

    rated_current: float  #: [A]
    rated_power: float  #: rated active power S·cos φ [W]
    base_impedance: float  #: V² / S [ohm]
    phase_voltage: float  #: V_LN [V]
    ct: Ratio
    vt: Ratio | None
    sustained_fault_current: float  #: E / X_d, no field forcing [A]
    transient_fault_current: float  #: E / X'd [A]
    subtransient_fault_current: float  #: E / X''d [A]
    x2: float  #: negative-sequence reactance [pu] (X''d when the file gives none)
    x2_entered: bool
    unbalance: UnbalanceCapability  #: the machine's continuous I2 and K, maker's values first
    unbalance_source: str  #: "maker-data" or "standard" (or "maker-data/standard" when mixed)
    capacitance: float | None  #: total phase-to-ground capacitance per phase of the connected zone [F]
    capacitance_parts: tuple[str, ...]  #: which file keys it came from
    #: the parts of the zone's capacitance the file does not give (file keys), for the connection
    capacitance_missing: tuple[str, ...] = ()
    #: "unit-transformer", "bus", or None when neither the file nor its transformer data say
    connection: str | None = None
    connection_note: str = ""  #: how the connection was known ("" when stated)
    excitation: str | None = None
    supply_given: bool = True
    x_transformer: float | None = None  #: step-up transformer reactance [pu, machine base]
    x_external: float | None = None  #: system (with any step-up transformer) seen from the terminals, strongest [pu]
    x_external_weak: float | None = None  #: the same with the weakest source [pu]
    grounding_turns: float = 1.0  #: grounding-transformer ratio N (1 with the resistor in the neutral)
    neutral_resistance: float | None = None  #: grounding resistance referred to the neutral [ohm]
    neutral_resistance_source: str = ""  #: "entered" (installed) or "standard" (sized R_N = X_C0/3)
    resistance_limit: float | None = None  #: X_C0/3 on the known capacitance [ohm]
    earth_fault_current: float | None = None  #: current of a bolted terminal earth fault the grounding allows [A]
    earth_fault_note: str = ""

    @property
    def unbalance_setting_source(self) -> str:
        """Source kind of settings taken from the capability: "maker-data" when any maker value is used."""
        return "maker-data" if self.unbalance_source.startswith("maker") else "standard"

    @property
    def vt_factor(self) -> float | None:
        return None if self.vt is None else self.vt.factor

    @property
    def impedance_factor(self) -> float | None:
        """CTR / VTR: primary ohms × this = secondary ohms (None without a VT)."""
        return None if self.vt is None else self.ct.factor / self.vt.factor

    @property
    def unit_connected(self) -> bool:
        return self.connection == "unit-transformer"

    @property
    def rated_secondary_current(self) -> float:
        """Rated current on the phase-CT secondary [A]."""
        return self.ct.to_secondary(self.rated_current)

    @property
    def rated_secondary_voltage(self) -> float | None:
        """Rated phase-to-neutral voltage on the VT secondary [V] (None without a VT)."""
        return None if self.vt is None else self.vt.to_secondary(self.phase_voltage)


def _unbalance(case: MachineCase) -> tuple[UnbalanceCapability, str]:
    m = case.machine
    cont, k = m.negative_sequence_continuous, m.negative_sequence_k
    if cont is not None and k is not None:
        return UnbalanceCapability(cont, k, "maker's data (machine file)"), "maker-data"
    table = table_capability(case.study.practice, m.rotor, m.rated_apparent_power)
    if cont is None and k is None:
        return table, "standard"
    return (UnbalanceCapability(cont if cont is not None else table.continuous, k if k is not None else table.k,
                                f"maker's data where given, else {table.reference}", table.note),
            "maker-data/standard")


#: the capacitances of the galvanically connected zone a generator's grounding resistor is sized on, by connection
ZONE_PARTS = {"unit-transformer": ("grounding.surge_capacitance", "grounding.bus_capacitance",
                                   "grounding.transformer_capacitance"),
              "bus": ("grounding.surge_capacitance", "grounding.bus_capacitance", "grounding.system_capacitance"),
              None: ("grounding.surge_capacitance", "grounding.bus_capacitance")}


def _capacitance(case: MachineCase, connection: str | None) -> tuple[float | None, tuple[str, ...], tuple[str, ...]]:
    """Total capacitance per phase, the keys it came from, and the keys of the zone the file leaves out."""
    g = case.grounding
    parts = {"machine.stator_capacitance": case.machine.stator_capacitance,
             "grounding.surge_capacitance": g.surge_capacitance,
             "grounding.bus_capacitance": g.bus_capacitance,
             "grounding.transformer_capacitance": g.transformer_capacitance if connection != "bus" else None,
             "grounding.circuit_capacitance": g.circuit_capacitance,
             "grounding.system_capacitance": g.system_capacitance}
    given = {k: v for k, v in parts.items() if v is not None}
    missing = tuple(k for k in ("machine.stator_capacitance", *ZONE_PARTS[connection]) if parts[k] is None)
    if not given or sum(given.values()) <= 0.0:
        return None, tuple(given), missing
    return sum(given.values()), tuple(given), missing


def _connection(case: MachineCase) -> tuple[str | None, str]:
    s = case.supply
    if s.connection is not None:
        return s.connection, ""
    if case.supply_given and s.transformer_lv_voltage is not None:
        return "unit-transformer", "inferred from supply.transformer_lv_voltage (supply.connection not given)"
    return None, ""


def _system_reactances(case: MachineCase, zb: float, connection: str | None):
    """X_T, X_e (strongest) and X_e (weakest) on the machine base, each None when the file does not give it."""
    m, s = case.machine, case.supply
    x_t = None
    if connection == "unit-transformer" and s.transformer_impedance is not None:
        x_t = gz.rebase_impedance(s.transformer_impedance, s.transformer_rating or m.rated_apparent_power,
                                  m.rated_apparent_power)
    if not case.supply_given:
        return x_t, None, None
    if s.fault_level:
        x_e = gz.external_reactance(m.rated_apparent_power, s.fault_level)
    elif s.source_impedance:
        x_e = s.source_impedance / zb
    else:
        return x_t, None, None
    x_weak = gz.external_reactance(m.rated_apparent_power, s.minimum_fault_level) if s.minimum_fault_level else x_e
    return x_t, x_e, x_weak


def _neutral(case: MachineCase, c0: float | None) -> dict:
    """The grounding resistor in use (referred to the neutral) and the current of a terminal earth fault."""
    g, m = case.grounding, case.machine
    n = g.transformer_ratio.factor if g.method == "distribution-transformer" and g.transformer_ratio else 1.0
    out: dict = {"grounding_turns": n}
    limit = gnd.neutral_resistance_limit(c0, m.frequency) if c0 is not None else None
    out["resistance_limit"] = limit
    if g.method in ("high-resistance", "distribution-transformer"):
        if g.resistor is not None:
            out["neutral_resistance"], out["neutral_resistance_source"] = g.resistor * n * n, "entered"
        elif limit is not None:
            out["neutral_resistance"], out["neutral_resistance_source"] = limit, "standard"
    if g.fault_current_limit is not None:
        out["earth_fault_current"], out["earth_fault_note"] = g.fault_current_limit, "grounding.fault_current_limit"
    elif out.get("neutral_resistance"):
        i_r = gnd.resistor_current(m.rated_voltage, out["neutral_resistance"])
        i_c = 0.0 if c0 is None else charging_current(c0, m.rated_voltage, m.frequency)
        out["earth_fault_current"] = gnd.earth_fault_current(i_r, i_c)
        out["earth_fault_note"] = "|I_R + j·3I_C0| with the grounding resistor" + (
            " as installed" if out["neutral_resistance_source"] == "entered" else " sized here")
    elif g.method == "ungrounded" and c0 is not None:
        out["earth_fault_current"] = charging_current(c0, m.rated_voltage, m.frequency)
        out["earth_fault_note"] = "3·I_C0, the capacitive current"
    return out


def prepare(case: MachineCase) -> StudyContext:
    """Derived quantities every generator rule needs, and the machine-wide findings."""
    m = case.machine
    ir = generator_rated_current(m.rated_apparent_power, m.rated_voltage)
    ctx = StudyContext(case=case, rated_current=ir)
    unbalance, usource = _unbalance(case)
    connection, conn_note = _connection(case)
    c0, cparts, cmissing = _capacitance(case, connection)
    zb = cap.base_impedance(m.rated_voltage, m.rated_apparent_power)
    x_t, x_e, x_weak = _system_reactances(case, zb, connection)
    basis = GeneratorBasis(
        rated_current=ir, rated_power=m.rated_apparent_power * m.power_factor, base_impedance=zb,
        phase_voltage=m.rated_voltage / SQRT3, ct=case.instruments.phase_ct, vt=case.instruments.vt,
        sustained_fault_current=cap.sustained_fault_current(ir, m.xd),
        transient_fault_current=cap.sustained_fault_current(ir, m.xd_transient),
        subtransient_fault_current=cap.sustained_fault_current(ir, m.xd_subtransient),
        x2=m.x2 if m.x2 is not None else m.xd_subtransient, x2_entered=m.x2 is not None,
        unbalance=unbalance, unbalance_source=usource, capacitance=c0, capacitance_parts=cparts,
        capacitance_missing=cmissing, connection=connection, connection_note=conn_note, excitation=m.excitation,
        supply_given=case.supply_given, x_transformer=x_t, x_external=x_e, x_external_weak=x_weak,
        **_neutral(case, c0),
    )
    ctx.extras["generator"] = basis
    checks: list[Check] = []
    ctx.extras["checks"] = checks
    d = ctx.derived
    d["rated_current"] = current_setting(ir, basis.ct, "derived", "Rated current", "S / (√3·V)")
    d["rated_active_power"] = Setting(basis.rated_power, "W", "derived", label="Rated active power",
                                      note="S·cos φ")
    d["base_impedance"] = Setting(basis.base_impedance, "ohm", "derived", label="Base impedance",
                                  note="Z_b = V²/S",
                                  secondary=None if basis.impedance_factor is None
                                  else basis.base_impedance * basis.impedance_factor,
                                  secondary_unit="" if basis.vt is None else "ohm")
    d["sustained_fault_current"] = current_setting(
        basis.sustained_fault_current, basis.ct, "derived", "Sustained three-phase fault current",
        "E/X_d with E = 1 pu, no field forcing")
    d["transient_fault_current"] = current_setting(basis.transient_fault_current, basis.ct, "derived",
                                                   "Transient three-phase fault current", "E/X'd, E = 1 pu")
    d["subtransient_fault_current"] = current_setting(basis.subtransient_fault_current, basis.ct, "derived",
                                                      "Subtransient three-phase fault current", "E/X''d, E = 1 pu")
    d["negative_sequence_capability"] = Setting(unbalance.continuous, "pu", basis.unbalance_setting_source,
                                                label="Continuous I2 capability", note=unbalance.reference)
    d["negative_sequence_k"] = Setting(unbalance.k, "s", basis.unbalance_setting_source, label="I2²t capability K",
                                       note=unbalance.reference)
    if c0 is not None:
        d["total_capacitance"] = Setting(c0, "F", "entered", label="Phase-to-ground capacitance per phase",
                                         note=" + ".join(cparts))
        d["charging_current"] = Setting(charging_current(c0, m.rated_voltage, m.frequency), "A", "derived",
                                        label="Charging current 3·I_C0", note="3·ω·C0·V_LN")
    if x_t is not None:
        d["transformer_reactance"] = Setting(x_t, "pu", "entered", label="Step-up transformer reactance",
                                             note="on the generator's rating")
    if x_e is not None:
        d["system_reactance"] = Setting(x_e, "pu", "derived", label="System reactance seen from the terminals",
                                        note="S_machine / fault level (the system alone"
                                             + (", through the step-up transformer" if basis.unit_connected else "")
                                             + "), on the generator's rating")
    if basis.earth_fault_current is not None:
        d["terminal_earth_fault_current"] = Setting(basis.earth_fault_current, "A", "derived",
                                                    label="Earth-fault current, terminal fault",
                                                    note=basis.earth_fault_note)
    s = case.supply
    if case.supply_given and s.system_rating and s.system_inertia:
        deficit = basis.rated_power / s.system_rating
        rocof = freq_eq.initial_rocof(deficit, s.system_inertia, m.frequency)
        d["initial_rocof"] = Setting(rocof, "Hz/s", "derived", label="Initial RoCoF on loss of this unit",
                                     note=f"swing equation, ΔP = {deficit:.3g} pu of {s.system_rating / 1e6:.4g} "
                                          f"MVA, H = {s.system_inertia:.3g} s")
        ctx.extras["initial_rocof"] = rocof
    if case.instruments.vt is None:
        checks.append(Check("warn", "instruments.vt is not given: voltage, power and impedance elements are set "
                                    "in primary terms only; enter the VT ratio for relay-side values"))
    if not case.supply_given:
        checks.append(Check("warn", "No [supply] table: the machine is studied alone. The connection, the system's "
                                    "fault level, its load shedding and its ride-through requirement are unknown; "
                                    "each check that needs them says so."))
    elif connection is None:
        checks.append(Check("warn", "supply.connection is not given (unit-transformer or bus): no step-up "
                                    "transformer is assumed; the selectivity of the stator earth-fault protection, "
                                    "the 21 reach and the need for 78 are judged without it."))
    elif conn_note:
        checks.append(Check("warn", f"Connection taken as unit-transformer, {conn_note}: state supply.connection."))
    if x_t is not None and x_e is not None and x_e < x_t:
        checks.append(Check("warn", f"supply.fault_level gives a system reactance of {x_e:.3g} pu seen from the "
                                    f"terminals, less than the step-up transformer's own {x_t:.3g} pu: for a "
                                    f"generator the fault level is the system's contribution at its terminals, "
                                    f"through the transformer, not the fault level of the HV bus."))
    _exciter_findings(basis, checks)
    return ctx


def _exciter_findings(basis: GeneratorBasis, checks: list[Check]) -> None:
    if basis.excitation is None:
        checks.append(Check("warn", "machine.excitation is not given (static, brushless or rotating-dc): whether the "
                                    "fault current is sustained (51V) and whether field-ground protection (64F) "
                                    "can be applied are not known."))
    elif basis.excitation == "brushless":
        checks.append(Check("warn", "Brushless exciter: the field winding turns with the rotor and has no slip "
                                    "rings, so 64F field-ground protection needs the maker's rotating detector or "
                                    "pilot brushes; it is not set here."))


#: The setting rules in the order the sheet lists them.
RULES: list = [
    generator_differential.settings,
    neutral_differential.settings,
    stator_earth_fault.neutral_overvoltage,
    stator_earth_fault.third_harmonic,
    stator_earth_fault.neutral_overcurrent,
    field_ground.settings,
    loss_of_field.settings,
    out_of_step.settings,
    negative_sequence.settings,
    reverse_power.settings,
    overexcitation.settings,
    voltage_restrained.settings,
    backup_distance.settings,
    stator_thermal.settings,
    voltage.undervoltage,
    voltage.overvoltage,
    frequency.underfrequency,
    frequency.overfrequency,
    vt_supervision.settings,
    inadvertent_energisation.settings,
]


# ---------------------------------------------------------------------------------------------------- drawings


def _logspace(lo: float, hi: float, n: int = 40) -> list[float]:
    a, b = math.log10(lo), math.log10(hi)
    return [10 ** (a + (b - a) * i / (n - 1)) for i in range(n)]


def _value(fs: FunctionSettings, key: str):
    s = fs.settings.get(key)
    return None if s is None else s.value


def _i2_drawing(ctx: StudyContext, fs: FunctionSettings) -> Drawing:
    basis: GeneratorBasis = ctx.extras["generator"]
    cont, kset = _value(fs, "continuous_i2"), _value(fs, "k_constant")
    tmin, tmax = _value(fs, "minimum_time"), _value(fs, "maximum_time")
    kmach, cmach = basis.unbalance.k, basis.unbalance.continuous
    xs = _logspace(min(cont, cmach) * 1.02, 10.0)
    relay = [(x, min(max(kset / x ** 2, tmin), tmax)) for x in xs if x > cont]
    machine = [(x, kmach / x ** 2) for x in xs if x > cmach]
    return Drawing(
        kind="i2-time", title="46 negative sequence: trip curve against the machine's I2²t capability",
        x_label="I2 [pu of rated current]", y_label="time [s]", log_x=True, log_y=True,
        series=[Series(f"46 trip: t = {kset:.3g}/I2², {tmin:.3g}–{tmax:.4g} s", relay),
                Series(f"machine capability: K = {kmach:.3g} s", machine, "dashed"),
                Series(f"machine continuous I2 = {cmach:.3g} pu", [(cmach, 0.1), (cmach, 1e4)], "dotted")],
        x_range=(xs[0], 10.0), y_range=(0.1, 1e4))


def _time_current_drawing(ctx: StudyContext, fs: FunctionSettings) -> Drawing:
    basis: GeneratorBasis = ctx.extras["generator"]
    pickup, curve = _value(fs, "pickup_current"), _value(fs, "curve")
    tms = _value(fs, "time_multiplier") or _value(fs, "time_dial")
    floor = _value(fs, "restraint_floor")
    series = []
    lo = floor * pickup
    hi = max(20.0 * pickup, 1.2 * basis.subtransient_fault_current)
    for label, p, style in ((f"51V at rated voltage (pickup {pickup:.4g} A)", pickup, "line"),
                            (f"51V fully restrained (pickup {lo:.4g} A)", lo, "dashed")):
        pts = [(x, inverse_operate_time(x / p, curve, tms)) for x in _logspace(p * 1.05, min(hi, 20 * p))]
        series.append(Series(label, pts, style))
    isus = basis.sustained_fault_current
    series.append(Series(f"sustained fault current E/Xd = {isus:.4g} A", [(isus, 0.01), (isus, 1000.0)], "dotted"))
    m = ctx.case.machine
    points, _ = cap.armature_points(ctx.case.study.practice, m.rotor, m.rated_apparent_power)
    const = cap.armature_capability_constant(ctx.case.study.practice, points)
    ir = basis.rated_current
    series.append(Series(f"armature short-time capability (I²−1)·t = {const:.3g} s",
                         [(x, cap.armature_capability_time(x / ir, const))
                          for x in _logspace(1.1 * ir, min(hi, 4.0 * ir), 25)], "dashed"))
    return Drawing(kind="time-current", title="51V voltage-restrained overcurrent and the sustained fault current",
                   x_label="current [A primary]", y_label="time [s]", log_x=True, log_y=True, series=series,
                   x_range=(min(lo, isus, 1.1 * ir) * 0.8, hi), y_range=(0.01, 1000.0))


def _circle_points(center: tuple[float, float], radius: float, n: int = 73) -> list[tuple[float, float]]:
    return [(center[0] + radius * math.cos(2 * math.pi * i / (n - 1)),
             center[1] + radius * math.sin(2 * math.pi * i / (n - 1))) for i in range(n)]


def _rx_drawing(ctx: StudyContext, fs: FunctionSettings, by_id: dict[str, FunctionSettings]) -> Drawing:
    basis: GeneratorBasis = ctx.extras["generator"]
    m = ctx.case.machine
    factor = basis.impedance_factor
    scale = factor if factor is not None else 1.0
    side = "secondary" if factor is not None else "primary"
    zb = basis.base_impedance * scale

    def ohm(key: str, f: FunctionSettings = fs) -> float:
        s_ = f.settings[key]
        return s_.secondary if factor is not None else s_.value

    circles = []
    z1, z2 = (ohm("zone1_offset"), ohm("zone1_diameter")), (ohm("zone2_offset"), ohm("zone2_diameter"))
    same = math.isclose(z1[0], z2[0], rel_tol=1e-6) and math.isclose(z1[1], z2[1], rel_tol=1e-6)
    for z, (off, dia), style in (("1", z1, "line"), ("2", z2, "dashed")):
        c, r = cap.offset_mho_circle(off, dia)
        name = "40 zones 1 and 2 (they coincide)" if same else f"40 zone {z}"
        circles.append(Circle(f"{name}: offset {off:.4g} Ω, diameter {dia:.4g} Ω ({side})", c, r, style))
        if same:
            break
    series = []
    rated = cap.load_impedance(m.power_factor, math.sqrt(1.0 - m.power_factor ** 2))
    series.append(Series("rated load point", [(rated[0] * zb, rated[1] * zb)], "points"))
    for rows, label, style in ((m.capability, "capability curve, underexcited side (at rated voltage)", "line"),
                               (m.uel, "under-excitation limiter (at rated voltage)", "dashed")):
        pts = [z for row in rows if (z := loss_of_field.pq_impedance(row, zb)) is not None]
        if pts:
            series.append(Series(label, pts, style))
    if basis.x_external is not None:
        c, r = cap.steady_state_stability_circle(m.xd, basis.x_external)
        rotor = ("round rotor" if m.rotor.startswith("cylindrical") else
                 "salient pole: drawn with X_d, on the safe side")
        series.append(Series(f"steady-state stability limit, approximate ({rotor}; no AVR)",
                             [(x * zb, y * zb) for x, y in _circle_points(c, r)], "dotted"))
    f21 = by_id.get("21")
    if f21 is not None:
        c, r = gz.mho_circle(ohm("reach", f21), f21.settings["characteristic_angle"].value)
        circles.append(Circle(f"21 mho, reach {ohm('reach', f21):.4g} Ω ({side})"
                              + ("" if f21.enabled else ", not enabled"), c, r, "dotted"))
    f78 = by_id.get("78")
    if f78 is not None:
        fwd, rev, d = ohm("forward_reach", f78), ohm("reverse_reach", f78), ohm("blinder_distance", f78)
        circles.append(Circle(f"78 mho, {rev:.4g} Ω into the generator to {fwd:.4g} Ω into the system",
                              (0.0, (fwd - rev) / 2.0), (fwd + rev) / 2.0, "dashed"))
        series.append(Series(f"78 right blinder, +{d:.4g} Ω", [(d, -rev), (d, fwd)], "dotted"))
        series.append(Series(f"78 left blinder, −{d:.4g} Ω", [(-d, -rev), (-d, fwd)], "dotted"))
    # the range frames the relay's characteristics (zones, mho circles, blinders) and the rated load point; the
    # capability curve and the limiter run on beyond it at low power and are cut at the frame's edge
    frame = [p for s_ in series if s_.style == "points" or s_.label.startswith("78")
             for p in s_.points]
    low = min([c.center[1] - c.radius for c in circles] + [y for _, y in frame])
    high = max([c.center[1] + c.radius for c in circles] + [y for _, y in frame])
    wide = max([abs(c.center[0]) + c.radius for c in circles] + [abs(x) for x, _ in frame] + [abs(low) * 0.6])
    lim = max(abs(low), high, wide) * 1.2
    return Drawing(kind="r-x", title="Impedance elements in the R-X plane: 40 loss of field"
                   + (", 21" if f21 is not None else "") + (", 78" if f78 is not None else ""),
                   x_label=f"R [Ω {side}]", y_label=f"X [Ω {side}]", series=series, circles=circles,
                   x_range=(-lim, lim), y_range=(low * 1.2, max(high * 1.2, lim * 0.3)))


def _frequency_drawing(ctx: StudyContext, under: FunctionSettings | None, over: FunctionSettings | None) -> Drawing:
    m = ctx.case.machine
    tmin, tmax = 0.05, 1e5
    series = []
    for fs, name in ((under, "81U"), (over, "81O")):
        if fs is None:
            continue
        stages = fs.settings["stages"].value
        pts = [(max(s["time_delay"], tmin), s["frequency"]) for s in stages]
        series.append(Series(f"{name} stages" + (" (conservative, no maker bands)"
                                                 if fs.settings["stages"].source == "common-practice" else ""),
                             pts, "points"))
    for low_side in (True, False):
        bands = sorted((b for b in m.frequency_limits if (b.high <= m.frequency if low_side else b.low >= m.frequency)),
                       key=lambda b: -b.high if low_side else b.low)
        pts = []
        for b in bands:
            x = min(max(b.allowed, tmin), tmax)
            edge_in, edge_out = (b.high, b.low) if low_side else (b.low, b.high)
            pts += [(x, edge_in), (x, edge_out)]
        if pts:
            series.append(Series("maker's band limits (accumulated time)" + (" below" if low_side else " above")
                                 + " nominal", pts, "step"))
    rt = ctx.case.supply.ride_through
    if rt:  # each band as a vertical bar at its required time: stages must lie to the right of the bars they cross
        pts = []
        for b in sorted(rt, key=lambda b: b.low):
            x = min(max(b.minimum_time, tmin), tmax)
            pts += [(x, b.low), (x, b.high)]
        series.append(Series("system ride-through requirement (time the unit must stay connected)", pts, "step"))
    ls = ctx.case.supply.load_shedding_stages
    if ls:
        series.append(Series("system load-shedding stages (0 s drawn at 0.05 s)",
                             [(max(s.time_delay, tmin), s.frequency) for s in ls], "points"))
    ys = [y for s in series for _, y in s.points] + [m.frequency]
    return Drawing(kind="frequency", title="81U/81O stages against the maker's bands, the load shedding and the "
                                           "ride-through requirement" if rt else
                   "81U/81O stages against the maker's bands and the load shedding",
                   x_label="time [s]", y_label="frequency [Hz]", log_x=True, series=series,
                   x_range=(tmin, tmax), y_range=(min(ys) - 0.5, max(ys) + 0.5))


def drawings(ctx: StudyContext, functions: list[FunctionSettings]) -> list[Drawing]:
    """The sheet's generator drawings: I2-time, time-current (51V), R-X (40), frequency (81)."""
    by_id = {f.id: f for f in functions}
    out = []
    if "46" in by_id:
        out.append(_i2_drawing(ctx, by_id["46"]))
    if "51V" in by_id:
        out.append(_time_current_drawing(ctx, by_id["51V"]))
    if "40" in by_id:
        out.append(_rx_drawing(ctx, by_id["40"], by_id))
    if "81U" in by_id or "81O" in by_id:
        out.append(_frequency_drawing(ctx, by_id.get("81U"), by_id.get("81O")))
    return out
