"""A generated corpus of plain and array formulas for implicit-intersection tests.

Not a test module.  :func:`build` writes one workbook and returns the list of
formula cells in it, as ``(sheet, coordinate, formula, kind)``.  Ranges come
in every form the rule must handle: relative and absolute column ranges of
another sheet and of the formula's own sheet, defined names, whole columns,
row ranges and 2-D ranges; each formula is placed inside and outside the
rows (or columns) of its range.  Data are invented numbers.

Cases where LibreOffice is known to depart from Excel's documented rule
(an expression given to ``INDEX``'s array argument; ``INDEX`` outside its
range, which LibreOffice answers with ``#VALUE!`` and Excel with ``#REF!``)
are not in it; they are tested on their own in ``tests/test_intersection.py``.
"""

from __future__ import annotations

import openpyxl
from openpyxl.utils import get_column_letter
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula

COLUMN_A = [12, 19, 27, 33, 41, 48, 56, 63, 71, 80]          # ascending (MATCH, LOOKUP)
COLUMN_B = [5.5, 3.25, 8, 1.5, 9.75, 2, 7.5, 4, 6.25, 0.5]
COLUMN_C = ["a", "b", "c", "a", "b", "c", "a", "b", "c", "a"]
ROW_20 = [14, 22, 9, 37, 45, 3, 28, 51, 16, 60]

# Uses of a column range {R} (partner ranges {R2} numbers, {L} labels).
VALUE_USES = [
    "={R}*2", "=-{R}", "=SQRT({R})", "=IF({R}>50,1,0)", "=ROUND({R}/3,2)", "=SUM({R}*2)",
    "={R}", "=ABS({R}-40)", "=LOG10({R}+1)", "=POWER({R},2)+{R2}", "=IFERROR(1/({R}-41),-1)",
    "=MAX({R}+1,3)", "=AND({R}>10)", '={R}&" MHz"', "=AVERAGE({R}*1,{R2})", "=SUM({R},1)",
    "=IF({R}>30,{R2},0)", "=({R}+{R2})/2", "=10*LOG10({R}/{R2})", "=ROUNDUP({R}*{R2},0)",
    "=MIN({R}-{R2},100)", "=ISNUMBER({R})", "=ISBLANK({R})", "=LEN({L})", '=UPPER({L})&"x"',
    "=INT({R}/7)", "=MOD({R},7)", "=EXP({R}/100)", "=OR({R}>70,{R2}<1)", "=SIGN({R}-45)",
    "=VLOOKUP({R},Data!$A$3:$B$12,2,FALSE)", "=MATCH({R},{R},0)", "=CHOOSE(2,{R},{R2})",
    "=SUM(CHOOSE(2,{R},{R2}))", "=SUM(IF({R}>30,{R2}))", "=ROUNDDOWN({R}/{R2},1)",
    "=IF(ISNUMBER({R}),{R}*{R2},\"-\")", "=MAX(MIN({R},60),20)", "=ABS({R2}-5)^0.5",
    "=INDEX({R},0,1)*2", "=INDEX(Data!$A$3:$B$12,0,2)", "=INDEX({R},0)+1",
]
WHOLE_USES = [
    "=SUM({R})", "=AVERAGE({R})", "=MAX({R})", "=MIN({R})", "=COUNT({R})", "=COUNTA({L})",
    "=SUMPRODUCT({R}*2)", "=SUMPRODUCT({R},{R2})", '=SUMIF({L},"b",{R2})',
    '=COUNTIF({R},">40")', "=INDEX({R},3)", "=MATCH(40,{R},1)", "=LOOKUP(50,{R},{R2})",
    '=SUMPRODUCT(({L}="b")*{R})', '=COUNTIFS({R},">30",{R2},"<8")',
    '=SUMIFS({R2},{R},">30")', '=AVERAGEIF({R},">30")', "=LARGE({R},2)", "=SMALL({R2},3)",
    "=STDEV({R})", "=MEDIAN({R})", "=SUMPRODUCT(LOG10({R}))",
    "=ROUND(SUMPRODUCT({R},{R2})/SUM({R2}),3)", "=SUMSQ({R2})", "=PRODUCT({R2})",
    "=MATCH(48,{R},0)", "=COUNTIF({L},\"a\")", "=MAX({R})-MIN({R})",
    "=INDEX({R2},MATCH(48,{R},0))", "=VLOOKUP(50,Data!$A$3:$B$12,2,TRUE)",
    "=SUMPRODUCT(({R}>30)*({R2}<8))", "=AVERAGE({R},{R2})", "=COUNTBLANK({R})",
    "=SUM(INDEX({R},0,1))", "=INDEX({R},4)+0", "=SUM(INDEX(Data!$A$3:$B$12,0,2))",
    "=INDEX(Data!$A$3:$B$12,3,2)",
]
ARRAY_CELL_USES = [
    "=SUM({R}*2)", "=SUM(({R}>40)*{R2})", "=MAX(IF({R}>40,{R2}))", '=SUM(IF({L}="a",{R},0))',
    "=AVERAGE(SQRT({R}))", "=SUM({R}*{R2})", "=MIN(IF({R2}>2,{R}))", "=COUNT(IF({R}>30,1))",
]
ARRAY_BLOCK_USES = ["={R}*2", "=SQRT({R})+{R2}", "=IF({R}>40,{R2},-1)"]

COLUMN_FORMS = [            # (sheet holding the formulas, {R}, {R2}, {L})
    ("Calc", "Data!A3:A12", "Data!B3:B12", "Data!C3:C12"),
    ("Calc2", "Data!$A$3:$A$12", "Data!$B$3:$B$12", "Data!$C$3:$C$12"),
    ("Named", "Freq", "Pow", "Label"),
    ("Whole", "Data!A:A", "Data!B:B", "Data!C:C"),
    ("Data", "$A$3:$A$12", "$B$3:$B$12", "$C$3:$C$12"),
]
COLUMN_ROWS = (3, 7, 12, 2, 15)             # inside the range, then outside

ROW_USES = ["={R}*2", "=SQRT({R})", "=SUM({R}*2)", "=SUM({R})", "=SUMPRODUCT({R}*2)",
            "=IF({R}>30,1,0)", "={R}", "=ROUND({R}/7,1)"]
ROW_FORMS = ["Far!A20:J20", "Far!$A$20:$J$20", "Levels"]
ROW_COLUMNS = (1, 4, 10, 11, 13)            # inside the range, then outside

GRID_USES = ["={G}*2", "=SUM({G}*2)", "=SUM({G})", "={G}", "=SQRT({G})"]
GRID_FORMS = ["Far!A3:C12", "Grid"]
GRID_CELLS = [(3, 1), (8, 2), (12, 3), (5, 5), (2, 1), (15, 2)]


def _fill(text: str, r: str, r2: str = "", label: str = "", g: str = "") -> str:
    return text.replace("{R2}", r2).replace("{R}", r).replace("{L}", label).replace("{G}", g)


def build(path) -> list:
    wb = openpyxl.Workbook()
    data = wb.active
    data.title = "Data"
    far = wb.create_sheet("Far")
    for i in range(10):
        data.cell(3 + i, 1, COLUMN_A[i])
        data.cell(3 + i, 2, COLUMN_B[i])
        data.cell(3 + i, 3, COLUMN_C[i])
        far.cell(20, 1 + i, ROW_20[i])
        for j in range(3):
            far.cell(3 + i, 1 + j, (i + 1) * 3.5 + j * 11)
    data["A1"] = "frequency (MHz)"       # a header: text, outside the data rows
    for name, ref in (("Freq", "Data!$A$3:$A$12"), ("Pow", "Data!$B$3:$B$12"),
                      ("Label", "Data!$C$3:$C$12"), ("Grid", "Far!$A$3:$C$12"),
                      ("Levels", "Far!$A$20:$J$20")):
        wb.defined_names[name] = DefinedName(name, attr_text=ref)
    cells = []
    sheets = {"Data": data}

    def sheet(name):
        if name not in sheets:
            sheets[name] = wb.create_sheet(name)
        return sheets[name]

    # column ranges: one column per use, one row per position
    for home, r, r2, label in COLUMN_FORMS:
        ws = sheet(home)
        col = 6 if home == "Data" else 1            # the Data sheet's own data are in A:C
        for use in VALUE_USES + WHOLE_USES:
            text = _fill(use, r, r2, label)
            for row in COLUMN_ROWS:
                ws.cell(row, col, text)
                cells.append((home, f"{get_column_letter(col)}{row}", text, "plain"))
            col += 1
        for use in ARRAY_CELL_USES:
            text = _fill(use, r, r2, label)
            coord = f"{get_column_letter(col)}20"
            ws[coord] = ArrayFormula(coord, text)
            cells.append((home, coord, text, "array"))
            col += 1
        for use in ARRAY_BLOCK_USES:
            if home == "Whole":
                continue                   # (a whole-column block would be a million cells)
            text = _fill(use, r, r2, label)
            letter = get_column_letter(col)
            block = f"{letter}3:{letter}14"          # two rows more than the range: #N/A
            ws[f"{letter}3"] = ArrayFormula(block, text)
            cells.extend((home, f"{letter}{row}", text, "array") for row in range(3, 15))
            col += 1
    # row ranges: one row per use, one column per position
    for k, r in enumerate(ROW_FORMS):
        ws = sheet(f"Rows{k}")
        for t, use in enumerate(ROW_USES):
            text = _fill(use, r)
            row = 3 + 2 * t
            for col in ROW_COLUMNS:
                ws.cell(row, col, text)
                cells.append((ws.title, f"{get_column_letter(col)}{row}", text, "plain"))
    # 2-D ranges: a sheet per use, the formula at cells inside and outside
    for k, g in enumerate(GRID_FORMS):
        for t, use in enumerate(GRID_USES):
            ws = sheet(f"Grid{k}_{t}")
            text = _fill(use, "", g=g)
            for row, col in GRID_CELLS:
                ws.cell(row, col, text)
                cells.append((ws.title, f"{get_column_letter(col)}{row}", text, "plain"))
    wb.save(path)
    return cells
