"""Run every benchmark in this folder (``make bench``) and print the figures.

Each ``bench_*.py`` module has ``run() -> list[Row]``. Timings are medians of
repeated runs measured side by side in this one process; ratios compare
measurements taken in the same run, never against stored numbers. The
machine is noisy: read ratios, not absolute seconds.
"""

from __future__ import annotations

import importlib
import pkgutil
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from statistics import median


@dataclass(frozen=True)
class Row:
    name: str
    value: float
    unit: str
    note: str = ""


def timed(fn: Callable[[], object], repeat: int = 5) -> float:
    """Median wall time of ``repeat`` calls [s] (after one warm-up call)."""
    fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return median(times)


def main(argv: list[str] | None = None) -> int:
    only = (argv if argv is not None else sys.argv[1:]) or None
    here = Path(__file__).parent
    rows: list[Row] = []
    for mod in sorted(m.name for m in pkgutil.iter_modules([str(here)]) if m.name.startswith("bench_")):
        if only and not any(o in mod for o in only):
            continue
        module = importlib.import_module(f"tests.benchmarks.{mod}")
        print(f"## {mod}", flush=True)
        for row in module.run():
            rows.append(row)
            note = f"  ({row.note})" if row.note else ""
            print(f"  {row.name:<58} {row.value:>14.4g} {row.unit}{note}", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
