"""The sheet's rows, tested as rows (reports.tables is pure: record in, strings out)."""

from __future__ import annotations

import pytest

from reports import tables

try:
    from tests.test_sheet_records import motor_record
except ImportError:  # tests/ on sys.path instead of the project root
    from test_sheet_records import motor_record


@pytest.fixture
def record():
    return motor_record()


def test_settings_blocks_follow_the_functions_in_order(record):
    blocks = tables.settings_blocks(record)
    assert [b.fid for b in blocks] == ["49", "51LR", "50P", "81U", "27"]
    first = blocks[0]
    # the id and function name print on the first row of a function only; a derived value is no setting row
    assert [r.fid for r in first.rows] == ["49", ""]
    assert first.rows[0].function == "Stator thermal overload"
    assert first.references == "IEC 60255-149"
    assert first.basis.startswith("Pickup at service factor")
    assert [d.label for d in first.derived] == ["Heating time constant"]


def test_setting_values_as_printed(record):
    rows = {(b.fid, r.setting): r for b in tables.settings_blocks(record) for r in b.rows}
    # layout: formatting.quantity prints 4 significant figures with the practitioner's unit
    assert rows[("49", "Pickup current")].primary == "213.9 A"
    assert rows[("49", "Pickup current")].relay_side == "4.278 A"
    # no instrument transformer applies to a time: the value to set is the value itself
    assert rows[("49", "Cooling time constant")].primary == ""
    assert rows[("49", "Cooling time constant")].relay_side == "10800 s"
    assert rows[("27", "Pickup voltage")].primary == "3.328 kV"
    # one row per stage of a stage list
    assert rows[("81U", "Stage 1")].relay_side == "48.5 Hz for 2 s"
    assert rows[("81U", "Stage 2")].relay_side == "48 Hz for 10 s"
    assert rows[("49", "Cooling time constant")].source == "maker data"
    assert rows[("50P", "Pickup current")].note == "2 × locked-rotor current"
    derived = {(d.fid, d.label): d for b in tables.settings_blocks(record) for d in b.derived}
    assert derived[("51LR", "Speed switch required")].value == "no"


def test_values_to_set_follow_the_step():
    from machines.record import Setting

    assert tables.value_to_set(3.7, "A", 0.01) == "3.70 A"
    assert tables.value_to_set(1350.0, "s", 6.0) == "22.5 min"  # a 0.1 min step prints minutes
    assert tables.value_to_set(1.45, "", 0.05) == "1.45"
    assert tables.is_setting(Setting(1.0, "s", "derived", step=0.01))  # rounded to a relay step: keyed in
    assert not tables.is_setting(Setting(51.5, "s", "derived"))  # an operate time it achieves
    assert not tables.is_setting(Setting(5704.0, "ohm", "standard", keyed=False))  # equipment the study sized


def test_keying_list_holds_every_setting_relay_side(record):
    keyed = tables.keying_list(record)
    assert [f.fid for f in keyed] == ["49", "51LR", "50P", "81U", "27"]
    rows = {(f.fid, r.label): r for f in keyed for r in f.rows}
    assert rows[("49", "Pickup current")].value == "4.278 A"  # relay side
    assert rows[("27", "Pickup voltage")].value == "96 V"
    assert ("49", "Heating time constant") not in rows  # derived, not keyed
    assert {f.fid: f.state for f in keyed}["27"] == "off"
    assert rows[("49", "Pickup current")].output == tables.OUT_TRIP
    setup = dict(tables.keying_setup(record))
    assert setup["Phase CT ratio"] == "250/5 A" and setup["VT ratio"] == "4200/120 V"
    assert setup["Nominal frequency"] == "60 Hz"
    assert setup["Phase rotation"].startswith("A-B-C")


def test_disabled_function_says_so(record):
    block = tables.settings_blocks(record)[-1]
    assert block.fid == "27" and not block.enabled
    assert block.rows[0].function == "Undervoltage (not enabled)"


def test_findings_fail_first_then_warn_then_ok(record):
    rows = tables.finding_rows(record)
    assert [r.status for r in rows] == ["FAIL", "WARN", "WARN", "ok"]
    assert rows[0].fid == "50P"
    assert "" in {r.fid for r in rows}  # a machine-wide finding has no function id
    assert [r.status for r in tables.finding_rows(record, include_ok=False)] == ["FAIL", "WARN", "WARN"]


def test_test_rows(record):
    rows = tables.commissioning_rows(record)
    assert [r.number for r in rows] == ["49.1", "49.2", "51LR.1"]
    r = rows[0]
    assert (r.applied_primary, r.applied_secondary, r.initial_state) == ("500 A", "10 A", "cold")
    assert r.expected == "71.3 s"
    # the accepted band is expected ± tolerance: 71.3 - 3.6 = 67.7 and 71.3 + 3.6 = 74.9 (arithmetic)
    assert r.band == "67.7 to 74.9 s"
    assert (r.measured, r.result) == ("", "")  # filled in by hand
    assert rows[1].expected == "must not operate" and rows[1].band == "no operation"
    assert rows[2].initial_state == "—"


def test_primary_injection_has_no_relay_side_value(record):
    from machines.record import TestPoint

    record.functions[0].test_points = [TestPoint("current", 500.0, "A", 20.0, 1.0, secondary=False)]
    (row,) = [r for r in tables.commissioning_rows(record) if r.fid == "49"]
    assert (row.applied_primary, row.applied_secondary) == ("500 A", "—")


@pytest.mark.parametrize("expected, tolerance, text", [
    (71.3, 3.6, "67.7 to 74.9 s"),  # band ends by subtraction and addition
    (0.05, 0.0, "0.05 s"),  # no tolerance given: the expected time alone
    (0.02, 0.05, "0 to 0.07 s"),  # a band never starts below zero time
    (None, 0.0, "no operation"),  # a must-not-operate point
])
def test_tolerance_band(expected, tolerance, text):
    assert tables.tolerance_band(expected, tolerance) == text


def test_history_ends_with_this_revision(record):
    rows = tables.history_rows(record)
    assert rows == [("1", "2026-10-02", "A. Okafor", "first issue"), ("2", "2026-11-20", "A. Okafor", "this revision")]
    record.sheet["history"].append({"revision": 2, "date": "2026-11-20", "by": "A. Okafor", "reason": "new CT"})
    assert tables.history_rows(record)[-1] == ("2", "2026-11-20", "A. Okafor", "new CT")


def test_signoff_names_from_the_machine_file(record):
    assert tables.signoff_rows(record) == [("Prepared", "A. Okafor", "2026-11-20"), ("Checked", "L. Brandt", ""),
                                           ("Approved", "M. Sato", "")]


def test_inputs_as_entered(record):
    sections = {title: {label: value for label, value, _ in rows} for title, rows in tables.input_sections(record)}
    assert list(sections) == ["Machine", "Supply", "Instrument transformers", "Overrides"]
    machine = sections["Machine"]
    assert machine["Rated voltage"] == "4.16 kV"
    assert machine["Kind of machine"] == "induction motor"  # a choice prints as words
    assert machine["Cooling time constant"] == "180 min"
    assert machine["Power factor"] == "0.89"
    assert sections["Instrument transformers"] == {"Phase CT ratio": "250/5 A", "VT ratio": "4200/120 V"}
    assert sections["Overrides"] == {"51LR Pickup current": "450 A"}  # override keys print with their label
    notes = {label: note for _, rows in tables.input_sections(record) for label, _, note in rows}
    # 1500 hp in the file's unit for output, kW (1 hp = 745.7 W: 1118.5 kW)
    assert machine["Rated output"] == "1119 kW" and notes["Rated output"] == "entered as 1500 hp"


def test_identification(record):
    rows = dict(tables.identification_rows(record))
    assert rows["Tag"] == "CH-M-101"
    assert rows["Status"].startswith("draft")
    assert rows["Machine"] == "Induction motor"
    record.sheet["status"] = "issued"
    assert dict(tables.identification_rows(record))["Status"] == "issued"


def test_derived_rows(record):
    assert tables.derived_rows(record) == [("Locked rotor current", "1153 A (23.06 A relay side)", ""),
                                           ("Acceleration time", "7.9 s", "")]


def test_derived_tables(record):
    from machines.record import Setting

    record.derived["derating"] = Setting([{"unbalance": 1.0, "factor": 0.9985}, {"unbalance": 2.0, "factor": 0.95}],
                                         "", "derived", label="Unbalance derating", note="NEMA MG 1")
    assert [r[0] for r in tables.derived_rows(record)] == ["Locked rotor current", "Acceleration time"]
    assert tables.derived_tables(record) == [("Unbalance derating (NEMA MG 1)", ["Unbalance", "Factor"],
                                              [["1", "0.9985"], ["2", "0.95"]])]


def test_tolerance_notes_are_keyed(record):
    rows = tables.commissioning_rows(record)
    # letters by meaning, the same on every sheet: t timing, n no operation, f functional test
    assert tables.tolerance_notes(record) == [("t", "±5 % or ±30 ms, whichever is greater")]
    assert [r.tolerance_key for r in rows] == ["t", "", ""]


@pytest.mark.parametrize("module", ["reports.tables", "reports.plots", "reports.fonts",
                                    "wizard.sheet_command"])
def test_doctests(module):
    # the examples in the reports modules' docstrings (pytest collects doctests under machines/ only)
    import doctest
    import importlib

    result = doctest.testmod(importlib.import_module(module), optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0


def test_every_choice_of_the_machine_file_has_a_word_for_the_sheet():
    # the sheet prints words, never a raw choice value such as "unit-transformer"
    from dataclasses import fields

    from machines.files import MACHINE_KINDS, SECTIONS
    from reports.tables import CHOICE_WORD

    classes = [c for c in SECTIONS.values() if c is not None] + list(MACHINE_KINDS.values())
    seen, missing = set(), []
    while classes:
        cls = classes.pop()
        if cls in seen:
            continue
        seen.add(cls)
        for f in fields(cls):
            spec = f.metadata.get("spec")
            if spec is None:
                continue
            if spec.item is not None:
                classes.append(spec.item)
            if spec.kind == "choice" and f.name not in ("page_size", "status", "insulation_class"):
                missing += [c for c in spec.choices if c not in CHOICE_WORD]
    assert not missing, f"add words for these choices to reports.tables.CHOICE_WORD: {missing}"
