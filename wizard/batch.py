"""`relaywright batch DIR -o OUT`: settings, sheet and JSON record for every machine file under a folder.

The main process finds the files, reads and parses each one once (TOML only: fast, no units registry) to tell
machine files from other TOML and to learn every tag, so that output names can be chosen for the whole batch at
once (two files with the same tag and revision never overwrite each other). Workers in a ``spawn`` process pool
then validate, study and draw one machine each and write its files; the main process shows the progress, prints a
summary table and writes the index PDF.

Output names are ``<tag>-rev<N>.pdf`` and ``<tag>-rev<N>.json`` (the tag made safe for a file name): a new revision
gets new files and the sheets of earlier revisions stay in OUT. A sheet is already current when its JSON record
in OUT has the same inputs fingerprint and revision and the PDF is there; it is kept unless ``--force``. Every
write is atomic (a temporary file and a rename), a machine whose input is bad writes nothing, and an issued sheet
is never replaced by one with other inputs under the same revision. Of several files with one tag, only the newest
revision is built (``relaywright revise`` keeps the earlier revision's file beside the new one).

Exit code: the worst outcome (0 ok or warnings, 1 a failed check, 2 bad input).
"""

from __future__ import annotations

import dataclasses
import os
import re
import signal
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

MACHINE_FORMAT_PREFIX = "relaywright.machine"
INDEX_NAME = "index"  #: the index PDF is OUT/index.pdf; no machine file takes that name

# outcome -> (summary word, exit code, order in the summary: problems last, next to the prompt)
OUTCOMES = {
    "skipped": ("skipped, not a machine file", 0, 0),
    "older": ("skipped, older revision", 0, 0),
    "ok": ("ok", 0, 1),
    "warn": ("warnings", 0, 2),
    "fail": ("failed checks", 1, 3),
    "bad": ("bad input", 2, 4),
}


@dataclass
class Task:
    """One machine file for a worker: its parsed data and the output name chosen for it."""

    path: str  #: as shown to the user (relative to DIR)
    data: dict | None
    name: str  #: output file name without extension
    out: str
    force: bool
    tag: str = ""  #: as the file gives it (unvalidated: for the summary when the file turns out bad)
    case: Any = None  #: the validated MachineCase, when the main process has already validated the data
    warnings: tuple = ()
    error: str = ""  #: the one-line error when validation failed


@dataclass
class Outcome:
    """What became of one file. ``status`` is a key of :data:`OUTCOMES`; ``current`` means kept as it was."""

    path: str
    status: str
    message: str = ""
    name: str = ""
    current: bool = False
    tag: str = ""
    description: str = ""
    site: str = ""
    page_size: str = ""
    revision: int | None = None
    fingerprint: str = ""
    warnings: int = 0
    failures: int = 0

    @property
    def exit_code(self) -> int:
        return OUTCOMES[self.status][1]


@dataclass
class Plan:
    """The files found under DIR: tasks for the workers, and files settled already (bad TOML, not machines)."""

    tasks: list[Task] = field(default_factory=list)
    settled: list[Outcome] = field(default_factory=list)


# ---------------------------------------------------------------------------------------------------- names


def output_names(items: list[tuple[str, str, Any]]) -> dict[str, str]:
    """Output names for ``(path, tag, revision)`` items: ``<tag>-rev<N>``, disambiguated by path on a clash.

    Names are compared without regard to case (some file systems do not tell ``M-1`` from ``m-1``). When two files
    would get the same name, each of them gets its path appended, so the names do not depend on the order the
    files were found in; ``index`` is reserved for the batch index.

    >>> output_names([("a.toml", "M-1", 2), ("b/c.toml", "M-1", 2), ("d.toml", "M-1", 3)])
    {'a.toml': 'M-1-rev2--a', 'b/c.toml': 'M-1-rev2--b_c', 'd.toml': 'M-1-rev3'}
    """
    from machines.files import safe_file_stem

    base = {}
    for path, tag, revision in items:
        rev = revision if isinstance(revision, int) and not isinstance(revision, bool) else 0
        base[path] = safe_file_stem(f"{tag}-rev{rev}") if tag else safe_file_stem(Path(path).stem)
    counts: dict[str, int] = {}
    for name in base.values():
        counts[name.lower()] = counts.get(name.lower(), 0) + 1
    counts[INDEX_NAME] = counts.get(INDEX_NAME, 0) + 1
    names, taken = {}, set()
    for path, name in base.items():
        if counts[name.lower()] > 1:
            name = safe_file_stem(f"{name}--{Path(path).with_suffix('').as_posix()}")
        candidate, i = name, 2
        while candidate.lower() in taken or candidate.lower() == INDEX_NAME:
            candidate, i = f"{name}-{i}", i + 1
        taken.add(candidate.lower())
        names[path] = candidate
    return names


# ---------------------------------------------------------------------------------------------------- finding files


def find_toml(directory: Path) -> list[Path]:
    """Every ``*.toml`` under ``directory`` (recursively, hidden folders left out), in a stable order."""
    found = []
    for root, dirs, files in os.walk(directory):
        dirs[:] = sorted(d for d in dirs if not d.startswith("."))
        found += [Path(root) / f for f in sorted(files) if f.endswith(".toml") and not f.startswith(".")]
    return found


def is_machine_data(data: dict) -> bool:
    """A machine file says so in its ``format`` key (a file with a [machine] table but no format is one too)."""
    fmt = data.get("format")
    if isinstance(fmt, str):
        return fmt.startswith(MACHINE_FORMAT_PREFIX)
    return fmt is None and isinstance(data.get("machine"), dict)


def _mentions_machine(path: Path) -> bool:
    """Whether a file that cannot be read as TOML still looks like a machine file (its format key or [machine])."""
    try:
        with path.open("rb") as fh:
            head = fh.read(65536)
    except OSError:
        return True  # cannot tell: report it rather than pass over it
    return MACHINE_FORMAT_PREFIX.encode() in head or re.search(rb"(?m)^\s*\[machine\]", head) is not None


def plan_batch(directory: Path, output: Path, force: bool = False) -> Plan:
    """Read every TOML file under ``directory`` once and decide what each becomes."""
    from machines.errors import InputError
    from machines.files import parse_toml, read_text

    plan = Plan()
    machines = []
    for path in find_toml(directory):
        shown = path.relative_to(directory).as_posix()
        try:
            data = parse_toml(read_text(path), shown)
        except InputError as e:  # unreadable, too large, not UTF-8 or not TOML: whose file is it?
            if _mentions_machine(path):
                plan.settled.append(Outcome(shown, "bad", e.detail))  # the file is named in its own column
            else:
                plan.settled.append(Outcome(shown, "skipped", f"not a machine file ({e.detail})"))
            continue
        if not is_machine_data(data):
            plan.settled.append(Outcome(shown, "skipped", "no format = \"relaywright.machine/1\""))
            continue
        sheet = data.get("sheet") if isinstance(data.get("sheet"), dict) else {}
        tag = sheet.get("tag") if isinstance(sheet.get("tag"), str) else ""
        machines.append((shown, data, tag, sheet.get("revision", 0)))
    machines, older = _latest_revisions(machines)
    plan.settled += older
    names = output_names([(p, tag, rev) for p, _, tag, rev in machines])
    plan.tasks = [Task(p, data, names[p], str(output), force, tag) for p, data, tag, _ in machines]
    return plan


def _latest_revisions(machines: list[tuple]) -> tuple[list[tuple], list[Outcome]]:
    """Keep the newest revision of each tag; an earlier one (``relaywright revise`` keeps ``<name>.rev<N>.toml``
    beside the file) is reported as skipped, and its sheet, if OUT has it, stays there."""
    newest: dict[str, tuple[int, str]] = {}
    for path, _, tag, rev in machines:
        if tag and isinstance(rev, int) and not isinstance(rev, bool) and rev > newest.get(tag, (-1, ""))[0]:
            newest[tag] = (rev, path)
    keep, older = [], []
    for item in machines:
        path, _, tag, rev = item
        if tag in newest and isinstance(rev, int) and rev < newest[tag][0]:
            older.append(Outcome(path, "older", f"revision {rev}; revision {newest[tag][0]} is in "
                                                f"{newest[tag][1]}", tag=tag, revision=rev))
        else:
            keep.append(item)
    return keep, older


# ---------------------------------------------------------------------------------------------------- one machine


def _init_worker() -> None:
    """Pool workers leave Ctrl-C to the main process, which stops them (and sweeps up) when it is pressed."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)


def process_machine(task: Task) -> Outcome:
    """Study one machine and write its sheet and record (the pool's job; never raises)."""
    from machines.errors import InputError

    try:
        return _process(task)
    except InputError as e:
        return Outcome(task.path, "bad", str(e), tag=task.tag)
    except OSError as e:  # write_atomic leaves the file it was replacing as it was
        return Outcome(task.path, "bad", f"{e.filename or task.out}: cannot write ({e.strerror or e})", tag=task.tag)
    except Exception as e:  # a bug must not stop the other machines, nor print a traceback
        first = str(e).splitlines()[0] if str(e) else ""
        return Outcome(task.path, "bad", f"could not complete ({type(e).__name__}: {first}); nothing was "
                                         "written; please report this with the input file", tag=task.tag)


def _process(task: Task) -> Outcome:
    from machines.errors import InputError
    from machines.files import case_from_dict, write_atomic
    from machines.record import dumps_json, inputs_fingerprint

    out = Path(task.out)
    pdf, record_path = out / f"{task.name}.pdf", out / f"{task.name}.json"
    if task.error:
        return Outcome(task.path, "bad", task.error, tag=task.tag)
    case, warnings = (task.case, list(task.warnings)) if task.case is not None else case_from_dict(task.data)
    fingerprint = inputs_fingerprint(case)
    old = _read_record(record_path)
    if old is not None and old.get("revision") == case.sheet.revision:
        same = old.get("inputs_fingerprint") == fingerprint
        if same and pdf.is_file() and not task.force:
            return _outcome(task, old, current=True)
        issued = isinstance(old.get("sheet"), dict) and old["sheet"].get("status") == "issued"
        if not same and issued:
            raise InputError("sheet.revision", f"revision {case.sheet.revision} of {case.sheet.tag} was issued with "
                             f"other inputs ({record_path.name}); raise sheet.revision for the new inputs; "
                             "nothing was written")

    from machines.study import run_study
    from reports.sheet import build_sheet
    from reports.signing import refuse_to_replace_signed

    record = run_study(case, warnings)
    data = record.to_json()
    text = dumps_json(data, indent=None) + "\n"  # compact: other programs read it (``settings --json`` is pretty)
    sheet = build_sheet(record)
    refuse_to_replace_signed(pdf, sheet)  # a signed sheet in OUT is never overwritten
    write_atomic(pdf, sheet)
    write_atomic(record_path, text)  # last: a record in OUT always stands beside its finished sheet
    return _outcome(task, data, current=False)


def validated(task: Task) -> Task:
    """The task with its machine data validated here (in the main process, while the workers draw).

    Workers then receive the validated case and never build a units registry of their own.
    """
    from machines.errors import InputError
    from machines.files import case_from_dict

    try:
        case, warnings = case_from_dict(task.data)
    except InputError as e:
        return dataclasses.replace(task, data=None, error=str(e))
    except Exception:  # left for the worker, which reports it as this file's failure
        return task
    return dataclasses.replace(task, data=None, case=case, warnings=tuple(warnings))


def _read_record(path: Path) -> dict | None:
    import json

    try:
        data = json.loads(path.read_text("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError):
        return None
    return data if isinstance(data, dict) else None


def _outcome(task: Task, record: dict, current: bool) -> Outcome:
    """The outcome of a studied machine, from its settings record (JSON form)."""
    statuses = [c.get("status") for c in record.get("checks", [])]
    for f in record.get("functions", []):
        statuses += [c.get("status") for c in f.get("checks", [])]
    warnings, failures = statuses.count("warn"), statuses.count("fail")
    sheet = record.get("sheet") if isinstance(record.get("sheet"), dict) else {}
    return Outcome(task.path, "fail" if failures else "warn" if warnings else "ok", name=task.name, current=current,
                   tag=record.get("tag", ""), description=sheet.get("description", ""),
                   site=sheet.get("site", ""), page_size=sheet.get("page_size", ""),
                   revision=record.get("revision"), fingerprint=record.get("inputs_fingerprint", ""),
                   warnings=warnings, failures=failures)


# ---------------------------------------------------------------------------------------------------- the batch


def run_batch(directory: Path, output: Path, workers: int | None = None, force: bool = False) -> int:
    """Process every machine file under ``directory`` into ``output``; print progress and a summary.

    Returns the exit code: the worst outcome (0 ok or warnings, 1 a failed check, 2 bad input).
    """
    from machines.errors import InputError

    directory, output = Path(directory), Path(output)
    if not directory.is_dir():
        raise InputError(str(directory), "expected a folder of machine files, got "
                                         + ("a file" if directory.exists() else "nothing (no such folder)"))
    if output.exists() and not output.is_dir():
        raise InputError(str(output), "expected a folder for the sheets, got an existing file")
    plan = plan_batch(directory, output, force)
    if not plan.tasks and not plan.settled:
        raise InputError(str(directory), "no .toml files found (machine files have format = "
                                         "\"relaywright.machine/1\")")
    output.mkdir(parents=True, exist_ok=True)
    started = time.perf_counter()
    finished: list[Outcome] = []
    try:
        _run_tasks(plan.tasks, workers, finished.append)
    except KeyboardInterrupt:
        _say_interrupted(len(finished), len(plan.tasks), output)
        raise
    outcomes = list(plan.settled) + finished
    elapsed = time.perf_counter() - started
    index = _write_index(outcomes, output)
    print_summary(outcomes, output, index, elapsed)
    return max((o.exit_code for o in outcomes), default=0)


def _run_tasks(tasks: list[Task], workers: int | None, collect) -> None:
    """Run the tasks with a progress bar, handing each outcome to ``collect`` as it comes.

    One worker (or one task) runs in this process; more run in a ``spawn`` pool.
    """
    from rich.console import Console
    from rich.progress import (BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn,
                               TimeRemainingColumn)

    if not tasks:
        return
    n = max(1, min(workers or os.cpu_count() or 1, len(tasks)))
    columns = (TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(), TimeElapsedColumn(),
               TextColumn("left"), TimeRemainingColumn(), TextColumn("{task.fields[last]}", style="dim"))
    with Progress(*columns, console=Console(stderr=True), transient=False) as progress:
        bar = progress.add_task(f"sheets ({n} worker{'s' if n > 1 else ''})", total=len(tasks), last="")

        def done(outcome: Outcome) -> None:
            collect(outcome)
            progress.update(bar, advance=1, last=outcome.path)

        if n == 1:
            for task in tasks:
                done(process_machine(task))
        else:
            _run_pool(tasks, n, done)


def _say_interrupted(done: int, total: int, output: Path) -> None:
    from rich.console import Console
    from rich.text import Text

    Console(stderr=True, highlight=False).print(Text(
        f"stopped: {done} of {total} machine files were done; their sheets and records in {output} are complete, "
        "nothing else was written or changed (the index was not updated)"))


def _run_pool(tasks: list[Task], n: int, done, job=process_machine) -> None:
    """Run ``job`` over ``tasks`` in a spawn pool of ``n`` workers, handing each outcome to ``done``.

    A worker that dies (killed, out of memory) takes its task with it and ``multiprocessing.Pool`` would wait for
    that result forever; so the loop also watches for replaced workers, and each task left without an outcome at
    the end is reported as bad input rather than waited for.
    """
    import multiprocessing

    # Workers start with Ctrl-C ignored (an ignored SIGINT is inherited and kept by a new interpreter), so one
    # pressed while they import never prints a traceback from a worker; this process takes it once they run.
    previous = signal.signal(signal.SIGINT, signal.SIG_IGN)
    try:
        pool = multiprocessing.get_context("spawn").Pool(n, initializer=_init_worker)
    finally:
        signal.signal(signal.SIGINT, previous)
    workers = {p.pid for p in multiprocessing.active_children()}  # the pool starts its workers at once
    finished: set[str] = set()
    lost = 0
    try:
        results = pool.imap_unordered(job, (validated(t) for t in tasks), chunksize=1)
        while len(finished) + lost < len(tasks):
            try:
                outcome = results.next(timeout=0.5)
            except multiprocessing.TimeoutError:
                now = {p.pid for p in multiprocessing.active_children()}
                lost += len(now - workers)  # a new worker replaces one that died with its task
                workers |= now
                continue
            finished.add(outcome.path)
            done(outcome)
    except BaseException:  # Ctrl-C or a failure here: stop the workers (at once) before anything else
        pool.terminate()
        pool.join()
        _remove_partial_writes(tasks)
        raise
    if lost:
        pool.terminate()  # close() would wait for the results that will never come
        pool.join()
        _remove_partial_writes(tasks)
        for task in tasks:
            if task.path not in finished:
                done(Outcome(task.path, "bad", "the worker process stopped while studying this file (killed, or "
                                               "out of memory?); nothing was written for it", tag=task.tag))
        return
    pool.close()
    pool.join()


def _remove_partial_writes(tasks: list[Task]) -> None:
    """Temporary files a stopped worker may have left (``write_atomic`` names them ``.<name>.*.tmp``)."""
    if not tasks:
        return
    out = Path(tasks[0].out)
    for task in tasks:
        for tmp in out.glob(f".{glob_escape(task.name)}.*.tmp"):
            try:
                tmp.unlink()
            except OSError:
                pass


def glob_escape(name: str) -> str:
    """``name`` with glob wildcards escaped (safe names hold none, but say so in code)."""
    return re.sub(r"([*?\[])", r"[\1]", name)


def _write_index(outcomes: list[Outcome], output: Path) -> Path | None:
    """Write OUT/index.pdf: one line per machine file (the files that are not machines left out)."""
    from machines.files import write_atomic
    from reports.index import IndexRow, build_index

    rows = [IndexRow(path=o.path, status=o.status, tag=o.tag, description=o.description, revision=o.revision,
                     warnings=o.warnings, failures=o.failures, fingerprint=o.fingerprint,
                     sheet=f"{o.name}.pdf" if o.fingerprint else "", message=o.message)
            for o in sorted(outcomes, key=lambda o: (o.tag or "~", o.path)) if o.status not in ("skipped", "older")]
    if not rows:
        return None
    studied = [o for o in outcomes if o.fingerprint]
    sites = {o.site for o in studied}
    letter = bool(studied) and all(o.page_size == "letter" for o in studied)
    path = output / f"{INDEX_NAME}.pdf"
    write_atomic(path, build_index(rows, page_size="letter" if letter else "A4",
                                   site=sites.pop() if len(sites) == 1 else ""))
    return path


def summary_rows(outcomes: list[Outcome]) -> list[tuple[str, str, str, str, str]]:
    """Rows of the summary table: (file, tag, outcome, findings, sheet or error), problems last."""
    from reports.index import findings_text

    rows = []
    for o in sorted(outcomes, key=lambda o: (OUTCOMES[o.status][2], o.path)):
        word = OUTCOMES[o.status][0] + (" (already current)" if o.current else "")
        findings = findings_text(o.warnings, o.failures) if o.fingerprint else ""
        detail = o.message if o.status in ("bad", "older") else f"{o.name}.pdf" if o.name else ""
        rows.append((o.path, o.tag, word, findings, detail))
    return rows


def summary_line(outcomes: list[Outcome]) -> str:
    """One sentence of totals, e.g. ``3 machines: 1 ok, 1 with warnings, 1 bad input; 1 file skipped``."""
    count = {s: sum(1 for o in outcomes if o.status == s) for s in OUTCOMES}
    current = sum(1 for o in outcomes if o.current)
    machines = len(outcomes) - count["skipped"] - count["older"]
    parts = [f"{count['ok']} ok", f"{count['warn']} with warnings", f"{count['fail']} with failed checks",
             f"{count['bad']} bad input"]
    line = f"{machines} machine file{'s' if machines != 1 else ''}: " + ", ".join(parts)
    if current:
        line += f"; {current} already current (kept; --force rebuilds them)"
    if count["older"]:
        line += f"; {count['older']} older revision{'s' if count['older'] != 1 else ''} skipped"
    if count["skipped"]:
        line += f"; {count['skipped']} other TOML file{'s' if count['skipped'] != 1 else ''} skipped"
    return line


def print_summary(outcomes: list[Outcome], output: Path, index: Path | None, elapsed: float) -> None:
    """The summary table on stdout, then the totals and where the files are."""
    from rich import box
    from rich.console import Console
    from rich.table import Table
    from rich.text import Text

    styles = {"ok": "", "warn": "yellow", "fail": "bold red", "bad": "bold red", "skipped": "dim", "older": "dim"}
    con = Console(highlight=False)
    table = Table(title="Batch summary", title_justify="left", box=box.SIMPLE_HEAD, pad_edge=False,
                  collapse_padding=True)
    for name in ("file", "tag", "outcome", "findings", "sheet / error"):
        table.add_column(name, overflow="fold")
    by_path = {o.path: o for o in outcomes}
    for row in summary_rows(outcomes):
        style = styles[by_path[row[0]].status]
        table.add_row(*(Text(cell, style=style if i == 2 else "") for i, cell in enumerate(row)))
    con.print(table)
    con.print(Text(summary_line(outcomes)))
    built = sum(1 for o in outcomes if o.fingerprint and not o.current)
    con.print(Text(f"{built} sheet{'s' if built != 1 else ''} written to {output} in {elapsed:.1f} s"
                   + (f"; index: {index}" if index else "")))
