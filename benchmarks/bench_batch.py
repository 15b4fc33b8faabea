"""Benchmark: start-up, one study, one sheet, whole processes and a 200-file batch, each against its floor.

Not a test: it prints figures (and with ``--markdown FILE`` writes them as a table). Run from the repository with
the project's virtualenv, on an otherwise idle machine::

    python benchmarks/bench_batch.py [--files 200] [--repeat 1] [--markdown benchmark.md]

What is measured (wall-clock medians; a whole process includes interpreter start and imports):

- ``relaywright --help``, against ``python -c pass``;
- (a) one study (``run_study`` on a validated case, in process, after a first call);
- (b) one sheet in process (``build_sheet``, mean over the examples), against the floor built in process;
- (c) ``relaywright sheet FILE -o PDF`` as a whole process, against ``floor_sheet.py -o PDF`` as a whole process;
- (d) ``relaywright batch`` over N machine files (made in a temporary folder by varying the examples' ratings and
  tags) with two workers and with one, against ``floor_sheet.py --batch`` run the same ways; throughput is
  sheets per second, the speed-up is the one-worker time over the two-worker time;
- peak resident memory of a batch worker (``getrusage(RUSAGE_CHILDREN).ru_maxrss`` of a process that runs the batch
  in a pool) and of the main process.

The floor (``floor_sheet.py``) sets the sheet's own saved layout with plain reportlab (same pages, cells,
paragraphs, drawing points, fonts and stream settings; ``tests/test_floor.py`` counts them), so each ratio is what
relaywright costs beyond setting the same document in reportlab.
"""

from __future__ import annotations

import argparse
import copy
import json
import os
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

from floor_sheet import build_floor  # noqa: E402

TARGETS = {"help": 0.15, "study": 0.020, "sheet_process": 1.0, "batch_ratio": 1.5, "speedup": 1.7,
           "worker_mb": 200.0}


def cli() -> list[str]:
    script = Path(sys.executable).with_name("relaywright")
    return [str(script)] if script.exists() else [sys.executable, "-m", "wizard.cli"]


CPU_USED: list[float] = []  # CPU seconds (user + system) of each process run by :func:`wall`, its workers included


def wall(cmd: list[str], **kw) -> float:
    """Wall time of a whole process [s]; its CPU time goes to :data:`CPU_USED`."""
    import resource

    def cpu() -> float:
        r = resource.getrusage(resource.RUSAGE_CHILDREN)
        return r.ru_utime + r.ru_stime

    c0, t0 = cpu(), time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, cwd=ROOT, **kw)
    elapsed = time.perf_counter() - t0
    CPU_USED.append(cpu() - c0)
    return elapsed


def median_of(fn, n: int) -> float:
    return statistics.median(fn() for _ in range(n))


def timed(fn) -> float:
    t0 = time.perf_counter()
    fn()
    return time.perf_counter() - t0


# ---------------------------------------------------------------------------------------------------- content


def sheet_layout_of(record) -> dict:
    """The sheet's layout as saved for the floor (plain data: the floor sets exactly this document)."""
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


# ---------------------------------------------------------------------------------------------------- the run


def run(files: int, repeat: int) -> list[tuple[str, float, float | None, str, str]]:
    """Every figure as (name, value, floor or None, unit, target text)."""
    from machines.files import load_case
    from machines.study import run_study
    from reports.sheet import build_sheet

    tmp = Path(tempfile.mkdtemp(prefix="relaywright-bench-"))
    rows = []
    try:
        # start-up
        help_t = median_of(lambda: wall([*cli(), "--help"]), 10)
        bare = median_of(lambda: wall([sys.executable, "-c", "pass"]), 10)
        rows.append(("relaywright --help (whole process)", help_t, bare, "s", f"< {TARGETS['help']} s"))

        # (a) one study
        cases = [load_case(p) for p in EXAMPLES]
        studies = []
        for case, warnings in cases:
            run_study(case, warnings)
            studies.append(median_of(lambda: timed(lambda: run_study(case, warnings)), 30))
        rows.append(("(a) one study, in process (slowest example)", max(studies), None, "s",
                     f"< {TARGETS['study'] * 1000:.0f} ms"))

        # (b) one sheet in process, against the floor in process (mean over the examples, as the batch mixes them)
        records = [run_study(case, warnings) for case, warnings in cases]
        contents = [sheet_layout_of(r) for r in records]
        sheet_ts, floor_ts = [], []
        for record, content in zip(records, contents):
            build_sheet(record), build_floor(content)
            sheet_ts.append(median_of(lambda: timed(lambda: build_sheet(record)), 9))
            floor_ts.append(median_of(lambda: timed(lambda: build_floor(content)), 9))
        rows.append(("(b) one sheet, in process (mean of the examples)", statistics.mean(sheet_ts),
                     statistics.mean(floor_ts), "s", "ratio to floor"))

        # (c) a whole `relaywright sheet` process, against the floor as a whole process
        c0 = contents[0]
        (tmp / "layout.json").write_text(json.dumps(c0), "utf-8")
        floor_args = [str(tmp / "layout.json")]
        sheet_p = median_of(lambda: wall([*cli(), "sheet", str(EXAMPLES[0]), "-o", str(tmp / "one.pdf")]), 5)
        floor_p = median_of(lambda: wall([sys.executable, str(HERE / "floor_sheet.py"), *floor_args, "-o",
                                          str(tmp / "floor.pdf")]), 5)
        rows.append(("(c) relaywright sheet, whole process", sheet_p, floor_p, "s",
                     f"< {TARGETS['sheet_process']} s"))

        # (d) N files through batch with 2 workers and 1, against the floor batch run the same ways
        plant = tmp / "plant"
        plant.mkdir()
        which = make_plant(plant, files)
        spec = tmp / "contents.json"
        spec.write_text(json.dumps([contents[k] for k in which]))
        times: dict[tuple[str, int], float] = {}
        for workers in (2, 1):
            def batch_once(w=workers):
                out = tmp / f"out-{w}"
                shutil.rmtree(out, ignore_errors=True)
                return wall([*cli(), "batch", str(plant), "-o", str(out), "--workers", str(w)])

            def floor_once(w=workers):
                out = tmp / f"floor-{w}"
                shutil.rmtree(out, ignore_errors=True)
                return wall([sys.executable, str(HERE / "floor_sheet.py"), "--batch", str(files), "--workers",
                             str(w), "--layouts", str(spec), str(out)])

            times[("batch", workers)] = median_of(batch_once, repeat)
            cpu_batch = statistics.median(CPU_USED[-repeat:])
            times[("floor", workers)] = median_of(floor_once, repeat)
            cpu_floor = statistics.median(CPU_USED[-repeat:])
            rows.append((f"(d) batch of {files}, {workers} worker{'s' if workers > 1 else ''} (whole process)",
                         times[("batch", workers)], times[("floor", workers)], "s",
                         f"ratio < {TARGETS['batch_ratio']}"))
            rows.append((f"    throughput, {workers} worker{'s' if workers > 1 else ''}",
                         files / times[("batch", workers)], files / times[("floor", workers)], "sheets/s", ""))
            rows.append((f"    CPU time per sheet, {workers} worker{'s' if workers > 1 else ''} (other load left out)",
                         cpu_batch / files, cpu_floor / files, "s", ""))
        rows.append(("(d) speed-up with 2 workers", times[("batch", 1)] / times[("batch", 2)],
                     times[("floor", 1)] / times[("floor", 2)], "×", f">= {TARGETS['speedup']}"))

        # peak memory of a worker (and of the main process), from a process that runs the batch in a pool
        helper = subprocess.run([sys.executable, str(Path(__file__)), "--peak-memory", str(plant),
                                 str(tmp / "out-mem")], check=True, capture_output=True, text=True, cwd=ROOT)
        mem = json.loads(helper.stdout.strip().splitlines()[-1])
        rows.append(("peak memory per batch worker", mem["worker_mb"], None, "MB", f"< {TARGETS['worker_mb']:.0f} MB"))
        rows.append(("peak memory of the batch main process", mem["main_mb"], None, "MB", ""))
        rows.append(("sheet content (blocks in the first example's layout)", 0, None, str(len(c0["blocks"])),
                     "first example"))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return rows


def verdict(name: str, value: float, floor: float | None) -> str:
    checks = {"--help": value < TARGETS["help"], "(a)": value < TARGETS["study"],
              "(c)": value < TARGETS["sheet_process"], "speed-up": value >= TARGETS["speedup"],
              "per batch worker": value < TARGETS["worker_mb"]}
    if name.startswith("(d) batch") and floor:
        return "met" if value / floor <= TARGETS["batch_ratio"] else "MISSED"
    for key, ok in checks.items():
        if key in name:
            return "met" if ok else "MISSED"
    return ""


def show(value: float, unit: str) -> str:
    if unit == "s":
        return f"{value * 1000:.0f} ms" if value < 1 else f"{value:.2f} s"
    if unit in ("MB", "sheets/s"):
        return f"{value:.0f} {unit}" if unit == "MB" else f"{value:.1f} {unit}"
    if unit == "×":
        return f"{value:.2f}×"
    return unit


def report(rows, markdown: Path | None) -> None:
    lines = ["| figure | relaywright | floor | ratio | target | |", "|---|---|---|---|---|---|"]
    for name, value, floor, unit, target in rows:
        ratio = f"{value / floor:.2f}" if floor and unit in ("s",) else ""
        v = show(value, unit)
        f = show(floor, unit) if floor is not None else ""
        print(f"{name:<62} {v:>12} {('floor ' + f) if f else '':>18} {('ratio ' + ratio) if ratio else '':>12}"
              f"  {target:<16} {verdict(name, value, floor)}")
        lines.append(f"| {name.strip()} | {v} | {f} | {ratio} | {target} | {verdict(name, value, floor)} |")
    if markdown:
        markdown.parent.mkdir(parents=True, exist_ok=True)
        markdown.write_text("\n".join(lines) + "\n", "utf-8")


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--files", type=int, default=200, help="machine files in the batch (default 200)")
    ap.add_argument("--repeat", type=int, default=1, help="runs of each batch, median taken (default 1: the "
                    "default run takes about two minutes on two cores)")
    ap.add_argument("--markdown", type=Path, help="also write the figures as a Markdown table to this file")
    ap.add_argument("--peak-memory", nargs=2, type=Path, metavar=("PLANT", "OUT"), help=argparse.SUPPRESS)
    a = ap.parse_args()
    if a.peak_memory:
        print(json.dumps(peak_memory(*a.peak_memory, workers=2)))
        return 0
    t0, load0 = time.perf_counter(), os.getloadavg()[0]
    rows = run(a.files, a.repeat)
    report(rows, a.markdown)
    note = (f"(benchmark took {time.perf_counter() - t0:.0f} s; cpus: {os.cpu_count()}; python {sys.version.split()[0]}; "
            f"load average {load0:.2f} at the start, {os.getloadavg()[0]:.2f} at the end: other work on the machine "
            "slows the wall times, the CPU times per sheet are not affected)")
    print(note)
    if a.markdown:
        with a.markdown.open("a", encoding="utf-8") as fh:
            fh.write(f"\n{note}\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
