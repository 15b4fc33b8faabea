"""Synchronous-generator family: preparation, the rules in sheet order, drawings.

``prepare`` derives what every generator rule shares (rated and fault currents, base impedance, the instrument
transformers, the machine's negative-sequence capability, the charging current and the system's initial rate of
change of frequency) and keeps it in ``ctx.extras["generator"]`` as a :class:`GeneratorBasis`; the rule modules
read that object and never import this module. ``drawings`` turns the rules' settings into the sheet's curves.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from machines.model import MachineCase, Ratio, generator_rated_current
from machines.protection import (
    frequency, generator_differential, loss_of_field, negative_sequence, overexcitation, reverse_power,
    stator_earth_fault, stator_thermal, voltage, voltage_restrained,
)
from machines.protection.base import StudyContext, current_setting
from machines.record import Check, Circle, Drawing, FunctionSettings, Series, Setting
from machines.standards import frequency as freq_eq
from machines.standards import generator_capability as cap
from machines.standards.grounding import charging_current
from machines.standards.inverse_time import inverse_operate_time
from machines.standards.negative_sequence import UnbalanceCapability, table_capability

SQRT3 = math.sqrt(3.0)


@dataclass(frozen=True)
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


def _capacitance(case: MachineCase) -> tuple[float | None, tuple[str, ...]]:
    parts = {"machine.stator_capacitance": case.machine.stator_capacitance,
             "grounding.circuit_capacitance": case.grounding.circuit_capacitance,
             "grounding.system_capacitance": case.grounding.system_capacitance}
    given = {k: v for k, v in parts.items() if v is not None}
    if not given:
        return None, ()
    return sum(given.values()), tuple(given)


def prepare(case: MachineCase) -> StudyContext:
    """Derived quantities every generator rule needs, and the machine-wide findings."""
    m = case.machine
    ir = generator_rated_current(m.rated_apparent_power, m.rated_voltage)
    ctx = StudyContext(case=case, rated_current=ir)
    unbalance, usource = _unbalance(case)
    c0, cparts = _capacitance(case)
    basis = GeneratorBasis(
        rated_current=ir, rated_power=m.rated_apparent_power * m.power_factor,
        base_impedance=cap.base_impedance(m.rated_voltage, m.rated_apparent_power),
        phase_voltage=m.rated_voltage / SQRT3, ct=case.instruments.phase_ct, vt=case.instruments.vt,
        sustained_fault_current=cap.sustained_fault_current(ir, m.xd),
        transient_fault_current=cap.sustained_fault_current(ir, m.xd_transient),
        subtransient_fault_current=cap.sustained_fault_current(ir, m.xd_subtransient),
        x2=m.x2 if m.x2 is not None else m.xd_subtransient, x2_entered=m.x2 is not None,
        unbalance=unbalance, unbalance_source=usource, capacitance=c0, capacitance_parts=cparts,
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
    s = case.supply
    if s.system_rating and s.system_inertia:
        deficit = basis.rated_power / s.system_rating
        rocof = freq_eq.initial_rocof(deficit, s.system_inertia, m.frequency)
        d["initial_rocof"] = Setting(rocof, "Hz/s", "derived", label="Initial RoCoF on loss of this unit",
                                     note=f"swing equation, ΔP = {deficit:.3g} pu of {s.system_rating / 1e6:.4g} "
                                          f"MVA, H = {s.system_inertia:.3g} s")
        ctx.extras["initial_rocof"] = rocof
    if case.instruments.vt is None:
        checks.append(Check("warn", "instruments.vt is not given: voltage, power and impedance elements are set "
                                    "in primary terms only; enter the VT ratio for relay-side values"))
    return ctx


#: The setting rules in the order the sheet lists them.
RULES: list = [
    generator_differential.settings,
    stator_earth_fault.neutral_overvoltage,
    stator_earth_fault.third_harmonic,
    stator_earth_fault.neutral_overcurrent,
    loss_of_field.settings,
    negative_sequence.settings,
    reverse_power.settings,
    overexcitation.settings,
    voltage_restrained.settings,
    stator_thermal.settings,
    voltage.undervoltage,
    voltage.overvoltage,
    frequency.underfrequency,
    frequency.overfrequency,
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
    const = cap.armature_capability_constant(ctx.case.study.practice)
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


def _rx_drawing(ctx: StudyContext, fs: FunctionSettings) -> Drawing:
    basis: GeneratorBasis = ctx.extras["generator"]
    factor = basis.impedance_factor
    scale = factor if factor is not None else 1.0
    side = "secondary" if factor is not None else "primary"
    circles = []
    for z, style in (("1", "line"), ("2", "dashed")):
        s_off, s_dia = fs.settings[f"zone{z}_offset"], fs.settings[f"zone{z}_diameter"]
        off = s_off.secondary if factor is not None else s_off.value
        dia = s_dia.secondary if factor is not None else s_dia.value
        c, r = cap.offset_mho_circle(off, dia)
        circles.append(Circle(f"40 zone {z}: offset {off:.4g} Ω, diameter {dia:.4g} Ω ({side})", c, r, style))
    series = []
    m = ctx.case.machine
    zb = basis.base_impedance * scale
    rated = cap.load_impedance(m.power_factor, math.sqrt(1.0 - m.power_factor ** 2))
    series.append(Series("rated load point", [(rated[0] * zb, rated[1] * zb)], "points"))
    if ctx.case.supply.fault_level:
        xs = m.rated_apparent_power / ctx.case.supply.fault_level
        c, r = cap.steady_state_stability_circle(m.xd, xs)
        series.append(Series("approximate steady-state stability limit (round rotor, no AVR, Xs from the bus "
                             "fault level only; an approximation)",
                             [(x * zb, y * zb) for x, y in _circle_points(c, r)], "dotted"))
    reach = max(c.center[1] - c.radius for c in circles)
    lim = abs(min(c.center[1] - c.radius for c in circles)) * 1.2
    return Drawing(kind="r-x", title="40 loss of field: offset-mho zones in the R-X plane",
                   x_label=f"R [Ω {side}]", y_label=f"X [Ω {side}]", series=series, circles=circles,
                   x_range=(-lim, lim), y_range=(-lim, max(lim * 0.5, abs(reach) * 0.2)))


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
    ls = ctx.case.supply.load_shedding_stages
    if ls:
        series.append(Series("system load-shedding stages (0 s drawn at 0.05 s)",
                             [(max(s.time_delay, tmin), s.frequency) for s in ls], "points"))
    ys = [y for s in series for _, y in s.points] + [m.frequency]
    return Drawing(kind="frequency", title="81U/81O stages against the maker's bands and the load shedding",
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
        out.append(_rx_drawing(ctx, by_id["40"]))
    if "81U" in by_id or "81O" in by_id:
        out.append(_frequency_drawing(ctx, by_id.get("81U"), by_id.get("81O")))
    return out
