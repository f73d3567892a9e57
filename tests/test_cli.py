"""The ``tubefuncs`` command line: recalc, check, snapshot, demo, delegation, progress."""

from __future__ import annotations

import io
import os
import sys
import types

import openpyxl
import pytest
from headless_support import inject_cached, make_book

from tubefuncs import cli
from tubefuncs.headless.progress import Progress


@pytest.fixture
def book(tmp_path):
    return make_book(tmp_path / "budget.xlsx", {
        "Budget": {"A1": 80000, "A2": 10, "B1": "=TUBE_BEAM_POWER(A1, A2)",
                   "B2": '=TUBE_BEAM_POWER("80 kV", A2, "kW")', "B3": "=ROUND(B1/1000, 1)",
                   "B4": '=IF(B3>700, "big", "small")', "B5": "=TUBE_PILLBOX_FREQ(0)",
                   "B6": "=Other!A1*2"},
        "Other": {"A1": 21}})


def run(capsys, *argv):
    code = cli.main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_recalc_writes_values_in_place_of_formulas(tmp_path, book, capsys):
    out = tmp_path / "out.xlsx"
    code, stdout, _ = run(capsys, "recalc", book, "-o", out)
    assert code == 0 and "wrote" in stdout and "6 formula cells" in stdout
    ws = openpyxl.load_workbook(out)["Budget"]
    assert ws["B1"].value == pytest.approx(800000.0)
    assert ws["B2"].value == pytest.approx(800.0)
    assert ws["B4"].value == "big"
    assert ws["B5"].value == "#NUM!" and ws["B5"].data_type == "e"
    assert openpyxl.load_workbook(out)["Other"]["A1"].value == 21
    assert not any(isinstance(c.value, str) and c.value.startswith("=")
                   for row in ws.iter_rows() for c in row)


def test_snapshot_then_check_matches(tmp_path, book, capsys):
    code, out, _ = run(capsys, "snapshot", book)
    snap = str(book) + ".expected.tsv"
    assert code == 0 and snap in out
    text = open(snap).read()
    assert "Budget!B1\t800000.0" in text
    assert 'Budget!B4\t"big"' in text
    assert "Budget!B5\t#NUM!\tTUBE_PILLBOX_FREQ" in text
    code, out, _ = run(capsys, "check", book)                # finds the snapshot beside it
    assert code == 0 and out.startswith("OK: 6 formula cells")


def test_check_reports_a_difference_table_and_exits_1(tmp_path, book, capsys):
    run(capsys, "snapshot", book)
    snap = str(book) + ".expected.tsv"
    text = open(snap).read().replace("Budget!B1\t800000.0", "Budget!B1\t800100.0")
    text = text.replace('Budget!B4\t"big"', 'Budget!B4\t"small"')
    open(snap, "w").write(text)
    code, out, _ = run(capsys, "check", book, "--expected", snap)
    assert code == 1
    assert "MISMATCH: 2 of 6" in out
    header = [line for line in out.splitlines() if line.startswith("cell")][0]
    for column in ("cell", "expected", "got", "rel. diff", "message"):
        assert column in header
    assert "Budget!B1" in out and "800100" in out and "1.25e-04" in out
    assert "Budget!B4" in out and "'small'" in out


def test_tolerances_are_options(tmp_path, book, capsys):
    run(capsys, "snapshot", book)
    snap = str(book) + ".expected.tsv"
    text = open(snap).read().replace("800000.0", "800000.5")
    open(snap, "w").write(text)
    assert run(capsys, "check", book)[0] == 1
    code, out, err = run(capsys, "check", book, "--rtol", "1e-6")
    assert code == 0, out + err
    assert run(capsys, "check", book, "--rtol", "0", "--atol", "1")[0] == 0
    assert run(capsys, "check", book, "--rtol", "0", "--atol", "0.1")[0] == 1


def test_check_against_values_cached_by_a_spreadsheet_application(tmp_path, book, capsys):
    golden = tmp_path / "golden.xlsx"
    inject_cached(book, 1, {"B1": 800000.0, "B2": 800.0, "B3": 800.0, "B4": "big",
                            "B5": "#NUM!", "B6": 42.0}, out=golden)
    code, out, _ = run(capsys, "check", golden)
    assert code == 0 and "values cached in the workbook" in out
    inject_cached(book, 1, {"B1": 800000.0, "B2": 800.0, "B3": 800.0, "B4": "big",
                            "B5": 1.5, "B6": 41.0}, out=golden)
    code, out, _ = run(capsys, "check", golden)
    assert code == 1
    assert "Budget!B5" in out and "#NUM!" in out and "radius" in out   # message kept
    assert "Budget!B6" in out


def test_check_without_any_expected_values_is_unusable(book, capsys):
    code, _, err = run(capsys, "check", book)
    assert code == 2 and "no cached values" in err


def test_check_reports_every_name_error(tmp_path, capsys):
    path = make_book(tmp_path / "n.xlsx", {"S": {"A1": "=FOO(1)", "A2": "=IFERROR(BAR(1),0)",
                                                 "A3": "=undefined_name"}})
    code, _, err = run(capsys, "snapshot", path)
    assert code == 0 and err.count("warning: wrote #NAME?") == 2   # A2 shows 0, not #NAME?
    code, out, _ = run(capsys, "check", path)
    assert code == 1                                 # #NAME? matching #NAME? still fails
    assert "#NAME? met in 3 place(s)" in out and "FAILED: #NAME? in 3 place(s)" in out
    assert "FOO" in out and "BAR" in out and "undefined_name" in out
    code, out, _ = run(capsys, "check", path, "--accept-name", "foo", "--accept-name", "S!A2",
                       "--accept-name", "undefined_name")
    assert code == 0 and "3 #NAME? accepted" in out


def test_bad_expected_file_is_unusable(tmp_path, book, capsys):
    bad = tmp_path / "bad.tsv"
    bad.write_text("Budget!B1\tnot-a-number\n")
    code, _, err = run(capsys, "check", book, "--expected", bad)
    assert code == 2 and "line 1" in err
    code, _, err = run(capsys, "check", book, "--expected", tmp_path / "none.tsv")
    assert code == 2 and "no such" in err


def test_usage_errors_exit_2(capsys):
    with pytest.raises(SystemExit) as exc:
        cli.main(["recalc"])
    assert exc.value.code == 2
    assert cli.main([]) == 2


def test_demo_prints_the_budget_with_cautions_and_writes_a_copy(tmp_path, capsys):
    out = tmp_path / "demo.xlsx"
    code, stdout, _ = run(capsys, "demo", "-o", out)
    assert code == 0
    for text in ("Beam voltage", "285.0 kV", "Beam current", "Perveance", "Beam power (peak)",
                 "RF output", "Efficiency", "Power at the structure",
                 "Collector dissipation, saturated drive", "Collector dissipation, no drive",
                 "water flow", "L/min", "High voltage", "X-rays", "RF", "under pressure",
                 "design estimates", "local codes", "tube maker", "licensed practice",
                 str(out)):
        assert text in stdout, text
    assert "error value" not in stdout
    assert openpyxl.load_workbook(out)["Station"]["B18"].value == pytest.approx(285e3 * 265)


def test_demo_builds_the_workbook_when_not_checked_in(tmp_path, monkeypatch, capsys):
    from tubefuncs.headless import demo

    monkeypatch.setattr(demo.os.path, "exists", lambda p: False)
    path = demo.bundled_station_workbook(str(tmp_path))
    assert path.startswith(str(tmp_path))
    assert openpyxl.load_workbook(path)["Station"]["B18"].value.startswith("=TUBE_BEAM_POWER")


def test_plot_and_excel_setup_are_delegated(monkeypatch, capsys):
    seen = {}
    fake = types.ModuleType("tubefuncs.gain_plot")
    fake.main = lambda argv: seen.setdefault("plot", argv) and 0
    monkeypatch.setitem(sys.modules, "tubefuncs.gain_plot", fake)
    assert cli.main(["plot", "--x", "1"]) == 0
    assert seen["plot"] == ["--x", "1"]
    monkeypatch.setitem(sys.modules, "tubefuncs.excel.setup", None)   # import fails
    code = cli.main(["excel-setup"])
    _, err = capsys.readouterr()
    assert code == 2 and "tubefuncs.excel.setup" in err and "not available" in err


def test_progress_silent_when_piped_and_shown_on_a_terminal():
    piped = io.StringIO()
    p = Progress("book.xlsx", stream=piped, delay=0.0)
    p.phase("calculating")
    p.update(5, 10)
    p.close()
    assert piped.getvalue() == ""                    # StringIO is not a terminal

    class Tty(io.StringIO):
        def isatty(self):
            return True

    tty = Tty()
    p = Progress("book.xlsx", stream=tty, delay=0.0)
    p.update(5, 10)
    assert "5/10 formula cells (50%)" in tty.getvalue()
    p.close()
    assert tty.getvalue().endswith("\r")

    quick = Tty()
    p = Progress("book.xlsx", stream=quick, delay=1.0)   # under a second: nothing shown
    p.update(1, 2)
    p.close()
    assert quick.getvalue() == ""


def test_internal_errors_are_one_line(monkeypatch, book, capsys):
    from tubefuncs import headless

    def boom(*a, **k):
        raise RuntimeError("unexpected\nsecond line")

    monkeypatch.setattr(headless, "recalculate", boom)
    monkeypatch.delenv("TUBEFUNCS_DEBUG", raising=False)
    code, _, err = run(capsys, "recalc", book, "-o", os.path.join(os.path.dirname(book), "o.xlsx"))
    assert code == 3 and err.count("\n") == 1 and "internal error RuntimeError" in err
