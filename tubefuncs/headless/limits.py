"""Safety limits, and the inspection of a file before any XML parser sees it.

A workbook is a zip of XML parts.  Before openpyxl opens it, :func:`inspect_file`
checks, from the zip directory and the first bytes of each part only (so in
milliseconds and bounded memory):

- the file size;
- that it is a zip at all (an OLE/CFB container is an encrypted workbook or a
  legacy ``.xls``; anything else is not a workbook);
- the number of parts, their declared uncompressed sizes and compression
  ratios (a zip bomb declares or hides huge parts);
- that it holds a workbook part;
- that no XML part declares a DTD (``<!DOCTYPE``/``<!ENTITY``: no part of a
  real workbook has one; they are how XML entity bombs work);
- the ``<dimension>`` each worksheet claims;
- that it is a regular file (a FIFO or a device would block or never end);
- that no part name is duplicated, and every part uses a compression method
  workbooks use (stored or deflate); parts that no guarded parser reads
  (document properties, styles, images, VBA...) are decompressed in full, so
  a corrupt stream or a DTD anywhere in them (in any encoding) is refused here,
  in every command, and never copied into an output.

openpyxl itself parses through defusedxml (installed with tubefuncs), a
second guard against XML attacks.  The engine never executes macros: VBA in an
``.xlsm`` is opaque bytes to it.
"""

from __future__ import annotations

import os
import re
import stat
import zipfile
import zlib
from dataclasses import dataclass

from .problems import WorkbookError

MiB = 1024 * 1024

OLE_SIGNATURE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
ZIP_SIGNATURES = (b"PK\x03\x04", b"PK\x05\x06")


@dataclass(frozen=True)
class Limits:
    """Bounds on what the engine accepts (each overridable from the command line)."""

    max_file_bytes: int = 100 * MiB
    max_total_uncompressed: int = 512 * MiB
    max_part_uncompressed: int = 256 * MiB
    max_ratio: float = 200.0            # for parts larger than ratio_floor
    ratio_floor: int = 4 * MiB
    max_parts: int = 10_000
    max_cells: int = 2_000_000          # cells of all sheets together
    max_claimed_area: int = 100_000_000  # a sheet's <dimension> claim
    max_range_cells: int = 5_000_000    # one range read by a formula
    max_formula_length: int = 8_192     # Excel's own limit
    max_array_cells: int = 5_000_000    # any array a formula computes (broadcasts, MUNIT...)
    max_expected_bytes: int = 64 * MiB  # an expected-values file


#: Excel's limits, which no option changes.
MAX_TEXT_LENGTH = 32_767      # characters of one text value
MAX_NESTING = 64              # nested functions, parentheses and signs in one formula
#: Compression methods a workbook's parts use (stored, deflate).
_COMPRESSION_METHODS = {zipfile.ZIP_STORED: "stored", zipfile.ZIP_DEFLATED: "deflate"}
#: Parts a guarded XML parser reads: their prolog is checked here, the rest by the parser.
_PARSED_PARTS = re.compile(r"^xl/(worksheets/[^/]+\.xml|sharedStrings\.xml)$")


DEFAULT_LIMITS = Limits()

_RE_DIMENSION = re.compile(rb"<(?:\w+:)?dimension\s+ref=\"([^\"]+)\"")
_RE_DTD = re.compile(rb"<!\s*(DOCTYPE|ENTITY)", re.IGNORECASE)
_RE_ROOT = re.compile(rb"<[A-Za-z_]")


def _mb(n: int) -> str:
    return f"{n / MiB:.1f} MiB"


def regular_file(name: str, what: str = "workbook") -> os.stat_result:
    """``os.stat`` of an input that must be a regular file, checked before it is opened
    (opening a FIFO blocks; a device such as the zero device never ends)."""
    try:
        st = os.stat(name)
    except FileNotFoundError:
        raise WorkbookError(f"{name}: no such file") from None
    except OSError as exc:
        raise WorkbookError(f"{name}: cannot read ({exc.strerror or exc})") from None
    if stat.S_ISDIR(st.st_mode):
        raise WorkbookError(f"{name}: is a directory, not {_article(what)} {what}")
    if not stat.S_ISREG(st.st_mode):
        raise WorkbookError(f"{name}: not a regular file ({file_kind(st)}); "
                            f"{_article(what)} {what} must be an ordinary file")
    return st


def _article(word: str) -> str:
    return "an" if word[:1].lower() in "aeiou" else "a"


def file_kind(st: os.stat_result) -> str:
    mode = st.st_mode
    if stat.S_ISFIFO(mode):
        return "a FIFO"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    if stat.S_ISDIR(mode):
        return "a directory"
    return "not an ordinary file"


def inspect_file(path, limits: Limits = DEFAULT_LIMITS) -> None:
    """Refuse, with a one-line :class:`WorkbookError`, a file that is unsafe or not a workbook."""
    name = os.fspath(path)
    size = regular_file(name).st_size
    try:
        with open(name, "rb") as fh:
            head = fh.read(8)
    except OSError as exc:
        raise WorkbookError(f"{name}: cannot read ({exc.strerror or exc})") from None
    if size > limits.max_file_bytes:
        raise WorkbookError(
            f"{name}: file is {_mb(size)}, over the limit of {_mb(limits.max_file_bytes)} "
            f"(raise it with --max-file-mb if the workbook is genuine)")
    if head.startswith(OLE_SIGNATURE):
        raise WorkbookError(_describe_ole(name))
    if not head.startswith(ZIP_SIGNATURES):
        raise WorkbookError(f"{name}: not a workbook (an .xlsx or .xlsm file is a zip "
                            f"archive; this file is not one)")
    try:
        with zipfile.ZipFile(name) as zf:
            infos = zf.infolist()
            _check_directory(name, infos, limits)
            _check_parts(name, zf, infos, limits)
    except WorkbookError:
        raise
    except (zipfile.BadZipFile, zlib.error, EOFError, ValueError, NotImplementedError) as exc:
        raise WorkbookError(f"{name}: corrupt workbook (damaged zip archive: {exc})") from None
    except OSError as exc:
        raise WorkbookError(f"{name}: corrupt workbook ({exc})") from None


def _describe_ole(name: str) -> str:
    with open(name, "rb") as fh:
        blob = fh.read(4 * MiB)
    markers = ("EncryptionInfo".encode("utf-16-le"), "EncryptedPackage".encode("utf-16-le"))
    if any(m in blob for m in markers):
        return (f"{name}: encrypted (password-protected) workbook; save an unencrypted copy "
                f"as .xlsx or .xlsm to check it headless")
    return (f"{name}: an OLE compound file (a legacy .xls workbook or an encrypted one), "
            f"not .xlsx/.xlsm; save it as .xlsx from a spreadsheet application")


def _check_directory(name: str, infos, limits: Limits) -> None:
    if len(infos) > limits.max_parts:
        raise WorkbookError(f"{name}: {len(infos)} parts in the archive, over the limit of "
                            f"{limits.max_parts}")
    total = 0
    names = set()
    for info in infos:
        if info.filename in names:
            raise WorkbookError(f"{name}: the archive holds part {info.filename[:80]} twice "
                                f"(a damaged or tampered file); refused")
        names.add(info.filename)
        if info.flag_bits & 0x1:
            raise WorkbookError(f"{name}: the archive has encrypted parts; not a usable workbook")
        if info.compress_type not in _COMPRESSION_METHODS:
            raise WorkbookError(
                f"{name}: part {info.filename[:80]} uses zip compression method "
                f"{info.compress_type}; workbooks use stored or deflate only (corrupt workbook)")
        usize = info.file_size
        total += usize
        if usize > limits.max_part_uncompressed:
            raise WorkbookError(
                f"{name}: part {info.filename} unpacks to {_mb(usize)}, over the limit of "
                f"{_mb(limits.max_part_uncompressed)} (zip bomb?)")
        if usize > limits.ratio_floor and usize > limits.max_ratio * max(info.compress_size, 1):
            ratio = usize / max(info.compress_size, 1)
            raise WorkbookError(
                f"{name}: part {info.filename} has a compression ratio of {ratio:.0f}:1, over "
                f"the limit of {limits.max_ratio:.0f}:1 (zip bomb?)")
    if total > limits.max_total_uncompressed:
        raise WorkbookError(f"{name}: the archive unpacks to {_mb(total)}, over the limit of "
                            f"{_mb(limits.max_total_uncompressed)} (zip bomb?)")
    if "[Content_Types].xml" not in names or not any(
            n.startswith("xl/") and n.endswith(".xml") and "workbook" in n.rsplit("/", 1)[-1]
            for n in names):
        raise WorkbookError(f"{name}: not a workbook (a zip archive without a spreadsheet "
                            f"workbook part)")


def _check_parts(name: str, zf: zipfile.ZipFile, infos, limits: Limits) -> None:
    """Read the head of every part a guarded parser reads (no DTDs, sane sheet
    dimensions) and the whole of every other part (intact, no DTD anywhere)."""
    for info in infos:
        part = info.filename
        if info.file_size == 0 or part.endswith("/"):
            continue
        if _PARSED_PARTS.match(part) or part.endswith(".rels") or part in (
                "[Content_Types].xml", "xl/workbook.xml"):
            with zf.open(info) as fh:
                head = _as_text_bytes(_read_prolog(fh))
            if _RE_DTD.search(head):
                raise _dtd(name, part)
            if part.startswith("xl/worksheets/"):
                m = _RE_DIMENSION.search(head)
                if m:
                    _check_dimension(name, part, m.group(1).decode("ascii", "replace"), limits)
            continue
        _scan_whole(name, zf, info)


def _dtd(name: str, part: str) -> WorkbookError:
    return WorkbookError(f"{name}: part {part[:80]} declares a DTD/entities, which no "
                         f"workbook needs (XML entity attack?); refused")


def _scan_whole(name: str, zf: zipfile.ZipFile, info) -> None:
    """Decompress a whole part (its CRC is checked at the end); an XML one, in any
    encoding, must hold no DTD."""
    with zf.open(info) as fh:
        first = fh.read(65536)
        codec = _xml_codec(first)
        tail = b""
        chunk = first
        while chunk:
            if codec is not None:
                probe = _as_text_bytes(tail + chunk, codec)
                if _RE_DTD.search(probe):
                    raise _dtd(name, info.filename)
                tail = chunk[-64:]
            chunk = fh.read(1 << 20)


def _xml_codec(head: bytes):
    """The encoding of a part that looks like XML (by its first bytes), else None."""
    if head.startswith(b"\xff\xfe\x00\x00"):
        return "utf-32-le"
    if head.startswith(b"\x00\x00\xfe\xff"):
        return "utf-32-be"
    if head.startswith(b"\xff\xfe"):
        return "utf-16-le"
    if head.startswith(b"\xfe\xff"):
        return "utf-16-be"
    if head.startswith(b"<\x00\x00\x00") or head.startswith(b"\x00\x00\x00<"):
        return "utf-32-le" if head[0:1] == b"<" else "utf-32-be"
    if head.startswith(b"<\x00"):
        return "utf-16-le"
    if head.startswith(b"\x00<"):
        return "utf-16-be"
    stripped = head.lstrip(b"\xef\xbb\xbf \t\r\n")
    if stripped.startswith(b"<"):
        return "utf-8"
    return None


def _as_text_bytes(data: bytes, codec: str | None = None) -> bytes:
    """Bytes whose ASCII markup a bytes pattern can see, whatever the part's encoding."""
    codec = codec or _xml_codec(data) or "utf-8"
    if codec == "utf-8":
        return data
    return data.decode(codec, errors="ignore").encode("utf-8", "ignore")


def _read_prolog(fh, limit: int = 64 * 1024) -> bytes:
    """The part's bytes up to and a little past its root element start."""
    data = b""
    while len(data) < limit:
        chunk = fh.read(4096)
        if not chunk:
            break
        data += chunk
        # Past the prolog (XML declaration, comments, DOCTYPE) once a root tag
        # has started and some of its body is in; the sheet dimension is near
        # the top of the root.
        root = _RE_ROOT.search(data)
        if root and len(data) - root.start() > 2048:
            break
    return data


def _check_dimension(name: str, part: str, ref: str, limits: Limits) -> None:
    from .references import parse_area

    area = parse_area(ref.split(" ")[0], "")
    if area is None:
        return
    if area.size > limits.max_claimed_area:
        raise WorkbookError(
            f"{name}: worksheet part {part} claims dimensions {ref} ({area.size:,} cells), over "
            f"the limit of {limits.max_claimed_area:,} cells; refused")
