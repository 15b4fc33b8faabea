"""Median wall time of one study per example, motors and generators (prepare, every rule, drawings); target < 20 ms.

Run from the repository root: ``/work/venv/bin/python benchmarks/bench_study.py [MACHINE.toml ...]``.

Two figures per machine: the **first** study of a machine, with the fitted motor models forgotten before each run
(the double-cage fit, METHODS.md §3.6, is kept in a cache within a process, so only the first study of a data sheet
pays for it: this is what a new or revised machine costs, and what each file of a batch costs), and the same study
**again** with the fit cached. The target is on the first.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from machines.files import load_case  # noqa: E402
from machines.standards.equivalent_circuit import fit_double_cage  # noqa: E402
from machines.starting import model_curve  # noqa: E402
from machines.study import run_study  # noqa: E402

TARGET = 0.020  #: [s]


def forget_fits() -> None:
    """Empty the caches of fitted motor models (public ``cache_clear`` of :func:`functools.lru_cache`)."""
    fit_double_cage.cache_clear()
    model_curve.cache_clear()


def median_times(path, repeats: int = 30) -> tuple[float, float]:
    """Median seconds of (the first study of the machine, the same study again) over ``repeats`` runs."""
    case, warnings = load_case(path)
    run_study(case, warnings)  # warm-up: imports
    first, again = [], []
    for _ in range(repeats):
        forget_fits()
        t0 = time.perf_counter()
        run_study(case, warnings)
        t1 = time.perf_counter()
        run_study(case, warnings)
        first.append(t1 - t0)
        again.append(time.perf_counter() - t1)
    return statistics.median(first), statistics.median(again)


def main(paths: list[str]) -> int:
    root = Path(__file__).resolve().parent.parent
    paths = paths or [str(p) for p in sorted((root / "examples").glob("*.toml"))]
    worst = 0.0
    for p in paths:
        first, again = median_times(p)
        worst = max(worst, first)
        print(f"{Path(p).name:45s} first study {first * 1e3:7.2f} ms, again {again * 1e3:6.2f} ms (median)")
    print(f"worst median of a first study {worst * 1e3:.2f} ms (target < {TARGET * 1e3:.0f} ms): "
          f"{'met' if worst < TARGET else 'MISSED'}")
    return 0 if worst < TARGET else 1


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
