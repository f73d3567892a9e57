"""A battery of formulas with the results Excel gives, for engine fidelity checks.

Each entry is ``(formula, expected)``; expected values follow Excel's
documented behaviour (common practice, checked from memory of Excel's
semantics: coercion of text numbers, booleans ignored by SUM over ranges,
negation binding tighter than ``^``, left-associative ``^``...).  Errors are
their codes as text ("#DIV/0!").  The input cells live in column A of
``Data`` (see :data:`DATA`); ``Other!A1`` holds 21 and the name ``twentyone``
points at it.
"""

from __future__ import annotations

import math

DATA = [2, 3, "text", None, True, -1, "4", "#N/A"]

BATTERY = [
    ("=A1+A2", 5.0),
    ("=-2^2", 4.0),
    ("=2^3^2", 64.0),
    ("=A1*A4", 0.0),
    ("=A1+A7", 6.0),
    ("=A1+A3", "#VALUE!"),
    ("=SUM(A1:A7)", 4.0),
    ('=SUM(A1,A2,"4",TRUE)', 10.0),
    ("=1/0", "#DIV/0!"),
    ("=SQRT(A6)", "#NUM!"),
    ('=IF(A1>2,"big","small")', "small"),
    ("=IFERROR(1/0,-1)", -1.0),
    ("=ROUND(2.5,0)", 3.0),
    ("=ROUND(-2.5,0)", -3.0),
    ("=ROUND(1234.5678,-2)", 1200.0),
    ("=INDEX(A1:A2,2)", 3.0),
    ("=MATCH(3,A1:A2,0)", 2.0),
    ('=VLOOKUP(3,{1,"a";3,"c"},2,FALSE)', "c"),
    ("=LOG10(1000)", 3.0),
    ("=PI()*2", 2 * math.pi),
    ("=MOD(-3,2)", 1.0),
    ("=INT(-2.5)", -3.0),
    ('="a"&1.5', "a1.5"),
    ('="a"="A"', True),
    ("=A8+1", "#N/A"),
    ("=ISNA(A8)", True),
    ("=MAX(A1:A2)+MIN(A1:A2)", 5.0),
    ("=AVERAGE(A1:A2)", 2.5),
    ("=COUNT(A1:A8)", 3.0),
    ("=COUNTA(A1:A8)", 7.0),
    ("=SUMPRODUCT({1,2},{3,4})", 11.0),
    ("=10^(-3/10)", 10 ** -0.3),
    ("=50%", 0.5),
    ('=TEXT(3.14159,"0.00")', "3.14"),
    ("=ABS(A4)", 0.0),
    ('=CHOOSE(2,"x","y")', "y"),
    ("=AND(TRUE,A1>1)", True),
    ("=A1>A3", False),
    ("=EXP(1)", math.e),
    ("=DEGREES(PI())", 180.0),
    ("=ATAN2(1,1)", math.pi / 4),
    ('=IF(A4="",1,2)', 1.0),
    ("=LEN(A3)", 4.0),
    ('=UPPER("ab")', "AB"),
    ("=ROWS(A1:A8)", 8.0),
    ("=COLUMN(C1)", 3.0),
    ("=SUM(A:A)", "#N/A"),
    ("=SUM(A1:A3)+SUM(A5:A7)", 4.0),
    ("=Other!A1*2", 42.0),
    ("=twentyone*2", 42.0),
    ("=IF(TRUE,1,1/0)", 1.0),
    ("=ISERROR(SQRT(-1))", True),
    ("=NA()", "#N/A"),
    ("=TRUE+1", 2.0),
    ('=""&A4', ""),
    ('=COUNTIF(A1:A6,">1")', 2.0),
    ('=SUMIF(A1:A6,">1")', 5.0),
    ("=LN(0)", "#NUM!"),
    ("=FLOOR(2.7,1)", 2.0),
    ("=CEILING(2.1,1)", 3.0),
    ("=ISNUMBER(A7)", False),
    ('=VALUE("1e3")', 1000.0),
    ("=DATE(2024,1,1)", 45292.0),
    ("=MEDIAN(1,2,3,4)", 2.5),
    ("=STDEV(1,2,3,4)", 1.2909944487358056),
    ("=SIGN(-3)", -1.0),
    ("=1E+308*10", "#NUM!"),
    ("=LOG(8,2)", 3.0),
    ('=CONCATENATE("x",2)', "x2"),
    ("=SUM((A1:A2,A6))", 4.0),
    ("=NOSUCHFUNCTION(1)", "#NAME?"),
    ("=SUM(A1:A2 A2:A3)", 3.0),
    ('=_xlfn.IFS(A1>1,"a",TRUE,"b")', "a"),
]


def build(path) -> None:
    """Write the battery workbook (formulas in ``Data!B1:B{n}``)."""
    import openpyxl
    from openpyxl.workbook.defined_name import DefinedName

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Data"
    for i, v in enumerate(DATA, 1):
        if v is not None:
            ws.cell(i, 1, v)
    for i, (formula, _) in enumerate(BATTERY, 1):
        ws.cell(i, 2, formula)
    other = wb.create_sheet("Other")
    other["A1"] = 21
    wb.defined_names["twentyone"] = DefinedName("twentyone", attr_text="Other!$A$1")
    wb.save(path)


def same(expected, got) -> bool:
    if isinstance(expected, bool) or isinstance(got, bool):
        return type(got) is bool and got == expected
    if isinstance(expected, float):
        try:
            return math.isclose(float(got), expected, rel_tol=1e-12, abs_tol=1e-15)
        except (TypeError, ValueError):
            return False
    return str(got) == str(expected)
