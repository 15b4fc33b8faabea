"""What changed between two revisions of a machine: inputs, settings and derived values, old → new.

Inputs are compared on their validated values (the canonical inputs that the fingerprint is made of, see
:func:`machines.record.canonical_inputs`), so ``"6.6 kV"`` against ``"6600 V"`` is no change; a change is shown as
the values were entered in the two files. Settings and derived values are compared as the settings record writes
them (six significant figures), so float noise below that is no change either.

Sheet bookkeeping the tool manages itself (``sheet.revision``, ``sheet.date``, ``sheet.history``) is left out: a
revision always changes them. The other sheet fields (tag, description, names, status, page size) are compared.

Each change carries a label for the screen ("Full-load current", "49 Stator thermal overload · Pickup current"):
the caller passes the labels of the input keys (the wizard's question labels); settings and derived values take
the labels of the record. Settings keyed into the relay are kept apart from what is not keyed (derived values and
what a setting achieves), so a reader sees first what must be re-entered into the relay.

This module returns data only; ``reports.changes`` prints it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from machines.files import section_specs
from machines.model import MachineCase
from machines.record import Setting, SettingsRecord, canonical_inputs
from machines.units import KINDS

ABSENT = "not given"  #: shown for an input that one of the files does not give
SECTION_ORDER = ("sheet", "study", "machine", "load", "supply", "grounding", "instruments")
_SHEET_SKIPPED = {"revision", "date", "history"}  # managed by the tool: every revision changes them
_STAGE_UNITS = {"frequency": "Hz", "time_delay": "s", "low": "Hz", "high": "Hz", "allowed": "s"}


@dataclass
class Change:
    """One changed item: its key path, the old and new values as display strings, and its name on screen."""

    key: str
    old: str
    new: str
    label: str = field(default="", compare=False)

    @property
    def name(self) -> str:
        """The label, else the key path."""
        return self.label or self.key


@dataclass
class Changes:
    """Everything that changed between two revisions, by kind: inputs, settings keyed into the relay, derived
    values (and settings not keyed); ``warnings`` when the two files are not the same machine."""

    inputs: list[Change] = field(default_factory=list)
    settings: list[Change] = field(default_factory=list)
    derived: list[Change] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)

    @property
    def empty(self) -> bool:
        return not (self.inputs or self.settings or self.derived)

    def __iter__(self):
        """All changes: inputs, then settings, then derived values."""
        yield from self.inputs
        yield from self.settings
        yield from self.derived


def compare(old_case: MachineCase, old_record: SettingsRecord, new_case: MachineCase,
            new_record: SettingsRecord, labels: dict[str, str] | None = None) -> Changes:
    """The inputs, settings and derived values that differ between two studied machine files.

    ``labels`` names input keys on screen (``{"machine.rated_current": "Full-load current"}``); a key without one
    is named by its words and section.
    """
    settings = setting_changes(old_record, new_record)
    inputs = input_changes(old_case, new_case, old_record, new_record)
    for c in inputs:
        c.label = _input_label(c.key, labels or {}, new_record, old_record)
    derived = _setting_dict_changes("derived.", old_record.derived, new_record.derived)
    return Changes(
        inputs=inputs,
        settings=[c for c in settings if not _unkeyed(c, old_record, new_record)],
        derived=derived + [c for c in settings if _unkeyed(c, old_record, new_record)],
        warnings=different_machines(old_case, new_case),
    )


_KIND_NAMES = {"induction-motor": "an induction motor", "synchronous-generator": "a synchronous generator"}


def different_machines(old_case: MachineCase, new_case: MachineCase) -> list[str]:
    """Why two files may not be two revisions of one machine: another kind of machine, another tag."""
    out = []
    a, b = old_case.machine.kind, new_case.machine.kind
    if a != b:
        out.append(f"these are different kinds of machine: the first file is {_KIND_NAMES.get(a, a)}, the second "
                   f"{_KIND_NAMES.get(b, b)}; every input and setting below differs for that reason")
    elif old_case.sheet.tag != new_case.sheet.tag:
        out.append(f"the tags differ ({old_case.sheet.tag} and {new_case.sheet.tag}): check that both files are "
                   "the same machine")
    return out


def _words(name: str) -> str:
    text = name.replace("_", " ")
    return text[:1].upper() + text[1:]


def _input_label(key: str, labels: dict[str, str], *records: SettingsRecord) -> str:
    if key in labels:
        return labels[key]
    section, _, name = key.partition(".")
    if section == "overrides":
        fid, _, setting = name.partition(".")
        return f"Override of {_setting_label(fid, setting, *records)}"
    return f"{_words(name)} ({section})"


def _setting_label(fid: str, name: str, *records: SettingsRecord) -> str:
    """'49 Stator thermal overload · Pickup current': the function's title and the setting's label."""
    for r in records:
        f = r.function(fid) if r is not None else None
        if f is not None:
            s = f.settings.get(name)
            label = (s.label if s is not None and s.label else _words(name)) if name else ""
            return f"{fid} {f.title}" + (f" · {label}" if label else "")
    return f"{fid} · {_words(name)}" if name else fid


def _unkeyed(c: Change, *records: SettingsRecord) -> bool:
    """A setting that is not keyed into the relay (equipment sized, what a setting achieves)."""
    fid, _, name = c.key.partition(".")
    for r in records:
        f = r.function(fid)
        if f is not None and name in f.settings:
            return not f.settings[name].keyed
    return False


# ---------------------------------------------------------------------------------------------------- inputs


def input_changes(old_case: MachineCase, new_case: MachineCase, old_record: SettingsRecord | None = None,
                  new_record: SettingsRecord | None = None) -> list[Change]:
    """Inputs whose validated values differ, shown as entered (sections in file order, keys in model order).

    An override whose text differs but whose value in both records is the same (``"180 A"`` against
    ``"0.18 kA"``) is no change; the records are needed for that, without them override texts are compared.
    """
    old_v, new_v = _validated(old_case), _validated(new_case)
    changes = []
    for key in _union(old_v, new_v):
        if old_v.get(key) != new_v.get(key):
            old, new = _entered(old_case, key), _entered(new_case, key)
            if old == new:  # written alike, read differently: e.g. "6.2 pu" of a changed rated current
                unit = _si_unit(new_case, key)
                old += f" (= {show_value(old_v.get(key), unit)})"
                new += f" (= {show_value(new_v.get(key), unit)})"
            changes.append(Change(key, old, new))
    old_o, new_o = dict(old_case.overrides), dict(new_case.overrides)
    for name in _union(old_o, new_o):
        if " ".join(old_o.get(name, "").split()) == " ".join(new_o.get(name, "").split()):
            continue
        if name in old_o and name in new_o and _same_override(name, old_record, new_record):
            continue
        changes.append(Change(f"overrides.{name}", old_o.get(name, ABSENT), new_o.get(name, ABSENT)))
    return changes


def _validated(case: MachineCase) -> dict[str, Any]:
    """Flat ``{"section.key": validated value}`` of one case (tables and ratios kept whole)."""
    data = canonical_inputs(case)
    out: dict[str, Any] = {}
    sheet = case.sheet
    for name in section_specs(case.machine.kind)["sheet"]:
        if name not in _SHEET_SKIPPED:
            out[f"sheet.{name}"] = getattr(sheet, name)
    for section in SECTION_ORDER[1:]:
        values = data.get(section) or {}
        for name, value in values.items():
            out[f"{section}.{name}"] = value
    return out


def _entered(case: MachineCase, key: str) -> str:
    """The value of ``key`` as written in the case's file; the default or 'not given' when it was not written."""
    section, _, name = key.partition(".")
    table = case.entered.get(section)
    if isinstance(table, dict) and name in table:
        return _as_written(table[name])
    specs = section_specs(case.machine.kind).get(section, {})
    spec = specs.get(name)
    if spec is not None and spec.default is not None:
        return f"{spec.default} (default)"
    chosen = getattr(getattr(case, section, None), name, None)
    if spec is not None and spec.kind == "choice" and isinstance(chosen, str) and chosen:
        return f"{chosen} (default)"  # e.g. study.practice, chosen by frequency
    return ABSENT


def _si_unit(case: MachineCase, key: str) -> str:
    """The SI unit the validated value of ``key`` is held in ('' when it is not a quantity)."""
    section, _, name = key.partition(".")
    spec = section_specs(case.machine.kind).get(section, {}).get(name)
    if spec is None:
        return ""
    if spec.kind == "current_or_pu":
        return "A"
    return KINDS[spec.kind].si_unit if spec.kind in KINDS else ""


def _as_written(raw: Any) -> str:
    if isinstance(raw, bool):
        return "true" if raw else "false"
    if isinstance(raw, list):  # a table such as machine.frequency_limits
        rows = ["; ".join(f"{k} {_as_written(v)}" for k, v in row.items()) if isinstance(row, dict)
                else _as_written(row) for row in raw]
        return " | ".join(rows) if rows else "none"
    return str(raw)


def _same_override(name: str, old_record: SettingsRecord | None, new_record: SettingsRecord | None) -> bool:
    """True when an override written differently gives the same value in both records."""
    if old_record is None or new_record is None:
        return False
    fid, _, key = name.partition(".")
    old_f, new_f = old_record.function(fid), new_record.function(fid)
    if old_f is None or new_f is None or key not in old_f.settings or key not in new_f.settings:
        return False
    return old_f.settings[key].to_json()["value"] == new_f.settings[key].to_json()["value"]


# ---------------------------------------------------------------------------------------------------- settings


def setting_changes(old_record: SettingsRecord, new_record: SettingsRecord) -> list[Change]:
    """Functions added, removed, taken in or out of service, and settings whose recorded values differ."""
    old_f = {f.id: f for f in old_record.functions}
    new_f = {f.id: f for f in new_record.functions}
    changes = []
    for fid in _union(old_f, new_f):
        before, after = old_f.get(fid), new_f.get(fid)
        if before is None:
            changes.append(Change(fid, "not in the study", "added to the study", f"{fid} {after.title}"))
            continue
        if after is None:
            changes.append(Change(fid, "in the study", "removed from the study", f"{fid} {before.title}"))
            continue
        if before.enabled != after.enabled:
            changes.append(Change(fid, _in_service(before.enabled), _in_service(after.enabled),
                                  f"{fid} {after.title}"))
        for c in _setting_dict_changes(f"{fid}.", before.settings, after.settings):
            c.label = _setting_label(fid, c.key.partition(".")[2], new_record, old_record)
            changes.append(c)
    return changes


def _in_service(enabled: bool) -> str:
    return "in service" if enabled else "out of service"


def _setting_dict_changes(prefix: str, old: dict[str, Setting], new: dict[str, Setting]) -> list[Change]:
    changes = []
    for name in _union(old, new):
        a, b = old.get(name), new.get(name)
        label = next((x.label for x in (b, a) if x is not None and x.label), "") or _words(name)
        if a is None or b is None:
            changes.append(Change(prefix + name, "—" if a is None else _show_setting(a),
                                  "—" if b is None else _show_setting(b), label))
            continue
        ja, jb = a.to_json(), b.to_json()
        ja.pop("label", None), jb.pop("label", None), ja.pop("note", None), jb.pop("note", None)
        if ja == jb:
            continue
        if _is_table(a.value) or _is_table(b.value):  # a derived table: say that it changed, not every cell
            changes.append(Change(prefix + name, _rows(a.value), _rows(b.value) + ", values changed", label))
            continue
        secondary = ja.get("secondary") != jb.get("secondary")  # the value keyed into the relay changed
        source = ja["source"] != jb["source"]
        was, now = _show_setting(a, secondary, source), _show_setting(b, secondary, source)
        if was == now:  # they differ below four figures: show the six the record keeps
            was, now = _show_setting(a, secondary, source, 6), _show_setting(b, secondary, source, 6)
        changes.append(Change(prefix + name, was, now, label))
    return changes


def _is_table(value: Any) -> bool:
    return isinstance(value, (list, tuple)) and len(value) > 4


def _rows(value: Any) -> str:
    return f"table of {len(value)} rows" if isinstance(value, (list, tuple)) else show_value(value)


def _show_setting(s: Setting, secondary: bool = False, source: bool = False, digits: int = 4) -> str:
    """A setting as a short display string: primary value and unit, the relay-side value and source if asked."""
    text = show_value(s.value, s.unit, digits)
    if secondary and s.secondary is not None:
        text += f" ({show_value(s.secondary, s.secondary_unit, digits)} secondary)"
    if source:
        text += f" [{s.source}]"
    return text


def show_value(value: Any, unit: str = "", digits: int = 4) -> str:
    """A record value as a display string: numbers to ``digits`` significant figures with the record's (SI) unit.

    >>> show_value(105.63, "A"), show_value(True), show_value([{"frequency": 57.5, "time_delay": 10.0}])
    ('105.6 A', 'yes', '57.5 Hz / 10 s')
    """
    if isinstance(value, bool):
        return "yes" if value else "no"
    if value is None:
        return "—"
    if isinstance(value, (int, float)):
        return f"{value:.{digits}g} {unit}".strip()
    if isinstance(value, (list, tuple)):
        return "; ".join(" / ".join(show_value(v, _STAGE_UNITS.get(k, ""), digits) for k, v in item.items())
                         if isinstance(item, dict) else show_value(item, "", digits) for item in value) or "none"
    return str(value)


def _union(a, b) -> list:
    """Keys of ``a`` in order, then those only in ``b``."""
    return list(a) + [k for k in b if k not in a]
