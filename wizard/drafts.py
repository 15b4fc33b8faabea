"""Drafts: the answers of an unfinished interview, saved after every question, so no work is ever lost.

A draft is a small TOML file beside the machine file it will become, ``.relaywright-draft-<name>.toml``
(format ``relaywright.draft/1``). It holds what the interview needs to continue: the command (``new`` or
``revise``), the machine file to write, the answers as written, the flow's own yes/no answers and the list of keys
already answered. It is written atomically (temporary file and rename), so a closed terminal in the middle of a
save leaves the previous draft whole.
"""

from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass, field
from pathlib import Path

from machines.errors import InputError
from machines.files import parse_toml, read_text, write_atomic
from wizard.flow import Answers

FORMAT = "relaywright.draft/1"
PREFIX = ".relaywright-draft-"


@dataclass
class Draft:
    """Where an interview's answers are saved, and what it is for."""

    path: Path
    command: str  #: "new" or "revise"
    output: Path | None  #: machine file to write (None until known)
    saved: str = field(default="", compare=False)  #: when it was last saved (UTC, ISO form), as read back

    def save(self, answers: Answers) -> None:
        """Write the answers so far (atomically)."""
        import tomli_w

        doc = {
            "format": FORMAT,
            "command": self.command,
            "saved": _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
            "asked": list(answers.asked),
            "flow": dict(answers.flow),
            "answers": answers.data,
        }
        if self.output is not None:
            doc["output"] = str(self.output)
        write_atomic(self.path, "# relaywright: answers of an unfinished interview; continue it with\n"
                                f"#   relaywright {_resume_hint(self)}\n" + tomli_w.dumps(doc))

    def remove(self) -> None:
        try:
            self.path.unlink()
        except FileNotFoundError:
            pass


def _resume_hint(d: Draft) -> str:
    if d.command == "revise" and d.output is not None:
        return f"revise {d.output}"
    return f"new --resume {d.path}"


def draft_path(folder: Path, name: str) -> Path:
    """The draft file for a machine file named ``name`` (or a timestamp) in ``folder``."""
    safe = "".join(c if c.isalnum() or c in "-_." else "-" for c in name)[:80] or "machine"
    return folder / f"{PREFIX}{safe}.toml"


def timestamp_name() -> str:
    return _dt.datetime.now(_dt.timezone.utc).strftime("%Y%m%d-%H%M%S")


def free_draft_path(folder: Path, name: str) -> Path:
    """A draft path that does not hold an earlier draft (``name``, then ``name-2``, ``name-3``, ...)."""
    path, n = draft_path(folder, name), 2
    while path.exists():
        path, n = draft_path(folder, f"{name}-{n}"), n + 1
    return path


def load_draft(path: str | Path) -> tuple[Draft, Answers]:
    """Read a draft written by :meth:`Draft.save`; raise InputError naming what is wrong."""
    p = Path(path)
    doc = parse_toml(read_text(p), str(p))
    if doc.get("format") != FORMAT:
        raise InputError(str(p), f"expected a relaywright draft (format \"{FORMAT}\"), got "
                                 f"{doc.get('format')!r}; a machine file is continued with 'relaywright revise'")
    answers, flow, asked = doc.get("answers", {}), doc.get("flow", {}), doc.get("asked", [])
    command = doc.get("command", "new")
    if not (isinstance(answers, dict) and isinstance(flow, dict) and isinstance(asked, list)
            and all(isinstance(k, str) for k in asked) and command in ("new", "revise")
            and all(isinstance(v, dict) for k, v in answers.items() if k != "format")):  # sections are tables
        raise InputError(str(p), "the draft is damaged (answers, flow or asked has the wrong shape)")
    output, saved = doc.get("output"), doc.get("saved")
    draft = Draft(path=p, command=command, output=Path(output) if isinstance(output, str) else None,
                  saved=saved if isinstance(saved, str) else "")
    return draft, Answers(data=answers, flow=flow, asked=list(asked))


def find_drafts(folder: Path, command: str) -> list[tuple[Draft, Answers]]:
    """The readable drafts of ``command`` in ``folder`` (hidden files ``ls`` does not show), latest first."""
    found = []
    for path in sorted(Path(folder).glob(f"{PREFIX}*.toml")):
        try:
            draft, answers = load_draft(path)
        except InputError:  # a damaged or foreign file is not offered (and never touched)
            continue
        if draft.command == command:
            found.append((draft, answers))
    return sorted(found, key=lambda da: da[0].saved, reverse=True)


def describe(draft: Draft, answers: Answers) -> str:
    """One line naming a draft: its file, the machine's tag, how many answers, when it was saved.

    >>> describe(Draft(Path(".relaywright-draft-m.toml"), "new", None, "2026-11-20T10:15:00Z"),
    ...          Answers(data={"sheet": {"tag": "CW-P-201"}}, asked=["machine.kind", "sheet.tag"]))
    '.relaywright-draft-m.toml (CW-P-201, 2 answers, saved 2026-11-20 10:15 UTC)'
    """
    tag = answers.get("sheet.tag") or "no tag yet"
    when = f", saved {draft.saved[:10]} {draft.saved[11:16]} UTC" if len(draft.saved) >= 16 else ""
    return f"{draft.path.name} ({tag}, {len(answers.asked)} answers{when})"
