"""Tests of ``tubefuncs plot`` (tubefuncs.gain_plot): reading tables, options, the PNG."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose

from tubefuncs import gain_plot
from tubefuncs.physics import gain

EXAMPLE = Path(__file__).resolve().parents[1] / "workbooks" / "examples" / "klystron_cavities.csv"
BEAM_OPTS = ["--voltage", "90 kV", "--current", "27 A", "--beam-radius", "4 mm",
             "--tunnel-radius", "6 mm"]
PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


def test_quantity_parsing():
    q = gain_plot.quantity
    assert q("90 kV", "V", "voltage") == 90e3
    assert q("90e3", "V", "voltage") == 90e3
    assert_allclose(q("4 mm", "m", "beam-radius"), 4e-3)
    assert_allclose(q("2.95GHz", "Hz", "start"), 2.95e9)
    assert_allclose(q("500 uA", "A", "current"), 500e-6)
    with pytest.raises(gain_plot.PlotInputError, match="--voltage: 'mA' is not a unit of volt"):
        q("90 mA", "V", "voltage")
    with pytest.raises(gain_plot.PlotInputError, match="--current: cannot read it as a current"):
        q("lots", "A", "current")
    # case matters: Mm is not mm
    assert q("4 Mm", "m", "beam-radius") == 4e6
    with pytest.raises(gain_plot.PlotInputError):
        q("4 MM", "m", "beam-radius")


def test_read_example_csv():
    t = gain_plot.read_csv(EXAMPLE)
    assert t.shape == (6, 6)
    assert np.all(np.isnan(t[1:5, gain.QEXT]))           # four idle cavities
    assert np.all(np.isfinite(t[[0, 5], gain.QEXT]))
    assert gain.validate_cavities(t, 3e9, 90e3, 27.0, 4e-3, 6e-3) == []


def test_csv_trailing_empty_cells_and_errors(tmp_path):
    p = tmp_path / "t.csv"
    p.write_text("pos,f0,rq,q0,qext,gap,\n0,3e9,100,3000,200,0.01,\n0.1,3e9,100,3000,40,0.01,\n")
    assert gain_plot.read_csv(p).shape == (2, 6)
    p.write_text("0,3e9,100,3000,200,0.01\n0.1,3e9,abc,3000,40,0.01\n")
    with pytest.raises(gain_plot.PlotInputError, match="row 2: 'abc' is not a number"):
        gain_plot.read_csv(p)


def _workbook(path, rows, formula=False):
    from openpyxl import Workbook

    wb = Workbook()
    ws = wb.active
    ws.title = "Tube"
    ws["B3"] = "position (m)"
    for c, name in enumerate(["f0 (Hz)", "R/Q", "Q0", "Qext", "gap (m)"], start=3):
        ws.cell(row=3, column=c, value=name)
    for r, row in enumerate(rows, start=4):
        for c, value in enumerate(row, start=2):
            if not (isinstance(value, float) and np.isnan(value)):
                ws.cell(row=r, column=c, value=value)
    if formula:
        ws["C5"] = "=C4"
    wb.save(path)


def test_plot_from_workbook_range(tmp_path, capsys):
    rows = gain_plot.read_csv(EXAMPLE).tolist()
    book = tmp_path / "station.xlsx"
    _workbook(book, rows)
    # header row included in the range: skipped
    table = gain_plot.read_table(str(book), "Tube!B3:G9")
    assert_allclose(table, gain_plot.read_csv(EXAMPLE), equal_nan=True)

    out = tmp_path / "fig" / "gain.png"
    rc = gain_plot.main([str(book), "Tube!$B$4:$G$9", *BEAM_OPTS, "--points", "301",
                         "-o", str(out)])
    assert rc == 2 and not out.parent.exists()      # a missing folder is refused, as in recalc
    out.parent.mkdir()
    rc = gain_plot.main([str(book), "Tube!$B$4:$G$9", *BEAM_OPTS, "--points", "301",
                         "-o", str(out)])
    assert rc == 0
    assert out.read_bytes()[:8] == PNG_MAGIC
    import matplotlib.image

    assert matplotlib.image.imread(out).shape[:2] == (1050, 1275)  # 8.5 x 7 in at 150 dpi
    # the printed figures are those of the physics module over the same sweep
    start, stop = gain_plot.default_sweep(table)
    f = np.linspace(start, stop, 301)
    g = gain.small_signal_gain(f, 90e3, 27.0, 4e-3, 6e-3, table)
    lo, hi = gain.bandwidth(f, g)
    text = capsys.readouterr().out
    assert f"peak {np.nanmax(g):.2f} dB" in text
    assert f"1 dB bandwidth {(hi - lo) / 1e6:.4g} MHz" in text


def test_plot_csv_default_output_name(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    rc = gain_plot.main([str(EXAMPLE), *BEAM_OPTS, "--points", "101", "--start", "2.96 GHz",
                         "--stop", "3.04 GHz", "--title", "Invented tube, cold test"])
    assert rc == 0
    assert (tmp_path / "klystron_cavities_gain.png").read_bytes()[:8] == PNG_MAGIC


def test_unusable_inputs_exit_2(tmp_path, capsys):
    book = tmp_path / "b.xlsx"
    _workbook(book, gain_plot.read_csv(EXAMPLE).tolist(), formula=True)
    cases = [
        ([str(book), *BEAM_OPTS], "give the range of the cavity table"),
        ([str(book), "Nope!B4:G9", *BEAM_OPTS], "no sheet 'Nope'"),
        ([str(book), "Tube!B4:G9", *BEAM_OPTS], "formula without a saved value"),
        ([str(EXAMPLE), "--voltage", "90 kA", *BEAM_OPTS[2:]], "not a unit of voltage"),
        ([str(EXAMPLE), *BEAM_OPTS, "--start", "3.1 GHz", "--stop", "3.0 GHz"],
         "0 < start < stop"),
        ([str(tmp_path / "missing.csv"), *BEAM_OPTS], "cannot read"),
    ]
    for argv, text in cases:
        assert gain_plot.main(argv + ["-o", str(tmp_path / "x.png")]) == 2
        assert text in capsys.readouterr().err
    bad = tmp_path / "bad.csv"
    rows = gain_plot.read_csv(EXAMPLE)
    rows[[1, 2]] = rows[[2, 1]]
    np.savetxt(bad, rows, delimiter=",")
    assert gain_plot.main([str(bad), *BEAM_OPTS, "-o", str(tmp_path / "x.png")]) == 2
    assert "must be downstream of row 2" in capsys.readouterr().err
    assert not (tmp_path / "x.png").exists()
