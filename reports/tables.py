"""The sheet's tables as rows of plain strings, built from a settings record (pure functions, no reportlab).

Each function takes a :class:`machines.record.SettingsRecord` and returns rows in the order the sheet prints them.
The strings are the text as printed (units as a practitioner writes them, from :mod:`reports.formatting`); the
sheet only escapes and lays them out (labels, notes and sentences written by the study go through
:func:`reports.fonts.formula`, which sets their sub- and superscripts). Nothing here calculates a setting.

What is a setting: an entry of a function that is keyed into the relay (``keyed``) and is not a value derived from
the others (source ``derived``), unless it was rounded to a relay step (a ``step`` says the relay holds it). Every
other entry (an operate time it achieves, a delay window, equipment sized by the study) is printed among the
function's derived values, never in the settings table or the keying list.
"""

from __future__ import annotations

import math
import re
from typing import Any, NamedTuple

from reports.formatting import label_of, number, quantity, setting_primary, setting_secondary

STATUS_WORD = {"fail": "FAIL", "warn": "WARN", "ok": "ok"}
SOURCE_WORD = {"standard": "standard", "common-practice": "common practice", "maker-data": "maker data",
               "entered": "entered", "override": "override", "derived": "derived"}
KIND_WORD = {"induction-motor": "Induction motor", "synchronous-generator": "Synchronous generator"}
SECTION_TITLE = {"study": "Study", "machine": "Machine", "load": "Driven load", "supply": "Supply",
                 "grounding": "Grounding", "instruments": "Instrument transformers", "overrides": "Overrides",
                 "relay": "Relay setting steps", "sheet": "Sheet"}
#: the life of a sheet as printed in the identification block (anything but issued is not for use)
STATUS_TEXT = {"draft": "draft (for review, not for use)", "checked": "checked, awaiting approval (not for use)",
               "approved": "approved, not yet issued (not for use)", "issued": "issued"}
#: the machine file's choice values as a practitioner writes them
CHOICE_WORD = {
    "induction-motor": "induction motor", "synchronous-generator": "synchronous generator",
    "steam-turbine": "steam turbine", "gas-turbine": "gas turbine", "hydro": "hydro turbine",
    "reciprocating-engine": "reciprocating engine",
    "cylindrical-indirect": "cylindrical rotor, indirect cooling", "cylindrical-direct": "cylindrical rotor, "
    "direct cooling", "salient-with-damper": "salient pole with damper winding",
    "salient-without-damper": "salient pole without damper winding",
    "solid": "solidly grounded", "low-resistance": "resistance grounded (low resistance)",
    "high-resistance": "resistance grounded (high resistance)", "ungrounded": "ungrounded",
    "distribution-transformer": "grounding transformer with secondary resistor",
    "breaker": "circuit breaker", "fused-contactor": "fused contactor",
    "quadratic": "quadratic (centrifugal pump, fan)", "constant": "constant", "linear": "linear",
    "trip": "trip", "alarm": "alarm", "IEC": "IEC", "IEEE": "IEEE",
    "static": "static (fed from the terminals)", "brushless": "brushless", "rotating-dc": "rotating DC exciter",
    "unit-transformer": "unit-connected (own step-up transformer)", "bus": "bus-connected",
    "running": "running overload", "accelerating": "accelerating", "locked-rotor": "locked rotor",
    "hot": "from hot (rated load)", "cold": "from cold (ambient)",
}
#: machine-file keys whose words alone would not say what the trade calls them
KEY_WORD = {
    "x_over_r": "X/R ratio of the source", "xd": "Xd, synchronous reactance", "xd_transient": "X'd, transient "
    "reactance", "xd_subtransient": "X''d, subtransient reactance", "x2": "X2, negative-sequence reactance",
    "negative_sequence_continuous": "Continuous I2 capability", "negative_sequence_k": "I2²t capability K",
    "third_harmonic_neutral_min": "Lowest third-harmonic neutral voltage", "vhz_limit": "V/Hz limit",
    "transformer_vhz_limit": "Step-up transformer V/Hz limit", "phase_ct": "Phase CT ratio",
    "ground_ct": "Core-balance CT ratio", "vt": "VT ratio", "neutral_vt": "Neutral VT ratio",
    "differential_ct": "Differential CT ratio", "locked_rotor_code": "Locked-rotor code letter (NEMA)",
    "rotor": "Rotor", "method": "Grounding", "transformer_ratio": "Grounding transformer ratio",
    "inertia": "Load inertia", "rotor_inertia": "Rotor inertia", "kind": "Kind of machine",
}
_STAGE_UNITS = {"frequency": "Hz", "time_delay": "s", "low": "Hz", "high": "Hz", "allowed": "s"}
_STAGE_WORDS = {"frequency": "", "time_delay": "for", "low": "", "high": "to", "allowed": "allowed"}

#: the relay outputs the keying list proposes (a proposal: the scheme drawings decide)
OUT_TRIP, OUT_ALARM, OUT_INHIBIT, OUT_LOCKOUT = "OUT1 trip", "OUT2 alarm", "OUT3 start inhibit", "OUT4 lockout 86"
OUTPUTS_NOTE = (f"Outputs proposed: {OUT_TRIP} (opens the breaker or contactor), {OUT_ALARM}, {OUT_INHIBIT} (held "
                f"open in the closing circuit), {OUT_LOCKOUT} (differential trips, hand reset). Elements whose "
                "name says alarm go to the alarm output, the others of a function to its trip output; assign the "
                "outputs to suit the scheme drawings.")


class SettingRow(NamedTuple):
    """One printed setting. ``fid`` and ``function`` are filled on the first row of each function only.

    ``relay_side`` is the value to set: relay-side (secondary) where an instrument transformer applies, else the
    value itself, printed to the relay's setting step. ``primary`` is the primary value where a transformer applies.
    """

    fid: str
    function: str
    setting: str
    primary: str
    relay_side: str
    source: str
    note: str
    key: str = ""
    step: str = ""


class DerivedRow(NamedTuple):
    """A function's value that is not keyed into the relay: what a setting achieves, a window, equipment sized."""

    fid: str
    label: str
    value: str
    note: str
    key: str = ""


class FunctionBlock(NamedTuple):
    """A protection function's rows in the settings table, with the reason and references printed under them."""

    fid: str
    title: str
    enabled: bool
    rows: list[SettingRow]
    basis: str
    references: str
    derived: list[DerivedRow] = []


class FindingRow(NamedTuple):
    status: str
    fid: str
    message: str


class CommissioningRow(NamedTuple):
    """One commissioning injection; ``measured`` and ``result`` stay empty for the tester's hand."""

    number: str
    fid: str
    test: str
    initial_state: str
    applied_primary: str
    applied_secondary: str
    expected: str
    band: str
    measured: str = ""
    result: str = ""
    tolerance_key: str = ""


class KeyRow(NamedTuple):
    """One line of the keying list: the setting's name, the value to key in (relay side) and its step."""

    label: str
    value: str
    step: str
    output: str
    key: str = ""


class KeyFunction(NamedTuple):
    """A function in the keying list: in service or not, the outputs it works and its rows in relay terms."""

    fid: str
    title: str
    state: str
    outputs: str
    rows: list[KeyRow]


def status_of(record) -> str:
    """The sheet's status: draft, checked, approved or issued (draft when the record says something else)."""
    status = str((record.sheet or {}).get("status") or "draft")
    return status if status in STATUS_TEXT else "draft"


def identification_rows(record) -> list[tuple[str, str]]:
    """Label and value of the identification block."""
    sheet = record.sheet or {}
    return [
        ("Tag", str(sheet.get("tag") or record.tag)),
        ("Description", str(sheet.get("description") or "")),
        ("Site", str(sheet.get("site") or "")),
        ("Machine", KIND_WORD.get(record.kind, CHOICE_WORD.get(record.kind, str(record.kind)))),
        ("Practice", str(record.practice)),
        ("Revision", str(sheet.get("revision", record.revision))),
        ("Date", str(sheet.get("date") or "")),
        ("Status", STATUS_TEXT[status_of(record)]),
    ]


# ---------------------------------------------------------------------------------------------------- inputs


def input_sections(record) -> list[tuple[str, list[tuple[str, str, str]]]]:
    """The machine and system data as entered, by section: (title, [(label, value, note)]).

    Values are printed in the unit the machine file's key is written in (``210 %`` of a per-unit reactance prints
    as ``2.1 pu``), with what was typed in the note when that differs; choices print as words.
    """
    specs = _specs(record.kind)
    out = []
    for section, table in (record.inputs or {}).items():
        if not isinstance(table, dict) or not table:
            continue
        rows = []
        for key, value in table.items():
            if section == "overrides":
                rows.append((override_label(record, key), as_entered(value), ""))
                continue
            spec = specs.get(section, {}).get(key)
            rows.append((printed_label(key),) + normalised(value, spec, f"{section}.{key}"))
        out.append((SECTION_TITLE.get(section, label_of(section)), rows))
    return out


def _specs(kind: str) -> dict:
    try:
        from machines.files import section_specs

        return section_specs(kind)
    except Exception:  # an unknown kind: print every value as entered
        return {}


def normalised(value: Any, spec, key: str = "") -> tuple[str, str]:
    """(value as printed, note) of an entered value: in the key's own unit, the typed text in the note if it differs.

    >>> from machines.model import FieldSpec
    >>> normalised("210 %", FieldSpec("per_unit", "pu"))
    ('2.1 pu', 'entered as 210 %')
    >>> normalised("4.16 kV", FieldSpec("voltage", "kV")), normalised("low-resistance", FieldSpec("choice"))
    (('4.16 kV', ''), ('resistance grounded (low resistance)', ''))
    """
    if spec is None:
        return as_entered(value), ""
    if spec.kind == "choice" and isinstance(value, str):
        return CHOICE_WORD.get(value, value), ""
    if spec.kind in ("text", "letter", "ct_class", "integer", "boolean", "table", "ratio", "current_or_pu") \
            or not spec.unit or isinstance(value, bool):
        return as_entered(value), ""
    try:
        from machines.units import parse_quantity

        x = parse_quantity(value, spec.kind, spec.unit, key=key, default_unit=spec.unit, allow_zero=True,
                           allow_negative=True)
    except Exception:  # not readable here: as typed
        return as_entered(value), ""
    shown = f"{number(x)} {_paper_unit(spec.unit)}"
    typed = as_entered(value)
    same = typed.replace(" ", "") == shown.replace(" ", "") or _same_number(value, x)
    return shown, "" if same else f"entered as {typed}"


def _same_number(value: Any, x: float) -> bool:
    """True when the typed value is the same number in the same unit (``"4.160 kV"`` and 4.16 kV)."""
    m = _VALUE_UNIT.match(value) if isinstance(value, str) else None
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return math.isclose(float(value), x, rel_tol=1e-9)
    if not m:
        return False
    try:
        return math.isclose(float(m.group(1)), x, rel_tol=1e-9)
    except ValueError:
        return False


_ACRONYMS = {"ct": "CT", "vt": "VT", "pu": "pu", "i2": "I2", "x2": "X2", "xd": "Xd", "xq": "Xq", "lr": "LR",
             "nema": "NEMA", "iec": "IEC", "ieee": "IEEE", "vhz": "V/Hz", "lv": "LV", "hv": "HV", "mv": "MV",
             "rocof": "RoCoF", "avr": "AVR"}


def printed_label(key: str, js: dict | None = None) -> str:
    """The printed name of a key, with the trade's abbreviations spelled as the trade writes them.

    >>> printed_label("phase_ct"), printed_label("xd_transient"), printed_label("frequency_step")
    ('Phase CT ratio', "X'd, transient reactance", 'Frequency step')
    """
    if js and js.get("label"):
        return js["label"]
    if key in KEY_WORD:
        return KEY_WORD[key]
    words = label_of(key).split(" ")
    return " ".join(_ACRONYMS.get(w.lower(), w) for w in words)


def override_label(record, name: str) -> str:
    """An override's key as the sheet names it: the function id and the setting's printed label."""
    fid, _, key = str(name).partition(".")
    f = record.function(fid) if hasattr(record, "function") else None
    if f is not None and key in f.settings:
        return f"{fid} {f.settings[key].to_json().get('label') or printed_label(key)}"
    return f"{fid} {printed_label(key)}".strip()


def as_entered(value: Any) -> str:
    """A value from the machine file as its writer typed it, units spelt as on paper.

    The number is never changed; only the unit's ASCII spelling is printed the way a practitioner writes it.

    >>> as_entered("6.6 kV"), as_entered(True), as_entered(0.89), as_entered([{"low": "47.5 Hz", "allowed": "60 s"}])
    ('6.6 kV', 'yes', '0.89', '47.5 Hz allowed 60 s')
    >>> as_entered("34 kg*m^2"), as_entered("0.12 uF"), as_entered("0.6 ohm"), as_entered("quadratic")
    ('34 kg·m²', '0.12 µF', '0.6 Ω', 'quadratic (centrifugal pump, fan)')
    """
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, dict):
        return " ".join(f"{_STAGE_WORDS.get(k, printed_label(k).lower())} {as_entered(v)}".strip()
                        for k, v in value.items())
    if isinstance(value, (list, tuple)):
        return "; ".join(as_entered(v) for v in value) if value else "none"
    if isinstance(value, str):
        m = _VALUE_UNIT.match(value)
        if m:
            return m.group(1) + _paper_unit(m.group(2))
        return CHOICE_WORD.get(value, value)
    return str(value)


_VALUE_UNIT = re.compile(r"^([-+]?[0-9][0-9.eE+-]*\s*)([A-Za-zµΩ%][A-Za-z0-9*/^·.µΩ% ]*)$")
_UNIT_WORDS = {"ohm": "Ω", "ohms": "Ω", "kohm": "kΩ", "Mohm": "MΩ", "mohm": "mΩ", "degC": "°C", "deg": "°",
               "uF": "µF", "uH": "µH", "us": "µs", "uA": "µA", "uV": "µV"}


def _paper_unit(unit: str) -> str:
    """ASCII unit spelling as printed: ``kg*m^2`` → ``kg·m²``, ``uF`` → ``µF``, ``ohm`` → ``Ω``."""
    parts = re.split(r"([*/ ])", unit)
    out = []
    for part in parts:
        if part == "*":
            out.append("·")
            continue
        base, _, power = part.partition("^")
        base = _UNIT_WORDS.get(base, base)
        out.append(base + ("" if not power else power.translate(_SUPERSCRIPT) if power.isdigit() else "^" + power))
    return "".join(out)


_SUPERSCRIPT = str.maketrans("0123456789", "⁰¹²³⁴⁵⁶⁷⁸⁹")


# ---------------------------------------------------------------------------------------------------- derived


def derived_rows(record) -> list[tuple[str, str, str]]:
    """Single quantities the study derived from the data: (label, value, note); tables are in derived_tables."""
    rows = []
    for key, s in record.derived.items():
        if _is_table(s.value):
            continue
        js = s.to_json()
        rows.append((printed_label(key, js), _with_secondary(js), s.note))
    return rows


def derived_tables(record) -> list[tuple[str, list[str], list[list[str]]]]:
    """Derived values that are tables (a list of rows with the same keys): (title, header, rows)."""
    out = []
    for key, s in record.derived.items():
        if not _is_table(s.value):
            continue
        columns = list(s.value[0])
        header = [printed_label(c) for c in columns]
        rows = [[as_number(row.get(c)) for c in columns] for row in s.value]
        title = printed_label(key, s.to_json()) + (f" ({s.note})" if s.note else "")
        out.append((title, header, rows))
    return out


def _is_table(value: Any) -> bool:
    return isinstance(value, (list, tuple)) and bool(value) and all(isinstance(v, dict) for v in value) \
        and all(list(v) == list(value[0]) for v in value) and not _is_stages(value)


def _is_stages(value: Any) -> bool:
    return isinstance(value, (list, tuple)) and bool(value) and all(isinstance(v, dict) for v in value) and \
        all(set(v) <= set(_STAGE_UNITS) for v in value)


def as_number(value: Any) -> str:
    """A plain table entry: numbers to 4 significant figures, anything else as text.

    >>> as_number(0.99850336), as_number(3.1000000000000005), as_number("IEC"), as_number(None)
    ('0.9985', '3.1', 'IEC', '—')
    """
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return quantity(value, "")
    return number(float(value))


def _with_secondary(js: dict) -> str:
    sec = setting_secondary(js)
    return setting_primary(js) + (f" ({sec} relay side)" if sec else "")


# ---------------------------------------------------------------------------------------------------- settings


def is_setting(s) -> bool:
    """True for an entry keyed into the relay (see the module docstring)."""
    return bool(s.keyed) and (s.source != "derived" or s.step is not None)


def value_to_set(value: Any, unit: str, step: float | None) -> str:
    """A relay-side value as keyed in: to the step's decimals (time constants on a minute step in minutes).

    >>> value_to_set(3.72, "A", 0.01), value_to_set(1350.0, "s", 6.0), value_to_set(1.45, "", 0.01)
    ('3.72 A', '22.5 min', '1.45')
    >>> value_to_set(89.1, "V", 0.1), value_to_set(0.0, "s", 0.01), value_to_set(2, "", 1.0)
    ('89.1 V', '0.00 s', '2')
    """
    if isinstance(value, bool):
        return "on" if value else "off"
    if isinstance(value, str):
        return curve_word(value)
    if not isinstance(value, (int, float)) or not math.isfinite(float(value)):
        return quantity(value, unit)
    if not step or step <= 0:
        return quantity(value, unit)
    if unit == "s" and step >= 6.0 - 1e-9 and abs(step / 6.0 - round(step / 6.0)) < 1e-9:
        value, step, unit = value / 60.0, step / 60.0, "min"
    decimals = max(0, -math.floor(math.log10(step) + 1e-9)) if step < 1 else 0
    if step < 1 and abs(step * 10 ** decimals - round(step * 10 ** decimals)) > 1e-9:
        decimals += 1  # a step such as 0.05 or 0.25
    text = f"{float(value):.{decimals}f}"
    shown = _UNIT_SHOWN.get(unit, unit)
    return f"{text} {shown}".strip()


_UNIT_SHOWN = {"ohm": "Ω", "pu V/Hz": "pu V/Hz", "1/h": "per hour", "": ""}


def step_text(unit: str, step: float | None) -> str:
    """The step as printed beside a value to set ('' when there is none).

    >>> step_text("A", 0.01), step_text("s", 6.0), step_text("", 0.01)
    ('0.01 A', '0.1 min', '0.01')
    """
    if not step:
        return ""
    if unit == "s" and step >= 6.0 - 1e-9 and abs(step / 6.0 - round(step / 6.0)) < 1e-9:
        return f"{number(step / 60.0)} min"
    return f"{number(step)} {_UNIT_SHOWN.get(unit, unit)}".strip()


def curve_word(name: str) -> str:
    """A curve name or a choice as words: ``IEEE-VI`` → ``IEEE very inverse``; other text unchanged."""
    try:
        from machines.standards.inverse_time import CURVES

        if name in CURVES:
            return CURVES[name].name
    except Exception:  # the curve library is not importable here: the name as it is
        pass
    return CHOICE_WORD.get(name, name)


def _relay_side(s) -> tuple[str, str, str]:
    """(primary text, value to set, step text) of a setting."""
    if s.secondary is not None:
        return (quantity(s.value, s.unit), value_to_set(s.secondary, s.secondary_unit, s.step),
                step_text(s.secondary_unit, s.step))
    if isinstance(s.value, bool):
        return "", "yes" if s.value else "no", ""
    return "", value_to_set(s.value, s.unit, s.step), step_text(s.unit, s.step)


def stage_text(stage: dict) -> str:
    """One stage of a stage list, e.g. ``48.5 Hz for 2 s``.

    >>> stage_text({"frequency": 48.5, "time_delay": 2.0}), stage_text({"low": 47.0, "high": 47.5, "allowed": 60})
    ('48.5 Hz for 2 s', '47 Hz to 47.5 Hz allowed 60 s')
    """
    parts = []
    for k, x in stage.items():
        word = _STAGE_WORDS.get(k, printed_label(k).lower())
        v = quantity(x, _STAGE_UNITS.get(k, "")) if isinstance(x, (int, float)) else str(x)
        parts.append(f"{word} {v}".strip())
    return " ".join(parts)


def settings_blocks(record) -> list[FunctionBlock]:
    """The settings table: per function its setting rows (one row per stage of a stage list), basis and references;
    the entries that are not settings go to the block's ``derived`` rows."""
    blocks = []
    for f in record.functions:
        rows: list[SettingRow] = []
        derived: list[DerivedRow] = []
        for key, s in f.settings.items():
            js = s.to_json()
            label = printed_label(key, js)
            source = SOURCE_WORD.get(s.source, str(s.source))
            if not is_setting(s):
                derived.append(DerivedRow(f.id, label, _with_secondary(js) if not isinstance(s.value, bool) else
                                          ("yes" if s.value else "no"), s.note, key))
                continue
            if _is_stages(s.value):
                for n, stage in enumerate(s.value, start=1):
                    rows.append(SettingRow("", "", f"{_stage_label(label)} {n}", "", stage_text(stage), source,
                                           s.note if n == 1 else "", key))
                continue
            primary, to_set, step = _relay_side(s)
            rows.append(SettingRow("", "", label, primary, to_set, source, s.note, key, step))
        title = f.title + ("" if f.enabled else " (not enabled)")
        if not rows:
            rows.append(SettingRow("", "", "", "", "", "", ""))
        rows[0] = SettingRow(f.id, title, *rows[0][2:])
        blocks.append(FunctionBlock(f.id, f.title, f.enabled, rows, f.basis, "; ".join(f.references), derived))
    return blocks


def _stage_label(label: str) -> str:
    """'Stages (frequency, delay)' → 'Stage'."""
    word = label.split(" (")[0].strip() or "Stage"
    return word[:-1] if word.endswith("s") else word


# ---------------------------------------------------------------------------------------------------- keying list


def keying_setup(record) -> list[tuple[str, str]]:
    """The relay's setup values before any function: ratios, the machine's rating, phase rotation, frequency."""
    inputs = record.inputs or {}
    instruments = inputs.get("instruments") or {}
    machine = inputs.get("machine") or {}
    grounding = inputs.get("grounding") or {}
    supply = inputs.get("supply") or {}
    rows = []
    for key in ("phase_ct", "ground_ct", "differential_ct", "vt", "neutral_vt"):
        if instruments.get(key):
            rows.append((printed_label(key), as_entered(instruments[key])))
    if grounding.get("transformer_ratio"):
        rows.append(("Grounding transformer ratio (neutral voltage input)", as_entered(grounding["transformer_ratio"])))
    rated = record.derived.get("rated_current")
    if record.kind == "induction-motor":
        if rated is not None:
            rows.append(("Motor full-load current (FLA)", _with_secondary(rated.to_json())))
    else:
        for key in ("rated_apparent_power", "rated_voltage"):
            if machine.get(key):
                rows.append((printed_label(key), normalised(machine[key], _specs(record.kind).get("machine", {})
                                                            .get(key))[0]))
        if rated is not None:
            rows.append(("Generator rated current", _with_secondary(rated.to_json())))
    rotation = supply.get("phase_rotation") or instruments.get("phase_rotation")
    rows.append(("Phase rotation", as_entered(rotation) if rotation else
                 "A-B-C (the test injections assume it; confirm on site)"))
    if machine.get("frequency"):
        rows.append(("Nominal frequency", normalised(machine["frequency"], _specs(record.kind).get("machine", {})
                                                     .get("frequency"))[0]))
    return rows


#: functions that supervise others (block them inside the relay) rather than trip
SUPERVISION_IDS = ("60",)


def function_outputs(f) -> tuple[str, str]:
    """(trip output, outputs text) of a function: the proposal stated in :data:`OUTPUTS_NOTE`."""
    if not f.enabled:
        return "", "none (out of service)"
    action = f.settings.get("action")
    if f.id == "66":
        return OUT_INHIBIT, OUT_INHIBIT
    if f.id in SUPERVISION_IDS:  # blocks other elements inside the relay and alarms; trips nothing itself
        return "", f"{OUT_ALARM}; blocks the listed elements inside the relay"
    if action is not None and action.value == "alarm":
        return OUT_ALARM, OUT_ALARM
    trip = f"{OUT_TRIP} + {OUT_LOCKOUT}" if f.id.startswith("87") else OUT_TRIP
    alarms = any("alarm" in k for k, s in f.settings.items() if is_setting(s))
    return trip, trip + (f"; {OUT_ALARM} (alarm elements)" if alarms else "")


def keying_list(record) -> list[KeyFunction]:
    """Every setting to key in, function by function in the sheet's order, relay-side and rounded."""
    out = []
    for f in record.functions:
        trip, outputs = function_outputs(f)
        rows = []
        for key, s in f.settings.items():
            if not is_setting(s) or key == "enabled":
                continue
            label = printed_label(key, s.to_json())
            output = ("" if not f.enabled else OUT_ALARM if "alarm" in key else
                      "blocking (internal)" if f.id in SUPERVISION_IDS else trip)
            if _is_stages(s.value):
                for n, stage in enumerate(s.value, start=1):
                    rows.append(KeyRow(f"{_stage_label(label)} {n}", stage_text(stage), "", output, key))
                continue
            _, to_set, step = _relay_side(s)
            rows.append(KeyRow(label, to_set, step, output, key))
        out.append(KeyFunction(f.id, f.title, "on" if f.enabled else "off", outputs, rows))
    return out


# ---------------------------------------------------------------------------------------------------- findings, tests


_KEY_PATH = re.compile(r"\b(sheet|study|machine|load|supply|grounding|instruments|relay)\.([a-z][a-z0-9_]*)\b")


def readable_keys(text: str) -> str:
    """Machine-file key paths in a sentence as the sheet names them: ``machine.rated_current`` → ``rated current
    [machine]``.

    >>> readable_keys("grounding.fault_current_limit is missing")
    'fault current limit [grounding] is missing'
    """
    def word(m):
        label = printed_label(m.group(2))
        if not label.isupper() and not label[:2].isupper():
            label = label[:1].lower() + label[1:]
        return f"{label} [{SECTION_TITLE.get(m.group(1), m.group(1)).lower()}]"

    def bare(m):
        return _lower_first(printed_label(m.group(1))) if m.group(1) in _known_keys() else m.group(1)

    return _BARE_KEY.sub(bare, _KEY_PATH.sub(word, text))


_BARE_KEY = re.compile(r"\b([a-z][a-z0-9]*_[a-z0-9_]+)\b")


def _lower_first(label: str) -> str:
    return label if label[:2].isupper() else label[:1].lower() + label[1:]


def _known_keys() -> frozenset[str]:
    """Every machine-file key name (both kinds of machine)."""
    global _KEYS
    if _KEYS is None:
        names = set()
        for kind in ("induction-motor", "synchronous-generator"):
            for section in _specs(kind).values():
                names |= set(section)
        _KEYS = frozenset(names)
    return _KEYS


_KEYS: frozenset[str] | None = None


def finding_rows(record, include_ok: bool = True) -> list[FindingRow]:
    """Every finding, fails first, then warnings, then (optionally) the checks that passed."""
    return [FindingRow(STATUS_WORD.get(c.status, c.status), fid, readable_keys(c.message))
            for fid, c in record.all_checks() if include_ok or c.status != "ok"]


#: tolerance rules by meaning: the same letter means the same kind of rule on every sheet
_TOLERANCE_LETTERS = (("must not operate", "n"), ("functional test", "f"))


def tolerance_key(rule: str, timing_rules: list[str]) -> str:
    """The note letter of a tolerance rule: ``t`` timing (``t2``… for further timing rules), ``n`` no operation,
    ``f`` functional test."""
    for text, letter in _TOLERANCE_LETTERS:
        if rule == text:
            return letter
    if rule in timing_rules:
        i = timing_rules.index(rule)
        return "t" if i == 0 else f"t{i + 1}"
    return ""


def _timing_rules(record) -> list[str]:
    rules: list[str] = []
    known = {text for text, _ in _TOLERANCE_LETTERS}
    for f in record.functions:
        for t in f.test_points:
            if t.tolerance_rule and t.tolerance_rule not in known and t.tolerance_rule not in rules:
                rules.append(t.tolerance_rule)
    return rules


def commissioning_rows(record) -> list[CommissioningRow]:
    """The commissioning test table, numbered ``<function id>.<n>`` so a handwritten note can point at a row."""
    rows = []
    timing = _timing_rules(record)
    for f in record.functions:
        for n, t in enumerate(f.test_points, start=1):
            if t.secondary:
                secondary = quantity(t.applied, t.applied_unit)
                primary = quantity(t.applied_primary, t.applied_primary_unit) if t.applied_primary is not None \
                    else "—"
            else:
                primary = quantity(t.applied, t.applied_unit)
                secondary = "—"
            test = t.description or t.quantity
            if t.description and t.quantity and t.quantity.lower() not in t.description.lower():
                test = f"{t.quantity}: {t.description}"
            rows.append(CommissioningRow(
                number=t.id or f"{f.id}.{n}", fid=f.id, test=readable_keys(test),
                initial_state=t.initial_state or "—", applied_primary=primary, applied_secondary=secondary,
                expected="must not operate" if t.expected_time is None else quantity(t.expected_time, "s"),
                band=tolerance_band(t.expected_time, t.tolerance_time),
                tolerance_key=tolerance_key(t.tolerance_rule, timing) if t.tolerance_rule else "",
            ))
    return rows


def tolerance_notes(record) -> list[tuple[str, str]]:
    """The tolerance rules of the test points with their letters (timing rules first, then n, then f)."""
    used = {t.tolerance_rule for f in record.functions for t in f.test_points if t.tolerance_rule}
    timing = _timing_rules(record)
    out = [(tolerance_key(r, timing), r) for r in timing]
    out += [(letter, text) for text, letter in _TOLERANCE_LETTERS if text in used]
    return out


def tolerance_band(expected: float | None, tolerance: float) -> str:
    """The accepted operate-time band as printed: ``expected ± tolerance`` written as its two ends.

    >>> tolerance_band(71.3, 3.6), tolerance_band(0.05, 0.0), tolerance_band(None, 0.0)
    ('67.7 to 74.9 s', '0.05 s', 'no operation')
    """
    if expected is None:
        return "no operation"
    if not tolerance:
        return quantity(expected, "s")
    low = max(expected - tolerance, 0.0)
    return f"{quantity(low, '')} to {quantity(expected + tolerance, 's')}"


# ---------------------------------------------------------------------------------------------------- sign-off


def history_rows(record) -> list[tuple[str, str, str, str]]:
    """Revision history (revision, date, by, reason), oldest first, ending with this sheet's revision."""
    sheet = record.sheet or {}
    rows = [(str(h.get("revision", "")), str(h.get("date") or ""), str(h.get("by") or ""), str(h.get("reason") or ""))
            for h in sheet.get("history") or []]
    current = str(sheet.get("revision", record.revision))
    if current not in {r[0] for r in rows}:
        rows.append((current, str(sheet.get("date") or ""), str(sheet.get("prepared_by") or ""), "this revision"))
    return rows


def signoff_rows(record) -> list[tuple[str, str, str]]:
    """Role, name and date from the machine file; a step's date prints once the status has reached that step."""
    sheet = record.sheet or {}
    step = list(STATUS_TEXT).index(status_of(record))
    return [
        ("Prepared", str(sheet.get("prepared_by") or ""), str(sheet.get("date") or "")),
        ("Checked", str(sheet.get("checked_by") or ""), str(sheet.get("checked_on") or "") if step >= 1 else ""),
        ("Approved", str(sheet.get("approved_by") or ""), str(sheet.get("approved_on") or "") if step >= 2 else ""),
    ]
