"""`relaywright demo`: the invented demo plant's machine files, their settings records and sheets.

The machine files ship inside the package (they are the repository's examples/ folder). A file already in the
target folder that differs from the shipped one is the user's edited copy: it is kept, never overwritten.
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
    from machines.files import write_atomic

    if directory.exists() and not directory.is_dir():
        raise InputError(str(directory), "expected a folder for the demo plant, got an existing file")
    directory.mkdir(parents=True, exist_ok=True)
    written = []
    for name, text in demo_files().items():
        target = directory / name
        if target.exists() and target.read_text("utf-8", errors="replace") != text:
            typer.echo(f"kept     {target} (differs from the shipped demo file: your edits are not touched)")
        else:
            write_atomic(target, text)
            typer.echo(f"machine  {target}")
        written.append(target)
    try:
        from reports.sheet import build_sheet
    except ImportError:  # the sheet is not part of this build
        build_sheet = None
    for target in written:
        _record_and_sheet(target, build_sheet)
    typer.echo(f"Next: relaywright settings {written[0]}   (or open the PDFs in {directory})")
    return 0


def _record_and_sheet(machine_file: Path, build_sheet) -> None:
    from machines.errors import InputError
    from machines.files import load_case, write_atomic
    from machines.study import run_study

    try:
        case, warnings = load_case(machine_file)
    except InputError as e:
        typer.echo(f"skipped  {machine_file}: {e}")
        return
    record = run_study(case, warnings)
    json_path = machine_file.with_suffix(".json")
    write_atomic(json_path, record.dumps() + "\n")
    line = f"record   {json_path}"
    if build_sheet is not None:
        pdf = machine_file.with_suffix(".pdf")
        write_atomic(pdf, build_sheet(record))
        line += f"\nsheet    {pdf}"
    counts = {s: sum(1 for _, c in record.all_checks() if c.status == s) for s in ("fail", "warn")}
    typer.echo(f"{line}   ({len(record.functions)} functions, {counts['fail']} failed checks, "
               f"{counts['warn']} warnings)")
