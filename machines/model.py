"""The machine model: frozen dataclasses holding SI floats, one field per machine-file key.

Each field's name is the canonical quantity name used in the machine file, the settings record and the sheet
(see the glossary in DEVELOPERS.md). Its ``metadata`` says how the machine file spells it: the kind of quantity,
the unit a practitioner writes, whether it is required, its default and its plausible range. ``machines.files``
reads and writes through these specs; ``wizard.flow`` asks through them. Units in brackets are the SI units the
float holds.

Validation of physical sense lives in :func:`validate_case`: impossible data raise :class:`InputError` naming the
key; merely suspicious data come back as warnings.
"""

from __future__ import annotations

import math
from dataclasses import field, fields
from typing import Any, Literal

from machines.errors import InputError, one_line
from machines.frozen import frozen


@frozen
class FieldSpec:
    """How a machine-file key is written and checked.

    kind: a kind from ``machines.units.KINDS``, or ``"text"``, ``"choice"``, ``"integer"``, ``"boolean"``,
    ``"ratio"`` (instrument-transformer ratio such as ``"200/1 A"``), ``"letter"`` (NEMA code letter),
    ``"current_or_pu"`` (amperes or per-unit of rated current), ``"table"`` (a list of sub-tables),
    ``"ct_class"`` (an IEEE C57.13 relaying class such as ``"C200"`` or an IEC 61869-2 class such as ``"5P20"``),
    ``"subtable"`` (one sub-table such as ``[machine.speed_curve]``, read against the dataclass ``item``),
    ``"per_unit_list"`` (a list of per-unit numbers), ``"current_time_points"`` (a list of (current, time) pairs;
    currents in A, or in pu of the rated current when the field's unit is ``"pu"``).
    """

    kind: str
    unit: str = ""  #: unit a practitioner writes, shown by the wizard and used on the sheet
    required: bool = False
    default: Any = None  #: default as written in a file (string with unit), or None
    lo: float | None = None  #: lowest plausible value, SI
    hi: float | None = None  #: highest plausible value, SI
    choices: tuple[str, ...] = ()
    help: str = ""
    allow_zero: bool = False
    item: type | None = None  #: dataclass of the rows of a table


def spec(
    kind: str,
    unit: str = "",
    *,
    required: bool = False,
    default: Any = None,
    lo: float | None = None,
    hi: float | None = None,
    choices: tuple[str, ...] = (),
    help: str = "",
    allow_zero: bool = False,
    item: type | None = None,
    value_default: Any = None,
):
    """A dataclass field carrying its :class:`FieldSpec` (``value_default`` is the Python default)."""
    meta = {"spec": FieldSpec(kind, unit, required, default, lo, hi, choices, help, allow_zero, item)}
    if kind == "table":
        return field(default=(), metadata=meta)
    if kind in ("per_unit_list", "current_time_points"):
        return field(default=tuple(value_default or ()), metadata=meta)
    return field(default=value_default, metadata=meta)


def field_specs(cls) -> dict[str, FieldSpec]:
    """The specs of a model dataclass, by key."""
    return {f.name: f.metadata["spec"] for f in fields(cls) if "spec" in f.metadata}


# ---------------------------------------------------------------------------------------------------- parts


@frozen
class Ratio:
    """An instrument-transformer ratio, e.g. 200/1 A or 6600/110 V: primary and secondary [A or V]."""

    primary: float
    secondary: float

    @property
    def factor(self) -> float:
        """primary / secondary [-]"""
        return self.primary / self.secondary

    def to_secondary(self, value: float) -> float:
        return value / self.factor


@frozen
class HistoryEntry:
    """One line of the revision history: who changed what, when and why."""

    revision: int = spec(
        "integer", required=True, lo=0, hi=9999, allow_zero=True, value_default=0, help="revision this row describes"
    )
    date: str = spec("text", help="ISO date, e.g. 2026-11-30", value_default="")
    by: str = spec("text", value_default="", help="who made the revision")
    reason: str = spec("text", value_default="", help="why, in a few words")


#: the life of a sheet, in order: each step records who and when (checked_by/checked_on, approved_by/approved_on)
SHEET_STATUSES = ("draft", "checked", "approved", "issued")


@frozen
class SheetInfo:
    """Identification and sign-off data printed on the sheet."""

    tag: str = spec("text", required=True, help="plant tag, e.g. CW-P-201", value_default="")
    description: str = spec("text", value_default="", help="what the machine does, as the plant names it")
    site: str = spec("text", value_default="", help="plant or site name")
    prepared_by: str = spec("text", value_default="", help="engineer who prepared the settings")
    checked_by: str = spec("text", value_default="", help="engineer who checked them")
    checked_on: str = spec("text", value_default="", help="date of the check, ISO form (with checked_by)")
    approved_by: str = spec("text", value_default="", help="licensed engineer who approves them")
    approved_on: str = spec("text", value_default="", help="date of the approval, ISO form (with approved_by)")
    revision: int = spec(
        "integer",
        default=0,
        lo=0,
        hi=9999,
        allow_zero=True,
        value_default=0,
        help="revision number, bumped by relaywright revise",
    )
    date: str = spec("text", help="date of this revision, ISO form", value_default="")
    status: str = spec(
        "choice",
        default="draft",
        choices=SHEET_STATUSES,
        value_default="draft",
        help="draft, then checked, approved and issued (an issued revision is locked)",
    )
    page_size: str = spec(
        "choice", default="A4", choices=("A4", "letter"), value_default="A4", help="paper size of the sheet"
    )
    history: tuple[HistoryEntry, ...] = spec(
        "table", item=HistoryEntry, help="revision history rows: revision, date, by, reason"
    )


@frozen
class StudyOptions:
    """Choices that steer the study."""

    practice: str = spec(
        "choice",
        choices=("IEC", "IEEE"),
        help="curve family and capability tables; default IEC at 50 Hz, IEEE at 60 Hz",
        value_default="IEC",
    )


@frozen
class RelaySteps:
    """The setting steps of the relay that will hold the settings: every setting is rounded to one of these.

    Steps are relay-side: a current or voltage step applies to the CT or VT secondary value where a transformer
    applies. The defaults are steps most numerical motor and generator relays accept (common practice, no
    published source); a relay with coarser steps is described here so that every check and test point runs on
    values the relay can actually hold.
    """

    current_step: float = spec("current", "A", default="0.01 A", lo=1e-4, hi=100.0, value_default=0.01,
                               help="step of current settings, relay side")
    voltage_step: float = spec("voltage", "V", default="0.1 V", lo=1e-3, hi=1000.0, value_default=0.1,
                               help="step of voltage settings, relay side")
    time_step: float = spec("time", "s", default="0.01 s", lo=1e-3, hi=60.0, value_default=0.01,
                            help="step of time delays")
    time_constant_step: float = spec("time", "min", default="0.1 min", lo=0.1, hi=3600.0, value_default=6.0,
                                     help="step of thermal time constants")
    frequency_step: float = spec("frequency", "Hz", default="0.01 Hz", lo=1e-3, hi=1.0, value_default=0.01,
                                 help="step of frequency settings")
    per_unit_step: float = spec("per_unit", "pu", default="0.01 pu", lo=1e-4, hi=1.0, value_default=0.01,
                                help="step of per-unit and ratio settings (levels, slopes, V/Hz)")
    impedance_step: float = spec("impedance", "ohm", default="0.01 ohm", lo=1e-4, hi=100.0, value_default=0.01,
                                 help="step of impedance settings, relay side")
    power_step: float = spec("active_power", "W", default="0.1 W", lo=1e-3, hi=1000.0, value_default=0.1,
                             help="step of power settings, relay side (three-phase)")
    dial_step: float = spec("per_unit", "", default="0.01", lo=1e-4, hi=1.0, value_default=0.01,
                            help="step of time dials and time multipliers")


@frozen
class FrequencyBand:
    """A maker's off-frequency band: from ``low`` to ``high`` [Hz], ``allowed`` accumulated time [s]."""

    low: float = spec(
        "frequency", "Hz", required=True, lo=30.0, hi=70.0, value_default=0.0, help="lower edge of the band"
    )
    high: float = spec(
        "frequency", "Hz", required=True, lo=30.0, hi=70.0, value_default=0.0, help="upper edge of the band"
    )
    allowed: float = spec(
        "time",
        "s",
        required=True,
        lo=0.0,
        hi=1e8,
        allow_zero=True,
        value_default=0.0,
        help="accumulated time the maker allows in this band over the machine's life",
    )


@frozen
class FrequencyStage:
    """A load-shedding or trip stage: ``frequency`` [Hz] for ``time_delay`` [s]."""

    frequency: float = spec(
        "frequency", "Hz", required=True, lo=30.0, hi=70.0, value_default=0.0, help="stage frequency"
    )
    time_delay: float = spec(
        "time", "s", required=True, lo=0.0, hi=3600.0, allow_zero=True, value_default=0.0, help="stage delay"
    )


@frozen
class CapabilityPoint:
    """A point of the underexcited (leading) side of a P-Q diagram: at ``active_power`` the machine absorbs at most
    ``reactive_absorbed`` [both pu of the rated apparent power, at rated voltage]."""

    active_power: float = spec(
        "per_unit", "pu", required=True, lo=0.0, hi=1.2, allow_zero=True, value_default=0.0,
        help="active power, pu of the rated apparent power"
    )
    reactive_absorbed: float = spec(
        "per_unit", "pu", required=True, lo=0.0, hi=1.2, allow_zero=True, value_default=0.0,
        help="reactive power absorbed (underexcited, leading) at that active power, pu of the rated apparent power"
    )


@frozen
class RideThroughBand:
    """A band of the system's frequency ride-through requirement: with the frequency from ``low`` to ``high`` [Hz]
    the unit must stay connected for at least ``minimum_time`` [s]."""

    low: float = spec(
        "frequency", "Hz", required=True, lo=30.0, hi=70.0, value_default=0.0, help="lower edge of the band"
    )
    high: float = spec(
        "frequency", "Hz", required=True, lo=30.0, hi=70.0, value_default=0.0, help="upper edge of the band"
    )
    minimum_time: float = spec(
        "time", "s", required=True, lo=0.0, hi=1e8, allow_zero=True, value_default=0.0,
        help="time the unit must stay connected with the frequency in this band (1e8 s or more: continuously)"
    )


@frozen
class SpeedCurve:
    """The maker's torque- and current-speed curve at rated voltage: ``speed`` [pu of synchronous speed, rising],
    ``torque`` [pu of rated torque], ``current`` [pu of full-load current] (optional), one entry per point."""

    speed: tuple[float, ...] = spec("per_unit_list", "pu", required=True, value_default=(),
                                    help="pu of synchronous speed, rising from 0")
    torque: tuple[float, ...] = spec("per_unit_list", "pu", required=True, value_default=(),
                                     help="pu of rated torque at each speed")
    current: tuple[float, ...] = spec("per_unit_list", "pu", value_default=(),
                                      help="pu of full-load current at each speed")


@frozen
class ThermalLimit:
    """One IEEE Std 620 thermal-limit curve of a motor: ``points`` are (current [A], allowed time [s]) pairs."""

    curve: str = spec("choice", required=True, choices=("running", "accelerating", "locked-rotor"),
                      value_default="", help="running | accelerating | locked-rotor")
    state: str = spec("choice", default="hot", choices=("hot", "cold"), value_default="hot",
                      help="the motor's state the curve starts from")
    voltage: float = spec("per_unit", "pu", default="1.0 pu", lo=0.5, hi=1.2, value_default=1.0,
                          help="accelerating curves: the voltage they are drawn for")
    points: tuple[tuple[float, float], ...] = spec(
        "current_time_points", "pu", required=True, value_default=(),
        help="(current, time) pairs, current in pu of FLC or A, e.g. [[\"2 pu\", \"330 s\"]]")


@frozen
class FuseCurve:
    """A power fuse of a fused contactor: its rating [A] and its minimum melting curve (current [A], time [s])."""

    rating: float = spec("current", "A", required=True, lo=1.0, hi=1e5, value_default=0.0,
                         help="rated current of the fuse")
    points: tuple[tuple[float, float], ...] = spec(
        "current_time_points", "A", required=True, value_default=(),
        help="minimum melting curve, (current, time) pairs, e.g. [[\"2000 A\", \"10 s\"]]")


# ---------------------------------------------------------------------------------------------------- machines


@frozen
class InductionMotor:
    """A three-phase induction motor's nameplate and maker's data [SI]."""

    kind: Literal["induction-motor"] = "induction-motor"
    rated_output: float = spec(
        "active_power",
        "kW",
        required=True,
        lo=1e3,
        hi=1e8,
        help="shaft output on the nameplate, kW or hp",
        value_default=0.0,
    )
    rated_voltage: float = spec(
        "voltage", "kV", required=True, lo=100.0, hi=30e3, value_default=0.0, help="nameplate line-to-line voltage"
    )
    rated_current: float = spec(
        "current", "A", lo=0.1, hi=1e5, help="full-load current on the nameplate", value_default=0.0
    )
    frequency: float = spec(
        "frequency", "Hz", required=True, lo=45.0, hi=65.0, value_default=0.0, help="rated frequency"
    )
    rated_speed: float = spec(
        "speed", "rpm", required=True, lo=10.0, hi=800.0, help="full-load speed", value_default=0.0
    )
    power_factor: float = spec(
        "per_unit", "", required=True, lo=0.3, hi=1.0, value_default=0.0, help="full-load power factor"
    )
    efficiency: float = spec(
        "per_unit", "", required=True, lo=0.5, hi=0.995, value_default=0.0, help="full-load efficiency"
    )
    service_factor: float = spec(
        "per_unit",
        "",
        default="1.0",
        lo=1.0,
        hi=1.5,
        value_default=1.0,
        help="nameplate service factor (1.0 or 1.15)",
    )
    locked_rotor_current: float | None = spec(
        "current_or_pu", "pu", lo=0.1, hi=1e6, help="starting current at full voltage, A or pu of rated current"
    )
    locked_rotor_code: str | None = spec("letter", help="NEMA MG 1 code letter, when no current is given")
    locked_rotor_torque: float = spec(
        "per_unit", "pu", required=True, lo=0.2, hi=4.0, help="pu of rated torque", value_default=0.0
    )
    breakdown_torque: float = spec(
        "per_unit",
        "pu",
        required=True,
        lo=1.0,
        hi=5.0,
        value_default=0.0,
        help="maximum (pull-out) torque, pu of rated torque",
    )
    safe_stall_time_cold: float = spec(
        "time",
        "s",
        required=True,
        lo=0.5,
        hi=600.0,
        value_default=0.0,
        help="maker's safe locked-rotor time from ambient temperature",
    )
    safe_stall_time_hot: float = spec(
        "time",
        "s",
        required=True,
        lo=0.5,
        hi=600.0,
        value_default=0.0,
        help="maker's safe locked-rotor time from rated-load temperature",
    )
    rotor_inertia: float = spec(
        "inertia",
        "kg*m^2",
        required=True,
        lo=1e-3,
        hi=1e6,
        value_default=0.0,
        help="rotor moment of inertia J (or WK² in lb*ft^2)",
    )
    starts_cold: int = spec(
        "integer", default=2, lo=1, hi=10, value_default=2, help="starts in succession allowed from ambient"
    )
    starts_hot: int = spec(
        "integer", default=1, lo=1, hi=10, value_default=1, help="starts allowed from rated-load temperature"
    )
    heating_time_constant: float | None = spec(
        "time", "min", lo=60.0, hi=36000.0, help="maker's running heating time constant, if known"
    )
    cooling_time_constant: float | None = spec(
        "time", "min", lo=60.0, hi=72000.0, help="maker's standstill cooling time constant, if known"
    )
    insulation_class: str = spec(
        "choice", default="F", choices=("A", "B", "F", "H"), value_default="F", help="insulation thermal class"
    )
    temperature_rise: float | None = spec(
        "temperature_rise", "K", lo=20.0, hi=180.0, help="rated temperature rise by resistance"
    )
    pull_up_torque: float | None = spec(
        "per_unit", "pu", lo=0.1, hi=4.0, help="minimum torque during acceleration, pu of rated torque"
    )
    speed_curve: SpeedCurve | None = spec(
        "subtable", item=SpeedCurve, help="the maker's torque- and current-speed curve at rated voltage"
    )
    thermal_limit: tuple[ThermalLimit, ...] = spec(
        "table", item=ThermalLimit, help="IEEE Std 620 thermal-limit curves, one table per curve"
    )


@frozen
class SynchronousGenerator:
    """A synchronous generator's nameplate and maker's data [SI; reactances pu on the machine's base]."""

    kind: Literal["synchronous-generator"] = "synchronous-generator"
    rated_apparent_power: float = spec(
        "apparent_power", "MVA", required=True, lo=1e4, hi=2e9, value_default=0.0, help="nameplate rating"
    )
    rated_voltage: float = spec(
        "voltage", "kV", required=True, lo=100.0, hi=30e3, value_default=0.0, help="nameplate line-to-line voltage"
    )
    power_factor: float = spec(
        "per_unit", "", required=True, lo=0.5, hi=1.0, value_default=0.0, help="rated power factor"
    )
    frequency: float = spec(
        "frequency", "Hz", required=True, lo=45.0, hi=65.0, value_default=0.0, help="rated frequency"
    )
    rated_speed: float = spec(
        "speed", "rpm", required=True, lo=5.0, hi=800.0, value_default=0.0, help="synchronous speed"
    )
    prime_mover: str = spec(
        "choice",
        required=True,
        choices=("steam-turbine", "gas-turbine", "hydro", "reciprocating-engine"),
        value_default="",
        help="what drives the generator",
    )
    rotor: str = spec(
        "choice",
        required=True,
        choices=("cylindrical-indirect", "cylindrical-direct", "salient-with-damper", "salient-without-damper"),
        value_default="",
        help="rotor construction and cooling",
    )
    xd: float = spec(
        "per_unit",
        "pu",
        required=True,
        lo=0.3,
        hi=4.0,
        value_default=0.0,
        help="direct-axis synchronous reactance, unsaturated",
    )
    xd_transient: float = spec(
        "per_unit",
        "pu",
        required=True,
        lo=0.05,
        hi=1.0,
        value_default=0.0,
        help="direct-axis transient reactance X'd",
    )
    xd_subtransient: float = spec(
        "per_unit",
        "pu",
        required=True,
        lo=0.03,
        hi=0.8,
        value_default=0.0,
        help="direct-axis subtransient reactance X''d",
    )
    x2: float | None = spec("per_unit", "pu", lo=0.03, hi=1.0, help="negative-sequence reactance")
    negative_sequence_continuous: float | None = spec(
        "per_unit", "pu", lo=0.01, hi=0.3, help="maker's continuous I2 capability"
    )
    negative_sequence_k: float | None = spec("time", "s", lo=1.0, hi=200.0, help="maker's I2²t capability")
    stator_capacitance: float | None = spec(
        "capacitance", "uF", lo=1e-9, hi=1e-4, help="per phase to ground, stator winding"
    )
    third_harmonic_neutral_min: float | None = spec(
        "voltage", "V", lo=0.01, hi=1e4, help="lowest measured third-harmonic neutral voltage, primary"
    )
    motoring_power: float | None = spec(
        "active_power", "kW", lo=1.0, hi=1e9, help="power to motor the unit at rated speed (else by prime mover)"
    )
    inertia_constant: float | None = spec("time", "s", lo=0.1, hi=30.0, help="H on the machine's rating")
    heating_time_constant: float | None = spec(
        "time", "min", lo=60.0, hi=36000.0, help="maker's stator heating time constant, if known"
    )
    cooling_time_constant: float | None = spec(
        "time", "min", lo=60.0, hi=72000.0, help="maker's stator cooling time constant, if known"
    )
    vhz_limit: float = spec(
        "per_unit",
        "pu",
        default="1.05",
        lo=1.0,
        hi=1.3,
        value_default=1.05,
        help="continuous V/Hz capability on the generator's base",
    )
    frequency_limits: tuple[FrequencyBand, ...] = spec(
        "table", item=FrequencyBand, help="maker's off-frequency bands: low, high, allowed time"
    )
    excitation: str | None = spec(
        "choice", choices=("static", "brushless", "rotating-dc"),
        help="exciter: static (fed from the terminals through slip rings), brushless, or rotating DC"
    )
    capability: tuple[CapabilityPoint, ...] = spec(
        "table", item=CapabilityPoint, help="maker's capability curve, underexcited side: active power, reactive "
        "power absorbed"
    )
    uel: tuple[CapabilityPoint, ...] = spec(
        "table", item=CapabilityPoint, help="under-excitation limiter of the voltage regulator: active power, "
        "reactive power absorbed"
    )


# ---------------------------------------------------------------------------------------------------- system


@frozen
class MotorLoad:
    """The driven load of a motor."""

    inertia: float = spec(
        "inertia",
        "kg*m^2",
        required=True,
        lo=0.0,
        hi=1e7,
        allow_zero=True,
        help="load inertia referred to the motor shaft (J, or WK² in lb*ft^2)",
        value_default=0.0,
    )
    torque_profile: str = spec(
        "choice",
        default="quadratic",
        choices=("quadratic", "constant", "linear"),
        value_default="quadratic",
        help="how load torque rises with speed",
    )
    torque_at_rated_speed: float = spec(
        "per_unit",
        "pu",
        default="1.0",
        lo=0.0,
        hi=1.5,
        allow_zero=True,
        value_default=1.0,
        help="load torque at rated speed, pu of motor rated torque",
    )
    breakaway_torque: float = spec(
        "per_unit",
        "pu",
        default="0.1",
        lo=0.0,
        hi=2.0,
        allow_zero=True,
        value_default=0.1,
        help="load torque at standstill, pu of motor rated torque",
    )
    minimum_load: float | None = spec(
        "per_unit", "pu", lo=0.0, hi=1.0, allow_zero=True, help="lowest normal running current, pu of rated"
    )


@frozen
class Supply:
    """The supply to the machine and its switching device."""

    nominal_voltage: float = spec(
        "voltage",
        "kV",
        required=True,
        lo=100.0,
        hi=800e3,
        value_default=0.0,
        help="nominal voltage of the bus the machine is on",
    )
    fault_level: float | None = spec(
        "apparent_power", "MVA", lo=1e5, hi=1e11, help="three-phase fault level at the machine's bus, maximum"
    )
    minimum_fault_level: float | None = spec(
        "apparent_power", "MVA", lo=1e5, hi=1e11, help="three-phase fault level at the bus, minimum source"
    )
    source_impedance: float | None = spec(
        "impedance", "ohm", lo=1e-5, hi=1e4, help="source impedance per phase, instead of the fault level"
    )
    x_over_r: float = spec(
        "per_unit", "", default="15", lo=1.0, hi=100.0, value_default=15.0, help="X/R ratio of the source at the bus"
    )
    minimum_starting_voltage: float | None = spec(
        "per_unit", "pu", lo=0.5, hi=1.1, help="lowest motor terminal voltage during a start (else computed)"
    )
    voltage_before_start: float = spec(
        "per_unit", "pu", default="0.95 pu", lo=0.8, hi=1.1, value_default=0.95,
        help="bus voltage just before a start, for the dip computed from the minimum fault level"
    )
    starter: str = spec(
        "choice",
        default="breaker",
        choices=("breaker", "fused-contactor"),
        value_default="breaker",
        help="switching device: breaker, or fused contactor",
    )
    contactor_breaking_current: float | None = spec(
        "current", "kA", lo=10.0, hi=2e5, help="contactor's rated breaking current"
    )
    fuse_rating: float | None = spec(
        "current", "A", lo=1.0, hi=1e5, help="rated current of the contactor's power fuse"
    )
    fuse: FuseCurve | None = spec(
        "subtable", item=FuseCurve, help="the contactor's power fuse: rating and minimum melting curve"
    )
    underfrequency_stages: tuple[FrequencyStage, ...] = spec(
        "table", item=FrequencyStage, help="this motor's load-shedding stages: frequency, time_delay"
    )
    load_shedding_stages: tuple[FrequencyStage, ...] = spec(
        "table", item=FrequencyStage, help="the system's load-shedding stages (generators coordinate below them)"
    )
    system_rating: float | None = spec(
        "apparent_power", "MVA", lo=1e4, hi=1e12, help="rating of the islanded system, for the swing equation"
    )
    system_inertia: float | None = spec("time", "s", lo=0.1, hi=30.0, help="H of the islanded system")
    transformer_lv_voltage: float | None = spec(
        "voltage", "kV", lo=100.0, hi=30e3, help="step-up transformer's LV rated voltage"
    )
    transformer_vhz_limit: float = spec(
        "per_unit",
        "pu",
        default="1.05",
        lo=1.0,
        hi=1.3,
        value_default=1.05,
        help="step-up transformer's continuous V/Hz capability on its LV base",
    )
    connection: str | None = spec(
        "choice", choices=("unit-transformer", "bus"),
        help="generators: through its own step-up (unit) transformer, or directly to a bus shared with others"
    )
    transformer_impedance: float | None = spec(
        "per_unit", "pu", lo=0.02, hi=0.3, help="step-up transformer's impedance on its own rating (e.g. 8 %)"
    )
    transformer_rating: float | None = spec(
        "apparent_power", "MVA", lo=1e4, hi=2e9, help="step-up transformer's rating (else the generator's)"
    )
    ride_through: tuple[RideThroughBand, ...] = spec(
        "table", item=RideThroughBand, help="the system's frequency ride-through requirement: low, high, minimum time"
    )


@frozen
class Grounding:
    """How the system neutral is grounded and what that means for earth faults."""

    method: str = spec(
        "choice",
        required=True,
        choices=("solid", "low-resistance", "high-resistance", "ungrounded", "distribution-transformer"),
        value_default="",
        help="how the system neutral is grounded",
    )
    fault_current_limit: float | None = spec(
        "current", "A", lo=0.1, hi=1e5, help="earth-fault current the grounding allows"
    )
    system_capacitance: float | None = spec(
        "capacitance", "uF", lo=1e-10, hi=1e-3, help="per phase to ground, the rest of the connected system"
    )
    circuit_capacitance: float | None = spec(
        "capacitance", "uF", lo=1e-10, hi=1e-3, help="per phase to ground, this machine's own cable and winding"
    )
    transformer_ratio: Ratio | None = spec("ratio", "V", help="grounding transformer, e.g. '13800/240 V'")
    resistor: float | None = spec("impedance", "ohm", lo=1e-3, hi=1e6, help="grounding resistor as installed")
    surge_capacitance: float | None = spec(
        "capacitance", "uF", lo=1e-10, hi=1e-4, allow_zero=True,
        help="generators: surge capacitors per phase to ground (0 uF when none are fitted)"
    )
    bus_capacitance: float | None = spec(
        "capacitance", "uF", lo=1e-10, hi=1e-3, allow_zero=True,
        help="generators: the generator's bus (isolated-phase bus or cables) per phase to ground"
    )
    transformer_capacitance: float | None = spec(
        "capacitance", "uF", lo=1e-10, hi=1e-4, allow_zero=True,
        help="generators: the step-up transformer's LV winding per phase to ground"
    )


@frozen
class Instruments:
    """Instrument transformers."""

    phase_ct: Ratio = spec("ratio", "A", required=True, help="e.g. '200/1 A'", value_default=Ratio(1.0, 1.0))
    ground_ct: Ratio | None = spec("ratio", "A", help="core-balance CT, e.g. '50/1 A'")
    vt: Ratio | None = spec("ratio", "V", help="e.g. '6600/110 V'")
    neutral_vt: Ratio | None = spec("ratio", "V", help="neutral voltage transformer, if not a grounding transformer")
    neutral_ct: Ratio | None = spec("ratio", "A", help="generators: CT in the machine's neutral, e.g. '400/5 A'")
    phase_ct_class: str | None = spec("ct_class", help="IEEE C57.13 class, e.g. 'C200' (or IEC '5P20')")
    phase_ct_burden: float | None = spec(
        "impedance", "ohm", lo=1e-3, hi=100.0, help="total secondary burden: leads and relay"
    )
    differential_ct: Ratio | None = spec("ratio", "A", help="CTs of the differential zone, e.g. '1000/5 A'")
    differential_ct_class: str | None = spec(
        "ct_class", help="IEEE C57.13 class of the differential CTs, e.g. 'C400' (or IEC '5P20')"
    )
    differential_ct_burden: float | None = spec(
        "impedance", "ohm", lo=1e-3, hi=100.0, help="total secondary burden of the differential CTs"
    )


# ---------------------------------------------------------------------------------------------------- the case


Machine = InductionMotor | SynchronousGenerator


@frozen
class MachineCase:
    """Everything one machine file says, validated.

    ``entered`` holds the file's text values as written (the sheet prints them as entered); it takes no part in
    equality. ``overrides`` maps ``"<function id>.<setting key>"`` to the engineer's value as written.
    """

    sheet: SheetInfo
    study: StudyOptions
    machine: Machine
    supply: Supply
    grounding: Grounding
    instruments: Instruments
    load: MotorLoad | None = None
    relay: RelaySteps = field(default_factory=RelaySteps)
    overrides: tuple[tuple[str, str], ...] = ()
    entered: dict = field(default_factory=dict, compare=False, hash=False, repr=False)
    #: False for a generator file without [supply]: the machine is studied alone (``supply`` holds defaults)
    supply_given: bool = True

    @property
    def is_motor(self) -> bool:
        return isinstance(self.machine, InductionMotor)

    def override(self, key: str) -> str | None:
        """The engineer's value for ``"49.pickup_current"``, as written, or None."""
        return dict(self.overrides).get(key)


# ---------------------------------------------------------------------------------------------------- derived


def rated_current_from_output(
    rated_output: float, rated_voltage: float, efficiency: float, power_factor: float
) -> float:
    """Full-load line current of a three-phase motor [A].

    Notes
    -----
    I = P_out / (√3 · V · η · cos φ), the definition of shaft output, efficiency and power factor.

    Examples
    --------
    >>> round(rated_current_from_output(500 * 746.0, 4160.0, 0.95, 0.88), 2)  # METHODS.md §3.4 (1 hp = 746 W)
    61.92
    """
    return rated_output / (math.sqrt(3.0) * rated_voltage * efficiency * power_factor)


def generator_rated_current(rated_apparent_power: float, rated_voltage: float) -> float:
    """Rated line current of a three-phase generator, I = S / (√3 · V) [A].

    >>> round(generator_rated_current(100e6, 13.8e3), 1)
    4183.7
    """
    return rated_apparent_power / (math.sqrt(3.0) * rated_voltage)


def synchronous_speed(frequency: float, poles: int) -> float:
    """Synchronous speed ω_s = 4π·f / poles [rad/s] (120·f/p in rpm).

    >>> round(synchronous_speed(60.0, 4) * 60 / (2 * math.pi), 6)
    1800.0
    """
    return 4.0 * math.pi * frequency / poles


def motor_poles(frequency: float, rated_speed: float) -> int:
    """Number of poles of an induction motor: the largest even p whose synchronous speed exceeds the rated speed.

    >>> motor_poles(60.0, 1785 * 2 * math.pi / 60)
    4
    """
    rpm = rated_speed * 60.0 / (2.0 * math.pi)
    poles = int(120.0 * frequency / rpm)
    poles -= poles % 2
    return max(poles, 2)


def generator_poles(frequency: float, rated_speed: float) -> int:
    """Poles of a synchronous machine from its speed: p = 120·f / n, the nearest even number."""
    rpm = rated_speed * 60.0 / (2.0 * math.pi)
    poles = round(120.0 * frequency / rpm / 2.0) * 2
    return max(int(poles), 2)


def rated_slip(frequency: float, rated_speed: float) -> float:
    """Full-load slip s = (n_s − n) / n_s [pu]."""
    ws = synchronous_speed(frequency, motor_poles(frequency, rated_speed))
    return (ws - rated_speed) / ws


def motor_rated_current(m: InductionMotor) -> float:
    """The nameplate current, or the one computed from output, voltage, efficiency and power factor [A]."""
    if m.rated_current:
        return m.rated_current
    return rated_current_from_output(m.rated_output, m.rated_voltage, m.efficiency, m.power_factor)


# ---------------------------------------------------------------------------------------------------- validation


def motor_current_error(output: float, voltage: float, current: float, computed: float) -> InputError | None:
    """Why a motor's nameplate current cannot be right for its output and voltage, or None.

    The electrical input √3·V·I·cos φ·η is the shaft output: with cos φ ≤ 1 and η ≤ 1 the current is at least
    P/(√3·V) (2 % left for rounding on the nameplate); more than twice the current computed with the file's own
    efficiency and power factor contradicts them (METHODS.md §14). The file reader and the wizard use this one rule.
    """
    least = output / (math.sqrt(3.0) * voltage)
    if current < 0.98 * least:
        return InputError("machine.rated_current",
                          f"expected at least {least:.4g} A, the current {output / 1e3:.4g} kW needs at "
                          f"{voltage / 1e3:.4g} kV with a power factor and efficiency of 1, got {current:.4g} A")
    if current > 2.0 * computed:
        return InputError("machine.rated_current",
                          f"expected near {computed:.4g} A, computed from output, voltage, efficiency and power "
                          f"factor (more than twice that contradicts them), got {current:.4g} A")
    return None


def ct_primary_error(key: str, rated_current: float, ct: Ratio) -> InputError | None:
    """Why a CT cannot carry the machine's rated current, or None: no CT carries more than
    :data:`CT_MAX_RATING_FACTOR` times its rating continuously (IEEE C57.13 thermal rating factor). The file reader
    and the wizard use this one rule."""
    if rated_current <= CT_MAX_RATING_FACTOR * ct.primary:
        return None
    return InputError(f"instruments.{key}",
                      f"expected a CT primary of at least {rated_current / CT_MAX_RATING_FACTOR:.4g} A: the "
                      f"machine's rated current {rated_current:.4g} A is {rated_current / ct.primary:.3g} times the "
                      f"{ct.primary:g} A primary, and no CT carries more than {CT_MAX_RATING_FACTOR:g} times "
                      "its rating continuously (IEEE C57.13 thermal rating factor)")


def motor_speed_error(frequency: float, rated_speed: float) -> InputError | None:
    """Why an induction motor's full-load speed cannot be right at this frequency, or None.

    Below synchronous speed for its pole count, with a full-load slip between 0 and 10 %. The file reader and the
    wizard (as soon as both answers are in) use this one rule.

    >>> motor_speed_error(50.0, 1485 * math.pi / 30) is None
    True
    >>> print(motor_speed_error(60.0, 1500 * math.pi / 30))
    machine.rated_speed: expected a full-load slip between 0 and 10 %, got 16.7% (1500 rpm)
    """
    f = frequency
    ws_max = synchronous_speed(f, 2)
    if rated_speed >= ws_max:
        return InputError(
            "machine.rated_speed",
            f"expected below the 2-pole synchronous speed "
            f"{120 * f:.0f} rpm at {f:g} Hz, got {rated_speed * 30 / math.pi:.0f} rpm",
        )
    rpm = rated_speed * 30.0 / math.pi
    near = generator_poles(f, rated_speed)
    if rpm >= 120.0 * f / near:
        return InputError(
            "machine.rated_speed",
            f"expected a full-load speed below synchronous speed "
            f"({120 * f / near:.0f} rpm for {near} poles at {f:g} Hz), got {rpm:.0f} rpm",
        )
    s = rated_slip(f, rated_speed)
    if not 0.0 < s < 0.1:
        return InputError(
            "machine.rated_speed", f"expected a full-load slip between 0 and 10 %, got {s:.1%} ({rpm:.0f} rpm)"
        )
    return None


def generator_speed_error(frequency: float, rated_speed: float) -> InputError | None:
    """Why a synchronous machine's rated speed is not a synchronous speed 120·f/p at this frequency, or None.

    >>> generator_speed_error(50.0, 1500 * math.pi / 30) is None
    True
    >>> print(generator_speed_error(60.0, 1500 * math.pi / 30))
    machine.rated_speed: expected a synchronous speed 120·f/p at 60 Hz (e.g. 1800 rpm), got 1500.0 rpm
    """
    ws = synchronous_speed(frequency, generator_poles(frequency, rated_speed))
    if abs(rated_speed / ws - 1.0) > 0.005:
        return InputError(
            "machine.rated_speed",
            f"expected a synchronous speed 120·f/p at {frequency:g} Hz "
            f"(e.g. {ws * 30 / math.pi:.0f} rpm), got {rated_speed * 30 / math.pi:.1f} rpm",
        )
    return None


def validate_case(case: MachineCase) -> list[str]:
    """Check physical sense across fields. Raises InputError for the impossible; returns warnings.

    Impossible: what no real machine or installation can be (a nameplate current below what the shaft output
    needs, a CT or VT that would be destroyed by its own circuit, a bus at another voltage level, a load-shedding
    stage above nominal frequency, ...): refused naming the key, because every setting would rest on it. Merely
    unusual: kept and returned as a warning, which the sheet prints as a finding. The limits and their sources are
    in METHODS.md §14.
    """
    warnings: list[str] = []
    validate_sheet(case.sheet)
    m = case.machine
    if not any(ch.isalnum() for ch in case.sheet.tag):
        raise InputError("sheet.tag", f"expected a plant tag with letters or digits such as 'CW-P-201', got "
                                      f"{one_line(case.sheet.tag)}")
    warnings += _validate_voltage_level(case)  # first: a machine on the wrong bus makes every other check moot
    if isinstance(m, InductionMotor):
        warnings += _validate_motor(m)
        if case.load is None:
            raise InputError("load", "a motor needs a [load] table (at least load.inertia)")
    else:
        warnings += _validate_generator(m)
        warnings += _validate_generator_system(case)
    if case.instruments.phase_ct.primary <= 0 or case.instruments.phase_ct.secondary <= 0:
        raise InputError(
            "instruments.phase_ct", "expected a CT ratio with positive primary and secondary such as '200/1 A'"
        )
    s = case.supply
    if s.minimum_fault_level and s.fault_level and s.minimum_fault_level > s.fault_level:
        raise InputError("supply.minimum_fault_level", "expected at most supply.fault_level, got a larger value")
    warnings += _validate_instruments(case)
    warnings += _validate_system(case)
    if s.fuse is not None:
        if s.fuse_rating is not None and abs(s.fuse_rating / s.fuse.rating - 1.0) > 1e-6:
            raise InputError("supply.fuse.rating", f"expected the same rating as supply.fuse_rating "
                                                   f"({s.fuse_rating:.4g} A), got {s.fuse.rating:.4g} A")
        _curve_points(s.fuse.points, "supply.fuse.points", s.fuse.rating, "fuse rating", "rating")
    g = case.grounding
    if g.method == "low-resistance" and g.fault_current_limit is None:
        warnings.append("grounding.fault_current_limit is missing: earth-fault sensitivity cannot be judged")
    return warnings


#: a machine runs continuously within ±10 % of its rated voltage (IEC 60034-1 cl. 7.3 zone B; NEMA MG 1-12.44);
#: a bus beyond ±20 % is another voltage level, not an unusual supply (common practice, no published source)
VOLTAGE_WARN, VOLTAGE_REFUSE = 0.10, 0.20
#: IEEE C57.13 cl. 6.3: continuous thermal current rating factors go up to 4.0 (1.0, 1.33, 1.5, 2.0, 3.0, 4.0)
CT_MAX_RATING_FACTOR = 4.0
#: IEC 61869-3 cl. 5.3.2: rated voltage factor 1.2 continuous for every VT; 1.9 for 8 h on a non-effectively
#: earthed system (neutral and earthing transformers)
VT_VOLTAGE_FACTOR, NEUTRAL_VT_VOLTAGE_FACTOR = 1.2, 1.9
#: a VT whose secondary sees less than half its rating at nominal voltage was chosen for another bus (common
#: practice, no published source)
VT_LOWEST_SHARE = 0.5
#: [s] a maker's band allowing this long is the continuous range (machines.protection.frequency reads it so too)
CONTINUOUS_ALLOWANCE = 1e7


def machine_rated_current(m: Machine) -> float:
    """The machine's rated line current [A]."""
    if isinstance(m, InductionMotor):
        return motor_rated_current(m)
    return generator_rated_current(m.rated_apparent_power, m.rated_voltage)


def machine_apparent_power(m: Machine) -> float:
    """The machine's rated apparent power [VA] (a motor's is its rated input, √3·V·I)."""
    return math.sqrt(3.0) * m.rated_voltage * machine_rated_current(m)


def _validate_voltage_level(case: MachineCase) -> list[str]:
    m, vn = case.machine, case.supply.nominal_voltage
    dev = vn / m.rated_voltage - 1.0
    if abs(dev) > VOLTAGE_REFUSE:
        raise InputError("machine.rated_voltage",
                         f"expected within ±{VOLTAGE_REFUSE:.0%} of the bus voltage supply.nominal_voltage "
                         f"{vn / 1e3:.4g} kV (a machine cannot run at another voltage level), got "
                         f"{m.rated_voltage / 1e3:.4g} kV")
    if abs(dev) > VOLTAGE_WARN:
        return [f"supply.nominal_voltage ({vn / 1e3:.4g} kV) differs from the machine's rated voltage "
                f"({m.rated_voltage / 1e3:.4g} kV) by {dev:+.0%}, beyond the ±10 % a machine runs at continuously "
                "(IEC 60034-1 zone B): check the file"]
    return []


def _validate_instruments(case: MachineCase) -> list[str]:
    ins, m = case.instruments, case.machine
    i_rated = machine_rated_current(m)
    for key in ("phase_ct", "differential_ct"):
        ct: Ratio | None = getattr(ins, key)
        error = None if ct is None else ct_primary_error(key, i_rated, ct)
        if error is not None:
            raise error
    v_ll = case.supply.nominal_voltage
    if ins.vt is not None:
        shares = (v_ll / ins.vt.primary, v_ll / math.sqrt(3.0) / ins.vt.primary)  # line-to-line, line-to-neutral
        if not any(VT_LOWEST_SHARE <= x <= VT_VOLTAGE_FACTOR for x in shares):
            raise InputError("instruments.vt",
                             f"expected a VT primary near the bus voltage {v_ll / 1e3:.4g} kV line to line "
                             f"({v_ll / math.sqrt(3.0) / 1e3:.4g} kV line to neutral), got "
                             f"{ins.vt.primary:g}/{ins.vt.secondary:g} V: at nominal voltage it would run at "
                             f"{min(shares, key=lambda x: abs(math.log(x))):.3g} times its rated primary (at most "
                             f"{VT_VOLTAGE_FACTOR:g}, IEC 61869-3 voltage factor)")
    v_ln = v_ll / math.sqrt(3.0)
    for key, ratio in (("instruments.neutral_vt", ins.neutral_vt),
                       ("grounding.transformer_ratio", case.grounding.transformer_ratio)):
        if ratio is not None and v_ln > NEUTRAL_VT_VOLTAGE_FACTOR * ratio.primary:
            raise InputError(key, f"expected a primary of at least {v_ln / NEUTRAL_VT_VOLTAGE_FACTOR:.4g} V: a "
                                  f"full earth fault puts the line-to-neutral {v_ln:.4g} V on it, "
                                  f"{v_ln / ratio.primary:.3g} times its {ratio.primary:g} V primary (at most "
                                  f"{NEUTRAL_VT_VOLTAGE_FACTOR:g}, IEC 61869-3 voltage factor), got "
                                  f"{ratio.primary:g}/{ratio.secondary:g} V")
    return []


def _validate_system(case: MachineCase) -> list[str]:
    """The system the machine is on: at least as large as the machine, stages below nominal frequency."""
    warnings = []
    m, s = case.machine, case.supply
    rating = machine_apparent_power(m)
    if s.system_rating is not None and s.system_rating < rating:
        raise InputError("supply.system_rating",
                         f"expected at least the machine's own rating {rating / 1e6:.4g} MVA (the system includes "
                         f"it), got {s.system_rating / 1e6:.4g} MVA")
    if isinstance(m, InductionMotor):
        # a source whose fault level is below the motor's own input cannot run it at all, let alone start it
        for key in ("fault_level", "minimum_fault_level"):
            level = getattr(s, key)
            if level is not None and level <= rating:
                raise InputError(f"supply.{key}",
                                 f"expected a fault level well above the motor's rated input {rating / 1e6:.4g} MVA "
                                 f"(a source that weak cannot run it), got {level / 1e6:.4g} MVA")
        if s.source_impedance is not None:
            z_base = m.rated_voltage ** 2 / rating
            if s.source_impedance >= z_base:
                raise InputError("supply.source_impedance",
                                 f"expected well below the motor's base impedance {z_base:.4g} ohm (a source that "
                                 f"weak cannot run it), got {s.source_impedance:.4g} ohm")
    fn = m.frequency
    for key in ("underfrequency_stages", "load_shedding_stages"):
        for i, stage in enumerate(getattr(s, key)):
            if stage.frequency >= fn:
                raise InputError(f"supply.{key}[{i}].frequency",
                                 f"expected an underfrequency stage below the nominal {fn:g} Hz, got "
                                 f"{stage.frequency:g} Hz")
            if stage.frequency < 0.9 * fn:
                warnings.append(f"supply.{key}[{i}].frequency {stage.frequency:g} Hz is more than 10 % below the "
                                f"nominal {fn:g} Hz, where turbines and auxiliaries are not made to run: check the "
                                "stage")
    return warnings


def _iso_date(key: str, text: str) -> None:
    """InputError unless ``text`` is empty or an ISO calendar date such as 2026-11-30."""
    import datetime
    import re

    if text and not (re.fullmatch(r"\d{4}-\d{2}-\d{2}", text) and _is_date(datetime, text)):
        raise InputError(key, f"expected an ISO date such as 2026-11-30, got {text!r}")


def _is_date(datetime, text: str) -> bool:
    try:
        datetime.date.fromisoformat(text)
    except ValueError:
        return False
    return True


def validate_sheet(s: SheetInfo) -> None:
    """The sheet's life: dates are ISO dates; each status after draft names who took the step and when.

    ``checked`` needs checked_by and checked_on; ``approved`` also approved_by and approved_on; ``issued`` needs
    the approver, the approval date and the revision date (the date the issued sheet carries).
    """
    for name in ("date", "checked_on", "approved_on"):
        _iso_date(f"sheet.{name}", getattr(s, name))
    for i, h in enumerate(s.history):
        _iso_date(f"sheet.history[{i}].date", h.date)
    step = SHEET_STATUSES.index(s.status) if s.status in SHEET_STATUSES else 0
    needs = []
    if step >= 1:
        needs += [("checked_by", "who checked it"), ("checked_on", "the date of the check")]
    if step >= 2:
        needs += [("approved_by", "the approving engineer"), ("approved_on", "the date of the approval")]
    if step >= 3:
        needs.append(("date", "the date of this revision"))
    for name, what in needs:
        if not str(getattr(s, name) or "").strip():
            raise InputError(f"sheet.{name}", f"a sheet with status = \"{s.status}\" needs {what}; got nothing")
    for by, on in (("checked_by", "checked_on"), ("approved_by", "approved_on")):
        if getattr(s, on) and not str(getattr(s, by) or "").strip():
            raise InputError(f"sheet.{by}", f"sheet.{on} is given, so expected the name of who did it, got nothing")
    if s.checked_on and s.approved_on and s.approved_on < s.checked_on:
        raise InputError("sheet.approved_on", f"expected on or after sheet.checked_on ({s.checked_on}), "
                                              f"got {s.approved_on}")


def _validate_motor(m: InductionMotor) -> list[str]:
    warnings = []
    computed = rated_current_from_output(m.rated_output, m.rated_voltage, m.efficiency, m.power_factor)
    if m.rated_current:
        error = motor_current_error(m.rated_output, m.rated_voltage, m.rated_current, computed)
        if error is not None:
            raise error
        dev = m.rated_current / computed - 1.0
        if abs(dev) > 0.10:
            warnings.append(
                f"machine.rated_current {m.rated_current:.4g} A differs by {dev:+.0%} from "
                f"{computed:.4g} A computed from output, voltage, efficiency and power factor"
            )
    i_rated = m.rated_current or computed
    if m.locked_rotor_current is None and m.locked_rotor_code is None:
        raise InputError(
            "machine.locked_rotor_current",
            "expected a locked-rotor current (A or pu) or machine.locked_rotor_code (NEMA letter), got neither",
        )
    if m.locked_rotor_current is not None and m.locked_rotor_current < 2.0 * i_rated:
        raise InputError(
            "machine.locked_rotor_current",
            f"expected at least 2 pu of rated current, got "
            f"{m.locked_rotor_current / i_rated:.3g} pu ({m.locked_rotor_current:.4g} A)",
        )
    if m.safe_stall_time_hot > m.safe_stall_time_cold:
        raise InputError(
            "machine.safe_stall_time_hot",
            f"expected at most the cold safe stall time "
            f"({m.safe_stall_time_cold:.4g} s), got {m.safe_stall_time_hot:.4g} s",
        )
    speed_error = motor_speed_error(m.frequency, m.rated_speed)
    if speed_error is not None:
        raise speed_error
    if m.breakdown_torque <= 1.0:
        raise InputError("machine.breakdown_torque", "expected more than 1 pu of rated torque")
    if m.starts_hot > m.starts_cold:
        warnings.append("machine.starts_hot is larger than machine.starts_cold: check the maker's data")
    if m.locked_rotor_torque >= m.breakdown_torque:
        warnings.append(f"machine.locked_rotor_torque ({m.locked_rotor_torque:g} pu) is not below the breakdown torque "
                        f"({m.breakdown_torque:g} pu): the study takes the largest torque at standstill")
    if m.pull_up_torque is not None and m.pull_up_torque > m.locked_rotor_torque + 1e-9:
        raise InputError("machine.pull_up_torque",
                         f"expected at most the locked-rotor torque ({m.locked_rotor_torque:g} pu; pull-up torque is "
                         f"the least torque from standstill to breakdown speed), got {m.pull_up_torque:g} pu")
    if m.speed_curve is not None:
        warnings += _validate_speed_curve(m, i_rated)
    _validate_thermal_limits(m, i_rated)
    return warnings


def _rising(values, key: str, what: str) -> None:
    for i in range(1, len(values)):
        if not values[i] > values[i - 1]:
            raise InputError(f"{key}[{i}]", f"expected {what}, got {values[i]:.4g} after {values[i - 1]:.4g}")


def _validate_speed_curve(m: InductionMotor, i_rated: float) -> list[str]:
    """The maker's speed curve: speeds rising from standstill below synchronous speed, one torque (and current)
    per speed, positive; warnings where it disagrees with the nameplate figures."""
    c, key = m.speed_curve, "machine.speed_curve"
    n = len(c.speed)
    if n < 3:
        raise InputError(f"{key}.speed", f"expected at least 3 points of the curve, got {n}")
    for name in ("torque", "current"):
        values = getattr(c, name)
        if values and len(values) != n:
            raise InputError(f"{key}.{name}", f"expected one value per speed ({n}), got {len(values)}")
        for i, v in enumerate(values):
            if not v > 0.0:
                raise InputError(f"{key}.{name}[{i}]", f"expected a positive value, got {v:g}")
    if c.speed[0] != 0.0:
        raise InputError(f"{key}.speed[0]", f"expected the first point at standstill (0 pu), got {c.speed[0]:g} pu")
    _rising(c.speed, f"{key}.speed", "speeds rising")
    if c.speed[-1] >= 1.0:
        raise InputError(f"{key}.speed[{n - 1}]", f"expected below synchronous speed (1 pu), got {c.speed[-1]:g} pu")
    warnings = []
    if abs(c.torque[0] / m.locked_rotor_torque - 1.0) > 0.05:
        warnings.append(f"machine.speed_curve.torque[0] ({c.torque[0]:g} pu) differs from machine.locked_rotor_torque "
                        f"({m.locked_rotor_torque:g} pu) by more than 5 %: the study starts on the curve")
    if c.current and m.locked_rotor_current is not None and abs(c.current[0] * i_rated / m.locked_rotor_current
                                                                 - 1.0) > 0.05:
        warnings.append(f"machine.speed_curve.current[0] ({c.current[0]:g} pu) differs from machine.locked_rotor_current "
                        f"({m.locked_rotor_current / i_rated:.3g} pu) by more than 5 %: the study starts on the curve")
    if abs(max(c.torque) / m.breakdown_torque - 1.0) > 0.05 and c.speed[-1] > 0.9:
        warnings.append(f"the highest torque of machine.speed_curve ({max(c.torque):g} pu) differs from "
                        f"machine.breakdown_torque ({m.breakdown_torque:g} pu) by more than 5 %")
    return warnings


def _validate_thermal_limits(m: InductionMotor, i_rated: float) -> None:
    """IEEE 620 curves: each falls with current (currents rising, times falling), currents above full load."""
    seen = set()
    for k, c in enumerate(m.thermal_limit):
        key = f"machine.thermal_limit[{k}]"
        which = (c.curve, c.state, round(c.voltage, 4) if c.curve == "accelerating" else None)
        if which in seen:
            raise InputError(key, f"expected one {c.state} {c.curve} curve" + (
                f" at {c.voltage:g} pu" if c.curve == "accelerating" else "") + ", got it twice")
        seen.add(which)
        _curve_points(c.points, f"{key}.points", i_rated, "full-load current", "FLC")


def _curve_points(points, key: str, floor: float, floor_name: str, floor_short: str) -> None:
    if not points:
        raise InputError(key, "expected at least one (current, time) pair")
    for i, (current, _) in enumerate(points):
        if not current > floor * (1.0 + 1e-9):
            raise InputError(f"{key}[{i}]", f"expected a current above the {floor_name} ({floor:.4g} A), got "
                                            f"{current:.4g} A ({current / floor:.3g} × {floor_short})")
    _rising([p[0] for p in points], key, "currents rising (one point per current)")
    for i in range(1, len(points)):
        if not points[i][1] < points[i - 1][1]:
            raise InputError(f"{key}[{i}]", f"expected a curve that falls with current: {points[i][1]:.4g} s at "
                                            f"{points[i][0]:.4g} A is not below {points[i - 1][1]:.4g} s at "
                                            f"{points[i - 1][0]:.4g} A")


def _validate_generator(g: SynchronousGenerator) -> list[str]:
    warnings = []
    if not g.xd_subtransient <= g.xd_transient <= g.xd:
        raise InputError(
            "machine.xd_transient",
            f"expected xd'' ≤ xd' ≤ xd, got {g.xd_subtransient:g} / {g.xd_transient:g} / {g.xd:g} pu",
        )
    poles = generator_poles(g.frequency, g.rated_speed)
    speed_error = generator_speed_error(g.frequency, g.rated_speed)
    if speed_error is not None:
        raise speed_error
    for name in ("capability", "uel"):
        rows = getattr(g, name)
        ps = [r.active_power for r in rows]
        if any(b <= a for a, b in zip(ps, ps[1:])):
            raise InputError(f"machine.{name}", "expected the rows in order of rising active power, each once, got "
                                                + " / ".join(f"{p:g}" for p in ps) + " pu")
    salient = g.rotor.startswith("salient")
    if salient and poles == 2:
        warnings.append("machine.rotor is salient but the speed gives a 2-pole machine: check the rotor type")
    bands = g.frequency_limits
    fn = g.frequency
    for i, b in enumerate(bands):
        if b.low >= b.high:
            raise InputError(
                f"machine.frequency_limits[{i}].low", f"expected below high ({b.high:g} Hz), got {b.low:g} Hz"
            )
        if b.low <= fn <= b.high and b.allowed < CONTINUOUS_ALLOWANCE:
            raise InputError(
                f"machine.frequency_limits[{i}]",
                f"expected a restricted band wholly below or wholly above the nominal {fn:g} Hz (the machine runs "
                f"there without limit), got {b.low:g} to {b.high:g} Hz allowed {b.allowed:g} s",
            )
    ordered = sorted(range(len(bands)), key=lambda i: bands[i].low)
    for i, j in zip(ordered, ordered[1:]):
        if bands[j].low < bands[i].high:
            raise InputError(
                f"machine.frequency_limits[{j}]",
                f"expected bands that do not overlap: {bands[j].low:g} to {bands[j].high:g} Hz overlaps "
                f"machine.frequency_limits[{i}] ({bands[i].low:g} to {bands[i].high:g} Hz); give each frequency "
                "one allowed time",
            )
    return warnings


def _validate_generator_system(case: MachineCase) -> list[str]:
    """A generator's system data: ride-through bands, and step-up transformer data that the connection ignores."""
    warnings = []
    s, g = case.supply, case.grounding
    for i, b in enumerate(s.ride_through):
        if b.low >= b.high:
            raise InputError(f"supply.ride_through[{i}].low", f"expected below high ({b.high:g} Hz), got {b.low:g} Hz")
    if s.connection == "bus":
        given = [k for k, v in (("supply.transformer_lv_voltage", s.transformer_lv_voltage),
                                ("supply.transformer_impedance", s.transformer_impedance),
                                ("supply.transformer_rating", s.transformer_rating),
                                ("grounding.transformer_capacitance", g.transformer_capacitance)) if v]
        if given:
            warnings.append(f"supply.connection is 'bus': {', '.join(given)} describe a unit step-up transformer and "
                            "are not used")
    return warnings
