"""Headless engine: Excel semantics, the catalogue, references, names, arrays, errors."""

from __future__ import annotations

import importlib.util
import os

import pytest
from headless_support import make_book

from tubefuncs.headless import WorkbookError, recalculate
from tubefuncs.headless import values as V
from tubefuncs.headless.formula import compile_formula, tokenize

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _battery():
    spec = importlib.util.spec_from_file_location(
        "excel_battery", os.path.join(ROOT, "tests", "benchmarks", "excel_battery.py"))
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def calc(tmp_path, cells, names=None, sheets=None, local_names=None):
    books = {"S": cells}
    books.update(sheets or {})
    path = make_book(tmp_path / "t.xlsx", books, names, local_names)
    return recalculate(path)


def test_excel_battery_matches_excel_results(tmp_path):
    """Every formula of the fidelity battery gives Excel's result."""
    battery = _battery()
    path = tmp_path / "battery.xlsx"
    battery.build(path)
    r = recalculate(path)
    misses = []
    for i, (formula, expected) in enumerate(battery.BATTERY, 1):
        got = r.value("Data", f"B{i}")
        if not battery.same(expected, got):
            misses.append((formula, expected, got))
    assert misses == []


@pytest.mark.parametrize("formula, expected", [
    ("=-2^2", 4.0),                 # negation binds tighter than ^
    ("=2^3^2", 64.0),               # ^ is left-associative
    ("=1+2*3-4/2", 5.0),
    ('="x"&1&TRUE', "x1TRUE"),
    ("=(1+2)*3", 9.0),
    ("=5%*2", 0.1),
    ("=1<2", True),
    ("={1,2;3,4}*1", 1.0),          # an array in one cell shows its top-left element
    ("=14.25E+9/1E+9", 14.25),      # mantissa with two digits (not Excel's saved form)
])
def test_operators(tmp_path, formula, expected):
    r = calc(tmp_path, {"A1": formula})
    assert r.value("S", "A1") == pytest.approx(expected) if isinstance(expected, float) \
        else r.value("S", "A1") == expected


def test_blank_reference_is_zero_and_blank_text(tmp_path):
    r = calc(tmp_path, {"A1": "=B9", "A2": '=IF(B9="", "blank", "no")', "A3": "=B9*3"})
    assert r.value("S", "A1") == 0.0
    assert r.value("S", "A2") == "blank"
    assert r.value("S", "A3") == 0.0


def test_cross_sheet_reference_and_quoted_sheet_names(tmp_path):
    r = calc(tmp_path, {"A1": "=Other!B2*2", "A2": "='RF plant'!A1+1",
                        "A3": "=SUM('RF plant'!A1:A3)"},
             sheets={"Other": {"B2": 21}, "RF plant": {"A1": 1, "A2": 2, "A3": "=A1+A2"}})
    assert r.value("S", "A1") == 42.0
    assert r.value("S", "A2") == 2.0
    assert r.value("S", "A3") == 6.0


def test_missing_sheet_in_a_formula_is_ref_error_with_message(tmp_path):
    r = calc(tmp_path, {"A1": "=Nowhere!B2*2"})
    assert r.value("S", "A1") is V.REF
    assert "Nowhere" in r.messages[r.key("S", "A1")]


def test_named_ranges_global_local_constant_and_formula(tmp_path):
    r = calc(tmp_path,
             {"A1": 10, "A2": 20, "B1": "=gain*2", "B2": "=SUM(block)", "B3": "=pi_ish",
              "B4": "=twice", "B5": "=localname+1"},
             names={"gain": "S!$A$1", "block": "S!$A$1:$A$2", "pi_ish": "3.5",
                    "twice": "S!$A$1*2"},
             local_names=[("S", "localname", "S!$A$2")])
    assert r.value("S", "B1") == 20.0
    assert r.value("S", "B2") == 30.0
    assert r.value("S", "B3") == 3.5
    assert r.value("S", "B4") == 20.0
    assert r.value("S", "B5") == 21.0


def test_undefined_name_is_name_error_and_reported(tmp_path):
    r = calc(tmp_path, {"A1": "=nosuchname*2"})
    assert r.value("S", "A1") is V.NAME
    assert any("nosuchname" in m for _, m in r.name_errors)


def test_whole_column_and_whole_row_ranges(tmp_path):
    cells = {f"A{i}": i for i in range(1, 11)}
    cells.update({"C1": "=SUM(A:A)", "C2": "=COUNT(A:A)", "C3": "=MAX(1:1)",
                  "C4": "=SUM(A:A)/ROWS(A1:A10)"})
    r = calc(tmp_path, cells)
    assert r.value("S", "C1") == 55.0
    assert r.value("S", "C2") == 10.0
    assert r.value("S", "C3") == 55.0     # row 1: A1=1 and C1=55
    assert r.value("S", "C4") == 5.5


def test_formula_cells_inside_ranges_are_evaluated_first(tmp_path):
    r = calc(tmp_path, {"A1": "=A2+A3", "A2": "=A3*2", "A3": 5, "B1": "=SUM(A1:A3)"})
    assert r.value("S", "A1") == 15.0
    assert r.value("S", "B1") == 30.0


def test_error_values_propagate_and_keep_the_message(tmp_path):
    r = calc(tmp_path, {"A1": "=TUBE_PILLBOX_FREQ(0)", "A2": "=A1*2", "A3": "=IFERROR(A2, -1)",
                        "A4": "=1/0", "A5": "=A4+A1"})
    assert r.value("S", "A1") is V.NUM
    msg = r.messages[r.key("S", "A1")]
    assert "TUBE_PILLBOX_FREQ" in msg and "radius" in msg
    assert r.value("S", "A2") is V.NUM
    assert r.messages[r.key("S", "A2")].startswith("from S!A1: TUBE_PILLBOX_FREQ")
    assert r.value("S", "A3") == -1.0
    assert r.value("S", "A4") is V.DIV0
    assert r.value("S", "A5") is V.DIV0        # the first error met, as Excel


def test_error_value_in_a_cell_reaches_catalogue_function(tmp_path):
    r = calc(tmp_path, {"A1": "=NA()", "A2": "=TUBE_GAMMA(A1)"})
    assert r.value("S", "A2") is V.NA


def test_catalogue_with_numbers_unit_text_and_references(tmp_path):
    r = calc(tmp_path, {"A1": 80000, "A2": "80 kV", "B1": "=TUBE_BEAM_POWER(A1, 10)",
                        "B2": '=TUBE_BEAM_POWER(A2, 10, "kW")',
                        "B3": '=TUBE_BEAM_POWER("80 kV", "10 A", "kW")'})
    assert r.value("S", "B1") == pytest.approx(800000.0)
    assert r.value("S", "B2") == pytest.approx(800.0)
    assert r.value("S", "B3") == pytest.approx(800.0)


def test_catalogue_wrong_unit_is_value_error_with_message(tmp_path):
    r = calc(tmp_path, {"A1": '=TUBE_BEAM_POWER("80 mm", 10)', "A2": "=TUBE_GAMMA(TRUE)",
                        "A3": "=TUBE_GAMMA()"})
    assert r.value("S", "A1") is V.VALUE
    assert "voltage" in r.messages[r.key("S", "A1")]
    assert r.value("S", "A2") is V.VALUE
    assert r.value("S", "A3") is V.VALUE


def test_catalogue_omitted_optional_arguments(tmp_path):
    r = calc(tmp_path, {"A1": '=TUBE_SALEH_PHASE(0.5, , , "deg")',
                        "A2": "=TUBE_SALEH_PHASE(0.5)"})
    degrees = r.value("S", "A2") * 180 / 3.141592653589793
    assert r.value("S", "A1") == pytest.approx(degrees)


@pytest.mark.parametrize("written", [
    "_xludf.TUBE_BEAM_POWER", "_xll.TUBE_BEAM_POWER", "tube_beam_power",
    "'C:\\Addins\\tubefuncs.xlam'!TUBE_BEAM_POWER", "[1]!TUBE_BEAM_POWER",
])
def test_udf_prefixes_resolve_to_catalogue(tmp_path, written):
    r = calc(tmp_path, {"A1": f"={written}(1000, 2)"})
    assert r.value("S", "A1") == pytest.approx(2000.0)
    assert r.name_errors == []


def test_unknown_function_is_name_error_and_every_one_is_reported(tmp_path):
    r = calc(tmp_path, {"A1": "=FROBNICATE(1)", "A2": "=IFERROR(TUBE_NOSUCH(1), 0)",
                        "A3": "=OFFSET(A1,1,0)"})
    assert r.value("S", "A1") is V.NAME
    assert r.value("S", "A2") == 0.0           # hidden by IFERROR, still reported
    assert r.value("S", "A3") is V.NAME
    cells = {r.cell_name(k): m for k, m in r.name_errors}
    assert set(cells) == {"S!A1", "S!A2", "S!A3"}
    assert "FROBNICATE" in cells["S!A1"]
    assert "TUBE_NOSUCH" in cells["S!A2"]
    assert "not support" in cells["S!A3"]


def test_unparsable_formula_is_an_error_value_not_a_crash(tmp_path):
    r = calc(tmp_path, {"A1": "=SUM(1,", "A2": "=A1#"})
    assert V.is_error(r.value("S", "A1"))
    assert V.is_error(r.value("S", "A2"))


def test_array_formula_spills_catalogue_result_with_element_errors(tmp_path):
    r = calc(tmp_path, {"A1": 2.9e9, "A2": 3.0e9, "A3": -1, "A4": 3.1e9,
                        "B1": ("array", "B1:B4", '=TUBE_TRANSIT_ANGLE(A1:A4, 0.01, "80 kV")'),
                        "C1": "=SUM(B1:B2)", "C2": "=ISERROR(B3)"})
    b = [r.value("S", f"B{i}") for i in range(1, 5)]
    assert all(isinstance(x, float) for x in (b[0], b[1], b[3]))
    assert b[2] is V.NUM
    assert "frequency" in r.messages[r.key("S", "B3")]
    assert r.value("S", "C1") == pytest.approx(b[0] + b[1])
    assert r.value("S", "C2") is True


def test_array_formula_broadcast_rules(tmp_path):
    r = calc(tmp_path, {"A1": ("array", "A1:B2", "=7"),
                        "D1": ("array", "D1:D3", "={1;2}")})
    assert [r.value("S", c) for c in ("A1", "A2", "B1", "B2")] == [7.0] * 4
    assert r.value("S", "D3") is V.NA         # beyond the result: #N/A, as Excel


def test_catalogue_range_argument_in_single_cell_shows_first_element(tmp_path):
    r = calc(tmp_path, {"A1": 1000, "A2": 2000, "B1": "=TUBE_BEAM_POWER(A1:A2, 1)"})
    assert r.value("S", "B1") == pytest.approx(1000.0)


def test_circular_reference_is_a_workbook_error_naming_cells(tmp_path):
    path = make_book(tmp_path / "c.xlsx", {"S": {"A1": "=B1+1", "B1": "=C1", "C1": "=A1"}})
    with pytest.raises(WorkbookError, match=r"circular reference: .*S!A1.*S!B1.*S!C1"):
        recalculate(path)


def test_self_reference_through_a_range_is_circular(tmp_path):
    path = make_book(tmp_path / "c.xlsx", {"S": {"A1": 1, "A3": "=SUM(A1:A5)"}})
    with pytest.raises(WorkbookError, match="circular reference: S!A3 -> S!A3"):
        recalculate(path)


def test_compiled_code_is_shared_between_cells_of_the_same_shape():
    c1, ops1 = compile_formula("=TUBE_TRANSIT_ANGLE(A5, gap, $B$1)")
    c2, ops2 = compile_formula("=TUBE_TRANSIT_ANGLE(A6, gap, $B$1)")
    assert c1 is c2
    assert ops1 == ["A5", "gap", "$B$1"] and ops2 == ["A6", "gap", "$B$1"]


def test_intersection_and_union_operators():
    toks = [t.value for t in tokenize("=SUM(A1:B2 B1:C3)")]
    assert " " in toks


def test_values_are_plain_python_types(tmp_path):
    r = calc(tmp_path, {"A1": "=TUBE_GAMMA(0)", "A2": "=LEN(\"abc\")", "A3": "=1=1"})
    assert type(r.value("S", "A1")) is float
    assert type(r.value("S", "A2")) is float
    assert type(r.value("S", "A3")) is bool


def test_xlsm_loads_and_evaluates(tmp_path):
    from headless_support import rewrite_part

    path = make_book(tmp_path / "m.xlsx", {"S": {"A1": "=_xludf.TUBE_BEAM_POWER(10, 2)"}})
    xlsm = tmp_path / "m.xlsm"
    rewrite_part(path, "xl/vbaProject.bin", None, out=xlsm,
                 extra={"xl/vbaProject.bin": b"not really VBA"})
    r = recalculate(xlsm)
    assert r.value("S", "A1") == pytest.approx(20.0)
    assert r.book.is_macro_enabled


def test_engine_extras_subtotal_quotient_combin_sequence(tmp_path):
    import openpyxl

    path = make_book(tmp_path / "x.xlsx", {"S": {
        "A1": 1, "A2": 2, "A3": "=SUBTOTAL(9,A1:A2)", "A4": 10,
        "A5": "=SUBTOTAL(9,A1:A4)", "A6": "=SUBTOTAL(109,A1:A4)",
        "B1": "=QUOTIENT(-7,2)", "B2": "=COMBIN(5,2)", "B3": "=SUM(SEQUENCE(3,2))",
        "B4": "=QUOTIENT(1,0)", "B5": "=COMBIN(2,5)"}})
    wb = openpyxl.load_workbook(path)
    wb["S"].row_dimensions[4].hidden = True
    wb.save(path)
    r = recalculate(path)
    assert r.value("S", "A3") == 3.0
    assert r.value("S", "A5") == 13.0        # the nested SUBTOTAL in A3 is skipped
    assert r.value("S", "A6") == 3.0         # 109 also skips the hidden row 4
    assert r.value("S", "B1") == -3.0        # truncates toward zero
    assert r.value("S", "B2") == 10.0
    assert r.value("S", "B3") == 21.0
    assert r.value("S", "B4") is V.DIV0
    assert r.value("S", "B5") is V.NUM


def test_implicit_intersection_as_excel_saves_it(tmp_path):
    r = calc(tmp_path, {"A1": 10, "A2": 20, "A3": 30, "B2": "=_xlfn.SINGLE(A1:A3)*2",
                        "B3": "=@A1:A3", "C1": "=_xlfn.SINGLE(A1:A3)"})
    assert r.value("S", "B2") == 40.0
    assert r.value("S", "B3") == 30.0
    assert r.value("S", "C1") == 10.0
