"""``relaywright revise FILE``: the file's answers as defaults, who and why, what changed, the old revision kept."""

from __future__ import annotations

import shutil

import pytest

from machines.compare import compare
from machines.errors import InputError
from machines.files import load_case, parse_toml
from machines.study import run_study
from reports.changes import format_changes
from wizard import flow, session
from wizard.flow import Answers

from conftest import EXAMPLES, run_cli
from test_wizard_prompts import CTRL_C, DOWN, ENTER, press

CHANGES = """
[[sheet.history]]
by = "R. Field"
reason = "motor rewound, new nameplate"
[machine]
rated_current = "190 A"
"""


@pytest.fixture
def motor(tmp_path):
    path = tmp_path / "chiller.toml"
    shutil.copy(EXAMPLES / "chiller-compressor-motor.toml", path)
    return path


@pytest.fixture(autouse=True)
def terminal(monkeypatch):
    monkeypatch.setattr(session, "_has_terminal", lambda: True)
    monkeypatch.setattr(session, "_sheet_target", lambda path: None)
    monkeypatch.setenv("COLUMNS", "100")
    monkeypatch.setenv("LINES", "200")


def flat(text: str) -> str:
    return " ".join(text.split())


def studied(path):
    case, warnings = load_case(path)
    return case, run_study(case, warnings)


def test_one_nameplate_change_shows_the_input_and_every_setting_change(motor, tmp_path, capsys):
    before = motor.read_text()
    changes = tmp_path / "changes.toml"
    changes.write_text(CHANGES)
    assert session.run_revise(motor, answers=changes) == 0
    kept = motor.with_name("chiller.rev1.toml")
    assert kept.read_text() == before  # the previous revision, byte for byte
    data = parse_toml(motor.read_text())
    assert data["sheet"]["revision"] == 2 and data["sheet"]["status"] == "draft"
    assert data["sheet"]["history"][-1] == {"revision": 2, "date": flow.today(), "by": "R. Field",
                                            "reason": "motor rewound, new nameplate"}
    text = flat(capsys.readouterr().out)
    assert "Full-load current: 186 A → 190 A" in text
    # every change the compare module finds between the two files is on the screen, settings included
    expected = format_changes(compare(*studied(kept), *studied(motor), labels=flow.input_labels(flow.MOTOR)))
    for line in expected:
        assert flat(line) in text
    assert len(expected) > 1


def test_the_kept_revision_is_never_overwritten(motor, tmp_path):
    older = motor.with_name("chiller.rev1.toml")
    older.write_text("an earlier copy with other content\n")
    changes = tmp_path / "changes.toml"
    changes.write_text(CHANGES)
    session.run_revise(motor, answers=changes)
    assert older.read_text() == "an earlier copy with other content\n"
    assert load_case(motor.with_name("chiller.rev1-2.toml"))[0].sheet.revision == 1


def test_a_revision_without_a_reason_is_refused(motor, tmp_path):
    changes = tmp_path / "changes.toml"
    changes.write_text('[machine]\nrated_current = "190 A"\n')
    before = motor.read_text()
    with pytest.raises(InputError, match=r"^sheet\.history: a revision needs a reason"):
        session.run_revise(motor, answers=changes)
    assert motor.read_text() == before and not motor.with_name("chiller.rev1.toml").exists()


def test_a_bad_changed_value_is_refused_with_the_file_readers_message(motor, tmp_path):
    changes = tmp_path / "changes.toml"
    changes.write_text(CHANGES.replace('"190 A"', '"190 V"'))
    with pytest.raises(InputError, match=r"^machine\.rated_current: .*'190 V' is a voltage"):
        session.run_revise(motor, answers=changes)


def test_interactive_revise_pick_one_answer_from_the_summary(motor, capsys):
    # "pick" → review: Change an answer → Nameplate (2nd) → Full-load current (7th) → 190 → write;
    # who: Enter keeps the preparer; why; write revision 2: yes
    keys = [DOWN + ENTER, DOWN + ENTER, DOWN + ENTER, DOWN * 6 + ENTER, "190", ENTER, "", "new nameplate", "y"]
    assert press(keys, session.run_revise, motor) == 0
    data = parse_toml(motor.read_text())
    assert data["machine"]["rated_current"] == "190 A"
    assert data["sheet"]["history"][-1]["by"] == "A. Okafor"
    assert data["sheet"]["history"][-1]["reason"] == "new nameplate"
    assert "Full-load current: 186 A → 190 A" in flat(capsys.readouterr().out)
    assert motor.with_name("chiller.rev1.toml").exists()


def revising(path) -> Answers:
    """The answers a revision starts from: the file's, its sign-off not asked (a revision is signed off afresh)."""
    a = Answers(data=parse_toml(path.read_text()))
    a.flow["revising"] = True
    flow.scripted(a)
    return a


def test_interactive_revise_enter_keeps_every_value(motor, capsys):
    n = len(flow.applicable(revising(motor)))
    keys = [ENTER] + [ENTER] * n + [ENTER, "", "names only", "y"]  # all questions, then write, who, why, yes
    assert press(keys, session.run_revise, motor) == 0
    text = flat(capsys.readouterr().out)
    # nothing changed but the sign-off, which a new revision clears
    assert "Settings to key into the relay" not in text
    assert "Inputs (2): Checked by: L. Brandt → not given Approved by: M. Sato → not given" in text
    assert load_case(motor)[0].sheet.revision == 2


def test_interrupted_revise_leaves_a_draft_it_offers_next_time(motor, capsys):
    before = motor.read_text()
    # question by question; the machine kind kept; a new tag; Ctrl-C
    assert press([ENTER, ENTER, "CH-M-101A", CTRL_C], session.run_revise, motor) == 130
    assert motor.read_text() == before
    (draft,) = motor.parent.glob(".relaywright-draft-*.toml")
    assert f"relaywright revise {motor}" in flat(capsys.readouterr().out)
    # next time: continue → the tag answer is there; Enter through the rest, write, who, why, yes
    rest = len(flow.applicable(revising(motor))) - 2
    assert press([ENTER] + [ENTER] * rest + [ENTER, "", "tag corrected", "y"], session.run_revise, motor) == 0
    assert load_case(motor)[0].sheet.tag == "CH-M-101A" and not draft.exists()


def test_revise_without_a_terminal_exits_2(motor):
    r = run_cli("revise", str(motor))
    assert r.returncode == 2 and "--answers" in r.stderr
    assert load_case(motor)[0].sheet.revision == 1


def test_an_earlier_revision_draft_is_never_lost(motor):
    press([ENTER, ENTER, "CH-M-101A", CTRL_C], session.run_revise, motor)
    (draft,) = motor.parent.glob(".relaywright-draft-*.toml")
    before = draft.read_text()
    assert press([CTRL_C], session.run_revise, motor) == 130  # Ctrl-C at "continue where it stopped?"
    assert draft.read_text() == before
    press([DOWN + ENTER, ENTER, ENTER, "OTHER", CTRL_C], session.run_revise, motor)  # declined: a second draft
    assert draft.read_text() == before and len(list(motor.parent.glob(".relaywright-draft-*.toml"))) == 2


COMMENTED = EXAMPLES / "chiller-compressor-motor.toml"


def commented_file(tmp_path):
    """The chiller motor as a person keeps it: comments above and beside values, an issued, signed-off revision."""
    text = COMMENTED.read_text()
    text = text.replace('format = "relaywright.machine/1"\n',
                        'format = "relaywright.machine/1"\n# Chiller 1 motor: data from the rewind report\n')
    text = text.replace('rated_current = "186 A"', 'rated_current = "186 A"        # nameplate, after rewind')
    text = text.replace("[load]\n", "# the compressor, referred to the motor shaft\n[load]\n")
    text = text.replace('status = "draft"', 'status = "issued"\nchecked_on = "2026-11-21"\napproved_on = "2026-11-22"')
    path = tmp_path / "chiller.toml"
    path.write_text(text)
    return path


def test_a_commented_file_revised_twice_keeps_its_comments_order_and_layout(tmp_path):
    path = commented_file(tmp_path)
    original = path.read_text()
    changes = tmp_path / "changes.toml"
    changes.write_text(CHANGES)
    assert session.run_revise(path, answers=changes) == 0
    changes.write_text(CHANGES.replace('"190 A"', '"192 A"').replace("motor rewound, new nameplate",
                                                                     "nameplate corrected"))
    assert session.run_revise(path, answers=changes) == 0
    text = path.read_text()
    for comment in ("# Chiller 1 motor: data from the rewind report", "# the compressor, referred to the motor shaft",
                    'rated_current = "192 A"        # nameplate, after rewind'):
        assert comment in text
    # every table and key of the original is where it was (the sign-off is cleared, the history added)
    old_data, new_data = parse_toml(original), parse_toml(text)
    assert list(new_data) == list(old_data)
    for section, table in old_data.items():
        if isinstance(table, dict):
            kept = [k for k in table if k not in ("checked_by", "approved_by", "checked_on", "approved_on")]
            assert [k for k in new_data[section] if k != "history"] == kept, section
    unchanged = [line for line in original.splitlines()
                 if not line.startswith(("rated_current", "revision", "date", "status", "checked_by", "approved_by",
                                         "checked_on", "approved_on"))]
    for line in unchanged:
        assert line in text.splitlines(), line
    data = parse_toml(text)
    assert [h["reason"] for h in data["sheet"]["history"]] == ["motor rewound, new nameplate", "nameplate corrected"]
    assert data["sheet"]["revision"] == 3
    assert text.count("[[sheet.history]]") == 2


def test_a_new_revision_clears_the_sign_off_and_is_a_draft(tmp_path, capsys):
    path = commented_file(tmp_path)
    changes = tmp_path / "changes.toml"
    changes.write_text(CHANGES)
    session.run_revise(path, answers=changes)
    sheet = parse_toml(path.read_text())["sheet"]
    assert sheet["status"] == "draft"
    assert not {"checked_by", "checked_on", "approved_by", "approved_on"} & set(sheet)
    text = flat(capsys.readouterr().out)
    assert "revision 1 was checked by L. Brandt and approved by M. Sato" in text
    assert "needs checking and approval before use" in text


def test_the_sign_off_is_not_asked_in_a_revision(motor):
    a = revising(motor)
    assert not {"sheet.checked_by", "sheet.approved_by"} & {q.key for q in flow.applicable(a)}
    assert "checked_by" not in flow.machine_data(a)["sheet"]


def test_revise_ends_with_the_findings_and_the_settings_exit_code(motor, tmp_path, capsys):
    changes = tmp_path / "changes.toml"
    # a hot stall time of 1 s: the study fails its check, as 'relaywright settings' does
    changes.write_text(CHANGES.replace('rated_current = "190 A"', 'safe_stall_time_hot = "1 s"'))
    code = session.run_revise(motor, answers=changes)
    assert code == run_cli("settings", str(motor)).returncode
    assert "Findings: " in flat(capsys.readouterr().out)
