"""Errors must not pass: #NAME? fails check and the plugin, snapshot warns,
recalc lists error cells, options are checked, one error meaning across hosts."""

from __future__ import annotations

import pytest
from headless_support import inject_cached, make_book

from tubefuncs import cli
from tubefuncs.headless import check
from tubefuncs.headless.compare import front_end_error, name_error_subject
from tubefuncs.headless.problems import WorkbookError

pytest_plugins = ["pytester"]


def run(capsys, *argv):
    try:
        code = cli.main([str(a) for a in argv])
    except SystemExit as exc:          # argparse refusing an option value
        code = exc.code
    out, err = capsys.readouterr()
    return code, out, err


def test_misspelt_function_fails_check_and_names_the_nearest(tmp_path, capsys):
    path = make_book(tmp_path / "p.xlsx", {"S": {"A1": 27.0, "A2": 90e3,
                                                 "B1": "=TUBE_PERVEANSE(A1, A2)"}})
    code, _, err = run(capsys, "snapshot", path)
    assert code == 0
    assert "warning: wrote #NAME? for S!B1" in err and "did you mean TUBE_PERVEANCE?" in err
    code, out, _ = run(capsys, "check", path)
    assert code == 1 and "FAILED: #NAME? in 1 place(s)" in out
    assert "did you mean TUBE_PERVEANCE?" in out
    code, out, _ = run(capsys, "check", path, "--accept-name", "TUBE_PERVEANSE")
    assert code == 0 and "1 #NAME? accepted" in out


def test_name_error_subjects():
    assert name_error_subject("INDIRECT is an Excel function the headless engine does not "
                              "support (x)") == "INDIRECT"
    assert name_error_subject("unknown function FOO") == "FOO"
    assert name_error_subject("undefined name Rate") == "RATE"
    assert name_error_subject("cannot parse formula: x") == ""


@pytest.mark.parametrize("option", [("--rtol", "-1"), ("--atol", "-1e-9"), ("--rtol", "nan"),
                                    ("--rtol", "inf"), ("--max-rows", "-2")])
def test_check_refuses_bad_option_values(tmp_path, capsys, option):
    path = make_book(tmp_path / "b.xlsx", {"S": {"A1": "=1+1"}})
    code, _, err = run(capsys, "check", path, *option)
    assert code == 2 and option[0] in err


def test_api_refuses_negative_tolerance(tmp_path):
    path = make_book(tmp_path / "b.xlsx", {"S": {"A1": "=1+1"}})
    with pytest.raises(WorkbookError, match="rtol must be a finite number >= 0"):
        check(path, rtol=-1)


@pytest.mark.parametrize("text, says", [
    ("hello world\nsecond line\n", "no tab between the cell and its value"),
    ("A1\t3\n", "'A1' is not a Sheet!A1 cell address"),
    ("S!ZZZZ9\t3\n", "is not a Sheet!A1 cell address"),
    ("Nope!A1\t3\n", "no sheet 'Nope'"),
    ("S!A1\tthree\n", "cannot read the value 'three'"),
])
def test_garbage_expected_file_says_what_is_wrong(tmp_path, capsys, text, says):
    path = make_book(tmp_path / "b.xlsx", {"S": {"A1": "=1+1"}})
    bad = tmp_path / "bad.tsv"
    bad.write_text(text)
    code, _, err = run(capsys, "check", path, "--expected", bad)
    assert code == 2 and says in err and "line 1" in err
    assert "is it an expected-values file" in err        # no header line
    assert "None" not in err


def test_recalc_lists_error_cells_and_counts_like_check(tmp_path, capsys):
    cells = {f"A{r}": f"=SQRT({-r})" for r in range(1, 26)}
    cells.update({"C1": ("array", "C1:C3", "=ROW(B1:B3)*2"), "D1": "=1/0"})
    path = make_book(tmp_path / "e.xlsx", {"S": cells})
    out = tmp_path / "out.xlsx"
    code, stdout, _ = run(capsys, "recalc", path, "-o", out)
    assert code == 0 and "recalculated 29 formula cells" in stdout     # 25 + 3 + 1
    assert "26 error value(s):" in stdout
    assert "S!A1  #NUM!  (from a standard spreadsheet function)" in stdout
    assert "S!D1  #DIV/0!" in stdout and "S!A19  #NUM!" in stdout and "S!A20" not in stdout
    assert "... and 6 more (--max-rows 0 lists them all)" in stdout
    code, stdout, _ = run(capsys, "recalc", path, "-o", out, "--max-rows", "0")
    assert "S!A25  #NUM!" in stdout and "more" not in stdout
    code, stdout, _ = run(capsys, "snapshot", path)
    assert "29 formula cells" in stdout
    code, stdout, _ = run(capsys, "check", path)
    assert code == 0 and "29 formula cells" in stdout


def test_outputs_into_a_missing_folder_are_refused_before_work(tmp_path, capsys):
    path = make_book(tmp_path / "b.xlsx", {"S": {"A1": "=1+1"}})
    code, _, err = run(capsys, "recalc", path, "-o", tmp_path / "nope" / "out.xlsx")
    assert code == 2 and "no such folder" in err
    code, _, err = run(capsys, "snapshot", path, "-o", tmp_path / "nope" / "s.tsv")
    assert code == 2 and "no such folder" in err


def test_front_end_error_text_is_the_error_value():
    assert str(front_end_error("#NUM! TUBE_PILLBOX_FREQ: radius must be > 0 m (got 0)")) == \
        "#NUM!"
    assert str(front_end_error("#VALUE! TUBE_GAMMA: voltage: cannot read 'x'")) == "#VALUE!"
    assert front_end_error("#NUM! is what a user typed") is None
    assert front_end_error("#FOO! TUBE_GAMMA: x") is None
    assert front_end_error(3.0) is None


def test_check_reads_our_excel_error_text_as_the_error(tmp_path, capsys):
    # A workbook saved by Excel with our front end: the cell caches the text.
    # ISNUMBER is FALSE for the text and for the error value alike: the test
    # that means the same in every host (ISERROR does not, see README).
    path = make_book(tmp_path / "x.xlsx", {"S": {"A1": "=TUBE_PILLBOX_FREQ(0)",
                                                 "A2": "=ISNUMBER(A1)"}})
    inject_cached(path, 1, {"A1": "#NUM! TUBE_PILLBOX_FREQ: radius must be > 0 m (got 0)",
                            "A2": False})
    code, out, _ = run(capsys, "check", path)
    assert code == 0, out
    inject_cached(path, 1, {"A1": "#VALUE! TUBE_PILLBOX_FREQ: radius: cannot read",
                            "A2": False})
    code, out, _ = run(capsys, "check", path)
    assert code == 1 and "S!A1" in out


def _plugin_args():
    """``-p tubefuncs.pytest_plugin`` unless the installed entry point loads it already."""
    import importlib.metadata

    for ep in importlib.metadata.entry_points(group="pytest11"):
        if ep.value == "tubefuncs.pytest_plugin":
            return []
    return ["-p", "tubefuncs.pytest_plugin"]


def test_plugin_fails_on_name_by_default(pytester):
    import tubefuncs.pytest_plugin  # noqa: F401  (imported before the inline run)
    from tubefuncs.headless import recalculate, write_snapshot

    pytester.makeini("[pytest]\ntubefuncs_workbooks = books/*.xlsx\n")
    books = pytester.mkdir("books")
    path = make_book(books / "b.xlsx", {"S": {"A1": "=TUBE_GAMA(1000)"}})
    write_snapshot(recalculate(path))
    result = pytester.runpytest(*_plugin_args())
    result.assert_outcomes(failed=1)
    result.stdout.fnmatch_lines(["*did you mean TUBE_GAMMA?*"])
    pytester.makeini("[pytest]\ntubefuncs_workbooks = books/*.xlsx\n"
                     "tubefuncs_accept_names = TUBE_GAMA\n")
    result = pytester.runpytest(*_plugin_args())
    result.assert_outcomes(passed=1)
    pytester.makeini("[pytest]\ntubefuncs_workbooks = books/*.xlsx\ntubefuncs_rtol = -1\n")
    result = pytester.runpytest(*_plugin_args())
    result.assert_outcomes(failed=1)
    result.stdout.fnmatch_lines(["*tubefuncs_rtol must be a finite number >= 0*"])
