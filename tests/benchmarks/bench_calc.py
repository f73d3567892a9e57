"""Our functions inside LibreOffice Calc against our headless engine, one run.

    python tests/benchmarks/bench_calc.py [--rows 10000]

1. Time per call inside Calc: ROWS cells of ``=TUBE_TRANSIT_ANGLE(A..; "12 mm";
   "80 kV"; "deg")`` (number arguments and unit texts), full recalculation
   (``calculateAll``) timed inside LibreOffice, against a built-in function of
   Calc over the same cells (``=A..*2``) and against one array formula over
   the whole range (one extension call); ``=TUBE_GAMMA(A..)`` is the lightest
   call (one number argument, no unit text).
2. A ROWS-row sweep workbook (two catalogue columns and one plain formula
   column per row) recalculated by Calc (calculation only, and load +
   calculation + save) and by our headless engine (in-process, warm; and the
   same with writing the output), side by side.

Ratios are what to read: the machine is shared, absolute times are noisy.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path.insert(0, ROOT)

from tubefuncs.calc.runner import CalcSession, why_unavailable  # noqa: E402


def sweep_book(path: str, rows: int) -> None:
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Sweep"
    ws["F1"], ws["F2"], ws["F3"], ws["F4"] = "80 kV", "12 mm", "4 mm", "6 mm"
    step = 0.2e9 / max(rows - 1, 1)
    for r in range(1, rows + 1):
        ws.cell(r, 1, 2.9e9 + (r - 1) * step)
        ws.cell(r, 2, f'=TUBE_TRANSIT_ANGLE(A{r}, $F$2, $F$1, "deg")')
        ws.cell(r, 3, f"=TUBE_REDUCTION_FACTOR(A{r}, $F$1, $F$3, $F$4)")
        ws.cell(r, 4, f"=B{r}*C{r}/360")
    wb.save(path)


def best(fn, repeat=3):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out


def run(rows: int = 10_000) -> None:
    reason = why_unavailable()
    if reason:
        print(f"skipped: {reason}")
        return
    from tubefuncs.calc.engine import recalculate_calc
    from tubefuncs.headless import recalculate, write_recalculated

    t0 = time.perf_counter()
    session = CalcSession()
    print(f"LibreOffice start + extension install + restart: {time.perf_counter() - t0:.1f} s")
    try:
        values = [[f"A{r + 1}", "value", 2.9e9 + r * 1e4] for r in range(rows)]
        ours = values + [[f"B{r + 1}", "formula",
                          f'=TUBE_TRANSIT_ANGLE(A{r + 1};"12 mm";"80 kV";"deg")']
                         for r in range(rows)]
        light = values + [[f"B{r + 1}", "formula", f"=TUBE_GAMMA(A{r + 1})"]
                          for r in range(rows)]
        builtin = values + [[f"B{r + 1}", "formula", f"=A{r + 1}*2"] for r in range(rows)]
        array = values + [[f"B1:B{rows}", "array",
                           f'=TUBE_TRANSIT_ANGLE(A1:A{rows};"12 mm";"80 kV";"deg")']]
        t_ours = session.cells(ours, ["B1"], repeat=3)["seconds"]
        t_light = session.cells(light, ["B1"], repeat=3)["seconds"]
        t_builtin = session.cells(builtin, ["B1"], repeat=3)["seconds"]
        t_array = session.cells(array, ["B1"], repeat=3)["seconds"]
        print(f"\n1. {rows} cells, full recalculation inside Calc (mean of 3 in one document)")
        print(f"   TUBE_TRANSIT_ANGLE, one call per cell : {t_ours:8.3f} s  "
              f"{t_ours / rows * 1e6:7.1f} us per call")
        print(f"   TUBE_GAMMA(number), one call per cell : {t_light:8.3f} s  "
              f"{t_light / rows * 1e6:7.1f} us per call")
        print(f"   Calc built-in =A*2, per cell          : {t_builtin:8.3f} s  "
              f"{t_builtin / rows * 1e6:7.1f} us per cell")
        print(f"   TUBE_TRANSIT_ANGLE over the range     : {t_array:8.3f} s  "
              f"(one array formula: x{t_ours / t_array:.0f} faster than per cell)")
        print(f"   ratio per-cell extension / built-in   : x{t_ours / t_builtin:.0f}")

        with tempfile.TemporaryDirectory() as tmp:
            book = os.path.join(tmp, "sweep.xlsx")
            sweep_book(book, rows)
            recalculate(book)  # warm-up: imports, unit cache
            t_head, recalc = best(lambda: recalculate(book))
            t_head_w, _ = best(lambda: write_recalculated(recalculate(book),
                                                          os.path.join(tmp, "h.xlsx")))
            t_calc_all, calc = best(lambda: recalculate_calc(book, session=session), 2)
            t_calc = calc.timings["calc_recalc"]
            cells = recalc.formula_cells
            print(f"\n2. sweep workbook: {rows} rows, {cells} formula cells "
                  f"({2 * rows} catalogue calls)")
            print(f"   Calc, calculateAll only               : {t_calc:8.3f} s")
            print(f"   Calc, load + calculate + save (xlsx)  : {t_calc_all:8.3f} s")
            print(f"   headless fast engine, recalculate     : {t_head:8.3f} s")
            print(f"   headless fast engine, + write output  : {t_head_w:8.3f} s")
            print(f"   ratio Calc calculation / headless     : x{t_calc / t_head:.1f}")
            print(f"   ratio Calc end to end / headless+write: x{t_calc_all / t_head_w:.1f}")
            diff = sum(1 for k, v in recalc.values.items()
                       if not (isinstance(v, float) and isinstance(calc.values[k], float)
                               and abs(v - calc.values[k]) <= 1e-9 * abs(v)))
            print(f"   cells where Calc and headless differ (rtol 1e-9): {diff}")
    finally:
        session.close()


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=10_000)
    run(parser.parse_args().rows)
    return 0


if __name__ == "__main__":
    sys.exit(main())
