"""``tubefuncs plot``: small-signal gain and phase of a cavity table, as a PNG.

Reads a cavity table (one row per cavity, input first; columns position [m],
resonant frequency [Hz], R/Q [ohm, circuit], Q0, Qext (empty = idle), gap
length [m]) from a CSV file or from a workbook range, takes the beam from
options, sweeps the frequency and writes a two-panel figure: gain (dB) with
the 1 dB bandwidth marked, and the phase of the output-gap voltage relative
to the drive (deg).  The physics is `tubefuncs.physics.gain`.

Examples::

    tubefuncs plot cavities.csv --voltage "90 kV" --current "27 A" \\
        --beam-radius "4 mm" --tunnel-radius "6 mm" -o gain.png
    tubefuncs plot station.xlsx "Tube!B4:G9" --voltage 90e3 --current 27 \\
        --beam-radius 4e-3 --tunnel-radius 6e-3 --start "2.95 GHz" --stop "3.05 GHz"

Exit status: 0 written, 2 unusable input (message on stderr).
"""

from __future__ import annotations

import argparse
import csv
import math
import re
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .physics import gain

EXIT_OK, EXIT_UNUSABLE = 0, 2
WORKBOOK_SUFFIXES = (".xlsx", ".xlsm")
DEFAULT_POINTS = 721


class PlotInputError(ValueError):
    """An input the plot command cannot use; the message says why."""


# --- numbers with units ------------------------------------------------------------

def quantity(text: str, unit: str, name: str) -> float:
    """A number in SI ``unit``: plain ("90e3") or with a unit ("90 kV", "4 mm").

    Read by the package's units layer (`tubefuncs.units.to_si`): case-sensitive
    (mm and Mm differ), and a unit of the wrong dimension is an error naming
    the option.
    """
    from .units import UnitTextError, to_si

    try:
        value = to_si(str(text).strip(), unit)
    except UnitTextError as exc:
        raise PlotInputError(f"--{name}: {exc}") from None
    if not math.isfinite(value):
        raise PlotInputError(f"--{name}: {text!r} is not a finite number")
    return value


# --- reading the table -------------------------------------------------------------

def _cell_number(value, where: str) -> float | None:
    """Float of a cell, NaN for empty, None for text (a header)."""
    if value is None:
        return math.nan
    if isinstance(value, bool):
        raise PlotInputError(f"{where}: TRUE/FALSE is not a number")
    if isinstance(value, (int, float)):
        return float(value)
    text = str(value).strip()
    if text == "":
        return math.nan
    try:
        return float(text)
    except ValueError:
        return None


def _rows_to_table(rows, source: str) -> np.ndarray:
    """Numbers of the rows; leading rows of text (headers) are skipped."""
    table = []
    for i, row in rows:
        numbers = [_cell_number(v, f"{source} row {i}") for v in row]
        if any(x is None for x in numbers):
            if not table and all(x is None or math.isnan(x) for x in numbers):
                continue  # a header row above the numbers
            bad = next(v for v, x in zip(row, numbers) if x is None)
            raise PlotInputError(f"{source} row {i}: {str(bad)[:40]!r} is not a number")
        table.append(numbers)
    if not table:
        raise PlotInputError(f"{source}: no rows of numbers found")
    widths = {len(r) for r in table}
    if len(widths) != 1:
        raise PlotInputError(f"{source}: rows have different numbers of cells {sorted(widths)}")
    return np.array(table, dtype=float)


def read_csv(path: Path) -> np.ndarray:
    """Cavity table from a CSV file: '#' lines are comments, a header row is skipped."""
    try:
        text = path.read_text(encoding="utf-8-sig")
    except OSError as exc:
        raise PlotInputError(f"cannot read {path}: {exc.strerror or exc}") from exc
    lines = [(n, line) for n, line in enumerate(text.splitlines(), start=1)
             if line.strip() and not line.lstrip().startswith("#")]
    rows = []
    for (n, _), row in zip(lines, csv.reader([line for _, line in lines])):
        # empty cells after the table's columns (a spreadsheet export) are not a column
        while len(row) > gain.N_COLUMNS and not row[-1].strip():
            row.pop()
        rows.append((n, row))
    return _rows_to_table(rows, path.name)


_RANGE = re.compile(r"^(?:'((?:[^']|'')+)'|([^!']+))!\$?([A-Za-z]{1,3})\$?(\d+)"
                    r"(?::\$?([A-Za-z]{1,3})\$?(\d+))?$")


def read_workbook_range(path: Path, ref: str) -> np.ndarray:
    """Cavity table from a workbook range such as ``Sheet1!B4:G9`` (cached values)."""
    from openpyxl import load_workbook
    from openpyxl.utils import column_index_from_string

    match = _RANGE.match(ref.strip())
    if not match:
        raise PlotInputError(f"range {ref!r}: expected SHEET!A1:F7, e.g. Sheet1!B4:G9")
    sheet = (match.group(1) or "").replace("''", "'") or match.group(2)
    col1, row1 = column_index_from_string(match.group(3).upper()), int(match.group(4))
    col2 = column_index_from_string((match.group(5) or match.group(3)).upper())
    row2 = int(match.group(6) or match.group(4))
    if col2 < col1 or row2 < row1:
        raise PlotInputError(f"range {ref!r}: give the top-left cell first")
    if (col2 - col1 + 1) * (row2 - row1 + 1) > 10_000:
        raise PlotInputError(f"range {ref!r}: too large for a cavity table")
    try:
        values = load_workbook(path, read_only=True, data_only=True)
        formulas = load_workbook(path, read_only=True, data_only=False)
    except Exception as exc:  # openpyxl raises many kinds for a bad file
        raise PlotInputError(f"cannot read workbook {path.name}: {exc}") from exc
    try:
        if sheet not in values.sheetnames:
            raise PlotInputError(f"{path.name}: no sheet {sheet!r} (sheets: "
                                 f"{', '.join(values.sheetnames)})")
        cells = values[sheet].iter_rows(min_row=row1, max_row=row2, min_col=col1,
                                        max_col=col2, values_only=True)
        raw = formulas[sheet].iter_rows(min_row=row1, max_row=row2, min_col=col1,
                                        max_col=col2, values_only=True)
        rows = []
        for i, (row, src) in enumerate(zip(cells, raw), start=row1):
            for v, s in zip(row, src):
                if v is None and isinstance(s, str) and s.startswith("="):
                    raise PlotInputError(
                        f"{sheet}!row {i}: a formula without a saved value (file not saved "
                        "by a spreadsheet application); run 'tubefuncs recalc' first")
            rows.append((i, list(row)))
    finally:
        values.close()
        formulas.close()
    return _rows_to_table(rows, f"{path.name} {sheet}")


def read_table(source: str, ref: str | None) -> np.ndarray:
    path = Path(source)
    if path.suffix.lower() in WORKBOOK_SUFFIXES:
        if not ref:
            raise PlotInputError(f"{path.name} is a workbook: give the range of the cavity "
                                 "table too, e.g. \"Sheet1!B4:G9\"")
        if not path.is_file():
            raise PlotInputError(f"no such workbook: {source}")
        return read_workbook_range(path, ref)
    if ref:
        raise PlotInputError("a range applies to a workbook (.xlsx, .xlsm), not to "
                             f"{path.name}")
    return read_csv(path)


# --- computing and drawing -----------------------------------------------------------

@dataclass(frozen=True)
class Beam:
    voltage: float
    current: float
    beam_radius: float
    tunnel_radius: float


def default_sweep(cavities: np.ndarray) -> tuple[float, float]:
    """A band covering every cavity's resonance with a margin (half the spread, >= 1 %)."""
    f0 = cavities[:, gain.F0]
    low, high = float(np.nanmin(f0)), float(np.nanmax(f0))
    centre = 0.5 * (low + high)
    half = max(0.75 * (high - low), 0.01 * centre)
    return centre - half, centre + half


def _frequency_scale(span_hz: float) -> tuple[float, str]:
    return (1e9, "GHz") if span_hz >= 0.5e9 else (1e6, "MHz")


def sweep(cavities, beam: Beam, start: float, stop: float, points: int):
    """Frequencies, gain [dB], phase [deg wrapped] and the validation problems."""
    f = np.linspace(start, stop, points)
    args = (beam.voltage, beam.current, beam.beam_radius, beam.tunnel_radius)
    resp = gain.small_signal_response(f, *args, cavities)
    problems = gain.validate_cavities(cavities, f, *args)
    return f, resp.gain_db, resp.phase_deg, problems


def draw(f, gain_db, phase_deg, beam: Beam, n_cavities: int, output: Path,
         title: str | None = None, drop_db: float = 1.0, dpi: int = 150) -> dict:
    """Write the figure; return the numbers it shows (peak, band edges)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    scale, unit = _frequency_scale(f[-1] - f[0])
    x = f / scale
    finite = np.isfinite(gain_db)
    peak = int(np.nanargmax(np.where(finite, gain_db, -np.inf)))
    f_low, f_high = gain.bandwidth(f, gain_db, drop_db)

    # Unwrapped phase, pinned to the worksheet value (wrapped) at the gain peak.
    phase = np.full(f.shape, np.nan)
    if np.any(finite):
        unwrapped = np.degrees(np.unwrap(np.radians(phase_deg[finite])))
        idx = np.flatnonzero(finite)
        unwrapped += phase_deg[peak] - unwrapped[np.searchsorted(idx, peak)]
        phase[idx] = unwrapped

    fig, (ax_g, ax_p) = plt.subplots(2, 1, sharex=True, figsize=(8.5, 7.0),
                                     gridspec_kw={"height_ratios": [3, 2]})
    ax_g.plot(x, gain_db, color="tab:blue", lw=1.8, label="small-signal gain")
    ax_p.plot(x, phase, color="tab:purple", lw=1.5)

    band_text = f"{drop_db:g} dB bandwidth: "
    if np.isfinite(f_low) and np.isfinite(f_high):
        band_text += (f"{(f_high - f_low) / 1e6:.3g} MHz "
                      f"({f_low / scale:.5g} to {f_high / scale:.5g} {unit})")
        for ax in (ax_g, ax_p):
            ax.axvspan(f_low / scale, f_high / scale, color="tab:green", alpha=0.12, lw=0)
        for edge in (f_low, f_high):
            for ax in (ax_g, ax_p):
                ax.axvline(edge / scale, color="tab:green", ls="--", lw=1.0)
        ax_g.annotate("", xy=(f_low / scale, gain_db[peak] - drop_db),
                      xytext=(f_high / scale, gain_db[peak] - drop_db),
                      arrowprops={"arrowstyle": "<->", "color": "tab:green"})
    else:
        band_text += "wider than the sweep: widen --start/--stop"
    ax_g.axhline(gain_db[peak] - drop_db, color="tab:green", lw=0.8, ls=":")
    ax_g.plot([x[peak]], [gain_db[peak]], "o", color="tab:red", ms=5,
              label=f"peak {gain_db[peak]:.2f} dB at {x[peak]:.5g} {unit}")
    ax_g.plot([], [], ls="--", color="tab:green", label=band_text)

    ax_g.set_ylabel("Gain P_out / P_avail (dB)")
    ax_p.set_ylabel("Phase of output gap vs drive (deg)")
    ax_p.set_xlabel(f"Frequency ({unit})")
    for ax in (ax_g, ax_p):
        ax.grid(True, which="major", alpha=0.5)
        ax.grid(True, which="minor", alpha=0.2)
        ax.minorticks_on()
    top = np.nanmax(gain_db)
    ax_g.set_ylim(max(np.nanmin(gain_db), top - 60.0) - 2.0, top + 5.0)
    ax_g.legend(loc="lower center", fontsize=8.5, framealpha=0.9)

    heading = title or f"Small-signal gain and phase, {n_cavities}-cavity klystron"
    ax_g.set_title(heading, fontsize=12)
    fig.text(0.5, 0.005,
             f"Beam {beam.voltage / 1e3:.4g} kV, {beam.current:.4g} A, beam radius "
             f"{beam.beam_radius * 1e3:.3g} mm, tunnel radius {beam.tunnel_radius * 1e3:.3g} mm."
             "  Space-charge-wave small-signal model (tubefuncs); design estimate.",
             ha="center", va="bottom", fontsize=7.5, color="0.3")
    ax_p.set_title("Phase unwrapped over the sweep; equals TUBE_SMALL_SIGNAL_PHASE at the "
                   "peak", fontsize=8.5, color="0.3")
    fig.tight_layout(rect=(0, 0.03, 1, 1))
    fig.savefig(output, dpi=dpi)
    plt.close(fig)
    return {"peak_db": float(gain_db[peak]), "peak_frequency": float(f[peak]),
            "f_low": f_low, "f_high": f_high}


# --- command line ------------------------------------------------------------------

def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="tubefuncs plot",
        description="Plot the small-signal gain (dB) and phase (deg) of a multi-cavity "
                    "klystron against frequency, with the 1 dB bandwidth marked.",
        epilog="Table columns: position (m), resonant frequency (Hz), R/Q (ohm, circuit), "
               "Q0, Qext (empty = idle cavity), gap length (m); input cavity first. "
               "Numbers may carry a unit: \"90 kV\", \"4 mm\", \"2.95 GHz\".")
    p.add_argument("table", metavar="TABLE", help="CSV file, or a workbook (.xlsx/.xlsm)")
    p.add_argument("range", metavar="RANGE", nargs="?",
                   help="workbook range of the table, e.g. \"Sheet1!B4:G9\"")
    beam = p.add_argument_group("beam (required)")
    beam.add_argument("--voltage", required=True, help="beam voltage (V)")
    beam.add_argument("--current", required=True, help="beam current (A)")
    beam.add_argument("--beam-radius", required=True, help="beam radius (m)")
    beam.add_argument("--tunnel-radius", required=True, help="tunnel radius (m)")
    p.add_argument("--start", help="first frequency (Hz); default: below the lowest cavity")
    p.add_argument("--stop", help="last frequency (Hz); default: above the highest cavity")
    p.add_argument("--points", type=int, default=DEFAULT_POINTS,
                   help="number of frequencies (default %(default)d)")
    p.add_argument("--drop", type=float, default=1.0,
                   help="bandwidth drop below the peak, dB (default %(default)g)")
    p.add_argument("--title", help="figure title")
    p.add_argument("--dpi", type=int, default=150, help="resolution (default %(default)d)")
    p.add_argument("-o", "--output", help="PNG to write (default: TABLE's name + _gain.png, "
                                          "in the current folder)")
    return p


def run(args) -> int:
    beam = Beam(quantity(args.voltage, "V", "voltage"), quantity(args.current, "A", "current"),
                quantity(args.beam_radius, "m", "beam-radius"),
                quantity(args.tunnel_radius, "m", "tunnel-radius"))
    for name, value in vars(beam).items():
        if not value > 0:
            raise PlotInputError(f"--{name.replace('_', '-')} must be > 0 (got {value:g})")
    if not 10 <= args.points <= 100_000:
        raise PlotInputError(f"--points must be 10 to 100000 (got {args.points})")
    if not args.drop > 0:
        raise PlotInputError(f"--drop must be > 0 dB (got {args.drop:g})")
    output = Path(args.output) if args.output else Path(Path(args.table).stem + "_gain.png")
    from .headless.problems import WorkbookError
    from .headless.writer import check_output

    try:
        check_output(output, [args.table])     # the same refusals as recalc, before any work
    except WorkbookError as exc:
        raise PlotInputError(exc.message) from None
    cavities = read_table(args.table, args.range)
    table_problems = gain.validate_cavities(cavities)
    if table_problems:
        raise PlotInputError("; ".join(table_problems[:5]))
    start, stop = default_sweep(cavities)
    if args.start:
        start = quantity(args.start, "Hz", "start")
    if args.stop:
        stop = quantity(args.stop, "Hz", "stop")
    if not 0 < start < stop:
        raise PlotInputError(f"need 0 < start < stop (got {start:g} Hz, {stop:g} Hz)")
    f, g, ph, problems = sweep(cavities, beam, start, stop, args.points)
    if not np.any(np.isfinite(g)):
        raise PlotInputError("no frequency gives a result: " + ("; ".join(problems[:3])
                             or "outside the small-signal model"))
    for problem in problems:
        print(f"tubefuncs plot: warning: {problem} (not plotted there)", file=sys.stderr)
    shown = draw(f, g, ph, beam, len(cavities), output, args.title, args.drop, args.dpi)
    width = shown["f_high"] - shown["f_low"]
    band = f"{width / 1e6:.4g} MHz" if math.isfinite(width) else "wider than the sweep"
    print(f"wrote {output}: peak {shown['peak_db']:.2f} dB at "
          f"{shown['peak_frequency'] / 1e9:.6g} GHz, {args.drop:g} dB bandwidth {band}")
    return EXIT_OK


def main(argv=None) -> int:
    parser = build_parser()
    args = parser.parse_args(sys.argv[1:] if argv is None else list(argv))
    try:
        return run(args)
    except PlotInputError as exc:
        print(f"tubefuncs plot: {exc}", file=sys.stderr)
        return EXIT_UNUSABLE


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
