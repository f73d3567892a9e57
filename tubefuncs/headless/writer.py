"""Writing outputs atomically: the recalculated copy and text files.

Every output is written to a temporary file in the destination's folder and
moved into place with :func:`os.replace`, so a reader never sees a half-written
file and a failure leaves any previous file intact.  The input workbook is
only ever opened for reading.
"""

from __future__ import annotations

import os
import re
import stat
import tempfile
import warnings

from . import values as V
from .problems import WorkbookError

#: Temporary files are named ``.tubefuncs-<pid>-<random><suffix>``: one left by a
#: process that was killed (SIGKILL cannot be caught) is recognised by its dead
#: pid and removed by the next write into the same folder.
TEMP_PREFIX = ".tubefuncs-"
_RE_TEMP = re.compile(r"^\.tubefuncs-(\d+)-[A-Za-z0-9_]+\.(?:tmp|xlsx|xlsm|tsv)$")


_RE_XML_ILLEGAL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")
_RE_ESCAPE_LIKE = re.compile(r"_(x[0-9A-Fa-f]{4}_)")


def ooxml_text(text: str) -> str:
    """Text as a cell of an xlsx file stores it: characters XML cannot hold (control
    characters such as CHAR(1), lone surrogates) become the format's ``_xHHHH_``
    escapes, and a literal ``_xHHHH_`` in the text is itself escaped (``_x005F_``),
    as ECMA-376 Part 1, 22.9.2.19 (ST_Xstring) prescribes."""
    if "_x" not in text and not _RE_XML_ILLEGAL.search(text):
        return text
    text = _RE_ESCAPE_LIKE.sub(r"_x005F_\1", text)
    return _RE_XML_ILLEGAL.sub(lambda m: f"_x{ord(m.group(0)):04X}_", text)


def check_output(path, inputs=()) -> str:
    """Refuse, before any work is written, an output path that cannot take a new
    regular file: a directory, a FIFO or device, a missing folder, or one of the
    command's inputs (compared as files: the same inode, whatever the name)."""
    path = os.fspath(path)
    try:
        st = os.stat(path)
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise WorkbookError(f"{path}: cannot write ({exc.strerror or exc})") from None
    if st is not None:
        if stat.S_ISDIR(st.st_mode):
            raise WorkbookError(f"{path}: is a directory; give a file name for the output")
        if not stat.S_ISREG(st.st_mode):
            from .limits import file_kind

            raise WorkbookError(f"{path}: not a regular file ({file_kind(st)}); refusing to "
                                f"replace it with the output")
        for source in inputs:
            if source is not None and _same_file(source, path):
                raise WorkbookError(f"{path}: is an input of this command ({source}); refusing "
                                    f"to overwrite the input; choose another output path")
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise WorkbookError(f"{path}: no such folder {folder}; create it first")
    return path


def _temp_beside(path: str, suffix: str):
    """A temporary file in ``path``'s folder, with the permissions a new file gets
    (mkstemp makes it private)."""
    folder = os.path.dirname(os.path.abspath(path))
    _clean_stale(folder)
    fd, tmp = tempfile.mkstemp(prefix=f"{TEMP_PREFIX}{os.getpid()}-", suffix=suffix,
                               dir=folder)
    mask = os.umask(0)
    os.umask(mask)
    try:
        os.chmod(tmp, 0o666 & ~mask)
    except OSError:
        pass
    return fd, tmp


def _clean_stale(folder: str) -> None:
    """Remove our temporary files left in ``folder`` by processes that no longer run."""
    try:
        entries = os.scandir(folder)
    except OSError:
        return
    uid = os.getuid() if hasattr(os, "getuid") else None
    with entries:
        for entry in entries:
            m = _RE_TEMP.match(entry.name)
            if m is None or int(m.group(1)) == os.getpid():
                continue
            try:
                st = entry.stat(follow_symlinks=False)
                if not stat.S_ISREG(st.st_mode) or (uid is not None and st.st_uid != uid):
                    continue
                if _alive(int(m.group(1))):
                    continue
                os.unlink(entry.path)
            except OSError:
                continue


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OverflowError, ValueError, OSError):
        return True
    return True


def atomic_write_bytes(path, data: bytes, inputs=()) -> None:
    """Write ``data`` to ``path`` atomically; an unusable path or a failed write
    (read-only file system, full disk...) is a one-line :class:`WorkbookError`."""
    path = check_output(path, inputs)
    try:
        fd, tmp = _temp_beside(path, ".tmp")
    except OSError as exc:
        raise WorkbookError(f"{path}: cannot write ({exc.strerror or exc})") from None
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, path)
    except OSError as exc:
        _remove(tmp)
        raise WorkbookError(f"{path}: cannot write ({exc.strerror or exc})") from None
    except BaseException:
        _remove(tmp)
        raise


def _remove(path) -> None:
    try:
        os.unlink(path)
    except OSError:
        pass


def _same_file(a, b) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return os.path.abspath(a) == os.path.abspath(b)


def write_openpyxl(recalc, out_path) -> str:
    """Copy of the workbook in which every formula cell holds its computed value,
    written by openpyxl (the general writer; :func:`tubefuncs.headless.write_recalculated`
    uses the fast one where it can).

    Formatting, names and other sheets' content are kept as openpyxl keeps
    them (charts and images are not carried over by openpyxl).  VBA of an
    ``.xlsm`` is copied through, never run, when the output is ``.xlsm``.
    """
    import openpyxl

    src = recalc.book.path
    out_path = check_output(out_path, [src])
    keep_vba = out_path.lower().endswith(".xlsm")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            wb = openpyxl.load_workbook(src, keep_vba=keep_vba, data_only=False,
                                        keep_links=True, rich_text=True)
        except Exception as exc:
            raise WorkbookError(f"{src}: cannot reopen for writing ({exc})") from None
    try:
        sheets = {s.index: wb[s.name] for s in recalc.book.sheets}
        for (s, r, c), value in recalc.values.items():
            cell = sheets[s].cell(row=r, column=c)
            if V.is_error(value):
                cell.value = str(value)
            elif isinstance(value, str):
                cell.value = ooxml_text(value)
                if value.startswith("="):
                    cell.data_type = "s"   # a computed text, not a formula
            else:
                cell.value = value
        fd, tmp = _temp_beside(out_path, os.path.splitext(out_path)[1])
        os.close(fd)
        try:
            wb.save(tmp)
            os.replace(tmp, out_path)
        except BaseException:
            _remove(tmp)
            raise
    except OSError as exc:
        raise WorkbookError(f"{out_path}: cannot write ({exc.strerror or exc})") from None
    finally:
        if getattr(wb, "vba_archive", None) is not None:
            wb.vba_archive.close()
    return out_path
