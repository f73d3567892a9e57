"""Compare formula engines on fidelity and speed (run on demand).

    python tests/benchmarks/compare_engines.py

Fidelity: the formula battery of ``excel_battery.py`` (Excel's results).
Speed: a generated sheet of N rows x 6 formula columns, time per formula
cell, end to end (load, compile, evaluate).  Engines: the tubefuncs headless
engine (its own parser and graph over the `formulas` function library), the
`formulas` package's own workbook model, and `pycel` (when installed).
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
import warnings

sys.path.insert(0, os.path.dirname(__file__))
sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
from excel_battery import BATTERY, build, same  # noqa: E402

warnings.simplefilter("ignore")


def ours(path, cells):
    from tubefuncs.headless import recalculate

    r = recalculate(path, engine="general")
    return [r.value(sheet, coord) for sheet, coord in cells]


def formulas_model(path, cells):
    import formulas

    xl = formulas.ExcelModel().loads(path).finish()
    sol = xl.calculate()
    book = os.path.basename(path)
    out = []
    for sheet, coord in cells:
        key = f"'[{book}]{sheet.upper()}'!{coord}"
        v = sol.get(key)
        v = v.value[0, 0] if v is not None else None
        out.append(v.item() if hasattr(v, "item") else v)
    return out


def pycel_model(path, cells):
    from pycel import ExcelCompiler

    xl = ExcelCompiler(filename=path)
    out = []
    for sheet, coord in cells:
        try:
            out.append(xl.evaluate(f"{sheet}!{coord}"))
        except Exception as exc:  # pycel raises for functions it lacks
            out.append(f"raised {type(exc).__name__}")
    return out


ENGINES = {"tubefuncs": ours, "formulas": formulas_model, "pycel": pycel_model}


def fidelity(tmp):
    path = os.path.join(tmp, "battery.xlsx")
    build(path)
    cells = [("Data", f"B{i}") for i in range(1, len(BATTERY) + 1)]
    for name, fn in ENGINES.items():
        try:
            got = fn(path, cells)
        except Exception as exc:  # an engine that fails outright scores nothing
            print(f"{name:10s} failed: {type(exc).__name__}: {exc}")
            continue
        misses = [(f, e, g) for (f, e), g in zip(BATTERY, got) if not same(e, g)]
        print(f"{name:10s} fidelity {len(BATTERY) - len(misses)}/{len(BATTERY)}")
        for f, e, g in misses:
            print(f"    {f:40s} expected {e!r:12} got {g!r}")


def speed(tmp, rows):
    import openpyxl

    path = os.path.join(tmp, f"speed{rows}.xlsx")
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Sweep"
    ws["H1"] = 0.01
    for r in range(1, rows + 1):
        ws.cell(r, 1, 2.9e9 + r * 1e6)
        ws.cell(r, 2, f"=2*PI()*A{r}*$H$1/2.5E+8")
        ws.cell(r, 3, f"=IF(B{r}=0,1,SIN(B{r}/2)/(B{r}/2))")
        ws.cell(r, 4, f"=20*LOG10(ABS(C{r}))")
        ws.cell(r, 5, f"=ROUND(DEGREES(B{r}),3)")
        ws.cell(r, 6, f"=MAX(D{r},-40)")
        ws.cell(r, 7, f"=SQRT(A{r}/1E+9)+E{r}*0")
    wb.save(path)
    n = rows * 6
    battery = os.path.join(tmp, "battery.xlsx")
    if not os.path.exists(battery):
        build(battery)
    cells = [("Sweep", f"{col}{r}") for r in range(1, rows + 1) for col in "BCDEFG"]
    for name, fn in ENGINES.items():
        if name == "formulas" and rows > 2000:
            print(f"{name:10s} skipped above 2000 rows (too slow)")
            continue
        try:  # warm up: imports and library set-up are not per-cell costs
            fn(battery, [("Data", "B1")])
        except Exception:
            pass
        t = time.perf_counter()
        try:
            fn(path, cells)
        except Exception as exc:
            print(f"{name:10s} failed: {type(exc).__name__}: {exc}")
            continue
        dt = time.perf_counter() - t
        print(f"{name:10s} {rows} rows, {n} formula cells: {dt:.2f} s, "
              f"{dt / n * 1e3:.3f} ms per formula cell")


if __name__ == "__main__":
    rows = int(sys.argv[1]) if len(sys.argv) > 1 else 500
    with tempfile.TemporaryDirectory() as tmp:
        fidelity(tmp)
        speed(tmp, rows)
