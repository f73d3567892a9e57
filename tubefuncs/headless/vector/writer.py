"""Writing the recalculated copy without rebuilding the workbook.

The general writer reopens the whole workbook with openpyxl and saves it
again.  Here every part of the archive is copied as it is, except

- the worksheet parts, in which each cell that has a computed value is
  rewritten in place: its formula and cached value go, the value comes in
  (number, boolean, error value, or inline text), its address, style and
  phonetic flag stay;
- the calculation chain (``xl/calcChain.xml``), which lists formula cells and
  would no longer match: it is dropped, with its relationship and content
  type.

Formatting, names, charts, images and everything else are kept byte for byte
(more than the openpyxl writer keeps).  The output is written to a temporary
file beside the destination and moved into place, like every output.

Only a copy of the same kind as the input is written this way (``.xlsx`` from
``.xlsx``, ``.xlsm`` with its VBA from ``.xlsm``); a change of kind, a sheet
laid out in a way the cell pattern does not recognise, or a text that XML
cannot hold, and :func:`write_fast` returns ``None``: the openpyxl writer does
the job instead.
"""

from __future__ import annotations

import itertools
import operator
import os
import re
import zipfile
from collections import defaultdict

from .. import values as V
from ..gcpause import gc_paused
from ..writer import _remove, _temp_beside, ooxml_text

CHUNK = 512 * 1024    # (regions of this size keep the per-cell lists small: faster than 4 MB)
_DROP_ATTRS = re.compile(rb"\s(?:t|cm|vm)=\"[^\"]*\"")
_CALC_REL = re.compile(rb"<Relationship\b[^>]*calcChain[^>]*/>")
_CALC_TYPE = re.compile(rb"<Override\b[^>]*calcChain[^>]*/>")
#: Error codes a workbook stores as error values (the same set as openpyxl's).
_LEVEL = "compress_level" if "compress_level" in zipfile.ZipInfo.__slots__ else "_compresslevel"
_ERROR_CODES = frozenset({"#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A"})


class _CannotWrite(Exception):
    """Something only the openpyxl writer handles."""


def _patterns(prefix: bytes):
    p = re.escape(prefix)
    return {
        # a formula cell; groups: the whole element, its attributes, its address
        # (column letters, row digits)
        "cell": re.compile(
            rb"(<" + p + rb"c( r=\"([A-Z]{1,3})([0-9]{1,7})\"[^>/]*)>\s*"
            rb"<" + p + rb"f\b[^>]*?(?:/>|>[^<]*</" + p + rb"f>)\s*"
            rb"(?:<" + p + rb"v\b[^>]*?(?:/>|>[^<]*</" + p + rb"v>)\s*)?"
            rb"(?:<" + p + rb"is>.*?</" + p + rb"is>\s*)?"
            rb"</" + p + rb"c>)", re.S),
        "formula_start": b"<" + prefix + b"f",
        "cell_start": b"<" + prefix + b"c",
        "data_open": re.compile(rb"<" + p + rb"sheetData\b[^>]*?(/?)>"),
        "data_close": b"</" + prefix + b"sheetData>",
        "row_close": b"</" + prefix + b"row>",
        "prefix": prefix,
    }


_ROOT = re.compile(rb"<(?:([A-Za-z_][\w.-]*):)?worksheet\b")


def _xml_text(text: str) -> str:
    text = ooxml_text(text)       # (control characters as the format's _xHHHH_ escapes)
    return (text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
            .replace("\r", "&#13;"))


def _value_xml(prefix: str, value) -> bytes:
    """The end of a cell element holding ``value``: from after its attributes."""
    if type(value) is float:
        return f"><{prefix}v>{value!r}</{prefix}v></{prefix}c>".encode("ascii")
    if V.is_error(value):
        code = str(value)
        if code in _ERROR_CODES:
            return f' t="e"><{prefix}v>{code}</{prefix}v></{prefix}c>'.encode("ascii")
        value = code
    if isinstance(value, bool):
        return f' t="b"><{prefix}v>{1 if value else 0}</{prefix}v></{prefix}c>'.encode("ascii")
    if isinstance(value, float):
        return f"><{prefix}v>{value!r}</{prefix}v></{prefix}c>".encode("ascii")
    if isinstance(value, str):
        return (f' t="inlineStr"><{prefix}is><{prefix}t xml:space="preserve">'
                f"{_xml_text(value)}</{prefix}t></{prefix}is></{prefix}c>").encode()
    raise _CannotWrite(f"value of type {type(value).__name__}")


class _SheetRewriter:
    """Rewrites one worksheet part, chunk by chunk, into an archive member.

    The cells to write usually come in the order the part holds them (the
    reader's order): they are matched by position, each region's addresses
    compared with the expected ones in one C comparison.  From the first region
    that differs, the cells left are matched by address instead.
    """

    def __init__(self, rows: list, cols: list, values: list):
        self.rows, self.cols, self.values = rows, cols, values   # cell i: (rows[i], cols[i])
        self.table = None             # by address: b"B5" -> the rest of its new cell element
        self.pat = None
        self.ends = None              # by position: the rest of each new cell element
        self.letters = self.digits = None   # by position: each cell's address, as bytes
        self.at = 0                   # by position: cells written so far

    def _prepare(self) -> None:
        from openpyxl.utils.cell import get_column_letter

        self.ends = self._ends()
        names = {c: get_column_letter(c).encode("ascii") for c in set(self.cols)}
        self.letters = list(map(names.__getitem__, self.cols))
        self.digits = ("\x00".join(map(str, self.rows)).encode("ascii").split(b"\x00")
                       if self.rows else [])
        self.table = {}

    def _by_address(self) -> None:
        """Match the cells not yet written by address from now on."""
        at = self.at
        self.table = dict(zip(map(bytes.__add__, self.letters[at:], self.digits[at:]),
                              self.ends[at:]))
        self.ends = None

    def _ends(self) -> list:
        """The rest of each cell's new element (from after its attributes), in order."""
        prefix = self.pat["prefix"].decode("ascii")
        values = self.values
        # Numbers (nearly every value) are formatted in one pass: one join and one
        # encode for all of them instead of two concatenations and an encode each
        # (``repr``, the same shortest round-trip text as before).  The few other
        # values stand in as 0.0 there, then take _value_xml; no NUL in a number.
        others = list(itertools.compress(itertools.count(), map(
            operator.is_not, map(type, values), itertools.repeat(float))))
        numbers = values.copy() if others else values
        for i in others:
            numbers[i] = 0.0
        texts = list(map(float.__repr__, numbers))
        v_open, v_close = f"><{prefix}v>", f"</{prefix}v></{prefix}c>"
        ends = (v_open + (v_close + "\x00" + v_open).join(texts) + v_close) \
            .encode("ascii").split(b"\x00") if texts else []
        for i in others:
            ends[i] = _value_xml(prefix, values[i])
        return ends

    def rewrite(self, src, dst) -> None:
        state = "head"
        buf = b""
        pending: list = []
        recent = b""
        while True:
            chunk = src.read(CHUNK)
            if not chunk:
                break
            if state == "after":
                dst.write(chunk)
                continue
            if state == "head":
                buf += chunk
                if self.pat is None:
                    root = _ROOT.search(buf)
                    if root is None:
                        if len(buf) > 256 * 1024:
                            raise _CannotWrite("no worksheet root")
                        continue
                    self.pat = _patterns(root.group(1) + b":" if root.group(1) else b"")
                    self._prepare()
                m = self.pat["data_open"].search(buf)
                if m is None:
                    dst.write(buf[:-4096])
                    buf = buf[-4096:]
                    continue
                dst.write(buf[:m.end()])
                if m.group(1):
                    state = "after"
                    dst.write(buf[m.end():])
                    buf = b""
                    continue
                state, chunk, buf, recent = "data", buf[m.end():], b"", b""
            close = self.pat["data_close"]
            window = recent + chunk
            recent = window[-64:]
            if window.find(close) >= 0:
                data = b"".join(pending) + buf + chunk
                end = data.find(close)
                dst.write(self._region(data[:end]))
                dst.write(data[end:])
                state, buf, pending = "after", b"", []
                continue
            cut = chunk.rfind(self.pat["row_close"])
            if cut < 0:
                pending.append(buf)
                buf = chunk
                continue
            cut += len(self.pat["row_close"])
            dst.write(self._region(b"".join(pending) + buf + chunk[:cut]))
            pending, buf = [], chunk[cut:]
        if state != "after":
            raise _CannotWrite("worksheet part without an end to its cells")
        if self.table or (self.ends is not None and self.at != len(self.ends)):
            raise _CannotWrite("cells to write that the part does not hold")

    def _region(self, region: bytes) -> bytes:
        start = self.pat["cell_start"]
        # text, cell, attributes, address letters, address digits, text...
        parts = self.pat["cell"].split(region)
        wholes, attrs = parts[1::5], parts[2::5]
        if len(wholes) != region.count(self.pat["formula_start"]):
            raise _CannotWrite("formula cell layout")
        n = len(wholes)
        ends = None
        if self.ends is not None:
            at = self.at
            if parts[3::5] == self.letters[at:at + n] and parts[4::5] == self.digits[at:at + n]:
                ends = self.ends[at:at + n]          # the expected cells, in order
                self.at = at + n
            else:                                    # not in order: by address from here on
                self._by_address()
        if ends is None:
            addresses = list(map(bytes.__add__, parts[3::5], parts[4::5]))
            # (map over the C methods: no Python frame per cell)
            ends = list(map(self.table.pop, addresses, itertools.repeat(None, n)))
        if not any(ends):
            return region
        joined = b"\x00".join(attrs)
        if None not in ends and b"t=" not in joined and b"m=" not in joined:
            # the usual case: every formula cell computed, no attribute to drop
            cells = list(map(bytes.__add__, map(start.__add__, attrs), ends))
        else:
            drop = _DROP_ATTRS.sub
            cells = [whole if end is None else
                     start + (drop(b"", a) if b"t=" in a or b"m=" in a else a) + end
                     for whole, a, end in zip(wholes, attrs, ends)]
        # the cells take the place of the matches; the groups' slots become empty
        parts[1::5] = cells
        blank = [b""] * len(cells)
        parts[2::5] = blank
        parts[3::5] = blank
        parts[4::5] = blank
        return b"".join(parts)


def write_fast(recalc, out_path) -> str | None:
    """Write the recalculated copy by rewriting formula cells in place; ``None``
    when the openpyxl writer must do it (nothing is left behind then)."""
    with gc_paused():
        return _write_fast(recalc, out_path)


def _write_fast(recalc, out_path) -> str | None:
    from openpyxl.reader.excel import ExcelReader

    src = recalc.book.path
    out_path = os.fspath(out_path)
    kind_in = os.path.splitext(src)[1].lower()
    kind_out = os.path.splitext(out_path)[1].lower()
    if kind_in != kind_out or kind_out not in (".xlsx", ".xlsm"):
        return None
    per_sheet = defaultdict(lambda: ([], [], []))     # sheet -> (rows, cols, values)
    keys, values = list(recalc.values), list(recalc.values.values())
    sheet_of = list(map(operator.itemgetter(0), keys))
    if keys and sheet_of.count(sheet_of[0]) == len(keys):   # one sheet: split in C
        _, rows, cols = zip(*keys)
        per_sheet[sheet_of[0]] = (list(rows), list(cols), values)
    else:
        for (s, r, c), value in zip(keys, values):
            rows, cols, vals = per_sheet[s]
            rows.append(r)
            cols.append(c)
            vals.append(value)
    try:
        reader = ExcelReader(src, read_only=True, keep_vba=False, data_only=False,
                             keep_links=False)
        try:
            reader.read_manifest()
            reader.read_workbook()
            parts = [rel.target for _, rel in reader.parser.find_sheets()
                     if "chartsheet" not in (rel.Type or "")]
        finally:
            reader.archive.close()
    except Exception:
        return None
    if len(parts) != len(recalc.book.sheets):
        return None
    targets = {part: per_sheet[i] for i, part in enumerate(parts) if i in per_sheet}
    fd, tmp = _temp_beside(out_path, kind_out)
    os.close(fd)
    try:
        with zipfile.ZipFile(src) as zin, zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as zout:
            for info in zin.infolist():
                name = info.filename
                if name.lower() == "xl/calcchain.xml":
                    continue
                out_info = zipfile.ZipInfo(name, date_time=info.date_time)
                out_info.compress_type = zipfile.ZIP_DEFLATED
                out_info.external_attr = info.external_attr
                if targets.get(name):
                    setattr(out_info, _LEVEL, 1)    # fast: these parts are the big ones
                    with zin.open(info) as fin, zout.open(out_info, "w") as fout:
                        _SheetRewriter(*targets[name]).rewrite(fin, fout)
                    continue
                data = zin.read(info)
                if name == "[Content_Types].xml":
                    data = _CALC_TYPE.sub(b"", data)
                elif name == "xl/_rels/workbook.xml.rels":
                    data = _CALC_REL.sub(b"", data)
                zout.writestr(out_info, data)
        with open(tmp, "rb+") as fh:
            os.fsync(fh.fileno())
        os.replace(tmp, out_path)
    except (_CannotWrite, zipfile.BadZipFile, UnicodeDecodeError, ValueError, KeyError):
        _remove(tmp)
        return None
    except BaseException:
        _remove(tmp)
        raise
    return out_path
