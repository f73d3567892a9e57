"""Loading a workbook into the engine's model: constants, formulas, cached values.

Reading goes through openpyxl's package reader (shared strings, workbook part,
defined names) and its streaming worksheet parser, driven here directly so
that:

- one pass gives both the formula of a cell and the value a spreadsheet
  application cached for it (openpyxl's public API needs two loads for that);
- nothing is padded to a sheet's claimed dimensions, and the cell count is
  bounded while streaming (:class:`~tubefuncs.headless.limits.Limits`);
- styles, charts and macros are never read: VBA is not executed, not even
  parsed.

Every failure of the file becomes a one-line
:class:`~tubefuncs.headless.problems.WorkbookError`.
"""

from __future__ import annotations

import os
import zipfile
import zlib
from dataclasses import dataclass, field
from xml.etree.ElementTree import ParseError

from openpyxl.reader.excel import ExcelReader
from openpyxl.worksheet._reader import VALUE_TAG, WorkSheetParser
from openpyxl.worksheet.formula import ArrayFormula, DataTableFormula

from . import values as V
from .limits import DEFAULT_LIMITS, Limits, inspect_file
from .problems import WorkbookError
from .references import parse_area

try:  # defusedxml's refusals, when it guards openpyxl's parsing
    from defusedxml import DefusedXmlException
except ImportError:  # pragma: no cover - defusedxml is a dependency
    class DefusedXmlException(Exception):
        pass


@dataclass
class FormulaCell:
    """A formula as written in a cell; ``array_ref`` for an array (spilling) formula."""

    text: str                       # with the leading "="
    array_ref: str | None = None    # e.g. "B5:B205" (anchor is the top-left cell)


@dataclass
class Sheet:
    name: str
    index: int
    constants: dict = field(default_factory=dict)   # (row, col) -> value
    formulas: dict = field(default_factory=dict)    # (row, col) -> FormulaCell
    cached: dict = field(default_factory=dict)      # (row, col) -> value cached in the file
    max_row: int = 0
    max_col: int = 0
    hidden_rows: frozenset = frozenset()


@dataclass
class Book:
    path: str
    sheets: list                                    # [Sheet] in workbook order
    names: dict = field(default_factory=dict)       # (sheet index or None, NAME) -> text
    is_macro_enabled: bool = False

    def __post_init__(self):
        self._by_upper = {s.name.upper(): s for s in self.sheets}

    def sheet(self, name: str) -> Sheet | None:
        return self._by_upper.get(name.upper())

    @property
    def formula_count(self) -> int:
        return sum(len(s.formulas) for s in self.sheets)

    @property
    def has_cached_values(self) -> bool:
        """True when a spreadsheet application saved results of the formulas."""
        return any(v is not V.EMPTY for s in self.sheets for v in s.cached.values())


class _CellParser(WorkSheetParser):
    """openpyxl's streaming worksheet parser, keeping the cached value of formula cells."""

    def parse_cell(self, element):
        cell = super().parse_cell(element)
        if cell["data_type"] == "f":
            cell["cached"] = _cached_value(element, self.shared_strings)
        return cell


def _cached_value(element, shared_strings):
    return cached_value_from_text(element.get("t", "n"), element.findtext(VALUE_TAG, None),
                                  shared_strings)


def cached_value_from_text(kind: str, text, shared_strings):
    """Value a spreadsheet application cached in a cell, from its type and <v> text."""
    if not text:
        return "" if kind == "str" and text is not None else V.EMPTY
    if kind == "n":
        try:
            return float(text)
        except ValueError:
            return V.VALUE
    if kind == "e":
        return V.error(text)
    if kind == "b":
        return text.strip() in ("1", "true")
    if kind == "s":
        try:
            return str(shared_strings[int(text)])
        except (ValueError, IndexError):
            return V.VALUE
    return text


def load_book(path, limits: Limits = DEFAULT_LIMITS, sheet_reader=None) -> Book:
    """Inspect, then read, a workbook (``.xlsx``/``.xlsm``) into a :class:`Book`.

    ``sheet_reader``: replaces :func:`_read_sheet` (same call and result); the
    fast path's scanner (:func:`tubefuncs.headless.vector.reader.read_sheet`)
    plugs in here.
    """
    name = os.fspath(path)
    inspect_file(name, limits)
    try:
        return _read(name, limits, sheet_reader or _read_sheet)
    except WorkbookError:
        raise
    except DefusedXmlException as exc:
        raise WorkbookError(f"{name}: refused unsafe XML ({type(exc).__name__}); the file "
                            f"is not a genuine workbook") from None
    except (ParseError, SyntaxError) as exc:
        raise WorkbookError(f"{name}: corrupt workbook (invalid XML: {exc})") from None
    except (zipfile.BadZipFile, zlib.error, EOFError) as exc:
        raise WorkbookError(f"{name}: corrupt workbook (damaged zip archive: {exc})") from None
    except MemoryError:
        raise WorkbookError(f"{name}: out of memory while reading; refused") from None
    except (KeyError, ValueError, TypeError, AttributeError, IndexError, OSError) as exc:
        detail = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        raise WorkbookError(f"{name}: corrupt or unsupported workbook ({detail})") from None


def _read(name: str, limits: Limits, sheet_reader) -> Book:
    reader = ExcelReader(name, read_only=True, keep_vba=False, data_only=False,
                         keep_links=False)
    try:
        reader.read_manifest()
        reader.read_strings()
        reader.read_workbook()
        sheets = []
        cells_left = limits.max_cells
        for entry, rel in reader.parser.find_sheets():
            if "chartsheet" in (rel.Type or ""):
                continue
            if rel.target not in reader.valid_files:
                raise WorkbookError(
                    f"{name}: sheet {entry.name!r} is listed in the workbook but its part "
                    f"{rel.target} is missing (corrupt workbook)")
            sheet = Sheet(entry.name, len(sheets))
            with reader.archive.open(rel.target) as src:
                cells_left = sheet_reader(name, sheet, src, reader.shared_strings, cells_left,
                                          limits)
            sheets.append(sheet)
        if not sheets:
            raise WorkbookError(f"{name}: the workbook has no worksheets")
        book = Book(name, sheets, is_macro_enabled=any(
            n.lower().endswith("vbaproject.bin") for n in reader.valid_files))
        _read_names(book, reader, [s.name for s in sheets])
        return book
    finally:
        reader.archive.close()


def _read_sheet(name, sheet: Sheet, src, shared_strings, cells_left: int, limits: Limits) -> int:
    parser = _CellParser(src, shared_strings, data_only=False, date_formats=set(),
                         timedelta_formats=set())
    constants, formulas, cached = sheet.constants, sheet.formulas, sheet.cached
    max_row = max_col = 0
    for _, row in parser.parse():
        cells_left -= len(row)
        if cells_left < 0:
            raise WorkbookError(f"{name}: more than {limits.max_cells:,} cells; over the limit "
                                f"(raise it with --max-cells if the workbook is genuine)")
        for cell in row:
            r, c = cell["row"], cell["column"]
            value = cell["value"]
            if cell["data_type"] == "f":
                if isinstance(value, ArrayFormula):
                    text, ref = value.text or "=", value.ref
                    area = parse_area(ref or "", sheet.name)
                    if area is not None:
                        max_row, max_col = max(max_row, area.r2), max(max_col, area.c2)
                    formulas[(r, c)] = FormulaCell(text if text.startswith("=") else "=" + text,
                                                   ref)
                elif isinstance(value, DataTableFormula):
                    formulas[(r, c)] = FormulaCell("=_TUBEFUNCS_DATA_TABLE()")
                else:
                    formulas[(r, c)] = FormulaCell(str(value))
                if len(formulas[(r, c)].text) > limits.max_formula_length:
                    raise WorkbookError(f"{name}: formula in {sheet.name}!R{r}C{c} is longer "
                                        f"than Excel's {limits.max_formula_length} characters")
                cached[(r, c)] = cell.get("cached", V.EMPTY)
            elif value is not None:
                constants[(r, c)] = V.from_file(value, cell["data_type"])
            else:
                continue
            if r > max_row:
                max_row = r
            if c > max_col:
                max_col = c
    sheet.max_row, sheet.max_col = max_row, max_col
    sheet.hidden_rows = frozenset(
        int(r) for r, attrs in parser.row_dimensions.items()
        if str(attrs.get("hidden", "")).lower() in ("1", "true"))
    return cells_left


def _read_names(book: Book, reader, sheet_names) -> None:
    all_sheets = [s.name for s, _ in reader.parser.find_sheets()]
    for defn in reader.parser.defined_names.definedName:
        if not defn.name or defn.value is None:
            continue
        scope = None
        if defn.localSheetId is not None:
            try:
                local = all_sheets[int(defn.localSheetId)]
            except (IndexError, ValueError):
                continue
            sheet = book.sheet(local)
            if sheet is None:
                continue
            scope = sheet.index
        book.names[(scope, defn.name.upper())] = str(defn.value)
