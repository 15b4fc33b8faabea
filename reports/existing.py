"""What is already in a file a command is about to write: nothing saved is lost.

Every command that writes a sheet (``sheet``, ``batch``, ``demo``, ``new`` and ``revise`` through ``sheet``) asks
:func:`refuse_to_replace` first. A signed sheet, an issued sheet, the sheet of another machine (another tag), a file
that is not a relaywright sheet, a symbolic link or anything but a regular file is never replaced; the same bytes
again, or a draft sheet of the same machine, may be. Records (JSON) beside the sheets are guarded the same way by
:func:`refuse_to_replace_record`.

The PDF is read as bytes, without a PDF library (they take half a second to import, and a worker of the batch
must not pay that for every sheet): the sheet's /Keywords (written by :mod:`reports.sheet`, rewritten with octal
escapes by a signer), its /Subject (which ends with the sheet's status) and the presence of a signature dictionary
(/ByteRange) are enough to tell.
"""

from __future__ import annotations

import json
import os
import re
import stat
from pathlib import Path

from machines.errors import InputError, one_line

KEYWORDS_PREFIX = "relaywright settings sheet"
_KEYWORDS = re.compile(rb"/Keywords\s*([(<])")
_FIELDS = re.compile(r"inputs_fingerprint=(sha256:[0-9a-f]{64});(?P<rest>.*?)(?:; )?tag=(?P<tag>.*)\Z", re.S)
_ESCAPES = {ord("n"): b"\n", ord("r"): b"\r", ord("t"): b"\t", ord("b"): b"\b", ord("f"): b"\f",
            ord("("): b"(", ord(")"): b")", ord("\\"): b"\\"}
MAX_EXISTING = 200_000_000  #: bytes of an existing file read to compare it (a sheet is far smaller)


def pdf_string(data: bytes, at: int) -> bytes:
    """The PDF string object starting at ``data[at]`` (``(`` literal or ``<`` hex), decoded to its bytes.

    >>> pdf_string(b"(a\\\\(b\\\\) \\\\056c)", 0), pdf_string(b"<48 69>", 0)
    (b'a(b) .c', b'Hi')
    """
    if data[at:at + 1] == b"<":
        end = data.find(b">", at)
        digits = re.sub(rb"\s", b"", data[at + 1:end if end >= 0 else len(data)])
        return bytes.fromhex((digits + b"0" * (len(digits) % 2)).decode("ascii", "replace"))
    out, depth, i = bytearray(), 0, at + 1
    while i < len(data):
        ch = data[i]
        if ch == 0x5C:  # backslash
            nxt = data[i + 1:i + 2]
            if nxt and nxt[0] in _ESCAPES:
                out += _ESCAPES[nxt[0]]
                i += 2
            elif nxt[:1].isdigit():
                m = re.match(rb"[0-7]{1,3}", data[i + 1:i + 4])
                out.append(int(m.group(0), 8) & 0xFF if m else 0)
                i += 1 + (len(m.group(0)) if m else 1)
            elif nxt in (b"\r", b"\n"):  # a line continuation
                i += 2 + (data[i + 1:i + 3] == b"\r\n")
            else:
                i += 1
            continue
        if ch == 0x28:
            depth += 1
        elif ch == 0x29:
            if depth == 0:
                break
            depth -= 1
        out.append(ch)
        i += 1
    return bytes(out)


def text_of(raw: bytes) -> str:
    """A PDF text string: UTF-16BE after a byte-order mark, else PDFDocEncoding (read as Latin-1)."""
    if raw[:2] == b"\xfe\xff":
        return raw[2:].decode("utf-16-be", "replace")
    if raw[:3] == b"\xef\xbb\xbf":
        return raw[3:].decode("utf-8", "replace")
    return raw.decode("latin-1")


def raw_keywords(data: bytes) -> dict[str, str]:
    """The fields of a relaywright sheet's /Keywords (the last one in the file: a signer may rewrite the
    information dictionary): ``inputs_fingerprint``, ``revision``, ``tag`` and any other ``name=value``
    (``status`` where the sheet gives it); an empty dict when the file carries none."""
    found = None
    for m in _KEYWORDS.finditer(data):
        found = m
    if found is None:
        return {}
    text = text_of(pdf_string(data, found.start(1)))
    if not text.startswith(KEYWORDS_PREFIX):
        return {}
    m = _FIELDS.search(text)
    if m is None:
        return {}
    out = {"inputs_fingerprint": m.group(1), "tag": m.group("tag")}
    for part in m.group("rest").split(";"):
        name, eq, value = part.strip().partition("=")
        if eq and name not in out:
            out[name] = value
    return out


_SUBJECT = re.compile(rb"/Subject\s*([(<])")


def raw_status(data: bytes) -> str:
    """The status a sheet gives at the end of its /Subject ("…, revision 2, issued"), or ''."""
    found = None
    for m in _SUBJECT.finditer(data):
        found = m
    if found is None:
        return ""
    text = text_of(pdf_string(data, found.start(1)))
    return text.rsplit(", ", 1)[-1].strip() if text.startswith("Protection settings sheet for ") else ""


def is_signed(data: bytes) -> bool:
    """Whether a PDF holds a signature dictionary (its /ByteRange), readable or not."""
    return re.search(rb"/ByteRange\s*\[", data) is not None


def _existing(target: Path) -> bytes | None:
    """The bytes now at ``target`` (None when there is nothing); InputError when it is something never replaced."""
    try:
        st = os.lstat(target)
    except FileNotFoundError:
        return None
    except OSError as e:
        raise InputError(str(target), f"cannot be checked ({e.strerror or e}); nothing was written") from None
    if stat.S_ISLNK(st.st_mode):
        raise InputError(str(target), "is a symbolic link; it is not replaced (write elsewhere, or remove the "
                                      "link); nothing was written")
    if not stat.S_ISREG(st.st_mode):
        what = "a folder" if stat.S_ISDIR(st.st_mode) else "not a regular file"
        raise InputError(str(target), f"is {what}; it is not replaced; nothing was written")
    if st.st_size > MAX_EXISTING:
        raise InputError(str(target), "holds a large file that is not a settings sheet; it is not replaced; "
                                      "nothing was written")
    try:
        with open(target, "rb") as fh:
            return fh.read()
    except OSError as e:
        raise InputError(str(target), f"cannot be read to check it ({e.strerror or e}); nothing was written") \
            from None


def refuse_to_replace(target: str | Path, new_pdf: bytes) -> None:
    """InputError unless ``target`` may take ``new_pdf``: it is absent or empty, holds the same bytes, or holds an
    unsigned draft sheet of the same machine (same tag)."""
    target = Path(target)
    old = _existing(target)
    if not old or old == new_pdf:
        return
    never = "; write the new sheet under another name (-o) or raise sheet.revision; nothing was written"
    if b"%PDF-" not in old[:1024]:
        raise InputError(str(target), "holds a file that is not a PDF settings sheet, which is not replaced; "
                                      "nothing was written")
    if is_signed(old):
        raise InputError(str(target), "holds a signed sheet, which is never replaced" + never)
    old_kw, new_kw = raw_keywords(old), raw_keywords(new_pdf)
    if not old_kw:
        raise InputError(str(target), "holds a PDF that is not a relaywright settings sheet, which is not "
                                      "replaced; nothing was written")
    if "issued" in (old_kw.get("status"), raw_status(old), _sibling_status(target, old_kw)):
        raise InputError(str(target), "holds an issued sheet, which is never replaced: an issued revision is "
                                      "locked; make a new revision (relaywright revise) or write under another "
                                      "name (-o); nothing was written")
    if new_kw and old_kw["tag"] != new_kw.get("tag"):
        raise InputError(str(target), f"holds the sheet of another machine (tag {one_line(old_kw['tag'])}), "
                                      f"which is not replaced by the sheet of {one_line(new_kw.get('tag', ''))}; "
                                      "nothing was written")


def _sibling_status(target: Path, keywords: dict) -> str:
    """The status in the settings record written beside a sheet (``X.json`` beside ``X.pdf``), when that record is
    of the same sheet (same inputs fingerprint)."""
    record = read_record(target.with_suffix(".json"))
    if record is None or record.get("inputs_fingerprint") != keywords.get("inputs_fingerprint"):
        return ""
    sheet = record.get("sheet")
    return sheet.get("status", "") if isinstance(sheet, dict) else ""


def read_record(path: Path) -> dict | None:
    """A settings record (JSON) as a dict, or None when there is no readable one (a regular file only)."""
    try:
        st = os.stat(path)
        if not stat.S_ISREG(st.st_mode) or st.st_size > MAX_EXISTING:
            return None
        data = json.loads(Path(path).read_text("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError, RecursionError):
        return None
    return data if isinstance(data, dict) else None


def refuse_to_replace_record(target: str | Path, tag: str, text: str) -> None:
    """InputError unless ``target`` may take the record ``text`` of machine ``tag``: absent, the same text, or a
    record of the same machine that is not issued."""
    target = Path(target)
    old = _existing(target)
    if not old or old == text.encode("utf-8"):
        return
    record = read_record(target)
    if record is None or record.get("format") != "relaywright.settings/1":
        raise InputError(str(target), "holds a file that is not a relaywright settings record, which is not "
                                      "replaced; nothing was written")
    if record.get("tag") != tag:
        raise InputError(str(target), f"holds the record of another machine (tag {one_line(record.get('tag'))}), "
                                      f"which is not replaced by the record of {one_line(tag)}; nothing was written")
    sheet = record.get("sheet") if isinstance(record.get("sheet"), dict) else {}
    if sheet.get("status") == "issued":
        raise InputError(str(target), "holds the record of an issued sheet, which is never replaced; raise "
                                      "sheet.revision; nothing was written")
