"""``--engine calc``: a workbook recalculated by real LibreOffice Calc.

The input is checked by the engine's own file limits; a private copy whose
formulas name our functions as Calc's xlsx import knows them
(:func:`calc_formula`) is opened read-only by Calc in a private profile with
our extension installed (macros never run), recalculated there in full and
saved as a new ``.xlsx`` in a private temporary folder.  The values Calc
cached in that copy become the
:class:`~tubefuncs.headless.engine.Recalculation`'s values, keyed by the input
workbook's formula cells, so ``check`` compares them with the input's own
cached values or expected-values file exactly as for our engines.  LibreOffice
missing, a start-up time-out or a crash is a
:class:`~tubefuncs.headless.problems.WorkbookError` (one line, non-zero exit).
"""

from __future__ import annotations

import os
import re
import shutil
import tempfile
import time
import weakref
import zipfile

from ..headless import values as V
from ..headless.engine import Recalculation
from ..headless.limits import DEFAULT_LIMITS, Limits, inspect_file
from ..headless.loader import load_book
from ..headless.problems import WorkbookError

_FORMULA_XML = re.compile(r"(<(f|definedName)\b[^>]*>)([^<]*)(</\2>)")
_QUOTED = re.compile(r"(\"[^\"]*\"|&quot;(?:(?!&quot;).)*&quot;)")
_CALL = re.compile(r"(?<![A-Za-z0-9_.])(?:_xludf\.|_xll\.)?(TUBE_[A-Za-z0-9_]+)(?=\s*\()",
                   re.IGNORECASE)


def calc_formula(text: str) -> str:
    """A formula's text with our calls under the names Calc's xlsx import knows.

    LibreOffice 7.4 recognises an extension function in an ``.xlsx`` only under
    its long programmatic name (``ORG.TUBEFUNCS.CALC.FUNCTIONS.TUBE_GAMMA``);
    text inside string literals is left alone.
    """
    from . import SAVED_PREFIX

    parts = _QUOTED.split(text)
    for i in range(0, len(parts), 2):
        parts[i] = _CALL.sub(lambda m: SAVED_PREFIX + m.group(1).upper(), parts[i])
    return "".join(parts)


def prepare_for_calc(src: str, dst: str) -> int:
    """Copy workbook ``src`` to ``dst`` with :func:`calc_formula` applied to every
    formula and defined name; return how many formulas changed."""
    changed = 0

    def fix(m):
        nonlocal changed
        new = calc_formula(m.group(3))
        changed += new != m.group(3)
        return m.group(1) + new + m.group(4)

    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            data = zin.read(info)
            name = info.filename
            if name.endswith(".xml") and (name.startswith("xl/worksheets/")
                                          or name == "xl/workbook.xml"):
                data = _FORMULA_XML.sub(fix, data.decode("utf-8")).encode("utf-8")
            zout.writestr(info, data)
    return changed


def recalculate_calc(path, limits: Limits = DEFAULT_LIMITS, progress=None,
                     session=None) -> Recalculation:
    """Recalculate ``path`` in LibreOffice Calc (``session``: a running CalcSession)."""
    from .runner import CalcSession, CalcUnavailable

    path = os.fspath(path)
    inspect_file(path, limits)
    book = load_book(path, limits)
    tmp = tempfile.mkdtemp(prefix="tubefuncs-calc-out-")
    out = os.path.join(tmp, "recalculated.xlsx")
    started = time.perf_counter()
    try:
        if progress is not None and hasattr(progress, "phase"):
            progress.phase("LibreOffice Calc")
        ext = os.path.splitext(path)[1].lower() or ".xlsx"
        prepared = os.path.join(tmp, "input" + ext)
        prepare_for_calc(path, prepared)
        if session is not None:
            timing = session.recalc(prepared, out)
        else:
            with CalcSession() as own:
                timing = own.recalc(prepared, out)
    except (zipfile.BadZipFile, OSError) as exc:
        shutil.rmtree(tmp, ignore_errors=True)
        raise WorkbookError(f"{path}: --engine calc: cannot prepare a copy ({exc})") from None
    except CalcUnavailable as exc:
        shutil.rmtree(tmp, ignore_errors=True)
        raise WorkbookError(f"{path}: --engine calc: {exc}") from None
    if not os.path.isfile(out):
        shutil.rmtree(tmp, ignore_errors=True)
        raise WorkbookError(f"{path}: --engine calc: LibreOffice wrote no file")
    saved = load_book(out, limits)
    by_name = {s.name: s for s in saved.sheets}
    values, name_errors, formula_cells = {}, [], 0
    for sheet in book.sheets:
        other = by_name.get(sheet.name)
        for rc in _formula_cells(sheet):
            formula_cells += 1
            key = (sheet.index, rc[0], rc[1])
            if other is None:
                value = V.REF
            elif rc in other.formulas:
                value = other.cached.get(rc, V.EMPTY)
            else:
                value = other.constants.get(rc, V.EMPTY)
            values[key] = value
            if V.is_error(value) and str(value) == "#NAME?":
                name_errors.append((key, "LibreOffice Calc does not know a function of this "
                                         "formula (#NAME?)"))
    recalc = Recalculation(book=book, values=values, messages={}, name_errors=name_errors,
                           formula_cells=formula_cells,
                           timings={"calc": time.perf_counter() - started,
                                    "calc_recalc": timing.get("seconds", 0.0)},
                           engine="calc", stats={"calc_output": out})
    weakref.finalize(recalc, shutil.rmtree, tmp, True)
    return recalc


def _formula_cells(sheet):
    """Every formula-produced cell of a sheet: plain formulas and array-formula blocks."""
    from ..headless.references import parse_area

    for rc, formula in sheet.formulas.items():
        area = parse_area(formula.array_ref.replace("$", ""), sheet.name) \
            if formula.array_ref else None
        if area is None:
            yield rc
            continue
        for r in range(area.r1, area.r2 + 1):
            for c in range(area.c1, area.c2 + 1):
                yield (r, c)


def write_calc_output(recalc, out_path) -> str:
    """Copy Calc's saved workbook to ``out_path`` (atomically; never over the input)."""
    from ..headless.writer import check_output

    out_path = check_output(out_path, [recalc.book.path])
    part = f"{out_path}.part{os.getpid()}"
    try:
        shutil.copyfile(recalc.stats["calc_output"], part)
        os.replace(part, out_path)
    except OSError as exc:
        if os.path.exists(part):
            os.unlink(part)
        raise WorkbookError(f"{out_path}: cannot write ({exc.strerror or exc})") from None
    return out_path
