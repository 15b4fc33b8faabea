"""End to end in a real pseudo-terminal (pexpect), the way a person meets the wizard.

``PROMPT_TOOLKIT_NO_CPR=1`` keeps prompt_toolkit from waiting for cursor-position replies. The screen is full of
escape codes, so the tests match plain pieces of the question texts and send keys only once a question is shown.
"""

from __future__ import annotations

import os
import shutil
import sys

import pytest

from machines.files import load_case, parse_toml

from conftest import EXAMPLES, ROOT

pexpect = pytest.importorskip("pexpect")

DOWN = "\x1b[B"
TIMEOUT = 20

START = [
    ("What are you setting protection for", "\r"),
    ("Plant tag", "CW-P-201\r"),
    ("What is it, in a few words", "Chilled-water pump 1\r"),
    ("Site or plant", "\r"),
    ("Your name (prepared by)", "A. Okafor\r"),
    ("Who will check", "\r"),
    ("Who will approve", "\r"),
    ("Date of this issue", "\r"),
    ("Paper size", "\r"),
    ("Rated output (shaft power)", "250 kW\r"),
    ("Rated voltage, line to line", "6.6 kV\r"),
    ("Rated frequency", "50\r"),
    ("Full-load speed", "1485\r"),
    ("Rated power factor", "0.86\r"),
]
REST = [
    ("Efficiency at full load", "95.5 %\r"),
    ("Full-load current (FLA)", "\r"),
    ("Service factor", "\r"),
    ("Insulation class", "\r"),
    ("Rated temperature rise", "\r"),
    ("NEMA code letter", "\r"),
    ("maker's data sheet at hand", "n"),
    ("Locked-rotor (starting) current", "6.5\r"),
    ("Locked-rotor (starting) torque", "0.7\r"),
    ("Breakdown (pull-out) torque", "2.3\r"),
    ("Safe stall time with the motor cold", "15\r"),
    ("Safe stall time with the motor hot", "12\r"),
    ("Rotor inertia", "4.5\r"),
    ("Inertia of the driven load", "12 kg*m^2\r"),
    ("How does the load torque rise", "\r"),
    ("Load torque at full speed", "\r"),
    ("break the load away", "\r"),
    ("Lowest normal running current", "\r"),
    ("Nominal voltage of the bus", "\r"),
    ("Three-phase fault level", "250 MVA\r"),
    ("weakest source", "\r"),
    ("X/R ratio", "\r"),
    ("Lowest bus voltage", "\r"),
    ("Bus voltage just before a start", "\r"),
    ("What switches the motor", "\r"),
    ("under-frequency load shedding", "n"),
    ("How is the system neutral grounded", DOWN + "\r"),
    ("Earth-fault current the grounding", "300 A\r"),
    ("own cable and winding", "\r"),
    ("Phase CT ratio", "300/1 A\r"),
    ("Phase CT accuracy class", "\r"),
    ("Total burden", "\r"),
    ("Core-balance", "\r"),
    ("Voltage transformer ratio", "\r"),
    ("Differential CT ratio", "\r"),
    ("Which family of curves", "\r"),
    ("What next?", "\r"),
]


def spawn(*args, cwd):
    env = {**os.environ, "PROMPT_TOOLKIT_NO_CPR": "1", "TERM": "xterm", "COLUMNS": "200", "LINES": "50"}
    return pexpect.spawn(sys.executable, ["-m", "wizard.cli", *args], cwd=str(cwd), env=env, encoding="utf-8",
                         timeout=TIMEOUT, dimensions=(50, 200))


def answer(child, steps):
    for shown, keys in steps:
        child.expect_exact(shown)
        child.send(keys)


def finish(child) -> int:
    child.expect(pexpect.EOF)
    child.close()
    return child.exitstatus


def test_ctrl_c_in_a_terminal_then_resume_finishes_the_machine_file(tmp_path):
    out = tmp_path / "m.toml"
    child = spawn("new", "-o", str(out), cwd=ROOT)
    child.expect_exact("licensed engineer")
    answer(child, START)
    child.expect_exact("Efficiency at full load")
    child.sendintr()
    child.expect_exact("Continue with:")
    assert finish(child) == 130
    (draft,) = tmp_path.glob(".relaywright-draft-*.toml")
    assert not out.exists()

    child = spawn("new", "--resume", str(draft), cwd=ROOT)
    child.expect_exact("Continuing the draft")
    answer(child, REST)
    child.expect_exact("Written:")
    code = finish(child)
    assert code in (0, 1) or "sheet could not be made" in (child.before or ""), code  # 1: a check failed
    case, _ = load_case(out)
    assert case.sheet.tag == "CW-P-201" and case.is_motor
    assert parse_toml(out.read_text())["machine"]["efficiency"] == "95.5 %"
    assert not draft.exists()


def test_revise_in_a_terminal_shows_the_change_and_keeps_the_old_revision(tmp_path):
    path = tmp_path / "chiller.toml"
    shutil.copy(EXAMPLES / "chiller-compressor-motor.toml", path)
    child = spawn("revise", str(path), cwd=ROOT)
    answer(child, [
        ("How do you want to go through it", DOWN + "\r"),  # from the summary
        ("What next?", DOWN + "\r"),                         # change an answer
        ("Which section?", DOWN + "\r"),                     # nameplate
        ("Which answer?", DOWN * 6 + "\r"),                  # full-load current
        ("Full-load current (FLA)", "190\r"),
        ("What next?", "\r"),                                # write
        ("who makes this revision", "\r"),                   # Enter keeps the preparer's name
        ("Why is it revised", "new nameplate after rewind\r"),
    ])
    child.expect_exact("186 A → 190 A")
    child.expect_exact("Write revision 2")
    child.send("y")
    child.expect_exact("Written:")
    assert finish(child) in (0, 1)  # 1: the sheet was made and one of its checks failed
    data = parse_toml(path.read_text())
    assert data["sheet"]["revision"] == 2 and data["machine"]["rated_current"] == "190 A"
    assert data["sheet"]["history"][-1]["reason"] == "new nameplate after rewind"
    assert load_case(path.with_name("chiller.rev1.toml"))[0].sheet.revision == 1
