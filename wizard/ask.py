"""Asking one question in the terminal (questionary), unit-aware, with the same refusals as the file reader.

Rules every prompt here keeps:

- **An answer needs Enter.** Yes/no questions included: ``n`` alone answers nothing until Enter confirms it.
- **Keys typed before a question appears never reach it.** Each prompt starts by discarding what is waiting in
  the terminal and what prompt_toolkit kept from the previous prompt (:func:`discard_typeahead`), so an Enter
  pressed twice cannot accept the next question's default.
- **A way back, and help.** ``<`` (or ``back``) and Enter, or Esc, goes back to the previous question — in a menu
  ``<`` or Esc at once; ``?`` (or ``help``) and Enter, or ``?`` in a menu, shows the question's help. Neither is
  ever taken as an answer.
- **Nothing is cut.** A refused answer is printed below the prompt, wrapped at word boundaries to the terminal (not
  in a one-line toolbar that the terminal's width truncates), and the prompt comes back with the text as typed.
  Long questions and menu entries are wrapped the same way.

Every prompt uses ``unsafe_ask()``: Ctrl-C raises KeyboardInterrupt and a closed input raises EOFError, both left
for the session to handle once (it has saved the draft already). questionary is imported here only, never at the
start-up of the command line.
"""

from __future__ import annotations

import os
import textwrap
from pathlib import Path
from typing import Any, Callable

from machines.errors import InputError
from machines.model import field_specs
from wizard import flow, terminal
from wizard.flow import Answers, Question

CLEAR = "-"  #: typed to clear an optional answer that has a value
BACK_WORDS = ("<", "back")
HELP_WORDS = ("?", "help")
Say = Callable[[str], None]


class Nav:
    """A navigation key instead of an answer."""

    def __init__(self, name: str) -> None:
        self.name = name

    def __repr__(self) -> str:
        return f"Nav({self.name})"


BACK, HELP, AGAIN = Nav("back"), Nav("help"), Nav("again")


class Back(Exception):
    """The person asked for the previous question."""


def _q():
    import questionary

    return questionary


def style():
    """Our colours: one accent for the question mark and the answers, the hint dimmed."""
    from questionary import Style

    return Style([("qmark", "fg:#0087af bold"), ("question", "bold"), ("answer", "fg:#0087af bold"),
                  ("instruction", "fg:#808080"), ("pointer", "fg:#0087af bold"), ("highlighted", "fg:#0087af")])


# ---------------------------------------------------------------------------------------------------- keys


def discard_typeahead() -> int:
    """Drop the keys typed before this prompt appeared: those still in the terminal's input buffer and those
    prompt_toolkit read with the previous answer and keeps for the next prompt. Only for a real terminal.

    Returns how many keys (bytes) were dropped, so the person can be told.
    """
    from prompt_toolkit.application.current import get_app_session
    from prompt_toolkit.input.typeahead import clear_typeahead, get_typeahead

    inp = get_app_session().input
    try:
        fd = inp.fileno()
    except (AttributeError, NotImplementedError, OSError, ValueError):
        return 0
    if not isinstance(fd, int) or not os.isatty(fd):
        return 0
    dropped = len(get_typeahead(inp))  # takes them out of prompt_toolkit's queue
    clear_typeahead(inp)
    try:
        import fcntl
        import struct
        import termios

        waiting = struct.unpack("i", fcntl.ioctl(fd, termios.FIONREAD, b"\0\0\0\0"))[0]
        termios.tcflush(fd, termios.TCIFLUSH)
        dropped += waiting
    except (ImportError, OSError, struct.error):  # not a POSIX terminal: prompt_toolkit's own queue is still cleared
        pass
    return dropped


def _nav_keys(menu: bool):
    """Esc goes back; in a menu ``<`` goes back and ``?`` asks for help at once (a menu has no line to type on)."""
    from prompt_toolkit.key_binding import KeyBindings

    kb = KeyBindings()

    @kb.add("escape", eager=True)
    def _back(event):
        event.app.exit(result=BACK)

    if menu:
        @kb.add("<", eager=True)
        def _back_key(event):
            event.app.exit(result=BACK)

        @kb.add("?", eager=True)
        def _help_key(event):
            event.app.exit(result=HELP)

    return kb


def _run(question, menu: bool) -> Any:
    from prompt_toolkit.key_binding import merge_key_bindings

    app = question.application
    app.key_bindings = merge_key_bindings([app.key_bindings, _nav_keys(menu)])
    if discard_typeahead():
        terminal.say("    (keys typed before this question appeared were not used: answer it now)")
    return question.unsafe_ask()


# ---------------------------------------------------------------------------------------------------- layout


def _fit(message: str, instruction: str = "", room: int = 12) -> str:
    """The question wrapped at word boundaries so that it, the instruction and ``room`` columns for the answer fit.

    Continuation lines are indented under the question; the instruction goes on a line of its own when the last
    line has no room left for it.
    """
    width = terminal.line_width()
    lines = textwrap.wrap(message, width=width - 2, break_long_words=False, break_on_hyphens=False) or [""]
    if len(lines[-1]) + 2 + len(instruction) + room > width:
        lines.append("")
    return "\n  ".join(lines)


def _fold(label: str) -> str:
    """A menu entry wrapped under its own first word (the menu draws a pointer and a space before it)."""
    width = terminal.line_width() - 4
    return "\n    ".join(textwrap.wrap(label, width=width, break_long_words=False, break_on_hyphens=False) or [""])


# ---------------------------------------------------------------------------------------------------- prompts


def prompt_text(message: str, instruction: str = "", typed: str = "", room: int = 12) -> Any:
    """One line of text, Enter to submit; returns the text, or :data:`BACK` / :data:`HELP`.

    ``typed`` is put back on the line (after a refusal, or when the person chose to give an answer again);
    ``room`` is the width kept free for the answer beside the question (else it starts on a line of its own).
    """
    question = _q().text(_fit(message, instruction, room), default=typed, qmark="›",
                         instruction=instruction or None, style=style())
    text = _run(question, menu=False)
    if isinstance(text, Nav):
        return text
    word = text.strip().lower()
    if word in BACK_WORDS:
        return BACK
    if word in HELP_WORDS:
        return HELP
    return text


def yes_no(message: str, default: bool | None, say: Say) -> Any:
    """A yes/no question answered with y or n *and Enter* (Enter alone takes ``default``); or BACK / HELP."""
    hint = "(y/n" + ("" if default is None else f", Enter: {'yes' if default else 'no'}") + ")"
    while True:
        text = prompt_text(message, hint)
        if isinstance(text, Nav):
            return text
        word = text.strip().lower()
        if not word and default is not None:
            return default
        if word in ("y", "yes"):
            return True
        if word in ("n", "no"):
            return False
        say(f"  ✗ answer y (yes) or n (no), then Enter; {'< goes back' if not word else repr(text.strip())} "
            f"is not an answer here" if word else "  ✗ answer y (yes) or n (no), then Enter")


def select(message: str, options: list[tuple[str, str]], default: str | None = None) -> Any:
    """Pick one of (value, label) with the arrow keys and Enter; returns the value, or BACK / HELP."""
    questionary = _q()
    instruction = "(↑↓ Enter · < back · ? help)"
    choices = [questionary.Choice(title=_fold(label), value=value) for value, label in options]
    values = [value for value, _ in options]
    # the answer is echoed after the question once chosen: when the longest entry would not fit beside it, the
    # question ends with a line break so that the echo starts a line of its own (never folded inside a word)
    longest = max((len(c.title.split("\n")[0]) for c in choices), default=0)
    question = questionary.select(_fit(message, "", room=max(len(instruction), longest + 1)), choices=choices,
                                  default=default if default in values else None, qmark="›",
                                  instruction=instruction, style=style())
    return _run(question, menu=True)


# ---------------------------------------------------------------------------------------------------- questions


def enter_note(q: Question, a: Answers) -> str:
    """What pressing Enter does, e.g. 'Enter: 186.2 A', 'Enter keeps 1500 hp', 'Enter: leave blank (none marked)'."""
    d = flow.default(q, a)
    if d not in (None, ""):
        shown = dict(q.choices).get(d, d) if q.choices else ("yes" if d is True else "no" if d is False else d)
        if a.has(q.key):
            clear = f"; '{CLEAR}' clears it" if _clearable(q, a) else ""
            return f"Enter keeps {shown}{clear}"
        return f"Enter: {shown}"
    if not flow.is_required(q, a):
        meaning = flow.blank_meaning(q, a)
        return f"Enter: leave blank ({meaning})" if meaning else "Enter: leave blank"
    return ""


def _clearable(q: Question, a: Answers) -> bool:
    """An optional answer with no default of its own can be cleared back to blank."""
    s = flow.spec(q, a)
    return a.has(q.key) and not flow.is_required(q, a) and not q.choices and q.default is None and s.default is None


def help_line(q: Question, a: Answers) -> str:
    """The dim line under the section rule: the question's help and what Enter does."""
    s = flow.spec(q, a)
    parts = [q.help] if q.help else []
    if not q.choices and s.kind not in ("boolean", "table"):
        note = enter_note(q, a)
        if note:
            parts.append(note)
    return " · ".join(parts)


def unit_tag(q: Question, a: Answers) -> str | None:
    unit = flow.unit_shown(q, a)
    return f"[{flow.pretty_unit(unit)}]" if unit else None


def show_help(q: Question, a: Answers, say: Say) -> None:
    for line in flow.help_text(q, a):
        say(f"  ? {line}")
    note = enter_note(q, a)
    if note and not q.choices:
        say(f"  ? {note}")


def ask(q: Question, a: Answers, say: Say = terminal.say) -> Any:
    """Ask ``q`` until it has an acceptable answer; return it as it goes into the machine file (None: blank).

    Says how a typed answer was read ("800 hp = 596.6 kW"). Warnings from cross-checks are shown and the person
    keeps the answer or gives it again. Raises :class:`Back` when the person asks for the previous question.
    """
    s = flow.spec(q, a)
    typed = ""
    line = help_line(q, a)
    while True:
        if line:
            say(f"    {line}")
            line = ""
        if s.kind == "table":
            value = _ask_rows(q, a, say)
        elif q.choices:
            d = flow.default(q, a)
            value = select(q.text, list(q.choices), d)
        elif s.kind == "boolean":
            d = flow.default(q, a)
            value = yes_no(q.text, None if d is None else d is True or d == "yes", say)
        else:
            value, typed = _ask_text(q, a, say, typed)
        if value is BACK:
            raise Back
        if value is HELP:
            show_help(q, a, say)
            continue
        if value is AGAIN:
            continue
        kept = not str(typed).strip() and a.has(q.key) and value == a.get(q.key)  # Enter kept the answer held
        if isinstance(typed, str) and s.kind not in ("table", "boolean") and not q.choices and not kept:
            for note in flow.understood(q, a, typed, value):
                say(f"    → {note}")
        warnings = [f for f in flow.findings(q, a.trial(q.key, value)) if f.level == "warn"]
        if not warnings:
            return value
        for w in warnings:
            say(f"  ! {w.message}")
        if _keep(say) is True:
            return value
        typed = ""  # give it again: a fresh line (Enter there takes the default shown, as always)


def _keep(say: Say) -> Any:
    """After a warning: keep the answer (True), give it again (False); BACK also gives it again."""
    while True:
        keep = yes_no("Keep this answer?", True, say)
        if keep is HELP:
            say("  ? y and Enter (or Enter alone): keep it and go on; n and Enter: give the answer again")
            continue
        return keep


def _ask_text(q: Question, a: Answers, say: Say, typed: str) -> tuple[Any, str]:
    """The typed answer, refused and asked again (with the text kept on the line) until it is acceptable."""
    clearable = _clearable(q, a)
    room = 40 if flow.spec(q, a).kind == "text" else 12  # names and reasons are longer than quantities
    while True:
        text = prompt_text(q.text, unit_tag(q, a) or "", typed, room)
        if isinstance(text, Nav):
            return text, typed
        if clearable and text.strip() == CLEAR:
            return None, ""
        why = flow.refusal(q, a, text)
        if why and not text.strip() and flow.is_required(q, a):
            why = f"this question needs an answer: {flow.expected(flow.spec(q, a))} ({why.partition(':')[0]})"
        if why:
            say(f"  ✗ {why}")
            typed = text
            continue
        return flow.accept(q, a, text), text


def _ask_rows(q: Question, a: Answers, say: Say) -> Any:
    """A table (e.g. load-shedding stages): keep the rows held, or enter them one by one.

    Returns the rows, None for none, BACK / HELP at the first prompt, AGAIN to start the table over (``<`` inside).
    """
    rows = a.get(q.key) or []
    if rows:
        say(f"    now: {flow.shown_answer(q, a)}")
        keep = select(q.text, [("keep", "keep them as they are"), ("again", "enter them again"), ("none", "none")])
        if isinstance(keep, Nav) or keep == "keep":
            return rows if keep == "keep" else keep
        if keep == "none":
            return None
    else:
        start = yes_no(q.text, False, say)
        if isinstance(start, Nav) or not start:
            return None if start is False else start
    item_specs = field_specs(flow.spec(q, a).item)
    out: list[dict] = []
    say("    (< and Enter starts this table over)")
    while True:
        n = len(out) + 1
        row = {}
        for name, text in q.row_text:
            s = item_specs[name]
            typed = ""
            while True:
                raw = prompt_text(text.format(n=n).capitalize(), f"[{s.unit}]" if s.unit else "", typed)
                if raw is BACK:
                    return AGAIN
                if raw is HELP:
                    say(f"  ? {s.help}; write it with its unit, e.g. {flow.KINDS[s.kind].example}"
                        if s.kind in flow.KINDS else f"  ? {s.help}")
                    continue
                try:
                    row[name] = flow.accept_cell(q, a, n - 1, name, raw)
                    break
                except InputError as e:
                    say(f"  ✗ {e}")
                    typed = raw
        out.append(row)
        more = yes_no("Another one?", False, say)
        if more is BACK:
            return AGAIN
        if more is not True:
            return out


# ---------------------------------------------------------------------------------------------------- session prompts


def confirm(message: str, default: bool = True, say: Say = terminal.say) -> bool:
    """A yes/no question of the session (y or n and Enter). Raises :class:`Back` for ``<``."""
    while True:
        answer = yes_no(message, default, say)
        if answer is BACK:
            raise Back
        if answer is HELP:
            say(f"  ? y and Enter: yes · n and Enter: no · Enter alone: {'yes' if default else 'no'} · "
                f"< and Enter: back")
            continue
        return bool(answer)


def choose(message: str, options: list[tuple[str, str]], default: str | None = None,
           say: Say = terminal.say) -> str:
    """Pick one of (value, label) options; returns the value. Raises :class:`Back` for ``<`` or Esc."""
    while True:
        pick = select(message, options, default)
        if pick is BACK:
            raise Back
        if pick is HELP:
            say("  ? ↑ and ↓ move, Enter picks; < or Esc goes back; Ctrl-C stops and keeps your answers")
            continue
        return pick


def ask_path(message: str, suggestion: Path, taken: Callable[[Path], bool], say: Say = terminal.say) -> Path:
    """A file name to write, Enter taking ``suggestion``; a name ``taken`` says no to is refused and asked again."""
    typed = ""
    while True:
        text = prompt_text(message, f"Enter: {suggestion}", typed)
        if text is BACK:
            raise Back
        if text is HELP:
            say(f"  ? the machine file to write; Enter takes {suggestion}; an existing file is never replaced")
            continue
        p = Path(text.strip() or suggestion).expanduser()
        if p.is_dir():
            say(f"  ✗ {p} is a folder; give a file name such as {suggestion.name}")
        elif taken(p):
            say(f"  ✗ {p} already exists and holds another machine file; give another name")
        else:
            return p
        typed = text
