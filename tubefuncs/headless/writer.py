"""Writing outputs atomically: the recalculated copy and text files.

Every output is written to a temporary file in the destination's folder and
moved into place with :func:`os.replace`, so a reader never sees a half-written
file and a failure leaves any previous file intact.  The input workbook is
only ever opened for reading.
"""

from __future__ import annotations

import os
import tempfile
import warnings

from . import values as V
from .problems import WorkbookError


def _temp_beside(path: str, suffix: str):
    """A temporary file in ``path``'s folder, with the permissions a new file gets
    (mkstemp makes it private)."""
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(prefix=".tubefuncs-", suffix=suffix, dir=folder)
    mask = os.umask(0)
    os.umask(mask)
    try:
        os.chmod(tmp, 0o666 & ~mask)
    except OSError:
        pass
    return fd, tmp


def atomic_write_bytes(path, data: bytes) -> None:
    path = os.fspath(path)
    fd, tmp = _temp_beside(path, ".tmp")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, path)
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


def write_recalculated(recalc, out_path) -> str:
    """Copy of the workbook in which every formula cell holds its computed value.

    Formatting, names and other sheets' content are kept as openpyxl keeps
    them (charts and images are not carried over by openpyxl).  VBA of an
    ``.xlsm`` is copied through, never run, when the output is ``.xlsm``.
    """
    import openpyxl

    src = recalc.book.path
    out_path = os.fspath(out_path)
    if os.path.exists(out_path) and _same_file(src, out_path):
        raise WorkbookError(f"{out_path}: refusing to overwrite the input workbook; "
                            f"choose another output path")
    if getattr(recalc, "engine", "general") == "fast":   # --- fast path hook (issue 6)
        from .vector.writer import write_fast

        try:
            if write_fast(recalc, out_path) is not None:
                return out_path
        except OSError as exc:
            raise WorkbookError(f"{out_path}: cannot write ({exc.strerror or exc})") from None
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
            elif isinstance(value, str) and value.startswith("="):
                cell.value = value
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
