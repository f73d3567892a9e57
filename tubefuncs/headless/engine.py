"""Recalculating a workbook: load -> compile -> dependency graph -> evaluate.

>>> from tubefuncs.headless import recalculate
>>> result = recalculate("workbooks/station_budget.xlsx")      # doctest: +SKIP
>>> result.value("Budget", "B12")                               # doctest: +SKIP

Each stage is its own module (``loader``, ``formula``, ``graph``,
``evaluate``); :class:`Plan` ties a loaded :class:`~.loader.Book` to compiled
formulas and their order, and an evaluator walks it.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field

from openpyxl.utils.cell import coordinate_to_tuple

from . import values as V
from .evaluate import (
    AreaOperand,
    Env,
    ErrorOperand,
    NameOperand,
    SequentialEvaluator,
    position_only,
    spill,
)
from .formula import compile_formula
from .gcpause import gc_paused
from .graph import Graph
from .limits import DEFAULT_LIMITS, Limits
from .loader import Book, load_book
from .problems import WorkbookError
from .references import area_text, cell_text, looks_like_name, parse_area, split_sheet

#: A defined name deeper than this (a name defined by a name ...) is #NAME?.
MAX_NAME_DEPTH = 100
#: Functions whose value depends on the calling cell or the moment: a defined
#: name using one is evaluated at every use, in the calling cell's context.
HOST_FUNCTIONS = frozenset({"ROW", "COLUMN", "SINGLE", "RAND", "RANDBETWEEN", "NOW", "TODAY",
                            "RANDARRAY"})


@dataclass
class Recalculation:
    """Computed values of every formula-produced cell, with explanations."""

    book: Book
    values: dict                     # (sheet_index, row, col) -> value
    messages: dict                   # key -> message of an error value
    name_errors: list                # [(key, message)]: every #NAME? met
    formula_cells: int               # cells formulas fill (array blocks cell by cell)
    timings: dict = field(default_factory=dict)
    engine: str = "general"          # which path computed it: "fast" or "general"
    stats: dict = field(default_factory=dict)   # the fast path's counts (groups, cells...)

    def key(self, sheet: str, coordinate: str):
        s = self.book.sheet(sheet)
        if s is None:
            raise KeyError(f"no sheet {sheet!r}")
        r, c = coordinate_to_tuple(coordinate.replace("$", "").upper())
        return (s.index, r, c)

    def value(self, sheet: str, coordinate: str):
        """Computed value of a formula cell (``result.value("Budget", "B7")``)."""
        return self.values[self.key(sheet, coordinate)]

    def cell_name(self, key) -> str:
        return cell_text(self.book.sheets[key[0]].name, key[1], key[2])

    def cached_values(self) -> dict:
        """Values a spreadsheet application cached in the file, for the same cells."""
        out = {}
        for key in self.values:
            sheet = self.book.sheets[key[0]]
            rc = (key[1], key[2])
            if rc in sheet.formulas:
                out[key] = sheet.cached.get(rc, V.EMPTY)
            else:  # a cell of an array formula's block: its value is stored plainly
                out[key] = sheet.constants.get(rc, V.EMPTY)
        return out


class Plan:
    """Compiled formula cells of a book and their evaluation order."""

    def __init__(self, book: Book, limits: Limits = DEFAULT_LIMITS):
        self.book = book
        self.limits = limits
        self.graph = Graph([s.name for s in book.sheets])
        self.cells = {}          # anchor -> (compiled, slots, block Area or None)
        self.name_errors = []
        self.messages = {}
        self._names = {}
        self._build()

    # ------------------------------------------------------------- operands
    def _note_names(self, anchor, compiled, slots) -> None:
        """Record every #NAME? of a compiled formula (unknown functions and names)."""
        for res in compiled.unknown:
            self.name_errors.append((anchor, res.message))
        if compiled.problem:
            self.name_errors.append((anchor, compiled.problem))
        for slot in slots:
            if isinstance(slot, ErrorOperand) and slot.code == "#NAME?":
                self.name_errors.append((anchor, slot.message))

    def _operand(self, text: str, sheet_index: int, depth: int = 0):
        book = self.book
        text = text.lstrip("@")
        sheet_name, body = split_sheet(text)
        if sheet_name is not None and sheet_name.startswith("["):
            return ErrorOperand("#REF!", f"{text}: references to other workbooks are not "
                                         f"supported headless")
        if sheet_name is None:
            sheet = book.sheets[sheet_index]
        else:
            sheet = book.sheet(sheet_name)
        if body.upper() == "#REF!":
            return ErrorOperand("#REF!", f"{text}: reference to a deleted cell or sheet")
        area = parse_area(body, sheet.name if sheet else "")
        if area is not None:
            if sheet is None:
                return ErrorOperand("#REF!", f"{text}: no sheet named {sheet_name!r}")
            if not (area.whole_cols or area.whole_rows) and area.size > self.limits.max_range_cells:
                raise WorkbookError(
                    f"{book.path}: range {area_text(area)} has {area.size:,} cells, over the "
                    f"limit of {self.limits.max_range_cells:,} (raise it with --max-range-cells)")
            return AreaOperand(area)
        if looks_like_name(body):
            scope = sheet.index if sheet is not None else None
            return self._name(body, scope, sheet_name is not None, depth)
        return ErrorOperand("#REF!", f"cannot read the reference {text!r}")

    def _name(self, name: str, scope, explicit_sheet: bool, depth: int):
        """The operand of a defined name, resolved once per name (memoised) and
        checked for cycles: names that refer to each other are a circular
        reference, refused like one between cells."""
        upper = name.upper()
        key = (scope, upper) if (scope, upper) in self.book.names else (None, upper)
        if explicit_sheet and key[0] is None and (scope, upper) not in self.book.names:
            key = (scope, upper)
        if key not in self.book.names:
            return ErrorOperand("#NAME?", f"undefined name {name}")
        if key in self._names:
            return self._names[key]
        resolving = self.__dict__.setdefault("_resolving", [])
        if key in resolving:
            chain = [k[1] for k in resolving[resolving.index(key):]] + [upper]
            raise WorkbookError(f"{self.book.path}: circular reference through defined names "
                                f"{' -> '.join(chain[:8])}{' ...' if len(chain) > 8 else ''}")
        if len(resolving) >= MAX_NAME_DEPTH:
            return ErrorOperand("#NAME?", f"name {name}: defined names nested more than "
                                          f"{MAX_NAME_DEPTH} deep")
        resolving.append(key)
        try:
            operand = self._define(name, key, depth)
        finally:
            resolving.pop()
        self._names[key] = operand
        return operand

    def _define(self, name: str, key, depth: int):
        definition = self.book.names[key].strip()
        if definition.startswith("="):
            definition = definition[1:]
        home = key[0] if key[0] is not None else 0
        sheet_name, body = split_sheet(definition)
        area = parse_area(body.replace("$", ""), "")
        if sheet_name is not None and area is not None:
            return self._operand(definition, home, depth + 1)
        # A name's expression is evaluated as an array (not intersected with the
        # calling cell); once, unless it uses ROW(), RAND()...: then at every use.
        compiled, texts = compile_formula("=" + definition, array=True)
        slots = position_only(compiled, [self._operand(t, home, depth + 1) for t in texts])
        per_use = bool(HOST_FUNCTIONS.intersection(compiled.functions)) or any(
            getattr(sl, "per_use", False) for sl in slots)
        return NameOperand(name, compiled, slots, per_use)

    # ------------------------------------------------------------- building
    def _build(self) -> None:
        book, graph = self.book, self.graph
        pending = []
        for sheet in book.sheets:
            for (r, c), cell in sheet.formulas.items():
                anchor = (sheet.index, r, c)
                block = None
                if cell.array_ref:
                    block = parse_area(cell.array_ref.split(":")[0] + ":" +
                                       cell.array_ref.split(":")[-1], sheet.name)
                    if block is not None and block.is_cell:
                        block = None
                graph.add_formula_cell(anchor, block)
                pending.append((anchor, cell, block))
        graph.freeze()
        for anchor, cell, block in pending:
            if anchor not in graph.owner or graph.owner[anchor] != anchor:
                continue  # inside another array formula's block
            compiled, texts = compile_formula(cell.text, array=bool(cell.array_ref))
            slots = position_only(compiled, [self._operand(t, anchor[0]) for t in texts])
            self.cells[anchor] = (compiled, slots, block)
            self._note_names(anchor, compiled, slots)
            for slot in slots:
                for area in slot.areas():
                    graph.add_read(anchor, book.sheet(area.sheet).index, area)
        try:
            order = graph.order()
        except WorkbookError as exc:
            raise WorkbookError(f"{book.path}: {exc.message}") from None
        self.order = [a for a in order if a in self.cells]

    # ------------------------------------------------------------- evaluating
    def evaluate_cell(self, anchor, env: Env) -> None:
        compiled, slots, block = self.cells[anchor]
        env.begin(anchor)
        try:
            result = compiled.run(env, slots)
        except WorkbookError:
            raise
        except RecursionError:
            result = env.fail("#VALUE!", "formula nested too deeply")
        except Exception as exc:  # never a crash for one cell
            result = env.fail("#VALUE!", f"engine error: {type(exc).__name__}: {exc}")
        s, r, c = anchor
        sheet_cells = env.cells[s]
        if block is None:
            value = V.cell_result(result)
            sheet_cells[(r, c)] = value
            self._explain(anchor, value, env, result, (0, 0))
            return
        values, arr = spill(result, block)
        for i in range(values.shape[0]):
            for j in range(values.shape[1]):
                key = (s, block.r1 + i, block.c1 + j)
                if self.graph.owner.get(key) != anchor:
                    continue
                value = V.cell_result(values[i, j])
                sheet_cells[(key[1], key[2])] = value
                ii = 0 if arr.shape[0] == 1 else i
                jj = 0 if arr.shape[1] == 1 else j
                self._explain(key, value, env, result, (ii, jj))

    def _explain(self, key, value, env: Env, result, element) -> None:
        if not V.is_error(value):
            return
        code = str(value)
        per_element = env.array_notes.get(id(result)) if hasattr(result, "shape") else None
        if per_element and element in per_element and per_element[element][0] == code:
            self.messages[key] = per_element[element][1]
            return
        for note_code, message, note_element in env.notes:
            if note_code == code and (note_element is None or note_element == element):
                self.messages[key] = message
                return
        origin = self._origin(key, code, env)
        if origin:
            self.messages[key] = origin

    def _origin(self, key, code, env):
        """Message of an error value propagated from a cell this one reads."""
        anchor = self.graph.owner.get(key, key)
        for dep in self._cell_deps(anchor):
            if env.cells[dep[0]].get((dep[1], dep[2])) is V.error(code) and dep in self.messages:
                message = self.messages[dep]
                if message.startswith("from "):
                    return message
                return f"from {self.graph.name(dep)}: {message}"
        return ""

    def _cell_deps(self, node, depth=0):
        for d in self.graph.deps.get(node, ()):
            if d[0] == "range":
                if depth < 1:
                    yield from self._cell_deps(d, depth + 1)
            else:
                yield d
                s, r, c = d
                block = self.cells.get(d, (None, None, None))[2]
                if block is not None:
                    for rr in range(block.r1, block.r2 + 1):
                        for cc in range(block.c1, block.c2 + 1):
                            if (rr, cc) != (r, c):
                                yield (s, rr, cc)



def recalculate_general(path, limits: Limits = DEFAULT_LIMITS, progress=None,
                        evaluator=None) -> Recalculation:
    """The general engine: every formula cell compiled and evaluated on its own.

    :func:`tubefuncs.headless.recalculate` chooses between this and the fast path.
    """
    with gc_paused():
        return _recalculate_general(path, limits, progress, evaluator)


def _recalculate_general(path, limits: Limits, progress, evaluator) -> Recalculation:
    t0 = time.perf_counter()
    if progress is not None:
        progress.phase("reading")
    book = load_book(path, limits)
    t1 = time.perf_counter()
    if progress is not None:
        progress.phase("compiling")
    plan = Plan(book, limits)
    t2 = time.perf_counter()
    env = Env(book, limits)
    if progress is not None:
        progress.phase("calculating")
    (evaluator or SequentialEvaluator()).evaluate(plan, env, progress)
    t3 = time.perf_counter()
    values = {}
    for anchor, (_, _, block) in plan.cells.items():
        s, r, c = anchor
        if block is None:
            values[anchor] = env.cells[s][(r, c)]
        else:
            for rr in range(block.r1, block.r2 + 1):
                for cc in range(block.c1, block.c2 + 1):
                    if plan.graph.owner.get((s, rr, cc)) == anchor:
                        values[(s, rr, cc)] = env.cells[s][(rr, cc)]
    name_errors = list(plan.name_errors)
    seen = {k for k, _ in name_errors}
    for key, value in values.items():
        if value is V.NAME and key not in seen:
            name_errors.append((key, plan.messages.get(key, "#NAME?")))
    name_errors.sort()
    return Recalculation(book, values, plan.messages, name_errors, len(values),
                         {"read": t1 - t0, "compile": t2 - t1, "evaluate": t3 - t2})

