"""Expected-values files: plain text, one formula cell per line, diff-friendly.

Format (UTF-8, tab-separated)::

    # tubefuncs expected values v1
    # workbook: station_budget.xlsx
    Budget!B7	9600000.0
    Budget!B9	"text result"
    Budget!B11	TRUE
    Budget!B12	#NUM!	TUBE_PILLBOX_FREQ: radius must be > 0 m (got 0)

Cells come in workbook order: sheet by sheet, row by row, column by column.
A number is written with Python's shortest round-trip form, a text in JSON
quotes, a boolean as TRUE/FALSE, an error as its code; an optional third
column holds the message of an error (for people: never compared).  Lines
starting with ``#`` are comments.  A sheet name holding a tab, a line end or
a backslash (which a spreadsheet application's own names never hold) is
written with backslash escapes (``\\t``, ``\\n``, ``\\r``, ``\\\\``), so every
cell stays on its one line.  The file is read only from a regular file of at
most ``Limits.max_expected_bytes``.
"""

from __future__ import annotations

import json
import math
import os
import re

from openpyxl.utils.cell import coordinate_to_tuple

from . import values as V
from .problems import WorkbookError
from .references import split_sheet

HEADER = "# tubefuncs expected values v1"
SUFFIX = ".expected.tsv"


def snapshot_path(workbook) -> str:
    """Expected-values file beside a workbook: ``BOOK.xlsx`` -> ``BOOK.xlsx.expected.tsv``."""
    return os.fspath(workbook) + SUFFIX


def format_value(value) -> str:
    if V.is_error(value):
        return str(value)
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        if not math.isfinite(value):
            return "#NUM!"
        return repr(value)
    if value is V.EMPTY or value is None:
        return '""'
    return json.dumps(str(value), ensure_ascii=False)


def parse_value(text: str):
    text = text.strip()
    if text.startswith('"'):
        return json.loads(text)
    if text in ("TRUE", "FALSE"):
        return text == "TRUE"
    if text.startswith("#"):
        if text.upper() not in V.ERRORS:
            raise ValueError(f"unknown error value {text}")
        return V.error(text)
    return float(text)


_CELL_ESCAPES = {"\\": "\\\\", "\t": "\\t", "\n": "\\n", "\r": "\\r"}
_CELL_UNESCAPES = {v[1]: k for k, v in _CELL_ESCAPES.items()}
_RE_CELL_ESCAPE = re.compile(r"\\(.)")


def escape_cell(text: str) -> str:
    """A cell name for the file's first column (tab, line ends and backslash escaped)."""
    if not any(ch in text for ch in _CELL_ESCAPES):
        return text
    return "".join(_CELL_ESCAPES.get(ch, ch) for ch in text)


def unescape_cell(text: str) -> str:
    if "\\" not in text:
        return text
    return _RE_CELL_ESCAPE.sub(lambda m: _CELL_UNESCAPES.get(m.group(1), m.group(0)), text)


def render(recalc) -> str:
    lines = [HEADER, f"# workbook: {os.path.basename(recalc.book.path)}",
             "# cell<TAB>value[<TAB>message of an error value]; regenerate with "
             "'tubefuncs snapshot'"]
    for key in sorted(recalc.values):
        value = recalc.values[key]
        line = f"{escape_cell(recalc.cell_name(key))}\t{format_value(value)}"
        message = recalc.messages.get(key)
        if V.is_error(value) and message:
            line += "\t" + " ".join(message.split())
        lines.append(line)
    return "\n".join(lines) + "\n"


def write_snapshot(recalc, path=None) -> str:
    from .writer import atomic_write_bytes

    path = os.fspath(path) if path is not None else snapshot_path(recalc.book.path)
    atomic_write_bytes(path, render(recalc).encode("utf-8"), inputs=[recalc.book.path])
    return path


def read_snapshot(path, book, max_bytes: int | None = None) -> dict:
    """``{(sheet_index, row, col): value}`` from an expected-values file (a regular
    file of at most ``max_bytes``, checked before it is opened and while reading)."""
    from .limits import DEFAULT_LIMITS, MiB, regular_file

    path = os.fspath(path)
    max_bytes = DEFAULT_LIMITS.max_expected_bytes if max_bytes is None else max_bytes
    if not os.path.lexists(path):
        raise WorkbookError(f"{path}: no such expected-values file")
    size = regular_file(path, "expected-values file").st_size
    too_big = WorkbookError(f"{path}: expected-values file over the limit of "
                            f"{max_bytes / MiB:.0f} MiB; refused")
    if size > max_bytes:
        raise too_big
    try:
        with open(path, "rb") as fh:
            data = fh.read(max_bytes + 1)
        if len(data) > max_bytes:
            raise too_big
        lines = data.decode("utf-8").splitlines()
    except WorkbookError:
        raise
    except (OSError, UnicodeDecodeError) as exc:
        raise WorkbookError(f"{path}: cannot read expected values ({exc})") from None
    out = {}
    headed = bool(lines) and lines[0].strip() == HEADER
    for number, line in enumerate(lines, 1):
        if not line.strip() or line.startswith("#"):
            continue
        parts = line.split("\t")
        try:
            if len(parts) < 2:
                raise ValueError("no tab between the cell and its value")
            sheet_name, coordinate = split_sheet(unescape_cell(parts[0].strip()))
            if sheet_name is None:
                raise ValueError(f"{_short(parts[0])} is not a Sheet!A1 cell address")
            sheet = book.sheet(sheet_name)
            if sheet is None:
                raise ValueError(f"no sheet {sheet_name!r} in the workbook")
            try:
                r, c = coordinate_to_tuple(coordinate.replace("$", "").upper())
            except (ValueError, TypeError):
                raise ValueError(f"{_short(parts[0])} is not a Sheet!A1 cell address") from None
            try:
                out[(sheet.index, r, c)] = parse_value(parts[1])
            except (ValueError, TypeError) as exc:
                raise ValueError(f"cannot read the value {_short(parts[1])} ({exc})") from None
        except (ValueError, IndexError, TypeError) as exc:
            hint = "" if headed else (f"; the file does not start with {HEADER!r}: is it an "
                                      f"expected-values file (see 'tubefuncs snapshot')?")
            raise WorkbookError(f"{path}, line {number}: not an expected-values line: "
                                f"{exc}{hint}") from None
    return out


def _short(text: str) -> str:
    text = repr(text)
    return text if len(text) <= 40 else text[:37] + "..."


def name_warnings(recalc) -> list:
    """One line for every ``#NAME?`` value a snapshot of ``recalc`` would write."""
    messages = dict(recalc.name_errors)
    out = []
    for key in sorted(recalc.values):
        if recalc.values[key] is V.NAME:
            message = messages.get(key) or recalc.messages.get(key) or "#NAME?"
            out.append(f"{recalc.cell_name(key)}: {message}")
    return out
