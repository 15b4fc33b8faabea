"""The questions of ``relaywright new`` and ``relaywright revise``, as data, and the plain functions that walk them.

Each :class:`Question` names a machine-file key (``machine.rated_output``), asks for it in the words of a nameplate
or a single-line diagram, and says when it is asked (machine kind, grounding method, starter, prime mover, whether
the maker's data sheet is at hand), what a default is (from an earlier answer or a standard) and what leaving it
blank means. The kind of quantity, the unit shown and the range come from the model's ``FieldSpec``; every answer
goes through :func:`machines.files.parse_value`, so a refused answer reads exactly like a refused file value.

Nothing here prompts or prints: :mod:`wizard.ask` talks to the person, :mod:`wizard.session` runs the whole
interview. The answers are kept as a person writes them (``"1500 hp"``), in the shape of a machine file.
"""

from __future__ import annotations

import copy
import datetime as _dt
import math
import re
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any, Callable

from machines.errors import InputError
from machines.files import FORMAT, MACHINE_KINDS, parse_value, section_specs
from machines.frozen import frozen
from machines.model import (FieldSpec, HistoryEntry, ct_primary_error, field_specs, generator_poles,
                            generator_rated_current, generator_speed_error, motor_current_error, motor_speed_error,
                            rated_current_from_output)
from machines.units import (KINDS, convert, parse_date, parse_fault_level, parse_quantity, rise_note, same_unit,
                            written_unit)

MOTOR, GENERATOR = "induction-motor", "synchronous-generator"
KIND_SPEC = FieldSpec("choice", required=True, choices=tuple(MACHINE_KINDS))
GATE_SPEC = FieldSpec("boolean", default=False)

#: The sections in the order they are asked, with the title shown for each machine kind.
SECTIONS: tuple[tuple[str, str, str], ...] = (
    ("identification", "Identification", "Identification"),
    ("nameplate", "Nameplate and maker's data", "Nameplate and maker's data"),
    ("drive", "Driven load", "Prime mover"),
    ("supply", "Supply and starter", "Supply and step-up transformer"),
    ("grounding", "Grounding", "Grounding"),
    ("instruments", "Instrument transformers", "Instrument transformers"),
    ("study", "Curves and tables", "Curves and tables"),
)


def section_title(section: str, kind: str | None) -> str:
    """The heading of a section for this machine kind."""
    for sid, motor_title, gen_title in SECTIONS:
        if sid == section:
            return gen_title if kind == GENERATOR else motor_title
    raise KeyError(section)


# ---------------------------------------------------------------------------------------------------- answers


@dataclass
class Answers:
    """The answers so far: machine-file data as written, the flow's own yes/no answers, what has been asked.

    ``data`` has the shape of a machine file (``{"machine": {"rated_output": "1500 hp"}}``); ``flow`` holds
    answers that are not machine-file keys (``makers_data``); ``asked`` lists the keys answered (given or left
    blank), in order, so a resumed interview starts at the first question not yet answered.
    """

    data: dict = field(default_factory=dict)
    flow: dict = field(default_factory=dict)
    asked: list[str] = field(default_factory=list)

    @property
    def kind(self) -> str | None:
        kind = self.data.get("machine", {}).get("kind")
        return kind if kind in MACHINE_KINDS else None

    def get(self, key: str) -> Any:
        section, _, name = key.partition(".")
        if section == "flow":
            return self.flow.get(name)
        table = self.data.get(section)
        return table.get(name) if isinstance(table, dict) else None

    def has(self, key: str) -> bool:
        return self.get(key) not in (None, "", [])

    def set(self, key: str, value: Any) -> None:
        section, _, name = key.partition(".")
        if value is None:
            self.drop(key)
        elif section == "flow":
            self.flow[name] = value
        else:
            self.data.setdefault(section, {})[name] = value

    def drop(self, key: str) -> None:
        section, _, name = key.partition(".")
        (self.flow if section == "flow" else self.data.get(section, {})).pop(name, None)

    def mark(self, key: str) -> None:
        if key not in self.asked:
            self.asked.append(key)

    def unmark(self, key: str) -> None:
        if key in self.asked:
            self.asked.remove(key)

    def trial(self, key: str, value: Any) -> "Answers":
        """A copy of these answers with one answer changed (to run cross-checks before keeping it)."""
        other = Answers(data=copy.deepcopy(self.data), flow=dict(self.flow), asked=list(self.asked))
        other.set(key, value)
        return other

    def si(self, key: str) -> float | None:
        """The SI value of an earlier quantity answer, or None when it is missing or not readable."""
        raw = self.get(key)
        if raw in (None, "") or self.kind is None:
            return None
        try:
            s = spec_of(key, self.kind)
            i_rated = rated_current(self) if s.kind == "current_or_pu" else None
            value = parse_value(s, raw, key, rated_current=i_rated, default_unit=s.unit or None)
        except (InputError, KeyError):
            return None
        return value if isinstance(value, float) else None


@frozen
class Finding:
    """A cross-check on the answers so far: ``warn`` (the person may keep the answer) or ``error`` (must fix)."""

    level: str
    message: str


# ---------------------------------------------------------------------------------------------------- questions

Rule = Callable[[Answers], Any]


def _always(a: Answers) -> bool:
    return True


@frozen
class Question:
    """One question of the flow.

    key: machine-file key path (``flow.<name>`` for the flow's own yes/no questions).
    text: the question, in the words of a nameplate or a single-line diagram.
    label: short name in the review summary.
    section: id from :data:`SECTIONS`.
    help: one short line shown under the question.
    when: whether it is asked, from earlier answers.
    default: the answer Enter gives (as written, e.g. ``"186.2 A"``), from earlier answers or a standard.
    blank: for an optional question, what leaving it blank means (shown instead of a default).
    required: overrides the field's own ``required`` (e.g. locked-rotor current when there is no code letter).
    choices: (value, label) pairs for a choice, in the order shown.
    checks: cross-checks run once this answer is given.
    row_text: for a table, the question for each field of a row.
    after: keys this answer rests on; when one of them changes (at the review), this question is asked again.
    more: longer help, shown when the person types ``?`` (the field's meaning, forms and range are added to it).
    """

    key: str
    text: str
    label: str
    section: str
    help: str = ""
    when: Rule = _always
    default: Rule | None = None
    blank: Rule | None = None
    required: Rule | None = None
    choices: tuple[tuple[str, str], ...] = ()
    checks: tuple[Callable[[Answers], Finding | None], ...] = ()
    row_text: tuple[tuple[str, str], ...] = ()
    after: tuple[str, ...] = ()
    more: str = ""

    @property
    def name(self) -> str:
        return self.key.partition(".")[2]


@lru_cache(maxsize=None)
def _specs(kind: str) -> dict[str, dict[str, FieldSpec]]:
    return section_specs(kind)


def spec_of(key: str, kind: str | None) -> FieldSpec:
    """The field spec behind a key path for a machine kind (KeyError when the kind has no such key)."""
    if key == "machine.kind":
        return KIND_SPEC
    section, _, name = key.partition(".")
    if section == "flow":
        return GATE_SPEC
    if section == "revision":
        return field_specs(HistoryEntry)[name]
    return _specs(kind or MOTOR)[section][name]


# ---- conditions


def is_motor(a: Answers) -> bool:
    return a.kind == MOTOR


def is_generator(a: Answers) -> bool:
    return a.kind == GENERATOR


def makers_data(a: Answers) -> bool:
    return a.get("flow.makers_data") is True


def motor_curves(a: Answers) -> bool:
    return a.get("flow.motor_curves") is True


def default_motor_curves(a: Answers) -> str:
    """Yes when the answers already hold any of the maker's curves (a revision, an answers file)."""
    return "yes" if any(a.has(k) for k in MOTOR_CURVE_KEYS) else "no"


def not_revising(a: Answers) -> bool:
    """A revision is signed off afresh: who checks and approves it is not asked (``relaywright revise``)."""
    return not a.flow.get("revising")


def grounding_is(*methods: str) -> Rule:
    return lambda a: a.get("grounding.method") in methods


def both(*rules: Rule) -> Rule:
    return lambda a: all(r(a) for r in rules)


def unit_connected(a: Answers) -> bool:
    """A generator on its own step-up (unit) transformer."""
    return a.kind == GENERATOR and a.get("supply.connection") == "unit-transformer"


def blank_motoring_power(a: Answers) -> str:
    """What a blank motoring power means, in the words of the prime mover."""
    from machines.protection.generator_terms import prime_mover, with_article
    from machines.standards.generator_capability import MOTORING_POWER

    mover = a.get("machine.prime_mover")
    if mover not in MOTORING_POWER:
        return "the low end of the prime mover's range"
    return (f"{MOTORING_POWER[mover][0]:.1%} of rated power, the low end of the range for "
            f"{with_article(prime_mover(mover))}; measure it at commissioning")


# ---- defaults from earlier answers and standards


def today() -> str:
    return _dt.date.today().isoformat()


def _number(x: float) -> str:
    from reports.formatting import number

    return number(x)


def rated_current(a: Answers) -> float | None:
    """Motor full-load current [A]: the nameplate answer, else computed from output, voltage, η and cos φ."""
    if a.kind != MOTOR:
        return None
    raw = a.get("machine.rated_current")
    if raw not in (None, ""):
        try:
            return parse_value(spec_of("machine.rated_current", MOTOR), raw, "machine.rated_current",
                               default_unit="A")
        except InputError:
            pass
    return computed_rated_current(a)


def computed_rated_current(a: Answers) -> float | None:
    """I = P / (√3 · V · η · cos φ) from the answers, or None while any of them is missing."""
    values = [a.si(f"machine.{k}") for k in ("rated_output", "rated_voltage", "efficiency", "power_factor")]
    if any(v is None for v in values):
        return None
    return rated_current_from_output(*values)


def default_rated_current(a: Answers) -> str | None:
    i = computed_rated_current(a)
    return None if i is None else f"{_number(i)} A"


def code_letter_currents(a: Answers) -> tuple[float, float] | None:
    """Locked-rotor current range [A] that the NEMA MG 1 code letter allows, or None (no letter, no table)."""
    letter = a.get("machine.locked_rotor_code")
    output, voltage = a.si("machine.rated_output"), a.si("machine.rated_voltage")
    if not letter or output is None or voltage is None:
        return None
    try:
        from machines.standards.nema import locked_rotor_current_range
    except ImportError:  # the table is not in this copy yet
        return None
    try:
        return locked_rotor_current_range(str(letter), output, voltage)
    except ValueError:
        return None


def blank_locked_rotor_current(a: Answers) -> str | None:
    letter = a.get("machine.locked_rotor_code")
    if not letter:
        return None
    rng, i_r = code_letter_currents(a), rated_current(a)
    span = ""
    if rng and i_r:
        if math.isfinite(rng[1]):
            span = f": {_number(rng[0])} A to {_number(rng[1])} A ({rng[0] / i_r:.2f} to {rng[1] / i_r:.2f} pu)"
        else:
            span = f": {_number(rng[0])} A and up ({rng[0] / i_r:.2f} pu and up)"
    return f"taken from code letter {letter}{span}"


def default_practice(a: Answers) -> str | None:
    f = a.si("machine.frequency")
    # the machine file's own rule (machines.files.case_from_dict): IEC at 50 Hz, IEEE at 60 Hz
    return None if f is None else ("IEC" if f < 55.0 else "IEEE")


#: Rotor construction usually found behind each prime mover (turbines drive round-rotor machines; hydro
#: turbines and engines drive salient-pole machines with damper windings).
# common practice, no published source
ROTOR_BY_PRIME_MOVER = {"steam-turbine": "cylindrical-indirect", "gas-turbine": "cylindrical-indirect",
                        "hydro": "salient-with-damper", "reciprocating-engine": "salient-with-damper"}


def copy_of(key: str) -> Rule:
    return lambda a: a.get(key) if a.has(key) else None


def constant(value: str) -> Rule:
    return lambda a: value


# ---- cross-checks, as soon as the data allow


def check_rated_current(a: Answers) -> Finding | None:
    """Nameplate current against the one computed from output, voltage, efficiency and power factor."""
    given = a.si("machine.rated_current")
    computed = computed_rated_current(a)
    if given is None or computed is None:
        return None
    error = motor_current_error(a.si("machine.rated_output"), a.si("machine.rated_voltage"), given, computed)
    if error is not None:  # what the machine file reader refuses is refused here, by the same rule
        return Finding("error", str(error))
    dev = given / computed - 1.0
    # the machine file reader warns beyond the same ±10 % (machines.model.validate_case)
    if abs(dev) > 0.10:
        return Finding("warn", f"the full-load current {_number(given)} A is {dev:+.0%} off the "
                               f"{_number(computed)} A that output, voltage, efficiency and power factor give: "
                               "check the nameplate")
    return None


def check_stall_times(a: Answers) -> Finding | None:
    """A hot motor stalls safely for a shorter time than a cold one."""
    cold, hot = a.si("machine.safe_stall_time_cold"), a.si("machine.safe_stall_time_hot")
    if cold is None or hot is None:
        return None
    if hot > cold:
        return Finding("error", f"machine.safe_stall_time_hot: expected at most the cold safe stall time "
                                f"({_number(cold)} s), got {_number(hot)} s")
    return None


def check_code_letter(a: Answers) -> Finding | None:
    """Entered locked-rotor current against the range the code letter allows (NEMA MG 1 10.37.2)."""
    lrc, rng = a.si("machine.locked_rotor_current"), code_letter_currents(a)
    if lrc is None or rng is None:
        return None
    lo, hi = rng
    if lo * 0.99 <= lrc <= hi * 1.01:
        return None
    hi_text = f"{_number(hi)} A" if math.isfinite(hi) else "no upper limit"
    return Finding("warn", f"a locked-rotor current of {_number(lrc)} A lies outside code letter "
                           f"{a.get('machine.locked_rotor_code')} ({_number(lo)} A to {hi_text}): check the "
                           "letter and the maker's figure")


def check_reactances(a: Answers) -> Finding | None:
    """xd'' ≤ xd' ≤ xd, as every synchronous machine has them."""
    xd, xt, xs = (a.si(f"machine.{k}") for k in ("xd", "xd_transient", "xd_subtransient"))
    if None in (xd, xt, xs):
        return None
    if not xs <= xt <= xd:
        return Finding("error", f"machine.xd_transient: expected xd'' ≤ xd' ≤ xd, got {xs:g} / {xt:g} / {xd:g} pu")
    return None


def check_speed(a: Answers) -> Finding | None:
    """The speed against the frequency: the file reader's own rule (machines.model), as soon as both are given."""
    f, n = a.si("machine.frequency"), a.si("machine.rated_speed")
    if f is None or n is None:
        return None
    error = motor_speed_error(f, n) if is_motor(a) else generator_speed_error(f, n)
    return None if error is None else Finding("error", str(error))


def check_locked_rotor_multiple(a: Answers) -> Finding | None:
    """A locked-rotor current below 2 pu is refused by the file reader (machines.model.validate_case)."""
    lrc, i_r = a.si("machine.locked_rotor_current"), rated_current(a)
    if lrc is None or not i_r or lrc >= 2.0 * i_r:
        return None
    return Finding("error", f"machine.locked_rotor_current: expected at least 2 pu of rated current, got "
                            f"{lrc / i_r:.3g} pu ({_number(lrc)} A)")


def check_breakdown_torque(a: Answers) -> Finding | None:
    """A motor pulls out above its rated torque (the file reader's rule)."""
    bd = a.si("machine.breakdown_torque")
    if bd is None or bd > 1.0:
        return None
    return Finding("error", "machine.breakdown_torque: expected more than 1 pu of rated torque")


def check_starts(a: Answers) -> Finding | None:
    """More starts from hot than from cold is a misread data sheet (the file reader warns the same)."""
    cold, hot = a.get("machine.starts_cold"), a.get("machine.starts_hot")
    if not isinstance(cold, int) or not isinstance(hot, int) or hot <= cold:
        return None
    return Finding("warn", f"{hot} starts from hot but {cold} from cold: the maker allows fewer starts from hot; "
                           "check the data sheet")


def check_fault_levels(a: Answers) -> Finding | None:
    """The weakest source cannot give a higher fault level than the strongest."""
    hi, lo = a.si("supply.fault_level"), a.si("supply.minimum_fault_level")
    if hi is None or lo is None or lo <= hi:
        return None
    return Finding("error", f"supply.minimum_fault_level: expected at most the maximum fault level "
                            f"({_number(hi / 1e6)} MVA), got {_number(lo / 1e6)} MVA")


def check_bus_voltage(a: Answers) -> Finding | None:
    """The bus voltage against the machine's rated voltage (the file reader warns beyond the same 15 %)."""
    bus, rated = a.si("supply.nominal_voltage"), a.si("machine.rated_voltage")
    if bus is None or rated is None or abs(bus - rated) <= 0.15 * rated:
        return None
    return Finding("warn", f"the bus voltage {_number(bus / 1e3)} kV differs from the machine's rated voltage "
                           f"{_number(rated / 1e3)} kV by more than 15 %: check both (is there a transformer "
                           "between them?)")


def check_phase_ct(a: Answers) -> Finding | None:
    """The phase CT primary against the full-load current, with the study's own limits (machines.protection)."""
    from machines.protection.ct_check import RATIO_HIGH, RATIO_LOW

    raw = a.get("instruments.phase_ct")
    if raw in (None, ""):
        return None
    try:
        ct = parse_value(spec_of("instruments.phase_ct", a.kind), raw, "instruments.phase_ct")
    except InputError:
        return None
    if is_motor(a):
        flc = rated_current(a)
    else:
        s_rated, v_rated = a.si("machine.rated_apparent_power"), a.si("machine.rated_voltage")
        flc = None if s_rated is None or v_rated is None else generator_rated_current(s_rated, v_rated)
    if not flc:
        return None
    error = ct_primary_error("phase_ct", flc, ct)
    if error is not None:  # what the machine file reader refuses is refused here, by the same rule
        return Finding("error", str(error))
    share = flc / ct.primary
    ratio = f"{_number(ct.primary)}/{_number(ct.secondary)} A"
    if share > RATIO_HIGH:
        return Finding("warn", f"the full-load current {_number(flc)} A is {share:.0%} of the {ratio} CT's primary: "
                               "the CT runs above its rating at full load (it needs a continuous thermal rating "
                               "factor above 1); a larger primary is usual")
    if share < RATIO_LOW and is_motor(a):
        return Finding("warn", f"the full-load current {_number(flc)} A is only {share:.0%} of the {ratio} CT's "
                               f"primary: the overload measurement is coarse (the study warns below "
                               f"{RATIO_LOW:.0%}); a smaller primary suits the motor better")
    return None


def check_salient_two_pole(a: Answers) -> Finding | None:
    """Salient poles on a 2-pole machine are not built (the file reader warns the same)."""
    rotor, f, n = a.get("machine.rotor"), a.si("machine.frequency"), a.si("machine.rated_speed")
    if not isinstance(rotor, str) or not rotor.startswith("salient") or f is None or n is None:
        return None
    if generator_poles(f, n) != 2:
        return None
    return Finding("warn", "a salient-pole rotor, but the speed gives a 2-pole machine: check the rotor type")


@frozen
class CrossCheck:
    """A check across answers, run as soon as the last of the keys it reads is given.

    reads: the keys it reads; the last one asked is the answer it belongs to (its error refuses that answer).
    When an earlier key of ``reads`` is changed later (at the review), the check runs again and warns.
    """

    reads: tuple[str, ...]
    run: Callable[[Answers], Finding | None]


#: Checks of an answer against everything given before it, by the keys they read. Kept apart from the questions so
#: a question's declaration stays its own; a check reads answers, whichever question gave them.
CROSS_CHECKS: tuple[CrossCheck, ...] = (
    CrossCheck(("machine.frequency", "machine.rated_speed"), check_speed),
    CrossCheck(("machine.rated_output", "machine.rated_voltage", "machine.power_factor", "machine.efficiency",
                "machine.rated_current", "machine.locked_rotor_current"), check_locked_rotor_multiple),
    CrossCheck(("machine.breakdown_torque",), check_breakdown_torque),
    CrossCheck(("machine.starts_cold", "machine.starts_hot"), check_starts),
    CrossCheck(("supply.fault_level", "supply.minimum_fault_level"), check_fault_levels),
    CrossCheck(("machine.rated_voltage", "supply.nominal_voltage"), check_bus_voltage),
    CrossCheck(("machine.rated_output", "machine.rated_voltage", "machine.power_factor", "machine.efficiency",
                "machine.rated_current", "machine.rated_apparent_power", "instruments.phase_ct"), check_phase_ct),
    CrossCheck(("machine.frequency", "machine.rated_speed", "machine.rotor"), check_salient_two_pole),
)


# ---- forms people write, by key: read into the form the machine file keeps, with a word on how it was read

Form = Callable[[Answers, Any, str], "tuple[Any, str] | None"]


def form_iso_date(a: Answers, raw: Any, key: str) -> tuple[Any, str] | None:
    """Dates only year-month-day: '02/12/2026' reads two ways and is refused."""
    return parse_date(raw, key), ""


def form_fault_level(a: Answers, raw: Any, key: str) -> tuple[Any, str] | None:
    """A fault level given as the fault current, at the bus voltage given just before (IEC 60909-0: S = √3·U·I)."""
    if not isinstance(raw, str) or not written_unit(raw).endswith("A") or written_unit(raw).endswith("VA"):
        return None
    level, note = parse_fault_level(raw, a.si("supply.nominal_voltage"), key=key)
    return (f"{_number(level / 1e6)} MVA", note) if note else None


def form_share_of_rating(a: Answers, raw: Any, key: str) -> tuple[Any, str] | None:
    """A generator's motoring power as a share of its rated active power (S × cos φ), e.g. '15 %'."""
    if not isinstance(raw, str) or written_unit(raw) not in ("%", "pu", "p.u.", "percent"):
        return None
    share = parse_quantity(raw, "per_unit", key=key)
    s_rated, pf = a.si("machine.rated_apparent_power"), a.si("machine.power_factor")
    if s_rated is None or pf is None:
        raise InputError(key, f"{raw.strip()!r} is a share of the rating, and the rated output and power factor are "
                              "not known yet; give kW such as '150 kW'")
    p_rated = s_rated * pf
    kw = share * p_rated / 1e3
    return f"{_number(kw)} kW", (f"{raw.strip()} of the rated {_number(p_rated / 1e3)} kW "
                                 f"({_number(s_rated / 1e3)} kVA × {_number(pf)}) = {_number(kw)} kW")


def form_temperature_rise(a: Answers, raw: Any, key: str) -> tuple[Any, str] | None:
    """A rise written in degrees Celsius ('80 °C', '80 C') is the same rise in kelvin; the file keeps kelvin."""
    note = rise_note(raw)
    if not note:
        return None
    return f"{_number(parse_quantity(raw, 'temperature_rise', key=key))} K", note


FORMS: dict[str, Form] = {
    "sheet.date": form_iso_date,
    "supply.fault_level": form_fault_level,
    "supply.minimum_fault_level": form_fault_level,
    "machine.motoring_power": form_share_of_rating,
    "machine.temperature_rise": form_temperature_rise,
}

#: What the ``?`` help adds for a key read in another form too.
FORM_HELP = {
    "sheet.date": "Dates are written year-month-day, e.g. 2026-11-20 (02/12/2026 reads two ways and is refused).",
    "supply.fault_level": "A fault current such as 25 kA is taken at the bus voltage given before (S = √3·U·I).",
    "supply.minimum_fault_level": "A fault current such as 18 kA is taken at the bus voltage given before.",
    "machine.motoring_power": "A share such as 15 % is of the rated active power (rated kVA × power factor).",
    "machine.temperature_rise": "A rise in degrees Celsius (80 °C, 80 C) is the same rise in kelvin (80 K).",
}


# ---- the questions

_MAKER = "maker's data sheet"
_STOP_HINT = "if you do not have it, press Ctrl-C: your answers are kept for 'relaywright new --resume'"


#: The maker's optional data a "data sheet at hand?" answer of yes opens.
MOTOR_MAKER_KEYS = ("machine.locked_rotor_current", "machine.starts_cold", "machine.starts_hot",
                    "machine.heating_time_constant", "machine.cooling_time_constant", "machine.pull_up_torque",
                    "machine.speed_curve", "machine.thermal_limit")
#: The maker's curves a "curves on the data sheet?" answer of yes opens (one key skips them all).
MOTOR_CURVE_KEYS = ("machine.pull_up_torque", "machine.speed_curve", "machine.thermal_limit")
GENERATOR_MAKER_KEYS = ("machine.x2", "machine.negative_sequence_continuous", "machine.negative_sequence_k",
                        "machine.stator_capacitance", "machine.third_harmonic_neutral_min",
                        "machine.inertia_constant", "machine.frequency_limits")


def default_makers_data(a: Answers) -> str:
    """Yes when the answers already hold any of the maker's optional data (a revision, an answers file)."""
    keys = MOTOR_MAKER_KEYS if is_motor(a) else GENERATOR_MAKER_KEYS
    return "yes" if any(a.has(k) for k in keys) else "no"


M, G = is_motor, is_generator

QUESTIONS: tuple[Question, ...] = (
    # identification
    Question("machine.kind", "What are you setting protection for?", "Machine", "identification",
             choices=((MOTOR, "an induction motor"), (GENERATOR, "a synchronous generator"))),
    Question("sheet.tag", "Plant tag of the machine, as on the single-line diagram", "Tag", "identification",
             help="e.g. CW-P-201; it heads the sheet and names the files"),
    Question("sheet.description", "What is it, in a few words?", "Description", "identification",
             help="e.g. 'Chilled-water pump 1, north hall'"),
    Question("sheet.site", "Site or plant", "Site", "identification"),
    Question("sheet.prepared_by", "Your name (prepared by)", "Prepared by", "identification"),
    Question("sheet.checked_by", "Who will check these settings?", "Checked by", "identification",
             blank=constant("left for the sign-off block"), when=not_revising),
    Question("sheet.approved_by", "Who will approve them?", "Approved by", "identification",
             blank=constant("left for the sign-off block"), when=not_revising),
    Question("sheet.date", "Date of this issue", "Date", "identification", default=lambda a: today(),
             help="year-month-day"),
    Question("sheet.page_size", "Paper size of the sheet", "Paper", "identification",
             choices=(("A4", "A4"), ("letter", "US letter"))),

    # nameplate: motor
    Question("machine.rated_output", "Rated output (shaft power)", "Rated output", "nameplate", when=M,
             help="kW or hp as on the nameplate, e.g. 1500 hp or 1120 kW"),
    Question("machine.rated_apparent_power", "Rated output (apparent power)", "Rated output", "nameplate",
             when=G, help="e.g. 12.5 MVA or 3125 kVA"),
    Question("machine.rated_voltage", "Rated voltage, line to line", "Rated voltage", "nameplate",
             help="e.g. 4.16 kV or 6600 V"),
    Question("machine.frequency", "Rated frequency", "Frequency", "nameplate", help="50 Hz or 60 Hz"),
    Question("machine.rated_speed", "Full-load speed", "Full-load speed", "nameplate", when=M,
             help="rpm on the nameplate, e.g. 1788 rpm"),
    Question("machine.rated_speed", "Rated speed", "Rated speed", "nameplate", when=G,
             help="the synchronous speed, e.g. 1500 rpm for a 4-pole machine at 50 Hz"),
    Question("machine.power_factor", "Rated power factor (cos φ)", "Power factor", "nameplate",
             help="e.g. 0.89 or 89 %"),
    Question("machine.efficiency", "Efficiency at full load", "Efficiency", "nameplate", when=M,
             help="e.g. 0.958 or 95.8 %"),
    Question("machine.rated_current", "Full-load current (FLA)", "Full-load current", "nameplate", when=M,
             default=default_rated_current, checks=(check_rated_current,),
             help="amperes on the nameplate (the value offered is computed from output, voltage, efficiency and "
                  "power factor)",
             after=("machine.rated_output", "machine.rated_voltage", "machine.efficiency", "machine.power_factor")),
    Question("machine.service_factor", "Service factor", "Service factor", "nameplate", when=M,
             help="S.F. on the nameplate; 1.0 where none is marked"),
    Question("machine.insulation_class", "Insulation class", "Insulation class", "nameplate", when=M,
             choices=(("A", "A"), ("B", "B"), ("F", "F"), ("H", "H"))),
    Question("machine.temperature_rise", "Rated temperature rise", "Temperature rise", "nameplate", when=M,
             help="e.g. 80 K (by resistance)", blank=constant("not marked")),
    Question("machine.locked_rotor_code", "NEMA code letter", "Code letter", "nameplate", when=M,
             help="'CODE' on the nameplate: kVA per hp with the rotor locked", blank=constant("none marked")),
    Question("flow.makers_data", "Is the maker's data sheet at hand (starting current, time constants, "
             "starts)?", "Maker's data sheet at hand", "nameplate", when=M,
             default=default_makers_data),
    Question("machine.locked_rotor_current", "Locked-rotor (starting) current at full voltage", "Locked-rotor "
             "current", "nameplate", when=both(M, lambda a: makers_data(a) or not a.has("machine.locked_rotor_code")),
             required=lambda a: not a.has("machine.locked_rotor_code"), blank=blank_locked_rotor_current,
             checks=(check_code_letter,), help="pu of full-load current or amperes, e.g. 6.2 pu or 1150 A",
             after=("machine.locked_rotor_code",)),
    Question("machine.locked_rotor_torque", "Locked-rotor (starting) torque", "Locked-rotor torque", "nameplate",
             when=M, help=f"pu of full-load torque, e.g. 0.8 pu or 80 %; from the {_MAKER}; {_STOP_HINT}"),
    Question("machine.breakdown_torque", "Breakdown (pull-out) torque", "Breakdown torque", "nameplate", when=M,
             help="pu of full-load torque, e.g. 2.2 pu"),
    Question("machine.safe_stall_time_cold", "Safe stall time with the motor cold", "Safe stall time, cold",
             "nameplate", when=M, help="seconds the rotor may stay locked at full voltage, from cold"),
    Question("machine.safe_stall_time_hot", "Safe stall time with the motor hot", "Safe stall time, hot",
             "nameplate", when=M, checks=(check_stall_times,), help="the same from running temperature; shorter",
             after=("machine.safe_stall_time_cold",)),
    Question("machine.rotor_inertia", "Rotor inertia", "Rotor inertia", "nameplate", when=M,
             help="J in kg*m^2, or WK² in lb*ft^2"),
    Question("machine.starts_cold", "Starts allowed in succession from cold", "Starts from cold", "nameplate",
             when=both(M, makers_data)),
    Question("machine.starts_hot", "Starts allowed from hot", "Starts from hot", "nameplate",
             when=both(M, makers_data)),
    Question("machine.heating_time_constant", "Heating time constant, running", "Heating time constant",
             "nameplate", when=both(M, makers_data), blank=constant("not known")),
    Question("machine.cooling_time_constant", "Cooling time constant, standing still", "Cooling time constant",
             "nameplate", when=both(M, makers_data), blank=constant("not known")),
    Question("flow.motor_curves", "Does the data sheet give the torque–speed curve, the pull-up torque or thermal-limit "
             "curves?", "Maker's curves at hand", "nameplate", when=both(M, makers_data),
             default=default_motor_curves, help="no skips them; the study then assumes a curve and says so"),
    Question("machine.pull_up_torque", "Pull-up torque (least torque while accelerating)", "Pull-up torque",
             "nameplate", when=both(M, motor_curves), help="pu of full-load torque, e.g. 0.7 pu",
             blank=constant("not given: 0.85–1.0 × the locked-rotor torque is assumed")),
    Question("machine.speed_curve", "Torque- and current-speed curve at rated voltage", "Speed curve", "nameplate",
             when=both(M, motor_curves),
             help="one line, pu: speed: 0 0.2 0.4 …; torque: 0.8 0.76 …; current: 6.2 6.1 … (speeds rising from 0)",
             blank=constant("not given: a double-cage equivalent circuit is fitted to the data sheet")),
    Question("machine.thermal_limit", "Does the data sheet give IEEE 620 thermal-limit curves?", "Thermal-limit "
             "curves", "nameplate", when=both(M, motor_curves),
             row_text=(("curve", "curve {n}: running, accelerating or locked-rotor"),
                       ("state", "curve {n}: from hot or cold"),
                       ("voltage", "curve {n}: voltage it is drawn for (1.0 pu unless accelerating)"),
                       ("points", "curve {n}: points, e.g. 2 pu 330 s, 3 pu 110 s"))),

    # nameplate: generator
    Question("flow.makers_data", "Is the maker's data sheet at hand (negative-sequence capability, "
             "capacitance, frequency limits)?", "Maker's data sheet at hand", "nameplate", when=G,
             default=default_makers_data),
    Question("machine.xd", "Synchronous reactance xd (unsaturated)", "xd", "nameplate", when=G,
             help="pu on the machine's own rating, e.g. 1.8 pu; from the maker's data or test report"),
    Question("machine.xd_transient", "Transient reactance xd'", "xd'", "nameplate", when=G, help="e.g. 0.25 pu"),
    Question("machine.xd_subtransient", "Subtransient reactance xd''", "xd''", "nameplate", when=G,
             checks=(check_reactances,), help="e.g. 0.15 pu",
             after=("machine.xd", "machine.xd_transient")),
    Question("machine.x2", "Negative-sequence reactance x2", "x2", "nameplate", when=both(G, makers_data),
             blank=constant("not known")),
    Question("machine.negative_sequence_continuous", "Continuous negative-sequence current the maker allows",
             "Continuous I2", "nameplate", when=both(G, makers_data), help="pu of rated current, e.g. 0.08 pu",
             blank=constant("from the standard's table for the rotor type")),
    Question("machine.negative_sequence_k", "Negative-sequence capability K = I2²t", "I2²t (K)", "nameplate",
             when=both(G, makers_data), help="seconds, e.g. 10 s",
             blank=constant("from the standard's table for the rotor type")),
    Question("machine.stator_capacitance", "Stator winding capacitance, per phase to ground", "Stator capacitance",
             "nameplate", when=both(G, makers_data), help="e.g. 0.25 uF", blank=constant("not known")),
    Question("machine.third_harmonic_neutral_min", "Lowest third-harmonic voltage measured at the neutral",
             "3rd-harmonic neutral voltage", "nameplate", when=both(G, makers_data),
             help="primary volts, from commissioning records",
             blank=constant("not measured: the 27TN function is left out")),
    Question("machine.inertia_constant", "Inertia constant H", "Inertia constant H", "nameplate",
             when=both(G, makers_data), help="seconds on the machine's rating", blank=constant("not known")),
    Question("machine.vhz_limit", "Overexcitation limit of the generator", "V/Hz limit", "nameplate", when=G,
             help="pu volts per hertz it stands continuously"),
    Question("machine.excitation", "How is the field supplied?", "Exciter", "nameplate", when=G,
             choices=(("static", "a static exciter fed from the terminals, through slip rings"),
                      ("brushless", "a brushless exciter (rotating diodes, no slip rings)"),
                      ("rotating-dc", "a rotating DC exciter (commutator)")),
             help="a static exciter cannot sustain the fault current; slip rings allow field-ground protection",
             required=lambda a: True),
    Question("machine.capability", "Does the maker's capability curve give the underexcited (leading) limit?",
             "Capability curve, underexcited side", "nameplate", when=both(G, makers_data),
             row_text=(("active_power", "active power of point {n}, pu of rated MVA"),
                       ("reactive_absorbed", "reactive power absorbed at point {n}, pu of rated MVA"))),
    Question("machine.uel", "Is the voltage regulator's under-excitation limiter setting known?",
             "Under-excitation limiter", "nameplate", when=both(G, makers_data),
             row_text=(("active_power", "active power of point {n}, pu of rated MVA"),
                       ("reactive_absorbed", "reactive power absorbed at point {n}, pu of rated MVA"))),
    Question("machine.frequency_limits", "Does the maker give off-frequency limits (bands with allowed time)?",
             "Off-frequency limits", "nameplate", when=both(G, makers_data),
             row_text=(("low", "lowest frequency of band {n}"), ("high", "highest frequency of band {n}"),
                       ("allowed", "accumulated time allowed in band {n}"))),

    # driven load / prime mover
    Question("load.inertia", "Inertia of the driven load, referred to the motor shaft", "Load inertia", "drive",
             when=M, help="J in kg*m^2 or WK² in lb*ft^2; through a gearbox multiply by (load rpm / motor rpm)²"),
    Question("load.torque_profile", "How does the load torque rise with speed?", "Load torque profile", "drive",
             when=M, choices=(("quadratic", "with the square of speed (fans, centrifugal pumps and compressors)"),
                              ("constant", "stays the same (conveyors, positive-displacement pumps, crushers)"),
                              ("linear", "in proportion to speed"))),
    Question("load.torque_at_rated_speed", "Load torque at full speed", "Load torque at full speed", "drive",
             when=M, help="pu of the motor's full-load torque"),
    Question("load.breakaway_torque", "Torque needed to break the load away from standstill", "Breakaway torque",
             "drive", when=M, help="pu of the motor's full-load torque"),
    Question("load.minimum_load", "Lowest normal running current", "Lowest running current", "drive", when=M,
             help="pu of full-load current", blank=constant("not known")),
    Question("machine.prime_mover", "What drives the generator?", "Prime mover", "drive", when=G,
             choices=(("steam-turbine", "a steam turbine"), ("gas-turbine", "a gas turbine"),
                      ("hydro", "a water turbine"), ("reciprocating-engine", "a diesel or gas engine"))),
    Question("machine.rotor", "Rotor construction", "Rotor", "drive", when=G,
             default=lambda a: ROTOR_BY_PRIME_MOVER.get(a.get("machine.prime_mover")),
             choices=(("cylindrical-indirect", "round rotor, indirectly cooled"),
                      ("cylindrical-direct", "round rotor, directly cooled"),
                      ("salient-with-damper", "salient poles with damper winding"),
                      ("salient-without-damper", "salient poles without damper winding")),
             after=("machine.prime_mover",)),
    Question("machine.motoring_power", "Power the generator draws when it motors (its prime mover shut down)",
             "Motoring power", "drive", when=G, help="kW, from the maker or a commissioning test",
             blank=blank_motoring_power, after=("machine.prime_mover",)),

    # supply and starter
    Question("supply.nominal_voltage", "Nominal voltage of the bus it is connected to", "Bus voltage", "supply",
             default=copy_of("machine.rated_voltage"), help="from the single-line diagram",
             after=("machine.rated_voltage",)),
    Question("supply.connection", "How is the generator connected to the system?", "Connection", "supply",
             when=G, required=lambda a: True,
             choices=(("unit-transformer", "through its own step-up (unit) transformer"),
                      ("bus", "directly to a bus shared with other machines or feeders"))),
    Question("supply.fault_level", "Three-phase fault level at that bus, maximum", "Fault level, maximum",
             "supply", when=M, help="MVA from the single-line diagram or the fault study",
             blank=constant("not known: the source impedance is asked next")),
    Question("supply.fault_level", "Three-phase fault level the system brings to the generator's terminals, "
             "maximum", "Fault level, maximum", "supply", when=G,
             help="MVA, this generator left out; through the step-up transformer where there is one",
             blank=constant("not known: the source impedance is asked next")),
    Question("supply.minimum_fault_level", "Fault level at that bus with the weakest source", "Fault level, "
             "minimum", "supply", when=lambda a: a.has("supply.fault_level"), blank=constant("same as maximum")),
    Question("supply.source_impedance", "Source impedance seen from the bus", "Source impedance", "supply",
             when=lambda a: not a.has("supply.fault_level"), help="ohm, positive sequence",
             blank=constant("not known")),
    Question("supply.x_over_r", "X/R ratio at the bus", "X/R", "supply"),
    Question("supply.minimum_starting_voltage", "Lowest bus voltage at which the motor must still start",
             "Lowest starting voltage", "supply", when=M, help="pu of nominal, e.g. 0.85 pu",
             blank=constant("the study assumes 0.85 pu, the usual specification, or less where the weakest "
                            "source gives less")),
    Question("supply.voltage_before_start", "Bus voltage just before a start", "Voltage before a start", "supply",
             when=lambda a: is_motor(a) and (a.has("supply.fault_level") or a.has("supply.source_impedance")),
             help="pu of nominal, e.g. 0.95 pu; with the minimum fault level it gives the starting voltage"),
    Question("supply.starter", "What switches the motor?", "Starter", "supply", when=M,
             choices=(("breaker", "a circuit breaker"), ("fused-contactor", "a contactor with power fuses"))),
    Question("supply.contactor_breaking_current", "Rated breaking current of the contactor", "Contactor breaking "
             "current", "supply", when=lambda a: is_motor(a) and a.get("supply.starter") == "fused-contactor",
             help="kA, from the contactor's nameplate", blank=constant("not known")),
    Question("supply.fuse_rating", "Rated current of the power fuses", "Fuse rating", "supply",
             when=lambda a: is_motor(a) and a.get("supply.starter") == "fused-contactor", blank=constant("not known")),
    Question("supply.fuse", "The power fuse's minimum melting curve", "Fuse melting curve", "supply",
             when=lambda a: is_motor(a) and a.get("supply.starter") == "fused-contactor",
             help="one line: rating: 160 A; points: 480 A 100 s, 800 A 10 s, 2400 A 0.2 s (from the fuse maker)",
             blank=constant("not known: the fuse is not checked against the start")),
    Question("supply.underfrequency_stages", "Is this motor tripped by under-frequency load shedding?",
             "Load-shedding stages", "supply", when=M,
             row_text=(("frequency", "frequency of stage {n}"), ("time_delay", "time delay of stage {n}"))),
    Question("supply.transformer_lv_voltage", "Low-voltage rating of the step-up transformer",
             "Step-up transformer LV", "supply", when=unit_connected,
             blank=constant("the generator's rated voltage (a finding says so)"), after=("supply.connection",)),
    Question("supply.transformer_vhz_limit", "Overexcitation limit of the step-up transformer", "Transformer "
             "V/Hz limit", "supply", when=lambda a: unit_connected(a) and a.has("supply.transformer_lv_voltage"),
             help="pu volts per hertz"),
    Question("supply.transformer_impedance", "Impedance of the step-up transformer", "Transformer impedance",
             "supply", when=unit_connected, help="on its own rating, e.g. 8 % or 0.08 pu",
             blank=constant("not known: the 21 reach and the 51V reach are judged without it"),
             after=("supply.connection",)),
    Question("supply.transformer_rating", "Rating of the step-up transformer", "Transformer rating", "supply",
             when=lambda a: unit_connected(a) and a.has("supply.transformer_impedance"), help="MVA",
             blank=constant("the generator's rating")),
    Question("supply.load_shedding_stages", "Does the plant shed load on under-frequency?", "Plant load-shedding "
             "stages", "supply", when=G,
             row_text=(("frequency", "frequency of stage {n}"), ("time_delay", "time delay of stage {n}"))),
    Question("supply.ride_through", "Does the grid code require the unit to ride through off-nominal frequency "
             "(bands with a minimum time)?", "Frequency ride-through", "supply", when=G,
             row_text=(("low", "lowest frequency of band {n}"), ("high", "highest frequency of band {n}"),
                       ("minimum_time", "time the unit must stay connected in band {n} (1e8 s: continuously)"))),
    Question("supply.system_rating", "If the plant can run islanded: total rating of the islanded system",
             "Islanded system rating", "supply", when=G, blank=constant("never islanded")),
    Question("supply.system_inertia", "Inertia constant H of the islanded system", "Islanded system H", "supply",
             when=lambda a: is_generator(a) and a.has("supply.system_rating"), blank=constant("not known")),

    # grounding
    Question("grounding.method", "How is the system neutral grounded?", "Grounding", "grounding",
             choices=(("solid", "solidly"), ("low-resistance", "through a low resistance (hundreds of amperes)"),
                      ("high-resistance", "through a high resistance (a few amperes)"),
                      ("ungrounded", "not at all (isolated neutral)"),
                      ("distribution-transformer", "through a distribution transformer with a resistor on its "
                                                   "secondary"))),
    Question("grounding.fault_current_limit", "Earth-fault current the grounding lets through",
             "Earth-fault current", "grounding",
             when=grounding_is("low-resistance", "high-resistance", "distribution-transformer"),
             help="amperes, the resistor's let-through current", blank=constant("not known"),
             after=("grounding.method",)),
    Question("grounding.transformer_ratio", "Ratio of the grounding transformer", "Grounding transformer",
             "grounding", when=grounding_is("distribution-transformer"), help="e.g. 13800/240 V",
             blank=constant("not known")),
    Question("grounding.resistor", "Grounding resistor as installed", "Grounding resistor", "grounding",
             when=grounding_is("high-resistance", "distribution-transformer"),
             help="ohm; on the transformer's secondary where there is one", blank=constant("to be sized"),
             after=("grounding.method",)),
    Question("grounding.surge_capacitance", "Surge capacitors at the generator terminals, per phase to ground",
             "Surge capacitors", "grounding",
             when=both(G, grounding_is("ungrounded", "high-resistance", "distribution-transformer")),
             help="e.g. 0.25 uF; 0 uF when none are fitted", blank=constant("not known: the resistor is sized on "
                                                                             "part of the capacitance")),
    Question("grounding.bus_capacitance", "Capacitance of the generator's bus or cables, per phase to ground",
             "Bus capacitance", "grounding",
             when=both(G, grounding_is("ungrounded", "high-resistance", "distribution-transformer")),
             help="isolated-phase bus or cables to the breaker or transformer, e.g. 0.02 uF",
             blank=constant("not known")),
    Question("grounding.transformer_capacitance", "Capacitance of the step-up transformer's LV winding, per "
             "phase to ground", "Transformer capacitance", "grounding",
             when=both(unit_connected, grounding_is("ungrounded", "high-resistance", "distribution-transformer")),
             help="e.g. 0.005 uF", blank=constant("not known")),
    Question("grounding.system_capacitance", "Capacitance of the rest of the connected system, per phase to "
             "ground", "System capacitance", "grounding",
             when=both(lambda a: not unit_connected(a),
                       grounding_is("ungrounded", "high-resistance", "distribution-transformer")),
             help="e.g. 0.5 uF", blank=constant("not known")),
    Question("grounding.circuit_capacitance", "Capacitance of this machine's own cable and winding, per phase to "
             "ground", "Circuit capacitance", "grounding",
             when=both(M, lambda a: a.get("grounding.method") != "solid"),
             help="e.g. 0.12 uF", blank=constant("not known")),

    # instrument transformers
    Question("instruments.phase_ct", "Phase CT ratio", "Phase CTs", "instruments", help="e.g. 200/1 A or 250/5 A"),
    Question("instruments.phase_ct_class", "Phase CT accuracy class", "Phase CT class", "instruments",
             help="e.g. C200 or 5P20", blank=constant("not known")),
    Question("instruments.phase_ct_burden", "Total burden on the phase CTs (leads and relay)", "Phase CT burden",
             "instruments", help="ohm", blank=constant("not known")),
    Question("instruments.ground_ct", "Core-balance (zero-sequence) CT ratio", "Core-balance CT", "instruments",
             when=M, help="e.g. 50/1 A", blank=constant("none fitted")),
    Question("instruments.neutral_ct", "CT in the generator's neutral", "Neutral CT", "instruments",
             when=both(G, grounding_is("low-resistance", "solid")),
             help="e.g. 200/5 A; it allows restricted earth-fault protection (87N)",
             blank=constant("none: the earth-fault element uses the residual of the phase CTs")),
    Question("instruments.vt", "Voltage transformer ratio", "VTs", "instruments", help="e.g. 6600/110 V",
             blank=constant("none")),
    Question("instruments.neutral_vt", "Neutral voltage transformer ratio", "Neutral VT", "instruments", when=G,
             help="e.g. 13800/120 V", blank=constant("none")),
    Question("instruments.differential_ct", "Differential CT ratio (CTs at both ends of the winding)",
             "Differential CTs", "instruments", help="e.g. 1000/5 A", blank=constant("none fitted")),
    Question("instruments.differential_ct_class", "Differential CT accuracy class", "Differential CT class",
             "instruments", when=lambda a: a.has("instruments.differential_ct"), help="e.g. C400 or 5P20",
             blank=constant("not known")),
    Question("instruments.differential_ct_burden", "Total burden on the differential CTs (leads and relay)",
             "Differential CT burden", "instruments", when=lambda a: a.has("instruments.differential_ct"),
             help="ohm", blank=constant("not known")),

    # study options
    Question("study.practice", "Which family of curves and capability tables?", "Practice", "study",
             default=default_practice, choices=(("IEC", "IEC (usual at 50 Hz)"), ("IEEE", "IEEE (usual at 60 Hz)")),
             after=("machine.frequency",)),
)

#: The two questions a revision adds: who makes it and why.
REVISION_QUESTIONS: tuple[Question, ...] = (
    Question("revision.by", "Your name (who makes this revision)", "Revised by", "identification"),
    Question("revision.reason", "Why is it revised? One line, e.g. 'motor rewound, new nameplate'", "Reason",
             "identification", required=lambda a: True),
)


# ---------------------------------------------------------------------------------------------------- walking


def applies(q: Question, a: Answers) -> bool:
    """Whether ``q`` is asked with the answers so far."""
    if q.key != "machine.kind" and a.kind is None:
        return q.section == "identification" and not q.key.startswith("machine.")
    return bool(q.when(a))


def applicable(a: Answers) -> list[Question]:
    """The questions asked for these answers, in order."""
    return [q for q in QUESTIONS if applies(q, a)]


def next_question(a: Answers, skip: Any = ()) -> Question | None:
    """The first question that applies and has not been answered yet (nor is in ``skip``), or None when done."""
    return next((q for q in QUESTIONS if applies(q, a) and q.key not in a.asked and q.key not in skip), None)


def go_back(a: Answers, current: str | None = None) -> Question | None:
    """Reopen the answer given last (other than ``current``) that still applies; None when there is none.

    Its answer is kept as the default, so Enter gives it again; the questions after it are asked in turn.
    """
    for key in reversed(a.asked):
        q = find(key, a)
        if key == current or q is None or not applies(q, a):
            continue
        a.unmark(key)
        return q
    return None


def find(key: str, a: Answers | None = None) -> Question | None:
    """The question behind a key path (for the machine kind of ``a`` where the key is asked twice)."""
    base = re.sub(r"\[\d+\].*$", "", key)
    for q in QUESTIONS + REVISION_QUESTIONS:
        if q.key == base and (a is None or a.kind is None or applies(q, a)):
            return q
    return None


def spec(q: Question, a: Answers) -> FieldSpec:
    return spec_of(q.key, a.kind)


def is_required(q: Question, a: Answers) -> bool:
    return bool(q.required(a)) if q.required else spec(q, a).required


def default(q: Question, a: Answers) -> Any:
    """What Enter gives: the current answer (revise, resume, review), the flow's default, the field's default."""
    if a.has(q.key):
        return a.get(q.key)
    if q.default is not None:
        value = q.default(a)
        if value is not None:
            return value
    s = spec(q, a)
    if s.kind == "boolean":
        return None
    return s.default


def blank_meaning(q: Question, a: Answers) -> str | None:
    """What leaving an optional question blank means, e.g. 'taken from code letter G'."""
    return q.blank(a) if q.blank else None


def unit_shown(q: Question, a: Answers) -> str:
    s = spec(q, a)
    return s.unit if s.kind in KINDS or s.kind in ("current_or_pu", "ratio") else ""


_BARE = re.compile(r"\s*[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?\s*")


def expected(s: FieldSpec) -> str:
    """What a field expects, in the file reader's words, e.g. "active power such as '1500 hp'"."""
    example = KINDS[s.kind].example if s.kind in KINDS else ""
    hint = f" such as '{example}'" if example else (f" ({', '.join(s.choices)})" if s.choices else "")
    return f"{s.kind.replace('_', ' ')}{hint}"


def missing(key: str, s: FieldSpec) -> InputError:
    """The error for a required answer that is not given (same words as the machine file reader)."""
    return InputError(key, f"required key is missing; expected {expected(s)}")


def unanswerable(q: Question, a: Answers) -> bool:
    """Required, not given and with no default: only the person can answer it."""
    return not a.has(q.key) and default(q, a) in (None, "") and is_required(q, a)


def accept(q: Question, a: Answers, raw: Any) -> Any:
    """Check one answer and return it as it goes into the machine file; raise InputError to refuse it.

    ``raw`` is what the person typed (a string) or what an answers file holds (string, number, list). An empty
    string means 'no answer': the default where there is one, nothing for an optional question, an error for a
    required one. A bare number is taken in the unit shown and written with it (``"1500"`` → ``"1500 kW"``).
    """
    s = spec(q, a)
    key = q.key.replace("revision.", "sheet.history.")
    if isinstance(raw, str) and not raw.strip():
        fallback = default(q, a)
        if fallback in (None, ""):
            if is_required(q, a):
                raise missing(key, s)
            return None
        raw = fallback
    if s.kind == "table":
        return _accept_rows(q, a, raw)
    form = FORMS.get(q.key)
    got = form(a, raw, key) if form is not None else None
    if got is not None:
        value = got[0]
        parse_value(s, value, key, rated_current=rated_current(a), default_unit=unit_shown(q, a) or None)
        return value
    if s.kind == "boolean" and isinstance(raw, str):
        low = raw.strip().lower()
        if low not in ("yes", "no", "y", "n", "true", "false"):
            raise InputError(key, f"expected yes or no, got {raw!r}")
        return low in ("yes", "y", "true")
    unit = unit_shown(q, a)
    parse_value(s, raw, key, rated_current=rated_current(a), default_unit=unit or None)
    if isinstance(raw, str):
        raw = raw.strip()
        if s.kind == "integer":
            return int(raw)
        if s.kind == "letter":
            return raw.upper()
        if unit and _BARE.fullmatch(raw):
            return f"{raw} {unit}"
        if s.kind == "ratio":  # written primary/secondary with its unit: '150:5' → '150/5 A'
            m = re.search(r"[A-Za-z]+\s*$", raw)
            numbers = re.sub(r"\s*[/:]\s*", "/", raw[:m.start()] if m else raw).strip()
            return f"{numbers} {m.group(0).strip() if m else unit}"
    return raw


def _accept_rows(q: Question, a: Answers, raw: Any) -> list[dict]:
    if not isinstance(raw, list) or not all(isinstance(r, dict) for r in raw):
        raise InputError(q.key, f"expected a list of tables ([[{q.key}]]), got {raw!r}")
    item = spec(q, a).item
    specs = field_specs(item)
    rows = []
    for i, row in enumerate(raw):
        out = {}
        for name, value in row.items():
            if name not in specs:
                raise InputError(f"{q.key}[{i}].{name}", f"unknown key; expected one of: {', '.join(specs)}")
            out[name] = accept_cell(q, a, i, name, value)
        rows.append(out)
    return rows


def accept_cell(q: Question, a: Answers, i: int, name: str, raw: Any) -> Any:
    """One cell of a table row, checked and written like any other answer."""
    s = field_specs(spec(q, a).item)[name]
    key = f"{q.key}[{i}].{name}"
    if isinstance(raw, str) and not raw.strip():
        raise missing(key, s)
    parse_value(s, raw, key, default_unit=s.unit or None)
    if isinstance(raw, str) and s.unit and _BARE.fullmatch(raw):
        return f"{raw.strip()} {s.unit}"
    return raw.strip() if isinstance(raw, str) else raw


def record(q: Question, a: Answers, value: Any) -> None:
    """Keep an accepted answer.

    A change of machine kind asks everything after the identification again; another changed answer asks again
    the questions that rest on it (their ``after``), each offered with its answer as it stands.
    """
    before = a.get(q.key)
    if q.key == "machine.kind" and a.kind is not None and value != a.kind:
        a.asked[:] = [k for k in a.asked if (f := find(k)) is not None and f.section == "identification"]
    elif before != value:  # (a first answer too: after an answers file that lacked it, what rests on it is asked)
        for other in QUESTIONS:  # answers that rest on this one are asked again, offered as they are
            if q.key in other.after:
                a.unmark(other.key)
    a.set(q.key, value)
    a.mark(q.key)


def findings(q: Question, a: Answers) -> list[Finding]:
    """The checks of this answer against every answer given so far, run on the answers as they stand.

    The question's own checks, then the cross-checks that read its key (:data:`CROSS_CHECKS`). A cross-check that
    belongs to a later answer already given (an answer changed at the review) warns instead of refusing: the later
    answer is the one to correct, and the review offers it.
    """
    out = [f for check in q.checks if (f := check(a)) is not None]
    for c in CROSS_CHECKS:
        if q.key not in c.reads or (f := c.run(a)) is None:
            continue
        if f.level == "error" and c.reads[-1] != q.key:
            f = Finding("warn", f"{f.message} (an answer given before; the review offers to change it)")
        out.append(f)
    return out


def refusal(q: Question, a: Answers, raw: Any) -> str | None:
    """Why ``raw`` is refused (one line), or None: field validation, then the checks that must be fixed."""
    try:
        value = accept(q, a, raw)
    except InputError as e:
        return str(e) + _percent_tip(q, a, raw)
    errors = [f.message for f in findings(q, a.trial(q.key, value)) if f.level == "error"]
    return errors[0] if errors else None


def _percent_tip(q: Question, a: Answers, raw: Any) -> str:
    """A bare 95.8 for an efficiency or power factor was meant as a percentage: say how to write it."""
    if spec(q, a).kind != "per_unit" or not isinstance(raw, str) or not _BARE.fullmatch(raw):
        return ""
    return f" (for a percentage write '{raw.strip()} %')" if 1.0 < float(raw) <= 100.0 else ""


# ---------------------------------------------------------------------------------------------------- results


def machine_data(a: Answers) -> dict:
    """The machine file the answers make: answers to questions that no longer apply are left out.

    Keys that no question asks (overrides, differential CTs, anything a revised file already held, a misspelt
    key in an answers file) are kept as they are, so the machine file reader judges them; only keys of the other
    machine kind (after a change of kind) are dropped.
    """
    kind = a.kind or MOTOR
    asked_keys = {q.key for q in QUESTIONS}
    live = {q.key for q in applicable(a)}
    own = _specs(kind).get("machine", {})
    other = _specs(GENERATOR if kind == MOTOR else MOTOR)["machine"]
    out: dict = {"format": FORMAT}
    for section, table in a.data.items():
        if not isinstance(table, dict) or section == "revision":
            continue
        kept = {}
        for name, value in table.items():
            key = f"{section}.{name}"
            if value in (None, ""):
                continue
            if key in asked_keys and key != "machine.kind":
                if key in live:
                    kept[name] = value
            elif not (section == "machine" and name not in own and name in other):
                kept[name] = value
        if kept or section in ("sheet", "machine", "supply", "grounding", "instruments"):
            out[section] = kept
    return out


def input_labels(kind: str) -> dict[str, str]:
    """The label of every machine-file key the questions ask for this kind of machine (for the change summary)."""
    a = Answers(data={"machine": {"kind": kind}})
    out: dict[str, str] = {}
    for q in QUESTIONS:
        if not q.key.startswith("flow.") and (q.key not in out or q.when(a)):
            out[q.key] = q.label
    return out


def left_out(a: Answers) -> list[str]:
    """Keys the answers give that no longer apply (e.g. a fault current limit for a solidly grounded system)."""
    live = {q.key for q in applicable(a)}
    return [k for k in dict.fromkeys(q.key for q in QUESTIONS) if k not in live and a.has(k)]


def review_rows(a: Answers) -> list[tuple[str, list[tuple[str, str]]]]:
    """The review summary: (section title, [(label, answer as written)]) for every section that was asked."""
    out: list[tuple[str, list[tuple[str, str]]]] = []
    for sid, _, _ in SECTIONS:
        rows = []
        for q in applicable(a):
            if q.section != sid:
                continue
            rows.append((q.label, shown_answer(q, a)))
        if rows:
            out.append((section_title(sid, a.kind), rows))
    return out


def shown_answer(q: Question, a: Answers) -> str:
    """An answer as the review shows it: normalised ('15 s', not '15 sec'), a choice by its label, blank by what
    blank means."""
    value = a.get(q.key)
    s = spec(q, a)
    if s.kind == "boolean" or q.key.startswith("flow."):
        return "yes" if value is True else "no"
    if value in (None, "", []):
        if s.kind == "table":
            return "none"
        return f"— {blank_meaning(q, a) or 'not given'}"
    if s.kind == "table":
        return "; ".join(" / ".join(_cell(v) for v in row.values()) for row in value)
    labels = dict(q.choices)
    if q.choices:
        return labels.get(value, str(value))
    return normalised(q, a, value)


def _cell(value: Any) -> str:
    return pretty_quantity(value) if isinstance(value, str) else str(value)


_UNIT_SIGNS = (("*", "·"), ("^2", "²"), ("^3", "³"), ("uF", "µF"), ("ohm", "Ω"))


def pretty_unit(unit: str) -> str:
    """A unit as printed: 'kg*m^2' → 'kg·m²', 'uF' → 'µF', 'ohm' → 'Ω', 'lb-ft^2' → 'lb·ft²'."""
    unit = re.sub(r"(?<=[A-Za-z])-(?=[A-Za-z])", "·", unit)
    for old, new in _UNIT_SIGNS:
        unit = unit.replace(old, new)
    return unit


def pretty_quantity(text: str) -> str:
    """A quantity as written, tidied: number, one space, the unit printed ('80K' → '80 K', '28 kg*m^2' →
    '28 kg·m²')."""
    unit = written_unit(text)
    if not unit:
        return text.strip()
    number = text.strip()[: len(text.strip()) - len(unit)].strip()
    return f"{number} {pretty_unit(unit)}"


def normalised(q: Question, a: Answers, value: Any) -> str:
    """An answer in the unit the question is asked in, with the form it was written in where that differs.

    '1500 hp' → '1119 kW (1500 hp)'; '15 sec' → '15 s'; '6.2 pu' → '1153 A (6.2 pu)'; '95.8 %' → '95.8 %'.
    """
    s = spec(q, a)
    if not isinstance(value, (str, int, float)) or isinstance(value, bool):
        return str(value)
    if s.kind == "ratio":
        try:
            r = parse_value(s, value, q.key)
        except InputError:
            return str(value)
        return f"{_number(r.primary)}/{_number(r.secondary)} {s.unit}"
    if s.kind not in KINDS and s.kind != "current_or_pu":
        return str(value)
    try:
        i_rated = rated_current(a) if s.kind == "current_or_pu" else None
        si = parse_value(s, value, q.key, rated_current=i_rated, default_unit=s.unit or None)
    except InputError:
        return str(value)
    written = written_unit(value) if isinstance(value, str) else ""
    if s.kind == "per_unit":
        return pretty_quantity(str(value)) if written in ("%", "pu") else _number(si)
    if s.kind == "current_or_pu":
        shown = f"{_number(si)} A"
        return shown if written == "A" else f"{shown} ({pretty_quantity(str(value))})"
    unit = s.unit or KINDS[s.kind].si_unit
    shown = f"{_number(convert(si, KINDS[s.kind].si_unit, unit))} {pretty_unit(unit)}"
    if written and not same_unit(written, unit):
        return f"{shown} ({pretty_quantity(str(value))})"
    if written and written != unit:  # the same unit up to a prefix or a spelling: as written, tidied
        return pretty_quantity(str(value)) if not same_unit(written, "s") else f"{_number(si)} s"
    return shown


def understood(q: Question, a: Answers, raw: Any, value: Any) -> list[str]:
    """How a typed answer was read, when that is not plain from what was typed: conversions, the unit taken for a
    bare number, a share of a rating, a rise in degrees, the default taken for Enter.

    '800 hp' → ['800 hp = 596.6 kW']; '420 lb-ft²' → ['420 lb-ft² = 17.7 kg·m²']; '80 C' → ["'80 C' read as a
    temperature rise of 80 K"]; '6.2' for a locked-rotor current → ['6.2 pu = 1153 A (of the 186 A full-load
    current)'].
    """
    if not isinstance(raw, str) or value is None:
        return []
    typed = raw.strip()
    s = spec(q, a)
    if not typed:
        return [f"taken: {shown_answer(q, a.trial(q.key, value))}"]
    form = FORMS.get(q.key)
    got = form(a, typed, q.key) if form is not None else None
    if got is not None:
        return [got[1]] if got[1] else []
    if s.kind == "ratio" and (":" in typed or not re.search(r"[A-Za-z]\s*$", typed)):
        return [f"{typed} read as {normalised(q, a, value)}"]
    if s.kind == "current_or_pu":
        i_rated = rated_current(a)
        try:
            amps = parse_value(s, value, q.key, rated_current=i_rated, default_unit=s.unit or None)
        except InputError:
            return []
        if not i_rated:
            return []
        if written_unit(value) == "A":
            return [f"{typed} = {amps / i_rated:.3g} pu of the {_number(i_rated)} A full-load current"]
        return [f"{typed if written_unit(typed) else value} = {_number(amps)} A (of the {_number(i_rated)} A "
                "full-load current)"]
    if s.kind == "per_unit":
        return [f"{typed} = {_number(a.trial(q.key, value).si(q.key) or 0.0)}"] if written_unit(typed) == "%" else []
    if s.kind not in KINDS:
        return []
    shown = normalised(q, a, value)
    if not written_unit(typed):
        return [f"{typed} taken as {shown}"]
    plain = shown.split(" (", 1)[0]
    if not same_unit(written_unit(typed), s.unit or KINDS[s.kind].si_unit):
        return [f"{pretty_quantity(typed)} = {plain}"]
    return []


NAVIGATION = ("< and Enter (or Esc): back to the previous question · ? and Enter: this help · Ctrl-C: stop, your "
              "answers are kept")


def help_text(q: Question, a: Answers) -> list[str]:
    """What ``?`` shows: the question, its help, the field's meaning, how to write it, the range, what blank means."""
    s = spec(q, a)
    lines = [q.text]
    for text in (q.help, q.more):
        if text:
            lines.append(text)
    if s.help and s.help.lower() not in (q.help or "").lower():
        lines.append(f"In the machine file: {q.key} — {s.help}.")
    if q.choices:
        lines.append("Pick one with the arrow keys and Enter.")
    elif s.kind == "current_or_pu":
        lines.append("Write amperes (e.g. 1150 A) or per-unit of the full-load current (e.g. 6.2 pu or 620 %); a "
                     "bare number is per-unit.")
    elif s.kind == "per_unit":
        lines.append("Write a per-unit value (e.g. 0.89) or a percentage (e.g. 89 %).")
    elif s.kind == "ratio":
        lines.append(f"Write primary/secondary, e.g. {'200/1 A or 150:5' if s.unit == 'A' else '6600/110 V'}.")
    elif s.kind in KINDS:
        unit = pretty_unit(s.unit or KINDS[s.kind].si_unit)
        lines.append(f"Write {KINDS[s.kind].noun} with its unit, e.g. {KINDS[s.kind].example}; a bare number is taken "
                     f"in {unit}.")
    elif s.kind == "boolean":
        lines.append("Answer y or n, then Enter.")
    if s.kind in KINDS and s.lo is not None and s.hi is not None and s.kind != "per_unit":
        si, unit = KINDS[s.kind].si_unit, s.unit or KINDS[s.kind].si_unit
        lines.append(f"Plausible: {_number(convert(s.lo, si, unit))} to {_number(convert(s.hi, si, unit))} "
                     f"{pretty_unit(unit)}.")
    if q.key in FORM_HELP:
        lines.append(FORM_HELP[q.key])
    meaning = blank_meaning(q, a)
    if meaning and not is_required(q, a):
        lines.append(f"Left blank: {meaning}.")
    lines.append(NAVIGATION)
    return lines


def scripted(a: Answers, missing_keys: list[str] | None = None) -> list[str]:
    """Answer every question from the answers already held (an answers file), without asking.

    A question the data do not answer takes its default; one with no default is left out when optional and is an
    error (naming the key) when required. Same checks and messages as the prompts. Returns the warnings.

    With ``missing_keys`` (a list), required answers that nobody gave are collected there instead and left unasked,
    so every one of them can be named at once (or asked in a terminal).
    """
    warnings: list[str] = []
    skipped: set[str] = set()
    while (q := next_question(a, skipped)) is not None:
        raw = a.get(q.key)
        if raw in (None, "") and spec(q, a).kind == "boolean":
            raw = q.default(a) if q.default else "no"
        if missing_keys is not None and raw in (None, "") and unanswerable(q, a):
            missing_keys.append(q.key)
            skipped.add(q.key)
            continue
        record(q, a, accept(q, a, "" if raw is None else raw))
        for f in findings(q, a):
            if f.level == "error":
                raise InputError(f.message.partition(":")[0], f.message.partition(": ")[2])
            warnings.append(f.message)
    return warnings
