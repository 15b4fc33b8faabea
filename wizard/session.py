"""The two interviews, ``relaywright new`` and ``relaywright revise``, and their answers-file forms.

``new`` walks the questions of :mod:`wizard.flow` section by section, saves the answers to a draft after every one
(:mod:`wizard.drafts`), shows a review by section (paged to the terminal) where any answer can be changed, then
writes the machine file (atomically; an existing file is never replaced without ``--force``), makes the sheet and
ends with the study's findings and the exit code of ``relaywright settings``. ``<`` goes back one question anywhere.
``revise`` asks again with the file's answers as defaults, asks who revises it and why, shows what changed in the
inputs and in every setting, keeps the previous revision as ``NAME.rev<N>.toml`` and writes the next one into the
same file with its comments, key order and layout kept; a new revision is a draft again, its sign-off cleared.

With ``--answers FILE`` the same flow runs without prompts: the file is a (possibly partial) machine file, what it
lacks takes the flow's defaults; required answers with no default are all named in one error, or, in a terminal,
asked (only those).
"""

from __future__ import annotations

import copy
import sys
from pathlib import Path

from machines.errors import InputError, one_line
from machines.files import (case_from_dict, file_revision, parse_toml, read_text, safe_file_stem, write_atomic,
                            write_machine_file)
from reports.notices import CAUTION_LINE
from wizard import flow, terminal
from wizard.drafts import Draft, describe, draft_path, find_drafts, free_draft_path, load_draft, timestamp_name
from wizard.flow import Answers

EXIT_OK, EXIT_CHECK_FAILED, EXIT_BAD_INPUT, EXIT_INTERRUPTED = 0, 1, 2, 130
RULE_WIDTH = 78
NO_TERMINAL = ("relaywright {command} asks its questions in a terminal, and there is none here; nothing was "
               "written. Without a terminal give the answers in a file: {hint}")
#: the sign-off of a revision: a new revision has been neither checked nor approved
SIGN_OFF = ("checked_by", "checked_on", "approved_by", "approved_on")
KEYS_HELP = ("Enter takes the value shown · < and Enter (or Esc) goes back one question, also out of a list · ? and "
             "Enter shows the question's help · Ctrl-C stops and keeps your answers.")


def say(text: str = "", wrap: bool = True) -> None:
    """Print a line, wrapped at word boundaries to the terminal's width, continuation lines indented."""
    terminal.say(text, wrap)


def _has_terminal() -> bool:
    return bool(sys.stdin and sys.stdout and sys.stdin.isatty() and sys.stdout.isatty())  # None when closed


def _rule_width() -> int:
    return min(RULE_WIDTH, terminal.line_width())


class _Stop(Exception):
    """The person chose to stop at the review; the draft is kept."""


# ---------------------------------------------------------------------------------------------------- new


def run_new(answers: Path | None = None, output: Path | None = None, resume: Path | None = None,
            force: bool = False) -> int:
    """``relaywright new``: interview (or answers file), machine file, sheet, findings; returns the exit code."""
    if answers is not None:
        if resume is not None:
            raise InputError("--resume", "cannot be combined with --answers (an answers file needs no draft)")
        return _new_from_answers(Path(answers), Path(output) if output else None, force)
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
        try:
            draft, a = _start_draft(Path(output) if output else None)
        except (KeyboardInterrupt, EOFError):
            say()
            say("Stopped before the first answer; nothing was saved.")
            return EXIT_INTERRUPTED
    return _interview_new(draft, a, force)


def _start_draft(output: Path | None) -> tuple[Draft, Answers]:
    """A new draft, or an earlier unfinished one of this folder if the person chooses to continue it."""
    from wizard.ask import Back, choose

    folder = output.parent if output else Path.cwd()
    found = find_drafts(folder, "new")
    if found:
        say("An earlier, unfinished 'relaywright new' left " + ("a draft here:" if len(found) == 1 else
                                                                  f"{len(found)} drafts here:"))
        for d, answers in found:
            say(f"  {folder / d.path.name}", wrap=False)
            say(f"    {describe(d, answers).partition(' ')[2]}")
        options = [(str(d.path), f"continue {describe(d, answers)}") for d, answers in found]
        options.append(("fresh", f"start a new machine file (the draft{'s are' if len(found) > 1 else ' is'} kept)"))
        while True:
            try:
                pick = choose("Continue where it stopped?", options)
                break
            except Back:
                say("  This is the first question.")
        if pick != "fresh":
            draft, a = next((d, ans) for d, ans in found if str(d.path) == pick)
            draft.output = output or draft.output
            return draft, a
    path = draft_path(folder, output.stem if output else timestamp_name())
    if path.exists():  # a draft of another command, or one that cannot be read: never touched
        path = free_draft_path(folder, path.stem.removeprefix(".relaywright-draft-"))
    if found:
        say(f"The earlier draft{'s are' if len(found) > 1 else ' is'} kept; this session saves to {path}")
    return Draft(path=path, command="new", output=output), Answers()


def _interview_new(draft: Draft, a: Answers, force: bool, missing: list[str] | None = None) -> int:
    say("relaywright · a new machine file")
    say(CAUTION_LINE)
    say("Answer from the nameplate and the single-line diagram.")
    say(KEYS_HELP)
    if missing:
        say(f"The answers file gives everything but {len(missing)} required "
            f"answer{'s' if len(missing) > 1 else ''}; only {'these are' if len(missing) > 1 else 'this is'} asked: "
            f"{', '.join(missing)}.")
    elif a.asked:
        say(f"Continuing the draft {draft.path} ({len(a.asked)} answers so far).")
    if draft.output is not None and draft.output.exists() and not force:
        say(f"Note: {draft.output} already exists. It will not be replaced: you will be asked for another name "
            f"at the end (to change that file, use 'relaywright revise {draft.output}').")
    try:
        interview(a, draft)
        data = first_issue(flow.machine_data(a))
        out = choose_output(draft, a, data, force)
        draft.output = out
        draft.save(a)
    except (KeyboardInterrupt, EOFError):
        return _interrupted(draft, a)
    except _Stop:
        _kept(draft, a)
        return EXIT_OK
    write_machine_file(out, data)
    draft.remove()
    return _written(out, data, force)


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


def _new_from_answers(path: Path, output: Path | None, force: bool) -> int:
    a = Answers(data=parse_toml(read_text(path), str(path)))
    missing: list[str] = []
    try:
        warnings = flow.scripted(a, missing)
    except InputError as e:
        raise e.at(path) from None
    if missing:
        if not _has_terminal():
            raise InputError(str(path), missing_message(missing, a))
        _warn(warnings)
        folder = (output or path).parent
        stem = output.stem if output else f"{path.stem}.answers"
        draft = Draft(path=free_draft_path(folder, stem), command="new", output=output)
        return _interview_new(draft, a, force, missing=missing)
    data = first_issue(flow.machine_data(a))
    _, more = case_from_dict(data)
    out = output or Path(f"{safe_file_stem(data['sheet']['tag'])}.toml")
    if out.exists() and not _same_file(out, data) and not force:
        rev = file_revision(out)
        held = f" (revision {rev})" if rev is not None else ""
        raise InputError(str(out), f"already exists{held} and is not replaced; nothing was written. Give another "
                                   f"-o, replace it with --force, or change that file with 'relaywright revise "
                                   f"{out}'")
    _warn(warnings + more + _left_out(a))
    write_machine_file(out, data)
    return _written(out, data, force)


def missing_message(keys: list[str], a: Answers) -> str:
    """Every required answer an answers file lacks, in one line (what each expects)."""
    parts = []
    for key in keys:
        q = flow.find(key, a)
        parts.append(f"{key} ({flow.expected(flow.spec(q, a))})" if q is not None else key)
    n = len(keys)
    return (f"{n} required answer{'s are' if n > 1 else ' is'} missing: {'; '.join(parts)}; nothing was written. "
            "Add them to the file, or run the same command in a terminal to be asked only for these")


def _left_out(a: Answers) -> list[str]:
    return [f"{key} is left out: it does not apply to these answers" for key in flow.left_out(a)]


def _warn(lines: list[str]) -> None:
    for w in dict.fromkeys(lines):
        print(terminal.for_stream(f"warning: {w}", sys.stderr), file=sys.stderr)


def _same_file(path: Path, data: dict) -> bool:
    from machines.files import dumps

    try:
        return path.read_text("utf-8") == dumps(data)
    except (OSError, UnicodeDecodeError):
        return False


def choose_output(draft: Draft, a: Answers, data: dict, force: bool = False) -> Path:
    """The machine file to write: ``-o``, else asked (default ``<tag>.toml``); an existing different file only
    with ``--force`` (and never one of a higher revision: the writer refuses it)."""
    from wizard.ask import ask_path

    out = draft.output
    if out is not None and (not out.exists() or force or _same_file(out, data)):
        return out
    if out is not None:
        say(f"{out} already exists and holds another machine file; it is not replaced.")
    suggestion = out or Path(f"{safe_file_stem(data['sheet']['tag'])}.toml")
    n = 2
    while suggestion.exists() and not _same_file(suggestion, data) and not force:
        suggestion = suggestion.with_name(f"{suggestion.stem.rsplit('-v', 1)[0]}-v{n}{suggestion.suffix}")
        n += 1
    return ask_path("Machine file to write", suggestion,
                    lambda p: p.exists() and not _same_file(p, data) and not force, say)


def _written(out: Path, data: dict, force: bool = False) -> int:
    """After the machine file is written: the findings, the sheet, what to do next. Returns the exit code of
    ``relaywright settings`` (1 when a check failed), or 2 when the sheet could not be made."""
    sheet = data["sheet"]
    say(f"Written: {out}  ({sheet['tag']}, revision {sheet.get('revision', 0)})")
    code = _findings(out)
    made = _sheet_if_free(out, force)
    say("Next:")
    for command, what in ((f"relaywright settings {out}", "the settings table with every finding"),
                          (f"relaywright sheet {out}", "the PDF sheet") if made is None else ("", ""),
                          (f"relaywright revise {out}", "after a change on site")):
        if command:
            say(f"  {command}", wrap=False)
            say(f"      {what}")
    say(CAUTION_LINE)
    return EXIT_BAD_INPUT if made == EXIT_BAD_INPUT else code


def _findings(path: Path) -> int:
    """Print the failed and warned checks of the study of ``path``; return ``relaywright settings``' exit code."""
    from machines.files import load_case
    from machines.study import run_study

    case, warnings = load_case(path)
    try:
        record = run_study(case, warnings)
    except InputError as e:
        raise e.at(path) from None
    found = [(fid, c) for fid, c in record.all_checks() if c.status != "ok"]
    failed = sum(1 for _, c in found if c.status == "fail")
    say()
    if not found:
        say("Findings: none (every check passed).")
        return EXIT_OK
    counts = ", ".join(x for x in (f"{failed} failed" if failed else "",
                                   f"{len(found) - failed} warning{'s' if len(found) - failed != 1 else ''}"
                                   if len(found) > failed else "") if x)
    say(f"Findings: {counts}" + (" — do not apply these settings as they are; correct the data or the "
                                 "settings first" if failed else ""))
    for fid, c in found:
        mark = "✗" if c.status == "fail" else "!"
        say(f"  {mark} {fid + ': ' if fid else ''}{c.message}")
    say()
    return EXIT_CHECK_FAILED if record.worst == "fail" else EXIT_OK


def _sheet_target(path: Path) -> tuple[object, Path] | None:
    """The sheet command's maker and the sheet it would write for ``path``; None where there is no sheet command."""
    from wizard.sheet_command import default_output, make_sheet
    data = parse_toml(read_text(path), str(path))
    sheet = data.get("sheet", {})
    return make_sheet, default_output(path, str(sheet.get("tag", "")), int(sheet.get("revision", 0)))


def _sheet_if_free(path: Path, force: bool) -> int | None:
    """Make the sheet unless a file of its name exists (replaced only with ``--force``); the exit code of the
    sheet command, or None when no sheet was made.

    The machine file is written by then, so a failure here says so instead of ending the command as if nothing
    had been saved.
    """
    target = _sheet_target(path)
    if target is None:
        return None
    make_sheet, pdf = target
    if Path(pdf).exists() and not force:
        say(f"The sheet {pdf} already exists and is not replaced; make it again with 'relaywright sheet {path} "
            f"-o OTHER.pdf'.")
        return None
    say("The sheet:")
    return _sheet(path)


def _sheet(path: Path) -> int | None:
    """Make the sheet when the sheet command is there; None when it is not (yet)."""
    target = _sheet_target(path)
    if target is None:
        return None
    make_sheet = target[0]
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

    ``<`` goes back one answer at any question and out of the review. Saves the draft after every answer. Raises
    KeyboardInterrupt / EOFError (Ctrl-C, closed input) and _Stop.
    """
    from wizard.ask import Back, ask

    _warm_up()
    section = None
    while True:
        q = flow.next_question(a)
        if q is None:
            try:
                if review(a, title=title):
                    return
            except Back:
                if flow.go_back(a) is None:
                    say("  There is no answer to go back to.")
            section = None
            continue
        if q.section != section:
            section = q.section
            _section_rule(section, a)
        try:
            value = ask(q, a, say)
        except Back:
            previous = flow.go_back(a, q.key)
            if previous is None:
                say("  This is the first question.")
            else:
                say(f"  ← back to: {previous.label}")
                section = None if previous.section != q.section else section
            continue
        flow.record(q, a, value)
        if draft is not None:
            draft.save(a)


def _warm_up() -> None:
    """Build the unit registry while the person reads the first questions, so the first quantity answered is not
    kept waiting for it."""
    import threading

    from machines.units import registry

    threading.Thread(target=registry, name="units-warm-up", daemon=True).start()


def _section_rule(section: str, a: Answers) -> None:
    ids = [s for s, _, _ in flow.SECTIONS]
    title = f"── {ids.index(section) + 1}/{len(ids)}  {flow.section_title(section, a.kind)} "
    say()
    say(title + "─" * max(_rule_width() - len(title), 4), wrap=False)


def summary_lines(a: Answers, width: int | None = None) -> list[list[str]]:
    """The review summary by section: for each section its title and one line per answer (wrapped to the
    terminal, a long answer continuing under the value column)."""
    rows = flow.review_rows(a)
    label_w = max((len(label) for _, items in rows for label, _ in items), default=10) + 2
    w = terminal.line_width(width)
    label_w = min(label_w, max(w // 2 - 3, 12))
    out = []
    for title, items in rows:
        lines = [title]
        for label, value in items:
            head = f"  {label.ljust(label_w, '.')} " if len(label) < label_w else f"  {label} "
            lines += terminal.wrap(head + value, w, indent=" " * (label_w + 3))
        out.append(lines)
    return out


def _pages(sections: list[list[str]], tail: list[str], room: int) -> list[list[str]]:
    """Pages of at most ``room`` lines: a section goes whole onto a page where it fits, and where it does not it
    fills the page and goes on under its title '(continued)' on the next; the findings ``tail`` come last.

    >>> [len(p) for p in _pages([["A"] + ["a"] * 5, ["B"] + ["b"] * 9], [], 10)]
    [6, 10]
    >>> [len(p) for p in _pages([["A"] + ["a"] * 3, ["B"] + ["b"] * 12], [], 10)]
    [10, 8]
    """
    pages: list[list[str]] = [[]]
    for lines in sections + ([tail] if tail else []):
        page = pages[-1]
        if page and len(page) + len(lines) > room and (len(lines) <= room and 2 * len(page) >= room
                                                       or room - len(page) < 4):
            pages.append([])  # a section that fits on a page of its own is not split across a page half full
        title = lines[0]
        for line in lines:
            if len(pages[-1]) >= room:
                pages.append([] if line is title or not title else [f"{title} (continued)"])
            pages[-1].append(line)
    return pages


def review(a: Answers, *, title: str = "Review before writing") -> bool:
    """Show every answer by section, paged to the terminal's height, and the file reader's findings.

    True to write; False when an answer was reopened. Raises Back (``<`` on the first page: the last answer is
    reopened) and _Stop.
    """
    from wizard.ask import Back, choose

    problem, warnings = _validate(a)
    tail = [line for w in warnings for line in terminal.wrap(f"  ! {w}")]
    if problem is not None:
        tail += terminal.wrap(f"  ✗ {problem}") + ["  The machine file cannot be written until this is put right."]
    if tail:
        tail.insert(0, "What the machine file reader says")
    caution = terminal.wrap(CAUTION_LINE)
    room = max(terminal.rows() - len(caution) - 9, 8)  # heading, menu of up to five entries, its question, a margin
    pages = _pages(summary_lines(a), tail, room)
    page = 0
    while True:
        say()
        head = f"══ {title}" + (f" · page {page + 1} of {len(pages)} " if len(pages) > 1 else " ")
        say(head + "═" * max(_rule_width() - len(head), 4), wrap=False)
        for line in caution + pages[page]:
            say(line, wrap=False)
        last = page == len(pages) - 1
        options = []
        if not last:
            options.append(("next", f"Next page ({page + 2} of {len(pages)})"))
        elif problem is None:
            options.append(("write", "Write the machine file"))
        else:
            q = flow.find(problem.key, a)
            if q is not None:
                options.append(("again", f"Give the answer '{q.label}' again"))
        options += [("change", "Change an answer"), ("stop", "Stop here and keep the draft")]
        try:
            pick = choose("What next?", options)
        except Back:
            if page == 0:
                raise
            page -= 1
            continue
        if pick == "next":
            page += 1
        elif pick == "write":
            return True
        elif pick == "stop":
            raise _Stop
        elif pick == "again":
            a.unmark(flow.find(problem.key, a).key)
            return False
        elif _change_an_answer(a):
            return False


def _change_an_answer(a: Answers) -> bool:
    """Pick a section, then an answer to give again; False when the person went back out of both menus."""
    from wizard.ask import Back, choose

    while True:
        sections = [(t, t) for t, _ in flow.review_rows(a)]
        try:
            section = choose("Which section?", sections)
        except Back:
            return False
        qs = [q for q in flow.applicable(a) if flow.section_title(q.section, a.kind) == section]
        try:
            key = choose("Which answer?", [(q.key, f"{q.label}: {flow.shown_answer(q, a)}") for q in qs])
        except Back:
            continue
        a.unmark(key)
        return True


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
    a.flow["revising"] = True  # nobody has checked or approved the new revision yet: not asked, cleared
    for name in SIGN_OFF:
        a.data["sheet"].pop(name, None)
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
        while True:
            interview(a, draft, title=f"Review of revision {old_case.sheet.revision + 1}")
            who = _who_and_why(a, draft)
            if who is not None:
                by, reason = who
                break
    except (KeyboardInterrupt, EOFError):
        return _interrupted(draft, a)
    except _Stop:
        _kept(draft, a)
        return EXIT_OK
    return _finish_revise(path, text, old_case, old_warnings, a, by, reason, draft=draft)


def _start_revise(draft: Draft, a: Answers, path: Path) -> Answers:
    from wizard.ask import Back, choose

    rev = a.data["sheet"].get("revision", 0)
    say(f"relaywright · revising {path}  ({a.data['sheet'].get('tag')}, revision {rev} → {rev + 1})")
    say(CAUTION_LINE)
    say(KEYS_HELP)
    if draft.path.exists():
        say(f"An unfinished revision of this file left a draft: {draft.path}")
        while True:
            try:
                pick = choose("Continue where it stopped?", [("yes", "continue the unfinished revision"),
                                                             ("no", "start again (the draft is kept)")])
                break
            except Back:
                say("  This is the first question.")
        if pick == "yes":
            return load_draft(draft.path)[1]
        draft.path = free_draft_path(path.parent, f"{path.stem}.revise")
        say(f"The earlier draft is kept; this session saves to {draft.path}")
    while True:
        try:
            how = choose("How do you want to go through it?", [
                ("all", "question by question (Enter keeps each value)"),
                ("pick", "from the summary: pick only the answers that changed")])
            break
        except Back:
            say("  This is the first question.")
    if how == "pick":
        flow.scripted(a)
    return a


def _who_and_why(a: Answers, draft: Draft) -> tuple[str, str] | None:
    """Who makes the revision and why; None when the person went back (to the review)."""
    from wizard.ask import Back, ask

    say()
    say("── who and why " + "─" * max(_rule_width() - 15, 4), wrap=False)
    questions = list(flow.REVISION_QUESTIONS)
    i = 0
    while i < len(questions):
        q = questions[i]
        if q.key in a.asked:
            i += 1
            continue
        if q.key == "revision.by" and not a.has(q.key) and a.get("sheet.prepared_by"):
            a.set(q.key, a.get("sheet.prepared_by"))
        try:
            flow.record(q, a, ask(q, a, say))
        except Back:
            if i == 0:
                flow.go_back(a)  # back into the questions: the last one is asked again, then the review
                return None
            i -= 1
            a.unmark(questions[i].key)
            continue
        draft.save(a)
        i += 1
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
            unchanged = type(value) is int and value == target.get("revision", 0)  # (True == 1 in Python)
            if (section, name) == ("sheet", "revision") and not unchanged:
                raise InputError("sheet.revision", f"is set by relaywright revise, which bumps it; leave it out of "
                                                   f"the answers file (got {one_line(value)})")
            if (section, name) != ("sheet", "history"):
                target[name] = value
    return by.strip(), reason.strip()


def next_revision(data: dict, by: str, reason: str) -> dict:
    """Bump the revision, date it today, set it back to draft with its sign-off cleared, add its line of history."""
    sheet = data["sheet"]
    rev = int(sheet.get("revision", 0)) + 1
    sheet["revision"] = rev
    sheet["date"] = sheet.get("date") or flow.today()
    sheet["status"] = "draft"
    for name in SIGN_OFF:
        sheet.pop(name, None)
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


def revised_text(path: Path, text: str, new_data: dict) -> str:
    """The next revision's text: ``text`` with only the changed values, removed keys and the history row changed
    (comments, key order and layout kept); checked like a file read back, never older than the file it replaces."""
    from wizard.edit_file import edited

    new_text = edited(text, new_data)
    case_from_dict(parse_toml(new_text, str(path)))  # never write what could not be read back
    new_rev, old_rev = new_data["sheet"]["revision"], file_revision(path)
    if old_rev is not None and old_rev > new_rev:
        raise InputError(str(path), f"holds revision {old_rev}, newer than the revision {new_rev} being written; "
                                    "nothing was written")
    return new_text


def _sign_off_note(old_sheet: dict, old_rev: int) -> str:
    names = [f"{what} by {old_sheet[key]}" for key, what in (("checked_by", "checked"), ("approved_by", "approved"))
             if old_sheet.get(key)]
    status = old_sheet.get("status", "draft")
    if not names and status == "draft":
        return ""
    was = f"revision {old_rev} was {' and '.join(names) if names else status}"
    return (f"The new revision is a draft ({was}): nobody has checked or approved it yet, so its sign-off is "
            "cleared; it needs checking and approval before use.")


def _finish_revise(path: Path, text: str, old_case, old_warnings, a: Answers, by: str, reason: str,
                   draft: Draft | None) -> int:
    from machines.compare import compare
    from machines.study import run_study
    from reports.changes import format_changes

    old_rev = old_case.sheet.revision
    new_data = next_revision(flow.machine_data(a), by, reason)
    new_case, new_warnings = case_from_dict(new_data)
    new_text = revised_text(path, text, new_data)
    changes = compare(old_case, run_study(old_case, old_warnings), new_case, run_study(new_case, new_warnings),
                      labels=flow.input_labels(new_case.machine.kind))
    say()
    say(f"What changed from revision {old_rev} to {old_rev + 1}:")
    for line in format_changes(changes):
        say(f"  {line}")
    for w in new_warnings:
        say(f"  ! {w}")
    note = _sign_off_note(parse_toml(text).get("sheet", {}), old_rev)
    if note:
        say(f"  {note}")
    if draft is not None:
        from wizard.ask import Back, confirm

        while True:
            try:
                go = confirm(f"Write revision {old_rev + 1} to {path}? (revision {old_rev} is kept beside it)",
                             default=True)
                break
            except Back:
                say("  (n and Enter stops here and keeps the draft; you can continue with 'relaywright revise')")
            except (KeyboardInterrupt, EOFError):
                return _interrupted(draft, a)
        if not go:
            _kept(draft, a)
            return EXIT_OK
    kept = keep_previous(path, text, old_rev)
    write_atomic(path, new_text)
    say(f"Revision {old_rev} kept as {kept}")
    if draft is not None:
        draft.remove()
    return _written(path, new_data)
