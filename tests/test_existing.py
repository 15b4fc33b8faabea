"""What is already where a sheet or record is about to be written is never lost (reports.existing)."""

from __future__ import annotations

import json

import pytest

from machines.errors import InputError
from reports.existing import raw_keywords, refuse_to_replace, refuse_to_replace_record
from reports.sheet import build_sheet

try:
    from tests.test_sheet_records import FINGERPRINT, motor_record
except ImportError:  # tests/ on sys.path instead of the project root
    from test_sheet_records import FINGERPRINT, motor_record


@pytest.fixture(scope="module")
def sheets() -> dict[str, bytes]:
    other = motor_record(tag="P-101 A")
    return {"draft": build_sheet(motor_record()), "again": build_sheet(motor_record(description="Changed")),
            "other": build_sheet(other)}


def test_the_keywords_are_read_from_the_bytes(sheets):
    assert raw_keywords(sheets["draft"]) == {"inputs_fingerprint": FINGERPRINT, "revision": "2", "tag": "CH-M-101"}
    assert raw_keywords(b"%PDF-1.4 no keywords") == {}


def test_a_draft_of_the_same_machine_may_be_replaced(tmp_path, sheets):
    target = tmp_path / "s.pdf"
    for old in (b"", sheets["draft"]):
        target.write_bytes(old)
        refuse_to_replace(target, sheets["again"])  # no error
    refuse_to_replace(tmp_path / "absent.pdf", sheets["draft"])


@pytest.mark.parametrize("old, message", [
    (b"my notes", "not a PDF settings sheet"),
    (b"%PDF-1.4\n% someone else's report\n", "not a relaywright settings sheet"),
])
def test_a_file_that_is_no_sheet_is_kept(tmp_path, sheets, old, message):
    target = tmp_path / "s.pdf"
    target.write_bytes(old)
    with pytest.raises(InputError, match=message):
        refuse_to_replace(target, sheets["draft"])


def test_another_machines_sheet_is_kept(tmp_path, sheets):
    target = tmp_path / "s.pdf"
    target.write_bytes(sheets["other"])
    with pytest.raises(InputError, match=r"holds the sheet of another machine \(tag 'P-101 A'\)"):
        refuse_to_replace(target, sheets["draft"])


def test_an_issued_sheet_is_kept_by_its_record_beside_it(tmp_path, sheets):
    target = tmp_path / "s.pdf"
    target.write_bytes(sheets["draft"])
    record = motor_record().to_json()
    record["sheet"]["status"] = "issued"
    (tmp_path / "s.json").write_text(json.dumps(record), "utf-8")
    with pytest.raises(InputError, match="holds an issued sheet, which is never replaced"):
        refuse_to_replace(target, sheets["again"])
    with pytest.raises(InputError, match="record of an issued sheet"):
        refuse_to_replace_record(tmp_path / "s.json", "CH-M-101", "{}")
    with pytest.raises(InputError, match="record of another machine"):
        refuse_to_replace_record(tmp_path / "s.json", "P-101 A", "{}")


def test_a_link_or_a_folder_is_kept(tmp_path, sheets):
    (tmp_path / "real.pdf").write_bytes(sheets["draft"])
    (tmp_path / "link.pdf").symlink_to(tmp_path / "real.pdf")
    (tmp_path / "dir.pdf").mkdir()
    for name, message in (("link.pdf", "symbolic link"), ("dir.pdf", "is a folder")):
        with pytest.raises(InputError, match=message):
            refuse_to_replace(tmp_path / name, sheets["draft"])
