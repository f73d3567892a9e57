"""A study laid out on a workbook sheet (default sheet name ``study``).

Four columns, one setting a row, the same keys as a study file
(:mod:`.study`); a first row with ``section`` in A is a header and skipped,
rows with an empty A are skipped::

    section    key                    field      value
    sweep      mode                              sample
    sweep      points                            2000
    sweep      seed                              20261202
    results    gain                   function   TUBE_SMALL_SIGNAL_GAIN
    results    gain_edge              function   TUBE_SMALL_SIGNAL_GAIN
    results    gain_edge              args.frequency  2.9995 GHz
    fixed      voltage                           90 kV
    fixed      cavities               range      Cavities!A2:F7
    grid       voltage                values     80 kV; 85 kV; 90 kV
    grid       current                from       20 A      (then to, steps)
    tolerance  cavities.frequency     normal     1 MHz
    limits     gain                   min        45
    summary    quantiles                         0.05; 0.5; 0.95

A ``range`` reads a table from the workbook (empty cells stay empty); lists
are written in one cell, separated by semicolons.
"""

from __future__ import annotations

import re

from .study import StudyError

MAX_ROWS = 10_000


def read_sheet(path: str, sheet: str | None = None) -> dict:
    """The study dict of a workbook sheet (the file is only read)."""
    from openpyxl import load_workbook

    from ..headless.limits import inspect_file
    from ..headless.problems import WorkbookError

    try:
        inspect_file(path)
        wb = load_workbook(path, read_only=True, data_only=True)
    except WorkbookError as exc:
        raise StudyError(f"study workbook {path!r}: {exc.message}") from None
    except Exception as exc:  # noqa: BLE001  (an unreadable file is a refused study)
        raise StudyError(f"study workbook {path!r} cannot be read: {exc}") from None
    try:
        name = sheet or "study"
        if name not in wb.sheetnames:
            raise StudyError(f"study workbook {path!r} has no sheet {name!r} (sheets: "
                             f"{', '.join(wb.sheetnames)})")
        raw: dict = {}
        for n, row in enumerate(wb[name].iter_rows(max_col=4, values_only=True), start=1):
            if n > MAX_ROWS:
                raise StudyError(f"sheet {name!r}: at most {MAX_ROWS} rows")
            row = list(row) + [None] * (4 - len(row))
            section, key, fld, value = row[:4]
            if section is None or (n == 1 and str(section).strip().lower() == "section"):
                continue
            where = f"sheet {name!r} row {n}"
            section, key = str(section).strip(), str(key or "").strip()
            fld = str(fld).strip() if fld not in (None, "") else ""
            if not key:
                raise StudyError(f"{where}: column B (key) is empty")
            table = raw.setdefault(section, {})
            if fld == "range":
                table[key] = _range(wb, value, where)
            elif fld == "values" or (section, key) == ("summary", "quantiles"):
                table[key] = _list(value)
            elif fld.startswith("args."):
                entry = table.setdefault(key, {})
                if not isinstance(entry, dict):
                    raise StudyError(f"{where}: {section}.{key} is given twice")
                entry.setdefault("args", {})[fld[5:]] = value
            elif fld:
                entry = table.setdefault(key, {})
                if not isinstance(entry, dict):
                    raise StudyError(f"{where}: {section}.{key} is given twice")
                entry[fld] = value
            else:
                if key in table:
                    raise StudyError(f"{where}: {section}.{key} is given twice")
                table[key] = value
        return raw
    finally:
        wb.close()


def _list(value) -> list:
    if isinstance(value, str):
        items = [x.strip() for x in value.split(";") if x.strip()]
        return [float(x) if re.fullmatch(r"[-+]?[\d.]+(e[-+]?\d+)?", x, re.I) else x
                for x in items]
    return [value]


_RANGE = re.compile(r"^(?:'?([^'!]+)'?!)?\$?([A-Z]{1,3})\$?(\d+):\$?([A-Z]{1,3})\$?(\d+)$")


def _range(wb, ref, where) -> list:
    m = _RANGE.match(str(ref or "").strip())
    if not m:
        raise StudyError(f"{where}: {ref!r} is not a range like Cavities!A2:F7")
    sheet, c1, r1, c2, r2 = m.groups()
    if not sheet or sheet not in wb.sheetnames:
        raise StudyError(f"{where}: {ref!r} names no sheet of this workbook")
    ws = wb[sheet]
    from openpyxl.utils import column_index_from_string

    c1, c2 = column_index_from_string(c1), column_index_from_string(c2)
    r1, r2 = int(r1), int(r2)
    if (r2 - r1 + 1) * (c2 - c1 + 1) > 100_000 or r2 < r1 or c2 < c1:
        raise StudyError(f"{where}: range {ref!r} is empty or too large")
    return [list(r) for r in ws.iter_rows(min_row=r1, max_row=r2, min_col=c1, max_col=c2,
                                          values_only=True)]
