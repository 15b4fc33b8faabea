"""Every message wraps at word boundaries to the terminal: never cut, never broken inside a word."""

from __future__ import annotations

import pytest

from reports.notices import CAUTION_LINE, SAFETY_NOTICE
from wizard import flow, terminal
from wizard.ask import _fit, _fold
from wizard.flow import Answers
from wizard.session import KEYS_HELP, missing_message

from conftest import run_cli

WIDTHS = (60, 80, 120)


def every_message() -> list[str]:
    """The texts the wizard prints: cautions, key help, every question, its help, what blank means, the ? help."""
    texts = [CAUTION_LINE, SAFETY_NOTICE, KEYS_HELP, flow.NAVIGATION,
             missing_message(["machine.rated_output", "machine.rated_voltage"], Answers(data={"machine": {
                 "kind": flow.MOTOR}}))]
    for kind in (flow.MOTOR, flow.GENERATOR):
        a = Answers(data={"machine": {"kind": kind}, "grounding": {"method": "distribution-transformer"}})
        for q in flow.QUESTIONS:
            if flow.applies(q, a):
                texts += [q.text, q.help, *(label for _, label in q.choices)]
                texts += flow.help_text(q, a)
    return [t for t in texts if t]


@pytest.mark.parametrize("width", WIDTHS)
def test_every_message_wraps_without_losing_or_breaking_a_word(width):
    for text in every_message():
        lines = terminal.wrap(f"  ! {text}", width)
        assert all(len(line) <= width for line in lines if " " in line.strip()), text
        assert " ".join(" ".join(lines).split()) == " ".join(f"  ! {text}".split()), text  # every word, in order


@pytest.mark.parametrize("width", WIDTHS)
def test_prompts_and_menu_entries_are_wrapped_to_the_terminal(width, monkeypatch):
    monkeypatch.setenv("COLUMNS", str(width))
    for q in flow.QUESTIONS:
        shown = _fit(q.text, "[kg·m²]")
        lines = shown.split("\n")
        assert all(len(line) + 2 <= width for line in lines), q.text
        assert len(lines[-1]) + 2 + len("[kg·m²]") + 12 <= width or lines[-1].strip() == ""
        for _, label in q.choices:
            assert all(len(line) + 4 <= width for line in _fold(label).split("\n")), label


def test_a_long_name_is_kept_whole_on_its_own_line():
    path = "/a/very/long/folder/name/that/does/not/fit/on/one/line/at/all/machine-file.toml"
    lines = terminal.wrap(f"Written: {path} (revision 0)", 40)
    assert path in lines  # not cut: the terminal folds it, no character is lost


def test_the_caution_is_one_line_for_a_pipe_and_wrapped_for_a_terminal():
    class Tty:
        def isatty(self):
            return True

    assert terminal.for_stream(CAUTION_LINE, object()) == CAUTION_LINE
    wrapped = terminal.for_stream(CAUTION_LINE, Tty())
    assert "\n" in wrapped and " ".join(wrapped.split()) == CAUTION_LINE


def test_version_prints_the_version_only():
    r = run_cli("--version")
    assert r.stdout.strip().startswith("relaywright ") and r.stderr == ""


@pytest.mark.parametrize("command", ["new", "revise", "diff", "settings"])
def test_the_help_of_a_command_carries_no_caution(command):
    r = run_cli(command, "--help")
    assert r.returncode == 0 and "licensed engineer" not in r.stdout + r.stderr


def test_the_command_list_is_never_cut():
    r = run_cli("--help", env={"COLUMNS": "60"})
    commands = r.stdout[r.stdout.index("Commands:"):]
    assert "..." not in commands
    assert "Ask again with the file's answers as defaults, bump the revision and show what changed." in \
        " ".join(r.stdout.split())
