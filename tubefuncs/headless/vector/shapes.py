"""Formula shapes: grouping the formula cells of a column by their relative form.

Cells of one column whose formulas are the same in relative terms (row
numbers of relative references shifted with the row, everything else equal)
form a group evaluated together.  The relative form is found with one pattern
pass over the formula text, not by tokenizing it; and a column's next cell is
first checked against the previous cell's form rendered at its own row (one
string formatting and comparison), so the pattern runs once per change of
shape, not once per cell.  Cells of one shared formula (as Excel saves a
filled-down column) are grouped by the shared formula without looking at
their text at all.

The pattern only decides which cells are grouped; what a reference means is
decided by the general engine's tokenizer on one cell of the group, and the
plan checks a second cell of the group against it (a cell the pattern misread
would fail that check, and the group is evaluated cell by cell).
"""

from __future__ import annotations

import re

from ..loader import FormulaCell
from ..references import MAX_COL, MAX_ROW
from .reader import shared_key

_REFERENCE = re.compile(
    r"\"(?:[^\"]|\"\")*\""                                   # a text literal
    r"|'(?:[^']|'')*'!"                                       # a quoted sheet name
    r"|\["                                                    # structured / external
    r"|(?<![\w.$\\])(\$?)([A-Za-z]{1,3})(\$?)([0-9]{1,7})(?![\w.(!\[$])"   # A1, $A$1
    r"|(?<![\w.$\\:])(\$?)([0-9]{1,7}):(\$?)([0-9]{1,7})(?![\w.(])"       # 3:5
)


class Form:
    """The relative form of a formula: literal parts and the row offsets between them."""

    __slots__ = ("key", "fmt", "offsets", "zero", "k")

    def __init__(self, parts: list, offsets: list):
        self.offsets = tuple(offsets)
        self.k = len(offsets)
        self.key = ("\x00".join(parts), self.offsets)
        self.fmt = "%d".join(p.replace("%", "%%") for p in parts)
        self.zero = not any(offsets)

    def render(self, row: int) -> str:
        """The formula text of this form in ``row``."""
        if self.zero:
            return self.fmt % ((row,) * len(self.offsets))
        return self.fmt % tuple([row + off for off in self.offsets])


def _column_ok(letters: str) -> bool:
    if len(letters) < 3:
        return True
    n = 0
    for ch in letters.upper():
        n = n * 26 + ord(ch) - 64
    return n <= MAX_COL


def relative_form(text: str, row: int) -> Form | None:
    """The relative form of ``text`` in ``row``; ``None`` for formulas never grouped
    (structured or external references)."""
    parts, offsets = [], []
    pos = 0
    for m in _REFERENCE.finditer(text):
        if m.group(0) == "[":
            return None
        if m.group(4) is not None:                      # a cell
            if m.group(3) or int(m.group(4)) > MAX_ROW or not _column_ok(m.group(2)):
                continue
            parts.append(text[pos:m.start(4)])
            offsets.append(int(m.group(4)) - row)
            pos = m.end(4)
        elif m.group(6) is not None:                    # whole rows
            for flag, digits in ((5, 6), (7, 8)):
                if m.group(flag) or int(m.group(digits)) > MAX_ROW:
                    continue
                parts.append(text[pos:m.start(digits)])
                offsets.append(int(m.group(digits)) - row)
                pos = m.end(digits)
    parts.append(text[pos:])
    return Form(parts, offsets)


def group_sheet(sheet, eligible=None) -> tuple[dict, list]:
    """``({(col, key): [rows]}, [singles])`` for a sheet's formula cells.

    ``eligible(rc)`` says whether a cell may join a group (array formulas and
    cells inside array blocks may not); the others are returned as singles.
    """
    groups: dict = {}
    singles: list = []
    # col -> (Form, its format, its offset count, zero offsets?, the rows of its
    # group) of the column's last cell: a cell of the same form goes straight to
    # its group's rows (no key built, no lookup)
    last: dict = {}
    for rc, cell in sheet.formulas.items():
        if eligible is not None and not eligible(rc):
            singles.append(rc)
            continue
        r, c = rc
        if type(cell) is not FormulaCell:
            shared = shared_key(cell)
            if shared is not None:
                key = (c, shared)
                rows = groups.get(key)
                if rows is None:
                    groups[key] = [r]
                else:
                    rows.append(r)
                continue
        text = cell.text
        state = last.get(c)
        if state is not None and (state[1] % ((r,) * state[2]) if state[3]
                                  else state[0].render(r)) == text:
            state[4].append(r)
            continue
        form = relative_form(text, r)
        if form is None:
            singles.append(rc)
            continue
        key = (c, form.key)
        rows = groups.get(key)
        if rows is None:
            rows = groups[key] = [r]
        else:
            rows.append(r)
        last[c] = (form, form.fmt, form.k, form.zero, rows)
    return groups, singles
