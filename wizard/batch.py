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

Only regular files are read (a pipe or a device named ``*.toml`` is skipped and reported, never opened), each
with a size limit checked before reading. A re-run is cheap: ``OUT/.relaywright-batch.json`` remembers, for each
machine file, the SHA-256 of its bytes, the tool that studied it, the outputs it got and its outcome; a file whose
bytes and tool are unchanged and whose outputs are still there as written is reported as current without being
parsed or validated again, and the index is rebuilt only when a line of it changed.

A worker that dies (killed, out of memory) loses only the file it held: that file is tried once more in a new
worker, and reported as bad input if it dies again; every other file is done.

Exit code: the worst outcome (0 ok or warnings, 1 a failed check, 2 bad input, or an output that could not be
written).
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import os
import re
import signal
import stat
import time
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

MACHINE_FORMAT_PREFIX = "relaywright.machine"
INDEX_NAME = "index"  #: the index PDF is OUT/index.pdf; no machine file takes that name
CACHE_NAME = ".relaywright-batch.json"  #: what the last run did, for the next one (hidden, in OUT)
CACHE_FORMAT = "relaywright.batch-cache/1"
TRIES = 2  #: a file whose worker dies is tried once more
TAG_BYTES, PATH_BYTES = 80, 60  #: parts of a disambiguated output name (file systems allow 255 bytes)

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
    sha256: str = ""  #: of the machine file's bytes, for the next run


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
    sha256: str = ""  #: of the machine file's bytes (studied files only)

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
    files were found in; ``index`` is reserved for the batch index. A long tag or path is shortened (with a digest
    of what was cut, so shortened names stay apart); the revision is never cut.

    >>> output_names([("a.toml", "M-1", 2), ("b/c.toml", "M-1", 2), ("d.toml", "M-1", 3)])
    {'a.toml': 'M-1-rev2--a', 'b/c.toml': 'M-1-rev2--b_c', 'd.toml': 'M-1-rev3'}
    >>> output_names([("a.toml", "P-101/A", 1), ("b.toml", "P-101 A", 1)])
    {'a.toml': 'P-101_A-rev1--a', 'b.toml': 'P-101_A-rev1--b'}
    """
    from machines.files import safe_file_stem, sheet_stem

    def rev_of(revision) -> int:
        return revision if isinstance(revision, int) and not isinstance(revision, bool) else 0

    base = {}
    for path, tag, revision in items:
        base[path] = sheet_stem(tag, rev_of(revision)) if tag else safe_file_stem(Path(path).stem, "machine")
    counts: dict[str, int] = {}
    for name in base.values():
        counts[name.lower()] = counts.get(name.lower(), 0) + 1
    counts[INDEX_NAME] = counts.get(INDEX_NAME, 0) + 1
    names, taken = {}, set()
    tags = {path: (tag, revision) for path, tag, revision in items}
    for path, name in base.items():
        if counts[name.lower()] > 1:
            tag, revision = tags[path]
            where = safe_file_stem(Path(path).with_suffix("").as_posix(), "file", PATH_BYTES)
            head = (f"{safe_file_stem(tag, 'sheet', TAG_BYTES)}-rev{rev_of(revision)}" if tag
                    else safe_file_stem(Path(path).stem, "machine", TAG_BYTES))
            name = f"{head}--{where}"
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


def _mentions_machine(raw: bytes) -> bool:
    """Whether a file that cannot be read as TOML still looks like a machine file (its format key or [machine])."""
    head = raw[:65536]
    return MACHINE_FORMAT_PREFIX.encode() in head or re.search(rb"(?m)^\s*\[machine\]", head) is not None


def _not_regular(path: Path) -> str:
    """Why ``path`` is not read (a pipe, a device, a link to nothing), or '' for a regular file."""
    try:
        st = os.stat(path)
    except FileNotFoundError:
        return "a symbolic link to nothing" if path.is_symlink() else "gone while the folder was read"
    except OSError as e:
        return f"cannot be looked at ({e.strerror or e})"
    if stat.S_ISREG(st.st_mode):
        return ""
    kinds = ((stat.S_ISFIFO, "a named pipe (FIFO)"), (stat.S_ISCHR, "a device"), (stat.S_ISBLK, "a device"),
             (stat.S_ISSOCK, "a socket"), (stat.S_ISDIR, "a folder"))
    return next((name for test, name in kinds if test(st.st_mode)), "not a regular file")


def plan_batch(directory: Path, output: Path, force: bool = False, cache: dict | None = None) -> Plan:
    """Read every TOML file under ``directory`` once and decide what each becomes.

    A file whose bytes the cache in ``output`` knows (same SHA-256, same tool) is not parsed again: its tag and
    revision come from the cache, and when its outputs are still as they were written it is settled as current.
    """
    from machines.errors import InputError
    from machines.files import MAX_FILE_BYTES, parse_toml, read_bytes

    plan = Plan()
    machines = []
    cache = {} if force else _cache_files(read_cache(output) if cache is None else cache)
    known: dict[str, dict] = {}
    for path in find_toml(directory):
        shown = path.relative_to(directory).as_posix()
        why = _not_regular(path)
        if why:
            plan.settled.append(Outcome(shown, "skipped", f"not read: {why}; only regular files are read"))
            continue
        try:
            raw = read_bytes(path, "a machine file (.toml)", MAX_FILE_BYTES)
        except InputError as e:
            plan.settled.append(Outcome(shown, "bad", e.detail))
            continue
        sha = hashlib.sha256(raw).hexdigest()
        entry = cache.get(shown)
        if entry is not None and entry.get("sha256") == sha:
            known[shown] = entry
            machines.append((shown, None, entry.get("tag", ""), entry.get("revision", 0), sha))
            continue
        try:
            text = raw.decode("utf-8-sig")
        except UnicodeDecodeError as e:
            text, detail = None, f"expected UTF-8 text, got a byte that is not UTF-8 at position {e.start}"
        try:
            if text is None:
                raise InputError(shown, detail)
            data = parse_toml(text, shown)
        except InputError as e:  # not UTF-8 or not TOML: whose file is it?
            if _mentions_machine(raw):
                plan.settled.append(Outcome(shown, "bad", e.detail))  # the file is named in its own column
            else:
                plan.settled.append(Outcome(shown, "skipped", f"not a machine file ({e.detail})"))
            continue
        if not is_machine_data(data):
            plan.settled.append(Outcome(shown, "skipped", "no format = \"relaywright.machine/1\""))
            continue
        sheet = data.get("sheet") if isinstance(data.get("sheet"), dict) else {}
        tag = sheet.get("tag") if isinstance(sheet.get("tag"), str) else ""
        machines.append((shown, data, tag, sheet.get("revision", 0), sha))
    machines, older = _latest_revisions(machines)
    plan.settled += older
    names = output_names([(p, tag, rev) for p, _, tag, rev, _ in machines])
    for p, data, tag, _, sha in machines:
        entry = known.get(p)
        if entry is not None:
            current = _cached_outcome(entry, names[p], output)
            if current is not None:
                plan.settled.append(current)
                continue
            if data is None:  # known bytes, but its outputs changed or its name did: read it after all
                try:
                    data = parse_toml(read_bytes(directory / p).decode("utf-8-sig"), p)
                except (InputError, UnicodeDecodeError) as e:  # changed since it was hashed a moment ago
                    plan.settled.append(Outcome(p, "bad", getattr(e, "detail", str(e)), tag=tag))
                    continue
        plan.tasks.append(Task(p, data, names[p], str(output), force, tag, sha256=sha))
    return plan


def _latest_revisions(machines: list[tuple]) -> tuple[list[tuple], list[Outcome]]:
    """Keep the newest revision of each tag; an earlier one (``relaywright revise`` keeps ``<name>.rev<N>.toml``
    beside the file) is reported as skipped, and its sheet, if OUT has it, stays there."""
    newest: dict[str, tuple[int, str]] = {}
    for path, _, tag, rev, _ in machines:
        if tag and isinstance(rev, int) and not isinstance(rev, bool) and rev > newest.get(tag, (-1, ""))[0]:
            newest[tag] = (rev, path)
    keep, older = [], []
    for item in machines:
        path, _, tag, rev, _ = item
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
    if old is not None and old.get("tag") == case.sheet.tag and old.get("revision") == case.sheet.revision:
        same = old.get("inputs_fingerprint") == fingerprint
        if same and pdf.is_file() and not task.force:
            return _outcome(task, old, current=True)
        issued = isinstance(old.get("sheet"), dict) and old["sheet"].get("status") == "issued"
        if not same and issued:
            raise InputError("sheet.revision", f"revision {case.sheet.revision} of {case.sheet.tag} was issued with "
                             f"other inputs ({record_path.name}); raise sheet.revision for the new inputs; "
                             "nothing was written")

    from machines.study import run_study
    from reports.existing import refuse_to_replace, refuse_to_replace_record
    from reports.sheet import build_sheet

    record = run_study(case, warnings)
    data = record.to_json()
    text = dumps_json(data, indent=None) + "\n"  # compact, as ``settings --json`` prints it: other programs read it
    sheet = build_sheet(record)
    refuse_to_replace(pdf, sheet)  # a signed or issued sheet, or another machine's, is never overwritten
    refuse_to_replace_record(record_path, case.sheet.tag, text)
    write_atomic(pdf, sheet, follow_symlinks=False)
    write_atomic(record_path, text, follow_symlinks=False)  # last: a record always stands beside its sheet
    return _outcome(task, data, current=False)


def validated(task: Task) -> Task:
    """The task with its machine data validated here (in the main process, while the workers draw).

    Workers then receive the validated case and never build a units registry of their own.
    """
    from machines.errors import InputError
    from machines.files import case_from_dict

    if task.case is not None or task.error or task.data is None:  # validated already (a task tried again)
        return task
    try:
        case, warnings = case_from_dict(task.data)
    except InputError as e:
        return dataclasses.replace(task, data=None, error=str(e))
    except Exception:  # left for the worker, which reports it as this file's failure
        return task
    return dataclasses.replace(task, data=None, case=case, warnings=tuple(warnings))


def _read_record(path: Path) -> dict | None:
    from reports.existing import read_record

    return read_record(path)


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
                   warnings=warnings, failures=failures, sha256=task.sha256)


# ---------------------------------------------------------------------------------------------------- the cache


@lru_cache(maxsize=1)
def tool_identity() -> str:
    """What a cached outcome was made by: the version and a digest of the code that studies and draws (so an
    edited checkout counts as another tool)."""
    from wizard import __version__

    h = hashlib.sha256(__version__.encode())
    root = Path(__file__).resolve().parent.parent
    for package in ("machines", "reports", "wizard"):
        for path in sorted((root / package).rglob("*")):
            if path.suffix in (".py", ".ttf", ".otf", ".md") and path.is_file():
                h.update(path.relative_to(root).as_posix().encode())
                h.update(path.read_bytes())
    return f"{__version__}+{h.hexdigest()[:16]}"


def read_cache(output: Path) -> dict:
    """The previous run's cache document (``files`` by machine file, ``index``), or {} when there is none, it was
    made by another tool, or it cannot be read."""
    from machines.errors import InputError
    from machines.files import read_bytes

    path = output / CACHE_NAME
    if not path.is_file():
        return {}
    try:
        data = json.loads(read_bytes(path, "a batch cache", limit=100_000_000))
    except (InputError, ValueError, RecursionError):
        return {}
    if not isinstance(data, dict) or data.get("format") != CACHE_FORMAT or data.get("tool") != tool_identity():
        return {}
    return data


def _cache_files(doc: dict) -> dict[str, dict]:
    files = doc.get("files")
    return {k: v for k, v in files.items() if isinstance(v, dict)} if isinstance(files, dict) else {}


def _stat_of(path: Path) -> list[int] | None:
    try:
        st = os.lstat(path)
    except OSError:
        return None
    return [st.st_size, st.st_mtime_ns] if stat.S_ISREG(st.st_mode) else None


def _cached_outcome(entry: dict, name: str, output: Path) -> Outcome | None:
    """The cached outcome, marked current, when its outputs are still there as written under the same name."""
    outcome = entry.get("outcome")
    if entry.get("name") != name or not isinstance(outcome, dict):
        return None
    for ext in ("pdf", "json"):
        written = entry.get(ext)
        if written is None or _stat_of(output / f"{name}.{ext}") != written:
            return None
    try:
        o = Outcome(**outcome)
    except TypeError:
        return None
    return dataclasses.replace(o, current=True, name=name) if o.status in ("ok", "warn", "fail") else None


def _save_cache(outcomes: list[Outcome], output: Path, index: dict | None) -> None:
    """Remember what this run did (best effort: a folder that cannot take it only costs the next run time)."""
    from machines.errors import InputError
    from machines.files import write_atomic

    files = {}
    for o in outcomes:
        if o.status not in ("ok", "warn", "fail") or not o.sha256 or not o.name:
            continue
        stats = {ext: _stat_of(output / f"{o.name}.{ext}") for ext in ("pdf", "json")}
        if None in stats.values():
            continue
        kept = {k: v for k, v in dataclasses.asdict(o).items() if k != "current"}
        files[o.path] = {"sha256": o.sha256, "tag": o.tag, "revision": o.revision, "name": o.name,
                         "outcome": kept, **stats}
    data = {"format": CACHE_FORMAT, "tool": tool_identity(), "files": files, "index": index}
    try:
        write_atomic(output / CACHE_NAME, json.dumps(data, separators=(",", ":"), ensure_ascii=True),
                     follow_symlinks=False)
    except InputError:
        pass


# ---------------------------------------------------------------------------------------------------- the batch


def run_batch(directory: Path, output: Path, workers: int | None = None, force: bool = False) -> int:
    """Process every machine file under ``directory`` into ``output``; print progress and a summary.

    Returns the exit code: the worst outcome (0 ok or warnings, 1 a failed check, 2 bad input or an output that
    could not be written).
    """
    from machines.errors import InputError

    directory, output = Path(directory), Path(output)
    if not directory.is_dir():
        raise InputError(str(directory), "expected a folder of machine files, got "
                                         + ("a file" if directory.exists() else "nothing (no such folder)"))
    if output.exists() and not output.is_dir():
        raise InputError(str(output), "expected a folder for the sheets, got an existing file")
    started = time.perf_counter()
    cache = {} if force else read_cache(output)
    plan = plan_batch(directory, output, force, cache)
    if not plan.tasks and not plan.settled:
        raise InputError(str(directory), "no .toml files found (machine files have format = "
                                         "\"relaywright.machine/1\")")
    try:
        output.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise InputError(str(output), f"cannot make the folder for the sheets ({e.strerror or e}); nothing was "
                                      "written") from None
    finished: list[Outcome] = []
    try:
        _run_tasks(plan.tasks, workers, finished.append)
    except KeyboardInterrupt:
        _say_interrupted(len(finished), len(plan.tasks), output)
        raise
    outcomes = list(plan.settled) + finished
    elapsed = time.perf_counter() - started
    index, index_error, index_key = None, "", _index_key(outcomes)
    try:
        index = _write_index(outcomes, output, cache.get("index") if not force else None, index_key)
    except InputError as e:  # a read-only folder, a full disk: the summary below still says what became of each
        index_error = str(e)
    _save_cache(outcomes, output, {"key": index_key, "stat": _stat_of(output / f"{INDEX_NAME}.pdf")}
                if index is not None else None)
    print_summary(outcomes, output, index, elapsed, index_error)
    worst = max((o.exit_code for o in outcomes), default=0)
    return max(worst, 2) if index_error else worst


def _run_tasks(tasks: list[Task], workers: int | None, collect) -> None:
    """Run the tasks with a progress bar, handing each outcome to ``collect`` as it comes.

    One worker (or one task) runs in this process; more run in ``spawn`` worker processes.
    """
    if not tasks:
        return
    from rich.console import Console
    from rich.progress import (BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn,
                               TimeRemainingColumn)

    from machines.errors import printable

    n = max(1, min(workers or os.cpu_count() or 1, len(tasks)))
    columns = (TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(), TimeElapsedColumn(),
               TextColumn("left"), TimeRemainingColumn(), TextColumn("{task.fields[last]}", style="dim",
                                                                    markup=False))
    with Progress(*columns, console=Console(stderr=True), transient=False) as progress:
        bar = progress.add_task(f"sheets ({n} worker{'s' if n > 1 else ''})", total=len(tasks), last="")

        def done(outcome: Outcome) -> None:
            collect(outcome)
            progress.update(bar, advance=1, last=printable(outcome.path))

        if n == 1:
            for task in tasks:
                done(process_machine(task))
        else:
            _run_pool(tasks, n, done)


def _say_interrupted(done: int, total: int, output: Path) -> None:
    from rich.console import Console
    from rich.text import Text

    from machines.errors import printable

    Console(stderr=True, highlight=False).print(Text(
        f"stopped: {done} of {total} machine files were done; their sheets and records in {printable(output)} are "
        "complete, "
        "nothing else was written or changed (the index was not updated)"))


def _worker(conn, job) -> None:
    """A worker process: take one task at a time from ``conn``, send back its outcome; ``None`` ends it."""
    _init_worker()
    while True:
        try:
            task = conn.recv()
        except (EOFError, OSError):
            return
        if task is None:
            return
        conn.send(job(task))


def _run_pool(tasks: list[Task], n: int, done, job=process_machine) -> None:
    """Run ``job`` over ``tasks`` in ``n`` spawn worker processes, handing each outcome to ``done``.

    Each worker holds one task at a time, so when one dies (killed, out of memory) exactly the task it held is
    known: that task is given to a new worker once more, and reported as bad input if it dies again. A worker that
    dies holding nothing loses nothing. Every task gets exactly one outcome.
    """
    import multiprocessing
    from multiprocessing.connection import wait

    mp = multiprocessing.get_context("spawn")
    pending = list(reversed(tasks))  # popped from the end: the order given
    tries: dict[str, int] = {}
    held: dict[Any, list] = {}  # connection -> [process, task or None]

    def start():
        # Workers start with Ctrl-C ignored (an ignored SIGINT is inherited and kept by a new interpreter), so one
        # pressed while they import never prints a traceback from a worker; this process takes it.
        parent, child = mp.Pipe()
        previous = signal.signal(signal.SIGINT, signal.SIG_IGN)
        try:
            proc = mp.Process(target=_worker, args=(child, job), daemon=True)
            proc.start()
        finally:
            signal.signal(signal.SIGINT, previous)
        child.close()
        held[parent] = [proc, None]
        return parent

    def give(conn) -> None:
        """The next task to an idle live worker; when none is left, tell the worker to stop."""
        if not pending:
            _stop(conn)
            return
        task = validated(pending.pop())  # validated here, while the other workers draw
        tries[task.path] = tries.get(task.path, 0) + 1
        held[conn][1] = task
        try:
            conn.send(task)
        except OSError:  # it died just now: the task goes back, and the try is not counted
            tries[task.path] -= 1
            held[conn][1] = None
            pending.append(task)
            lost(conn)
            return
        # the next tasks are validated now, while the workers draw, so that a worker that finishes is given its
        # next task at once
        for k in range(1, min(n, len(pending)) + 1):
            pending[-k] = validated(pending[-k])

    def _stop(conn) -> None:
        proc, _ = held.pop(conn)
        try:
            conn.send(None)
        except OSError:
            pass
        conn.close()
        proc.join(timeout=5)

    def lost(conn) -> None:
        """A worker died: only the task it held is lost; it is tried once more, in a new worker."""
        proc, task = held.pop(conn)
        conn.close()
        proc.join(timeout=5)
        if task is not None:
            if tries[task.path] < TRIES:
                pending.append(task)
            else:
                _remove_partial_writes([task])
                done(Outcome(task.path, "bad", f"the worker process stopped while studying this file, {TRIES} "
                                               "times (killed, or out of memory?); nothing was written for it",
                             tag=task.tag))
        if pending and len(held) < n:
            give(start())

    try:
        for _ in range(n):
            start()
        for conn in list(held):
            give(conn)
        while held:
            by_sentinel = {held[c][0].sentinel: c for c in held}
            for ready in wait(list(held) + list(by_sentinel)):
                conn = by_sentinel.get(ready, ready)
                if conn not in held:
                    continue
                outcome = None
                try:
                    if conn.poll():
                        outcome = conn.recv()
                except (EOFError, OSError):
                    outcome = None
                if outcome is not None:
                    held[conn][1] = None
                    done(outcome)
                    if held[conn][0].is_alive():
                        give(conn)
                    else:
                        lost(conn)
                elif not held[conn][0].is_alive():
                    lost(conn)
    except BaseException:  # Ctrl-C or a failure here: stop the workers (at once) before anything else
        for proc, _ in list(held.values()):
            proc.terminate()
        for conn, (proc, _) in list(held.items()):
            proc.join(timeout=5)
            conn.close()
        _remove_partial_writes(tasks)
        raise


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


def _index_rows(outcomes: list[Outcome]):
    from reports.index import IndexRow

    return [IndexRow(path=o.path, status=o.status, tag=o.tag, description=o.description, revision=o.revision,
                     warnings=o.warnings, failures=o.failures, fingerprint=o.fingerprint,
                     sheet=f"{o.name}.pdf" if o.fingerprint else "", message=o.message)
            for o in sorted(outcomes, key=lambda o: (o.tag or "~", o.path)) if o.status not in ("skipped", "older")]


def _index_key(outcomes: list[Outcome]) -> str:
    """A digest of what the index would print: the same key, the same index."""
    rows = [dataclasses.astuple(r) for r in _index_rows(outcomes)]
    studied = sorted({(o.site, o.page_size) for o in outcomes if o.fingerprint})
    text = json.dumps([rows, studied], ensure_ascii=True, default=str)
    return hashlib.sha256(text.encode("ascii")).hexdigest()


def _write_index(outcomes: list[Outcome], output: Path, cached: dict | None = None, key: str = "") -> Path | None:
    """Write OUT/index.pdf: one line per machine file (the files that are not machines left out). Not written
    again when the cache says the index there already prints these lines."""
    from machines.files import write_atomic
    from reports.index import build_index

    rows = _index_rows(outcomes)
    if not rows:
        return None
    path = output / f"{INDEX_NAME}.pdf"
    if cached and key and cached.get("key") == key and cached.get("stat") == _stat_of(path):
        return path
    studied = [o for o in outcomes if o.fingerprint]
    sites = {o.site for o in studied}
    letter = bool(studied) and all(o.page_size == "letter" for o in studied)
    pdf = build_index(rows, page_size="letter" if letter else "A4", site=sites.pop() if len(sites) == 1 else "")
    _refuse_to_replace_index(path)
    write_atomic(path, pdf, follow_symlinks=False)
    return path


def _refuse_to_replace_index(path: Path) -> None:
    """OUT/index.pdf is replaced only when it is a relaywright index (a file of another kind there is kept)."""
    from machines.errors import InputError
    from reports.existing import is_signed
    from reports.index import TITLE

    try:
        st = os.lstat(path)
    except FileNotFoundError:
        return
    if not stat.S_ISREG(st.st_mode):
        raise InputError(str(path), "is not a regular file; the index was not written")
    with open(path, "rb") as fh:
        old = fh.read(4_000_000)
    title = TITLE.replace("(", "\\(").replace(")", "\\)").encode("latin-1")
    if old and (is_signed(old) or (b"/Title (" + title not in old and TITLE.encode("utf-16-be") not in old)):
        raise InputError(str(path), "holds a file that is not a relaywright batch index, which is not replaced; "
                                    "the index was not written")


def summary_rows(outcomes: list[Outcome]) -> list[tuple[str, str, str, str, str]]:
    """Rows of the summary table: (file, tag, outcome, findings, sheet or error), problems last; every cell safe
    to print (control characters in file names and tags escaped)."""
    from machines.errors import printable
    from reports.index import findings_text

    rows = []
    for o in sorted(outcomes, key=lambda o: (OUTCOMES[o.status][2], o.path)):
        word = OUTCOMES[o.status][0] + (" (already current)" if o.current else "")
        findings = findings_text(o.warnings, o.failures) if o.fingerprint else ""
        detail = o.message if o.status in ("bad", "older", "skipped") else f"{o.name}.pdf" if o.name else ""
        rows.append(tuple(printable(x) for x in (o.path, o.tag, word, findings, detail)))
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


PLAIN_SUMMARY_ROWS = 200  #: above this many files the summary is printed as plain columns


def plain_table(header: tuple[str, ...], rows: list[tuple[str, ...]], title: str) -> str:
    """The rows in aligned columns under a title and a rule, the last column as long as it is.

    >>> print(plain_table(("file", "tag"), [("a.toml", "P-1"), ("bb.toml", "P-22")], "T"))
    T
    file     tag
    ───────  ────
    a.toml   P-1
    bb.toml  P-22
    """
    widths = [min(max([len(h)] + [len(r[i]) for r in rows]), 40) for i, h in enumerate(header[:-1])]
    widths.append(max([len(header[-1])] + [len(r[-1]) for r in rows]))

    def line(cells) -> str:
        return "  ".join(c.ljust(w) for c, w in zip(cells[:-1], widths)) + "  " + cells[-1]

    out = [title, line(header).rstrip(), "  ".join("─" * w for w in widths)]
    out += [line(r).rstrip() for r in rows]
    return "\n".join(out)


def print_summary(outcomes: list[Outcome], output: Path, index: Path | None, elapsed: float,
                  index_error: str = "") -> None:
    """The summary table on stdout, then the totals and where the files are."""
    from rich import box
    from rich.console import Console
    from rich.table import Table
    from rich.text import Text

    from machines.errors import printable

    styles = {"ok": "", "warn": "yellow", "fail": "bold red", "bad": "bold red", "skipped": "dim", "older": "dim"}
    con = Console(highlight=False)
    rows = summary_rows(outcomes)
    if len(rows) > PLAIN_SUMMARY_ROWS:  # a large batch: plain columns (a rich table takes ~1 ms a row to lay out)
        print(plain_table(("file", "tag", "outcome", "findings", "sheet / error"), rows, "Batch summary"))
    else:
        table = Table(title="Batch summary", title_justify="left", box=box.SIMPLE_HEAD, pad_edge=False,
                      collapse_padding=True)
        for name in ("file", "tag", "outcome", "findings", "sheet / error"):
            table.add_column(name, overflow="fold")
        ordered = sorted(outcomes, key=lambda o: (OUTCOMES[o.status][2], o.path))
        for o, row in zip(ordered, rows):
            style = styles[o.status]
            table.add_row(*(Text(cell, style=style if i == 2 else "") for i, cell in enumerate(row)))
        con.print(table)
    con.print(Text(summary_line(outcomes)))
    built = sum(1 for o in outcomes if o.fingerprint and not o.current)
    where = printable(output)
    con.print(Text(f"{built} sheet{'s' if built != 1 else ''} written to {where} in {elapsed:.1f} s"
                   + (f"; index: {printable(index)}" if index else "")))
    if index_error:
        con.print(Text(f"index not written: {index_error}", style="bold red"))
