"""Asking one question in the terminal (questionary), unit-aware, with the same refusals as the file reader.

A typed answer is checked as it is submitted by :func:`wizard.flow.refusal` (which calls
:func:`machines.files.parse_value`, so "96 V" for a current is refused with the file reader's one-line message) and
the prompt stays open until the answer is right. A cross-check that only warns is shown once the answer is in, and
the person keeps the answer or gives it again.

Every prompt uses ``unsafe_ask()``: Ctrl-C raises KeyboardInterrupt and a closed input raises EOFError, both left
for the session to handle once (it has saved the draft already). questionary is imported here only, never at the
start-up of the command line.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any, Callable

from machines.errors import InputError
from machines.model import field_specs
from wizard import flow
from wizard.flow import Answers, Question

CLEAR = "-"  #: typed to clear an optional answer that has a value
Say = Callable[[str], None]


def _q():
    import questionary

    return questionary


def style():
    """Our colours: one accent for the question mark and the answers, the hint dimmed."""
    from questionary import Style

    return Style([("qmark", "fg:#0087af bold"), ("question", "bold"), ("answer", "fg:#0087af bold"),
                  ("instruction", "fg:#808080"), ("pointer", "fg:#0087af bold"), ("highlighted", "fg:#0087af")])


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
    return f"[{unit}]" if unit else None


def ask(q: Question, a: Answers, say: Say = print) -> Any:
    """Ask ``q`` until it has an acceptable answer; return it as it goes into the machine file (None: blank).

    Warnings from cross-checks are shown and the person chooses to keep the answer or give it again.
    """
    s = flow.spec(q, a)
    while True:
        line = help_line(q, a)
        if line:
            say(f"    {line}")
        if s.kind == "table":
            return _ask_rows(q, a, say)
        if q.choices:
            value = _ask_choice(q, a)
        elif s.kind == "boolean":
            d = flow.default(q, a)
            value = _q().confirm(q.text, default=d is True or d == "yes", qmark="›", style=style()).unsafe_ask()
        else:
            value = _ask_text(q, a, say)
        warnings = [f for f in flow.findings(q, a.trial(q.key, value)) if f.level == "warn"]
        if not warnings:
            return value
        for w in warnings:
            say(f"  ! {w.message}")
        if _q().confirm("Keep this answer?", default=True, qmark="›", style=style()).unsafe_ask():
            return value


def _ask_choice(q: Question, a: Answers) -> str:
    questionary = _q()
    d = flow.default(q, a)
    choices = [questionary.Choice(title=label, value=value) for value, label in q.choices]
    return questionary.select(q.text, choices=choices, default=d if d in dict(q.choices) else None, qmark="›",
                              instruction="(arrow keys, Enter)", style=style()).unsafe_ask()


def _ask_text(q: Question, a: Answers, say: Say) -> Any:
    clearable = _clearable(q, a)

    def validate(text: str):
        if clearable and text.strip() == CLEAR:
            return True
        return flow.refusal(q, a, text) or True

    text = _q().text(q.text, validate=validate, qmark="›", instruction=unit_tag(q, a), style=style()).unsafe_ask()
    if clearable and text.strip() == CLEAR:
        return None
    value = flow.accept(q, a, text)
    if not text.strip() and value is not None:
        say(f"    = {value}")
    return value


def _ask_rows(q: Question, a: Answers, say: Say) -> list[dict] | None:
    """A table (e.g. load-shedding stages): keep the rows held, or enter them one by one."""
    questionary = _q()
    rows = a.get(q.key) or []
    if rows:
        say(f"    now: {flow.shown_answer(q, a)}")
        keep = questionary.select(q.text, choices=[questionary.Choice("keep them as they are", "keep"),
                                                   questionary.Choice("enter them again", "again"),
                                                   questionary.Choice("none", "none")],
                                  qmark="›", style=style()).unsafe_ask()
        if keep == "keep":
            return rows
        if keep == "none":
            return None
    elif not questionary.confirm(q.text, default=False, qmark="›", style=style()).unsafe_ask():
        return None
    item_specs = field_specs(flow.spec(q, a).item)
    out: list[dict] = []
    while True:
        n = len(out) + 1
        row = {}
        for name, text in q.row_text:
            s = item_specs[name]

            def validate(raw: str, name=name, i=n - 1):
                try:
                    flow.accept_cell(q, a, i, name, raw)
                except InputError as e:
                    return str(e)
                return True

            raw = questionary.text(text.format(n=n).capitalize(), validate=validate, qmark="›",
                                   instruction=f"[{s.unit}]" if s.unit else "", style=style()).unsafe_ask()
            row[name] = flow.accept_cell(q, a, n - 1, name, raw)
        out.append(row)
        if not questionary.confirm("Another one?", default=False, qmark="›", style=style()).unsafe_ask():
            return out


def confirm(message: str, default: bool = True) -> bool:
    """A yes/no question."""
    return bool(_q().confirm(message, default=default, qmark="›", style=style()).unsafe_ask())


def choose(message: str, options: list[tuple[str, str]]) -> str:
    """Pick one of (value, label) options; returns the value."""
    questionary = _q()
    return questionary.select(message, choices=[questionary.Choice(title=label, value=value)
                                                for value, label in options],
                              qmark="›", instruction="(arrow keys, Enter)", style=style()).unsafe_ask()


def ask_path(message: str, suggestion: Path, taken: Callable[[Path], bool]) -> Path:
    """A file name to write, Enter taking ``suggestion``; a name ``taken`` says no to is refused."""

    def validate(text: str):
        p = Path(text.strip() or suggestion).expanduser()
        if p.is_dir():
            return f"{p} is a folder; give a file name such as {suggestion.name}"
        if taken(p):
            return f"{p} already exists and holds another machine file; give another name"
        return True

    text = _q().text(message, validate=validate, qmark="›", instruction=f"Enter: {suggestion}",
                     style=style()).unsafe_ask()
    return Path(text.strip() or suggestion).expanduser()
