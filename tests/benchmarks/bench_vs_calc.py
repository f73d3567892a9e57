"""Headless speed against LibreOffice Calc, whole processes from the command line.

    python tests/benchmarks/bench_vs_calc.py [--repeat 3] [--big-rows 100000]
                                             [--distinct 300000] [--quick]

Everything is measured side by side in one run, each figure the median of
``--repeat`` runs (the machine is shared: read the ratios, not the seconds),
each run its own process, timed from outside with its peak memory
(``ru_maxrss`` of the child):

1. cold ``tubefuncs check`` of each demo workbook in ``workbooks/`` against
   LibreOffice's cold recalculation of the same file
   (``soffice --headless --convert-to xlsx``, private profile, created by a
   warm-up run beforehand so that its one-time set-up is not counted);
   target <= 0.5x;
2. sweeps of 10,000 and 100,000 rows (6 formula columns: 60,000 and 600,000
   formula cells), cold ``tubefuncs recalc`` against LibreOffice on a copy
   whose catalogue calls are written as native closed-form formulas (the
   same physics); targets <= 0.6x and <= 0.5x, and peak memory no more than
   LibreOffice's;
3. ``--distinct`` distinct short formulas (no two of the same relative shape,
   so the general engine does every cell) against 10,000 of the same kind:
   time, peak memory and the cost per cell (target: within 1.5x, linear).

Our processes run with compiled-module caches, as an installed package has
them (kept in the temporary folder, never in the checkout); one extra row
shows the first demo without them (``PYTHONDONTWRITEBYTECODE``).

A demo workbook holds the values Excel-style applications cache; openpyxl
writes none, so LibreOffice recalculates every formula on load (it does for
files not last saved by itself).  LibreOffice is skipped with a visible reason
when ``soffice`` is absent.  Figures are printed, not asserted.
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import statistics
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
WORKBOOKS = os.path.join(ROOT, "workbooks")
DEMOS = ("station_budget.xlsx", "frequency_sweep.xlsx", "uplink_budget.xlsx")

TOLERANCES = (-0.05, -0.02, 0.0, 0.02, 0.05)      # beam-voltage cases around nominal
SETUP = {                                          # name: (cell, value, note)
    "gap": ("B2", 0.012, "input gap length [m]"),
    "wg_a": ("B4", 0.07214, "waveguide broad wall [m]"),
    "wg_b": ("B5", 0.03404, "waveguide narrow wall [m]"),
    "run": ("B6", 25.0, "waveguide run to the antenna [m]"),
    "distance": ("B7", 40e3, "slant range to the target [m]"),
}
TITLES = ("frequency [Hz]", "beam voltage [V]", "transit angle [rad]", "coupling M",
          "run loss [dB]", "path loss [dB]", "beta v/c", "summary")
#: The catalogue calls of a row (columns C-G), and the same physics as native
#: closed-form formulas for LibreOffice (relativistic velocity from the rest
#: energy 510998.95 eV, CODATA 2018; copper walls at 58 MS/m; vacuum impedance
#: mu0 c; 20/ln 10 dB per neper).
TUBE_ROW = (
    "=TUBE_TRANSIT_ANGLE(A{r}, gap, B{r})",
    "=TUBE_GAP_COUPLING(A{r}, gap, B{r})",
    "=TUBE_WAVEGUIDE_LOSS(A{r}, wg_a, wg_b, run)",
    "=TUBE_FSPL(A{r}, distance)",
    "=TUBE_BETA(B{r})",
)
NATIVE_ROW = (
    "=2*PI()*A{r}*gap/(299792458*SQRT(1-1/(1+B{r}/510998.9506917531)^2))",
    "=SIN(C{r}/2)/(C{r}/2)",
    "=(20/LN(10))*run*SQRT(PI()*A{r}*1.25663706127E-06/58000000)"
    "*(1+2*(wg_b/wg_a)*(299792458/(2*wg_a*A{r}))^2)"
    "/(wg_b*376.73031341202994*SQRT(1-(299792458/(2*wg_a*A{r}))^2))",
    "=20*LOG10(4*PI()*distance*A{r}/299792458)",
    "=SQRT(1-1/(1+B{r}/510998.9506917531)^2)",
)
SUMMARY = '=IF(E{r}>0.6, "check run", ROUND(20*LOG10(ABS(D{r}))-F{r}/100+SQRT(C{r}), 3))'


def build_sweep(path: str, rows: int, native: bool = False) -> str:
    """The sweep workbook: ``rows`` rows x 6 formula columns (C-H)."""
    import openpyxl
    from openpyxl.workbook.defined_name import DefinedName

    wb = openpyxl.Workbook(write_only=True)
    setup = wb.create_sheet("Setup")
    setup.append(["parameter", "value", "note"])
    by_row = {int(cell[1:]): (name, value, note) for name, (cell, value, note) in SETUP.items()}
    for r in range(2, max(by_row) + 1):
        setup.append(list(by_row.get(r, ("", None, ""))))
    for name, (cell, _, _) in SETUP.items():
        wb.defined_names[name] = DefinedName(name, attr_text=f"Setup!${cell[0]}${cell[1:]}")
    ws = wb.create_sheet("Sweep")
    ws.append(list(TITLES))
    formulas = NATIVE_ROW if native else TUBE_ROW
    step = 0.4e9 / max(rows - 1, 1)
    for i in range(rows):
        r = i + 2
        # every 997th case: a faulty negative voltage, an error value down the row
        volts = -1000.0 if i % 997 == 500 else 80e3 * (1 + TOLERANCES[i % len(TOLERANCES)])
        ws.append([2.8e9 + i * step, volts] + [f.format(r=r) for f in formulas]
                  + [SUMMARY.format(r=r)])
    wb.save(path)
    return path


def build_distinct(path: str, cells: int) -> str:
    """``cells`` distinct short formulas: no two share a relative shape.

    Column A holds inputs; column B formula ``i`` adds a different constant to
    a different input, and every fifth one reads the formula above it, so the
    general engine compiles, orders and evaluates every cell on its own.
    """
    import openpyxl

    wb = openpyxl.Workbook(write_only=True)
    ws = wb.create_sheet("Distinct")
    for i in range(cells):
        r = i + 1
        if i % 5 == 4:
            text = f"=B{r - 1}*{1 + i % 7}+{i}"
        else:
            text = f"=A{(i * 7919) % cells + 1}+{i}"
        ws.append([float(i % 1000), text])
    wb.save(path)
    return path


# ----------------------------------------------------------------------------- running

#: Our processes' environment (set by :func:`main`).
ENV = None


def _measured(cmd, cwd=None, env=None) -> dict:
    """Run one whole process: wall time and the peak memory of just that process
    (a small wrapper process reports its only child's ``ru_maxrss``)."""
    wrapper = ("import resource, subprocess, sys, time; t=time.perf_counter(); "
               "p=subprocess.run(sys.argv[1:], capture_output=True); "
               "e=time.perf_counter()-t; "
               "sys.stdout.write(f'{e} {resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss}"
               " {p.returncode}\\n'); sys.stderr.write(p.stderr.decode(errors='replace')[-800:])")
    done = subprocess.run([sys.executable, "-c", wrapper, *cmd], capture_output=True,
                          text=True, cwd=cwd, env=env, timeout=3600)
    try:
        s, kb, rc = done.stdout.split()
    except ValueError:
        raise RuntimeError(f"could not run {cmd}: {done.stderr}") from None
    return {"s": float(s), "mb": int(kb) / 1024.0, "rc": int(rc), "err": done.stderr}


def _env(tmp: str, bytecode: bool = True) -> dict:
    """Our processes' environment: this checkout first on the path; with
    ``bytecode``, compiled modules cached (in ``tmp``, never in the checkout), as
    an installed package has them (pip compiles them at install time)."""
    env = dict(os.environ)
    env["PYTHONPATH"] = ROOT + os.pathsep + env.get("PYTHONPATH", "")
    if bytecode:
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        env["PYTHONPYCACHEPREFIX"] = os.path.join(tmp, "pycache")
    else:
        env["PYTHONDONTWRITEBYTECODE"] = "1"
        env.pop("PYTHONPYCACHEPREFIX", None)
    return env


def ours(*args) -> list:
    return [sys.executable, "-m", "tubefuncs", *args]


class Calc:
    """LibreOffice headless with a private profile of its own."""

    def __init__(self, tmp: str):
        self.exe = shutil.which("soffice") or shutil.which("libreoffice")
        self.reason = "" if self.exe else "soffice not found on PATH: LibreOffice skipped"
        self.profile = os.path.join(tmp, "lo-profile")
        self.outdir = os.path.join(tmp, "lo-out")

    def command(self, path: str) -> list:
        return [self.exe, f"-env:UserInstallation=file://{self.profile}", "--headless",
                "--norestore", "--convert-to", "xlsx", "--outdir", self.outdir, path]

    def warm_up(self, path: str) -> None:
        if self.exe:
            subprocess.run(self.command(path), capture_output=True, timeout=600)


def _median(runs: list) -> dict:
    return {"s": statistics.median(r["s"] for r in runs),
            "mb": statistics.median(r["mb"] for r in runs),
            "spread": (min(r["s"] for r in runs), max(r["s"] for r in runs)),
            "rc": max(r["rc"] for r in runs), "err": runs[-1].get("err", "")}


def side_by_side(label: str, our_cmd: list, calc: Calc, calc_path: str | None,
                 repeat: int, rows: list, env=None) -> None:
    """Alternate our run and LibreOffice's, ``repeat`` times each; append a row."""
    mine, theirs = [], []
    for _ in range(repeat):
        mine.append(_measured(our_cmd, cwd=ROOT, env=env or ENV))
        if calc.exe and calc_path:
            theirs.append(_measured(calc.command(calc_path)))
    a = _median(mine)
    if a["rc"] not in (0, 1):
        print(f"  !! {label}: tubefuncs exit {a['rc']}: {a['err'][-300:]}")
    b = _median(theirs) if theirs else None
    rows.append((label, a, b))
    _print_row(label, a, b)


def _print_row(label, a, b) -> None:
    line = f"  {label:44s} ours {a['s']:6.2f} s {a['mb']:6.0f} MB"
    if b is not None:
        line += (f" | LibreOffice {b['s']:6.2f} s {b['mb']:6.0f} MB | time {a['s'] / b['s']:5.2f}x"
                 f"  memory {a['mb'] / b['mb']:5.2f}x")
    line += f"   (ours {a['spread'][0]:.2f}-{a['spread'][1]:.2f} s)"
    print(line, flush=True)


_WORK = ("import json, resource, sys, time\n"
         "from tubefuncs.headless import recalculate, write_recalculated\n"
         "t = time.perf_counter()\n"
         "r = recalculate(sys.argv[1], engine='general')\n"
         "write_recalculated(r, sys.argv[2])\n"
         "print(json.dumps({'work': time.perf_counter() - t, 'cells': r.formula_cells,\n"
         "                  'mb': resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}))")


def distinct_case(tmp: str, cells: int, repeat: int) -> dict:
    """The whole ``tubefuncs recalc --engine general`` process (time, peak memory)
    and, in a process of its own, the work after the imports (read, compile,
    evaluate, write): per-cell costs compare that, free of start-up noise."""
    path = build_distinct(os.path.join(tmp, f"distinct_{cells}.xlsx"), cells)
    out = os.path.join(tmp, f"distinct_{cells}_out.xlsx")
    runs = [_measured(ours("recalc", path, "-o", out, "--engine", "general"), cwd=ROOT,
                      env=ENV) for _ in range(repeat)]
    r = _median(runs)
    if r["rc"] != 0:
        print(f"  !! distinct {cells}: exit {r['rc']}: {r['err'][-300:]}")
    work = []
    for _ in range(repeat):
        done = subprocess.run([sys.executable, "-c", _WORK, path, out], capture_output=True,
                              text=True, cwd=ROOT, env=ENV, timeout=3600)
        work.append(json.loads(done.stdout.strip().splitlines()[-1])["work"])
    r["work"] = statistics.median(work)
    return r


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--rows", type=int, default=10_000)
    parser.add_argument("--big-rows", type=int, default=100_000)
    parser.add_argument("--distinct", type=int, default=300_000)
    parser.add_argument("--quick", action="store_true",
                        help="demos and the small sweep only")
    parser.add_argument("--distinct-only", action="store_true",
                        help="the distinct-formula case only")
    args = parser.parse_args(argv)
    rows = []
    with tempfile.TemporaryDirectory(prefix="tubefuncs-bench-") as tmp:
        global ENV
        ENV = _env(tmp)
        calc = Calc(tmp)
        if calc.reason:
            print(f"NOTE: {calc.reason}")
        print(f"python {sys.version.split()[0]}, {os.cpu_count()} cores, load "
              f"{os.getloadavg()[0]:.2f}; medians of {args.repeat} runs, ours and "
              f"LibreOffice alternating")
        calc.warm_up(os.path.join(WORKBOOKS, DEMOS[0]))
        # warm-up: compiled-module caches for every path measured below
        tiny = build_sweep(os.path.join(tmp, "tiny.xlsx"), 20)
        for warm in (ours("check", os.path.join(WORKBOOKS, DEMOS[0])),
                     ours("recalc", tiny, "-o", os.path.join(tmp, "tiny_out.xlsx")),
                     ours("recalc", tiny, "-o", os.path.join(tmp, "tiny_out.xlsx"),
                          "--engine", "general")):
            _measured(warm, cwd=ROOT, env=ENV)
        print("1. cold check of the demo workbooks (target <= 0.5x)")
        for name in () if args.distinct_only else DEMOS:
            path = os.path.join(WORKBOOKS, name)
            side_by_side(f"check {name}", ours("check", path), calc, path, args.repeat, rows)
        path = os.path.join(WORKBOOKS, DEMOS[0])
        if not args.distinct_only:
            side_by_side(f"check {DEMOS[0]}, no bytecode cache", ours("check", path), calc,
                         path, args.repeat, rows, env=_env(tmp, bytecode=False))
        sizes = [] if args.distinct_only else [args.rows] + ([] if args.quick else
                                                              [args.big_rows])
        for n in sizes:
            tube = build_sweep(os.path.join(tmp, f"sweep_{n}.xlsx"), n)
            native = build_sweep(os.path.join(tmp, f"sweep_{n}_native.xlsx"), n, native=True)
            target = "0.6x" if n <= 10_000 else "0.5x"
            print(f"2. sweep of {n:,} rows, {6 * n:,} formula cells, recalc (target <= "
                  f"{target}, memory <= LibreOffice's)")
            out = os.path.join(tmp, f"sweep_{n}_out.xlsx")
            side_by_side(f"recalc sweep {n:,} rows (catalogue calls)",
                         ours("recalc", tube, "-o", out), calc, native, args.repeat, rows)
            side_by_side(f"recalc sweep {n:,} rows (native formulas)",
                         ours("recalc", native, "-o", out), _NoCalc(), None, args.repeat, rows)
        if not args.quick:
            print(f"3. distinct formulas through the general engine (target: per-cell "
                  f"cost of {args.distinct:,} within 1.5x of 10,000's)")
            small = distinct_case(tmp, 10_000, args.repeat)
            big = distinct_case(tmp, args.distinct, max(1, args.repeat - 1))
            per_small = small["work"] / 10_000
            per_big = big["work"] / args.distinct
            per_cell_kb = (big["mb"] - small["mb"]) * 1024 / (args.distinct - 10_000)
            print(f"  10,000 distinct: {small['s']:.2f} s, peak {small['mb']:.0f} MB; "
                  f"{args.distinct:,} distinct: {big['s']:.2f} s, peak {big['mb']:.0f} MB "
                  f"(whole processes)")
            print(f"  per cell, work after the imports: {per_small * 1e6:.1f} us vs "
                  f"{per_big * 1e6:.1f} us: {per_big / per_small:.2f}x (target <= 1.5x); "
                  f"peak memory per cell {per_cell_kb:.2f} KB")
    return 0


def run() -> int:
    """Entry for ``run_all.py``: the default figures."""
    return main([])


class _NoCalc:
    exe = None
    reason = ""


if __name__ == "__main__":
    sys.exit(main())
