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
    # the id and function name print on the first row of a function only
    assert [r.fid for r in first.rows] == ["49", "", ""]
    assert first.rows[0].function == "Stator thermal overload"
    assert first.references == "IEC 60255-149"
    assert first.basis.startswith("Pickup at service factor")


def test_setting_values_as_printed(record):
    rows = {(b.fid, r.setting): r for b in tables.settings_blocks(record) for r in b.rows}
    # layout: formatting.quantity prints 4 significant figures with the practitioner's unit
    assert rows[("49", "Pickup current")].primary == "213.9 A"
    assert rows[("49", "Pickup current")].relay_side == "4.278 A"
    # no instrument transformer applies to a time: the relay-side cell stays empty
    assert rows[("49", "Heating time constant")].relay_side == ""
    assert rows[("27", "Pickup voltage")].primary == "3.328 kV"
    assert rows[("51LR", "Speed switch required")].primary == "no"
    assert rows[("81U", "Stages")].primary == "48.5 Hz / 2 s; 48 Hz / 10 s"
    assert rows[("49", "Cooling time constant")].source == "maker data"
    assert rows[("50P", "Pickup current")].note == "2 × locked-rotor current"


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
    sections = dict(tables.input_sections(record))
    assert list(sections) == ["Machine", "Supply", "Instrument transformers", "Overrides"]
    machine = dict(sections["Machine"])
    assert machine["Rated voltage"] == "4.16 kV"  # the text as written, not a converted value
    assert machine["Cooling time constant"] == "180 min"
    assert machine["Power factor"] == "0.89"
    assert dict(sections["Instrument transformers"]) == {"Phase CT": "250/5 A", "VT": "4200/120 V"}
    assert dict(sections["Overrides"]) == {"51LR.pickup_current": "450 A"}  # override keys print as written


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
    assert tables.tolerance_notes(record) == [("a", "±5 % or ±30 ms, whichever is greater")]
    assert [r.tolerance_key for r in rows] == ["a", "", ""]


@pytest.mark.parametrize("module", ["reports.tables", "reports.plots", "reports.fonts", "reports.sheet_command"])
def test_doctests(module):
    # the examples in the reports modules' docstrings (pytest collects doctests under machines/ only)
    import doctest
    import importlib

    result = doctest.testmod(importlib.import_module(module), optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0
