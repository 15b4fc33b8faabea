"""``relaywright comtrade``: read a machine file, run the study, write the test-set files into a folder.

For every test point with an injection one COMTRADE recording (``.cfg`` + binary ``.dat``, and a ``.hdr`` saying
what it plays and what to expect), for a motor its starts and a stall, and ``test-plan.csv`` with one row per test
point. Nothing already in the folder is replaced without ``--force``: every name is checked before the first file
is written, and each file is written atomically (temporary file and rename), the ``.dat`` before its ``.cfg``. The
study's record is only read.
"""

from __future__ import annotations

import sys
from pathlib import Path

from machines.errors import InputError
from wizard.terminal import shown

PLAN_NAME = "test-plan.csv"


def default_folder(machine_file: Path, tag: str, revision: int) -> Path:
    """``<tag>-rev<N>-tests`` beside the machine file.

    >>> default_folder(Path("plant/m.toml"), "CW-P-201", 2).as_posix()
    'plant/CW-P-201-rev2-tests'
    """
    from machines.files import safe_file_stem

    return Path(machine_file).parent / f"{safe_file_stem(tag)}-rev{revision}-tests"


def _targets(folder: Path, stems: list[str]) -> list[Path]:
    return [folder / f"{s}.{ext}" for s in stems for ext in ("dat", "cfg", "hdr")] + [folder / PLAN_NAME]


def make_comtrade(file: Path, output: Path | None = None, force: bool = False, device: str = "relaywright") -> int:
    """Write the files; print the folder and what was written. Exit code 0, or 1 when a check of the study failed
    or a test point's injection could not be written from the record (both are named on stderr)."""
    from machines.files import load_case, write_atomic
    from machines.study import run_study
    from reports import comtrade, waveforms
    from reports.commissioning_plan import plan_csv

    case, warnings = load_case(file)
    try:
        record = run_study(case, warnings).to_json()
    except InputError as e:  # e.g. an override the study cannot use: say which file it is in
        raise e.at(file) from None
    try:
        entries, extras, notes = waveforms.waveform_set(record)
        system = waveforms.system_of(record)
    except InputError as e:
        raise e.at(file) from None
    designs = [e.design for e in entries if e.design is not None] + extras
    folder = default_folder(Path(file), record["tag"], record["revision"]) if output is None else Path(output)
    if folder.exists() and not folder.is_dir():
        raise InputError(str(folder), "is a file; expected a folder for the test-set files (-o DIR)")
    taken = [p for p in _targets(folder, [d.stem for d in designs]) if p.exists() or p.is_symlink()]
    if taken and not force:
        more = f" (and {len(taken) - 1} more)" if len(taken) > 1 else ""
        raise InputError(str(taken[0]), f"already exists{more}; nothing was written (use --force to replace)")
    start = waveforms.start_date(record)
    for d in designs:
        rec = waveforms.render(d, record["tag"], device, start, system.frequency)
        dat = comtrade.dat_bytes(rec)
        if len(dat) > waveforms.MAX_FILE_BYTES:  # plan_segments keeps every file below this; never write past it
            raise RuntimeError(f"{d.stem}.dat would be {len(dat)} bytes")
        write_atomic(folder / f"{d.stem}.dat", dat)
        write_atomic(folder / f"{d.stem}.cfg", comtrade.cfg_text(rec))
        write_atomic(folder / f"{d.stem}.hdr", waveforms.header_text(d, record))
    write_atomic(folder / PLAN_NAME, plan_csv(entries, system.frequency))
    print(shown(folder))
    print(f"{len(designs)} COMTRADE recording(s) and {PLAN_NAME} ({len(entries)} test points)")
    refused = [e for e in entries if e.skip is not None and e.skip.kind == "record"]
    for e in entries:
        if e.skip is not None and e.skip.kind != "none":
            label = "warning" if e.skip.kind == "record" else "note"
            print(shown(f"{label}: test {e.tp.get('id')}: no waveform: {e.skip.reason}"), file=sys.stderr)
    for n in notes:
        print(shown(f"warning: {n}"), file=sys.stderr)
    failed = sum(1 for f in record["functions"] for c in f["checks"] if c["status"] == "fail") + sum(
        1 for c in record["checks"] if c["status"] == "fail")
    if failed:
        print(f"{failed} check(s) failed: see `relaywright settings`; do not apply these settings as they are",
              file=sys.stderr)
    return 1 if failed or refused or notes else 0
