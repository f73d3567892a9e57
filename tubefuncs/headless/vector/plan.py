"""The fast plan: groups of same-shape cells and single cells, in dependency order.

Nodes of the dependency graph are

- *vector groups*: the cells of one column sharing a shape, evaluated by one
  vector program (:mod:`.program`);
- *general groups*: a shape the vector compiler does not cover; its cells run
  the general engine's compiled closure one by one (compiled once per shape,
  operands placed per cell);
- *sequential groups*: a shape whose cells read the cells above them in the
  same group (a running value, ``=A5+step``): general closures in row order;
- *single cells*: array formulas, data tables, formulas with structured or
  external references, and every cell of a group found on a cycle between
  groups; exactly as the general engine's :class:`~..engine.Plan` builds them.

Cell values live where the general engine keeps them (:class:`~..evaluate.Env`),
so both kinds of evaluation read each other's results; vector groups also
keep their result vectors for the groups that read them row for row.

Error values of vector groups are evaluated again by the general engine, cell
by cell, so that every error value carries the general engine's message (and
any disagreement would resolve to the general engine's value).  A circular
reference, an over-large range or anything else the general engine refuses
makes the whole workbook go through the general engine, so the refusal and
its message are the general engine's.
"""

from __future__ import annotations

import bisect
import functools
import itertools
import operator
import re
import time
from collections import defaultdict, deque

import numpy as np

from .. import values as V
from ..engine import Plan, Recalculation, recalculate_general
from ..evaluate import AreaOperand, Env, ErrorOperand, position_only
from ..formula import compile_skeleton, parse_tree, skeleton, tokenize
from ..gcpause import gc_paused
from ..graph import Graph
from ..limits import DEFAULT_LIMITS, Limits
from ..problems import WorkbookError
from ..references import MAX_ROW, Area, split_sheet
from .program import Compiler, Context, NotVectorisable
from .reader import load_book_fast
from .shapes import group_sheet
from .vec import CRASH, Vec

_CELL_TEXT = re.compile(r"^\$?[A-Za-z]{1,3}(\$?)([0-9]{1,7})$")
_RANGE_TEXT = re.compile(r"^\$?[A-Za-z]{1,3}(\$?)([0-9]{1,7}):\$?[A-Za-z]{1,3}(\$?)([0-9]{1,7})$")
_ROWS_TEXT = re.compile(r"^(\$?)([0-9]{1,7}):(\$?)([0-9]{1,7})$")


class _UseGeneral(Exception):
    """The general engine must do this workbook (it raises what it raises)."""


# ----------------------------------------------------------------------------- compiling

@functools.lru_cache(maxsize=4096)
def _shape(text: str):
    """``(Compiled, tree, operand texts)`` of a plain formula, as the general engine
    compiles it (groups never hold array formulas)."""
    tokens = tokenize(text)
    key = skeleton(tokens)
    parse_tokens = tuple((v if v != "\x00" else "A1", t or "OPERAND", s or "RANGE")
                         for v, t, s in key)
    compiled = compile_skeleton(key, parse_tokens)
    tree = None
    if not compiled.problem:
        tree = parse_tree(parse_tokens, False)
    texts = [t.value for t in tokens if t.type == "OPERAND" and t.subtype == "RANGE"]
    return compiled, tree, texts


def _shape_of(text: str):
    try:
        return _shape(text)
    except Exception:   # the tokenizer's refusal: the general engine reports it
        return None


class Slot:
    """One reference operand of a shape, placed for each cell of its group."""

    __slots__ = ("kind", "operand", "sheet", "area", "rel1", "rel2", "row0")

    def __init__(self, operand, kind="uniform", sheet=None, area=None, rel1=False, rel2=False,
                 row0=0):
        self.operand = operand     # the representative cell's operand
        self.kind = kind           # "uniform" | "cell" | "range"
        self.sheet = sheet         # sheet index of the area
        self.area = area
        self.rel1, self.rel2 = rel1, rel2
        self.row0 = row0           # the representative's row

    def area_at(self, row: int) -> Area:
        a = self.area
        d = row - self.row0
        r1 = a.r1 + d if self.rel1 else a.r1
        r2 = a.r2 + d if self.rel2 else a.r2
        if r1 > r2:
            r1, r2 = r2, r1
        return Area(a.sheet, r1, a.c1, r2, a.c2, a.whole_rows, a.whole_cols)

    def operand_at(self, row: int):
        if self.kind == "uniform":
            return self.operand
        return AreaOperand(self.area_at(row))


def _slot(plan, text: str, sheet_index: int, row: int) -> Slot:
    operand = plan._operand(text, sheet_index)
    if not isinstance(operand, AreaOperand):
        return Slot(operand)
    area = operand.area
    body = split_sheet(text.lstrip("@"))[1]
    s = plan.book.sheet(area.sheet).index
    m = _RANGE_TEXT.match(body) or (_ROWS_TEXT.match(body) if area.whole_rows else None)
    if m:
        lo, hi = (1, 2), (3, 4)
        if int(m.group(lo[1])) > int(m.group(hi[1])):
            lo, hi = hi, lo
        rel1, rel2 = not m.group(lo[0]), not m.group(hi[0])
        if rel1 or rel2:
            return Slot(operand, "range", s, area, rel1, rel2, row)
        return Slot(operand, sheet=s, area=area)
    m = _CELL_TEXT.match(body)
    if m and area.is_cell and not m.group(1):
        return Slot(operand, "cell", s, area, True, True, row)
    return Slot(operand, sheet=s, area=area)


def _same_operand(a, b) -> bool:
    if isinstance(a, AreaOperand) and isinstance(b, AreaOperand):
        return a.area == b.area
    if isinstance(a, ErrorOperand) and isinstance(b, ErrorOperand):
        return a.code == b.code and a.message == b.message
    return a is b


class Group:
    """Cells of one column of one sheet that share a shape."""

    def __init__(self, sheet: int, col: int, rows: list):
        self.sheet = sheet
        self.col = col
        self.rows = sorted(rows)
        self.kind = "general"
        self.compiled = None
        self.slots: list = []
        self.program = None
        self.name_messages: list = []

    @property
    def keys(self):
        return list(zip(itertools.repeat(self.sheet), self.rows, itertools.repeat(self.col)))


# ----------------------------------------------------------------------------- the plan

class FastPlan(Plan):
    """A :class:`~..engine.Plan` whose formula cells are grouped by shape.

    Only the cells the general engine evaluates (single cells, cells of
    general and sequential groups, error cells of vector groups) get entries
    in :attr:`cells`; :meth:`evaluate` runs everything.
    """

    def __init__(self, book, limits: Limits = DEFAULT_LIMITS):  # noqa: D107 - no Plan build
        self.book = book
        self.limits = limits
        self.graph = Graph([s.name for s in book.sheets])
        self.cells = {}
        self.name_errors = []
        self.messages = {}
        self._names = {}
        self._producers_cache = {}
        self._col_rows = {}              # (sheet, col) -> sorted rows of formula cells
        self._cols = None                # sheet -> sorted columns holding formula cells
        self.groups: list = []
        self.singles: list = []          # anchors of single cells
        self.anchors: list = []          # every anchor, in load order
        self.blocks = {}                 # anchor -> block Area of array formulas
        self.stats = defaultdict(int)
        self._build_fast()

    # ------------------------------------------------------------ ownership
    def _owner(self, key):
        """Anchor of the formula cell producing ``key`` (None: not a formula cell)."""
        owner = self.graph.owner.get(key)
        if owner is not None:
            return owner
        s, r, c = key
        if s in self._array_sheets:
            return None
        return key if (r, c) in self.book.sheets[s].formulas else None

    def _build_fast(self) -> None:
        book = self.book
        self._array_sheets = set()
        groups = []
        for sheet in book.sheets:
            s = sheet.index
            has_arrays = any(map(operator.attrgetter("array_ref"), sheet.formulas.values()))
            eligible = None
            if has_arrays:
                self._array_sheets.add(s)
                self._claim_blocks(sheet)
                owner = self.graph.owner

                def eligible(rc, s=s, sheet=sheet, owner=owner):
                    return (owner.get((s,) + rc) == (s,) + rc
                            and not sheet.formulas[rc].array_ref)
            by_shape, singles = group_sheet(sheet, eligible)
            for (col, _), rows in by_shape.items():
                groups.append(Group(s, col, rows))
            for rc in singles:
                anchor = (s,) + rc
                if self._owner(anchor) == anchor:
                    self.singles.append(anchor)
            if s in self._array_sheets:
                self.anchors.extend((s, r, c) for r, c in sheet.formulas
                                    if self.graph.owner.get((s, r, c)) == (s, r, c))
            else:
                self.anchors.extend(map((s,).__add__, sheet.formulas))   # (s,) + (r, c)
        for group in groups:
            self._prepare(group)
        self.groups = [g for g in groups if g.kind != "split"]
        for anchor in self.singles:
            self._compile_cell(anchor)

    def _claim_blocks(self, sheet) -> None:
        """Owners of a sheet's cells exactly as :class:`~..engine.Plan` assigns them."""
        from ..references import parse_area

        s = sheet.index
        for (r, c), cell in sheet.formulas.items():
            block = None
            if cell.array_ref:
                ref = cell.array_ref
                block = parse_area(ref.split(":")[0] + ":" + ref.split(":")[-1], sheet.name)
                if block is not None and block.is_cell:
                    block = None
            self.graph.add_formula_cell((s, r, c), block)
            if block is not None:
                self.blocks[(s, r, c)] = block

    def _prepare(self, group: Group) -> None:
        """Compile a group's shape; check a second cell against it; pick its kind."""
        sheet = self.book.sheets[group.sheet]
        first = sheet.formulas[(group.rows[0], group.col)]
        shape = _shape_of(first.text)
        if shape is None or shape[0].problem:
            self._split(group)
            return
        compiled, tree, texts = shape
        slots = [_slot(self, t, group.sheet, group.rows[0]) for t in texts]
        if any(getattr(sl.operand, "per_use", False) for sl in slots) or any(
                self._reads_formulas(slots[i]) for i in compiled.position_only):
            # (a name evaluated per use, in each cell's context; a ROW(...) over
            # formula cells, which reads no value: cell by cell, without that edge)
            self._split(group)
            return
        if len(group.rows) > 1:
            row = group.rows[-1]
            other = _shape_of(sheet.formulas[(row, group.col)].text)
            if (other is None or other[0] is not compiled or len(other[2]) != len(slots)
                    or not all(_same_operand(sl.operand_at(row),
                                             self._operand(t, group.sheet))
                               for sl, t in zip(slots, other[2]))):
                self.stats["groups split (check failed)"] += 1
                self._split(group)
                return
        group.compiled, group.slots = compiled, slots
        messages = [res.message for res in compiled.unknown]
        messages += [sl.operand.message for sl in slots
                     if isinstance(sl.operand, ErrorOperand) and sl.operand.code == "#NAME?"]
        group.name_messages = messages
        kinds = [sl.kind if sl.kind != "uniform" else
                 "uniform-cell" if sl.area is not None and sl.area.is_cell else "uniform"
                 for sl in slots]
        try:
            group.program = Compiler(kinds).compile(tree)
            group.kind = "vector"
        except (NotVectorisable, RecursionError):   # (a run of thousands of terms)
            group.kind = "general"
        self.stats[f"{group.kind} groups"] += 1

    def _reads_formulas(self, slot) -> bool:
        """True when a slot's area (at any row of its group) may hold formula cells."""
        if slot.area is None:
            return True
        cols = self.__dict__.get("_formula_cols")
        if cols is None:
            cols = self._formula_cols = {(sh.index, c) for sh in self.book.sheets
                                         for _, c in sh.formulas}
        s = self.book.sheet(slot.area.sheet).index
        c2 = min(slot.area.c2, slot.area.c1 + 64)
        return slot.area.c2 > c2 or any((s, c) in cols for c in range(slot.area.c1, c2 + 1))

    def _split(self, group: Group) -> None:
        """The group's cells become single cells."""
        group.kind = "split"
        self.singles.extend((group.sheet, r, group.col) for r in group.rows)

    def _compile_cell(self, anchor) -> None:
        """A single cell, compiled exactly as :class:`~..engine.Plan` compiles it."""
        from ..formula import compile_formula

        s, r, c = anchor
        cell = self.book.sheets[s].formulas[(r, c)]
        compiled, texts = compile_formula(cell.text, array=bool(cell.array_ref))
        slots = position_only(compiled, [self._operand(t, s) for t in texts])
        self.cells[anchor] = (compiled, slots, self.blocks.get(anchor))
        self._note_names(anchor, compiled, slots)

    def _group_cell(self, group: Group, row: int):
        """Register one cell of a group for the general engine."""
        anchor = (group.sheet, row, group.col)
        if anchor not in self.cells:
            self.cells[anchor] = (group.compiled, [sl.operand_at(row) for sl in group.slots],
                                  None)
        return anchor

    # ------------------------------------------------------------ dependencies
    def _formula_rows(self, s: int, col: int):
        """Sorted rows of the formula cells (and array-block cells) in a column."""
        if not self._col_rows:
            by_col = defaultdict(list)
            for group in self.groups:
                by_col[(group.sheet, group.col)].extend(group.rows)
            for anchor in self.singles:
                by_col[(anchor[0], anchor[2])].append(anchor[1])
            for ss, r, c in self.graph.owner:
                by_col[(ss, c)].append(r)
            for k, v in by_col.items():
                self._col_rows[k] = sorted(set(v))
            self._col_rows[None] = []
        return self._col_rows.get((s, col), [])

    def _cols_of(self, s: int):
        self._formula_rows(s, 0)
        cols = self._cols
        if cols is None:
            cols = self._cols = defaultdict(list)
            for k in self._col_rows:
                if k is not None:
                    cols[k[0]].append(k[1])
            for v in cols.values():
                v.sort()
        return cols.get(s, [])

    def producers(self, s: int, area: Area) -> list:
        """Anchors of the formula cells inside an area (in the general graph's order)."""
        key = (s, area.r1, area.c1, area.r2, area.c2)
        found = self._producers_cache.get(key)
        if found is not None:
            return found
        found = []
        seen = set()
        cols = self._cols_of(s)
        for ci in range(bisect.bisect_left(cols, area.c1), bisect.bisect_right(cols, area.c2)):
            c = cols[ci]
            rows = self._formula_rows(s, c)
            lo, hi = bisect.bisect_left(rows, area.r1), bisect.bisect_right(rows, area.r2)
            for r in rows[lo:hi]:
                a = self._owner((s, r, c))
                if a is not None and a not in seen:
                    seen.add(a)
                    found.append(a)
        self._producers_cache[key] = found
        return found

    def _deps_of_slots(self, slots) -> set:
        """What :meth:`~..graph.Graph.add_read` records for a cell reading ``slots``."""
        deps = set()
        for slot in slots:
            for area in slot.areas():
                s = self.book.sheet(area.sheet).index
                if area.is_cell:
                    a = self._owner((s, area.r1, area.c1))
                    if a is not None:
                        deps.add(a)
                else:
                    if self.producers(s, area):
                        deps.add(("range", s, area.r1, area.c1, area.r2, area.c2))
        return deps

    def _deps(self, node) -> set:
        if node[0] == "range":
            _, s, r1, c1, r2, c2 = node
            return set(self.producers(s, Area("", r1, c1, r2, c2)))
        entry = self.cells.get(node)
        return self._deps_of_slots(entry[1]) if entry is not None else set()

    def _cell_deps(self, node, depth=0):
        """As :meth:`~..engine.Plan._cell_deps`, from the cell's own operands."""
        for d in self._deps(node):
            if d[0] == "range":
                if depth < 1:
                    yield from self._cell_deps(d, depth + 1)
            else:
                yield d
                block = self.cells.get(d, (None, None, None))[2]
                if block is not None:
                    s = d[0]
                    for rr in range(block.r1, block.r2 + 1):
                        for cc in range(block.c1, block.c2 + 1):
                            if (rr, cc) != (d[1], d[2]):
                                yield (s, rr, cc)

    # ------------------------------------------------------------ ordering
    def order_nodes(self) -> list:
        """Nodes (groups and single anchors) in dependency order; groups on a
        cycle are split into single cells until only true cycles could remain."""
        for _ in range(4):
            nodes, node_of = self._nodes()
            deps = [self._node_deps(node, i, node_of) for i, node in enumerate(nodes)]
            order, left = _kahn(deps)
            if not left:
                return [nodes[i] for i in order]
            stuck = [nodes[i] for i in left if isinstance(nodes[i], Group)]
            if not stuck:
                raise _UseGeneral("circular reference")
            for group in stuck:
                self.stats["groups split (cycle)"] += 1
                self.groups.remove(group)
                self._split(group)
                for r in group.rows:
                    self._group_cell(group, r)
                    self.name_errors.extend(((group.sheet, r, group.col), m)
                                            for m in group.name_messages)
                group.kind = "split-done"
        raise _UseGeneral("cycles between groups")

    def _nodes(self):
        nodes = list(self.groups) + list(self.singles)
        node_of = {}
        for i, node in enumerate(nodes):
            if isinstance(node, Group):
                node_of.update(dict.fromkeys(node.keys, i))
            else:
                node_of[node] = i
                block = self.blocks.get(node)
                if block is not None:
                    s = node[0]
                    for rr in range(block.r1, block.r2 + 1):
                        for cc in range(block.c1, block.c2 + 1):
                            if self.graph.owner.get((s, rr, cc)) == node:
                                node_of[(s, rr, cc)] = i
        return nodes, node_of

    def _area_nodes(self, s: int, area: Area, node_of) -> set:
        if area.is_cell:
            i = node_of.get((s, area.r1, area.c1))
            return {i} if i is not None else set()
        return {node_of[a] for a in self.producers(s, area) if a in node_of}

    def _node_deps(self, node, index: int, node_of) -> set:
        deps = set()
        if not isinstance(node, Group):
            for slot in self.cells[node][1]:
                for area in slot.areas():
                    deps |= self._area_nodes(self.book.sheet(area.sheet).index, area, node_of)
            return deps   # a cell reading itself stays on its cycle: the general engine says so
        group = node
        self_reads = []
        for slot in group.slots:
            if slot.kind == "cell":
                s2, col = slot.sheet, slot.area.c1
                if not self._formula_rows(s2, col):
                    continue
                d = slot.area.r1 - slot.row0
                found = set(map(node_of.get, zip(itertools.repeat(s2), map(d.__add__, group.rows),
                                                 itertools.repeat(col))))   # (C-speed passes)
                found.discard(None)
                if index in found:
                    self_reads.append((slot, d))
                deps |= found
            elif slot.kind == "range":
                lo = min(slot.area_at(group.rows[0]).r1, slot.area_at(group.rows[-1]).r1)
                hi = max(slot.area_at(group.rows[0]).r2, slot.area_at(group.rows[-1]).r2)
                box = Area(slot.area.sheet, lo, slot.area.c1, hi, slot.area.c2)
                found = self._area_nodes(slot.sheet, box, node_of)
                if index in found:
                    self_reads.append((slot, None))
                deps |= found
            else:
                for area in slot.operand.areas():
                    found = self._area_nodes(self.book.sheet(area.sheet).index, area, node_of)
                    if index in found:
                        self_reads.append((slot, None))
                    deps |= found
        if self_reads:
            if all(d is not None and d < 0 and sl.sheet == group.sheet
                   and sl.area.c1 == group.col for sl, d in self_reads) \
                    and group.kind in ("vector", "general", "sequential"):
                group.kind = "sequential"
                deps.discard(index)
            # else: the self-edge stays and the group is split as a cycle
        return deps

    # ------------------------------------------------------------ evaluating
    def evaluate(self, env: Env, progress=None) -> None:
        order = self.order_nodes()
        store = _Store(env)
        total = sum(len(n.rows) if isinstance(n, Group) else 1 for n in order)
        done = 0
        step = max(1, total // 200)
        last = 0
        for node in order:
            if isinstance(node, Group):
                if node.kind == "vector":
                    self._run_vector(node, env, store)
                else:
                    for r in node.rows:
                        self.evaluate_cell(self._group_cell(node, r), env)
                done += len(node.rows)
            else:
                self.evaluate_cell(node, env)
                done += 1
            if progress is not None and done - last >= step:
                progress.update(done, total)
                last = done
        if progress is not None:
            progress.update(total, total)

    def _run_vector(self, group: Group, env: Env, store) -> None:
        n = len(group.rows)
        rows = np.asarray(group.rows, dtype=np.int64)
        reader = _SlotReader(group, rows, env, store)
        env.begin((group.sheet, group.rows[0], group.col))
        ctx = Context(n, rows, group.col, reader)
        try:
            result = group.program(ctx)
        except WorkbookError:
            raise
        except Exception:   # a fault of the vector program: the general engine, cell by cell
            self.stats["vector groups redone"] += 1
            for r in group.rows:
                self.evaluate_cell(self._group_cell(group, r), env)
            return
        cells = env.cells[group.sheet]
        col = group.col
        final = _final_values(result)
        values = final.elements()
        if final.bad is not None:
            for i in np.flatnonzero(final.bad).tolist():
                v = values[i]
                if v is CRASH or V.is_error(v):
                    anchor = self._group_cell(group, group.rows[i])
                    self.evaluate_cell(anchor, env)
                    values[i] = cells[(group.rows[i], col)]
                    final.put(i, values[i])
                    self.stats["error cells redone"] += 1
            final = final.tidy()
        cells.update(zip(zip(group.rows, itertools.repeat(col)), values))
        store.keep(group.sheet, col, group.rows, final)
        self.stats["vector cells"] += n


def _final_values(result: Vec) -> Vec:
    """What the cells show: -0 as 0; arrays, blanks and non-finite numbers as the
    general engine shows them (:func:`tubefuncs.headless.values.cell_result`)."""
    x = result.x + 0.0
    if result.bad is None:
        return Vec(x, result.kind)
    out = Vec(x, result.kind, result.bad.copy(), result.o.copy())
    for i in np.flatnonzero(result.bad).tolist():
        v = result.o[i]
        out.put(i, v if v is CRASH else V.cell_result(v))
    return out


def _kahn(deps: list):
    users = defaultdict(list)
    indegree = [len(d) for d in deps]
    for i, ds in enumerate(deps):
        for d in ds:
            users[d].append(i)
    queue = deque(i for i, k in enumerate(indegree) if k == 0)
    order = []
    while queue:
        i = queue.popleft()
        order.append(i)
        for u in users.get(i, ()):
            indegree[u] -= 1
            if indegree[u] == 0:
                queue.append(u)
    left = [i for i, k in enumerate(indegree) if k > 0]
    return order, left


class _Store:
    """Result vectors of evaluated columns, for the groups that read them row for row."""

    def __init__(self, env: Env):
        self.env = env
        self.vectors = {}            # (sheet, col, first row, n) -> Vec

    def keep(self, s: int, col: int, rows: list, vec: Vec) -> None:
        """Remember a column's values (valid for good: a cell is computed once, and
        every reader comes after the cells it reads)."""
        if rows[-1] - rows[0] == len(rows) - 1:
            self.vectors[(s, col, rows[0], len(rows))] = vec

    def gather(self, s: int, col: int, rows) -> Vec:
        n = len(rows)
        first = int(rows[0])
        contiguous = int(rows[-1]) - first == n - 1
        if contiguous:
            vec = self.vectors.get((s, col, first, n))
            if vec is not None:
                return vec
        get = self.env.cells[s].get
        empty = V.EMPTY
        vec = Vec.of_values([get((r, col), empty) for r in rows.tolist()])
        if contiguous and 1 <= first and first + n - 1 <= MAX_ROW:
            self.keep(s, col, list(range(first, first + n)), vec)
        return vec


class _SlotReader:
    """``ctx.slot(i)``: the vector of operand ``i`` for the group's cells."""

    def __init__(self, group: Group, rows, env: Env, store: _Store):
        self.group = group
        self.rows = rows
        self.env = env
        self.store = store
        self.cache = {}

    def __call__(self, i: int) -> Vec:
        vec = self.cache.get(i)
        if vec is None:
            vec = self.cache[i] = self._read(i)
        return vec

    def _read(self, i: int) -> Vec:
        slot = self.group.slots[i]
        n = len(self.rows)
        env = self.env
        if slot.kind == "uniform":
            return Vec.full(slot.operand.value(env), n)
        if slot.kind == "cell":
            d = slot.area.r1 - slot.row0
            return self.store.gather(slot.sheet, slot.area.c1, self.rows + d)
        out = Vec.blank(n)
        for k, r in enumerate(self.rows.tolist()):
            out.put(k, env.read(slot.area_at(r)))
        return out.tidy()

    def intersected(self, i: int) -> Vec:
        """Operand ``i`` in a value position: each cell's implicit intersection
        (:func:`..intersection.intersect`, as the general engine computes it)."""
        from ..intersection import intersect

        slot = self.group.slots[i]
        env = self.env
        s, col = self.group.sheet, self.group.col
        out = Vec.blank(len(self.rows))
        for k, r in enumerate(self.rows.tolist()):
            ref = slot.operand.reference(env) if slot.kind == "uniform" else slot.area_at(r)
            out.put(k, intersect(ref, env, (s, r, col)))
        return out.tidy()

    def rows_of(self, i: int):
        slot = self.group.slots[i]
        if slot.kind == "cell":
            return self.rows + (slot.area.r1 - slot.row0)
        return np.full(len(self.rows), slot.area.r1)

    def cols_of(self, i: int):
        slot = self.group.slots[i]
        return np.full(len(self.rows), slot.area.c1)


# ----------------------------------------------------------------------------- entry

def recalculate_fast(path, limits: Limits = DEFAULT_LIMITS, progress=None) -> Recalculation:
    """:func:`tubefuncs.headless.recalculate` by the fast path (same result)."""
    with gc_paused():
        return _recalculate_fast(path, limits, progress)


def _recalculate_fast(path, limits: Limits, progress) -> Recalculation:
    t0 = time.perf_counter()
    if progress is not None:
        progress.phase("reading")
    book = load_book_fast(path, limits)
    t1 = time.perf_counter()
    if progress is not None:
        progress.phase("compiling")
    try:
        plan = FastPlan(book, limits)
        t2 = time.perf_counter()
        env = Env(book, limits)
        if progress is not None:
            progress.phase("calculating")
        plan.evaluate(env, progress)
    except (_UseGeneral, WorkbookError):
        return recalculate_general(path, limits=limits, progress=progress)
    t3 = time.perf_counter()
    values = {}
    if not plan.blocks:
        at = 0
        for sheet in book.sheets:
            n = len(sheet.formulas)
            values.update(zip(plan.anchors[at:at + n],
                              map(env.cells[sheet.index].__getitem__, sheet.formulas)))
            at += n
    for anchor in plan.anchors if plan.blocks else ():
        s, r, c = anchor
        block = plan.blocks.get(anchor)
        cells = env.cells[s]
        if block is None:
            values[anchor] = cells[(r, c)]
        else:
            for rr in range(block.r1, block.r2 + 1):
                for cc in range(block.c1, block.c2 + 1):
                    if plan.graph.owner.get((s, rr, cc)) == anchor:
                        values[(s, rr, cc)] = cells[(rr, cc)]
    name_errors = list(plan.name_errors)
    for group in plan.groups:
        for m in group.name_messages:
            name_errors.extend(((group.sheet, r, group.col), m) for r in group.rows)
    seen = {k for k, _ in name_errors}
    if any(map(operator.is_, values.values(), itertools.repeat(V.NAME))):   # (a C pass)
        for key, value in values.items():
            if value is V.NAME and key not in seen:
                name_errors.append((key, plan.messages.get(key, "#NAME?")))
    name_errors.sort()
    recalc = Recalculation(book, values, plan.messages, name_errors, len(values),
                           {"read": t1 - t0, "compile": t2 - t1, "evaluate": t3 - t2})
    recalc.engine = "fast"
    recalc.stats = dict(plan.stats)
    return recalc
