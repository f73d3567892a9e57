"""Evaluating compiled formulas in dependency order.

:class:`Env` is what compiled code sees while one cell is evaluated: cell
values, range reads (clipped, size-limited, cached), catalogue calls and the
notes that explain error values.  :class:`SequentialEvaluator` walks the
cells one by one; an evaluator that runs same-skeleton runs of cells as numpy
vectors can take its place (same ``evaluate(plan, env, progress)`` call).
"""

from __future__ import annotations

import numpy as np

from . import values as V
from .catalogue_bridge import CatalogueFunction
from .limits import Limits
from .problems import WorkbookError
from .references import Area, area_text


class Env:
    def __init__(self, book, limits: Limits):
        self.book = book
        self.limits = limits
        self.cells = [dict(s.constants) for s in book.sheets]
        self.extent = [(s.max_row, s.max_col) for s in book.sheets]
        self._sheet_index = {s.name.upper(): s.index for s in book.sheets}
        self._range_cache: dict = {}
        self._catalogue: dict = {}
        self.host = None
        self.notes: list = []            # (code, message, element) for the current cell
        self.array_notes: dict = {}      # id(array) -> {(r, c): (code, message)}
        self._keep: list = []

    # ---------------------------------------------------------------- per cell
    def begin(self, host) -> None:
        self.host = host
        self.notes = []
        self.array_notes = {}
        self._keep = []

    def fail(self, code: str, message: str):
        self.notes.append((code, message, None))
        return V.error(code)

    def note(self, code: str, message: str, element=None) -> None:
        self.notes.append((code, message, element))

    # ---------------------------------------------------------------- reading
    def sheet_index(self, name: str) -> int:
        return self._sheet_index[name.upper()]

    def clip(self, area: Area) -> Area:
        """A whole-row/column reference cut to the used part of its sheet."""
        if not (area.whole_cols or area.whole_rows):
            return area
        max_row, max_col = self.extent[self.sheet_index(area.sheet)]
        r2 = min(area.r2, max(max_row, area.r1)) if area.whole_cols else area.r2
        c2 = min(area.c2, max(max_col, area.c1)) if area.whole_rows else area.c2
        return Area(area.sheet, area.r1, area.c1, r2, c2)

    def read(self, area: Area):
        s = self.sheet_index(area.sheet)
        if area.is_cell:
            return self.cells[s].get((area.r1, area.c1), V.EMPTY)
        key = (s, area.r1, area.c1, area.r2, area.c2, area.whole_rows, area.whole_cols)
        cached = self._range_cache.get(key)
        if cached is not None:
            return cached
        clipped = self.clip(area)
        if clipped.size > self.limits.max_range_cells:
            raise WorkbookError(
                f"{self.book.path}: range {area_text(area)} has {clipped.size:,} cells, over the "
                f"limit of {self.limits.max_range_cells:,} (raise it with --max-range-cells)")
        rows, cols = clipped.shape
        out = np.empty((rows, cols), dtype=object)
        out[...] = V.EMPTY   # (np.full would copy the marker into a plain str)
        cells = self.cells[s]
        if len(cells) < clipped.size:
            for (r, c), v in cells.items():
                if clipped.r1 <= r <= clipped.r2 and clipped.c1 <= c <= clipped.c2:
                    out[r - clipped.r1, c - clipped.c1] = v
        else:
            get = cells.get
            for i, r in enumerate(range(clipped.r1, clipped.r2 + 1)):
                for j, c in enumerate(range(clipped.c1, clipped.c2 + 1)):
                    v = get((r, c))
                    if v is not None:
                        out[i, j] = v
        out.flags.writeable = False
        # Safe to cache: every formula cell inside the range precedes every
        # reader of the range in the evaluation order.
        self._range_cache[key] = out
        return out

    def subtotal_values(self, area: Area, skip_hidden: bool):
        """Values of an area for SUBTOTAL: nested SUBTOTAL cells (and hidden rows) blanked."""
        sheet = self.book.sheets[self.sheet_index(area.sheet)]
        arr = V.as_array(self.read(area)).copy()
        for (r, c), cell in sheet.formulas.items():
            if area.contains(r, c) and "SUBTOTAL(" in cell.text.upper():
                arr[r - area.r1, c - area.c1] = V.EMPTY
        if skip_hidden:
            for r in sheet.hidden_rows:
                if area.r1 <= r <= area.r2:
                    arr[r - area.r1, :] = V.EMPTY
        return arr

    def read_reference(self, ref):
        """Value of an Area, of a union (list of Areas: one row of all values) or an error."""
        if isinstance(ref, Area):
            return self.read(ref)
        if isinstance(ref, list):
            parts = [V.as_array(self.read(a)).ravel() for a in ref]
            return np.concatenate(parts).reshape(1, -1)
        return ref

    # ---------------------------------------------------------------- catalogue
    def call_catalogue(self, name: str, args: list):
        fn = self._catalogue.get(name)
        if fn is None:
            fn = self._catalogue[name] = CatalogueFunction(name, self._catalogue_note)
        self._current_array_notes = {}
        result = fn(*args)
        if isinstance(result, np.ndarray) and self._current_array_notes:
            self.array_notes[id(result)] = self._current_array_notes
            self._keep.append(result)
        return result

    def _catalogue_note(self, code, message, element=None):
        if element is None:
            self.notes.append((code, message, None))
        else:
            self._current_array_notes[element] = (code, message)
            self.notes.append((code, message, element))


class AreaOperand:
    """A reference operand: a cell or range of a sheet."""

    __slots__ = ("area",)

    def __init__(self, area: Area):
        self.area = area

    def value(self, env: Env):
        return env.read(self.area)

    def reference(self, env: Env):
        return self.area

    def areas(self):
        return [self.area]


class ErrorOperand:
    """An operand that cannot be read (#REF! to a missing sheet, #NAME? for an unknown name)."""

    __slots__ = ("code", "message")

    def __init__(self, code: str, message: str):
        self.code = code
        self.message = message

    def value(self, env: Env):
        return env.fail(self.code, self.message)

    reference = value

    def areas(self):
        return []


class PositionOperand:
    """A reference read only for its position or size (the argument of ROW,
    COLUMN, ROWS, COLUMNS): it reads no value, so the formula does not depend on
    the cells inside (``=ROW(A1)`` in A1 is not circular)."""

    __slots__ = ("inner",)

    def __init__(self, inner):
        self.inner = inner

    def value(self, env: Env):
        return self.inner.value(env)

    def reference(self, env: Env):
        return self.inner.reference(env)

    def areas(self):
        return []

    def __getattr__(self, name):      # (code that inspects the operand sees the inner one)
        return getattr(self.inner, name)


def position_only(compiled, slots: list) -> list:
    """``slots`` with the position-only ones wrapped in :class:`PositionOperand`."""
    if not compiled.position_only:
        return slots
    return [PositionOperand(sl) if i in compiled.position_only else sl
            for i, sl in enumerate(slots)]


class NameOperand:
    """A defined name whose definition is a formula (a constant, or an expression).

    Its value is kept after the first use unless ``per_use``: a name using ROW(),
    COLUMN(), RAND(), NOW()... is evaluated at every use, in the calling cell's
    context, as a spreadsheet application does.
    """

    __slots__ = ("name", "compiled", "slots", "_value", "per_use", "_areas")

    def __init__(self, name, compiled, slots, per_use: bool = False):
        self.name = name
        self.compiled = compiled
        self.slots = slots
        self._value = None
        self.per_use = per_use
        self._areas = None

    def value(self, env: Env):
        if self._value is None or self.per_use:
            host = env.host
            value = self.compiled.run(env, self.slots)
            env.host = host
            if self.per_use:
                return value
            self._value = value
        return self._value

    def reference(self, env: Env):
        if len(self.slots) == 1 and self.compiled.skeleton == (("\x00", "", ""),):
            return self.slots[0].reference(env)
        return self.value(env)

    def areas(self):
        if self._areas is None:   # (once: names used several times in names stay linear)
            seen = {}
            for s in self.slots:
                for a in s.areas():
                    seen.setdefault(a, None)
            self._areas = list(seen)
        return self._areas


def spill(result, block: Area):
    """Values of an array formula's block from its result (Excel's broadcasting rules)."""
    rows, cols = block.shape
    arr = V.as_array(result)
    r, c = arr.shape
    out = np.empty((rows, cols), dtype=object)
    out[...] = V.NA
    for i in range(rows):
        for j in range(cols):
            ii = 0 if r == 1 else i
            jj = 0 if c == 1 else j
            if ii < r and jj < c:
                out[i, j] = arr[ii, jj]
    return out, arr


class SequentialEvaluator:
    """Evaluates one cell at a time, in dependency order."""

    def evaluate(self, plan, env: Env, progress=None) -> None:
        total = len(plan.order)
        step = max(1, total // 200)
        for i, anchor in enumerate(plan.order):
            plan.evaluate_cell(anchor, env)
            if progress is not None and i % step == 0:
                progress.update(i, total)
        if progress is not None:
            progress.update(total, total)
