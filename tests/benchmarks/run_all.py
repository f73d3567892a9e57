"""Run every benchmark in one process, so ratios are measured side by side.

Run: ``python tests/benchmarks/run_all.py``.  Figures are printed, not asserted:
these are measurements on noisy machines, not unit tests.
"""

from __future__ import annotations

import importlib
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

BENCHMARKS = ["bench_core", "bench_reduction", "bench_gain", "bench_recalc", "bench_sweep",
              "bench_calc", "bench_vs_calc"]


def main() -> int:
    for name in BENCHMARKS:
        try:
            module = importlib.import_module(name)
        except ModuleNotFoundError:
            continue
        print(f"\n=== {name} ===", flush=True)
        t0 = time.perf_counter()
        module.run()
        print(f"({name}: {time.perf_counter() - t0:.1f} s)", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
