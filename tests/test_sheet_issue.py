"""What the engineer signs and the technician keys in, read back from the PDF with poppler's pdftotext and pdfsig
(independent of reportlab): draft marks, the visible signature, the keying list, labels instead of internal names,
the creation date and reproducible bytes. Layout checks, no published source."""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest

from machines.files import load_case, section_specs
from machines.study import run_study
from reports import tables
from reports.sheet import build_sheet

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
needs_poppler = pytest.mark.skipif(shutil.which("pdftotext") is None, reason="pdftotext (poppler-utils) is not "
                                                                              "installed")


def pdftotext(pdf: bytes, tmp_path: Path, name: str = "sheet.pdf") -> list[str]:
    path = tmp_path / name
    path.write_bytes(pdf)
    out = subprocess.run(["pdftotext", "-layout", str(path), "-"], capture_output=True, text=True, check=True).stdout
    return out.split("\f")[:-1] if out.endswith("\f") else out.split("\f")


def one_space(text: str) -> str:
    return re.sub(r"\s+", " ", text.replace("\u00a0", " "))


def issued_text(path: Path) -> str:
    return path.read_text("utf-8").replace('status = "draft"', 'status = "issued"\nchecked_on = "2026-11-21"\n'
                                           'approved_on = "2026-11-22"', 1)


@pytest.fixture(scope="module")
def records():
    return {p.stem: run_study(*load_case(p)) for p in EXAMPLES}


@needs_poppler
def test_a_draft_says_draft_on_every_page(records, tmp_path):
    for name, record in records.items():
        pages = pdftotext(build_sheet(record), tmp_path, f"{name}.pdf")
        assert len(pages) >= 5
        for page in pages:
            assert "DRAFT" in page, name


@needs_poppler
def test_an_issued_signed_sheet_has_no_draft_marks_and_a_visible_valid_signature(tmp_path, monkeypatch):
    from tests.test_signing import make_p12
    from wizard.sheet_command import make_sheet

    machine = tmp_path / "motor.toml"
    machine.write_text(issued_text(EXAMPLES[0]), "utf-8")
    key = make_p12(tmp_path / "approver.p12", "M. Sato", "pw")
    monkeypatch.setenv("RELAYWRIGHT_SIGN_PASSWORD", "pw")
    out = tmp_path / "issued.pdf"
    make_sheet(machine, output=out, sign=key)
    pages = pdftotext(out.read_bytes(), tmp_path, "issued-copy.pdf")
    text = "\n".join(pages)
    assert "draft" not in text.lower()
    assert "Digitally signed by M. Sato" in pages[-1]  # the visible signature, in the sign-off block
    assert "2026-11-22" in pages[-1]  # the approval date
    if shutil.which("pdfsig"):
        report = subprocess.run(["pdfsig", str(out)], capture_output=True, text=True).stdout
        assert "Signature is Valid." in report and "M. Sato" in report


def test_signing_is_for_issuing(tmp_path, monkeypatch):
    from machines.errors import InputError
    from tests.test_signing import make_p12
    from wizard.sheet_command import make_sheet

    key = make_p12(tmp_path / "k.p12", "A. Okafor", "pw")
    monkeypatch.setenv("RELAYWRIGHT_SIGN_PASSWORD", "pw")
    with pytest.raises(InputError, match=r"--sign: signing is for issuing"):
        make_sheet(EXAMPLES[0], output=tmp_path / "x.pdf", sign=key)
    assert not (tmp_path / "x.pdf").exists()


def test_an_issued_revision_is_locked(tmp_path):
    from machines.errors import InputError
    from wizard.sheet_command import make_sheet

    machine = tmp_path / "motor.toml"
    machine.write_text(issued_text(EXAMPLES[0]), "utf-8")
    out = tmp_path / "issued.pdf"
    make_sheet(machine, output=out)
    first = out.read_bytes()
    make_sheet(machine, output=out)  # the same sheet again: nothing changes
    machine.write_text(issued_text(EXAMPLES[0]).replace('rated_current = "186 A"', 'rated_current = "190 A"'))
    with pytest.raises(InputError, match="an issued revision is locked"):
        make_sheet(machine, output=out)
    assert out.read_bytes() == first


@pytest.mark.parametrize("status, missing", [("checked", "sheet.checked_on"), ("approved", "sheet.approved_on"),
                                             ("issued", "sheet.approved_on")])
def test_each_step_names_who_and_when(tmp_path, status, missing):
    from machines.errors import InputError

    text = EXAMPLES[0].read_text("utf-8").replace('status = "draft"', f'status = "{status}"\n'
                                                  'checked_on = "2026-11-21"' if status != "checked" else
                                                  f'status = "{status}"', 1)
    path = tmp_path / "m.toml"
    path.write_text(text, "utf-8")
    with pytest.raises(InputError, match=missing.replace(".", r"\.")):
        load_case(path)


def test_dates_are_iso(tmp_path):
    from machines.errors import InputError

    path = tmp_path / "m.toml"
    path.write_text(EXAMPLES[0].read_text("utf-8").replace('date = "2026-11-20"', 'date = "20/11/2026"'))
    with pytest.raises(InputError, match=r"sheet\.date: expected an ISO date such as 2026-11-30, got '20/11/2026'"):
        load_case(path)


@needs_poppler
def test_the_keying_list_holds_every_setting_relay_side(records, tmp_path):
    for name, record in records.items():
        pages = pdftotext(build_sheet(record), tmp_path, f"{name}.pdf")
        start = next(i for i, p in enumerate(pages) if "Keying list" in p)
        end = next(i for i, p in enumerate(pages) if "Drawings" in p)
        keying = one_space(" ".join(pages[start:end]))
        n = 0
        for f in record.functions:
            assert f" {f.id} " in keying, (name, f.id)
            for key, s in f.settings.items():
                if not tables.is_setting(s) or key == "enabled":
                    continue
                if isinstance(s.value, list):
                    expected = [tables.stage_text(stage) for stage in s.value]
                elif s.secondary is not None:  # relay side, in relay-side units
                    expected = [tables.value_to_set(s.secondary, s.secondary_unit, s.step)]
                else:
                    expected = [tables.value_to_set(s.value, s.unit, s.step)]
                for value in expected:
                    # a list of words (elements blocked, say) may wrap inside its cell: each item is there
                    parts = value.replace(",", " ").split() if isinstance(s.value, str) else [value]
                    for part in parts:
                        assert one_space(part) in keying, (name, f.id, key, value)
                    n += 1
        assert n >= 15


_ENUMS = sorted({c for specs in (section_specs("induction-motor"), section_specs("synchronous-generator"))
                 for fields in specs.values() for spec in fields.values() for c in spec.choices if "-" in c} |
                {"common-practice", "maker-data"})


@needs_poppler
def test_no_raw_internal_names_or_unset_formulas(records, tmp_path):
    for name, record in records.items():
        text = "\n".join(pdftotext(build_sheet(record), tmp_path, f"{name}.pdf"))
        text = text.split("Inputs fingerprint")[0]  # the fingerprint line is hexadecimal by design
        for enum in _ENUMS:  # a value printed as it is stored: alone in its column (prose such as
            # "high-resistance grounding" in a basis sentence is English, not an internal value)
            assert not re.search(rf"(?m)(^|\s{{2,}}|: ){re.escape(enum)}(\s{{2,}}|$|,)", text), (name, enum)
        snake = re.findall(r"\b[a-z][a-z0-9]*_[a-z0-9_]+\b", text)
        assert snake == [], (name, snake[:5])
        assert "^" not in text, name
        assert not re.findall(r"[A-Za-z]_[A-Za-z0-9]", text), (name, re.findall(r"\S*[A-Za-z]_[A-Za-z0-9]\S*",
                                                                                 text)[:5])


def test_creation_date_is_the_revision_date_and_bytes_repeat(records):
    import io

    from pypdf import PdfReader

    for name, record in records.items():
        pdf = build_sheet(record)
        assert build_sheet(record) == pdf, name
        date = str(record.sheet.get("date"))
        meta = PdfReader(io.BytesIO(pdf)).metadata
        assert meta["/CreationDate"].startswith("D:" + date.replace("-", "")), name


def test_a_revised_sheet_marks_what_changed(tmp_path, capsys):
    from wizard.sheet_command import make_sheet

    old = EXAMPLES[0].read_text("utf-8")
    (tmp_path / "motor.rev1.toml").write_text(old, "utf-8")
    new = old.replace("revision = 1", "revision = 2").replace('rated_current = "186 A"', 'rated_current = "190 A"')
    machine = tmp_path / "motor.toml"
    machine.write_text(new, "utf-8")
    out = tmp_path / "rev2.pdf"
    make_sheet(machine, output=out)
    import io

    from pypdf import PdfReader

    text = " ".join(p.extract_text() for p in PdfReader(io.BytesIO(out.read_bytes())).pages)
    assert "Changed since revision 1" in text
    assert "Machine: rated current" in text and "186 A" in text and "190 A" in text
