"""Helpers for the headless-engine tests: small workbooks built on the fly.

Not a test module (no ``test_`` prefix).  ``make_book`` writes a workbook
with openpyxl; ``inject_cached`` adds the cached results a spreadsheet
application would have saved (``<v>`` elements), so tests can play the part
of a workbook last saved by Excel; ``rewrite_part`` edits one zip member.
"""

from __future__ import annotations

import hashlib
import re
import zipfile

import openpyxl
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula


def make_book(path, sheets: dict, names: dict | None = None, local_names=None):
    """``sheets``: {sheet: {"A1": value or "=formula" or ("array", "B1:B3", "=...")}}."""
    wb = openpyxl.Workbook()
    first = True
    for title, cells in sheets.items():
        ws = wb.active if first else wb.create_sheet()
        first = False
        ws.title = title
        for coord, value in cells.items():
            if isinstance(value, tuple) and value and value[0] == "array":
                ws[coord] = ArrayFormula(value[1], value[2])
            else:
                ws[coord] = value
    for name, ref in (names or {}).items():
        wb.defined_names[name] = DefinedName(name, attr_text=ref)
    for sheet, name, ref in (local_names or []):
        wb[sheet].defined_names[name] = DefinedName(name, attr_text=ref)
    wb.save(path)
    return path


def sha256(path) -> str:
    with open(path, "rb") as fh:
        return hashlib.sha256(fh.read()).hexdigest()


def rewrite_part(path, part: str, new: bytes | None, out=None, extra: dict | None = None):
    """Copy a zip with ``part`` replaced (``None``: removed) and ``extra`` parts added."""
    out = out or path
    with zipfile.ZipFile(path) as zin:
        items = [(i, zin.read(i.filename)) for i in zin.infolist()]
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zout:
        for info, data in items:
            if info.filename == part:
                if new is None:
                    continue
                data = new
            zout.writestr(info.filename, data)
        for name, data in (extra or {}).items():
            zout.writestr(name, data)
    return out


def read_part(path, part: str) -> bytes:
    with zipfile.ZipFile(path) as z:
        return z.read(part)


def sheet_part(path, index: int = 1) -> str:
    return f"xl/worksheets/sheet{index}.xml"


def inject_cached(path, sheet_index: int, cached: dict, out=None):
    """Give formula cells cached values, as a spreadsheet application saves them.

    ``cached``: {"B2": 3.0 | "text" | True | "#NUM!"}.
    """
    part = sheet_part(path, sheet_index)
    xml = read_part(path, part).decode("utf-8")

    def repl(m):
        attrs, body = m.group(1), m.group(2)
        ref = re.search(r'r="([A-Z]+[0-9]+)"', attrs).group(1)
        if ref not in cached or "<f" not in body:
            return m.group(0)
        value = cached[ref]
        attrs = re.sub(r'\s+t="[^"]*"', "", attrs)
        body = re.sub(r"<v>.*?</v>|<v\s*/>", "", body)
        if isinstance(value, bool):
            kind, text = "b", "1" if value else "0"
        elif isinstance(value, (int, float)):
            kind, text = "n", repr(float(value))
        elif isinstance(value, str) and value.startswith("#") and " " not in value:
            kind, text = "e", value
        else:
            kind, text = "str", value
        return f'<c{attrs} t="{kind}">{body}<v>{text}</v></c>'

    xml = re.sub(r"<c(\s[^>]*?)>(.*?)</c>", repl, xml, flags=re.S)
    return rewrite_part(path, part, xml.encode("utf-8"), out=out)
