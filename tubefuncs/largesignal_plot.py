"""``tubefuncs plot transfer|applegate``: large-signal pictures of a cavity table, as PNG.

``transfer``: output power and efficiency against drive power (one batch of
drives from 30 dB below to 6 dB above the saturation drive), the saturation
point marked and the small-signal gain line for comparison.

``applegate``: every disk's RF phase (relative to an unmodulated electron)
against distance along the tube at one drive (default: the saturation
drive), the gaps shaded and numbered: where the bunches form, cross and
are caught by the output gap.

The cavity table and beam options are those of ``tubefuncs plot`` (the gain
plot, `tubefuncs.gain_plot`); the physics is
`tubefuncs.physics.largesignal`.

Examples::

    tubefuncs plot transfer tube.csv --voltage "290 kV" --current "273 A" \\
        --beam-radius "6 mm" --tunnel-radius "9.5 mm" --frequency "2.998 GHz"
    tubefuncs plot applegate station.xlsx "Tube!B5:G10" --voltage 290e3 ... \\
        --drive "350 W" -o bunches.png

Exit status: 0 written, 2 unusable input (message on stderr).

The figures are design estimates of an idealised model, not ratings.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

import numpy as np

from .gain_plot import EXIT_OK, EXIT_UNUSABLE, PlotInputError, quantity, read_table
from .physics import gain
from .physics.largesignal import model, results

KINDS = ("transfer", "applegate")
# our own look: ink-blue curves on a warm paper background, copper gap bands
_PAPER = "#fbf8f1"
_INK = "#1d3557"
_COPPER = "#c06014"
_SAGE = "#5b8c5a"


def _figure(width, height):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(figsize=(width, height), facecolor=_PAPER)
    ax.set_facecolor(_PAPER)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.grid(True, color="0.85", lw=0.6)
    return plt, fig, ax


def transfer_curve(frequency, beam, cavities, points=41):
    """Drives, output powers, efficiencies and the saturation point (one batch)."""
    v, i, b, a = beam
    sat = results.saturation(frequency, v, i, b, a, cavities)
    if not np.isfinite(sat.power):
        code, cav = int(sat.result.status), int(sat.result.cavity)
        raise PlotInputError("no saturation point: " + (results._text(code, cav)
                                                         or "outside the model"))
    drives = float(sat.drive) * 10.0 ** np.linspace(-3.0, 0.6, points)
    r = model.solve(frequency, v, i, b, a, cavities, drives)
    power = np.where(r.ok, r.load_power[-1], np.nan)
    return drives, power, power / (v * i), float(sat.drive), float(sat.power)


def draw_transfer(frequency, beam, cavities, output, title=None, dpi=150, points=41):
    drives, power, eff, d_sat, p_sat = transfer_curve(frequency, beam, cavities, points)
    g_ss = float(gain.small_signal_gain(frequency, *beam, cavities))
    plt, fig, ax = _figure(7.5, 4.6)
    ax.semilogx(drives, power / 1e6, color=_INK, lw=2.0, label="output power")
    if np.isfinite(g_ss):
        line = drives * 10 ** (g_ss / 10) / 1e6
        keep = line <= 1.3 * np.nanmax(power) / 1e6
        ax.semilogx(drives[keep], line[keep], color=_INK, lw=0.9, ls=(0, (4, 3)),
                    label=f"small-signal gain {g_ss:.1f} dB")
    ax.plot([d_sat], [p_sat / 1e6], marker="D", color=_COPPER, ms=6, ls="none",
            label=f"saturation {p_sat / 1e6:.3g} MW at {d_sat:.3g} W")
    ax.set_xlabel("drive power (W, available from a matched generator)")
    ax.set_ylabel("output power (MW)", color=_INK)
    ax2 = ax.twinx()
    ax2.semilogx(drives, 100 * eff, color=_SAGE, lw=1.4)
    ax2.set_ylabel("efficiency (%)", color=_SAGE)
    ax2.spines["top"].set_visible(False)
    ax2.set_ylim(0, max(60.0, 110 * np.nanmax(eff)))
    ax.set_ylim(0, 1.15 * p_sat / 1e6)
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    fig.suptitle(title or f"Transfer curve at {frequency / 1e9:.6g} GHz "
                 f"({beam[0] / 1e3:.4g} kV, {beam[1]:.4g} A)", fontsize=11, color=_INK)
    fig.text(0.01, 0.01, "large-signal disk model: design estimate, not a rating",
             fontsize=7, color="0.4")
    fig.tight_layout(rect=(0, 0.03, 1, 1))
    fig.savefig(output, dpi=dpi, facecolor=_PAPER)
    plt.close(fig)
    return {"saturation_drive": d_sat, "saturated_power": p_sat}


def draw_applegate(frequency, beam, cavities, drive, output, title=None, dpi=150, disks=32):
    v, i, b, a = beam
    # solved at the worksheet functions' accuracy, so the power in the title is theirs;
    # about `disks` of the disks are drawn, to keep the picture readable
    r = model.solve(frequency, v, i, b, a, cavities, drive, record=True)
    if not r.ok:
        raise PlotInputError(results._text(int(r.status), int(r.cavity)) or "outside the model")
    z = r.z
    every = max(1, r.phases.shape[1] // max(1, int(disks)))
    phase = np.degrees(np.unwrap(r.phases[:, ::every], axis=0))
    phase -= phase[0].mean()
    plt, fig, ax = _figure(8.0, 5.0)
    for n, row in enumerate(cavities, start=1):
        zc, d = row[gain.POS], row[gain.GAP]
        ax.axvspan(zc - d / 2, zc + d / 2, color=_COPPER, alpha=0.18, lw=0)
        ax.text(zc, 1.0, f"{n}", transform=ax.get_xaxis_transform(), ha="center",
                va="bottom", fontsize=8, color=_COPPER)
    ax.plot(z, phase, color=_INK, lw=0.7, alpha=0.8)
    ax.set_xlabel("distance along the tube (m)")
    ax.set_ylabel("RF phase relative to an unmodulated electron (deg)")
    p_out = float(r.load_power[-1])
    fig.suptitle(title or f"Applegate diagram: {drive:.3g} W drive, {p_out / 1e6:.3g} MW out",
                 fontsize=11, color=_INK)
    fig.text(0.01, 0.01, "large-signal disk model: design estimate, not a rating",
             fontsize=7, color="0.4")
    fig.tight_layout(rect=(0, 0.03, 1, 0.96))
    fig.savefig(output, dpi=dpi, facecolor=_PAPER)
    plt.close(fig)
    return {"output_power": p_out}


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="tubefuncs plot transfer|applegate",
        description="Large-signal pictures of a multi-cavity klystron: the transfer curve "
                    "(output power and efficiency against drive) or the Applegate diagram "
                    "(disk phases against distance).",
        epilog="Table columns as for `tubefuncs plot`: position (m), resonant frequency (Hz), "
               "R/Q (ohm, circuit), Q0, Qext (empty = idle), gap length (m).")
    p.add_argument("kind", choices=KINDS)
    p.add_argument("table", metavar="TABLE", help="CSV file, or a workbook (.xlsx/.xlsm)")
    p.add_argument("range", metavar="RANGE", nargs="?",
                   help="workbook range of the table, e.g. \"Tube!B5:G10\"")
    beam = p.add_argument_group("beam (required)")
    beam.add_argument("--voltage", required=True, help="beam voltage (V)")
    beam.add_argument("--current", required=True, help="beam current (A)")
    beam.add_argument("--beam-radius", required=True, help="beam radius (m)")
    beam.add_argument("--tunnel-radius", required=True, help="tunnel radius (m)")
    p.add_argument("--frequency", help="signal frequency (Hz); default: the input cavity's")
    p.add_argument("--drive", help="drive power for the Applegate diagram (W); default: "
                                   "the saturation drive")
    p.add_argument("--title", help="figure title")
    p.add_argument("--dpi", type=int, default=150, help="resolution (default %(default)d)")
    p.add_argument("-o", "--output", help="PNG to write (default: TABLE's name + _KIND.png)")
    return p


def run(args) -> int:
    beam = (quantity(args.voltage, "V", "voltage"), quantity(args.current, "A", "current"),
            quantity(args.beam_radius, "m", "beam-radius"),
            quantity(args.tunnel_radius, "m", "tunnel-radius"))
    for name, value in zip(("voltage", "current", "beam-radius", "tunnel-radius"), beam):
        if not value > 0:
            raise PlotInputError(f"--{name} must be > 0 (got {value:g})")
    if beam[2] > beam[3]:
        raise PlotInputError("--beam-radius must be <= --tunnel-radius")
    if not 30 <= args.dpi <= 1200:
        raise PlotInputError(f"--dpi must be 30 to 1200 (got {args.dpi})")
    output = Path(args.output) if args.output else Path(f"{Path(args.table).stem}_{args.kind}.png")
    from .headless.problems import WorkbookError
    from .headless.writer import check_output

    try:
        check_output(output, [args.table])
    except WorkbookError as exc:
        raise PlotInputError(exc.message) from None
    cavities = read_table(args.table, args.range)
    problems = gain.validate_cavities(cavities)
    if problems:
        raise PlotInputError("; ".join(problems[:5]))
    f = quantity(args.frequency, "Hz", "frequency") if args.frequency \
        else float(cavities[0, gain.F0])
    if not f > 0:
        raise PlotInputError(f"--frequency must be > 0 (got {f:g})")
    if args.kind == "transfer":
        shown = draw_transfer(f, beam, cavities, output, args.title, args.dpi)
        print(f"wrote {output}: saturation {shown['saturated_power'] / 1e6:.4g} MW at "
              f"{shown['saturation_drive']:.4g} W drive")
        return EXIT_OK
    if args.drive:
        drive = quantity(args.drive, "W", "drive")
        if not drive > 0:
            raise PlotInputError(f"--drive must be > 0 W (got {drive:g})")
    else:
        sat = results.saturation(f, *beam, cavities)
        if not np.isfinite(sat.power):
            raise PlotInputError("no saturation point found: give --drive")
        drive = float(sat.drive)
    shown = draw_applegate(f, beam, cavities, drive, output, args.title, args.dpi)
    print(f"wrote {output}: {drive:.4g} W drive, {shown['output_power'] / 1e6:.4g} MW out")
    return EXIT_OK


def main(argv=None) -> int:
    parser = build_parser()
    args = parser.parse_args(sys.argv[1:] if argv is None else list(argv))
    try:
        return run(args)
    except PlotInputError as exc:
        print(f"tubefuncs plot {args.kind}: {exc}", file=sys.stderr)
        return EXIT_UNUSABLE


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
