"""Implicit intersection: Excel's rule, in both engines (no LibreOffice needed).

Expected values are worked by hand from the data written in each test and
the rule as Excel's documentation states it ("Implicit intersection
operator: @", Microsoft Support; "Guidelines and examples of array formulas",
Microsoft Support; the operand classes of [MS-XLS] 2.2.2).  The cases where
LibreOffice departs from Excel are here, not in the differential corpus.
"""

from __future__ import annotations

import math

import pytest
from headless_support import make_book
from scipy import constants as sc

from tubefuncs.headless import recalculate
from tubefuncs.headless import values as V
from tubefuncs.headless.intersection import intersect_area, param_class
from tubefuncs.headless.references import Area

ENGINES = ("general", "fast")
DATA = {f"A{r}": float(r) * 10.0 for r in range(3, 8)}      # A3..A7 = 30, 40, 50, 60, 70


def _calc(tmp_path, cells, engine, sheets=None):
    book = {"S": {**DATA, **cells}}
    book.update(sheets or {})
    path = make_book(tmp_path / "b.xlsx", book)
    return recalculate(path, engine=engine)


@pytest.mark.parametrize("engine", ENGINES)
def test_issue_examples(tmp_path, engine):
    r = _calc(tmp_path, {
        "B5": "=A3:A7*2", "B50": "=A3:A7*2", "C5": "=-A3:A7", "D5": "=SQRT(A3:A7)",
        "E5": "=IF(A3:A7>45,1,0)", "E3": "=IF(A3:A7>45,1,0)", "F5": "=ROUND(A3:A7/3,2)",
        "G5": "=SUM(A3:A7*2)", "G50": "=SUM(A3:A7*2)", "H5": "=SUMPRODUCT(A3:A7*2)",
        "I5": "=SUM(A3:A7)", "J5": '=COUNTIF(A3:A7,">45")', "K5": "=MATCH(60,A3:A7,0)",
        "L50": "=LOOKUP(65,A3:A7,A3:A7*10)", "M5": "=A:A+1", "M60": "=A:A+1",
    }, engine)
    v = lambda c: r.value("S", c)  # noqa: E731
    assert v("B5") == 100.0                       # A5*2
    assert v("B50") is V.VALUE                    # row 50 crosses no cell of A3:A7
    assert v("C5") == -50.0
    assert v("D5") == pytest.approx(math.sqrt(50.0), rel=1e-15)
    assert (v("E5"), v("E3")) == (1.0, 0.0)
    assert v("F5") == 16.67
    assert v("G5") == 100.0                       # SUM(A5*2): the product intersects
    assert v("G50") is V.VALUE
    assert v("H5") == 500.0                       # SUMPRODUCT evaluates its argument as an array
    assert v("I5") == 250.0                       # SUM takes the reference whole
    assert v("J5") == 3.0                         # COUNTIF's range is whole
    assert v("K5") == 4.0                         # MATCH's lookup range is whole
    assert v("L50") == 600.0                      # LOOKUP's vectors are arrays (A6*10)
    assert (v("M5"), v("M60")) == (51.0, 1.0)     # whole column: A5; A60 is blank


@pytest.mark.parametrize("engine", ENGINES)
def test_index_evaluates_an_expression_as_an_array(tmp_path, engine):
    # Excel evaluates an expression given to INDEX's array argument as an array
    # (the common no-array-formula idiom INDEX((...)*(...),0)); LibreOffice
    # intersects it instead, so this case is tested here, not in the corpus.
    r = _calc(tmp_path, {"B5": "=INDEX(A3:A7*2,2)", "B50": "=INDEX(A3:A7*2,5)"}, engine)
    assert r.value("S", "B5") == 80.0              # 2 * A4
    assert r.value("S", "B50") == 140.0            # 2 * A7, no intersection needed


@pytest.mark.parametrize("engine", ENGINES)
def test_array_formulas_see_whole_ranges(tmp_path, engine):
    r = _calc(tmp_path, {"B3": ("array", "B3:B8", "=A3:A7*2"),
                         "C50": ("array", "C50", "=SUM(A3:A7*2)"),
                         "D5": "=A3:A7*2"}, engine)
    assert [r.value("S", f"B{k}") for k in range(3, 8)] == [60.0, 80.0, 100.0, 120.0, 140.0]
    assert r.value("S", "B8") is V.NA             # block larger than the result
    assert r.value("S", "C50") == 500.0           # a one-cell array formula: no intersection
    assert r.value("S", "D5") == 100.0


@pytest.mark.parametrize("engine", ENGINES)
def test_filled_down_column_intersects_row_by_row(tmp_path, engine):
    cells = {f"B{k}": "=$A$3:$A$7*2+1" for k in range(1, 11)}
    r = _calc(tmp_path, cells, engine)
    got = [r.value("S", f"B{k}") for k in range(1, 11)]
    want = [V.VALUE, V.VALUE] + [2.0 * 10.0 * k + 1.0 for k in range(3, 8)] + [V.VALUE] * 3
    assert got == want


@pytest.mark.parametrize("engine", ENGINES)
def test_other_sheet_and_two_dimensional(tmp_path, engine):
    far = {f"{c}{k}": float(10 * k + i) for k in range(1, 10) for i, c in enumerate("ABC")}
    r = _calc(tmp_path, {"B5": "=Far!A3:C7", "D5": "=Far!A3:C7", "B9": "=Far!B3:B7*1",
                         "C4": "=Far!A4:C4+0"}, engine, {"Far": far})
    assert r.value("S", "B5") == 51.0             # Far!B5: row 5, column B
    assert r.value("S", "D5") is V.VALUE          # column D is outside A:C
    assert r.value("S", "B9") is V.VALUE          # row 9 is outside 3:7
    assert r.value("S", "C4") == 42.0             # a row range: Far!C4


@pytest.mark.parametrize("engine", ENGINES)
def test_catalogue_functions_follow_the_udf_rule(tmp_path, engine):
    # A UDF receives a reference argument as the range itself (Excel passes the
    # Range; xlwings reads its whole value): the function computes the column and
    # a plain cell shows its first element.  An expression intersects.
    volts = {f"A{k}": 1e3 * k for k in range(3, 8)}
    r = _calc(tmp_path, {**volts, "B5": "=TUBE_GAMMA(A3:A7)", "C5": "=TUBE_GAMMA(A3:A7*1)",
                         "D5": "=TUBE_GAMMA(A5)"}, engine)

    def gamma(v):  # Lorentz factor after acceleration through v volts: 1 + eV / (m c^2)
        return 1.0 + sc.e * v / (sc.m_e * sc.c ** 2)
    assert r.value("S", "B5") == pytest.approx(gamma(3e3), rel=1e-12)
    assert r.value("S", "C5") == pytest.approx(gamma(5e3), rel=1e-12)
    assert r.value("S", "D5") == pytest.approx(gamma(5e3), rel=1e-12)


def test_the_table():
    assert [param_class("COUNTIFS", i) for i in range(4)] == ["R", "V", "R", "V"]
    assert [param_class("SUMIFS", i) for i in range(5)] == ["R", "R", "V", "R", "V"]
    assert param_class("SUMPRODUCT", 3) == "A" and param_class("INDEX", 0) == "A"
    assert param_class("SQRT", 0) == "V" and param_class("SUM", 5) == "R"
    assert param_class("TUBE_GAMMA", 0) == "R"
    assert param_class("TUBE_SMALL_SIGNAL_GAIN", 5) == "A"     # the cavity table
    a = Area("S", 3, 2, 7, 4)
    assert intersect_area(a, 5, 3) == Area("S", 5, 3, 5, 3)
    assert intersect_area(a, 5, 9) is None and intersect_area(a, 2, 3) is None


@pytest.mark.parametrize("engine", ENGINES)
def test_filled_down_relative_range(tmp_path, engine):
    # =A{r-1}:A{r+1}*2 filled down: each row intersects its own moving range at A{r}.
    cells = {f"B{k}": f"=A{k - 1}:A{k + 1}*2" for k in range(4, 8)}
    cells.update({f"C{k}": f"=A{k + 1}:A{k + 3}*2" for k in range(3, 6)})   # never its row
    r = _calc(tmp_path, cells, engine)
    assert [r.value("S", f"B{k}") for k in range(4, 8)] == [80.0, 100.0, 120.0, 140.0]
    assert all(r.value("S", f"C{k}") is V.VALUE for k in range(3, 6))
    if engine == "fast":
        assert r.stats.get("vector groups", 0) >= 1


@pytest.mark.parametrize("engine", ENGINES)
def test_index_of_a_reference_is_a_reference(tmp_path, engine):
    # Excel's INDEX help: the reference form returns a reference; row or column
    # 0 is the whole column or row; an index outside the range is #REF!
    # (LibreOffice answers #VALUE! there, so that case is here, not in the corpus).
    cols = {f"B{k}": float(k) for k in range(3, 8)}
    r = _calc(tmp_path, {**cols, "D5": "=INDEX(A3:B7,0,2)", "D6": "=INDEX(A3:B7,0,1)*2",
                         "D9": "=INDEX(A3:B7,0,1)", "D4": "=SUM(INDEX(A3:B7,0,1))",
                         "D3": "=INDEX(A3:B7,2,2)", "D7": "=INDEX(A3:A7,9)",
                         "D8": "=INDEX(A3:A7,2)"}, engine)
    v = lambda c: r.value("S", c)  # noqa: E731
    assert (v("D5"), v("D6"), v("D4"), v("D3"), v("D8")) == (5.0, 120.0, 250.0, 4.0, 40.0)
    assert v("D9") is V.VALUE                  # row 9 crosses no cell of A3:A7
    assert v("D7") is V.REF
