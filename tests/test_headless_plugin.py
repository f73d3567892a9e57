"""The pytest plugin: one line of configuration turns workbooks into tests."""

from __future__ import annotations

import importlib.metadata
import shutil

import pytest
from headless_support import make_book

pytest_plugins = ["pytester"]


@pytest.fixture(scope="module", autouse=True)
def _warm_imports(tmp_path_factory):
    """Import everything a workbook run needs before pytester's inline runs:
    they drop modules first imported inside them, and numpy's compiled
    modules cannot be imported twice in one process."""
    import tubefuncs.pytest_plugin  # noqa: F401
    from tubefuncs.headless import check, recalculate, write_snapshot  # noqa: F401

    path = make_book(tmp_path_factory.mktemp("warm") / "w.xlsx",
                     {"S": {"A1": "=TUBE_BEAM_POWER(1, 2)+SUM(1)"}})
    recalculate(path)


def _plugin_args():
    """``-p tubefuncs.pytest_plugin`` unless the installed entry point loads it already."""
    for ep in importlib.metadata.entry_points(group="pytest11"):
        if ep.value == "tubefuncs.pytest_plugin":
            return []
    return ["-p", "tubefuncs.pytest_plugin"]


@pytest.fixture
def project(pytester):
    pytester.makeini("[pytest]\ntubefuncs_workbooks = books/*.xlsx\n")
    books = pytester.mkdir("books")
    path = make_book(books / "budget.xlsx", {
        "Budget": {"A1": 80000, "A2": 10, "B1": "=TUBE_BEAM_POWER(A1, A2)",
                   "B2": "=Notes!A1*2"},
        "Notes": {"A1": 21, "A2": "=A1+1"},
        "Empty": {"A1": "just text"}})
    from tubefuncs.headless import recalculate, write_snapshot

    write_snapshot(recalculate(path))
    pytester.makepyfile(test_other="def test_other():\n    assert True\n")
    return pytester, path


def test_workbooks_become_one_test_per_sheet(project):
    pytester, _ = project
    result = pytester.runpytest(*_plugin_args(), "-v")
    result.assert_outcomes(passed=3)               # Budget, Notes, and test_other
    result.stdout.fnmatch_lines(["*budget.xlsx::Budget PASSED*", "*budget.xlsx::Notes PASSED*"])


def test_a_difference_fails_with_the_table(project):
    pytester, path = project
    snap = str(path) + ".expected.tsv"
    text = open(snap).read().replace("Budget!B1\t800000.0", "Budget!B1\t799000.0")
    open(snap, "w").write(text)
    result = pytester.runpytest(*_plugin_args())
    result.assert_outcomes(passed=2, failed=1)
    result.stdout.fnmatch_lines(["*1 cell(s) of sheet 'Budget' differ*",
                                 "*cell*expected*got*rel. diff*message*",
                                 "*Budget!B1*799000*800000*"])
    assert "Traceback" not in result.stdout.str()


def test_an_unusable_workbook_fails_with_its_reason(project):
    pytester, path = project
    shutil.copy(path, pytester.path / "books" / "copy.xlsx")
    (pytester.path / "books" / "broken.xlsx").write_bytes(b"not a zip")
    result = pytester.runpytest(*_plugin_args())
    result.assert_outcomes(passed=3, failed=3)     # copy.xlsx (2 sheets) has no snapshot
    result.stdout.fnmatch_lines(["*not a workbook*", "*no cached values*"])


def test_explicit_paths_do_not_pull_in_workbooks(project):
    pytester, _ = project
    result = pytester.runpytest(*_plugin_args(), "test_other.py")
    result.assert_outcomes(passed=1)
    result = pytester.runpytest(*_plugin_args(), "books")
    result.assert_outcomes(passed=2)
