"""``relaywright new --answers FILE -o MACHINE``: the same flow without prompts."""

from __future__ import annotations

import pytest

from machines.errors import InputError
from machines.files import load_case, parse_toml
from wizard import session

from conftest import EXAMPLES, run_cli

PARTIAL_MOTOR = """
format = "relaywright.machine/1"
[sheet]
tag = "HX-P-7"
[machine]
kind = "induction-motor"
rated_output = "373 kW"
rated_voltage = "4160 V"
frequency = "60 Hz"
rated_speed = "1785 rpm"
power_factor = 0.88
efficiency = "95 %"
locked_rotor_code = "G"
locked_rotor_torque = "0.8 pu"
breakdown_torque = "2.2 pu"
safe_stall_time_cold = "20 s"
safe_stall_time_hot = "15 s"
rotor_inertia = "9 kg*m^2"
[load]
inertia = "30 kg*m^2"
[grounding]
method = "solid"
[instruments]
phase_ct = "100/5"
"""


@pytest.fixture(autouse=True)
def no_sheet(monkeypatch):
    monkeypatch.setattr(session, "_sheet_target", lambda path: None)


def test_a_partial_answers_file_takes_the_flows_defaults(tmp_path):
    answers, out = tmp_path / "a.toml", tmp_path / "m.toml"
    answers.write_text(PARTIAL_MOTOR)
    assert session.run_new(answers=answers, output=out) == 0
    data = parse_toml(out.read_text())
    # METHODS.md §3.4: 373 kW (500 hp at 746 W/hp), 4160 V, η 0.95, pf 0.88 → FLC 61.92 A
    assert data["machine"]["rated_current"] == "61.92 A"
    # defaults from earlier answers: bus voltage = rated voltage; IEEE at 60 Hz (the file reader's own rule)
    assert data["supply"]["nominal_voltage"] == "4160 V" and data["study"]["practice"] == "IEEE"
    assert data["instruments"]["phase_ct"] == "100/5 A"  # the unit shown is written with the bare ratio
    assert "locked_rotor_current" not in data["machine"]  # the code letter stands in for it
    case, _ = load_case(out)
    assert case.sheet.revision == 0


def test_a_full_machine_file_as_answers_gives_the_same_machine(tmp_path):
    out = tmp_path / "m.toml"
    assert session.run_new(answers=EXAMPLES / "chiller-compressor-motor.toml", output=out) == 0
    assert load_case(out)[0] == load_case(EXAMPLES / "chiller-compressor-motor.toml")[0]


def test_running_it_twice_is_harmless_but_a_different_file_is_never_replaced(tmp_path):
    answers, out = tmp_path / "a.toml", tmp_path / "m.toml"
    answers.write_text(PARTIAL_MOTOR)
    assert session.run_new(answers=answers, output=out) == 0
    before = out.read_text()
    assert session.run_new(answers=answers, output=out) == 0  # same content: nothing lost
    answers.write_text(PARTIAL_MOTOR.replace('"HX-P-7"', '"HX-P-8"'))
    with pytest.raises(InputError, match=r"m\.toml: already exists .*not replaced; nothing was written"):
        session.run_new(answers=answers, output=out)
    assert out.read_text() == before


@pytest.mark.parametrize("drop, key", [
    ('rated_output = "373 kW"\n', "machine.rated_output"),
    ('tag = "HX-P-7"\n', "sheet.tag"),
    ('safe_stall_time_hot = "15 s"\n', "machine.safe_stall_time_hot"),
    ('locked_rotor_code = "G"\n', "machine.locked_rotor_current"),  # then no code letter stands in
])
def test_a_missing_answer_without_a_default_names_the_key(tmp_path, drop, key):
    answers = tmp_path / "a.toml"
    answers.write_text(PARTIAL_MOTOR.replace(drop, ""))
    with pytest.raises(InputError, match=rf"^\S*a\.toml: 1 required answer is missing: {key} \("):
        session.run_new(answers=answers, output=tmp_path / "m.toml")
    assert not (tmp_path / "m.toml").exists()


def test_every_missing_answer_is_named_at_once(tmp_path):
    answers = tmp_path / "a.toml"
    text = PARTIAL_MOTOR
    for line in ('tag = "HX-P-7"\n', 'rated_output = "373 kW"\n', 'safe_stall_time_hot = "15 s"\n',
                 'phase_ct = "100/5"\n'):
        text = text.replace(line, "")
    answers.write_text(text)
    with pytest.raises(InputError) as err:
        session.run_new(answers=answers, output=tmp_path / "m.toml")
    message = str(err.value)
    assert message.startswith(f"{answers}: 4 required answers are missing: ")
    for key in ("sheet.tag (text)", "machine.rated_output (active power such as '1500 hp')",
                "machine.safe_stall_time_hot (time such as '12 s')", "instruments.phase_ct"):
        assert key in message
    assert "\n" not in message and "nothing was written" in message


@pytest.mark.parametrize("line, message", [
    ('rated_current = "96 V"', r"machine\.rated_current: .*'96 V' is a voltage"),
    ('safe_stall_time_hot = "25 s"', r"machine\.safe_stall_time_hot: expected at most the cold safe stall time"),
    ('rated_curent = "96 A"', r"machine\.rated_curent: unknown key \(did you mean 'rated_current'\?\)"),
])
def test_a_bad_answer_gets_the_file_readers_message(tmp_path, line, message):
    answers = tmp_path / "a.toml"
    text = PARTIAL_MOTOR.replace('safe_stall_time_hot = "15 s"\n', "") if "stall" in line else PARTIAL_MOTOR
    answers.write_text(text.replace('[load]', f'{line}\n[load]'))
    with pytest.raises(InputError, match=message):
        session.run_new(answers=answers, output=tmp_path / "m.toml")


def test_the_command_line_exits_2_naming_every_missing_key_in_one_line(tmp_path):
    answers = tmp_path / "a.toml"
    answers.write_text(PARTIAL_MOTOR.replace('rated_voltage = "4160 V"\n', "").replace('tag = "HX-P-7"\n', ""))
    r = run_cli("new", "--answers", str(answers), "-o", str(tmp_path / "m.toml"))
    assert r.returncode == 2
    # the bus voltage, whose default is the rated voltage, is missing with it
    assert r.stderr.startswith(f"error: {answers}: 3 required answers are missing: sheet.tag")
    assert "supply.nominal_voltage" in r.stderr
    assert "machine.rated_voltage (voltage such as '6.6 kV')" in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1
    assert not (tmp_path / "m.toml").exists()


def test_an_existing_file_is_replaced_only_with_force(tmp_path):
    answers, out = tmp_path / "a.toml", tmp_path / "m.toml"
    answers.write_text(PARTIAL_MOTOR)
    out.write_text("# someone else's machine file\n")
    r = run_cli("new", "--answers", str(answers), "-o", str(out))
    assert r.returncode == 2 and "not replaced" in r.stderr and "--force" in r.stderr
    assert out.read_text() == "# someone else's machine file\n"
    assert session.run_new(answers=answers, output=out, force=True) == 0
    assert load_case(out)[0].sheet.tag == "HX-P-7"


def test_force_never_replaces_a_higher_revision(tmp_path):
    answers, out = tmp_path / "a.toml", tmp_path / "m.toml"
    answers.write_text(PARTIAL_MOTOR)
    text = (EXAMPLES / "chiller-compressor-motor.toml").read_text().replace("revision = 1", "revision = 3")
    out.write_text(text)
    with pytest.raises(InputError, match="holds revision 3, newer than the revision 0"):
        session.run_new(answers=answers, output=out, force=True)
    assert out.read_text() == text


def test_an_existing_sheet_is_not_replaced_without_force(tmp_path, monkeypatch, capsys):
    made = []
    monkeypatch.setattr(session, "_sheet_target", lambda path: (lambda p: made.append(p) or 0,
                                                                tmp_path / "HX-P-7-rev0.pdf"))
    answers, out = tmp_path / "a.toml", tmp_path / "m.toml"
    answers.write_text(PARTIAL_MOTOR)
    (tmp_path / "HX-P-7-rev0.pdf").write_bytes(b"%PDF- an earlier sheet")
    session.run_new(answers=answers, output=out)
    assert made == [] and (tmp_path / "HX-P-7-rev0.pdf").read_bytes() == b"%PDF- an earlier sheet"
    assert "already exists and is not replaced" in " ".join(capsys.readouterr().out.split())
    session.run_new(answers=answers, output=out, force=True)
    assert made == [out]


def test_new_ends_with_the_findings_and_the_settings_exit_code(tmp_path, capsys):
    answers, out = tmp_path / "a.toml", tmp_path / "m.toml"
    # a hot stall time shorter than the start: the study fails its check (METHODS.md §3), as 'settings' does
    answers.write_text(PARTIAL_MOTOR.replace('safe_stall_time_cold = "20 s"', 'safe_stall_time_cold = "5 s"')
                       .replace('safe_stall_time_hot = "15 s"', 'safe_stall_time_hot = "1 s"'))
    code = session.run_new(answers=answers, output=out)
    text = " ".join(capsys.readouterr().out.split())
    r = run_cli("settings", str(out))
    assert code == r.returncode == 1
    assert "Findings: " in text and "failed" in text and "✗" in text


def test_without_a_terminal_and_without_answers_it_says_so_and_exits_2(tmp_path):
    r = run_cli("new", "-o", str(tmp_path / "m.toml"))
    assert r.returncode == 2
    assert "--answers" in r.stderr and "no" in r.stderr
    assert not list(tmp_path.iterdir())


def test_an_answer_that_does_not_apply_is_left_out_with_a_warning(tmp_path, capsys):
    answers, out = tmp_path / "a.toml", tmp_path / "m.toml"
    answers.write_text(PARTIAL_MOTOR.replace('method = "solid"', 'method = "solid"\nfault_current_limit = "400 A"'))
    assert session.run_new(answers=answers, output=out) == 0
    assert parse_toml(out.read_text())["grounding"] == {"method": "solid"}
    assert "warning: grounding.fault_current_limit is left out" in capsys.readouterr().err
