"""Digital signature of a settings sheet (PAdES, with pyHanko) and its verification.

``sign_pdf`` adds one PAdES signature (SHA-256) with the key and certificate of a PKCS#12 file; given the settings
record, it first attaches it to the PDF (:func:`embed_record`), so that the signature covers the record too.

``verify_pdf`` says whether the sheet is whole and who signed it:

- *intact and whole*: the signature's /ByteRange covers every byte of the file except exactly the /Contents hex
  string, that string holds the signature and zero padding and nothing else (one letter case, every padding digit
  ``0``), the CMS structure carries nothing the signature does not cover (no unsigned attributes, no certificate
  beyond the signer's, whose hash the signed attributes carry), the digest matches and the signature value
  verifies with the signer's key. Any changed byte anywhere in the file fails one of these.
- *trusted*: the signer's certificate is, or is issued by, one of the certificates given with ``--trust``. Without
  ``--trust`` nothing says who the signer really is (anyone can make a certificate with any name): an intact
  signature is then reported as "intact, signer not checked", with its own exit code.

``verify --machine FILE`` compares the record embedded in the sheet with a fresh study of the machine file, value
by value (settings, checks, inputs as entered, tag, revision, status, names of who prepared, checked and approved).

pyHanko takes about half a second to import, so it is imported inside the functions that sign or verify.
"""

from __future__ import annotations

import hashlib
import io
import json
import re
import sys
from dataclasses import dataclass, field
from pathlib import Path

from machines.errors import InputError, printable
from reports.existing import is_signed, raw_keywords, refuse_to_replace

SIGNATURE_FIELD = "relaywright-signature"
RECORD_NAME = "relaywright-settings-record.json"  #: the settings record attached to a signed sheet
MAX_PDF_BYTES = 100_000_000  #: a sheet is a few hundred kilobytes
MAX_CERT_BYTES = 1_000_000
EXIT_OK, EXIT_FAILED, EXIT_UNCHECKED = 0, 1, 3

refuse_to_replace_signed = refuse_to_replace  #: the name the sheet command calls it by


@dataclass
class VerifyResult:
    """What ``verify`` found in one PDF.

    ``ok`` is integrity (signed, intact, valid, the whole file covered, nothing damaged); ``trusted`` is None when
    no trust anchors were given, else whether the signer chains to one of them.
    """

    signed: bool = False
    intact: bool = False
    valid: bool = False
    whole_file: bool = False
    damaged: bool = False
    trusted: bool | None = None
    signer: str = ""
    certificate_sha256: str = ""
    signing_time: str = ""
    fingerprint: str = ""
    tag: str = ""
    revision: str = ""
    record: dict | None = None
    problems: list[str] = field(default_factory=list)
    trust_problem: str = ""

    @property
    def ok(self) -> bool:
        """Signed, intact, valid, covering the whole file, nothing damaged."""
        return (self.signed and self.intact and self.valid and self.whole_file and not self.damaged
                and not self.problems)


def _is_pdf(data: bytes) -> bool:
    return b"%PDF-" in data[:1024]


def sheet_keywords(data: bytes) -> tuple[str, str, str]:
    """(inputs fingerprint, revision, tag) from a sheet's /Keywords, or empty strings when it has none."""
    kw = raw_keywords(data)
    return kw.get("inputs_fingerprint", ""), kw.get("revision", ""), kw.get("tag", "")


# ---------------------------------------------------------------------------------------------------- signing


def load_signer(p12_path: str | Path, password: str):
    """A pyHanko signer from a PKCS#12 file; InputError when the file cannot be read or opened."""
    from pyhanko.sign import signers

    from machines.files import read_bytes

    path = Path(p12_path)
    if not path.exists() and not path.is_symlink():
        raise InputError(str(p12_path), "no such key file")
    data = read_bytes(path, "a PKCS#12 key file (.p12/.pfx)", limit=MAX_CERT_BYTES)
    try:
        signer = signers.SimpleSigner.load_pkcs12_data(data, other_certs=(), passphrase=password.encode("utf-8"))
    except Exception:  # wrong password, not PKCS#12, unsupported key: pyHanko says ValueError or worse
        raise InputError(str(p12_path), "expected a PKCS#12 key file (.p12/.pfx) that this password opens; "
                                        "the password is wrong or the file is not PKCS#12") from None
    if signer is None or getattr(signer, "signing_cert", None) is None:
        raise InputError(str(p12_path), "expected a PKCS#12 file holding a private key and its certificate")
    return signer


def embed_record(writer, record: dict) -> None:
    """Attach the settings record (JSON) to the PDF being written, as the file :data:`RECORD_NAME` (ISO 32000-2
    cl. 7.11.4 embedded file streams; PDF/A-3 associated file with relationship /Data)."""
    from pyhanko.pdf_utils import embed, generic

    from machines.record import dumps_json
    from wizard import __version__

    data = (dumps_json(record, indent=None) + "\n").encode("utf-8")
    stream = embed.EmbeddedFileObject.from_file_data(
        writer, data=data, mime_type="application/json",
        params=embed.EmbeddedFileParams(embed_size=True, embed_checksum=True))
    spec = embed.FileSpec(file_spec_string=RECORD_NAME, file_name=RECORD_NAME, embedded_data=stream,
                          description=f"relaywright {__version__} settings record of this sheet",
                          af_relationship=generic.pdf_name("/Data"))
    embed.embed_file(writer, spec)


def sign_pdf(pdf_bytes: bytes, p12_path: str | Path, password: str, *, box=None,
             record: dict | None = None) -> bytes:
    """``pdf_bytes`` with a PAdES signature by the key in ``p12_path`` (an incremental update).

    ``box`` (page index from 0, and the rectangle (x1, y1, x2, y2) in points; a
    :class:`reports.sheet.SignatureBox`) makes the signature visible there: the signer's name and the signing time.
    ``record`` (the settings record, JSON form) is attached first (:func:`embed_record`), so the signature covers
    it and ``verify --machine`` can compare it value by value.
    """
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
    from pyhanko.sign import fields, signers

    signer = load_signer(p12_path, password)
    writer = IncrementalPdfFileWriter(io.BytesIO(pdf_bytes))
    if record is not None:
        embed_record(writer, record)
    meta = signers.PdfSignatureMetadata(field_name=SIGNATURE_FIELD, subfilter=fields.SigSeedSubFilter.PADES,
                                        md_algorithm="sha256", reason="Protection settings sheet")
    if box is not None:
        return _sign_visible(writer, meta, signer, box)
    out = signers.sign_pdf(writer, meta, signer=signer)
    return out.getvalue()


def _sign_visible(writer, meta, signer, box) -> bytes:
    """Sign with an appearance in ``box``: "Digitally signed by <name>" and the time, plain text, no logo."""
    from pyhanko import stamp
    from pyhanko.sign import fields, signers

    page, rect = box
    fields.append_signature_field(writer, sig_field_spec=fields.SigFieldSpec(
        SIGNATURE_FIELD, on_page=int(page), box=tuple(float(v) for v in rect)))
    style = stamp.TextStampStyle(stamp_text="Digitally signed by %(signer)s\n%(ts)s", background=None,
                                 border_width=0, timestamp_format="%Y-%m-%d %H:%M %Z")
    out = signers.PdfSigner(meta, signer=signer, stamp_style=style).sign_pdf(writer)
    return out.getvalue()


# ---------------------------------------------------------------------------------------------------- trust


def load_trust(paths) -> list:
    """The trust anchors named by ``--trust``: certificate files (PEM, one or more certificates, or DER) and
    folders of them (``*.pem``, ``*.crt``, ``*.cer``, ``*.der``). InputError naming a path that holds none."""
    from machines.files import read_bytes

    anchors = []
    for path in paths:
        p = Path(path)
        if p.is_dir():
            files = sorted(f for f in p.iterdir() if f.suffix.lower() in (".pem", ".crt", ".cer", ".der")
                           and f.is_file())
            found = [c for f in files for c in _certificates(read_bytes(f, "a certificate", MAX_CERT_BYTES), f)]
            if not found:
                raise InputError(str(path), "expected a folder of certificates (.pem, .crt, .cer, .der), got none")
            anchors += found
        else:
            anchors += _certificates(read_bytes(p, "a certificate (PEM or DER)", MAX_CERT_BYTES), p)
    return anchors


def _certificates(data: bytes, path: Path) -> list:
    from asn1crypto import pem, x509

    try:
        if pem.detect(data):
            certs = [x509.Certificate.load(der) for kind, _, der in pem.unarmor(data, multiple=True)
                     if kind == "CERTIFICATE"]
        else:
            certs = [x509.Certificate.load(data, strict=True)]
        for c in certs:
            c.native  # parse it all now: a damaged certificate is refused here, not half-way through a check
    except Exception:
        raise InputError(str(path), "expected a certificate (PEM or DER), got a file that is not one") from None
    if not certs:
        raise InputError(str(path), "expected a certificate (PEM or DER), got a PEM file without one")
    return certs


# ---------------------------------------------------------------------------------------------------- verifying


def verify_pdf(pdf_bytes: bytes, trust: list | None = None) -> VerifyResult:
    """Check the sheet's signature (and, with ``trust`` anchors, its signer). Never raises for a damaged or
    unsigned file: the result says what is wrong."""
    import pyhanko.sign.general  # noqa: F401  - first: it names the CMS attributes asn1crypto reads below

    data = bytes(pdf_bytes)
    result = VerifyResult()
    result.fingerprint, result.revision, result.tag = sheet_keywords(data)
    has_signature = is_signed(data)
    truncated = re.search(rb"%%EOF\s*\Z", data[-1024:]) is None
    quick = _quick_problems(data) if has_signature else []
    if quick:  # the file is certainly changed: say so without the cost of a full validation
        result.signed = True
        result.problems += quick
        return _truncation_note(result, truncated)
    _quiet_pyhanko()
    try:
        from pyhanko.pdf_utils.reader import PdfFileReader

        reader = PdfFileReader(io.BytesIO(data), strict=False)
        signatures = reader.embedded_signatures
    except Exception as e:
        result.signed = has_signature
        result.damaged = True
        result.problems.append(f"the file is damaged: it cannot be read as a PDF ({_first_line(e)})")
        return _truncation_note(result, truncated)
    if not signatures:
        if has_signature:
            result.signed = result.damaged = True
            result.problems.append("the file is damaged: it holds a signature dictionary that cannot be read")
            return _truncation_note(result, truncated)
        result.problems.append("not signed: the PDF holds no digital signature")
        return result
    result.signed = True
    if len(signatures) > 1:
        result.problems.append(f"the PDF holds {len(signatures)} signatures; a sheet carries one")
    sig = signatures[-1]
    try:
        _check_signature(data, sig, result, trust)
        result.record = _embedded_record(reader, result)
    except Exception as e:  # a damaged file may make pyHanko raise: that is "not valid"
        result.intact = result.valid = False
        result.problems.append(f"the signature could not be validated ({_first_line(e)})")
    return _truncation_note(result, truncated)


def _quiet_pyhanko() -> None:
    """pyHanko logs what it finds wrong (with tracebacks) to stderr; the report says it in words instead."""
    import logging

    log = logging.getLogger("pyhanko")
    if not any(isinstance(h, logging.NullHandler) for h in log.handlers):
        log.addHandler(logging.NullHandler())


def _first_line(e: Exception) -> str:
    return printable(str(e).splitlines()[0][:120]) if str(e) else type(e).__name__


def _truncation_note(result: VerifyResult, truncated: bool) -> VerifyResult:
    if truncated:
        result.problems.append("the file is truncated: it does not end with the PDF end-of-file marker")
    result.damaged = result.damaged or any("damaged" in p or "truncated" in p for p in result.problems)
    return result


def _check_signature(data: bytes, sig, result: VerifyResult, trust: list | None) -> None:
    from pyhanko.sign.validation import validate_pdf_signature
    from pyhanko.sign.validation.status import SignatureCoverageLevel
    from pyhanko_certvalidator import ValidationContext

    cert = sig.signer_cert
    result.signer = cert.subject.human_friendly
    result.certificate_sha256 = hashlib.sha256(cert.dump()).hexdigest()
    byte_range = [int(x) for x in sig.sig_object["/ByteRange"]]
    structure = _byte_range_problems(data, byte_range)
    if not structure:
        structure = _cms_problems(sig)
    result.problems += structure
    status = validate_pdf_signature(sig, signer_validation_context=ValidationContext(
        trust_roots=[cert], allow_fetching=False))
    result.intact = bool(status.intact) and not structure
    result.valid = bool(status.valid)
    result.whole_file = status.coverage == SignatureCoverageLevel.ENTIRE_FILE and not structure
    if status.signer_reported_dt is not None:
        result.signing_time = status.signer_reported_dt.isoformat(timespec="seconds")
    if not status.intact:
        result.problems.append("the signed content was changed after signing (the digest does not match)")
    elif not result.valid:
        result.problems.append("the signature value does not verify with the signer's certificate")
    elif status.coverage != SignatureCoverageLevel.ENTIRE_FILE:
        result.problems.append("the file was changed after signing (data added after the signed revision)")
    if trust:
        anchored = validate_pdf_signature(sig, signer_validation_context=ValidationContext(
            trust_roots=list(trust), allow_fetching=False))
        result.trusted = bool(anchored.trusted and anchored.valid)
        if not result.trusted:
            result.trust_problem = ("the signer's certificate is not one of the --trust certificates, nor issued by "
                                    "one (or it is out of its validity period)")


# the checks below look only at bytes; each returns sentences for the problems it finds

def _quick_problems(data: bytes) -> list[str]:
    """Problems found from the bytes alone (no PDF parser): the byte range of a single signature, its /Contents
    string and the digest of the covered bytes. An empty list proves nothing; a problem proves a change."""
    ranges = re.findall(rb"/ByteRange\s*\[\s*(\d{1,12})\s+(\d{1,12})\s+(\d{1,12})\s+(\d{1,12})\s*\]", data)
    if len(ranges) != 1:
        return []
    byte_range = [int(x) for x in ranges[0]]
    problems = _byte_range_problems(data, byte_range)
    if problems:
        return problems
    der = _signature_der(data, byte_range)
    try:
        from asn1crypto import cms

        signer_info = cms.ContentInfo.load(der, strict=True)["content"]["signer_infos"][0]
        algorithm = signer_info["digest_algorithm"]["algorithm"].native
        digest = next(a["values"][0].native for a in signer_info["signed_attrs"]
                      if a["type"].native == "message_digest")
        h = hashlib.new(algorithm)
    except Exception:
        return []  # left to the full validation, which says what is wrong
    a, b, c, d = byte_range
    h.update(data[a:a + b])
    h.update(data[c:c + d])
    if h.digest() != digest:
        return ["the signed content was changed after signing (the digest does not match)"]
    return []


def _byte_range_problems(data: bytes, byte_range: list[int]) -> list[str]:
    """The signature must cover the whole file except exactly the /Contents hex string, and that string must hold
    the signature and intact zero padding (PAdES, ETSI EN 319 142-1 cl. 5.1; ISO 32000-1 cl. 12.8.1)."""
    if len(byte_range) != 4:
        return ["the signature's byte range is malformed"]
    a, b, c, d = byte_range
    if a != 0 or b <= 0 or c <= b or d < 0 or c + d != len(data):
        if c + d > len(data):
            return [f"the file is damaged or truncated: the signature covers {c + d} bytes, the file has "
                    f"{len(data)}"]
        return ["the file was changed after signing: the signature does not cover the whole file (bytes were "
                "added or moved outside the signed part)"]
    if re.search(rb"/Contents\s*\Z", data[max(0, b - 64):b]) is None:
        return ["the bytes the signature leaves out are not its /Contents entry: the file was changed"]
    gap = data[b:c]
    digits = gap[1:-1]
    if gap[:1] != b"<" or gap[-1:] != b">" or len(digits) % 2 or re.fullmatch(rb"[0-9A-Fa-f]*", digits) is None:
        return ["the signature value was changed (its /Contents holds more than hexadecimal digits)"]
    if re.search(rb"[a-f]", digits) and re.search(rb"[A-F]", digits):
        return ["the signature value was changed (its hexadecimal digits are written in two letter cases)"]
    raw = bytes.fromhex(digits.decode("ascii"))
    n = _der_length(raw)
    if n is None:
        return ["the signature value is damaged (it is not a DER structure)"]
    if raw[n:].strip(b"\0"):
        return ["the signature's padding was changed (the bytes after the signature value are not all zero)"]
    return []


def _signature_der(data: bytes, byte_range: list[int]) -> bytes:
    a, b, c, d = byte_range
    raw = bytes.fromhex(data[b + 1:c - 1].decode("ascii"))
    return raw[:_der_length(raw)]


def _der_length(raw: bytes) -> int | None:
    """Length of the DER object at the start of ``raw`` (tag, length and contents; definite lengths only), or None
    when ``raw`` does not start with a whole one.

    >>> _der_length(bytes.fromhex("3003020101") + bytes(4)), _der_length(bytes.fromhex("3080")), _der_length(b"")
    (5, None, None)
    """
    if len(raw) < 2 or raw[0] != 0x30:  # a CMS ContentInfo is a SEQUENCE
        return None
    first = raw[1]
    if first < 0x80:
        n = 2 + first
    else:
        k = first & 0x7F
        if k == 0 or k > 4 or len(raw) < 2 + k or raw[2] == 0:
            return None
        length = int.from_bytes(raw[2:2 + k], "big")
        if length < 0x80 or (k > 1 and length < 1 << (8 * (k - 1))):
            return None  # DER takes the shortest form
        n = 2 + k + length
    return n if n <= len(raw) else None


def _is_der(data: bytes) -> bool:
    """Whether ``data`` is whole DER TLVs all the way down: definite lengths in their shortest form, every
    constructed value made exactly of its parts (X.690 cl. 8.1.3, 10.1).

    >>> [_is_der(bytes.fromhex(h)) for h in ("3003020101", "308103020101", "3004020101")]
    [True, False, False]
    >>> _is_der(bytes.fromhex("30050201010000"))  # zero padding taken into the value
    False
    """
    def walk(pos: int, end: int, depth: int) -> bool:
        while pos < end:
            if depth > 40 or end - pos < 2:
                return False
            tag = data[pos]
            pos += 1
            if tag == 0:  # end-of-contents (BER only): zero padding read into a value that was made longer
                return False
            if tag & 0x1F == 0x1F:  # high tag number form: base-128 digits
                while pos < end and data[pos] & 0x80:
                    pos += 1
                pos += 1
            if pos >= end:
                return False
            first = data[pos]
            pos += 1
            if first < 0x80:
                length = first
            else:
                k = first & 0x7F
                if k == 0 or k > 4 or pos + k > end or data[pos] == 0:
                    return False
                length = int.from_bytes(data[pos:pos + k], "big")
                if length < 0x80:
                    return False
                pos += k
            if pos + length > end:
                return False
            if tag & 0x20 and not walk(pos, pos + length, depth + 1):
                return False
            pos += length
        return pos == end

    return walk(0, len(data), 0)


def _cms_problems(sig) -> list[str]:
    """What the signature container holds beyond what the signature covers (RFC 5652 cl. 5; ETSI EN 319 122-1
    cl. 5.2.2 signing-certificate-v2): each such part could be changed without breaking the signature, so none
    may be there, and what must match does."""
    from asn1crypto import cms

    der = bytes(sig.pkcs7_content)
    n = _der_length(der)
    if n is None or not _is_der(der[:n]):
        return ["the signature container is not in its one canonical (DER) form: it was changed"]
    info = cms.ContentInfo.load(der[:n], strict=True)
    sd = info["content"]
    signer_infos = list(sd["signer_infos"])
    if info["content_type"].native != "signed_data" or len(signer_infos) != 1:
        return ["the signature container is not one PAdES signature"]
    si = signer_infos[0]
    problems = []
    by_key = si["sid"].name == "subject_key_identifier"
    if sd["version"].native != ("v3" if by_key else "v1") or si["version"].native != ("v3" if by_key else "v1"):
        problems.append("the signature container's version numbers were changed")
    if {a.dump() for a in sd["digest_algorithms"]} != {si["digest_algorithm"].dump()}:
        problems.append("the signature container's list of digest algorithms was changed")
    encap = sd["encap_content_info"]
    if encap["content_type"].native != "data" or encap["content"].native is not None:
        problems.append("the signature container holds content of its own (a sheet's signature is detached)")
    if sd["crls"].native:
        problems.append("the signature container holds revocation lists the signature does not cover")
    if si["unsigned_attrs"].native:
        problems.append("the signature carries unsigned attributes, which the signature does not cover")
    for name in ("digest_algorithm", "signature_algorithm"):  # parameters absent or NULL (RFC 5754, RFC 4055)
        algorithm = si[name]
        if algorithm["algorithm"].native != "rsassa_pss" and algorithm["parameters"].dump() not in (b"", b"\x05\x00"):
            problems.append(f"the signature's {name.replace('_', ' ')} was changed (unexpected parameters)")
    certs = list(sd["certificates"]) if sd["certificates"].native else []
    signer = sig.signer_cert
    sid = si["sid"].chosen  # must name the signer's certificate byte for byte (name matching ignores case)
    if by_key:
        if sid.native != signer.key_identifier:
            problems.append("the signer identifier was changed (it does not name the signer's certificate)")
    elif sid["issuer"].dump() != signer.issuer.dump() or sid["serial_number"].native != signer.serial_number:
        problems.append("the signer identifier was changed (it does not name the signer's certificate exactly)")
    if len(certs) != 1 or certs[0].chosen.dump() != signer.dump():
        problems.append("the signature container holds certificates other than the signer's")
    bound = [a for a in si["signed_attrs"] if a["type"].native in ("signing_certificate_v2", "signing_certificate")]
    if len(bound) != 1:
        problems.append("the signer's certificate is not bound to the signature (no signing-certificate attribute)")
    else:
        attr = bound[0]
        ref = attr["values"][0]["certs"][0]
        algorithm = ref["hash_algorithm"]["algorithm"].native if "hash_algorithm" in ref else "sha1"
        if hashlib.new(algorithm, signer.dump()).digest() != ref["cert_hash"].native:
            problems.append("the signer's certificate was changed (its hash does not match the signed one)")
    return problems


def _embedded_record(reader, result: VerifyResult) -> dict | None:
    """The settings record attached to the sheet, or None; a record that disagrees with the /Keywords is a
    problem."""
    try:
        root = reader.root
        names = root["/Names"]["/EmbeddedFiles"]["/Names"] if "/Names" in root else []
    except Exception:
        return None
    for i in range(0, len(names) - 1, 2):
        if str(names[i]) != RECORD_NAME:
            continue
        try:
            data = names[i + 1].get_object()["/EF"]["/F"].get_object().data
            record = json.loads(data.decode("utf-8"))
        except Exception:
            result.problems.append("the embedded settings record cannot be read")
            return None
        if not isinstance(record, dict):
            result.problems.append("the embedded settings record is not a record")
            return None
        if record.get("inputs_fingerprint") != result.fingerprint:
            result.problems.append("the embedded settings record and the sheet's keywords disagree on the inputs "
                                   "fingerprint")
        return record
    return None


# ---------------------------------------------------------------------------------------------------- comparing


#: the parts of a record compared first, so that the first lines of a mismatch say what matters most
FIRST = ("tag", "revision", "sheet", "inputs_fingerprint", "inputs", "kind", "practice", "functions", "checks",
         "derived")


def record_differences(sheet: dict, fresh: dict, limit: int = 12) -> tuple[list[str], int]:
    """The first ``limit`` differences between the record in a sheet and a fresh one, as lines
    ``functions[49].settings.pickup_current.value: sheet 215, machine file 223.2``, and how many there are.

    Lists of functions, settings and test points are matched by their ids, so one added function is one
    difference, not a shifted list.

    >>> record_differences({"a": 1, "b": [1, 2]}, {"a": 2, "b": [1, 2]})
    (['a: sheet 1, machine file 2'], 1)
    """
    out: list[str] = []

    def shown(v) -> str:
        text = json.dumps(v, ensure_ascii=False) if not isinstance(v, str) else repr(v)
        return printable(text if len(text) <= 90 else text[:89] + "…")

    def walk(a, b, path: str) -> None:
        if isinstance(a, dict) and isinstance(b, dict):
            keys = list(a) + [k for k in b if k not in a]
            if not path:  # who and what first: identity and sign-off, inputs, then the settings
                keys.sort(key=lambda k: FIRST.index(k) if k in FIRST else len(FIRST))
            for k in keys:
                here = f"{path}.{k}" if path else str(k)
                if k not in a:
                    out.append(f"{here}: not on the sheet, machine file {shown(b[k])}")
                elif k not in b:
                    out.append(f"{here}: sheet {shown(a[k])}, not in the machine file's study")
                else:
                    walk(a[k], b[k], here)
        elif isinstance(a, list) and isinstance(b, list) and _keyed(a) and _keyed(b):
            walk({x["id"]: x for x in a}, {x["id"]: x for x in b}, path)
        elif isinstance(a, list) and isinstance(b, list) and len(a) == len(b):
            for i, (x, y) in enumerate(zip(a, b)):
                walk(x, y, f"{path}[{i}]")
        elif a != b or type(a) is not type(b) and not (isinstance(a, (int, float)) and isinstance(b, (int, float))):
            out.append(f"{path}: sheet {shown(a)}, machine file {shown(b)}")

    walk(sheet, fresh, "")
    return out[:limit], len(out)


def _keyed(items: list) -> bool:
    ids = [x.get("id") for x in items if isinstance(x, dict)]
    return len(ids) == len(items) and all(isinstance(i, str) and i for i in ids) and len(set(ids)) == len(ids)


def verify_command(pdf: Path, machine: Path | None = None, trust: list[Path] | tuple = ()) -> int:
    """``relaywright verify``: report on stdout. Exit code 0 when the sheet is whole, its signer trusted (and,
    with ``machine``, it matches the machine file value by value); 3 when it is whole but no ``--trust`` was
    given to check the signer; 1 otherwise."""
    from machines.files import read_bytes

    anchors = load_trust(trust) if trust else None
    data = read_bytes(pdf, "a PDF file", limit=MAX_PDF_BYTES)
    if not _is_pdf(data):
        raise InputError(str(pdf), "expected a PDF settings sheet, got a file that is not a PDF")
    fresh = _fresh_record(machine) if machine is not None else None  # bad machine file: exit 2 before reporting

    result = verify_pdf(data, anchors)
    lines = [f"sheet: {pdf}"]
    if result.tag or result.fingerprint:
        lines.append(f"tag: {result.tag}   revision: {result.revision}")
        lines.append(f"inputs fingerprint: {result.fingerprint}")
    else:
        lines.append("this PDF carries no relaywright sheet data (tag, revision, inputs fingerprint)")
    if result.signer:
        lines.append(f"signed by: {result.signer}")
        lines.append(f"certificate SHA-256: {result.certificate_sha256}")
        if result.signing_time:
            lines.append(f"signing time (from the signer's clock): {result.signing_time}")
    if result.ok:
        lines.append("signature: intact, valid, covers the whole file")
        if result.trusted is None:
            lines.append("signer: NOT CHECKED: no --trust certificate was given, and anyone can make a certificate "
                         "with any name; give the signer's certificate (or its issuer's) with --trust CERT, or "
                         "compare the SHA-256 above with the one the signer published")
        elif result.trusted:
            lines.append("signer: trusted (the certificate is, or is issued by, a --trust certificate)")
        else:
            lines.append(f"signer: NOT TRUSTED: {result.trust_problem}")
    elif result.signed:
        what = "DAMAGED" if result.damaged else "NOT VALID"
        lines.append(f"signature: {what}: do not rely on this copy of the sheet")
    for problem in result.problems:
        lines.append(f"problem: {problem}")

    matches = True
    if machine is not None:
        matches = _compare_lines(machine, result, fresh, lines)
    if result.damaged:
        verdict, code = "FAILED (the file is damaged or truncated)", EXIT_FAILED
    elif not result.signed:
        verdict, code = "FAILED (not signed)", EXIT_FAILED
    elif not result.ok:
        verdict, code = "FAILED (the file was changed after signing)", EXIT_FAILED
    elif not matches:
        verdict, code = "FAILED (the sheet does not match the machine file)", EXIT_FAILED
    elif result.trusted is False:
        verdict, code = "FAILED (the signer is not trusted)", EXIT_FAILED
    elif result.trusted is None:
        verdict, code = "intact, signer not checked (give --trust CERT)", EXIT_UNCHECKED
    else:
        verdict, code = "OK", EXIT_OK
    lines.append(f"verify: {verdict}")
    out = sys.stdout
    for line in lines:
        print(printable(line), file=out)
    return code


def _fresh_record(machine: Path) -> dict:
    from machines.files import load_case
    from machines.study import run_study

    case, warnings = load_case(machine)
    try:
        return run_study(case, warnings).to_json()
    except InputError as e:
        raise e.at(machine) from None


def _compare_lines(machine: Path, result: VerifyResult, fresh: dict, lines: list[str]) -> bool:
    """Lines comparing the sheet with the machine file; True when they match value by value."""
    if result.record is None:
        lines.append(f"machine file: {machine}: cannot compare value by value: the sheet carries no embedded "
                     "settings record (an unsigned sheet, or one signed by an older relaywright)")
        if result.fingerprint and result.fingerprint != fresh["inputs_fingerprint"]:
            lines.append(f"machine file: {machine}: DOES NOT MATCH: its inputs fingerprint is now "
                         f"{fresh['inputs_fingerprint']}; the sheet was made from different data")
        return False
    sheet_record = json.loads(json.dumps(result.record))
    fresh = json.loads(json.dumps(fresh))  # the same JSON types on both sides (tuples become lists)
    diffs, total = record_differences(sheet_record, fresh)
    if not total:
        lines.append(f"machine file: {machine}: matches value by value (inputs, every setting and check, tag, "
                     "revision, status and sign-off names)")
        return True
    lines.append(f"machine file: {machine}: DOES NOT MATCH: {total} difference{'s' if total != 1 else ''} between "
                 "the sheet's record and a fresh study of the machine file:")
    lines += [f"  {d}" for d in diffs]
    if total > len(diffs):
        lines.append(f"  … and {total - len(diffs)} more")
    return False
