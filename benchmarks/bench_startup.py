"""Benchmark: what a whole ``relaywright`` process costs against the least any program doing its job would cost.

Not a test: it prints the figures as rows of the README's performance table. Run from the repository with the
project's virtualenv, on an otherwise quiet machine (about a minute)::

    python benchmarks/bench_startup.py [--pairs 9] [--file MACHINE.toml] [--imports]

Each figure is measured in pairs, ours then its floor, A B A B ... (``benchmarks/paired.py``); the row quotes the
medians and the median of the pairs' ratios, so one run slowed by other work on the machine does not change the
verdict:

- ``relaywright --help`` against a bare interpreter (``python -c pass``): at most 4×;
- ``relaywright settings FILE --json`` against a process that imports numpy and reads the TOML file: at most 2×;
- ``relaywright sheet FILE -o OUT.pdf`` against a process that imports numpy, reads the saved settings record and
  builds the floor PDF of the same content in plain reportlab (``floor_sheet.py``): at most 1.5×;
- ``relaywright diff OLD NEW`` against a process that imports numpy and reads both TOML files (no target).

``--imports`` also prints, for each command, the import time ``python -X importtime`` charges to each top-level
package (its modules' self times added up, one run): which libraries a command loads, and what they cost it.
"""

from __future__ import annotations

import argparse
import re
import subprocess
import sys
import tempfile
import time
from collections import defaultdict
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(HERE))

import paired  # noqa: E402

TARGETS = {"help": 4.0, "settings": 2.0, "sheet": 1.5}
EXAMPLE = ROOT / "examples" / "chiller-compressor-motor.toml"
OTHER = ROOT / "examples" / "raw-water-transfer-motor-50hz.toml"


def read_toml_command(*files: Path) -> list[str]:
    """The floor of ``settings`` and ``diff``: numpy imported, the TOML files read."""
    code = "import sys, tomllib, numpy\nfor f in sys.argv[1:]:\n    tomllib.load(open(f, 'rb'))"
    return [sys.executable, "-c", code, *map(str, files)]


def commands(file: Path, tmp: Path) -> dict[str, tuple[list[str], list[str]]]:
    """Each figure's pair of commands: (relaywright, floor)."""
    from bench_batch import floor_process_command, sheet_content
    from machines.files import load_case
    from machines.study import run_study

    record = run_study(*load_case(file))
    saved = tmp / "record.json"
    saved.write_text(record.dumps(), "utf-8")
    rw = paired.cli()
    return {
        "help": ([*rw, "--help"], [sys.executable, "-c", "pass"]),
        "settings": ([*rw, "settings", str(file), "--json"], read_toml_command(file)),
        "sheet": ([*rw, "sheet", str(file), "-o", str(tmp / "ours.pdf")],
                  floor_process_command(saved, sheet_content(record), tmp / "floor.pdf")),
        "diff": ([*rw, "diff", str(file), str(OTHER)], read_toml_command(file, OTHER)),
    }


ROWS = {  # figure: (first column, what the floor is)
    "help": ("`relaywright --help`", "`python -c pass`"),
    "settings": ("`relaywright settings FILE --json`", "numpy imported, the TOML read"),
    "sheet": ("`relaywright sheet FILE` (whole process)", "numpy imported, the saved record read, the same "
              "content built in plain reportlab"),
    "diff": ("`relaywright diff OLD NEW`", "numpy imported, both TOML files read"),
}


def import_costs(args: list[str]) -> dict[str, float]:
    """Import time [s] of each top-level package a ``relaywright`` process loads: the self times that
    ``python -X importtime`` reports for its modules, added up (one run)."""
    argv = [sys.executable, "-X", "importtime", "-m", "wizard.cli", *args]
    done = subprocess.run(argv, capture_output=True, text=True, cwd=ROOT, env=paired.environment())
    costs: dict[str, float] = defaultdict(float)
    for line in done.stderr.splitlines():
        m = re.match(r"import time:\s+(\d+) \|\s+\d+ \|\s*(\S+)", line)
        if m:
            costs[m.group(2).split(".")[0]] += int(m.group(1)) / 1e6
    return dict(costs)


def print_imports(cmds: dict[str, tuple[list[str], list[str]]]) -> None:
    watched = ("typer", "pydantic", "rich", "numpy", "pint", "reportlab", "pyhanko", "questionary", "machines",
               "reports", "wizard")
    print("\n| command | " + " | ".join(watched) + " |")
    print("|---|" + "---|" * len(watched))
    skip = len(paired.cli())
    for name, (ours, _) in cmds.items():
        costs = import_costs(ours[skip:])
        print(f"| {ROWS[name][0]} | " + " | ".join(f"{costs[w] * 1000:.0f} ms" if w in costs else "—"
                                                  for w in watched) + " |")


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--pairs", type=int, default=9, help=f"pairs of runs per figure, at least {paired.MIN_PAIRS}")
    ap.add_argument("--file", type=Path, default=EXAMPLE, help="machine file (default: the chiller example)")
    ap.add_argument("--imports", action="store_true", help="also print each command's import costs")
    a = ap.parse_args()
    t0, before = time.perf_counter(), paired.conditions()
    with tempfile.TemporaryDirectory(prefix="relaywright-startup-") as folder:
        cmds = commands(a.file.resolve(), Path(folder))
        rows, spreads = [], []
        for name, (ours, floor) in cmds.items():
            p = paired.processes(ours, floor, a.pairs)
            rows.append(paired.ratio_row(ROWS[name][0], p, ROWS[name][1], TARGETS.get(name)))
            spreads.append(f"{name}: {p.spread()}")
        print(paired.HEADER)
        print("\n".join(rows))
        print(f"<!-- bench_startup.py, {a.file.name}, {time.perf_counter() - t0:.0f} s; {'; '.join(spreads)}; "
              f"at the start: {before}; at the end: {paired.conditions()} -->")
        if a.imports:
            print_imports(cmds)
    return 0


if __name__ == "__main__":
    sys.exit(main())
