"""The interview in process: questionary prompts fed with keys through prompt_toolkit's pipe input.

The keys are what a person presses: text then Enter (a yes/no question too: y or n, then Enter), arrow-down to pick,
Ctrl-U to clear a refused answer (it is offered again as typed), Ctrl-C to stop. The machine files written are read
back through the ordinary machine file reader. The terminal is taken as 100 × 200 (one review page); paging is
tested with 40 lines.
"""

from __future__ import annotations

import pytest
from prompt_toolkit.application import create_app_session
from prompt_toolkit.input import create_pipe_input
from prompt_toolkit.output import DummyOutput

from machines.files import load_case, parse_toml
from wizard import session

ENTER, DOWN, CLEAR_LINE, CTRL_C = "\r", "\x1b[B", "\x15", "\x03"


BACK_MENU, BACK_TEXT = "<", "<" + ENTER  # in a menu < acts at once; on a text line it is typed, then Enter


def keys(answers) -> str:
    """Typed answers (yes/no included) become text + Enter; selections (ending in Enter), < in a menu and Ctrl-C go
    as they are."""
    return "".join(k if (k.endswith(ENTER) or k in (CTRL_C, BACK_MENU)) else k + ENTER for k in answers)


def press(answers, fn, *args, **kwargs):
    """Run ``fn`` (a session entry point) with the keys typed into its prompts."""
    with create_pipe_input() as inp, create_app_session(input=inp, output=DummyOutput()):
        inp.send_text(keys(answers))
        inp.close()  # a prompt left waiting sees the input end (EOFError) instead of hanging
        return fn(*args, **kwargs)


@pytest.fixture(autouse=True)
def terminal(monkeypatch):
    """Pretend a terminal is there, and leave the PDF sheet out (another command's job, tested there)."""
    monkeypatch.setattr(session, "_has_terminal", lambda: True)
    monkeypatch.setattr(session, "_sheet_target", lambda path: None)
    monkeypatch.setenv("COLUMNS", "100")
    monkeypatch.setenv("LINES", "200")


IDENT_MOTOR = [ENTER, "CW-P-201", "Chilled-water pump 1", "", "A. Okafor", "", "", "", ENTER]
NAMEPLATE_MOTOR = ["250 kW", "6.6 kV", "50", "1485", "0.86", "95.5 %", "", "", ENTER, "", "", "n",
                   "6.5", "0.7", "2.3", "15", "12", "4.5"]
REST_MOTOR = ["12 kg*m^2", ENTER, "", "", "",
              "", "250 MVA", "", "", "", "", ENTER, "n",
              DOWN + ENTER, "300 A", "",
              "50/1 A", "", "", "", "", "",
              ENTER]
MOTOR = IDENT_MOTOR + NAMEPLATE_MOTOR + REST_MOTOR
WRITE = [ENTER]

GENERATOR = [DOWN + ENTER, "GT-G-1", "Gas turbine generator 1", "", "L. Brandt", "", "", "", ENTER,
             "12.5 MVA", "11 kV", "50 Hz", "1500", "0.8", "n", "1.9", "0.22", "0.14", "", DOWN + ENTER,
             DOWN + ENTER, ENTER, "",
             "", ENTER, "500 MVA", "", "", "", "", "n", "n", "",
             DOWN * 4 + ENTER, "8 A", "11000/240 V", "", "0.25 uF", "", "",
             "800/1 A", "", "", "11000/110 V", "", "",
             ENTER]


def test_full_motor_session_writes_a_valid_machine_file(tmp_path, capsys):
    out = tmp_path / "m.toml"
    assert press(MOTOR + WRITE, session.run_new, output=out) == 0
    case, _ = load_case(out)
    data = parse_toml(out.read_text())
    assert case.is_motor and case.sheet.tag == "CW-P-201"
    # bare numbers are written with the unit shown beside the question
    assert data["machine"]["frequency"] == "50 Hz" and data["machine"]["rated_speed"] == "1485 rpm"
    assert data["machine"]["locked_rotor_current"] == "6.5 pu"
    # defaults from earlier answers: bus voltage = rated voltage; IEC at 50 Hz (the file reader's own rule)
    assert data["supply"]["nominal_voltage"] == "6.6 kV" and data["study"]["practice"] == "IEC"
    assert data["sheet"]["revision"] == 0 and data["sheet"]["history"][0]["reason"] == "first issue"
    text = " ".join(capsys.readouterr().out.split())  # lines are wrapped to the terminal's width
    assert "licensed engineer" in text and "Review before writing" in text
    assert f"relaywright settings {out}" in text
    assert not list(tmp_path.glob(".relaywright-draft-*")), "the draft goes once the file is written"


def test_full_generator_session_writes_a_valid_machine_file(tmp_path):
    out = tmp_path / "g.toml"
    assert press(GENERATOR + WRITE, session.run_new, output=out) == 0
    case, _ = load_case(out)
    data = parse_toml(out.read_text())
    assert not case.is_motor
    assert data["machine"]["prime_mover"] == "gas-turbine"
    # round rotor offered for a gas turbine (common practice, no published source)
    assert data["machine"]["rotor"] == "cylindrical-indirect"
    assert data["grounding"] == {"method": "distribution-transformer", "fault_current_limit": "8 A",
                                 "transformer_ratio": "11000/240 V", "surge_capacitance": "0.25 uF"}
    # the exciter and the connection are asked (a brushless exciter, a unit transformer)
    assert (data["machine"]["excitation"], data["supply"]["connection"]) == ("brushless", "unit-transformer")
    assert "load" not in data


def test_a_refused_answer_is_asked_again_and_corrected(tmp_path):
    out = tmp_path / "m.toml"
    nameplate = list(NAMEPLATE_MOTOR)
    # '26 V' for the full-load current is refused at once (a voltage); the person clears it and gives amperes
    nameplate[6] = "26 V" + ENTER + CLEAR_LINE + "26.6"
    assert press(IDENT_MOTOR + nameplate + REST_MOTOR + WRITE, session.run_new, output=out) == 0
    assert parse_toml(out.read_text())["machine"]["rated_current"] == "26.6 A"


def test_a_warning_can_be_kept_or_fixed(tmp_path, capsys):
    out = tmp_path / "m.toml"
    nameplate = list(NAMEPLATE_MOTOR)
    # 40 A is 50 % above the current that 250 kW at 6.6 kV, 95.5 %, 0.86 gives: warned; 'n' gives it again
    nameplate[6] = "40" + ENTER + "n" + ENTER + "26.6"
    assert press(IDENT_MOTOR + nameplate + REST_MOTOR + WRITE, session.run_new, output=out) == 0
    assert parse_toml(out.read_text())["machine"]["rated_current"] == "26.6 A"
    assert "off the" in " ".join(capsys.readouterr().out.split())


def test_going_back_from_the_review_changes_one_answer(tmp_path):
    out = tmp_path / "m.toml"
    # review: "Change an answer" → section "Nameplate…" (2nd) → "Service factor" (8th) → 1.15 → write
    back = [DOWN + ENTER, DOWN + ENTER, DOWN * 7 + ENTER, "1.15"]
    assert press(MOTOR + back + WRITE, session.run_new, output=out) == 0
    assert parse_toml(out.read_text())["machine"]["service_factor"] == "1.15"


def test_changing_the_grounding_method_at_the_review_asks_the_new_questions(tmp_path):
    out = tmp_path / "m.toml"
    # back to Grounding (5th section) → method (1st; the list opens on the answer given) → high resistance;
    # the let-through current rests on the method and is asked again (5 A); resistor and system capacitance are new
    back = [DOWN + ENTER, DOWN * 4 + ENTER, ENTER, DOWN + ENTER, "5 A", "", ""]
    assert press(MOTOR + back + WRITE, session.run_new, output=out) == 0
    assert parse_toml(out.read_text())["grounding"] == {"method": "high-resistance", "fault_current_limit": "5 A"}


def test_a_speed_that_does_not_fit_the_frequency_is_refused_at_once(tmp_path, capsys):
    out = tmp_path / "m.toml"
    nameplate = list(NAMEPLATE_MOTOR)
    # 13 % slip for a 4-pole motor at 50 Hz: refused as soon as it is given, not at the review
    nameplate[3] = "1300" + ENTER + CLEAR_LINE + "1485"
    assert press(IDENT_MOTOR + nameplate + REST_MOTOR + WRITE, session.run_new, output=out) == 0
    assert parse_toml(out.read_text())["machine"]["rated_speed"] == "1485 rpm"
    text = " ".join(capsys.readouterr().out.split())
    assert "✗ machine.rated_speed: expected a full-load slip between 0 and 10 %, got 13.3% (1300 rpm)" in text
    assert text.index("expected a full-load slip") < text.index("Review before writing")


def test_a_refusal_of_the_file_reader_at_the_review_is_put_right(tmp_path, capsys):
    # a draft holding an answer the file reader refuses (written by hand, or by an older copy): the review shows
    # the refusal and offers that answer again
    out = tmp_path / "m.toml"
    press(MOTOR, session.run_new, output=out)  # every answer, then the input ends at the review
    (draft,) = tmp_path.glob(".relaywright-draft-*.toml")
    draft.write_text(draft.read_text().replace('rated_speed = "1485 rpm"', 'rated_speed = "1300 rpm"'))
    assert press([ENTER, "1485"] + WRITE, session.run_new, resume=draft) == 0
    assert parse_toml(out.read_text())["machine"]["rated_speed"] == "1485 rpm"
    assert "machine.rated_speed: expected a full-load slip" in " ".join(capsys.readouterr().out.split())


def test_ctrl_c_leaves_a_draft_that_resumes_where_it_stopped(tmp_path, capsys):
    out = tmp_path / "m.toml"
    stop = len(IDENT_MOTOR) + 5  # in the nameplate, after the power factor
    assert press(MOTOR[:stop] + [CTRL_C], session.run_new, output=out) == 130
    drafts = list(tmp_path.glob(".relaywright-draft-*.toml"))
    assert len(drafts) == 1 and not out.exists()
    text = " ".join(capsys.readouterr().out.split())
    assert str(drafts[0]) in text and "--resume" in text
    assert parse_toml(drafts[0].read_text())["answers"]["machine"]["power_factor"] == "0.86"
    # resume: only the questions not yet answered are asked
    assert press(MOTOR[stop:] + WRITE, session.run_new, resume=drafts[0]) == 0
    case, _ = load_case(out)
    assert case.sheet.tag == "CW-P-201" and not drafts[0].exists()


def test_input_running_out_keeps_the_draft_too(tmp_path):
    out = tmp_path / "m.toml"
    assert press(IDENT_MOTOR, session.run_new, output=out) == 130  # EOF after the identification
    (draft,) = tmp_path.glob(".relaywright-draft-*.toml")
    assert parse_toml(draft.read_text())["answers"]["sheet"]["tag"] == "CW-P-201"


def test_an_earlier_draft_is_offered_and_never_overwritten(tmp_path):
    out = tmp_path / "m.toml"
    press(IDENT_MOTOR, session.run_new, output=out)
    (first,) = tmp_path.glob(".relaywright-draft-*.toml")
    before = first.read_text()
    # a new session for the same file: decline to continue, answer one question, stop
    press([DOWN + ENTER, ENTER, "OTHER-1"], session.run_new, output=out)
    assert first.read_text() == before
    assert len(list(tmp_path.glob(".relaywright-draft-*.toml"))) == 2


def test_an_existing_machine_file_is_not_replaced(tmp_path, capsys):
    out = tmp_path / "m.toml"
    out.write_text("something else\n")
    other = tmp_path / "m2.toml"
    assert press(MOTOR + WRITE + [str(other)], session.run_new, output=out) == 0
    assert out.read_text() == "something else\n"
    assert load_case(other)[0].sheet.tag == "CW-P-201"
    assert "not be replaced" in " ".join(capsys.readouterr().out.split())


def test_no_terminal_says_so_and_exits_2(monkeypatch, capsys):
    monkeypatch.setattr(session, "_has_terminal", lambda: False)
    assert session.run_new() == 2
    assert "--answers" in capsys.readouterr().err


def is_menu(key: str) -> bool:
    """The scripted answers to menus are selections: Enter alone or arrow keys then Enter."""
    return key == ENTER or (key.endswith(ENTER) and key.startswith(DOWN))


def test_going_back_from_every_question_changes_no_answer(tmp_path):
    straight = tmp_path / "straight.toml"
    assert press(MOTOR + WRITE, session.run_new, output=straight) == 0
    # at every question, go back (< and Enter on a line, < alone in a menu); the previous question comes back with
    # its answer as the default, Enter keeps it, and the question left is asked again; then back from the review
    script = [BACK_MENU, MOTOR[0]]  # back at the first question: there is nothing before it
    for i in range(1, len(MOTOR)):
        script += [BACK_MENU if is_menu(MOTOR[i]) else BACK_TEXT, ENTER, MOTOR[i]]
    script += [BACK_MENU, ENTER]  # back out of the review's menu: the last question again, kept
    out = tmp_path / "m.toml"
    assert press(script + WRITE, session.run_new, output=out) == 0
    assert parse_toml(out.read_text()) == parse_toml(straight.read_text())


def test_back_out_of_the_review_menus(tmp_path):
    out = tmp_path / "m.toml"
    # review: Change an answer → Which section? → < → the review again → Change → section → Which answer? → < →
    # Which section? again → < → review → write (Esc does the same in a terminal: see test_wizard_pty)
    back = [DOWN + ENTER, BACK_MENU, DOWN + ENTER, DOWN + ENTER, BACK_MENU, BACK_MENU]
    assert press(MOTOR + back + WRITE, session.run_new, output=out) == 0
    assert load_case(out)[0].sheet.tag == "CW-P-201"


def test_the_review_is_paged_to_a_40_line_terminal(tmp_path, monkeypatch, capsys):
    monkeypatch.setenv("LINES", "40")
    monkeypatch.setenv("COLUMNS", "80")
    out = tmp_path / "m.toml"
    capsys.readouterr()
    press(MOTOR, session.run_new, output=out)  # the input ends at the first review page
    text = capsys.readouterr().out
    page = text[text.index("══ Review before writing"):text.index("\nStopped.")]
    assert "page 1 of " in page
    # the page, a blank line before it and its menu (the question and three entries) fit in 40 lines
    assert 1 + len(page.rstrip("\n").splitlines()) + 4 <= 40
    assert all(len(line) <= 79 for line in page.splitlines())


def test_how_an_answer_was_read_is_said(tmp_path, capsys):
    nameplate = list(NAMEPLATE_MOTOR)
    nameplate[0] = "335 hp"
    nameplate[17] = "107 lb-ft²"
    rest = list(REST_MOTOR)
    rest[6] = "22 kA"  # the fault level as a current, at the 6.6 kV bus
    out = tmp_path / "m.toml"
    assert press(IDENT_MOTOR + nameplate + rest + WRITE, session.run_new, output=out) == 0
    text = " ".join(capsys.readouterr().out.split())
    # NIST SP 811, B.8: 1 hp = 745.7 W, 1 lb·ft² = 0.04214 kg·m²; IEC 60909-0: S = √3·U·I
    assert "→ 335 hp = 249.8 kW" in text
    assert "→ 107 lb·ft² = 4.509 kg·m²" in text
    assert "→ 22 kA at 6.6 kV = 251.5 MVA" in text
    assert "→ 6.5 pu = 173" in text and "A full-load current)" in text
    data = parse_toml(out.read_text())
    assert data["supply"]["fault_level"] == "251.5 MVA"
