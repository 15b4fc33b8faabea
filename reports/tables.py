"""The sheet's tables as rows of plain strings, built from a settings record (pure functions, no reportlab).

Each function takes a :class:`machines.record.SettingsRecord` and returns rows in the order the sheet prints them.
The strings are the text as printed (units as a practitioner writes them, from :mod:`reports.formatting`); the
sheet only escapes and lays them out. Nothing here calculates a setting.
"""

from __future__ import annotations

import re
from typing import Any, NamedTuple

from reports.formatting import label_of, number, quantity, setting_primary, setting_secondary

STATUS_WORD = {"fail": "FAIL", "warn": "WARN", "ok": "ok"}
SOURCE_WORD = {"standard": "standard", "common-practice": "common practice", "maker-data": "maker data",
               "entered": "entered", "override": "override", "derived": "derived"}
KIND_WORD = {"induction-motor": "Induction motor", "synchronous-generator": "Synchronous generator"}
SECTION_TITLE = {"study": "Study", "machine": "Machine", "load": "Driven load", "supply": "Supply",
                 "grounding": "Grounding", "instruments": "Instrument transformers", "overrides": "Overrides"}


class SettingRow(NamedTuple):
    """One printed setting. ``fid`` and ``function`` are filled on the first row of each function only."""

    fid: str
    function: str
    setting: str
    primary: str
    relay_side: str
    source: str
    note: str


class FunctionBlock(NamedTuple):
    """A protection function's rows in the settings table, with the reason and references printed under them."""

    fid: str
    title: str
    enabled: bool
    rows: list[SettingRow]
    basis: str
    references: str


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


def identification_rows(record) -> list[tuple[str, str]]:
    """Label and value of the identification block."""
    sheet = record.sheet or {}
    status = str(sheet.get("status") or "draft")
    return [
        ("Tag", str(sheet.get("tag") or record.tag)),
        ("Description", str(sheet.get("description") or "")),
        ("Site", str(sheet.get("site") or "")),
        ("Machine", KIND_WORD.get(record.kind, record.kind)),
        ("Practice", str(record.practice)),
        ("Revision", str(sheet.get("revision", record.revision))),
        ("Date", str(sheet.get("date") or "")),
        ("Status", "issued" if status == "issued" else "draft (for review, not for use)"),
    ]


def input_sections(record) -> list[tuple[str, list[tuple[str, str]]]]:
    """The machine and system data as entered in the machine file, by section: (title, [(label, value)])."""
    out = []
    for section, table in (record.inputs or {}).items():
        if not isinstance(table, dict) or not table:
            continue
        rows = [(key if section == "overrides" else printed_label(key), as_entered(value))
                for key, value in table.items()]
        out.append((SECTION_TITLE.get(section, label_of(section)), rows))
    return out


_ACRONYMS = {"ct": "CT", "vt": "VT", "pu": "pu", "i2": "I2", "x2": "X2", "xd": "Xd", "xq": "Xq", "lr": "LR",
             "nema": "NEMA", "iec": "IEC", "ieee": "IEEE", "vhz": "V/Hz", "lv": "LV", "hv": "HV", "mv": "MV",
             "rocof": "RoCoF", "avr": "AVR"}


def printed_label(key: str, js: dict | None = None) -> str:
    """The printed name of a key, with the trade's abbreviations spelled as the trade writes them.

    >>> printed_label("phase_ct"), printed_label("xd_transient"), printed_label("vt")
    ('Phase CT', 'Xd transient', 'VT')
    """
    text = label_of(key, js)
    if js and js.get("label"):
        return text
    words = text.split(" ")
    return " ".join(_ACRONYMS.get(w.lower(), w) for w in words)


def as_entered(value: Any) -> str:
    """A value from the machine file as its writer typed it, units spelt as on paper (TOML for booleans).

    The number is never changed; only the unit's ASCII spelling is printed the way a practitioner writes it.

    >>> as_entered("6.6 kV"), as_entered(True), as_entered(0.89), as_entered([{"low": "47.5 Hz", "allowed": "60 s"}])
    ('6.6 kV', 'true', '0.89', 'low 47.5 Hz, allowed 60 s')
    >>> as_entered("34 kg*m^2"), as_entered("0.12 uF"), as_entered("0.6 ohm"), as_entered("quadratic")
    ('34 kg·m²', '0.12 µF', '0.6 Ω', 'quadratic')
    """
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, dict):
        return ", ".join(f"{k} {as_entered(v)}" for k, v in value.items())
    if isinstance(value, (list, tuple)):
        return "; ".join(as_entered(v) for v in value)
    if isinstance(value, str):
        m = _VALUE_UNIT.match(value)
        if m:
            return m.group(1) + _paper_unit(m.group(2))
    return str(value)


_VALUE_UNIT = re.compile(r"^([-+]?[0-9][0-9.eE+-]*\s*)([A-Za-zµΩ][A-Za-z0-9*/^·.µΩ% ]*)$")
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
        and all(list(v) == list(value[0]) for v in value)


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


def settings_blocks(record) -> list[FunctionBlock]:
    """The settings table: per function its setting rows, basis and references."""
    blocks = []
    for f in record.functions:
        rows = []
        for i, (key, s) in enumerate(f.settings.items()):
            js = s.to_json()
            rows.append(SettingRow(
                fid=f.id if i == 0 else "",
                function=(f.title + ("" if f.enabled else " (not enabled)")) if i == 0 else "",
                setting=printed_label(key, js),
                primary=setting_primary(js),
                relay_side=setting_secondary(js),
                source=SOURCE_WORD.get(s.source, str(s.source)),
                note=s.note,
            ))
        if not rows:
            rows.append(SettingRow(f.id, f.title + ("" if f.enabled else " (not enabled)"), "", "", "", "", ""))
        blocks.append(FunctionBlock(f.id, f.title, f.enabled, rows, f.basis, "; ".join(f.references)))
    return blocks


def finding_rows(record, include_ok: bool = True) -> list[FindingRow]:
    """Every finding, fails first, then warnings, then (optionally) the checks that passed."""
    return [FindingRow(STATUS_WORD.get(c.status, c.status), fid, c.message)
            for fid, c in record.all_checks() if include_ok or c.status != "ok"]


def commissioning_rows(record) -> list[CommissioningRow]:
    """The commissioning test table, numbered ``<function id>.<n>`` so a handwritten note can point at a row."""
    rows = []
    keys = dict(tolerance_notes(record))
    keys = {rule: key for key, rule in keys.items()}
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
                number=f"{f.id}.{n}", fid=f.id, test=test, initial_state=t.initial_state or "—",
                applied_primary=primary, applied_secondary=secondary,
                expected="must not operate" if t.expected_time is None else quantity(t.expected_time, "s"),
                band=tolerance_band(t.expected_time, t.tolerance_time),
                tolerance_key=keys.get(t.tolerance_rule, ""),
            ))
    return rows


def tolerance_notes(record) -> list[tuple[str, str]]:
    """The distinct tolerance rules of the test points, keyed a, b, c ... in order of first use."""
    rules: list[str] = []
    for f in record.functions:
        for t in f.test_points:
            if t.tolerance_rule and t.tolerance_rule not in rules:
                rules.append(t.tolerance_rule)
    return [(_letters(i), rule) for i, rule in enumerate(rules)]


def _letters(i: int) -> str:
    """0 → a, 25 → z, 26 → aa."""
    out = ""
    i += 1
    while i:
        i, r = divmod(i - 1, 26)
        out = chr(97 + r) + out
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
    """Role, name (from the machine file) and date; the date of checking and approval is written by hand."""
    sheet = record.sheet or {}
    return [
        ("Prepared", str(sheet.get("prepared_by") or ""), str(sheet.get("date") or "")),
        ("Checked", str(sheet.get("checked_by") or ""), ""),
        ("Approved", str(sheet.get("approved_by") or ""), ""),
    ]
