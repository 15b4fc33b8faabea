"""End to end in a real pseudo-terminal (pexpect), the way a person meets the wizard.

``PROMPT_TOOLKIT_NO_CPR=1`` keeps prompt_toolkit from waiting for cursor-position replies. Keys are sent only once
the question they answer is on the screen, except where a test types ahead on purpose (several answers in one
burst, as a hurried person or a bouncing key does): what was typed before a question appeared must never answer it.
Where the layout is checked, the output is played into a terminal emulator (pyte) of the width under test.
"""

from __future__ import annotations

import os
import re
import shutil
import sys
import time
from pathlib import Path

import pytest

from machines.files import load_case, parse_toml

from conftest import EXAMPLES, ROOT, run_cli

pexpect = pytest.importorskip("pexpect")

DOWN = "\x1b[B"
ESC = "\x1b"
TIMEOUT = 30

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
    ("maker's data sheet at hand", "n\r"),
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
    ("under-frequency load shedding", "n\r"),
    ("How is the system neutral grounded", DOWN + "\r"),
    ("Earth-fault current the grounding", "300 A\r"),
    ("own cable and winding", "\r"),
    ("Phase CT ratio", "40/1 A\r"),
    ("Phase CT accuracy class", "\r"),
    ("Total burden", "\r"),
    ("Core-balance", "\r"),
    ("Voltage transformer ratio", "\r"),
    ("Differential CT ratio", "\r"),
    ("Which family of curves", "\r"),
]


def spawn(*args, cwd, rows=50, cols=200, log=None):
    env = {**os.environ, "PROMPT_TOOLKIT_NO_CPR": "1", "TERM": "xterm", "COLUMNS": str(cols), "LINES": str(rows)}
    child = pexpect.spawn(sys.executable, ["-m", "wizard.cli", *args], cwd=str(cwd), env=env, encoding="utf-8",
                          timeout=TIMEOUT, dimensions=(rows, cols))
    child.logfile_read = log
    return child


_GAP = r"(?:\s|\x1b\[[0-9;?]*[A-Za-z])+"  # white space, a line break or escape codes between two words


def words(text: str) -> re.Pattern:
    """A pattern for ``text`` wherever the screen breaks its lines or styles its words."""
    return re.compile(_GAP.join(re.escape(w) for w in text.split()))


def see(child, text: str) -> None:
    child.expect(words(text))


def answer(child, steps):
    for shown, keys in steps:
        see(child, shown)
        child.send(keys)


#: the review's menu with its pointer on the first entry (not the line that echoes a choice made)
MENU_FIRST = re.compile(r"»(?:\x1b\[[0-9;]*m|\s)*(Next page|Write the machine file)")


def write_through_review(child):
    """Page through the review and write (the review is paged to the terminal's height)."""
    while True:
        child.expect(MENU_FIRST)
        child.send("\r")
        if child.match.group(1) == "Write the machine file":
            return


def finish(child) -> int:
    child.expect(pexpect.EOF)
    child.close()
    return child.exitstatus


def flat(text: str) -> str:
    return " ".join(re.sub(r"\x1b\[[0-9;?]*[A-Za-z]", " ", text).split())


# ---------------------------------------------------------------------------------------------------- the whole flow


def test_the_whole_motor_flow_with_a_ctrl_c_and_a_resume(tmp_path):
    out = tmp_path / "m.toml"
    child = spawn("new", "-o", str(out), cwd=ROOT)
    child.expect_exact("licensed engineer")
    child.expect_exact("< and Enter (or Esc) goes back")  # the way back is shown on the first screen
    answer(child, START)
    child.expect_exact("Efficiency at full load")
    child.sendintr()
    child.expect_exact("Continue with:")
    assert finish(child) == 130
    (draft,) = tmp_path.glob(".relaywright-draft-*.toml")
    assert not out.exists()

    # a plain 'new' in the same folder offers the hidden draft, by name
    child = spawn("new", "-o", str(out), cwd=ROOT)
    child.expect_exact(draft.name)
    child.expect_exact("Continue where it stopped?")
    child.send("\r")
    answer(child, REST)
    write_through_review(child)
    child.expect_exact("Written:")
    child.expect_exact("Findings")
    child.expect_exact("relaywright settings")
    code = finish(child)
    case, _ = load_case(out)
    assert case.sheet.tag == "CW-P-201" and case.is_motor
    data = parse_toml(out.read_text())
    assert data["machine"]["efficiency"] == "95.5 %" and data["machine"]["locked_rotor_current"] == "6.5 pu"
    assert not draft.exists()
    # new ends with the same exit code as the settings command
    assert code == run_cli("settings", str(out)).returncode


def test_n_and_enter_and_keys_typed_ahead_never_change_another_answer(tmp_path):
    out = tmp_path / "m.toml"
    child = spawn("new", "-o", str(out), cwd=ROOT)
    answer(child, START[:-1])
    # the power factor, and the efficiency typed ahead in the same burst: the efficiency question must not take it
    child.expect_exact("Rated power factor")
    child.send("0.86\r95.5 %\r")
    child.expect_exact("not used")  # the person is told that what was typed ahead was not used
    child.expect_exact("Efficiency at full load")
    child.send("96 %\r")
    # 40 A is +50 % off the computed 26.6 A: warned; 'n' and Enter gives it again, and a second Enter typed ahead
    # must not accept the computed default at the question asked again
    child.expect_exact("Full-load current (FLA)")
    child.send("40\r")
    child.expect_exact("Keep this answer?")
    child.send("n\r\r")
    child.expect_exact("not used")
    child.expect_exact("Full-load current (FLA)")
    child.send("27\r")
    answer(child, [("Service factor", "\r"), ("Insulation class", "\r"), ("Rated temperature rise", "\r"),
                   ("NEMA code letter", "\r")])
    # n and Enter at the data-sheet question, with the next answer typed ahead: it must not be taken
    child.expect_exact("maker's data sheet at hand")
    child.send("n\r6.5\r")
    child.expect_exact("not used")
    child.expect_exact("Locked-rotor (starting) current")
    child.send("7\r")
    rest = REST[8:]
    i = next(k for k, (shown, _) in enumerate(rest) if shown == "under-frequency load shedding")
    answer(child, rest[:i])
    # n and Enter, and an Enter typed ahead: it must not pick the first grounding method (solidly)
    child.expect_exact("under-frequency load shedding")
    child.send("n\r\r")
    answer(child, rest[i + 1:])
    write_through_review(child)
    child.expect_exact("Written:")
    finish(child)
    data = parse_toml(out.read_text())
    assert data["machine"]["power_factor"] == "0.86"
    assert data["machine"]["efficiency"] == "96 %"
    assert data["machine"]["rated_current"] == "27 A"
    assert data["machine"]["locked_rotor_current"] == "7 pu"
    assert data["grounding"]["method"] == "low-resistance"


def test_back_with_less_than_and_with_esc_out_of_a_menu(tmp_path):
    out = tmp_path / "m.toml"
    child = spawn("new", "-o", str(out), cwd=ROOT)
    answer(child, START[:3])
    child.expect_exact("Site or plant")
    child.send("<\r")  # typed back: never an answer
    child.expect_exact("← back to: Description")
    child.expect_exact("What is it, in a few words")
    child.send("\r")  # Enter keeps the description
    answer(child, START[3:8])
    child.expect_exact("Paper size")
    child.send(ESC)  # Esc out of a menu
    child.expect_exact("← back to: Date")
    child.expect_exact("Date of this issue")
    child.send("\r")
    child.expect_exact("Paper size")
    child.send("<")  # < in a menu: at once
    child.expect_exact("Date of this issue")
    child.send("?\r")  # help, not an answer
    child.expect_exact("year-month-day")
    child.expect_exact("Date of this issue")
    child.send("2026-11-20\r")
    answer(child, [("Paper size", "\r")] + START[9:] + REST)
    write_through_review(child)
    child.expect_exact("Written:")
    finish(child)
    data = parse_toml(out.read_text())
    assert data["sheet"]["description"] == "Chilled-water pump 1" and "site" not in data["sheet"]
    assert data["sheet"]["date"] == "2026-11-20"


def test_revise_in_a_terminal_shows_the_change_and_keeps_the_old_revision(tmp_path):
    path = tmp_path / "chiller.toml"
    shutil.copy(EXAMPLES / "chiller-compressor-motor.toml", path)
    child = spawn("revise", str(path), cwd=ROOT)
    answer(child, [
        ("How do you want to go through it", DOWN + "\r"),  # from the summary
    ])
    child.expect_exact("What next?")
    child.send(DOWN + "\r")  # change an answer (page 1)
    answer(child, [
        ("Which section?", DOWN + "\r"),                     # nameplate
        ("Which answer?", DOWN * 6 + "\r"),                  # full-load current
        ("Full-load current (FLA)", "190\r"),
    ])
    write_through_review(child)
    answer(child, [
        ("who makes this revision", "\r"),                   # Enter keeps the preparer's name
        ("Why is it revised", "new nameplate after rewind\r"),
    ])
    child.expect_exact("Full-load current: 186 A → 190 A")
    child.expect_exact("Write revision 2")
    child.send("y\r")
    child.expect_exact("Written:")
    child.expect_exact("Findings")
    code = finish(child)
    assert code == run_cli("settings", str(path)).returncode
    data = parse_toml(path.read_text())
    assert data["sheet"]["revision"] == 2 and data["machine"]["rated_current"] == "190 A"
    assert data["sheet"]["history"][-1]["reason"] == "new nameplate after rewind"
    assert "checked_by" not in data["sheet"] and data["sheet"]["status"] == "draft"
    assert load_case(path.with_name("chiller.rev1.toml"))[0].sheet.revision == 1


def test_n_at_the_last_question_of_revise_writes_nothing(tmp_path):
    path = tmp_path / "chiller.toml"
    shutil.copy(EXAMPLES / "chiller-compressor-motor.toml", path)
    before = path.read_text()
    child = spawn("revise", str(path), cwd=ROOT)
    answer(child, [("How do you want to go through it", DOWN + "\r")])
    write_through_review(child)
    answer(child, [("who makes this revision", "\r"), ("Why is it revised", "names\r")])
    child.expect_exact("Write revision 2")
    child.send("n")
    time.sleep(1.0)  # n alone answers nothing: the question waits for Enter
    assert child.isalive() and path.read_text() == before
    child.send("\r")
    child.expect_exact("Continue with:")
    assert finish(child) == 0
    assert path.read_text() == before and list(tmp_path.glob(".relaywright-draft-*.toml"))


# ---------------------------------------------------------------------------------------------------- layout


class Screen:
    """A terminal emulator of a given size that keeps every line that scrolled off (pexpect's read log)."""

    def __init__(self, cols: int, rows: int):
        pyte = pytest.importorskip("pyte")
        self.screen = pyte.HistoryScreen(cols, rows, history=5000)
        self.stream = pyte.Stream(self.screen)
        self.cols = cols

    def write(self, text: str) -> None:
        self.stream.feed(text)

    def flush(self) -> None:
        pass

    def lines(self) -> list[str]:
        def row(chars) -> str:
            return "".join(chars[x].data for x in range(self.cols))

        top = [row(r) for r in self.screen.history.top]
        return top + [row(self.screen.buffer[y]) for y in range(self.screen.lines)]


def complete_draft(tmp_path, out):
    """A draft holding every answer of a motor (as a session stopped at the review leaves it)."""
    from wizard.drafts import Draft
    from wizard.flow import Answers, scripted

    data = parse_toml((EXAMPLES / "chiller-compressor-motor.toml").read_text())
    data["machine"]["safe_stall_time_hot"] = "3 s"  # a failed check: the findings end the session
    a = Answers(data=data)
    scripted(a)
    draft = Draft(tmp_path / ".relaywright-draft-m.toml", "new", out)
    draft.save(a)
    return draft.path


@pytest.mark.parametrize("cols", [60, 80, 120])
def test_every_message_wraps_at_word_boundaries(tmp_path, cols):
    # the interview with refusals, a warning, help and a stop; then the review, the findings and the end
    screen = Screen(cols, 40)
    child = spawn("new", "-o", "m.toml", cwd=tmp_path, rows=40, cols=cols, log=screen)
    answer(child, START[:9] + [("Rated output (shaft power)", "250 kW\r"), ("Rated voltage, line to line", "6.6 kV\r"),
                               ("Rated frequency", "50\r")])
    see(child, "Full-load speed")
    child.send("1300\r")  # refused at once: 13 % slip
    see(child, "slip")
    child.send("\x15" + "1485\r")
    see(child, "Rated power factor")
    child.send("25.8 deg\r")  # an angle: refused
    see(child, "is an angle")
    child.send("\x15" + "0.86\r")
    see(child, "Efficiency at full load")
    child.send("95.5\r")  # a bare percentage: refused with the fix
    see(child, "for a percentage")
    child.send("\x15" + "?\r")
    see(child, "Ctrl-C: stop")
    child.send("\x15" + "95.5 %\r")  # the refused text is offered again after the help
    see(child, "Full-load current (FLA)")
    child.send("40\r")
    see(child, "Keep this answer?")
    child.sendintr()
    see(child, "Continue with:")
    finish(child)
    draft = complete_draft(tmp_path, Path("w.toml"))
    child = spawn("new", "--resume", draft.name, cwd=tmp_path, rows=40, cols=cols, log=screen)
    write_through_review(child)
    see(child, "Findings")
    finish(child)

    lines = screen.lines()
    # nothing relies on the terminal folding a line: no line reaches the last column (prompts include the typed
    # answers, which are short here)
    full = [line for line in lines if line[cols - 1] != " " and " " in line.strip()]  # (one long name: folded)
    assert not full, full
    text = " ".join(" ".join(lines).split())
    for message in (
        "Caution: settings proposed by relaywright must be reviewed and approved by a competent, licensed engineer; "
        "local codes and the equipment makers' data take precedence; test the relay before service.",
        "✗ machine.rated_speed: expected a full-load slip between 0 and 10 %, got 13.3% (1300 rpm)",
        "'25.8 deg' is an angle, not a per-unit value or a ratio; a power factor is cos φ",
        "(for a percentage write '95.5 %')",
        "< and Enter (or Esc): back to the previous question · ? and Enter: this help · Ctrl-C: stop, your answers "
        "are kept",
        "! the full-load current 40 A is +50% off the 26.63 A that output, voltage, efficiency and power factor "
        "give: check the nameplate",
        "Review before writing",
        "1119 kW (1500 hp)",
        "Findings: ",
        "relaywright settings",
    ):
        assert message in text, message
    # the review fits the 40-line terminal: every page is shorter than the screen
    assert "page 1 of" in text
