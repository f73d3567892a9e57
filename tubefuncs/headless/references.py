"""Cell and range addresses: parsing, display, relative shapes.

Rows and columns are 1-based.  A whole column ``A:A`` spans rows 1 to
:data:`MAX_ROW`; a whole row ``3:3`` spans columns 1 to :data:`MAX_COL`
(Excel's sheet size).  The engine clips such references to the used part of
the sheet when it reads them.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from openpyxl.utils.cell import column_index_from_string, get_column_letter

MAX_ROW = 1_048_576
MAX_COL = 16_384

_CELL = r"\$?([A-Za-z]{1,3})\$?([0-9]{1,7})"
_RE_AREA = re.compile(
    rf"^(?:{_CELL}(?::{_CELL})?"            # A1 or A1:B2
    r"|\$?([A-Za-z]{1,3}):\$?([A-Za-z]{1,3})"  # A:B
    r"|\$?([0-9]{1,7}):\$?([0-9]{1,7}))$"     # 1:3
)
_RE_NAME = re.compile(r"^[A-Za-z_\\][A-Za-z0-9_.\\?]*$")


@dataclass(frozen=True)
class Area:
    """A rectangular block of one sheet: rows r1..r2, columns c1..c2 (inclusive)."""

    sheet: str          # sheet name as the workbook spells it
    r1: int
    c1: int
    r2: int
    c2: int
    whole_rows: bool = False     # a 1:3 style reference
    whole_cols: bool = False     # an A:C style reference

    @property
    def is_cell(self) -> bool:
        return self.r1 == self.r2 and self.c1 == self.c2

    @property
    def shape(self) -> tuple[int, int]:
        return self.r2 - self.r1 + 1, self.c2 - self.c1 + 1

    @property
    def size(self) -> int:
        rows, cols = self.shape
        return rows * cols

    def contains(self, row: int, col: int) -> bool:
        return self.r1 <= row <= self.r2 and self.c1 <= col <= self.c2

    def __str__(self) -> str:
        return area_text(self)


def quote_sheet(sheet: str) -> str:
    """Sheet name as a formula writes it: quoted when it needs quotes."""
    if re.fullmatch(r"[A-Za-z_][A-Za-z0-9_.]*", sheet) and not _RE_AREA.match(sheet):
        return sheet
    return "'" + sheet.replace("'", "''") + "'"


def cell_text(sheet: str, row: int, col: int) -> str:
    """``'RF station'!B5``."""
    return f"{quote_sheet(sheet)}!{get_column_letter(col)}{row}"


def area_text(area: Area) -> str:
    if area.whole_cols:
        body = f"{get_column_letter(area.c1)}:{get_column_letter(area.c2)}"
    elif area.whole_rows:
        body = f"{area.r1}:{area.r2}"
    elif area.is_cell:
        body = f"{get_column_letter(area.c1)}{area.r1}"
    else:
        body = (f"{get_column_letter(area.c1)}{area.r1}:"
                f"{get_column_letter(area.c2)}{area.r2}")
    return f"{quote_sheet(area.sheet)}!{body}"


def split_sheet(text: str) -> tuple[str | None, str]:
    """``"'My sheet'!A1"`` -> ``("My sheet", "A1")``; no sheet -> ``(None, text)``."""
    if text.startswith("'"):
        i = 1
        out = []
        while i < len(text):
            ch = text[i]
            if ch == "'":
                if i + 1 < len(text) and text[i + 1] == "'":
                    out.append("'")
                    i += 2
                    continue
                break
            out.append(ch)
            i += 1
        rest = text[i + 1:]
        if rest.startswith("!"):
            return "".join(out), rest[1:]
        return None, text
    if "!" in text:
        sheet, _, rest = text.rpartition("!")
        return sheet, rest
    return None, text


def parse_area(body: str, sheet: str):
    """An A1-style address (without sheet) -> :class:`Area`, or None if it is not one."""
    m = _RE_AREA.match(body)
    if not m:
        return None
    g = m.groups()
    try:
        if g[0] is not None:
            c1 = column_index_from_string(g[0].upper())
            r1 = int(g[1])
            if g[2] is not None:
                c2 = column_index_from_string(g[2].upper())
                r2 = int(g[3])
            else:
                c2, r2 = c1, r1
            whole_rows = whole_cols = False
        elif g[4] is not None:
            c1 = column_index_from_string(g[4].upper())
            c2 = column_index_from_string(g[5].upper())
            r1, r2 = 1, MAX_ROW
            whole_rows, whole_cols = False, True
        else:
            r1, r2 = int(g[6]), int(g[7])
            c1, c2 = 1, MAX_COL
            whole_rows, whole_cols = True, False
    except ValueError:
        return None
    r1, r2 = sorted((r1, r2))
    c1, c2 = sorted((c1, c2))
    if not (1 <= r1 and r2 <= MAX_ROW and 1 <= c1 and c2 <= MAX_COL):
        return None
    return Area(sheet, r1, c1, r2, c2, whole_rows, whole_cols)


def looks_like_name(text: str) -> bool:
    """True when ``text`` can be a defined name (and is not a cell address)."""
    if not _RE_NAME.match(text) or text.upper() in ("TRUE", "FALSE"):
        return False
    return parse_area(text, "") is None
