"""Headless workbook engine: recalculate, check and snapshot workbooks without Excel.

Standard Excel functions come from the `formulas` package (EUPL 1.1+); the
catalogue's ``TUBE_...`` functions from :mod:`tubefuncs.worksheet`.  The
engine reads workbooks with openpyxl (guarded by defusedxml), never runs
macros, never modifies its input and writes outputs atomically.

Pipeline (one module each): :mod:`.limits` (inspect the file) ->
:mod:`.loader` (read cells) -> :mod:`.formula` (compile) -> :mod:`.graph`
(order) -> :mod:`.evaluate` (run) -> :mod:`.writer` / :mod:`.snapshot` /
:mod:`.compare`.  The fast path (:mod:`.vector`, the default of
:func:`recalculate`) evaluates same-shape formula cells together as numpy
vectors and hands the rest to these stages; ``engine="general"`` forces them
for every cell.
"""

from __future__ import annotations

from .compare import DEFAULT_ATOL, DEFAULT_RTOL, Comparison, compare, format_table
from .engine import Plan, Recalculation
from .limits import DEFAULT_LIMITS, Limits, inspect_file
from .problems import WorkbookError
from .run import ENGINES, recalculate, write_recalculated
from .snapshot import read_snapshot, snapshot_path, write_snapshot

__all__ = [
    "Comparison", "DEFAULT_ATOL", "ENGINES", "DEFAULT_LIMITS", "DEFAULT_RTOL", "Limits", "Plan",
    "Recalculation", "WorkbookError", "check", "compare", "format_table", "inspect_file",
    "read_snapshot", "recalculate", "snapshot_path", "write_recalculated", "write_snapshot",
]


def check(path, expected=None, rtol: float = DEFAULT_RTOL, atol: float = DEFAULT_ATOL,
          limits: Limits = DEFAULT_LIMITS, progress=None, fallback=None, engine: str = "fast",
          accept_names=()):
    """Recalculate ``path`` and compare: ``(Recalculation, Comparison, source)``.

    ``engine``: as for :func:`recalculate` (``"fast"`` or ``"general"``).
    ``accept_names``: cells (``Budget!B7``, ``B7``), functions or defined names
    whose ``#NAME?`` does not fail the comparison (every other one does).

    ``expected``: an expected-values file.  Without it, the values a
    spreadsheet application cached in the workbook; when it has none, the
    ``fallback`` expected-values file if it exists; else a :class:`WorkbookError`.
    ``source`` says which of these was used.
    """
    import os

    from .compare import check_tolerances
    from .limits import regular_file

    try:
        check_tolerances(rtol, atol)
    except ValueError as exc:
        raise WorkbookError(str(exc)) from None

    if expected is not None:   # (a FIFO or device is refused before any work)
        if not os.path.lexists(expected):
            raise WorkbookError(f"{os.fspath(expected)}: no such expected-values file")
        regular_file(os.fspath(expected), "expected-values file")
    recalc = recalculate(path, limits=limits, progress=progress, engine=engine)
    if expected is None and not recalc.book.has_cached_values and recalc.values:
        if fallback is not None and os.path.exists(fallback):
            expected = fallback
        else:
            raise WorkbookError(
                f"{recalc.book.path}: no cached values to compare with (the file was not "
                f"last saved by a spreadsheet application) and no expected-values file; use "
                f"--expected FILE, e.g. from 'tubefuncs snapshot'")
    if expected is not None:
        wanted = read_snapshot(expected, recalc.book, limits.max_expected_bytes)
        source = os.fspath(expected)
    else:
        wanted = recalc.cached_values()
        source = "values cached in the workbook"
    return recalc, compare(recalc, wanted, rtol=rtol, atol=atol,
                           accept_names=accept_names), source
