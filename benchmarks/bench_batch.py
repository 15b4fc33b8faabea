"""Benchmark: one study, one sheet, a 200-file batch and a re-run of current files, each against its floor.

Not a test: it prints the figures as rows of the README's performance table. Run from the repository with the
project's virtualenv, on an otherwise quiet machine (about forty minutes on two quiet cores)::

    python benchmarks/bench_batch.py [--files 200] [--pairs 5] [--rerun-files 1000]

Every figure with a floor is measured in pairs, ours then the floor, A B A B ... (``benchmarks/paired.py``): the
row quotes the medians and the median of the pairs' ratios, so one run slowed by other work on the machine does
not change the verdict. What is measured:

- one study (``run_study`` on a validated case, in process; slowest example, median): the first study of a
  machine, with the fitted motor models forgotten (``bench_study.py``), and the same study again;
- one sheet in process (``build_sheet``) against the floor built in process, pair by pair over the examples;
- ``relaywright batch`` over N machine files (made in a temporary folder by varying the examples' ratings and
  tags) with two workers and with one, against ``floor_sheet.py --batch`` run the same ways, as whole processes;
  the speed-up is the one-worker time over the two-worker time (medians);
- a re-run of ``relaywright batch`` over files whose sheets are all current, against :data:`RERUN_FLOOR` (a
  process that reads and hashes every file and looks at every output), paired; the target is absolute (≤ 2 s);
- peak resident memory of a batch worker (``getrusage(RUSAGE_CHILDREN).ru_maxrss`` of a process that runs the batch
  in a pool) and of the main process.

The floor (``floor_sheet.py``) builds a plain reportlab PDF with the same content as the real sheet, so each ratio
is what relaywright costs beyond setting the same content in reportlab. Start-up figures (``--help``, ``settings``,
``sheet`` as whole processes) are in ``bench_startup.py``.
"""

from __future__ import annotations

import argparse
import copy
import json
import re
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
import tomllib
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
sys.path.insert(0, str(HERE))

import bench_study  # noqa: E402
import paired  # noqa: E402
from floor_sheet import build_floor  # noqa: E402

TARGETS = {"study": 0.020, "batch_ratio": 1.25, "speedup": 1.7, "rerun": 2.0, "worker_mb": 200.0}

#: the floor of a re-run over current files: the least any re-run must do to know that nothing changed (walk the
#: folder, read and hash every machine file, look at every output, read what the last run wrote)
RERUN_FLOOR = r"""
import hashlib, json, os, sys
plant, out = sys.argv[1], sys.argv[2]
for root, dirs, files in os.walk(plant):
    for f in files:
        if f.endswith(".toml"):
            with open(os.path.join(root, f), "rb") as fh:
                hashlib.sha256(fh.read()).hexdigest()
for f in os.listdir(out):
    os.lstat(os.path.join(out, f))
with open(os.path.join(out, ".relaywright-batch.json"), "rb") as fh:
    json.loads(fh.read())
"""


def timed(fn) -> float:
    t0 = time.perf_counter()
    fn()
    return time.perf_counter() - t0


# ---------------------------------------------------------------------------------------------------- content


def sheet_content(record) -> dict:
    """The sheet's layout as saved for the floor (plain JSON data): the floor sets exactly this document, so both
    sides build the same pages, cells, paragraphs, drawing points and fonts (``tests/test_floor.py`` counts them)."""
    from reports.sheet import sheet_layout

    return json.loads(json.dumps(sheet_layout(record)))


# ---------------------------------------------------------------------------------------------------- machine files

_NUM = re.compile(r"^\s*([0-9.]+)\s*(.*)$")


def _scaled(text, factor: float):
    """``"1500 hp"`` × factor, keeping the unit (numbers as TOML numbers stay numbers)."""
    if isinstance(text, (int, float)):
        return round(text * factor, 4)
    m = _NUM.match(text)
    return f"{float(m.group(1)) * factor:.4g} {m.group(2)}".strip()


def make_plant(folder: Path, n: int) -> list[int]:
    """``n`` machine files varied from the examples (ratings ±10 %, own tags); returns each file's template."""
    from machines.files import dumps

    templates = [tomllib.loads(p.read_text("utf-8")) for p in EXAMPLES]
    which = []
    for i in range(n):
        k = i % len(templates)
        data = copy.deepcopy(templates[k])
        factor = 0.9 + 0.2 * ((i * 37) % 101) / 100  # deterministic spread over 0.9 … 1.1
        m = data["machine"]
        for key in ("rated_output", "rated_current"):
            if key in m:
                m[key] = _scaled(m[key], factor)
        if isinstance(m.get("locked_rotor_current"), str) and m["locked_rotor_current"].strip().endswith(" A"):
            m["locked_rotor_current"] = _scaled(m["locked_rotor_current"], factor)
        data["sheet"]["tag"] = f"{data['sheet']['tag']}-{i:03d}"
        (folder / f"machine-{i:03d}.toml").write_text(dumps(data), "utf-8")
        which.append(k)
    return which


# ---------------------------------------------------------------------------------------------------- memory helper


def peak_memory(plant: Path, out: Path, workers: int) -> dict:
    """Run the batch in this process (``--peak-memory``) and report peak RSS of its workers and of itself."""
    import contextlib
    import io
    import resource

    from wizard.batch import run_batch

    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
        run_batch(plant, out, workers=workers, force=True)
    kb = 1024 if sys.platform == "darwin" else 1  # ru_maxrss is in bytes on macOS, kilobytes on Linux
    return {"worker_mb": resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / kb / 1024,
            "main_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / kb / 1024}


# ---------------------------------------------------------------------------------------------------- the floor
# How the floor is run; the one place to change when the floor script changes.


def floor_batch_command(files: int, workers: int, layouts_json: Path, out: Path) -> list[str]:
    """The floor's batch as a whole process: ``files`` floor PDFs with the layouts of the batch's sheets."""
    return [sys.executable, str(HERE / "floor_sheet.py"), "--batch", str(files), "--workers", str(workers),
            "--layouts", str(layouts_json), str(out)]


def floor_process_command(record_json: Path, layout: dict, out: Path) -> list[str]:
    """The floor of one ``relaywright sheet`` process: interpreter, numpy, the saved record read, the floor PDF of
    the sheet's saved layout."""
    saved = out.with_suffix(".layout.json")
    saved.write_text(json.dumps(layout), "utf-8")
    code = ("import json, sys, numpy; json.loads(open(sys.argv[1], encoding='utf-8').read()); "
            f"sys.path.insert(0, {str(HERE)!r}); import floor_sheet; sys.exit(floor_sheet.main(sys.argv[2:]))")
    return [sys.executable, "-c", code, str(record_json), str(saved), "-o", str(out)]


# ---------------------------------------------------------------------------------------------------- the run


def run(files: int, n: int, rerun_files: int) -> list[str]:
    """Every figure, as rows of the README's performance table."""
    from machines.files import load_case
    from machines.study import run_study
    from reports.sheet import build_sheet

    tmp = Path(tempfile.mkdtemp(prefix="relaywright-bench-"))
    rows = []
    rerun = None
    try:
        # one study, in process: the first study of a machine (fitted models forgotten) and the same again
        cases = [load_case(p) for p in EXAMPLES]
        times = [bench_study.median_times(p) for p in EXAMPLES]
        first, again = max(t[0] for t in times), max(t[1] for t in times)
        rows.append(paired.row("first study of a machine, in process (slowest example)", paired.show(first), "—",
                               "—", f"< {TARGETS['study'] * 1000:.0f} ms", first < TARGETS["study"]))
        rows.append(paired.row("the same study again (fitted motor model cached)", paired.show(again), "—", "—",
                               "—", None))

        # one sheet in process, against the floor in process: pairs taken over the examples in turn
        records = [run_study(case, warnings) for case, warnings in cases]
        contents = [sheet_content(r) for r in records]
        turn = {"a": 0, "b": 0}

        def one(which, build, items):
            def go():
                i = turn[which] % len(items)
                turn[which] += 1
                return timed(lambda: build(items[i]))
            return go

        sheet = paired.pairs(one("a", build_sheet, records), one("b", build_floor, contents),
                             max(n, 3) * len(records))
        rows.append(paired.ratio_row("one sheet, in process (examples in turn)", sheet, "same content in plain "
                                     "reportlab", None))

        # N files through batch with 2 workers and 1, against the floor's batch run the same ways
        plant = tmp / "plant"
        plant.mkdir()
        which = make_plant(plant, files)
        spec = tmp / "layouts.json"
        spec.write_text(json.dumps([contents[k] for k in which]))
        batch: dict[int, paired.Paired] = {}
        for workers in (2, 1):
            out, floor_out = tmp / f"out-{workers}", tmp / f"floor-{workers}"
            batch[workers] = paired.processes(
                [*paired.cli(), "batch", str(plant), "-o", str(out), "--workers", str(workers)],
                floor_batch_command(files, workers, spec, floor_out), n,
                before_a=lambda o=out: shutil.rmtree(o, ignore_errors=True),
                before_b=lambda o=floor_out: shutil.rmtree(o, ignore_errors=True))
            rows.append(paired.ratio_row(f"`relaywright batch`, {files} machine files, {workers} worker"
                                         f"{'s' if workers > 1 else ''}", batch[workers], "floor batch, same "
                                         "workers", TARGETS["batch_ratio"] if workers == 2 else None))
        ours, floor = batch[1].ours / batch[2].ours, batch[1].floor / batch[2].floor
        rows.append(paired.row("speed-up with 2 workers", f"{ours:.2f}×", f"{floor:.2f}×", "—",
                               f"≥ {TARGETS['speedup']}", ours >= TARGETS["speedup"]))

        # a re-run over files whose sheets are all current
        if rerun_files:
            many, out = tmp / "many", tmp / "out-many"
            many.mkdir()
            make_plant(many, rerun_files)
            command = [*paired.cli(), "batch", str(many), "-o", str(out)]
            paired.wall(command)  # the first run makes every sheet current
            rerun = paired.processes(command, [sys.executable, "-c", RERUN_FLOOR, str(many), str(out)], n)
            rows.append(paired.row(f"re-run of `relaywright batch` over {rerun_files} current files",
                                   paired.show(rerun.ours), f"{paired.show(rerun.floor)}: every file read and "
                                   "hashed, every output looked at", f"{rerun.ratio:.2f}×",
                                   f"≤ {TARGETS['rerun']:g} s", rerun.ours <= TARGETS["rerun"]))

        # peak memory of a worker (and of the main process), from a process that runs the batch in a pool
        helper = subprocess.run([sys.executable, str(Path(__file__)), "--peak-memory", str(plant),
                                 str(tmp / "out-mem")], check=True, capture_output=True, text=True, cwd=ROOT,
                                env=paired.environment())
        mem = json.loads(helper.stdout.strip().splitlines()[-1])
        rows.append(paired.row("peak memory per batch worker", f"{mem['worker_mb']:.0f} MB", "—", "—",
                               f"< {TARGETS['worker_mb']:.0f} MB", mem["worker_mb"] < TARGETS["worker_mb"]))
        rows.append(f"<!-- batch main process peak memory {mem['main_mb']:.0f} MB; sheet content of the first "
                    f"example: {len(contents[0].get('blocks', []))} blocks; {sheet.spread()} (one sheet); "
                    + "; ".join(f"{w} worker(s): {p.spread()}" for w, p in batch.items())
                    + (f"; re-run: {rerun.spread()}" if rerun is not None else "") + " -->")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return rows


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--files", type=int, default=200, help="machine files in the batch (default 200)")
    ap.add_argument("--pairs", type=int, default=paired.MIN_PAIRS,
                    help=f"pairs of runs per figure, at least {paired.MIN_PAIRS} (default {paired.MIN_PAIRS})")
    ap.add_argument("--rerun-files", type=int, default=1000, help="files in the re-run figure (0: leave it out)")
    ap.add_argument("--peak-memory", nargs=2, type=Path, metavar=("PLANT", "OUT"), help=argparse.SUPPRESS)
    a = ap.parse_args()
    if a.peak_memory:
        print(json.dumps(peak_memory(*a.peak_memory, workers=2)))
        return 0
    t0, before = time.perf_counter(), paired.conditions()
    rows = run(a.files, a.pairs, a.rerun_files)
    print(paired.HEADER)
    print("\n".join(rows))
    print(f"<!-- bench_batch.py, {time.perf_counter() - t0:.0f} s; at the start: {before}; at the end: "
          f"{paired.conditions()} -->")
    return 0


if __name__ == "__main__":
    sys.exit(main())
