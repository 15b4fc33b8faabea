"""``relaywright sheet``: read a machine file, run the study, write the PDF sheet (signed when it is issued).

Signing is for issuing: ``--sign`` needs ``sheet.status = "issued"`` (with the approver and the dates), and the
signature is placed visibly in the sign-off block. An issued revision is locked: a sheet of the same tag and
revision that was issued is never replaced by a different one; a change needs a new revision
(``relaywright revise``). When the previous revision's file (``NAME.rev<N>.toml``, kept by ``revise``) is beside
the machine file, the sheet marks what changed since it.

The signing password comes from the environment variable ``RELAYWRIGHT_SIGN_PASSWORD``, else from a hidden prompt;
never from the command line (it would stay in the shell history and the process list). Without a terminal and
without the variable, the command stops with exit 2 instead of waiting for input nobody can type.
"""

from __future__ import annotations

import getpass
import os
import sys
from pathlib import Path

from machines.errors import InputError
from wizard.terminal import shown

PASSWORD_ENV = "RELAYWRIGHT_SIGN_PASSWORD"


def default_output(machine_file: Path, tag: str, revision: int) -> Path:
    """``<tag>-rev<N>.pdf`` beside the machine file (the tag made safe for a file name).

    >>> default_output(Path("plant/m.toml"), "../M-1 <x>", 2).as_posix()
    'plant/M-1_x-rev2.pdf'
    """
    from machines.files import safe_file_stem

    return Path(machine_file).parent / f"{safe_file_stem(tag, 'sheet')}-rev{revision}.pdf"


def signing_password(key: Path) -> str:
    """The PKCS#12 password: from the environment, else asked without echo; InputError when neither is possible."""
    value = os.environ.get(PASSWORD_ENV)
    if value is not None:
        return value
    if not (sys.stdin and sys.stdin.isatty()):
        raise InputError("--sign", f"no password for {key}: set {PASSWORD_ENV} or run in a terminal to be asked")
    return getpass.getpass(f"Password for {key}: ")


def _warn_missing_glyphs(record) -> None:
    """Say on stderr which characters of the sheet data no font on this machine can print (they show as boxes)."""
    from reports.fonts import missing_glyphs

    for key in ("tag", "description", "site", "prepared_by", "checked_by", "approved_by"):
        chars = missing_glyphs(str((record.sheet or {}).get(key) or ""))
        if chars:
            print(shown(f"warning: sheet.{key}: no font here has the character(s) {' '.join(chars)}; they print as "
                        "empty boxes"), file=sys.stderr)


def make_sheet(file: Path, output: Path | None = None, page_size: str | None = None, sign: Path | None = None) -> int:
    """Write the sheet; print its path. Exit code 0, or 1 when a check failed (the sheet is still written)."""
    from machines.files import load_case, write_atomic
    from machines.study import run_study
    from reports.sheet import build_sheet_for_signing, page_size_of

    if page_size is not None:
        try:
            page_size_of(page_size)  # bad --page-size: stop before any work
        except InputError as e:
            raise InputError("--page-size", e.detail) from None
    if sign is not None and not Path(sign).is_file():
        raise InputError(str(sign), "no such key file (expected a PKCS#12 .p12/.pfx file)")
    case, warnings = load_case(file)
    try:
        record = run_study(case, warnings)
    except InputError as e:  # e.g. an override the study cannot use: say which file it is in
        raise e.at(file) from None
    if sign is not None and case.sheet.status != "issued":
        raise InputError("--sign", f"signing is for issuing; {file} has sheet.status = \"{case.sheet.status}\": "
                                   "set status = \"issued\" with approved_by, approved_on and date, then sign")
    password = signing_password(Path(sign)) if sign is not None else None  # asked once the inputs are known good
    changes, previous = previous_changes(Path(file), case, record)
    pdf, box = build_sheet_for_signing(record, page_size, changes, previous)
    _warn_missing_glyphs(record)
    if sign is not None:
        from reports.signing import sign_pdf

        pdf = sign_pdf(pdf, sign, password, box=box, record=record.to_json())  # the signature covers the record
    target = default_output(Path(file), record.tag, record.revision) if output is None else Path(output)
    if target.is_dir():
        target = target / default_output(Path(file), record.tag, record.revision).name
    from reports.signing import refuse_to_replace_signed

    refuse_to_replace_signed(target, pdf)
    refuse_to_replace_issued(target, pdf)
    write_atomic(target, pdf)
    print(shown(target))
    failed = sum(1 for _, c in record.all_checks() if c.status == "fail")
    if failed:
        print(f"{failed} check(s) failed: see the findings on the sheet; do not apply these settings as they are",
              file=sys.stderr)
        return 1
    return 0


def previous_changes(file: Path, case, record):
    """(changes, previous revision) against ``NAME.rev<N-1>.toml`` beside the file, or (None, None) without one.

    A previous file that cannot be read or studied is said on stderr and left out: the sheet is still written.
    """
    revision = case.sheet.revision
    previous = Path(file).with_name(f"{Path(file).stem}.rev{revision - 1}{Path(file).suffix}")
    if revision < 1 or not previous.is_file():
        return None, None
    from machines.compare import compare
    from machines.files import load_case
    from machines.study import run_study

    try:
        old_case, old_warnings = load_case(previous)
        old_record = run_study(old_case, old_warnings)
    except InputError as e:
        print(shown(f"warning: {previous}: the previous revision cannot be studied ({e}); changes are not marked"),
              file=sys.stderr)
        return None, None
    return compare(old_case, old_record, case, record), old_case.sheet.revision


def refuse_to_replace_issued(target: Path, new_pdf: bytes) -> None:
    """InputError when ``target`` holds an issued sheet other than ``new_pdf``: an issued revision is locked."""
    try:
        with open(target, "rb") as fh:
            old = fh.read()
    except OSError:
        return
    if old == new_pdf or b"%PDF-" not in old[:1024]:
        return
    import io

    from pyhanko.pdf_utils.reader import PdfFileReader

    try:
        trailer = PdfFileReader(io.BytesIO(old), strict=False).trailer_view
        info = trailer["/Info"] if "/Info" in trailer else None
        subject = str(info["/Subject"]) if info is not None and "/Subject" in info else ""
    except Exception:  # not a sheet we can read: the signed-sheet rule above still applies
        return
    if subject.endswith(", issued"):
        raise InputError(str(target), "holds an issued sheet; an issued revision is locked: to change it, make "
                                      "a new revision (relaywright revise) or write under another name (-o); "
                                      "nothing was written")
