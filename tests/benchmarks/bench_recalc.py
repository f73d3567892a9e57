"""Recalculation time per formula cell (run on demand, not in the test suite).

    python tests/benchmarks/bench_recalc.py [--rows 10000]

Measures the headless engine on the demo workbooks and on a generated sweep
of ROWS rows x 6 formula columns (four catalogue functions, two Excel
formulas), split into reading, compiling and evaluating, with the default
fast path (same-shape formula runs as numpy vectors) and with the general
engine (cell by cell), side by side.  Import time of the libraries is
excluded (a warm-up run first); totals exclude writing the output.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path.insert(0, ROOT)

from tubefuncs.headless import recalculate  # noqa: E402


def sweep_book(path: str, rows: int) -> None:
    import openpyxl
    from openpyxl.workbook.defined_name import DefinedName

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Sweep"
    for name, (cell, value) in {"v_beam": ("J1", "80 kV"), "gap": ("J2", "10 mm"),
                                "b_radius": ("J3", "4 mm"), "t_radius": ("J4", "6 mm")}.items():
        ws[cell] = value
        wb.defined_names[name] = DefinedName(name, attr_text=f"Sweep!${cell[0]}${cell[1:]}")
    step = 0.2e9 / max(rows - 1, 1)
    for r in range(1, rows + 1):
        ws.cell(r, 1, 2.9e9 + (r - 1) * step)
        ws.cell(r, 2, f'=TUBE_TRANSIT_ANGLE(A{r}, gap, v_beam, "deg")')
        ws.cell(r, 3, f"=TUBE_GAP_COUPLING(A{r}, gap, v_beam, b_radius, t_radius)")
        ws.cell(r, 4, f'=TUBE_WAVEGUIDE_LOSS(A{r}, "72.14 mm", "34.04 mm", 10)')
        ws.cell(r, 5, f"=TUBE_REDUCTION_FACTOR(A{r}, v_beam, b_radius, t_radius)")
        ws.cell(r, 6, f"=20*LOG10(ABS(C{r}))")
        ws.cell(r, 7, f"=IF(D{r}>0.2, \"lossy\", ROUND(B{r}, 2))")
    wb.save(path)


def measure(path: str, label: str) -> None:
    for engine in ("fast", "general"):
        t = time.perf_counter()
        r = recalculate(path, engine=engine)
        total = time.perf_counter() - t
        n = r.formula_cells
        ph = r.timings
        print(f"{label:34s} {engine:7s} {n:7d} cells  {total:7.3f} s  "
              f"{total / n * 1e3:7.3f} ms/cell   (read {ph['read']:.2f} s, compile "
              f"{ph['compile']:.2f} s, evaluate {ph['evaluate']:.2f} s)")


def run(rows: int = 10_000) -> None:
    main(["--rows", str(rows)])


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=10_000)
    args = parser.parse_args(argv)
    books = os.path.join(ROOT, "workbooks")
    recalculate(os.path.join(books, "station_budget.xlsx"))    # warm-up: imports
    for name in ("station_budget.xlsx", "uplink_budget.xlsx", "frequency_sweep.xlsx"):
        measure(os.path.join(books, name), name)
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "sweep.xlsx")
        sweep_book(path, args.rows)
        measure(path, f"generated sweep, {args.rows} rows")
    return 0


if __name__ == "__main__":
    sys.exit(main())
