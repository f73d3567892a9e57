"""The fast headless path (same-shape cells as numpy vectors) gives the general
engine's answers: every cell, every error value, every message.

Each workbook here is recalculated by both engines and compared cell by cell:
numbers within 1e-12 relative, everything else (text, booleans, error values,
the messages explaining error values, the #NAME? report) identical.  The
generated sweeps mix what the vector programs cover with what they hand to
the general engine, on purpose.
"""

from __future__ import annotations

import glob
import math
import os
import re
import zipfile

import openpyxl
import pytest
from headless_support import inject_cached, make_book, read_part, rewrite_part, sheet_part

from tubefuncs import cli
from tubefuncs.headless import (
    WorkbookError,
    check,
    read_snapshot,
    recalculate,
    write_recalculated,
)
from tubefuncs.headless import values as V
from tubefuncs.headless.loader import load_book
from tubefuncs.headless.vector.reader import load_book_fast, read_sheet

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DEMO_BOOKS = sorted(glob.glob(os.path.join(ROOT, "workbooks", "*.xlsx")))


# ----------------------------------------------------------------------------- comparing

def _same(a, b) -> bool:
    if V.is_error(a) or V.is_error(b):
        return a is b
    if isinstance(a, bool) or isinstance(b, bool):
        return type(a) is type(b) and a == b
    if isinstance(a, float) and isinstance(b, float):
        return a == b or abs(a - b) <= 1e-12 * max(abs(a), abs(b))
    return type(a) is type(b) and a == b


def assert_engines_agree(path, min_vector_cells: int = 1):
    """Both engines on ``path``: the same cells, values, messages and #NAME? report."""
    general = recalculate(path, engine="general")
    fast = recalculate(path, engine="fast")
    assert general.engine == "general" and fast.engine == "fast"
    assert list(fast.values) == list(general.values)
    diffs = [(general.cell_name(k), general.values[k], fast.values[k])
             for k in general.values if not _same(general.values[k], fast.values[k])]
    assert diffs == []
    messages = [(general.cell_name(k), general.messages.get(k), fast.messages.get(k))
                for k in general.values
                if V.is_error(general.values[k])
                and general.messages.get(k) != fast.messages.get(k)]
    assert messages == []
    assert fast.name_errors == general.name_errors
    assert fast.formula_cells == general.formula_cells
    assert fast.stats.get("vector cells", 0) >= min_vector_cells
    return general, fast


# ----------------------------------------------------------------------------- workbooks

def mixed_sweep(path, rows: int = 60, array: bool = True):
    """A sweep whose columns mix vectorised and general-engine formulas, text
    numbers, blanks, booleans, error values and bad inputs, running values, a
    cycle between two columns (not between cells), cross-sheet references,
    names, relative ranges and an array formula."""
    start = 5
    end = start + rows - 1
    inputs = {"B1": 0.012, "B2": "80 kV", "B3": -1, "B4": "deg"}
    for i, cavity in enumerate(CAVITIES):             # a table argument, the same for all rows
        inputs.update({f"{col}{i + 1}": v for col, v in zip("HIJKLM", cavity)})
    sweep = {"B1": 1e6, "C1": 0.2, "D1": "=1/0"}
    report = {"A1": f"=SUM(Sweep!C{start}:C{end})", "B1": "=COUNT(Sweep!C:C)"}
    names = {"gap": "Inputs!$B$1", "v_nom": "Inputs!$B$2", "f_step": "Sweep!$B$1"}
    for i in range(rows):
        r = start + i
        f = 2.9e9 + i * 1e7
        for every, odd in ((17, "3 GHz"), (19, "abc"), (23, None), (29, True), (31, "#N/A"),
                           (13, -5.0)):
            if i % every == every // 5:
                f = odd
                break
        if f is not None:
            sweep[f"A{r}"] = f
        v = 60000 + 1000 * i
        v = -100 if i % 11 == 4 else 0 if i % 14 == 6 else "3" if i % 16 == 9 else v
        inputs[f"C{r}"] = v
        inputs[f"D{r}"] = ["deg", "rad", "mrad", "kg"][i % 4]
        sweep.update({
            f"B{r}": f"=Inputs!C{r}",
            f"C{r}": f'=TUBE_TRANSIT_ANGLE(A{r}, gap, B{r}, "deg")',
            f"D{r}": f"=TUBE_GAP_COUPLING(A{r}, gap, B{r})",
            f"E{r}": f"=1/(B{r}-80000)",
            f"F{r}": f"=SQRT(B{r}-70000)+LOG10(ABS(D{r}))",
            f"G{r}": f"=IF(ISERROR(C{r}), -1, ROUND(C{r}, 3))",
            f"H{r}": f'=IFERROR(E{r}*1000, "bad")',
            f"I{r}": f"=MAX(C{r}, D{r}*100, 5)-MIN(G{r}, 2)",
            f"J{r}": f'=C{r}&" deg"',
            f"K{r}": f"=A{r}*2+B{r}/1000",
            f"L{r}": f"=A{r}>B{r}",
            f"M{r}": f"=AND(L{r}, D{r}>0.5)",
            f"N{r}": f"=IF(L{r}, 1, 2)+NOT(M{r})",
            f"O{r}": f"=POWER(E{r}*-1000, 1/3)",
            f"P{r}": f"=(B{r}-65000)^-1",
            f"Q{r}": f"=MOD(B{r}, 7)+INT(-B{r}/3000)+SIGN(E{r})",
            f"R{r}": f'=TEXT(C{r}, "0.00")',
            f"S{r}": f"=SUM(B{r}:D{r})",
            f"T{r}": f"=INDEX($B${start}:$B${end}, ROW()-{start - 1})",
            f"U{r}": f"=TUBE_TRANSIT_ANGLE(A{r}, gap, B{r}, Inputs!D{r})",
            f"V{r}": f"=TUBE_TRANSIT_ANGLE(A{r}, Inputs!$B$3, B{r})",
            f"W{r}": f"=W{r - 1}+C{r}" if i else f"=C{r}",
            f"X{r}": f"=Y{r - 1}+1" if i else "=1",
            f"Y{r}": f"=X{r}*2",
            f"Z{r}": f"=ROW()*COLUMN()+ROW(A{r})",
            f"AA{r}": f"=C{r}*$C$1+Sweep!$B$1-f_step+v_nom*0",
            f"AB{r}": f'=TUBE_BEAM_POWER(v_nom, 2, "kW")+ROUNDUP(D{r}, 2)+ROUNDDOWN(-D{r}, 1)',
            f"AC{r}": f"=SUM(A${start}:A{r})",
            f"AD{r}": f"=D{r}=D{r + 1}",
            f"AE{r}": f"=-A{r}%+(+B{r})",
            f"AF{r}": f"=EXP(D{r}*700)+LN(D{r})+COS(PI()*D{r})+ATAN(C{r})+ASIN(D{r}*2)",
            f"AG{r}": f'=IF(D{r}>0.8, "hi", IF(D{r}>0.5, TRUE, ))',
            f"AH{r}": f"=ISNUMBER(A{r})+ISERROR(A{r})*2",
            f"AI{r}": f"=nosuch(A{r})+1",
            f"AJ{r}": f"=$D$1+A{r}",
            f"AK{r}": f"=10^(E{r}*1e6)",
            f"AL{r}": f"=0^(B{r}-67000)",
            f"AM{r}": f"=LOG(B{r}, 10)+LOG(ABS(B{r}))",
            f"AN{r}": f"=OR(A{r}, FALSE)",
            f"AO{r}": f"=TUBE_REDUCTION_FACTOR(A{r}, B{r}, 0.004, 0.006)",
            f"AP{r}": f"=TUBE_SMALL_SIGNAL_GAIN(A{r}, B{r}, 2, 0.004, 0.006, Inputs!$H$1:$M$4)",
        })
        report.update({                    # another sheet reading the sweep row for row
            f"A{r}": f"=Sweep!C{r}/2",
            f"B{r}": f"=Sweep!W{r}-A{r}",
            f"C{r}": f"=COUNT(Inputs!{r}:{r})+SUM(Sweep!D{r}:E{r})",
            f"D{r}": f"=IF(Sweep!L{r}, Sweep!$B$1, A{r}*1E-3)",
        })
    sweep[f"B{end + 2}"] = f"=SUM(C{start}:C{end})"
    sweep[f"C{end + 2}"] = "=AVERAGE(D:D)"
    if array:
        sweep[f"D{end + 2}"] = ("array", f"D{end + 2}:D{end + 5}",
                                f"=TUBE_TRANSIT_ANGLE(A{start}:A{start + 3}, gap, 80000)")
    return make_book(path, {"Sweep": sweep, "Inputs": inputs, "Report": report}, names)


#: An invented four-cavity S-band tube: position (m), frequency (Hz), R/Q (ohm),
#: Q0, Qext, gap length (m).
CAVITIES = [(0, 2.998e9, 90, 3000, 200, 0.01), (0.12, 3.006e9, 90, 3000, 1e9, 0.01),
            (0.24, 3.02e9, 90, 3000, 1e9, 0.01), (0.36, 2.998e9, 90, 3000, 60, 0.01)]

#: Inputs of every kind a cell can hold, for the operator and function battery.
ODD_VALUES = [0, 1, -1, 0.5, -0.5, 2.5, -2.5, 1.5e308, -1.5e308, 1e-308, 3, -8, 1 / 3, 2,
              10, 0.1, 700, -700, 16, -16, 15.5, 100, 123456.789, 1e15 + 0.5, 0.49999999999999994,
              "3", " 4 ", "abc", "", True, False, None, "#N/A", "#DIV/0!", "1e3", "TRUE",
              "80 kV", 0.999, 1.001, 2.9e9]

BATTERY = [
    "A{r}+B{r}", "A{r}-B{r}", "A{r}*B{r}", "A{r}/B{r}", "A{r}^B{r}", "A{r}&B{r}",
    "A{r}=B{r}", "A{r}<>B{r}", "A{r}<B{r}", "A{r}>B{r}", "A{r}<=B{r}", "A{r}>=B{r}",
    "-A{r}", "+A{r}", "A{r}%", "ABS(A{r})", "SQRT(A{r})", "EXP(A{r})", "LN(A{r})",
    "LOG10(A{r})", "LOG(A{r})", "LOG(A{r}, B{r})", "SIN(A{r})", "COS(A{r})", "TAN(A{r})",
    "ASIN(A{r})", "ACOS(A{r})", "ATAN(A{r})", "SINH(A{r})", "COSH(A{r})", "TANH(A{r})",
    "ASINH(A{r})", "ACOSH(A{r})", "ATANH(A{r})", "DEGREES(A{r})", "RADIANS(A{r})",
    "SIGN(A{r})", "INT(A{r})", "POWER(A{r}, B{r})", "MOD(A{r}, B{r})", "ROUND(A{r}, C{r})",
    "ROUNDUP(A{r}, C{r})", "ROUNDDOWN(A{r}, C{r})", "MIN(A{r}, B{r})", "MAX(A{r}, B{r}, 0)",
    "SUM(A{r}, B{r}, 1)", "IF(A{r}, B{r})", "IF(A{r}, B{r}, A{r})", "IF(A{r}, , B{r})",
    "IFERROR(A{r}, B{r})", "AND(A{r}, B{r})", "OR(A{r}, B{r})", "NOT(A{r})",
    "ISERROR(A{r})", "ISNUMBER(A{r})", "PI()*A{r}", "TUBE_GAMMA(A{r})",
    "TUBE_BEAM_POWER(A{r}, B{r})", 'TUBE_VELOCITY(A{r}, "km/s")', "ROUND(A{r}, 2)",
    "TUBE_SKIN_DEPTH(A{r}, B{r})", "A{r}*2^C{r}", "IF(A{r}>B{r}, A{r}, B{r})",
]


def battery_book(path):
    cells = {}
    n = len(ODD_VALUES)
    for i in range(n * 3):
        r = i + 1
        a = ODD_VALUES[i % n]
        b = ODD_VALUES[(i * 7 + 3) % n]
        if a is not None:
            cells[f"A{r}"] = a
        if b is not None:
            cells[f"B{r}"] = b
        cells[f"C{r}"] = [0, 1, 2, -1, -2, 1.7, -1.2, 15, "1", True][i % 10]
        for j, text in enumerate(BATTERY):
            cells[f"{openpyxl.utils.get_column_letter(j + 4)}{r}"] = "=" + text.format(r=r)
    return make_book(path, {"Ops": cells})


def share_column(path, letters: str, first: int, last: int, sheet_index: int = 1):
    """Save a column's formulas as one shared formula, as Excel saves a fill-down."""
    part = sheet_part(path, sheet_index)
    xml = read_part(path, part).decode("utf-8")
    pattern = re.compile(r'<c r="(' + letters + r')(\d+)"([^>]*)><f>([^<]*)</f>')

    def repl(m):
        r = int(m.group(2))
        if not first <= r <= last:
            return m.group(0)
        if r == first:
            return (f'<c r="{letters}{r}"{m.group(3)}><f t="shared" ref="{letters}{first}:'
                    f'{letters}{last}" si="{len(letters)}">{m.group(4)}</f>')
        return f'<c r="{letters}{r}"{m.group(3)}><f t="shared" si="{len(letters)}"/>'

    return rewrite_part(path, part, pattern.sub(repl, xml).encode("utf-8"))


@pytest.fixture(scope="module")
def mixed(tmp_path_factory):
    return mixed_sweep(tmp_path_factory.mktemp("mixed") / "mixed.xlsx")


@pytest.fixture(scope="module")
def plain(tmp_path_factory):
    """The mixed sweep without its array formula (openpyxl writes only the anchor
    cell of an array block, which the fast writer leaves to the openpyxl writer)."""
    return mixed_sweep(tmp_path_factory.mktemp("plain") / "plain.xlsx", array=False)


@pytest.fixture
def fast_writes(monkeypatch):
    """What each call of the fast writer returned (None: it left the job to openpyxl)."""
    from tubefuncs.headless.vector import writer

    results = []
    real = writer.write_fast
    monkeypatch.setattr(writer, "write_fast", lambda *a: results.append(real(*a)) or results[-1])
    return results


# ----------------------------------------------------------------------------- agreement

@pytest.mark.parametrize("path", DEMO_BOOKS, ids=os.path.basename)
def test_demo_workbooks_agree_cell_for_cell(path):
    assert_engines_agree(path, min_vector_cells=30)


@pytest.mark.filterwarnings("ignore::RuntimeWarning")   # (numpy, inside the general engine)
def test_mixed_sweep_agrees_cell_for_cell(mixed):
    general, fast = assert_engines_agree(mixed, min_vector_cells=1500)
    values = list(general.values.values())
    for code in (V.NUM, V.VALUE, V.DIV0, V.NA, V.NAME):   # the errors are really there
        assert any(v is code for v in values), code
    assert fast.stats["groups split (cycle)"] == 2         # X and Y read each other
    assert fast.stats["error cells redone"] > 100


@pytest.mark.filterwarnings("ignore::RuntimeWarning")
def test_operator_and_function_battery_agrees(tmp_path):
    assert_engines_agree(battery_book(tmp_path / "ops.xlsx"), min_vector_cells=5000)


def test_catalogue_table_arguments_agree(tmp_path):
    cells = {f"{col}{i + 1}": v for i, cavity in enumerate(CAVITIES)
             for col, v in zip("HIJKLM", cavity)}
    for r in range(1, 13):
        cells[f"A{r}"] = 70000 + 2500 * r if r != 7 else -5
        cells[f"B{r}"] = (f'=TUBE_SMALL_SIGNAL_BANDWIDTH(A{r}, 10, 0.004, 0.006, $H$1:$M$4, 1, '
                          f'"MHz")')
        cells[f"C{r}"] = f"=TUBE_SMALL_SIGNAL_PHASE(2.999E9+A{r}*10, A{r}, 10, 0.004, 0.006, " \
                         f"$H$1:$M$4)"
    assert_engines_agree(make_book(tmp_path / "t.xlsx", {"S": cells}), min_vector_cells=24)


def test_shared_formulas_agree_and_are_grouped_without_their_text(tmp_path, mixed):
    path = tmp_path / "shared.xlsx"
    path.write_bytes(open(mixed, "rb").read())
    for letters in ("C", "F", "AF", "W"):
        share_column(path, letters, 5, 64)
    book = load_book_fast(path)
    cell = book.sheet("Sweep").formulas[(30, 3)]
    assert cell._text is None                           # not translated while reading
    assert cell.text == '=TUBE_TRANSIT_ANGLE(A30, gap, B30, "deg")'
    assert_engines_agree(path, min_vector_cells=1500)


def test_cached_values_and_check_agree(tmp_path):
    path = make_book(tmp_path / "c.xlsx", {"S": {f"A{r}": r for r in range(1, 30)} | {
        f"B{r}": f"=TUBE_BEAM_POWER(A{r}, 2)" for r in range(1, 30)}})
    inject_cached(path, 1, {f"B{r}": 2.0 * r for r in range(1, 30)} | {"B7": "#NUM!"})
    general = check(path, engine="general")
    fast = check(path)
    assert fast[0].engine == "fast"
    assert [d.cell for d in fast[1].differences] == [d.cell for d in general[1].differences] \
        == ["S!B7"]


REFUSED = {
    "circular": ({f"A{r}": f"=B{r}+1" for r in range(1, 9)}
                 | {f"B{r}": f"=A{r + 1}" for r in range(1, 9)} | {"A9": "=B1"},
                 "circular reference"),
    "long formula": ({f"A{r}": "=1" + "+1" * 4100 for r in range(1, 4)}, "longer than"),
    "cells": ({f"A{r}": f"=B{r}*2" for r in range(1, 40)}, "cells; over the limit"),
    "range": ({f"A{r}": f"=SUM(B{r}:XFD1048576)" for r in range(1, 4)}, "over the limit"),
}


@pytest.mark.parametrize("case", sorted(REFUSED))
def test_refusals_are_the_general_engines(tmp_path, case):
    from dataclasses import replace

    from tubefuncs.headless import DEFAULT_LIMITS

    cells, words = REFUSED[case]
    path = make_book(tmp_path / "c.xlsx", {"S": cells})
    limits = replace(DEFAULT_LIMITS, max_cells=20)
    with pytest.raises(WorkbookError) as general:
        recalculate(path, engine="general", limits=limits if case == "cells" else DEFAULT_LIMITS)
    with pytest.raises(WorkbookError) as fast:
        recalculate(path, engine="fast", limits=limits if case == "cells" else DEFAULT_LIMITS)
    assert fast.value.message == general.value.message
    assert words in fast.value.message


def test_unknown_engine_is_refused(tmp_path, mixed):
    with pytest.raises(ValueError, match="engine"):
        recalculate(mixed, engine="turbo")


# ----------------------------------------------------------------------------- reading

def _same_book(a, b):
    assert [s.name for s in a.sheets] == [s.name for s in b.sheets]
    assert a.names == b.names and a.is_macro_enabled == b.is_macro_enabled
    for sa, sb in zip(a.sheets, b.sheets):
        assert (sa.max_row, sa.max_col, sa.hidden_rows) == (sb.max_row, sb.max_col,
                                                             sb.hidden_rows)
        assert list(sa.constants) == list(sb.constants)
        assert all(_same(sa.constants[k], sb.constants[k]) for k in sa.constants)
        assert list(sa.formulas) == list(sb.formulas)
        assert all((sa.formulas[k].text, sa.formulas[k].array_ref)
                   == (sb.formulas[k].text, sb.formulas[k].array_ref) for k in sa.formulas)
        assert list(sa.cached) == list(sb.cached)
        assert all(_same(sa.cached[k], sb.cached[k]) for k in sa.cached)


@pytest.mark.parametrize("path", DEMO_BOOKS, ids=os.path.basename)
def test_fast_reader_reads_what_openpyxl_reads(path):
    _same_book(load_book(path, sheet_reader=read_sheet), load_book(path))


def test_fast_reader_on_shared_formulas_cached_values_and_hidden_rows(tmp_path):
    path = make_book(tmp_path / "r.xlsx", {"S": {
        "A1": 1, "A2": "text & <more>", "A3": True, "A4": "#N/A", "A5": 2.5e-300,
        "A6": "line\nbreak", "A7": 1234567890123,
        **{f"B{r}": f"=A{r}*2" for r in range(1, 8)},
        "C1": ("array", "C1:C3", "=A1:A3"), "D1": '="a"&"b"'}})
    wb = openpyxl.load_workbook(path)
    wb["S"].row_dimensions[3].hidden = True
    wb.save(path)
    inject_cached(path, 1, {"B1": 2.0, "B2": "#VALUE!", "B3": True, "D1": "ab"})
    share_column(path, "B", 1, 7)
    _same_book(load_book(path, sheet_reader=read_sheet), load_book(path))


def test_fast_reader_converts_numbers_and_formula_texts_in_bulk_exactly(tmp_path):
    # Numbers and formula texts are converted a region at a time (one join, one
    # decode); every odd case must still read as openpyxl's parser reads it.
    numbers = ["-0", "0", "-00", "+7", "1E+300", "-2.5e-300", "12345678901234567890123",
               "0.1", "1.", "3e5", "-0.0", "007"]
    formulas = ["A1&amp;&quot;x&quot;", "IF(A2&lt;&gt;1,&apos;S&apos;!A1,2)", "A3+&#49;",
                "A4+\r\n1", "A5 +\r1"]
    cells = {f"A{i}": 1.0 for i in range(1, len(numbers) + 1)}
    cells.update({f"B{i}": f"=A{i}" for i in range(1, len(formulas) + 1)})
    path = make_book(tmp_path / "n.xlsx", {"S": {**cells, "C1": "a text"}, "T": {"A1": 1}})
    xml = read_part(path, sheet_part(path)).decode("utf-8")
    for i, text in enumerate(numbers, start=1):
        if i > 1:
            xml = re.sub(rf'(<c r="A{i}"[^>]*><v>)[^<]*(</v>)', rf"\g<1>{text}\g<2>", xml)
    for i, text in enumerate(formulas, start=1):
        xml = xml.replace(f"<f>A{i}</f>", f"<f>{text}</f>", 1)
    rewrite_part(path, sheet_part(path), xml.encode("utf-8"))
    fast, slow = load_book(path, sheet_reader=read_sheet), load_book(path)
    _same_book(fast, slow)
    for key, value in slow.sheets[0].constants.items():
        assert repr(fast.sheets[0].constants[key]) == repr(value), key   # the sign of zero
    assert fast.sheets[0].constants[(2, 1)] == 0.0 and math.copysign(
        1, fast.sheets[0].constants[(2, 1)]) == 1                     # "-0" is a whole zero
    assert [fast.sheets[0].formulas[(i, 2)].text for i in (1, 3, 4)] == [
        '=A1&"x"', "=A3+1", "=A4+\n1"]


def test_fast_reader_hands_unusual_xml_to_openpyxl(tmp_path, mixed, monkeypatch):
    path = tmp_path / "odd.xlsx"
    xml = read_part(mixed, "xl/worksheets/sheet1.xml").replace(
        b"<sheetData>", b"<sheetData><!-- a comment -->", 1)
    rewrite_part(mixed, "xl/worksheets/sheet1.xml", xml, out=path)
    from tubefuncs.headless.vector import reader

    calls = []
    real = reader.load_book
    monkeypatch.setattr(reader, "load_book", lambda *a, **k: calls.append(k) or real(*a, **k))
    book = load_book_fast(path)
    assert [("sheet_reader" in k) for k in calls] == [True, False]   # fast, then openpyxl
    _same_book(book, load_book(mixed))


# ----------------------------------------------------------------------------- writing

def _cells(path):
    wb = openpyxl.load_workbook(path)
    return {(ws.title, c.coordinate): (c.value, c.data_type, c.style_id)
            for ws in wb.worksheets for row in ws.iter_rows() for c in row}


def test_fast_writer_writes_what_the_openpyxl_writer_writes(tmp_path, plain, fast_writes):
    fast = write_recalculated(recalculate(plain), tmp_path / "fast.xlsx")
    general = write_recalculated(recalculate(plain, engine="general"), tmp_path / "gen.xlsx")
    assert fast_writes == [fast]                         # the general result goes to openpyxl
    a, b = _cells(fast), _cells(general)
    assert a.keys() == b.keys()
    for key in a:
        (va, ta, sa), (vb, tb, sb) = a[key], b[key]
        assert ta == tb and sa == sb, key
        # openpyxl keeps 16 digits; a long vectorised chain (the small-signal gain) and its
        # cell-by-cell twin round differently in numpy's SIMD loops by a few ulps
        assert va == vb or abs(va - vb) <= 1e-14 * abs(vb), key
    assert b"<f" not in read_part(fast, "xl/worksheets/sheet1.xml")


def test_fast_writer_matches_cells_in_any_order(plain, monkeypatch):
    """Cells given in the part's order are matched by position; in another order
    (from any region on) by address: the same bytes either way."""
    import io

    from tubefuncs.headless.vector import writer

    monkeypatch.setattr(writer, "CHUNK", 512)            # many regions
    recalc = recalculate(plain)
    part = read_part(plain, sheet_part(plain, 1))
    cells = [(r, c, v) for (s, r, c), v in recalc.values.items() if s == 0]
    assert len(cells) > 50

    def rewrite(order):
        rows, cols, values = (list(x) for x in zip(*order))
        out = io.BytesIO()
        writer._SheetRewriter(rows, cols, values).rewrite(io.BytesIO(part), out)
        return out.getvalue()

    in_order = rewrite(cells)
    assert b"<f" not in in_order and in_order != part
    late = cells[:-3] + cells[-3:][::-1]                 # out of order in the last region
    middle = cells[:len(cells) // 2] + cells[len(cells) // 2:][::-1]
    assert rewrite(cells[::-1]) == rewrite(late) == rewrite(middle) == in_order
    with pytest.raises(writer._CannotWrite):            # a cell the part does not hold
        rewrite(cells + [(9999, 3, 1.0)])


def test_fast_writer_drops_the_calculation_chain(tmp_path, plain, fast_writes):
    path = tmp_path / "chain.xlsx"
    ct = read_part(plain, "[Content_Types].xml").replace(
        b"</Types>", b'<Override PartName="/xl/calcChain.xml" ContentType="application/'
                     b'vnd.openxmlformats-officedocument.spreadsheetml.calcChain+xml"/></Types>')
    rels = read_part(plain, "xl/_rels/workbook.xml.rels").replace(
        b"</Relationships>", b'<Relationship Id="rId99" Type="http://schemas.openxmlformats.org'
                             b'/officeDocument/2006/relationships/calcChain" '
                             b'Target="calcChain.xml"/></Relationships>')
    rewrite_part(plain, "[Content_Types].xml", ct, out=path)
    rewrite_part(path, "xl/_rels/workbook.xml.rels", rels,
                 extra={"xl/calcChain.xml": b'<calcChain><c r="C5" i="1"/></calcChain>'})
    out = write_recalculated(recalculate(path), tmp_path / "out.xlsx")
    assert fast_writes == [out]
    with zipfile.ZipFile(out) as z:
        assert "xl/calcChain.xml" not in z.namelist()
        assert b"calcChain" not in z.read("[Content_Types].xml")
        assert b"calcChain" not in z.read("xl/_rels/workbook.xml.rels")
    assert openpyxl.load_workbook(out)["Sweep"]["C5"].data_type == "n"


def test_fast_writer_leaves_other_cases_to_openpyxl(tmp_path, plain, mixed, fast_writes):
    recalc = recalculate(plain)
    write_recalculated(recalc, tmp_path / "other.xlsm")           # a change of file kind
    write_recalculated(recalculate(mixed), tmp_path / "block.xlsx")  # block cells not in the file
    assert fast_writes == [None, None]
    assert openpyxl.load_workbook(tmp_path / "other.xlsm")["Sweep"]["Y6"].value == 6.0
    assert openpyxl.load_workbook(tmp_path / "block.xlsx")["Sweep"]["D67"].value == \
        pytest.approx(recalculate(mixed).value("Sweep", "D67"))


# ----------------------------------------------------------------------------- choosing

def test_command_line_engine_option(tmp_path, mixed, capsys):
    for engine in ("general", "fast"):
        out = tmp_path / f"{engine}.xlsx"
        assert cli.main(["recalc", str(mixed), "-o", str(out), "--engine", engine]) == 0
        assert cli.main(["snapshot", str(mixed), "-o", str(tmp_path / f"{engine}.tsv"),
                         "--engine", engine]) == 0
    general, fast = (read_snapshot(tmp_path / f"{e}.tsv", load_book(mixed))
                     for e in ("general", "fast"))
    assert general.keys() == fast.keys()
    assert all(_same(general[k], fast[k]) for k in general)
    assert cli.main(["check", str(mixed), "--expected", str(tmp_path / "fast.tsv"),
                     "--engine", "general"]) == 1          # the book's #NAME? cells fail ...
    assert cli.main(["check", str(mixed), "--expected", str(tmp_path / "fast.tsv"),
                     "--engine", "general", "--accept-name", "NOSUCH"]) == 0   # ... unless accepted
    capsys.readouterr()
    with pytest.raises(SystemExit):
        cli.main(["recalc", str(mixed), "-o", str(tmp_path / "x.xlsx"), "--engine", "turbo"])


pytest_plugins = ["pytester"]


def test_pytest_plugin_engine_setting(pytester, plain, monkeypatch):
    import importlib.metadata
    import shutil

    import tubefuncs.headless as headless
    from tubefuncs.headless import write_snapshot

    args = [] if any(ep.value == "tubefuncs.pytest_plugin" for ep in
                     importlib.metadata.entry_points(group="pytest11")) \
        else ["-p", "tubefuncs.pytest_plugin"]
    books = pytester.mkdir("books")
    book = shutil.copy(plain, books / "sweep.xlsx")
    write_snapshot(recalculate(book))
    engines = []
    real = headless.recalculate
    monkeypatch.setattr(headless, "recalculate",
                        lambda *a, **k: engines.append(k.get("engine")) or real(*a, **k))
    accept = "tubefuncs_accept_names = NOSUCH\n"        # the book's #NAME? cells, on purpose
    pytester.makeini("[pytest]\ntubefuncs_workbooks = books/*.xlsx\ntubefuncs_engine = general\n"
                     + accept)
    pytester.runpytest(*args).assert_outcomes(passed=2)          # sheets Sweep and Report
    pytester.makeini("[pytest]\ntubefuncs_workbooks = books/*.xlsx\n" + accept)
    pytester.runpytest(*args).assert_outcomes(passed=2)
    assert engines == ["general", "fast"]
    pytester.makeini("[pytest]\ntubefuncs_workbooks = books/*.xlsx\ntubefuncs_engine = turbo\n")
    result = pytester.runpytest(*args)
    result.assert_outcomes(failed=2)
    result.stdout.fnmatch_lines(["*tubefuncs_engine must be one of fast, general*"])
