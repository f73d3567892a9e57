"""pytest plugin: regress workbooks as tests.

One line of configuration (``pytest.ini``, ``tox.ini``, ``setup.cfg`` or
``[tool.pytest.ini_options]`` of ``pyproject.toml``)::

    tubefuncs_workbooks = workbooks/*.xlsx workbooks/*.xlsm

Every matching workbook becomes one test per sheet that holds formulas
(``workbooks/station_budget.xlsx::Station``).  Expected values are the
workbook's snapshot (``BOOK.expected.tsv`` beside it, from ``tubefuncs
snapshot``) when there is one, else the values a spreadsheet application cached
in the file.  A failure shows the table of differences; a workbook that cannot
be used fails with its one-line reason.

Optional settings: ``tubefuncs_rtol``, ``tubefuncs_atol`` (tolerances, >= 0),
``tubefuncs_engine`` (``fast``, the default, or ``general``: see
:func:`tubefuncs.headless.recalculate`), ``tubefuncs_accept_names`` (cells such
as ``Budget!B7``, functions or defined names whose ``#NAME?`` is accepted:
every other ``#NAME?`` fails its sheet's test, even when the snapshot holds
``#NAME?`` too).
Matching workbooks are collected when pytest runs without explicit paths, and
whenever a collected folder contains them (``pytest workbooks/``).

The plugin is registered through the ``pytest11`` entry point of tubefuncs;
without the installed package use ``pytest -p tubefuncs.pytest_plugin``.
"""

from __future__ import annotations

import fnmatch
import glob
import os
from pathlib import Path

import pytest


def pytest_addoption(parser):
    parser.addini("tubefuncs_workbooks", type="args", default=[],
                  help="glob patterns (relative to the rootdir) of workbooks to regress")
    parser.addini("tubefuncs_rtol", default="", help="relative tolerance for workbook numbers")
    parser.addini("tubefuncs_atol", default="", help="absolute tolerance for workbook numbers")
    parser.addini("tubefuncs_engine", default="fast",
                  help="headless engine: fast (same-shape cells as vectors) or general")
    parser.addini("tubefuncs_accept_names", type="args", default=[],
                  help="cells (Sheet!B7), functions or defined names whose #NAME? is accepted")


def _patterns(config) -> list:
    return list(config.getini("tubefuncs_workbooks") or [])


def _matches(config, path: Path) -> bool:
    patterns = _patterns(config)
    if not patterns or path.suffix.lower() not in (".xlsx", ".xlsm"):
        return False
    try:
        rel = path.resolve().relative_to(Path(str(config.rootpath)).resolve()).as_posix()
    except ValueError:
        return False
    return any(fnmatch.fnmatch(rel, pat) for pat in patterns)


def pytest_configure(config):
    """Without explicit paths on the command line, add the configured workbooks."""
    patterns = _patterns(config)
    if not patterns:
        return
    source = getattr(config, "args_source", None)
    explicit = source is not None and source == pytest.Config.ArgsSource.ARGS
    if explicit:
        return
    root = str(config.rootpath)
    covered = [os.path.abspath(a.split("::")[0]) for a in config.args]
    for pat in patterns:
        for found in sorted(glob.glob(os.path.join(root, pat))):
            found = os.path.abspath(found)
            if any(found == c or found.startswith(c.rstrip(os.sep) + os.sep) for c in covered):
                continue
            config.args.append(found)


def pytest_collect_file(file_path: Path, parent):
    if _matches(parent.config, file_path):
        return WorkbookFile.from_parent(parent, path=file_path)
    return None


class WorkbookFile(pytest.File):
    """A workbook: recalculated once, compared sheet by sheet."""

    def collect(self):
        from tubefuncs.headless.loader import load_book
        from tubefuncs.headless.problems import WorkbookError

        try:
            book = load_book(self.path)
        except WorkbookError as exc:
            yield WorkbookItem.from_parent(self, name="(workbook)", sheet_index=None,
                                           problem=exc.message)
            return
        sheets = [s for s in book.sheets if s.formulas]
        if not sheets:
            yield WorkbookItem.from_parent(self, name="(workbook)", sheet_index=None,
                                           problem="")
            return
        for sheet in sheets:
            yield WorkbookItem.from_parent(self, name=sheet.name, sheet_index=sheet.index,
                                           problem=None)

    def outcome(self):
        """``(Recalculation, Comparison, source)``, computed on first use."""
        if not hasattr(self, "_outcome"):
            from tubefuncs.headless import DEFAULT_ATOL, DEFAULT_RTOL, check, snapshot_path
            from tubefuncs.headless.problems import WorkbookError
            from tubefuncs.headless.run import ENGINES

            ini = self.config.getini
            engine = (ini("tubefuncs_engine") or "fast").strip()
            snap = snapshot_path(self.path)
            try:
                rtol = _tolerance(ini, "tubefuncs_rtol", DEFAULT_RTOL)
                atol = _tolerance(ini, "tubefuncs_atol", DEFAULT_ATOL)
                if engine not in ENGINES:
                    raise WorkbookError(f"tubefuncs_engine must be one of {', '.join(ENGINES)} "
                                        f"(got {engine!r})")
                self._outcome = check(self.path, expected=snap if os.path.exists(snap) else None,
                                      rtol=rtol, atol=atol, engine=engine,
                                      accept_names=list(ini("tubefuncs_accept_names") or []))
            except WorkbookError as exc:
                self._outcome = exc
        return self._outcome


def _tolerance(ini, name: str, default: float) -> float:
    import math

    from tubefuncs.headless.problems import WorkbookError

    text = (ini(name) or "").strip()
    if not text:
        return default
    try:
        value = float(text)
    except ValueError:
        value = math.nan
    if not (math.isfinite(value) and value >= 0):
        raise WorkbookError(f"{name} must be a finite number >= 0 (got {text!r})")
    return value


class WorkbookFailure(Exception):
    pass


class WorkbookItem(pytest.Item):
    def __init__(self, *, sheet_index, problem, **kwargs):
        super().__init__(**kwargs)
        self.sheet_index = sheet_index
        self.problem = problem

    def runtest(self):
        from tubefuncs.headless import format_table

        if self.problem is not None:
            if self.problem:
                raise WorkbookFailure(self.problem)
            return  # a workbook without formulas: nothing to regress
        outcome = self.parent.outcome()
        if isinstance(outcome, Exception):
            raise WorkbookFailure(outcome.message)
        recalc, comparison, source = outcome
        mine = comparison.for_sheet(self.sheet_index)
        lines = []
        if mine.differences:
            lines.append(f"{len(mine.differences)} cell(s) of sheet {self.name!r} differ "
                         f"from {source}:")
            lines.append(format_table(mine.differences, limit=100,
                                      show_all="'tubefuncs check --max-rows 0' lists them all"))
        if mine.name_errors:
            lines.append(f"#NAME? in {len(mine.name_errors)} place(s) of sheet {self.name!r} "
                         f"(accept one with tubefuncs_accept_names):")
            lines += [f"  {cell}: {message}" for cell, message, _ in mine.name_errors]
        if lines:
            raise WorkbookFailure("\n".join(lines))

    def repr_failure(self, excinfo):
        if isinstance(excinfo.value, WorkbookFailure):
            return str(excinfo.value)
        return super().repr_failure(excinfo)

    def reportinfo(self):
        return self.path, None, f"workbook {self.path.name}::{self.name}"
