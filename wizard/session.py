"""The two interviews, ``relaywright new`` and ``relaywright revise``, and their answers-file forms.

``new`` walks the questions of :mod:`wizard.flow` section by section, saves the answers to a draft after every one
(:mod:`wizard.drafts`), shows a review by section where any answer can be changed, then writes the machine file
(atomically; an existing different file is never replaced) and, where the sheet command exists, the sheet.
``revise`` asks again with the file's answers as defaults, asks who revises it and why, shows what changed in the
inputs and in every setting, keeps the previous revision as ``NAME.rev<N>.toml`` and writes the next one.

With ``--answers FILE`` the same flow runs without prompts: the file is a (possibly partial) machine file, what it
lacks takes the flow's defaults, and a missing answer with no default is an error naming the key.
"""

from __future__ import annotations

import copy
import sys
from pathlib import Path

from machines.errors import InputError
from machines.files import (case_from_dict, file_revision, parse_toml, read_text, safe_file_stem, write_atomic,
                            write_machine_file)
from reports.notices import CAUTION_LINE
from wizard import flow
from wizard.drafts import Draft, draft_path, free_draft_path, load_draft, timestamp_name
from wizard.flow import Answers

EXIT_OK, EXIT_BAD_INPUT, EXIT_INTERRUPTED = 0, 2, 130
RULE_WIDTH = 78
NO_TERMINAL = ("relaywright {command} asks its questions in a terminal, and there is none here; nothing was "
               "written. Without a terminal give the answers in a file: {hint}")


def say(text: str = "", wrap: bool = True) -> None:
    """Print a line, wrapped at word boundaries to the terminal's width, continuation lines indented."""
    import shutil
    import textwrap

    width = max(min(shutil.get_terminal_size((100, 24)).columns, 110) - 1, 40)
    if len(text) <= width or not wrap:
        print(text, flush=True)
        return
    lead = len(text) - len(text.lstrip())
    indent = " " * (lead + 2 if text.lstrip().startswith(("!", "✗")) else lead)
    print("\n".join(textwrap.wrap(text, width=width, subsequent_indent=indent, break_on_hyphens=False)),
          flush=True)


def _has_terminal() -> bool:
    return sys.stdin.isatty() and sys.stdout.isatty()


class _Stop(Exception):
    """The person chose to stop at the review; the draft is kept."""


# ---------------------------------------------------------------------------------------------------- new


def run_new(answers: Path | None = None, output: Path | None = None, resume: Path | None = None) -> int:
    """``relaywright new``: interview (or answers file) → machine file → sheet. Returns the exit code."""
    if answers is not None:
        if resume is not None:
            raise InputError("--resume", "cannot be combined with --answers (an answers file needs no draft)")
        return _new_from_answers(Path(answers), Path(output) if output else None)
    if not _has_terminal():
        print(NO_TERMINAL.format(command="new", hint="relaywright new --answers ANSWERS.toml -o MACHINE.toml"),
              file=sys.stderr)
        return EXIT_BAD_INPUT
    if resume is not None:
        draft, a = load_draft(resume)
        if draft.command != "new":
            raise InputError(str(resume), f"is a draft of 'relaywright revise'; continue it with "
                                          f"'relaywright revise {draft.output}'")
        if output is not None:
            draft.output = Path(output)
    else:
        draft, a = _start_draft(Path(output) if output else None)
    return _interview_new(draft, a)


def _start_draft(output: Path | None) -> tuple[Draft, Answers]:
    folder = output.parent if output else Path.cwd()
    path = draft_path(folder, output.stem if output else timestamp_name())
    if path.exists():
        from wizard.ask import confirm

        say(f"An earlier, unfinished session left a draft here: {path}")
        if confirm("Continue where it stopped?", default=True):
            draft, a = load_draft(path)
            draft.output = output or draft.output
            return draft, a
        path = free_draft_path(folder, path.stem.removeprefix(".relaywright-draft-"))
        say(f"The earlier draft is kept; this session saves to {path}")
    return Draft(path=path, command="new", output=output), Answers()


def _interview_new(draft: Draft, a: Answers) -> int:
    say("relaywright · a new machine file")
    say(CAUTION_LINE)
    say("Answer from the nameplate and the single-line diagram. Enter takes the value shown; Ctrl-C stops and "
        "keeps your answers.")
    if a.asked:
        say(f"Continuing the draft {draft.path} ({len(a.asked)} answers so far).")
    if draft.output is not None and draft.output.exists():
        say(f"Note: {draft.output} already exists. It will not be replaced: you will be asked for another name "
            f"at the end (to change that file, use 'relaywright revise {draft.output}').")
    try:
        interview(a, draft)
        data = first_issue(flow.machine_data(a))
        out = choose_output(draft, a, data)
        draft.output = out
        draft.save(a)
    except (KeyboardInterrupt, EOFError):
        return _interrupted(draft, a)
    except _Stop:
        _kept(draft, a)
        return EXIT_OK
    write_machine_file(out, data)
    draft.remove()
    return _written(out, data)


def _interrupted(draft: Draft, a: Answers) -> int:
    say()
    if not a.asked:
        say("Stopped before the first answer; nothing was saved." if not draft.path.exists() else
            f"Stopped; the draft {draft.path} is left as it was.")
    else:
        _kept(draft, a)
    return EXIT_INTERRUPTED


def _kept(draft: Draft, a: Answers) -> None:
    draft.save(a)
    say("Stopped. Your answers are saved in the draft:")
    say(f"  {draft.path}", wrap=False)
    say("Continue with:")
    if draft.command == "revise":
        say(f"  relaywright revise {draft.output}", wrap=False)
    else:
        say(f"  relaywright new --resume {draft.path}", wrap=False)


def first_issue(data: dict) -> dict:
    """A new machine file is revision 0 (unless its answers say otherwise), with its first line of history."""
    sheet = data.setdefault("sheet", {})
    sheet.setdefault("revision", 0)
    if sheet["revision"] == 0 and not sheet.get("history"):
        sheet["history"] = [{"revision": sheet["revision"], "date": sheet.get("date") or flow.today(),
                             "by": sheet.get("prepared_by", ""), "reason": "first issue"}]
    return data


def _new_from_answers(path: Path, output: Path | None) -> int:
    a = Answers(data=parse_toml(read_text(path), str(path)))
    try:
        warnings = flow.scripted(a)
    except InputError as e:
        raise e.at(path) from None
    data = first_issue(flow.machine_data(a))
    _, more = case_from_dict(data)
    out = output or Path(f"{safe_file_stem(data['sheet']['tag'])}.toml")
    if out.exists() and not _same_file(out, data):
        rev = file_revision(out)
        held = f" (revision {rev})" if rev is not None else ""
        raise InputError(str(out), f"already exists{held} and is not replaced; nothing was written. Give another "
                                   f"-o, or change that file with 'relaywright revise {out}'")
    _warn(warnings + more + _left_out(a))
    write_machine_file(out, data)
    return _written(out, data)


def _left_out(a: Answers) -> list[str]:
    return [f"{key} is left out: it does not apply to these answers" for key in flow.left_out(a)]


def _warn(lines: list[str]) -> None:
    for w in dict.fromkeys(lines):
        print(f"warning: {w}", file=sys.stderr)


def _same_file(path: Path, data: dict) -> bool:
    from machines.files import dumps

    try:
        return path.read_text("utf-8") == dumps(data)
    except (OSError, UnicodeDecodeError):
        return False


def choose_output(draft: Draft, a: Answers, data: dict) -> Path:
    """The machine file to write: ``-o``, else asked (default ``<tag>.toml``); never an existing different file."""
    from wizard.ask import ask_path

    out = draft.output
    if out is not None and (not out.exists() or _same_file(out, data)):
        return out
    if out is not None:
        say(f"{out} already exists and holds another machine file; it is not replaced.")
    suggestion = out or Path(f"{safe_file_stem(data['sheet']['tag'])}.toml")
    n = 2
    while suggestion.exists() and not _same_file(suggestion, data):
        suggestion = suggestion.with_name(f"{suggestion.stem.rsplit('-v', 1)[0]}-v{n}{suggestion.suffix}")
        n += 1
    return ask_path("Machine file to write", suggestion, lambda p: p.exists() and not _same_file(p, data))


def _written(out: Path, data: dict) -> int:
    sheet = data["sheet"]
    say(f"Written: {out}  ({sheet['tag']}, revision {sheet.get('revision', 0)})", wrap=False)
    code = _sheet(out)
    say(f"Next:  relaywright settings {out}    (the settings table)", wrap=False)
    if code is None:
        say(f"       relaywright sheet {out}       (the PDF sheet, once the sheet command is in this copy)", wrap=False)
    elif code == EXIT_BAD_INPUT:
        say(f"       relaywright sheet {out}       (the PDF sheet)", wrap=False)
    say(f"       relaywright revise {out}      (after a change on site)", wrap=False)
    say(CAUTION_LINE)
    return EXIT_OK if code is None else code


def _sheet(path: Path) -> int | None:
    """Make the sheet when the sheet command is there; None when it is not (yet).

    The machine file is written by then, so a failure here says so instead of ending the command as if nothing
    had been saved.
    """
    try:
        from wizard.sheet_command import make_sheet
    except ImportError:
        return None
    try:
        return make_sheet(path)
    except InputError as e:
        say(f"The machine file is written, but the sheet could not be made: {e}")
    except Exception as e:  # the sheet's own failure must not hide that the machine file is safe
        first = str(e).splitlines()[0] if str(e) else ""
        say(f"The machine file is written, but the sheet could not be made ({type(e).__name__}: {first}); "
            f"try again with 'relaywright sheet {path}' and report this if it persists")
    return EXIT_BAD_INPUT


# ---------------------------------------------------------------------------------------------------- interview


def interview(a: Answers, draft: Draft | None, *, title: str = "Review before writing") -> None:
    """Ask every question not answered yet, then review, until the person chooses to write.

    Saves the draft after every answer. Raises KeyboardInterrupt / EOFError (Ctrl-C, closed input) and _Stop.
    """
    from wizard.ask import ask

    section = None
    while True:
        q = flow.next_question(a)
        if q is None:
            if review(a, title=title):
                return
            section = None
            continue
        if q.section != section:
            section = q.section
            _section_rule(section, a)
        flow.record(q, a, ask(q, a, say))
        if draft is not None:
            draft.save(a)


def _section_rule(section: str, a: Answers) -> None:
    ids = [s for s, _, _ in flow.SECTIONS]
    title = f"── {ids.index(section) + 1}/{len(ids)}  {flow.section_title(section, a.kind)} "
    say()
    say(title + "─" * max(RULE_WIDTH - len(title), 4))


def summary_lines(a: Answers) -> list[str]:
    """The review summary, one line per answer, grouped by section."""
    lines = []
    rows = flow.review_rows(a)
    width = max((len(label) for _, items in rows for label, _ in items), default=10) + 2
    for title, items in rows:
        lines.append(title)
        for label, value in items:
            lines.append(f"  {label.ljust(width, '.')} {value}")
    return lines


def review(a: Answers, *, title: str = "Review before writing") -> bool:
    """Show every answer by section and the file reader's findings; True to write, else an answer was reopened."""
    from wizard.ask import choose

    say()
    say(f"══ {title} " + "═" * max(RULE_WIDTH - len(title) - 4, 4))
    say(CAUTION_LINE)
    for line in summary_lines(a):
        say(line)
    problem, warnings = _validate(a)
    for w in warnings:
        say(f"  ! {w}")
    options = [("write", "Write the machine file")]
    if problem is not None:
        say(f"  ✗ {problem}")
        say("  The machine file cannot be written until this is put right.")
        q = flow.find(problem.key, a)
        options = [("again", f"Give the answer '{q.label}' again")] if q is not None else []
    options += [("change", "Change an answer"), ("stop", "Stop here and keep the draft")]
    pick = choose("What next?", options)
    if pick == "write":
        return True
    if pick == "stop":
        raise _Stop
    if pick == "again":
        a.unmark(flow.find(problem.key, a).key)
        return False
    sections = [(t, t) for t, _ in flow.review_rows(a)]
    section = choose("Which section?", sections)
    qs = [q for q in flow.applicable(a) if flow.section_title(q.section, a.kind) == section]
    key = choose("Which answer?", [(q.key, f"{q.label}: {flow.shown_answer(q, a)}") for q in qs])
    a.unmark(key)
    return False


def _validate(a: Answers) -> tuple[InputError | None, list[str]]:
    """The file reader's verdict on the answers: the first refusal (or None) and the warnings."""
    try:
        _, warnings = case_from_dict(first_issue(flow.machine_data(a)))
    except InputError as e:
        return e, []
    return None, warnings


# ---------------------------------------------------------------------------------------------------- revise


def run_revise(file: Path, answers: Path | None = None) -> int:
    """``relaywright revise FILE``: ask again (or take the changes from a file), show what changed, write N+1."""
    path = Path(file)
    text = read_text(path)
    data = parse_toml(text, str(path))
    try:
        old_case, old_warnings = case_from_dict(data)
    except InputError as e:
        raise e.at(path) from None
    a = Answers(data=copy.deepcopy(data))
    a.data["sheet"]["date"] = flow.today()
    if answers is not None:
        by, reason = _apply_changes(a, Path(answers))
        _warn(flow.scripted(a) + _left_out(a))
        return _finish_revise(path, text, old_case, old_warnings, a, by, reason, draft=None)
    if not _has_terminal():
        print(NO_TERMINAL.format(command="revise", hint=f"relaywright revise {path} --answers CHANGES.toml "
                                                        "(a partial machine file with the changed keys and a "
                                                        "[[sheet.history]] row giving by and reason)"),
              file=sys.stderr)
        return EXIT_BAD_INPUT
    draft = Draft(path=draft_path(path.parent, f"{path.stem}.revise"), command="revise", output=path)
    try:
        a = _start_revise(draft, a, path)
        interview(a, draft, title=f"Review of revision {old_case.sheet.revision + 1}")
        by, reason = _who_and_why(a, draft)
    except (KeyboardInterrupt, EOFError):
        return _interrupted(draft, a)
    except _Stop:
        _kept(draft, a)
        return EXIT_OK
    return _finish_revise(path, text, old_case, old_warnings, a, by, reason, draft=draft)


def _start_revise(draft: Draft, a: Answers, path: Path) -> Answers:
    from wizard.ask import choose, confirm

    rev = a.data["sheet"].get("revision", 0)
    say(f"relaywright · revising {path}  ({a.data['sheet'].get('tag')}, revision {rev} → {rev + 1})")
    say(CAUTION_LINE)
    if draft.path.exists():
        say(f"An unfinished revision of this file left a draft: {draft.path}")
        if confirm("Continue where it stopped?", default=True):
            return load_draft(draft.path)[1]
        draft.path = free_draft_path(path.parent, f"{path.stem}.revise")
        say(f"The earlier draft is kept; this session saves to {draft.path}")
    how = choose("How do you want to go through it?", [
        ("all", "question by question (Enter keeps each value)"),
        ("pick", "from the summary: pick only the answers that changed")])
    if how == "pick":
        flow.scripted(a)
    return a


def _who_and_why(a: Answers, draft: Draft) -> tuple[str, str]:
    from wizard.ask import ask

    say()
    say("── who and why " + "─" * (RULE_WIDTH - 15))
    for q in flow.REVISION_QUESTIONS:
        if q.key not in a.asked:
            if q.key == "revision.by" and not a.has(q.key) and a.get("sheet.prepared_by"):
                a.set(q.key, a.get("sheet.prepared_by"))
            flow.record(q, a, ask(q, a, say))
            draft.save(a)
    return a.get("revision.by") or "", a.get("revision.reason") or ""


def _apply_changes(a: Answers, path: Path) -> tuple[str, str]:
    """Merge a partial machine file of changes into the answers; its last [[sheet.history]] row gives who and why."""
    changes = parse_toml(read_text(path), str(path))
    history = changes.get("sheet", {}).get("history") if isinstance(changes.get("sheet"), dict) else None
    row = history[-1] if isinstance(history, list) and history and isinstance(history[-1], dict) else {}
    reason = row.get("reason")
    if not isinstance(reason, str) or not reason.strip():
        raise InputError("sheet.history", "a revision needs a reason: give [[sheet.history]] with by = \"...\" and "
                                          "reason = \"...\" in the answers file")
    by = row.get("by", "")
    if not isinstance(by, str):
        raise InputError("sheet.history.by", f"expected text in quotes, got {by!r}")
    for section, table in changes.items():
        if section == "format":
            continue
        if not isinstance(table, dict):
            raise InputError(section, f"expected a table ([{section}]), got {table!r}")
        target = a.data.setdefault(section, {})
        for name, value in table.items():
            if (section, name) != ("sheet", "history"):
                target[name] = value
    return by.strip(), reason.strip()


def next_revision(data: dict, by: str, reason: str) -> dict:
    """Bump the revision, date it today, set it back to draft and add its line of history."""
    sheet = data["sheet"]
    rev = int(sheet.get("revision", 0)) + 1
    sheet["revision"] = rev
    sheet["date"] = sheet.get("date") or flow.today()
    sheet["status"] = "draft"
    sheet["history"] = list(sheet.get("history", [])) + [
        {"revision": rev, "date": sheet["date"], "by": by, "reason": reason}]
    return data


def keep_previous(path: Path, text: str, revision: int) -> Path:
    """Copy the file as it was to ``NAME.rev<N>.toml`` beside it; an existing copy is never overwritten."""
    target, n = path.with_name(f"{path.stem}.rev{revision}{path.suffix}"), 2
    while target.exists():
        if target.read_bytes() == text.encode("utf-8"):
            return target
        target, n = path.with_name(f"{path.stem}.rev{revision}-{n}{path.suffix}"), n + 1
    write_atomic(target, text)
    return target


def _finish_revise(path: Path, text: str, old_case, old_warnings, a: Answers, by: str, reason: str,
                   draft: Draft | None) -> int:
    from machines.compare import compare
    from machines.study import run_study
    from reports.changes import format_changes

    old_rev = old_case.sheet.revision
    new_data = next_revision(flow.machine_data(a), by, reason)
    new_case, new_warnings = case_from_dict(new_data)
    changes = compare(old_case, run_study(old_case, old_warnings), new_case, run_study(new_case, new_warnings))
    say()
    say(f"What changed from revision {old_rev} to {old_rev + 1}:")
    for line in format_changes(changes):
        say(f"  {line}")
    for w in new_warnings:
        say(f"  ! {w}")
    if old_case.sheet.status != "draft":
        say(f"  The new revision is a draft again (revision {old_rev} was {old_case.sheet.status}): it needs "
            "checking and approval before use.")
    if draft is not None:
        from wizard.ask import confirm

        try:
            go = confirm(f"Write revision {old_rev + 1} to {path}? (revision {old_rev} is kept beside it)",
                         default=True)
        except (KeyboardInterrupt, EOFError):
            return _interrupted(draft, a)
        if not go:
            _kept(draft, a)
            return EXIT_OK
    kept = keep_previous(path, text, old_rev)
    write_machine_file(path, new_data)
    say(f"Revision {old_rev} kept as {kept}")
    if draft is not None:
        draft.remove()
    return _written(path, new_data)

