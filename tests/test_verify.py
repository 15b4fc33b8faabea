"""`relaywright verify`: any changed byte fails, a damaged file says so, a signer is trusted only through --trust,
and --machine compares the embedded settings record with a fresh study value by value.

The flip tests sign once and flip bits in memory (derandomised): every one of them must be detected.
"""

from __future__ import annotations

import json
import random
import re
import shutil
from pathlib import Path

import pytest

from machines.errors import InputError
from machines.files import load_case
from machines.study import run_study
from reports.sheet import build_sheet
from reports.signing import (EXIT_FAILED, EXIT_OK, EXIT_UNCHECKED, RECORD_NAME, load_trust, sign_pdf,
                             verify_command, verify_pdf)

from conftest import EXAMPLES

try:
    from tests.test_signing import PASSWORD, make_p12
except ImportError:  # tests/ on sys.path instead of the project root
    from test_signing import PASSWORD, make_p12

MOTOR = EXAMPLES / "chiller-compressor-motor.toml"


@pytest.fixture(scope="module")
def keys(tmp_path_factory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("keys")
    return {"owner": make_p12(folder / "owner.p12", "A. Okafor", PASSWORD),
            "forger": make_p12(folder / "forger.p12", "A. Okafor", PASSWORD)}  # the same name, another key


@pytest.fixture(scope="module")
def record():
    return run_study(*load_case(MOTOR))


@pytest.fixture(scope="module")
def signed(keys, record) -> bytes:
    return sign_pdf(build_sheet(record), keys["owner"], PASSWORD, record=record.to_json())


def gap(signed: bytes) -> tuple[int, int, int]:
    """(start, end) of the /Contents hex string the signature leaves out, and where its zero padding starts."""
    a, b, c, d = map(int, re.search(rb"/ByteRange\s*\[([^\]]*)\]", signed).group(1).split())
    digits = signed[b + 1:c - 1]
    return b, c, b + 1 + len(digits.rstrip(b"0")) + (len(digits.rstrip(b"0")) % 2)


def flipped(data: bytes, pos: int, bit: int) -> bytes:
    out = bytearray(data)
    out[pos] ^= 1 << bit
    return bytes(out)


def test_the_signed_sheet_is_whole_and_carries_its_record(signed, record):
    result = verify_pdf(signed)
    assert result.ok and result.trusted is None, result.problems
    assert result.record == json.loads(json.dumps(record.to_json()))
    # read back by another PDF library (pypdf), as any reader of attachments would
    from io import BytesIO

    from pypdf import PdfReader

    attached = PdfReader(BytesIO(signed)).attachments
    assert json.loads(attached[RECORD_NAME][0]) == result.record


def test_500_random_single_bit_flips_are_all_detected(signed):
    # issue: 8 of 500 uniform flips went unnoticed; any change to any byte must fail
    rng = random.Random(15)
    missed = []
    for _ in range(500):
        pos, bit = rng.randrange(len(signed)), rng.randrange(8)
        if verify_pdf(flipped(signed, pos, bit)).ok:
            missed.append((pos, bit))
    assert missed == []


def test_every_flip_in_the_signature_padding_is_detected(signed):
    # the padding after the signature value is not covered by the digest: it must still be intact
    b, c, pad = gap(signed)
    rng = random.Random(6)
    positions = rng.sample(range(pad, c - 1), 60)
    assert not [p for p in positions if verify_pdf(flipped(signed, p, rng.randrange(8))).ok]


def test_flips_in_the_signature_value_are_detected(signed):
    b, c, pad = gap(signed)
    rng = random.Random(7)
    missed = [p for p in rng.sample(range(b, pad), 80) if verify_pdf(flipped(signed, p, rng.randrange(8))).ok]
    assert missed == []


def test_a_letter_case_change_in_the_signature_hex_is_detected(signed):
    # 'A' and 'a' decode to the same byte: a one-bit change (0x20) the cryptography alone cannot see
    b, c, pad = gap(signed)
    at = next(i for i in range(b + 1, pad) if chr(signed[i]) in "ABCDEFabcdef")
    result = verify_pdf(flipped(signed, at, 5))
    assert not result.ok and any("letter case" in p for p in result.problems)


def test_a_changed_signer_name_in_the_signer_identifier_is_detected(signed):
    # X.500 names compare without regard to case: the identifier must still name the certificate byte for byte
    b, c, _ = gap(signed)
    der_hex = signed[b + 1:c - 1]
    at = b + 1 + der_hex.find(b"Harbourside".hex().upper().encode(), der_hex.find(b"020101") + 600)
    result = verify_pdf(flipped(signed, at, 1))  # 'H' (0x48) -> 'h' (0x68): first hex digit 4 -> 6
    assert not result.ok


@pytest.mark.parametrize("cut", [0.5, 0.99, -12])
def test_a_truncated_signed_sheet_is_reported_damaged(tmp_path, signed, capsys, cut):
    # issue: a truncated signed PDF said "FAILED (not signed)"
    n = int(len(signed) * cut) if cut > 0 else len(signed) + cut
    path = tmp_path / "cut.pdf"
    path.write_bytes(signed[:n])
    assert verify_command(path) == EXIT_FAILED
    out = capsys.readouterr().out
    assert "damaged or truncated" in out and "not signed" not in out


def test_trust_by_pem_der_and_folder(tmp_path, keys, signed, capsys):
    from cryptography import x509
    from cryptography.hazmat.primitives import serialization

    path = tmp_path / "sheet.pdf"
    path.write_bytes(signed)
    pem = keys["owner"].with_suffix(".pem")
    der = tmp_path / "owner.der"
    der.write_bytes(x509.load_pem_x509_certificate(pem.read_bytes()).public_bytes(serialization.Encoding.DER))
    folder = tmp_path / "trusted"
    folder.mkdir()
    shutil.copy(pem, folder / "owner.crt")
    (folder / "notes.txt").write_text("not a certificate")  # other files in the folder are passed over
    for trust in ([pem], [der], [folder], [keys["forger"].with_suffix(".pem"), pem]):
        assert verify_command(path, trust=trust) == EXIT_OK, trust
        assert "signer: trusted" in capsys.readouterr().out
    assert verify_command(path, trust=[keys["forger"].with_suffix(".pem")]) == EXIT_FAILED
    assert "signer: NOT TRUSTED" in capsys.readouterr().out
    assert verify_command(path) == EXIT_UNCHECKED
    out = capsys.readouterr().out
    assert "signer: NOT CHECKED" in out and "verify: intact, signer not checked" in out


@pytest.mark.parametrize("content, message", [(b"junk", "not one"), (b"-----BEGIN X-----\n-----END X-----\n",
                                                                      "without one")])
def test_a_trust_file_that_is_no_certificate_is_bad_input(tmp_path, content, message):
    path = tmp_path / "trust.pem"
    path.write_bytes(content)
    with pytest.raises(InputError, match=message):
        load_trust([path])
    with pytest.raises(InputError, match="got none"):
        load_trust([tmp_path / "empty"] if (tmp_path / "empty").mkdir() is None else [])


def forged(keys, original: Path, tmp_path: Path, embed: str) -> Path:
    """The issue's forgery: an override changed, the original inputs fingerprint kept in the keywords, re-signed
    with another self-signed key under the same name; ``embed`` says which record goes inside."""
    good = run_study(*load_case(original))
    text = original.read_text("utf-8") + '\n[overrides]\n"49.pickup_current" = "230 A"\n'
    changed_file = tmp_path / "changed.toml"
    changed_file.write_text(text, "utf-8")
    bad = run_study(*load_case(changed_file))
    bad.inputs_fingerprint = good.inputs_fingerprint  # the forger keeps the original fingerprint
    inside = {"changed": bad.to_json(), "original": good.to_json()}[embed]
    path = tmp_path / f"forged-{embed}.pdf"
    path.write_bytes(sign_pdf(build_sheet(bad), keys["forger"], PASSWORD, record=inside))
    return path


def test_a_forgery_with_a_changed_override_fails_verify_machine(tmp_path, keys, capsys):
    machine = tmp_path / "motor.toml"
    machine.write_text(MOTOR.read_text("utf-8"), "utf-8")
    path = forged(keys, machine, tmp_path, "changed")
    assert verify_command(path, machine) == EXIT_FAILED
    out = capsys.readouterr().out
    assert "DOES NOT MATCH" in out and "49" in out and "pickup_current" in out
    assert verify_command(path, machine, trust=[keys["owner"].with_suffix(".pem")]) == EXIT_FAILED


def test_a_forgery_carrying_the_original_record_fails_on_trust(tmp_path, keys, capsys):
    # the record matches the machine file, but the pages show other settings: only the signer can tell
    machine = tmp_path / "motor.toml"
    machine.write_text(MOTOR.read_text("utf-8"), "utf-8")
    path = forged(keys, machine, tmp_path, "original")
    assert verify_command(path, machine) == EXIT_UNCHECKED  # never 0 without --trust
    capsys.readouterr()
    assert verify_command(path, machine, trust=[keys["owner"].with_suffix(".pem")]) == EXIT_FAILED
    assert "signer: NOT TRUSTED" in capsys.readouterr().out


@pytest.mark.parametrize("edit, where", [
    (("approved_by = \"M. Sato\"", "approved_by = \"Someone Else\""), "sheet.approved_by"),
    (("status = \"draft\"", "status = \"checked\"\nchecked_on = \"2026-11-21\""), "sheet.status"),
    (("revision = 1", "revision = 2"), "revision"),
    (("rated_current = \"186 A\"", "rated_current = \"190 A\""), "inputs_fingerprint"),
])
def test_machine_comparison_is_value_by_value(tmp_path, keys, capsys, edit, where):
    machine = tmp_path / "motor.toml"
    machine.write_text(MOTOR.read_text("utf-8"), "utf-8")
    record = run_study(*load_case(machine))
    path = tmp_path / "sheet.pdf"
    path.write_bytes(sign_pdf(build_sheet(record), keys["owner"], PASSWORD, record=record.to_json()))
    trust = [keys["owner"].with_suffix(".pem")]
    assert verify_command(path, machine, trust) == EXIT_OK
    capsys.readouterr()
    machine.write_text(MOTOR.read_text("utf-8").replace(*edit), "utf-8")
    assert verify_command(path, machine, trust) == EXIT_FAILED
    out = capsys.readouterr().out
    assert "DOES NOT MATCH" in out and f"  {where}" in out


def test_a_sheet_signed_without_its_record_cannot_be_compared(tmp_path, keys, record, capsys):
    path = tmp_path / "old.pdf"
    path.write_bytes(sign_pdf(build_sheet(record), keys["owner"], PASSWORD))
    assert verify_command(path, MOTOR, trust=[keys["owner"].with_suffix(".pem")]) == EXIT_FAILED
    assert "no embedded settings record" in capsys.readouterr().out


def test_the_signer_name_is_printed_escaped(tmp_path, record, capsys):
    # a certificate's subject is anyone's text: no escape sequence reaches the terminal
    key = make_p12(tmp_path / "evil.p12", "A. Okafor\x1b]0;owned\x07\u202e", PASSWORD)
    path = tmp_path / "sheet.pdf"
    path.write_bytes(sign_pdf(build_sheet(record), key, PASSWORD, record=record.to_json()))
    verify_command(path)
    out = capsys.readouterr().out
    assert "\x1b" not in out and "\x07" not in out and "\u202e" not in out
    assert "\\x1b]0;owned\\x07\\u202e" in out
