"""A fast worksheet reader: expat for safety, a compiled pattern for the cells.

openpyxl's worksheet parser builds an element per XML node and spends most of
a large sheet's load time doing so.  This reader reads the same part in
chunks and

1. feeds every byte to expat with no per-element callbacks (C speed), which
   proves the part well-formed; a DTD, an entity declaration or an external
   entity stops it (the DTD check of :func:`~..limits.inspect_file` already
   ran on the part's head);
2. picks the cells out of ``<sheetData>`` with one compiled pattern, for the
   layout spreadsheet applications and openpyxl write (``<c r=.. s=.. t=..>``
   with ``<f>``, ``<v>``, ``<is>`` children);
3. gives each cell exactly the meaning openpyxl's parser and
   :func:`tubefuncs.headless.loader._read_sheet` give it (same number and
   string conversions, same shared-formula translation, same limits).

Whatever it does not recognise (comments, CDATA, processing instructions,
rich inline text, extension elements inside rows, other namespaces or
encodings, cells without an address...) raises :class:`Unsupported`, and the
workbook is read again by openpyxl's parser, so the result never depends on
which reader ran.  So does a file over a limit (too many cells, a formula too
long, a DTD): the refusal, and its message, come from the openpyxl pass.

Dependent cells of a shared formula (``<f t="shared" si=".."/>``) get their
text translated from the master formula only when something asks for it; the
fast path groups them by the shared formula instead.
"""

from __future__ import annotations

import html
import itertools
import math
import operator
import re
import xml.parsers.expat

from openpyxl.formula.translate import Translator
from openpyxl.utils.cell import column_index_from_string
from openpyxl.utils.datetime import from_ISO8601
from openpyxl.worksheet._reader import _cast_number

from .. import values as V
from ..limits import Limits
from ..loader import (
    DEFAULT_LIMITS,
    FormulaCell,
    Sheet,
    array_block,
    cached_value_from_text,
    load_book,
    shared_string,
)
from ..problems import WorkbookError
from ..references import MAX_COL, MAX_ROW

CHUNK = 512 * 1024    # (regions of this size keep the per-cell lists small: faster than 4 MB)
MAIN_NS = b"http://schemas.openxmlformats.org/spreadsheetml/2006/main"


class Unsupported(Exception):
    """Something only openpyxl's parser handles: the workbook is read again by it."""


def load_book_fast(path, limits: Limits = DEFAULT_LIMITS):
    """:func:`tubefuncs.headless.loader.load_book` with the fast worksheet reader.

    Falls back to openpyxl's worksheet parser for the whole workbook when a
    sheet holds anything the fast reader does not recognise.
    """
    try:
        return load_book(path, limits, sheet_reader=read_sheet)
    except Unsupported:
        return load_book(path, limits)


# --------------------------------------------------------------------- shared formulas

class _SharedMaster:
    """The master cell of a shared formula; translates it to dependent cells."""

    __slots__ = ("text", "coordinate", "_translator", "key")

    def __init__(self, text: str, coordinate: str, key):
        self.text = text
        self.coordinate = coordinate
        self.key = key                 # (sheet index, si): the group of its cells
        self._translator = None

    def translate(self, coordinate: str) -> str:
        if self._translator is None:
            self._translator = Translator(self.text, self.coordinate)
        return self._translator.translate_formula(coordinate)


class SharedFormulaCell(FormulaCell):
    """A dependent cell of a shared formula; its text is translated on first use
    (as openpyxl's parser translates it)."""

    def __init__(self, master: _SharedMaster, coordinate: str):  # noqa: D107
        self.master = master
        self.coordinate = coordinate
        self.array_ref = None
        self._text = None

    @property
    def text(self) -> str:
        if self._text is None:
            self._text = self.master.translate(self.coordinate)
        return self._text

    @text.setter
    def text(self, value: str) -> None:
        self._text = value


def shared_key(cell):
    """``(sheet index, si)`` of a shared formula's cells (master included), else None."""
    master = getattr(cell, "master", None)
    return master.key if master is not None else None


class _MasterCell(FormulaCell):
    """The master cell of a shared formula (its own text; knows its group)."""

    def __init__(self, text: str, master: _SharedMaster):  # noqa: D107
        self.text = text
        self.array_ref = None
        self.master = master


# --------------------------------------------------------------------- patterns

def _patterns(prefix: bytes):
    p = re.escape(prefix)
    cell = re.compile(
        rb"<" + p + rb"c r=\"([A-Z]{1,3})([0-9]{1,7})\"(?: s=\"[0-9]+\")?(?: t=\"([a-zA-Z]+)\")?"
        rb"([^>/]*)"
        rb"(?:/>|>\s*"
        rb"(?:(<" + p + rb"f)((?:\s[^>]*?)?)(?:/>|>([^<]*)</" + p + rb"f>)\s*)?"
        rb"(?:(<" + p + rb"v)\b[^>]*?(?:/>|>([^<]*)</" + p + rb"v>)\s*)?"
        rb"(?:(<" + p + rb"is>)(.*?)</" + p + rb"is>\s*)?"
        rb"</" + p + rb"c>)", re.S)
    row = re.compile(rb"<" + p + rb"row\b([^>]*?)/?>")
    return {
        "cell": cell,
        "row": row,
        "cell_start": b"<" + prefix + b"c",
        "ext": b"<" + prefix + b"ext",
        "data_open": re.compile(rb"<" + p + rb"sheetData\b[^>]*?(/?)>"),
        "data_close": b"</" + prefix + b"sheetData>",
        "row_close": b"</" + prefix + b"row>",
        "plain_text": re.compile(rb"\s*<" + p + rb"t(?:\s[^>]*)?(?:/>|>([^<]*)</" + p +
                                 rb"t>)\s*\Z"),
    }


_PATTERNS: dict = {}
_ROOT = re.compile(rb"<(?:([A-Za-z_][\w.-]*):)?worksheet\b([^>]*)>")
_DECL = re.compile(rb"\A(?:\xef\xbb\xbf)?\s*<\?xml\b([^?]*)\?>")
_ENCODING = re.compile(rb"encoding\s*=\s*[\"']([^\"']*)[\"']")
_ATTR = re.compile(rb"([\w:.-]+)\s*=\s*\"([^\"]*)\"")
_F_ATTR = re.compile(rb"([\w:.-]+)\s*=\s*\"([^\"]*)\"")
_COLUMNS: dict = {}
_KINDS = {b"": "n", b"n": "n", b"s": "s", b"str": "str", b"b": "b", b"e": "e",
          b"inlineStr": "inlineStr", b"d": "d"}


def _number(raw: bytes) -> float:
    """A number cell's value as openpyxl casts it (int or float), as a float."""
    if b"." in raw or b"e" in raw or b"E" in raw:
        value = float(raw)
    else:
        value = float(int(raw))
    if value != value or value in (math.inf, -math.inf):
        raise Unsupported("non-finite number")
    return value


#: The bytes of plain number texts (what spreadsheet applications write).
_NUMBER_BYTES = b"0123456789.eE+-"


def _numbers(raws: list) -> list:
    """:func:`_number` of each text, in C-speed passes when all are plain numbers.

    For a text of digits, signs, points and exponents (at most 300 bytes, far
    from int()'s digit limit) ``float(text)`` is what :func:`_number` gives: the
    same texts are accepted, both roundings are correct; but for a whole
    negative zero ("-0", which :func:`_number` reads as +0.0): any zero, and
    anything unusual, takes :func:`_number` one by one.
    """
    if not raws:
        return []
    if b"".join(raws).translate(None, _NUMBER_BYTES) or max(map(len, raws)) > 300:
        return list(map(_number, raws))
    try:
        values = list(map(float, raws))
    except ValueError:
        return list(map(_number, raws))
    if 0.0 in values or not -math.inf < min(values) <= max(values) < math.inf:
        return list(map(_number, raws))
    return values


def _formula_texts(raws: list) -> list:
    """The texts of formula elements, each with its leading "=": decoded and
    unescaped as :func:`_text` does, in one pass over the region's formulas
    joined by NUL (which XML cannot hold, and no reference can span)."""
    joined = (b"=" + b"\x00=".join(raws)).decode("utf-8")
    if "&#" in joined:                        # (character references: one by one)
        texts = ["=" + _unescape(t[1:]) for t in joined.split("\x00")]
    else:
        texts = _unescape(joined).split("\x00")
    if len(texts) != len(raws):
        raise Unsupported("NUL in a formula")
    return texts


def _column(letters: bytes) -> int:
    col = _COLUMNS.get(letters)
    if col is None:
        col = _COLUMNS[letters] = column_index_from_string(letters.decode("ascii"))
    return col


def _text(raw: bytes) -> str:
    """Element text as an XML parser gives it (line ends normalised, references resolved)."""
    return _unescape(raw.decode("utf-8"))


def _unescape(text: str) -> str:
    """:func:`_text` of already decoded text."""
    if "\r" in text:
        text = text.replace("\r\n", "\n").replace("\r", "\n")
    if "&" in text:
        if "&#" in text:
            text = html.unescape(text)   # well-formed and DTD-free: only XML's own references
        else:
            text = (text.replace("&lt;", "<").replace("&gt;", ">").replace("&quot;", '"')
                    .replace("&apos;", "'").replace("&amp;", "&"))
    return text


def _attrs(raw: bytes) -> dict:
    if b"&" in raw or b"'" in raw or b"\t" in raw or b"\n" in raw or b"\r" in raw:
        raise Unsupported("attribute needing normalisation")
    return {k.decode("ascii"): v.decode("utf-8") for k, v in _ATTR.findall(raw)}


# --------------------------------------------------------------------- the reader

class _Scanner:
    def __init__(self, name: str, sheet: Sheet, shared_strings, limits: Limits,
                 cells_left: int):
        self.name = name
        self.cells_left = cells_left
        self.sheet = sheet
        self.shared_strings = shared_strings
        self.limits = limits
        self.pat = None
        self.masters: dict = {}
        self.max_row = 0
        self.max_col = 0
        self.hidden: set = set()
        self.cells = 0

    # ------------------------------------------------------------ stream
    def run(self, src) -> None:
        parser = xml.parsers.expat.ParserCreate()

        def refuse(*_args):
            raise Unsupported("DTD or entity declaration")

        parser.StartDoctypeDeclHandler = refuse
        parser.EntityDeclHandler = refuse
        parser.UnparsedEntityDeclHandler = refuse
        parser.ExternalEntityRefHandler = refuse
        parser.SkippedEntityHandler = refuse
        state = "head"
        buf = b""
        tail = b""
        first = True
        while True:
            chunk = src.read(max(CHUNK, 65536) if first else CHUNK)   # (the prolog in one piece)
            try:
                parser.Parse(chunk, not chunk)
            except xml.parsers.expat.ExpatError as exc:
                raise Unsupported(f"not well-formed: {exc}") from None
            if not chunk:
                break
            scan = chunk
            if first:
                decl = _DECL.match(chunk)
                if decl:
                    enc = _ENCODING.search(decl.group(1))
                    if enc and enc.group(1).lower() not in (b"utf-8", b"utf8"):
                        raise Unsupported("encoding")
                    scan = chunk[decl.end():]
                elif chunk[:2] in (b"\xff\xfe", b"\xfe\xff"):
                    raise Unsupported("UTF-16")
                first = False
            probe = tail + scan
            if b"<!" in probe or b"<?" in probe or b"]]>" in probe:
                raise Unsupported("comment, CDATA or processing instruction")
            tail = chunk[-8:]
            if state == "after":
                continue
            if state == "head":
                buf += chunk
                if self.pat is None:
                    root = _ROOT.search(buf)
                    if root is None:
                        if len(buf) > 256 * 1024:
                            raise Unsupported("no worksheet root")
                        continue
                    self._namespace(root)
                m = self.pat["data_open"].search(buf)
                if m is None:
                    buf = buf[-4096:]      # (only the start of <sheetData> is looked for)
                    continue
                if m.group(1):
                    state, buf = "after", b""
                    continue
                state, chunk, buf = "data", buf[m.end():], b""
                pending, recent = [], b""
            # data: whole rows go to _region; the rest waits for the next chunk
            window = recent + chunk
            recent = window[-64:]
            if window.find(self.pat["data_close"]) >= 0:
                data = b"".join(pending) + buf + chunk
                self._region(data[:data.find(self.pat["data_close"])])
                state, buf, pending = "after", b"", []
                continue
            cut = chunk.rfind(self.pat["row_close"])
            if cut < 0:
                pending.append(buf)
                buf = chunk
                continue
            cut += len(self.pat["row_close"])
            self._region(b"".join(pending) + buf + chunk[:cut])
            pending, buf = [], chunk[cut:]
        if state == "data":
            raise Unsupported("sheet data without its end")
        if self.pat is None:
            raise Unsupported("no worksheet root")

    def _namespace(self, root) -> None:
        prefix = root.group(1) or b""
        attrs = dict(_ATTR.findall(root.group(2)))
        declared = attrs.get(b"xmlns:" + prefix if prefix else b"xmlns")
        if declared != MAIN_NS:
            raise Unsupported("namespace")
        key = prefix + b":" if prefix else b""
        if key not in _PATTERNS:
            _PATTERNS[key] = _patterns(key)
        self.pat = _PATTERNS[key]

    # ------------------------------------------------------------ cells
    def _region(self, region: bytes) -> None:
        pat = self.pat
        if pat["ext"] in region:
            raise Unsupported("extension element inside sheet data")
        rows = pat["row"].findall(region)
        # (rows with their number and nothing hidden, the usual: nothing to keep)
        if b"hidden" in region or not all(map(operator.contains, rows,
                                              itertools.repeat(b' r="'))):
            for attrs in rows:
                self._row(attrs)
        cells = pat["cell"].findall(region)
        if len(cells) != region.count(pat["cell_start"]):
            raise Unsupported("cell layout")
        self.cells += len(cells)
        if self.cells > self.cells_left:
            raise Unsupported("over the cell limit")   # openpyxl's pass says so, exactly
        if cells:
            self._cells(cells)

    def _cells(self, cells: list) -> None:
        """Store a region's cells, column by column of the match (C-speed passes where
        the cells are plain: formulas without attributes, numbers)."""
        sheet = self.sheet
        strings = self.shared_strings
        max_len = self.limits.max_formula_length
        (letters, digits, raw_kinds, attrs, f_tags, f_attrs, f_texts, v_tags, v_texts, is_tags,
         is_bodies) = zip(*cells)
        rows = list(map(int, digits))
        cols = list(map(_COLUMNS.get, letters))
        if None in cols:
            cols = [c or _column(lt) for c, lt in zip(cols, letters)]
        if not (1 <= min(rows) and max(rows) <= MAX_ROW and max(cols) <= MAX_COL):
            raise Unsupported("cell outside the sheet")   # (openpyxl's pass says where)
        keys = list(zip(rows, cols))
        kinds = list(map(_KINDS.get, raw_kinds))
        if None in kinds:
            kinds = [k or raw.decode("ascii") for k, raw in zip(kinds, raw_kinds)]
        if any(attrs):
            for i, a in enumerate(attrs):
                if a and b"t=" in a:
                    kinds[i] = _attrs(a).get("t", "n")
        stored = []                                   # indices of cells that hold something
        formula_at = list(itertools.compress(itertools.count(), f_tags))
        if formula_at:
            fkeys = list(map(keys.__getitem__, formula_at))
            texts = _formula_texts(list(map(f_texts.__getitem__, formula_at)))
            if any(f_attrs):
                made = self._special_formulas(formula_at, texts, keys, letters, digits,
                                              f_attrs, f_texts)
            else:
                if max(map(len, texts)) > max_len:     # (texts with their "=")
                    j = next(j for j, t in enumerate(texts) if len(t) > max_len)
                    self._too_long(*keys[formula_at[j]])
                made = list(map(FormulaCell, texts))
            sheet.formulas.update(zip(fkeys, made))
            empty = V.EMPTY
            if "str" not in kinds and not any(map(v_texts.__getitem__, formula_at)):
                # no cached values (a workbook openpyxl wrote): one C pass
                sheet.cached.update(dict.fromkeys(fkeys, empty))
            else:
                sheet.cached.update(zip(
                    fkeys,
                    [self._cached(kinds[i], v_tags[i], v_texts[i], strings)
                     if v_texts[i] or kinds[i] == "str" else empty for i in formula_at]))
            stored = formula_at
        constant_at = list(itertools.compress(itertools.count(), map(operator.not_, f_tags)))
        if constant_at:
            numbers = [i for i in constant_at if kinds[i] == "n" and v_texts[i]]
            values = _numbers(list(map(v_texts.__getitem__, numbers)))
            if len(numbers) != len(constant_at):
                # The numbers are converted together all the same (a header row of
                # text is usual); the other cells one by one; the cells keep their order.
                held = dict(zip(numbers, values))
                for i in [i for i in constant_at if kinds[i] != "n"]:
                    kind = kinds[i]
                    if kind == "inlineStr":
                        if not is_tags[i]:
                            continue
                        value = self._inline(is_bodies[i])
                    elif v_texts[i]:
                        value = self._constant(kind, _text(v_texts[i]), strings)
                    else:
                        continue
                    held[i] = value
                numbers = sorted(held)
                values = list(map(held.__getitem__, numbers))
            sheet.constants.update(zip(map(keys.__getitem__, numbers), values))
            stored = stored + numbers if stored else numbers
        if stored:
            self.max_row = max(self.max_row, max(map(rows.__getitem__, stored)))
            self.max_col = max(self.max_col, max(map(cols.__getitem__, stored)))

    def _special_formulas(self, formula_at, texts, keys, letters, digits, f_attrs, f_texts):
        """Formula cells of a region where some are shared, array or data-table formulas."""
        max_len = self.limits.max_formula_length
        made = []
        for j, i in enumerate(formula_at):
            if not f_attrs[i]:
                if len(texts[j]) > max_len:            # (texts with their "=")
                    self._too_long(*keys[i])
                made.append(FormulaCell(texts[j]))
                continue
            cell = self._formula(letters[i], digits[i], f_attrs[i], f_texts[i])
            if cell.array_ref is not None:
                r, c = keys[i]
                left = self.cells_left - self.cells
                area, after = array_block(self.name, self.sheet, r, c, cell.array_ref,
                                          self.limits, left)
                self.cells += left - after
                if area is not None:
                    self.max_row = max(self.max_row, area.r2)
                    self.max_col = max(self.max_col, area.c2)
            if isinstance(cell, SharedFormulaCell):
                if 5 * len(cell.master.text) > max_len and len(cell.text) > max_len:
                    self._too_long(*keys[i])
            elif len(cell.text) > max_len:
                self._too_long(*keys[i])
            made.append(cell)
        return made

    def _too_long(self, r: int, c: int) -> None:
        raise Unsupported("formula over the length limit")   # (openpyxl's pass says so)

    def _row(self, raw: bytes) -> None:
        if b"hidden" not in raw and b' r="' in raw:
            return            # (only r, spans, heights...: nothing the engine keeps)
        attrs = _attrs(raw)
        keys = {k for k in attrs if ":" not in k}
        if "r" not in keys:
            raise Unsupported("row without its number")
        if keys - {"r", "spans"}:
            if attrs.get("hidden", "").lower() in ("1", "true"):
                try:
                    self.hidden.add(int(attrs["r"]))
                except ValueError:
                    raise Unsupported("row number") from None

    def _formula(self, letters, digits, f_attrs, f_text):
        text = "=" + (_text(f_text) if f_text else "")
        if not f_attrs.strip():
            return FormulaCell(text)
        attrs = _attrs(f_attrs)
        kind = attrs.get("t")
        if kind == "array":
            return FormulaCell(text, attrs.get("ref"))
        if kind == "shared":
            si = attrs.get("si")
            master = self.masters.get(si)
            coordinate = (letters + digits).decode("ascii")
            if master is not None:
                return SharedFormulaCell(master, coordinate)
            if text != "=":
                master = self.masters[si] = _SharedMaster(text, coordinate,
                                                          (self.sheet.index, si))
                return _MasterCell(text, master)
            return FormulaCell(text)
        if kind == "dataTable":
            return FormulaCell("=_TUBEFUNCS_DATA_TABLE()")
        return FormulaCell(text)

    def _cached(self, kind: str, v_tag, v_text, strings):
        """:func:`tubefuncs.headless.loader._cached_value`, from the raw parts."""
        text = None if not v_tag else _text(v_text)
        return cached_value_from_text(kind, text, strings)

    def _constant(self, kind: str, value: str, strings):
        """openpyxl's value conversion, then :func:`tubefuncs.headless.values.from_file`."""
        if kind == "n":
            return V.from_file(_cast_number(value), "n")
        if kind == "s":
            return V.from_file(shared_string(strings, value), "s")
        if kind == "b":
            return V.from_file(bool(int(value)), "b")
        if kind == "str":
            return V.from_file(value, "s")
        if kind == "d":
            return V.from_file(from_ISO8601(value), "d")
        return V.from_file(value, kind)

    def _inline(self, body: bytes):
        m = self.pat["plain_text"].match(body)
        if m is None:
            raise Unsupported("rich inline text")
        return V.from_file(_text(m.group(1)) if m.group(1) is not None else "", "s")


def read_sheet(name, sheet: Sheet, src, shared_strings, cells_left: int, limits: Limits) -> int:
    """Same call and result as :func:`tubefuncs.headless.loader._read_sheet`."""
    scanner = _Scanner(name, sheet, shared_strings, limits, cells_left)
    try:
        scanner.run(src)
    except (WorkbookError, Unsupported):
        raise
    except Exception as exc:  # anything odd: openpyxl's parser decides
        raise Unsupported(f"{type(exc).__name__}: {exc}") from None
    sheet.max_row, sheet.max_col = scanner.max_row, scanner.max_col
    sheet.hidden_rows = frozenset(scanner.hidden)
    return cells_left - scanner.cells

