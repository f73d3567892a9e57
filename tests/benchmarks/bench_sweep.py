"""A 10,000-row sweep workbook: fast path vs general engine vs LibreOffice.

    python tests/benchmarks/bench_sweep.py [--rows 10000] [--repeat 2] [--no-general]
                                     [--no-libreoffice]

The generated sweep (an invented S-band station: frequency swept over 2.8-3.2
GHz, beam voltage in five tolerance cases around 80 kV, a few rows with a
faulty negative voltage) has one row per case with four catalogue calls
(transit angle, gridded gap coupling, waveguide run loss, free-space path loss)
and one column of arithmetic and standard functions: 50,000 formula cells for
10,000 rows.  A second copy writes the four catalogue calls as native
closed-form Excel formulas (the same physics), for LibreOffice.

Measured side by side in one run (each figure the best of ``--repeat`` runs),
each path in its own process (so that peak memory, ``ru_maxrss``, is its own):

- the general engine and the fast path: whole recalculation (read, compile,
  evaluate) plus writing the recalculated copy, with the breakdown, warm (the
  libraries imported and a small workbook recalculated first); and the fast
  path cold, as the ``tubefuncs recalc`` command (interpreter start and
  imports included);
- LibreOffice headless (``soffice --headless --convert-to xlsx``) on the
  native copy, which it recalculates on load (an openpyxl-written file holds no
  cached values; the benchmark checks the values LibreOffice saved against
  ours), and our fast path on that same native copy.  (For the square root of
  a negative number LibreOffice saves ``#VALUE!`` where Excel and tubefuncs
  give ``#NUM!``: the faulty rows show it.)

Peak memory targets at most 1 GB per path.  Figures are printed, not asserted.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path.insert(0, ROOT)

TOLERANCES = (-0.05, -0.02, 0.0, 0.02, 0.05)      # beam-voltage cases around nominal
SETUP = {                                          # name: (cell, value, note)
    "gap": ("B2", 0.012, "input gap length [m]"),
    "v_nominal": ("B3", 80e3, "nominal beam voltage [V]"),
    "wg_a": ("B4", 0.07214, "waveguide broad wall [m]"),
    "wg_b": ("B5", 0.03404, "waveguide narrow wall [m]"),
    "run": ("B6", 25.0, "waveguide run to the antenna [m]"),
    "distance": ("B7", 40e3, "slant range to the target [m]"),
}

#: The catalogue calls of a row, and the same physics as closed-form Excel
#: formulas (relativistic velocity from the rest energy 510998.95 eV; copper
#: walls at 58 MS/m; vacuum impedance mu0 c; 20/ln 10 dB per neper).
TUBE_ROW = {
    "C": "=TUBE_TRANSIT_ANGLE(A{r}, gap, B{r})",
    "D": "=TUBE_GAP_COUPLING(A{r}, gap, B{r})",
    "E": "=TUBE_WAVEGUIDE_LOSS(A{r}, wg_a, wg_b, run)",
    "F": "=TUBE_FSPL(A{r}, distance)",
}
NATIVE_ROW = {
    "C": "=2*PI()*A{r}*gap/(299792458*SQRT(1-1/(1+B{r}/510998.9506917531)^2))",
    "D": "=SIN(C{r}/2)/(C{r}/2)",
    "E": ("=(20/LN(10))*run*SQRT(PI()*A{r}*1.25663706127E-06/58000000)"
          "*(1+2*(wg_b/wg_a)*(299792458/(2*wg_a*A{r}))^2)"
          "/(wg_b*376.73031341202994*SQRT(1-(299792458/(2*wg_a*A{r}))^2))"),
    "F": "=20*LOG10(4*PI()*distance*A{r}/299792458)",
}
SUMMARY = '=IF(E{r}>0.6, "check run", ROUND(20*LOG10(ABS(D{r}))-F{r}/100+SQRT(C{r}), 3))'


def build_sweep(path: str, rows: int = 10_000, native: bool = False) -> str:
    """Write the sweep workbook (``native``: closed-form formulas, no catalogue calls)."""
    import openpyxl
    from openpyxl.workbook.defined_name import DefinedName

    wb = openpyxl.Workbook()
    setup = wb.active
    setup.title = "Setup"
    setup["A1"], setup["B1"], setup["C1"] = "parameter", "value", "note"
    for name, (cell, value, note) in SETUP.items():
        row = cell[1:]
        setup[f"A{row}"], setup[cell], setup[f"C{row}"] = name, value, note
        wb.defined_names[name] = DefinedName(name, attr_text=f"Setup!${cell[0]}${row}")
    ws = wb.create_sheet("Sweep")
    for col, title in zip("ABCDEFG", ("frequency [Hz]", "beam voltage [V]", "transit angle [rad]",
                                       "coupling M", "run loss [dB]", "path loss [dB]",
                                       "summary")):
        ws[f"{col}1"] = title
    formulas = NATIVE_ROW if native else TUBE_ROW
    step = 0.4e9 / max(rows - 1, 1)
    for i in range(rows):
        r = i + 2
        ws.cell(r, 1, 2.8e9 + i * step)
        case = TOLERANCES[i % len(TOLERANCES)]
        # every 997th case: a faulty negative voltage, an error value down the row
        ws.cell(r, 2, -1000.0 if i % 997 == 500 else 80e3 * (1 + case))
        for col, text in formulas.items():
            ws[f"{col}{r}"] = text.format(r=r)
        ws[f"G{r}"] = SUMMARY.format(r=r)
    wb.save(path)
    return path


# ----------------------------------------------------------------------------- children

def _maxrss_mb(who=resource.RUSAGE_SELF) -> float:
    return resource.getrusage(who).ru_maxrss / 1024.0     # KiB on Linux


def _child_engine(engine: str, path: str, out: str, snapshot: str, repeat: str) -> dict:
    from tubefuncs.headless import recalculate, write_recalculated, write_snapshot

    with tempfile.TemporaryDirectory() as tmp:            # warm-up: imports, caches
        small = build_sweep(os.path.join(tmp, "small.xlsx"), rows=20)
        write_recalculated(recalculate(small, engine=engine), os.path.join(tmp, "o.xlsx"))
    best = None
    for _ in range(int(repeat)):                          # the best of a few runs
        t0 = time.perf_counter()
        recalc = recalculate(path, engine=engine)
        t1 = time.perf_counter()
        write_recalculated(recalc, out)
        t2 = time.perf_counter()
        result = dict(recalc.timings, recalc=t1 - t0, write=t2 - t1, total=t2 - t0,
                      cells=recalc.formula_cells, stats=recalc.stats)
        if best is None or result["total"] < best["total"]:
            best = result
    best["maxrss_mb"] = _maxrss_mb()
    write_snapshot(recalc, snapshot)                     # for the comparison, untimed
    return best


def _child_soffice(soffice: str, profile: str, path: str, outdir: str) -> dict:
    cmd = [soffice, f"-env:UserInstallation=file://{profile}", "--headless", "--norestore",
           "--convert-to", "xlsx", "--outdir", outdir, path]
    t0 = time.perf_counter()
    done = subprocess.run(cmd, capture_output=True, text=True, timeout=1800)
    elapsed = time.perf_counter() - t0
    return {"total": elapsed, "returncode": done.returncode,
            "maxrss_mb": _maxrss_mb(resource.RUSAGE_CHILDREN),
            "stderr": done.stderr.strip()[-300:]}


def _best(runs: list) -> dict:
    return min(runs, key=lambda r: r["total"])


def _spawn(*args) -> dict:
    done = subprocess.run([sys.executable, os.path.abspath(__file__), "--child", *args],
                          capture_output=True, text=True, timeout=3600)
    if done.returncode != 0:
        raise RuntimeError(f"benchmark child {args[0]} failed:\n{done.stderr[-2000:]}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def _cold_cli(engine: str, path: str, out: str, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-m", "tubefuncs.cli", "recalc", path, "-o", out,
                        "--engine", engine], check=True, capture_output=True, cwd=ROOT)
        times.append(time.perf_counter() - t0)
    return min(times)


# ----------------------------------------------------------------------------- checks

def _snapshot_values(path: str) -> dict:
    from tubefuncs.headless.snapshot import parse_value

    out = {}
    with open(path, encoding="utf-8") as fh:
        for line in fh:
            if line.startswith("#") or not line.strip():
                continue
            parts = line.rstrip("\n").split("\t")
            out[parts[0]] = parse_value(parts[1])
    return out


def _agree(a: dict, b: dict, rtol: float) -> tuple[int, int]:
    """(cells compared, cells differing): numbers within rtol, the rest identical."""
    bad = 0
    for key, x in a.items():
        y = b.get(key)
        if isinstance(x, float) and isinstance(y, float):
            ok = x == y or abs(x - y) <= rtol * max(abs(x), abs(y))
        else:
            ok = x is y or (type(x) is type(y) and x == y)
        bad += not ok
    return len(a), bad + len(set(a) ^ set(b))


def _libreoffice_values(path: str) -> dict:
    """Values LibreOffice saved for the sweep's formula cells (as snapshot keys)."""
    import openpyxl

    from tubefuncs.headless import values as V

    wb = openpyxl.load_workbook(path, data_only=True, read_only=True)
    out = {}
    for row in wb["Sweep"].iter_rows(min_row=2, min_col=3, max_col=7):
        for cell in row:
            value = cell.value
            if isinstance(value, str) and value in V.ERRORS:
                value = V.error(value)
            elif isinstance(value, (int, float)) and not isinstance(value, bool):
                value = float(value)
            out[f"Sweep!{cell.coordinate}"] = value
    wb.close()
    return out


# ----------------------------------------------------------------------------- report

def _line(label: str, r: dict) -> str:
    parts = [f"{label:34s} {r['total']:7.2f} s"]
    if "read" in r:
        parts.append(f"(read {r['read']:.2f}, compile {r['compile']:.2f}, evaluate "
                     f"{r['evaluate']:.3f}, write {r['write']:.2f})")
    parts.append(f"peak {r['maxrss_mb']:.0f} MB (target <= 1024)")
    return "  ".join(parts)


def run(rows: int = 10_000, general: bool = True, libreoffice: bool = True,
        repeat: int = 2) -> dict:
    """Build the sweep, measure every path (best of ``repeat`` runs each), print the
    comparison; returns the figures."""
    figures = {}
    rep = str(repeat)
    with tempfile.TemporaryDirectory() as tmp:
        tube = build_sweep(os.path.join(tmp, "sweep.xlsx"), rows)
        native = build_sweep(os.path.join(tmp, "sweep_native.xlsx"), rows, native=True)
        print(f"sweep: {rows} rows x 5 formula columns ({rows * 5:,} formula cells; 4 "
              f"catalogue calls per row), {os.path.getsize(tube) / 1e6:.1f} MB")
        print(f"each figure: the best of {repeat} runs")
        fast = figures["fast"] = _spawn("fast", tube, os.path.join(tmp, "fast.xlsx"),
                                        os.path.join(tmp, "fast.tsv"), rep)
        print(_line("fast path (warm)", fast))
        print(f"{'':34s} {fast['stats']}")
        if general:
            gen = figures["general"] = _spawn("general", tube, os.path.join(tmp, "gen.xlsx"),
                                              os.path.join(tmp, "gen.tsv"), rep)
            print(_line("general engine (warm)", gen))
            compared, differing = _agree(_snapshot_values(os.path.join(tmp, "gen.tsv")),
                                         _snapshot_values(os.path.join(tmp, "fast.tsv")), 1e-12)
            print(f"  speed-up, whole recalculation with read and write: "
                  f"{gen['total'] / fast['total']:6.1f}x   (target >= 30x)")
            print(f"  speed-up, recalculation without write:           "
                  f"{gen['recalc'] / fast['recalc']:6.1f}x")
            print(f"  speed-up, evaluation only:                       "
                  f"{gen['evaluate'] / fast['evaluate']:6.1f}x")
            print(f"  agreement: {compared - differing}/{compared} cells identical "
                  f"(numbers within 1e-12 relative)")
        cold = figures["cold_fast"] = _cold_cli("fast", tube, os.path.join(tmp, "cold.xlsx"),
                                                repeat)
        print(f"{'fast path, cold (tubefuncs recalc)':34s} {cold:7.2f} s  (interpreter start "
              f"and imports included)")
        soffice = shutil.which("soffice") or shutil.which("libreoffice")
        if not libreoffice:
            print("LibreOffice comparison not requested")
        elif soffice is None:
            print("LibreOffice comparison skipped: soffice is not installed")
        else:
            figures.update(_libreoffice(soffice, tmp, native, fast, cold, repeat))
    return figures


def _libreoffice(soffice: str, tmp: str, native: str, fast: dict, cold: float,
                 repeat: int) -> dict:
    profile = os.path.join(tmp, "lo-profile")
    outdir = os.path.join(tmp, "lo-out")
    tiny = build_sweep(os.path.join(tmp, "tiny.xlsx"), rows=2, native=True)
    _spawn("soffice", soffice, profile, tiny, outdir)            # first start: the profile
    start = _best([_spawn("soffice", soffice, profile, tiny, outdir) for _ in range(repeat)])
    lo = _best([_spawn("soffice", soffice, profile, native, outdir) for _ in range(repeat)])
    if lo["returncode"] != 0:
        print(f"LibreOffice failed: {lo['stderr']}")
        return {}
    ours = _spawn("fast", native, os.path.join(tmp, "native_fast.xlsx"),
                  os.path.join(tmp, "native_fast.tsv"), str(repeat))
    cold_native = _cold_cli("fast", native, os.path.join(tmp, "native_cold.xlsx"), repeat)
    print(_line("LibreOffice headless (native copy)", lo) +
          f"  (its start-up alone: {start['total']:.2f} s)")
    print(_line("fast path on the native copy", ours))
    print(f"{'fast path, cold, native copy':34s} {cold_native:7.2f} s")
    print(f"  fast path / LibreOffice, same native sheet:    {ours['total'] / lo['total']:5.2f}x"
          f" warm, {cold_native / lo['total']:5.2f}x cold   (target <= 1.0x)")
    print(f"  fast path (catalogue copy) / LibreOffice:      {fast['total'] / lo['total']:5.2f}x"
          f" warm, {cold / lo['total']:5.2f}x cold")
    saved = _libreoffice_values(os.path.join(tmp, "lo-out", "sweep_native.xlsx"))
    mine = {k: v for k, v in _snapshot_values(os.path.join(tmp, "native_fast.tsv")).items()
            if k.startswith("Sweep!")}
    catalogue = {k: v for k, v in _snapshot_values(os.path.join(tmp, "fast.tsv")).items()
                 if k.startswith("Sweep!")}
    from tubefuncs.headless import values as V

    numbers = {k: v for k, v in saved.items() if isinstance(v, float)}
    errors = {k: v for k, v in saved.items() if V.is_error(v)}
    print(f"  LibreOffice recalculated on load: {len(numbers):,} numbers and {len(errors)} "
          f"error values saved for {len(saved):,} formula cells")
    for label, ours_ in (("native copy", mine), ("catalogue copy", catalogue)):
        compared, differing = _agree({k: ours_.get(k) for k in numbers}, numbers, 1e-9)
        both = sum(V.is_error(ours_.get(k)) for k in errors)
        codes = sorted({f"{errors[k]} (LibreOffice) / {ours_.get(k)} (ours)" for k in errors
                        if ours_.get(k) is not errors[k]})
        print(f"    ours, {label}: {compared - differing:,}/{compared:,} numbers equal "
              f"(1e-9 relative); errors in the same {both}/{len(errors)} cells"
              + (f"; codes differ: {', '.join(codes)}" if codes else ""))
    return {"libreoffice": lo, "libreoffice_start": start, "native_fast": ours,
            "native_cold": cold_native}


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    if argv and argv[0] == "--child":
        kind, *rest = argv[1:]
        result = (_child_soffice(*rest) if kind == "soffice"
                  else _child_engine(kind, *rest))
        print(json.dumps(result, default=lambda o: str(o)))
        return 0
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=10_000)
    parser.add_argument("--no-general", action="store_true", help="skip the general engine")
    parser.add_argument("--no-libreoffice", action="store_true", help="skip LibreOffice")
    parser.add_argument("--repeat", type=int, default=2, help="runs per figure (the best "
                                                              "counts; default %(default)s)")
    args = parser.parse_args(argv)
    run(args.rows, general=not args.no_general, libreoffice=not args.no_libreoffice,
        repeat=max(1, args.repeat))
    return 0


if __name__ == "__main__":
    sys.exit(main())
