"""Digital signature of a settings sheet (PAdES, with pyHanko) and its verification.

``sign_pdf`` adds one PAdES signature (SHA-256) with the key and certificate of a PKCS#12 file. ``verify_pdf`` says
whether the signature is intact and cryptographically valid, whether it covers the whole file (nothing appended
after signing), who signed (the certificate's subject and SHA-256 fingerprint), and which tag, revision and inputs
fingerprint the sheet carries in its /Keywords. The certificate is not checked against a list of trusted issuers
(there is none that every plant shares); the report prints its fingerprint so a reader can compare it with the one
the signer published. Any exception pyHanko raises while reading or validating means "not valid".

pyHanko takes about half a second to import, so it is imported inside the functions that sign or verify.
"""

from __future__ import annotations

import hashlib
import io
import re
import sys
from dataclasses import dataclass, field
from pathlib import Path

from machines.errors import InputError

_KEYWORD_RE = re.compile(r"inputs_fingerprint=(sha256:[0-9a-f]{64}); revision=([^;]*); tag=(.*)\Z", re.S)
SIGNATURE_FIELD = "relaywright-signature"


@dataclass
class VerifyResult:
    """What ``verify`` found in one PDF."""

    signed: bool = False
    intact: bool = False
    valid: bool = False
    whole_file: bool = False
    signer: str = ""
    certificate_sha256: str = ""
    signing_time: str = ""
    fingerprint: str = ""
    tag: str = ""
    revision: str = ""
    problems: list[str] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        """Signed, intact, valid and covering the whole file."""
        return self.signed and self.intact and self.valid and self.whole_file and not self.problems


def _is_pdf(data: bytes) -> bool:
    return b"%PDF-" in data[:1024]


def refuse_to_replace_signed(target: Path, new_pdf: bytes) -> None:
    """InputError when ``target`` is a signed PDF other than ``new_pdf``: a signed sheet is never overwritten."""
    try:
        with open(target, "rb") as fh:
            old = fh.read()
    except OSError:
        return
    if old != new_pdf and _is_pdf(old) and b"/ByteRange" in old:
        raise InputError(str(target), "holds a signed sheet, which is never replaced; write the new sheet under "
                                      "another name (-o) or raise sheet.revision; nothing was written")


def sheet_keywords(data: bytes) -> tuple[str, str, str]:
    """(inputs fingerprint, revision, tag) from a sheet's /Keywords, or empty strings when it has none."""
    from pyhanko.pdf_utils.reader import PdfFileReader

    try:
        reader = PdfFileReader(io.BytesIO(data), strict=False)
        trailer = reader.trailer_view
        info = trailer["/Info"] if "/Info" in trailer else None
        text = str(info["/Keywords"]) if info is not None and "/Keywords" in info else ""
    except Exception:  # a damaged file: no readable keywords
        return "", "", ""
    m = _KEYWORD_RE.search(text)
    return (m.group(1), m.group(2), m.group(3)) if m else ("", "", "")


# ---------------------------------------------------------------------------------------------------- signing


def load_signer(p12_path: str | Path, password: str):
    """A pyHanko signer from a PKCS#12 file; InputError when the file cannot be read or opened."""
    from pyhanko.sign import signers

    path = Path(p12_path)
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        raise InputError(str(p12_path), "no such key file") from None
    except OSError as e:
        raise InputError(str(p12_path), f"the key file cannot be read ({e.strerror or e})") from None
    try:
        signer = signers.SimpleSigner.load_pkcs12_data(data, other_certs=(), passphrase=password.encode("utf-8"))
    except Exception:  # wrong password, not PKCS#12, unsupported key: pyHanko says ValueError or worse
        raise InputError(str(p12_path), "expected a PKCS#12 key file (.p12/.pfx) that this password opens; "
                                        "the password is wrong or the file is not PKCS#12") from None
    if signer is None or getattr(signer, "signing_cert", None) is None:
        raise InputError(str(p12_path), "expected a PKCS#12 file holding a private key and its certificate")
    return signer


def sign_pdf(pdf_bytes: bytes, p12_path: str | Path, password: str, *, box=None) -> bytes:
    """``pdf_bytes`` with a PAdES signature by the key in ``p12_path`` (an incremental update).

    ``box`` (page index from 0, and the rectangle (x1, y1, x2, y2) in points; a
    :class:`reports.sheet.SignatureBox`) makes the signature visible there: the signer's name and the signing time.
    """
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
    from pyhanko.sign import fields, signers

    signer = load_signer(p12_path, password)
    writer = IncrementalPdfFileWriter(io.BytesIO(pdf_bytes))
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


# ---------------------------------------------------------------------------------------------------- verifying


def verify_pdf(pdf_bytes: bytes) -> VerifyResult:
    """Check the sheet's signature. Never raises for a damaged or unsigned file: the result says what is wrong."""
    result = VerifyResult()
    result.fingerprint, result.revision, result.tag = sheet_keywords(pdf_bytes)
    try:
        from pyhanko.pdf_utils.reader import PdfFileReader
        from pyhanko.sign.validation import validate_pdf_signature
        from pyhanko.sign.validation.status import SignatureCoverageLevel
        from pyhanko_certvalidator import ValidationContext

        reader = PdfFileReader(io.BytesIO(pdf_bytes), strict=False)
        signatures = reader.embedded_signatures
        if not signatures:
            result.problems.append("not signed: the PDF holds no digital signature")
            return result
        result.signed = True
        if len(signatures) > 1:
            result.problems.append(f"the PDF holds {len(signatures)} signatures; a sheet carries one")
        sig = signatures[-1]
        cert = sig.signer_cert
        result.signer = cert.subject.human_friendly
        result.certificate_sha256 = hashlib.sha256(cert.dump()).hexdigest()
        context = ValidationContext(trust_roots=[cert], allow_fetching=False)
        status = validate_pdf_signature(sig, signer_validation_context=context)
        result.intact = bool(status.intact)
        result.valid = bool(status.valid)
        result.whole_file = status.coverage == SignatureCoverageLevel.ENTIRE_FILE
        if status.signer_reported_dt is not None:
            result.signing_time = status.signer_reported_dt.isoformat(timespec="seconds")
    except Exception as e:  # a damaged file may make pyHanko raise: that is "not valid"
        result.intact = result.valid = False
        detail = str(e).splitlines()[0][:120] if str(e) else type(e).__name__
        result.problems.append(f"the signature could not be validated ({detail})")
        return result
    if not result.intact:
        result.problems.append("the signed content was changed after signing (the digest does not match)")
    elif not result.valid:
        result.problems.append("the signature value does not verify with the signer's certificate")
    if result.intact and result.valid and not result.whole_file:
        result.problems.append("the file was changed after signing (data added after the signed revision)")
    return result


def verify_command(pdf: Path, machine: Path | None = None) -> int:
    """``relaywright verify``: report on stdout; 0 when everything matches, 1 when something does not."""
    from machines.files import read_bytes

    data = read_bytes(pdf, "a PDF file", limit=None)
    if not _is_pdf(data):
        raise InputError(str(pdf), "expected a PDF settings sheet, got a file that is not a PDF")

    result = verify_pdf(data)
    out = sys.stdout
    print(f"sheet: {pdf}", file=out)
    if result.tag or result.fingerprint:
        print(f"tag: {result.tag}   revision: {result.revision}", file=out)
        print(f"inputs fingerprint: {result.fingerprint}", file=out)
    else:
        print("this PDF carries no relaywright sheet data (tag, revision, inputs fingerprint)", file=out)
    if result.signed:
        print(f"signed by: {result.signer}", file=out)
        print(f"certificate SHA-256: {result.certificate_sha256}", file=out)
        if result.signing_time:
            print(f"signing time (from the signer's clock): {result.signing_time}", file=out)
        if result.ok:
            print("signature: intact, valid, covers the whole file", file=out)
            print("the certificate is not checked against a list of trusted issuers: compare its SHA-256 with the "
                  "one the signer published", file=out)
        else:
            print("signature: NOT VALID: do not rely on this copy of the sheet", file=out)
    ok = result.ok
    for problem in result.problems:
        print(f"problem: {problem}", file=out)

    if machine is not None:
        from machines.files import load_case
        from machines.record import inputs_fingerprint

        case, _ = load_case(machine)
        current = inputs_fingerprint(case)
        if not result.fingerprint:
            print(f"machine file: {machine}: cannot compare, the sheet carries no inputs fingerprint", file=out)
            ok = False
        elif current == result.fingerprint:
            print(f"machine file: {machine}: matches (same inputs fingerprint)", file=out)
            if str(case.sheet.revision) != result.revision:
                print(f"note: the machine file is at revision {case.sheet.revision}, the sheet at revision "
                      f"{result.revision} (the inputs are the same)", file=out)
        else:
            print(f"machine file: {machine}: DOES NOT MATCH: its inputs fingerprint is now {current}; the sheet "
                  "was made from different data", file=out)
            ok = False
    print("verify: " + ("OK" if ok else "FAILED" + (" (not signed)" if not result.signed else "")), file=out)
    return 0 if ok else 1
