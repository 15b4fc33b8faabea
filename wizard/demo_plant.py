"""`relaywright demo`: the invented demo plant's machine files, their settings records and sheets.

The machine files ship inside the package (they are the repository's examples/ folder). A file already in the
target folder that differs from the shipped one is the user's edited copy: it is kept, never overwritten. A sheet
or record already there that is signed, issued, of another machine or not relaywright's is kept too
(:mod:`reports.existing`); the rest of the demo is written and the command says what it kept.
"""

from __future__ import annotations

from importlib import resources
from pathlib import Path

import typer


def demo_files() -> dict[str, str]:
    """The shipped demo machine files, name → text."""
    try:
        root = resources.files("wizard.demo")  # an installed copy: examples/ shipped as package data
    except ModuleNotFoundError:  # a source checkout (editable install): the examples folder itself
        root = Path(__file__).resolve().parent.parent / "examples"
    return {p.name: p.read_text("utf-8") for p in sorted(root.iterdir(), key=lambda p: p.name)
            if p.name.endswith(".toml")}


def write_demo(directory: Path) -> int:
    """Write the demo plant into ``directory``; return the exit code (2 when the folder cannot be used)."""
    from machines.errors import InputError
    from machines.files import read_bytes, write_atomic

    if directory.exists() and not directory.is_dir():
        raise InputError(str(directory), "expected a folder for the demo plant, got an existing file")
    try:
        directory.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise InputError(str(directory), f"cannot make the folder ({e.strerror or e}); nothing was written") \
            from None
    written = []
    for name, text in demo_files().items():
        target = directory / name
        if target.exists() or target.is_symlink():
            try:
                same = read_bytes(target).decode("utf-8", "replace") == text
            except InputError:
                same = False
            if not same:
                _say(f"kept     {target} (differs from the shipped demo file: your edits are not touched)")
                written.append(target)
                continue
        else:
            write_atomic(target, text, follow_symlinks=False)
        _say(f"machine  {target}")
        written.append(target)
    try:
        from reports.sheet import build_sheet
    except ImportError:  # the sheet is not part of this build
        build_sheet = None
    for target in written:
        _record_and_sheet(target, build_sheet)
    _say(f"Next: relaywright settings {written[0]}   (or open the PDFs in {directory})")
    return 0


def _say(line: str) -> None:
    from machines.errors import printable

    typer.echo("\n".join(printable(part) for part in line.split("\n")))


def _record_and_sheet(machine_file: Path, build_sheet) -> None:
    from machines.errors import InputError
    from machines.files import load_case, write_atomic
    from machines.study import run_study
    from reports.existing import refuse_to_replace, refuse_to_replace_record

    try:
        case, warnings = load_case(machine_file)
        record = run_study(case, warnings)
    except InputError as e:
        _say(f"skipped  {machine_file}: {e}")
        return
    json_path, pdf = machine_file.with_suffix(".json"), machine_file.with_suffix(".pdf")
    text = record.dumps() + "\n"
    sheet = build_sheet(record) if build_sheet is not None else None
    try:  # a signed, issued or other machine's sheet (or record) there is kept: both stay as they were
        if sheet is not None:
            refuse_to_replace(pdf, sheet)
        refuse_to_replace_record(json_path, case.sheet.tag, text)
    except InputError as e:
        _say(f"kept     {e}")
        return
    write_atomic(json_path, text, follow_symlinks=False)
    line = f"record   {json_path}"
    if sheet is not None:
        write_atomic(pdf, sheet, follow_symlinks=False)
        line += f"\nsheet    {pdf}"
    counts = {s: sum(1 for _, c in record.all_checks() if c.status == s) for s in ("fail", "warn")}
    _say(f"{line}   ({len(record.functions)} functions, {counts['fail']} failed checks, "
         f"{counts['warn']} warnings)")
