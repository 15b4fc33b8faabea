"""Median wall time of one study per example, motors and generators (prepare, every rule, drawings); target < 20 ms.

Run from the repository root: ``/work/venv/bin/python benchmarks/bench_study.py [MACHINE.toml ...]``.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from machines.files import load_case  # noqa: E402
from machines.study import run_study  # noqa: E402

TARGET = 0.020  #: [s]


def median_time(path: str, repeats: int = 50) -> float:
    case, warnings = load_case(path)
    run_study(case, warnings)  # warm-up: imports, caches
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        run_study(case, warnings)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main(paths: list[str]) -> int:
    root = Path(__file__).resolve().parent.parent
    paths = paths or [str(p) for p in sorted((root / "examples").glob("*.toml"))]
    worst = 0.0
    for p in paths:
        t = median_time(p)
        worst = max(worst, t)
        print(f"{Path(p).name:45s} median {t * 1e3:7.2f} ms per study")
    print(f"worst median {worst * 1e3:.2f} ms (target < {TARGET * 1e3:.0f} ms): {'ok' if worst < TARGET else 'SLOW'}")
    return 0 if worst < TARGET else 1


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
