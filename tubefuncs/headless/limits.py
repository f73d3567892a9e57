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
- the ``<dimension>`` each worksheet claims.

openpyxl itself parses through defusedxml (installed with tubefuncs), a
second guard against XML attacks.  The engine never executes macros: VBA in an
``.xlsm`` is opaque bytes to it.
"""

from __future__ import annotations

import os
import re
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


DEFAULT_LIMITS = Limits()

_RE_DIMENSION = re.compile(rb"<(?:\w+:)?dimension\s+ref=\"([^\"]+)\"")
_RE_DTD = re.compile(rb"<!\s*(DOCTYPE|ENTITY)", re.IGNORECASE)
_RE_ROOT = re.compile(rb"<[A-Za-z_]")


def _mb(n: int) -> str:
    return f"{n / MiB:.1f} MiB"


def inspect_file(path, limits: Limits = DEFAULT_LIMITS) -> None:
    """Refuse, with a one-line :class:`WorkbookError`, a file that is unsafe or not a workbook."""
    name = os.fspath(path)
    try:
        size = os.path.getsize(name)
        with open(name, "rb") as fh:
            head = fh.read(8)
    except FileNotFoundError:
        raise WorkbookError(f"{name}: no such file") from None
    except IsADirectoryError:
        raise WorkbookError(f"{name}: is a directory, not a workbook") from None
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
        names.add(info.filename)
        if info.flag_bits & 0x1:
            raise WorkbookError(f"{name}: the archive has encrypted parts; not a usable workbook")
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
    """Read the head of every XML part (bounded): no DTDs, sane sheet dimensions."""
    for info in infos:
        part = info.filename
        if not (part.endswith(".xml") or part.endswith(".rels")) or info.file_size == 0:
            continue
        with zf.open(info) as fh:
            head = _read_prolog(fh)
        if _RE_DTD.search(head):
            raise WorkbookError(f"{name}: part {part} declares a DTD/entities, which no "
                                f"workbook needs (XML entity attack?); refused")
        if part.startswith("xl/worksheets/"):
            m = _RE_DIMENSION.search(head)
            if m:
                _check_dimension(name, part, m.group(1).decode("ascii", "replace"), limits)


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
