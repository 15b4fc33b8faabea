"""Nothing lost, nothing forged: the attack on the product, case by case, end to end through the command line
(a separate process, as a user runs it).

Data loss: a signed sheet replaced by ``demo``; a long tag's revision cut from the file name; tags that make the
same file name; a symbolic link replaced by ``revise``. Forgery: a sheet re-signed with another key. Files: pipes,
devices, huge files. Terminal: escape sequences in what is printed.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest

from machines.files import dumps
from reports.sheet import build_sheet
from reports.signing import sign_pdf, verify_pdf

from conftest import EXAMPLES, ROOT, run_cli

try:
    from tests.test_signing import PASSWORD, make_p12
except ImportError:  # tests/ on sys.path instead of the project root
    from test_signing import PASSWORD, make_p12

MOTOR = EXAMPLES / "chiller-compressor-motor.toml"
PUMP = EXAMPLES / "condenser-pump-motor.toml"
SIGN_ENV = {"RELAYWRIGHT_SIGN_PASSWORD": PASSWORD, "COLUMNS": "250"}


@pytest.fixture(scope="module")
def key(tmp_path_factory) -> Path:
    return make_p12(tmp_path_factory.mktemp("key") / "owner.p12", "A. Okafor", PASSWORD)


#: what an issued sheet needs (who checked and approved it, and when): signing is for issuing
ISSUED = {"status": "issued", "checked_on": "2026-11-21", "approved_on": "2026-11-22"}


def machine(path: Path, source: Path = MOTOR, **sheet) -> Path:
    data = tomllib.loads(source.read_text("utf-8"))
    data["sheet"].update(sheet)
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(dumps(data), "utf-8")
    return path


def one_line_error(r: subprocess.CompletedProcess) -> str:
    lines = [x for x in r.stderr.splitlines() if x.strip() and not x.startswith("Caution")]
    assert r.returncode == 2 and len(lines) == 1 and lines[0].startswith("error: "), (r.returncode, r.stderr)
    assert "Traceback" not in r.stderr and "could not complete" not in r.stderr
    return lines[0]


# ---------------------------------------------------------------------------------------------------- data loss


def test_demo_never_replaces_a_signed_sheet(tmp_path, key):
    # issue 1: `relaywright demo DIR` replaced a signed sheet in DIR (verify then said "not signed")
    demo = tmp_path / "demo"
    assert run_cli("demo", str(demo)).returncode == 0
    sheet = demo / "chiller-compressor-motor.pdf"
    issued = machine(tmp_path / "issued" / "chiller.toml", **ISSUED)  # signing is for issuing
    r = run_cli("sheet", str(issued), "-o", str(sheet), "--sign", str(key), env=SIGN_ENV)
    assert r.returncode in (0, 1), r.stderr
    signed = sheet.read_bytes()
    assert verify_pdf(signed).ok
    r = run_cli("demo", str(demo))
    assert r.returncode == 0 and "holds a signed sheet, which is never replaced" in r.stdout
    assert sheet.read_bytes() == signed
    assert run_cli("verify", str(sheet), "--trust", str(key.with_suffix(".pem"))).returncode == 0
    # nor does the sheet command, without -o or with it
    r = run_cli("sheet", str(demo / "chiller-compressor-motor.toml"), "-o", str(sheet))
    assert "holds a signed sheet" in one_line_error(r) and sheet.read_bytes() == signed


def test_an_issued_sheet_is_never_replaced_by_batch_or_sheet(tmp_path):
    src, out = tmp_path / "plant", tmp_path / "out"
    machine(src / "chiller.toml", **ISSUED)
    assert run_cli("batch", str(src), "-o", str(out), "--workers", "1").returncode in (0, 1)
    sheet = out / "CH-M-101-rev1.pdf"
    issued = sheet.read_bytes()
    r = run_cli("sheet", str(machine(tmp_path / "other.toml", status="draft")), "-o", str(sheet))
    assert "holds an issued sheet, which is never replaced" in one_line_error(r)
    assert sheet.read_bytes() == issued


def test_a_long_tag_keeps_its_revision_in_the_file_name(tmp_path):
    # issue 2: names were cut at 80 characters, so revision 2 (a draft) replaced the issued revision 1
    long = "HARBOURSIDE-DISTRICT-COOLING-NORTH-HALL-CHILLER-" * 3 + "M-101"
    src, out = tmp_path / "plant", tmp_path / "out"
    machine(src / "chiller.toml", tag=long, revision=1, **ISSUED)
    assert run_cli("batch", str(src), "-o", str(out), "--workers", "1").returncode in (0, 1)
    first = {p.name: p.read_bytes() for p in out.iterdir() if not p.name.startswith(".") and p.name != "index.pdf"}
    assert len(first) == 2 and all("-rev1." in name for name in first)
    machine(src / "chiller.toml", tag=long, status="draft", revision=2, checked_by="", approved_by="")
    assert run_cli("batch", str(src), "-o", str(out), "--workers", "1").returncode in (0, 1)
    now = {p.name for p in out.iterdir() if not p.name.startswith(".")}
    assert set(first) < now and any("-rev2." in name for name in now)
    assert all((out / name).read_bytes() == data for name, data in first.items())
    record = json.loads(next(out.glob("*-rev2.json")).read_text("utf-8"))
    assert record["tag"] == long and record["revision"] == 2


def test_tags_that_make_the_same_file_name_never_overwrite_each_other(tmp_path):
    # issue 3: P-101/A and P-101 A overwrote each other with exit 0
    src, out = tmp_path / "plant", tmp_path / "out"
    machine(src / "a.toml", PUMP, tag="P-101/A")
    machine(src / "b.toml", PUMP, tag="P-101 A")
    assert run_cli("batch", str(src), "-o", str(out), "--workers", "1").returncode in (0, 1)
    records = {json.loads(p.read_text("utf-8"))["tag"] for p in out.glob("*.json") if not p.name.startswith(".")}
    assert records == {"P-101/A", "P-101 A"}
    # a later run from another folder, whose name clashes with a file of another machine there: refused
    other = tmp_path / "other"
    machine(other / "a.toml", PUMP, tag="P-101/A")
    assert run_cli("batch", str(other), "-o", str(tmp_path / "out2"), "--workers", "1").returncode in (0, 1)
    machine(other / "a.toml", PUMP, tag="P-101 A")
    before = {p.name: p.read_bytes() for p in (tmp_path / "out2").glob("P-101*")}
    r = run_cli("batch", str(other), "-o", str(tmp_path / "out2"), "--workers", "1", env={"COLUMNS": "250"})
    assert r.returncode == 2 and "sheet of another machine" in r.stdout
    assert {p.name: p.read_bytes() for p in (tmp_path / "out2").glob("P-101*")} == before
    # and the sheet command, writing beside its machine file
    one = machine(tmp_path / "s" / "one.toml", PUMP, tag="P-101/A")
    two = machine(tmp_path / "s" / "two.toml", PUMP, tag="P-101 A")
    assert run_cli("sheet", str(one)).returncode in (0, 1)
    assert "sheet of another machine" in one_line_error(run_cli("sheet", str(two)))


@pytest.mark.parametrize("tag", ["..", ".", "\U0001F525", "   "])
def test_a_tag_without_letters_or_digits_is_refused(tmp_path, tag):
    # issue 3: '..', '.' and an emoji all became sheet-rev1.pdf
    r = run_cli("sheet", str(machine(tmp_path / "m.toml", tag=tag)))
    assert "sheet.tag: expected a plant tag with letters or digits" in one_line_error(r)
    assert not list(tmp_path.glob("*.pdf"))


def test_revise_writes_through_a_symbolic_link(tmp_path):
    # issue 5: `revise` on a symlinked machine file replaced the link with a regular file
    real = machine(tmp_path / "store" / "chiller.toml")
    link = tmp_path / "chiller.toml"
    link.symlink_to(real)
    changes = tmp_path / "changes.toml"
    changes.write_text('[machine]\nrated_current = "185 A"\n[[sheet.history]]\nby = "L. Brandt"\n'
                       'reason = "rewound"\n', "utf-8")
    r = run_cli("revise", str(link), "--answers", str(changes))
    assert r.returncode in (0, 1), r.stderr
    assert link.is_symlink() and link.resolve() == real.resolve()
    assert tomllib.loads(real.read_text("utf-8"))["sheet"]["revision"] == 2


# ---------------------------------------------------------------------------------------------------- forgery


def test_a_changed_byte_and_a_forgery_fail_verify_through_the_cli(tmp_path, key):
    # issues 6 and 7: a padding flip passed; a sheet re-signed with another key under the same name, showing a
    # changed override and the original fingerprint, passed `verify --machine` with exit 0
    from machines.files import load_case
    from machines.study import run_study

    m = machine(tmp_path / "chiller.toml", **ISSUED)
    sheet = tmp_path / "sheet.pdf"
    assert run_cli("sheet", str(m), "-o", str(sheet), "--sign", str(key), env=SIGN_ENV).returncode in (0, 1)
    trust = ("--trust", str(key.with_suffix(".pem")))
    assert run_cli("verify", str(sheet), "--machine", str(m), *trust).returncode == 0
    assert run_cli("verify", str(sheet), "--machine", str(m)).returncode == 3
    data = bytearray(sheet.read_bytes())
    data[data.rindex(b"0000>") + 1] ^= 0x04  # one bit of the signature's padding
    (tmp_path / "flipped.pdf").write_bytes(bytes(data))
    r = run_cli("verify", str(tmp_path / "flipped.pdf"), *trust)
    assert r.returncode == 1 and "padding was changed" in r.stdout
    (tmp_path / "cut.pdf").write_bytes(sheet.read_bytes()[:-100])
    r = run_cli("verify", str(tmp_path / "cut.pdf"), *trust)
    assert r.returncode == 1 and "FAILED (the file is damaged or truncated)" in r.stdout

    forger = make_p12(tmp_path / "forger.p12", "A. Okafor", PASSWORD)
    good = run_study(*load_case(m))
    changed = machine(tmp_path / "changed.toml", **ISSUED)
    changed.write_text(changed.read_text("utf-8") + '\n[overrides]\n"49.pickup_current" = "230 A"\n', "utf-8")
    bad = run_study(*load_case(changed))
    bad.inputs_fingerprint = good.inputs_fingerprint
    (tmp_path / "forged.pdf").write_bytes(sign_pdf(build_sheet(bad), forger, PASSWORD, record=bad.to_json()))
    for args in ((), trust):
        r = run_cli("verify", str(tmp_path / "forged.pdf"), "--machine", str(m), *args)
        assert r.returncode == 1 and "DOES NOT MATCH" in r.stdout, r.stdout


# ---------------------------------------------------------------------------------------------------- files


def test_pipes_and_devices_are_skipped_not_read(tmp_path):
    # issue 9: a FIFO named x.toml hung the batch; a link to /dev/zero aborted it with MemoryError
    src, out = tmp_path / "plant", tmp_path / "out"
    machine(src / "good.toml")
    os.mkfifo(src / "pipe.toml")
    (src / "zero.toml").symlink_to("/dev/zero")
    r = run_cli("batch", str(src), "-o", str(out), "--workers", "1", env={"COLUMNS": "250"}, timeout=120)
    assert r.returncode in (0, 1), r.stdout + r.stderr
    assert "a named pipe (FIFO)" in r.stdout and "a device" in r.stdout
    assert (out / "CH-M-101-rev1.pdf").is_file()
    for path, what in (("/dev/zero", "a device"), (str(src / "pipe.toml"), "a named pipe")):
        assert what in one_line_error(run_cli("settings", path, timeout=20))


def test_a_huge_file_is_refused_before_it_is_read(tmp_path):
    big = tmp_path / "big.toml"
    with open(big, "wb") as fh:
        fh.truncate(3_000_000_000)  # sparse: 3 GB that take no disk
    assert "of at most 1 MB, got 3000000000 bytes" in one_line_error(run_cli("settings", str(big)))


@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0, reason="root writes into read-only folders")
def test_a_read_only_output_folder_keeps_the_summary(tmp_path):
    # issue 10: a read-only output folder lost the per-file summary
    src, out = tmp_path / "plant", tmp_path / "out"
    machine(src / "good.toml")
    out.mkdir()
    out.chmod(0o555)
    try:
        r = run_cli("batch", str(src), "-o", str(out), "--workers", "1", env={"COLUMNS": "250"})
    finally:
        out.chmod(0o755)
    assert r.returncode == 2 and "good.toml" in r.stdout and "cannot write" in r.stdout
    assert "index not written" in r.stdout and "Traceback" not in r.stderr


# ---------------------------------------------------------------------------------------------------- bad input


@pytest.mark.parametrize("addition, key", [
    ('\n[overrides]\n"49.pickup_current" = "0 A"\n', "overrides.49.pickup_current"),
    ('\n[overrides]\n"49.heating_time_constant" = "0 min"\n', "overrides.49.heating_time_constant"),
    ('\n[overrides]\n"66.starts_cold" = ' + "9" * 400 + "\n", "overrides.66.starts_cold"),
])
def test_overrides_that_reached_the_core_are_one_line_errors(tmp_path, addition, key):
    # issue 11: "could not complete (ZeroDivisionError) … please report this"
    m = tmp_path / "m.toml"
    m.write_text(MOTOR.read_text("utf-8") + addition, "utf-8")
    assert f"{m}: {key}:" in one_line_error(run_cli("settings", str(m)))


def test_a_400_digit_number_in_a_file_is_a_one_line_error(tmp_path):
    m = tmp_path / "m.toml"
    m.write_text(MOTOR.read_text("utf-8").replace('rated_voltage = "4.16 kV"', "rated_voltage = " + "4" * 400),
                 "utf-8")
    assert "machine.rated_voltage: expected a number of at most 15 digits" in one_line_error(
        run_cli("settings", str(m)))


@pytest.mark.parametrize("command", ["new", "revise"])
def test_a_closed_stdin_is_a_one_line_answer(tmp_path, command):
    # issue 11: a closed standard input gave an internal error
    m = machine(tmp_path / "m.toml")
    args = [sys.executable, "-m", "wizard.cli", command] + ([str(m)] if command == "revise" else [])
    r = subprocess.run(args, cwd=ROOT, capture_output=True, text=True, timeout=60, preexec_fn=lambda: os.close(0))
    assert r.returncode == 2 and "there is none here; nothing was written" in r.stderr
    assert "Traceback" not in r.stderr and "could not complete" not in r.stderr


@pytest.mark.parametrize("value", ['"abc"', "1.5", "true", "7"])
def test_a_revision_in_the_answers_of_revise_is_a_one_line_error(tmp_path, value):
    m = machine(tmp_path / "m.toml")
    before = m.read_bytes()
    changes = tmp_path / "changes.toml"
    changes.write_text(f'[sheet]\nrevision = {value}\n[[sheet.history]]\nby = "x"\nreason = "y"\n', "utf-8")
    assert "sheet.revision: is set by relaywright revise" in one_line_error(
        run_cli("revise", str(m), "--answers", str(changes)))
    assert m.read_bytes() == before


def test_a_draft_with_a_section_of_the_wrong_type_is_refused(tmp_path):
    from machines.errors import InputError
    from wizard.drafts import load_draft

    draft = tmp_path / ".relaywright-draft-x.toml"
    draft.write_text('format = "relaywright.draft/1"\ncommand = "new"\nasked = []\n'
                     'answers = { sheet = { tag = "A" }, machine = [1] }\n', "utf-8")
    with pytest.raises(InputError, match="the draft is damaged"):
        load_draft(draft)


@pytest.mark.parametrize("args, fragment", [(["settings"], "Missing argument"), (["frobnicate"], "No such command"),
                                            (["batch", "x", "-o", "y", "--workers", "0"], "--workers")])
def test_usage_errors_are_one_line(args, fragment):
    # issue 14: usage errors printed click's four-line block
    assert fragment in one_line_error(run_cli(*args))


# ---------------------------------------------------------------------------------------------------- terminal


def test_nothing_printed_acts_on_the_terminal(tmp_path):
    # issue 15: ESC sequences in a tag or description reached the terminal; stderr echoed NUL, BEL and U+202E
    evil = "\x1b]0;owned\x07\x1b[2J\u202e"
    m = tmp_path / "m.toml"
    m.write_text(MOTOR.read_text("utf-8").replace('tag = "CH-M-101"', 'tag = "CH-M-101\\u001b[2J"'), "utf-8")
    r = run_cli("settings", str(m))
    assert "sheet.tag: expected plain text, got U+001B" in one_line_error(r)
    named = tmp_path / f"m{evil}.toml"
    named.write_text(MOTOR.read_text("utf-8"), "utf-8")
    for r in (run_cli("settings", str(tmp_path / f"none{evil}.toml")), run_cli("settings", str(named))):
        text = r.stdout + r.stderr
        assert not any(ch in text for ch in "\x1b\x07\x00\u202e"), text
    src, out = tmp_path / "plant", tmp_path / "out"
    machine(src / f"{evil}.toml")
    r = run_cli("batch", str(src), "-o", str(out), "--workers", "1", env={"COLUMNS": "250"})
    assert r.returncode in (0, 1) and not any(ch in r.stdout + r.stderr for ch in "\x1b\x07\u202e")
    assert "\\x1b]0;owned\\x07" in r.stdout


def test_the_paths_written_are_printed_escaped(tmp_path):
    # issue 15: a path with ESC, BEL or U+202E in it is printed escaped by every command that writes a file
    evil = "\x1b]0;owned\x07\u202e"
    sheet = tmp_path / f"s{evil}.pdf"
    r = run_cli("sheet", str(MOTOR), "-o", str(sheet))
    assert r.returncode in (0, 1) and sheet.is_file()
    assert not any(ch in r.stdout + r.stderr for ch in "\x1b\x07\u202e") and "\\x1b]0;owned" in r.stdout
    folder = tmp_path / f"c{evil}"
    r = run_cli("comtrade", str(MOTOR), "-o", str(folder))
    assert r.returncode in (0, 1) and folder.is_dir()
    assert not any(ch in r.stdout + r.stderr for ch in "\x1b\x07\u202e") and "\\x1b]0;owned" in r.stdout
