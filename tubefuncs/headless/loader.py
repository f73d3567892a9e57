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
import re
import zipfile
import zlib
from dataclasses import dataclass, field
from xml.etree.ElementTree import ParseError

from openpyxl.reader.excel import ExcelReader
from openpyxl.worksheet._reader import FORMULA_TAG, VALUE_TAG, WorkSheetParser
from openpyxl.worksheet.formula import ArrayFormula, DataTableFormula

from . import values as V
from .limits import DEFAULT_LIMITS, Limits, inspect_file
from .problems import WorkbookError
from .references import MAX_COL, MAX_ROW, parse_area

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
        if element.get("t") == "s" and element.find(FORMULA_TAG) is None:
            index = element.findtext(VALUE_TAG, None)
            if index:
                shared_string(self.shared_strings, index)
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
        return str(shared_string(shared_strings, text))
    return text


def shared_string(shared_strings, text):
    """The shared string a cell's index names; a negative or missing index is a
    corrupt file (Python's negative indexing would silently give another string)."""
    try:
        index = int(text)
    except (TypeError, ValueError):
        index = -1
    if not 0 <= index < len(shared_strings):
        raise WorkbookError(f"shared-string index {str(text)[:20]!r} is not one of the "
                            f"file's {len(shared_strings):,} strings (corrupt workbook)")
    return shared_strings[index]


def _too_many_cells(name: str, limits: Limits) -> WorkbookError:
    return WorkbookError(f"{name}: more than {limits.max_cells:,} cells; over the limit "
                         f"(raise it with --max-cells if the workbook is genuine)")


def outside_sheet(name: str, sheet: str, what: str) -> WorkbookError:
    return WorkbookError(f"{name}: sheet {sheet!r} has a cell at {what[:40]}, outside the "
                         f"sheet (columns A to XFD, rows 1 to {MAX_ROW:,}); corrupt workbook")


_RE_CELL_START = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?c[\s>/]")


class CountingSource:
    """A worksheet part's byte stream that counts cell elements as they arrive, so
    that the cell limit holds before any parser builds a row (one row of millions
    of cells is refused within its first bytes over the limit)."""

    def __init__(self, src, name: str, cells_left: int, limits: Limits):
        self._src = src
        self._name = name
        self._left = cells_left
        self._limits = limits
        self._tail = b""

    def read(self, n=-1):
        data = self._src.read(n if n is not None and n >= 0 else 1 << 20)
        if data:
            probe = self._tail + data
            self._left -= len(_RE_CELL_START.findall(probe))
            # (a cell start cut by the chunk end is counted with the next chunk)
            cut = probe.rfind(b"<")
            self._tail = probe[cut:] if cut >= 0 and len(probe) - cut < 64 else b""
            if self._tail:
                self._left += len(_RE_CELL_START.findall(self._tail))
            if self._left < 0:
                raise _too_many_cells(self._name, self._limits)
        return data

    def close(self):
        self._src.close()


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
            upper = entry.name.upper()
            if any(s.name.upper() == upper for s in sheets):
                raise WorkbookError(
                    f"{name}: two sheets named {entry.name!r} when case is ignored (a "
                    f"spreadsheet application forbids it; references could not tell them "
                    f"apart); corrupt workbook")
            sheet = Sheet(entry.name, len(sheets))
            with reader.archive.open(rel.target) as raw:
                src = CountingSource(raw, name, cells_left, limits)
                try:
                    cells_left = sheet_reader(name, sheet, src, reader.shared_strings,
                                              cells_left, limits)
                except WorkbookError as exc:
                    if exc.message.startswith("shared-string index"):
                        raise WorkbookError(f"{name}: sheet {entry.name!r}: "
                                            f"{exc.message}") from None
                    raise
            sheets.append(sheet)
        if not sheets:
            raise WorkbookError(f"{name}: the workbook has no worksheets")
        book = Book(name, sheets, is_macro_enabled=any(
            n.lower().endswith("vbaproject.bin") for n in reader.valid_files))
        _read_names(book, reader, [s.name for s in sheets])
        return book
    finally:
        reader.archive.close()


def array_block(name: str, sheet: Sheet, r: int, c: int, ref, limits: Limits, cells_left: int):
    """The block of an array formula (its cells count toward the cell limit, checked
    here, before anything lists them); ``(Area or None, cells_left)``."""
    area = parse_area((ref or "").replace("$", ""), sheet.name)
    if area is None:
        if ref and ref.strip():
            raise WorkbookError(f"{name}: array formula in {sheet.name}!R{r}C{c} has the block "
                                f"{str(ref)[:40]!r}, not a range of the sheet; corrupt workbook")
        return None, cells_left
    if area.whole_rows or area.whole_cols:
        raise WorkbookError(f"{name}: array formula in {sheet.name}!R{r}C{c} claims whole "
                            f"rows or columns ({ref}); refused")
    cells_left -= area.size - 1
    if cells_left < 0:
        raise WorkbookError(
            f"{name}: the array formula in {sheet.name}!R{r}C{c} covers {ref} ({area.size:,} "
            f"cells), over the limit of {limits.max_cells:,} cells of a workbook (raise it "
            f"with --max-cells if the workbook is genuine)")
    return area, cells_left


def _read_sheet(name, sheet: Sheet, src, shared_strings, cells_left: int, limits: Limits) -> int:
    parser = _CellParser(src, shared_strings, data_only=False, date_formats=set(),
                         timedelta_formats=set())
    constants, formulas, cached = sheet.constants, sheet.formulas, sheet.cached
    max_row = max_col = 0
    for _, row in parser.parse():
        cells_left -= len(row)
        if cells_left < 0:
            raise _too_many_cells(name, limits)
        for cell in row:
            r, c = cell["row"], cell["column"]
            if not (1 <= r <= MAX_ROW and 1 <= c <= MAX_COL):
                raise outside_sheet(name, sheet.name, f"row {r}, column {c}")
            value = cell["value"]
            if cell["data_type"] == "f":
                if isinstance(value, ArrayFormula):
                    text, ref = value.text or "=", value.ref
                    area, cells_left = array_block(name, sheet, r, c, ref, limits, cells_left)
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
