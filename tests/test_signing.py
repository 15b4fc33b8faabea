"""Signing a sheet (PAdES) and verifying it, checked with pyHanko and with poppler's independent pdfsig."""

from __future__ import annotations

import datetime
import io
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from machines.errors import InputError
from reports.sheet import build_sheet
from reports.signing import sign_pdf, verify_command, verify_pdf

try:
    from tests.test_sheet_records import FINGERPRINT, motor_record
except ImportError:  # tests/ on sys.path instead of the project root
    from test_sheet_records import FINGERPRINT, motor_record

EXAMPLE = Path(__file__).resolve().parent.parent / "examples" / "chiller-compressor-motor.toml"
PASSWORD = "correct horse"


def issued(text: str) -> str:
    """A machine file's text with its sheet checked, approved and issued (signing is for issuing)."""
    return text.replace('status = "draft"', 'status = "issued"\nchecked_on = "2026-11-21"\n'
                                            'approved_on = "2026-11-22"', 1)


def make_p12(path: Path, common_name: str, password: str) -> Path:
    """A self-signed RSA certificate and its key as PKCS#12, made with `cryptography` (a pyHanko dependency)."""
    from cryptography import x509
    from cryptography.hazmat.primitives import hashes, serialization
    from cryptography.hazmat.primitives.asymmetric import rsa
    from cryptography.hazmat.primitives.serialization import pkcs12
    from cryptography.x509.oid import NameOID

    key = rsa.generate_private_key(public_exponent=65537, key_size=2048)
    name = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, common_name),
                      x509.NameAttribute(NameOID.ORGANIZATION_NAME, "Harbourside test signer")])
    start = datetime.datetime(2026, 1, 1, tzinfo=datetime.timezone.utc)
    cert = (x509.CertificateBuilder().subject_name(name).issuer_name(name).public_key(key.public_key())
            .serial_number(20261)
            .not_valid_before(start).not_valid_after(start + datetime.timedelta(days=3650))
            .sign(key, hashes.SHA256()))
    path.write_bytes(pkcs12.serialize_key_and_certificates(
        b"signer", key, cert, None, serialization.BestAvailableEncryption(password.encode())))
    path.with_suffix(".pem").write_bytes(cert.public_bytes(serialization.Encoding.PEM))  # for verify --trust
    return path


@pytest.fixture(scope="module")
def key(tmp_path_factory) -> Path:
    return make_p12(tmp_path_factory.mktemp("key") / "signer.p12", "A. Okafor", PASSWORD)


@pytest.fixture(scope="module")
def unsigned() -> bytes:
    return build_sheet(motor_record())


@pytest.fixture(scope="module")
def signed(key, unsigned) -> bytes:
    return sign_pdf(unsigned, key, PASSWORD)


def tampered(signed: bytes) -> bytes:
    """The signed sheet with one hex digit of the fingerprint in /Keywords changed (same length, still a PDF)."""
    at = signed.index(FINGERPRINT.encode()) + len("sha256:")
    data = bytearray(signed)
    data[at] = ord("f") if data[at] != ord("f") else ord("e")
    return bytes(data)


def test_sign_and_verify(signed):
    result = verify_pdf(signed)
    assert result.ok, result.problems
    assert result.signed and result.intact and result.valid and result.whole_file
    assert "A. Okafor" in result.signer
    assert result.fingerprint == FINGERPRINT
    assert (result.tag, result.revision) == ("CH-M-101", "2")
    assert len(result.certificate_sha256) == 64


def test_one_changed_byte_fails(signed):
    result = verify_pdf(tampered(signed))
    assert not result.ok
    assert not result.intact
    assert any("changed after signing" in p for p in result.problems)


def test_appended_update_fails(signed):
    result = verify_pdf(signed + b"\n1 0 obj\n(appended)\nendobj\n")
    assert not result.ok
    assert any("changed after signing" in p for p in result.problems)


def test_garbage_in_the_middle_is_not_valid(signed):
    data = signed[:2000] + b"\x00" * 500 + signed[2500:]
    assert not verify_pdf(data).ok


def test_unsigned(unsigned):
    result = verify_pdf(unsigned)
    assert not result.ok and not result.signed
    assert result.problems == ["not signed: the PDF holds no digital signature"]
    assert result.fingerprint == FINGERPRINT


def test_wrong_password(key, unsigned):
    with pytest.raises(InputError, match="the password is wrong or the file is not PKCS#12"):
        sign_pdf(unsigned, key, "wrong")


def test_missing_key_file(tmp_path, unsigned):
    with pytest.raises(InputError, match="no such key file"):
        sign_pdf(unsigned, tmp_path / "none.p12", PASSWORD)


def test_not_pkcs12(tmp_path, unsigned):
    bad = tmp_path / "bad.p12"
    bad.write_text("not a key")
    with pytest.raises(InputError, match="expected a PKCS#12 key file"):
        sign_pdf(unsigned, bad, PASSWORD)


# ---------------------------------------------------------------------------------------------------- pdfsig

def _pdfsig(path: Path) -> str:
    if shutil.which("pdfsig") is None:
        pytest.skip("pdfsig (poppler-utils) is not installed; .ci/run installs it where it can")
    run = subprocess.run(["pdfsig", str(path)], capture_output=True, text=True, timeout=30)
    return run.stdout + run.stderr


def test_pdfsig_accepts_the_signature(tmp_path, signed):
    path = tmp_path / "signed.pdf"
    path.write_bytes(signed)
    out = _pdfsig(path)
    assert "Signature is Valid." in out
    assert "A. Okafor" in out
    assert "Total document signed" in out
    assert "ETSI.CAdES.detached" in out  # the PAdES subfilter


def test_pdfsig_rejects_the_tampered_copy(tmp_path, signed):
    path = tmp_path / "tampered.pdf"
    path.write_bytes(tampered(signed))
    out = _pdfsig(path)
    assert "Signature is Valid." not in out
    assert "Signature is Invalid." in out or "Digest Mismatch" in out


# ---------------------------------------------------------------------------------------------------- commands

def test_verify_command_ok_and_machine_match(tmp_path, key, capsys, monkeypatch):
    from wizard.sheet_command import make_sheet

    machine = tmp_path / "motor.toml"
    machine.write_text(issued(EXAMPLE.read_text("utf-8")), "utf-8")
    monkeypatch.setenv("RELAYWRIGHT_SIGN_PASSWORD", PASSWORD)
    make_sheet(machine, sign=key)
    pdf = tmp_path / "CH-M-101-rev1.pdf"
    assert pdf.is_file()
    capsys.readouterr()
    assert verify_command(pdf, machine, trust=[key.with_suffix(".pem")]) == 0
    out = capsys.readouterr().out
    assert "signed by: Organization: Harbourside test signer, Common Name: A. Okafor" in out
    assert "matches value by value" in out
    assert out.strip().endswith("verify: OK")
    assert verify_command(pdf, machine) == 3  # without --trust the signer is not checked
    assert "verify: intact, signer not checked" in capsys.readouterr().out

    # the machine file changes after the sheet was signed: the sheet no longer matches it
    machine.write_text(issued(EXAMPLE.read_text("utf-8")).replace('rated_current = "186 A"',
                                                                  'rated_current = "190 A"'), "utf-8")
    assert verify_command(pdf, machine) == 1
    out = capsys.readouterr().out
    assert "DOES NOT MATCH" in out
    assert "verify: FAILED" in out


def test_verify_command_tampered_and_unsigned(tmp_path, signed, unsigned, capsys):
    bad = tmp_path / "bad.pdf"
    bad.write_bytes(tampered(signed))
    assert verify_command(bad) == 1
    out = capsys.readouterr().out
    assert "signature: NOT VALID" in out
    assert "problem: the signed content was changed after signing" in out
    plain = tmp_path / "plain.pdf"
    plain.write_bytes(unsigned)
    assert verify_command(plain) == 1
    out = capsys.readouterr().out
    assert "not signed" in out
    assert "verify: FAILED (not signed)" in out


def test_verify_command_not_a_pdf(tmp_path):
    path = tmp_path / "notes.pdf"
    path.write_text("just text")
    with pytest.raises(InputError, match="not a PDF"):
        verify_command(path)
    with pytest.raises(InputError, match="no such file"):
        verify_command(tmp_path / "missing.pdf")


def test_cli_verify_not_a_pdf_is_one_line_exit_2(tmp_path, monkeypatch, capsys):
    from wizard.cli import main

    path = tmp_path / "notes.pdf"
    path.write_text("just text")
    monkeypatch.setattr(sys, "argv", ["relaywright", "verify", str(path)])
    with pytest.raises(SystemExit) as exc:
        main()
    assert exc.value.code == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "not a PDF" in err[0]


def test_sign_without_password_and_terminal_is_exit_2(tmp_path, key, monkeypatch):
    from wizard.sheet_command import make_sheet

    machine = tmp_path / "motor.toml"
    machine.write_text(issued(EXAMPLE.read_text("utf-8")), "utf-8")
    monkeypatch.delenv("RELAYWRIGHT_SIGN_PASSWORD", raising=False)
    monkeypatch.setattr(sys, "stdin", io.StringIO(""))
    with pytest.raises(InputError, match="set RELAYWRIGHT_SIGN_PASSWORD or run in a terminal"):
        make_sheet(machine, sign=key)
    assert not list(tmp_path.glob("*.pdf"))  # nothing written


def test_password_prompt_is_hidden(tmp_path, key, monkeypatch):
    from wizard import sheet_command

    machine = tmp_path / "motor.toml"
    machine.write_text(issued(EXAMPLE.read_text("utf-8")), "utf-8")
    monkeypatch.delenv("RELAYWRIGHT_SIGN_PASSWORD", raising=False)

    class Terminal(io.StringIO):
        def isatty(self):
            return True

    asked = []
    monkeypatch.setattr(sys, "stdin", Terminal(""))
    monkeypatch.setattr(sheet_command.getpass, "getpass", lambda prompt: asked.append(prompt) or PASSWORD)
    assert sheet_command.make_sheet(machine, sign=key) == 0
    assert asked == [f"Password for {key}: "]
    assert verify_pdf((tmp_path / "CH-M-101-rev1.pdf").read_bytes()).ok


def test_cli_verify_tampered_exit_1(tmp_path, signed, monkeypatch, capsys):
    from wizard.cli import main

    path = tmp_path / "tampered.pdf"
    path.write_bytes(tampered(signed))
    monkeypatch.setattr(sys, "argv", ["relaywright", "verify", str(path)])
    with pytest.raises(SystemExit) as exc:
        main()
    assert exc.value.code == 1
    out = capsys.readouterr().out
    assert "signature: NOT VALID: do not rely on this copy of the sheet" in out
    assert "the signed content was changed after signing" in out


def test_building_a_sheet_does_not_import_pyhanko():
    # pyHanko costs about half a second to import (measured): only signing and verifying may load it
    code = ("import sys; sys.path.insert(0, 'tests'); from test_sheet_records import motor_record; "
            "from reports.sheet import build_sheet; import reports.signing, wizard.sheet_command; "
            "build_sheet(motor_record()); print('pyhanko' in sys.modules)")
    root = Path(__file__).resolve().parent.parent
    out = subprocess.run([sys.executable, "-c", code], cwd=root, capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_a_signed_sheet_is_never_overwritten(tmp_path, key, monkeypatch):
    from wizard.sheet_command import make_sheet

    machine = tmp_path / "motor.toml"
    machine.write_text(issued(EXAMPLE.read_text("utf-8")), "utf-8")
    target = tmp_path / "sheet.pdf"
    monkeypatch.setenv("RELAYWRIGHT_SIGN_PASSWORD", PASSWORD)
    assert make_sheet(machine, output=target, sign=key) in (0, 1)
    signed_bytes = target.read_bytes()
    with pytest.raises(InputError, match=r"holds a signed sheet, which is never replaced"):
        make_sheet(machine, output=target)
    assert target.read_bytes() == signed_bytes
