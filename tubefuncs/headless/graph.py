"""The dependency graph of a workbook's formulas, and their evaluation order.

Nodes are formula cells (the anchor cell of an array formula stands for its
whole block) and, to keep the graph small, one node per distinct range that
contains formula cells: ``=SUM($B$5:$B$205)`` in 200 cells costs 200 + 200
edges, not 200 x 200.  The order is Kahn's topological sort; cells left over
lie on or behind a circular reference, which is a
:class:`~tubefuncs.headless.problems.WorkbookError` naming one cycle.
"""

from __future__ import annotations

import bisect
from collections import defaultdict, deque
from dataclasses import dataclass, field

from .problems import WorkbookError
from .references import Area, cell_text


@dataclass
class Graph:
    """Formula cells and what they read.  Keys are ``(sheet_index, row, col)``."""

    sheet_names: list
    anchors: list = field(default_factory=list)          # formula cells, in load order
    owner: dict = field(default_factory=dict)            # produced cell -> anchor
    _col_rows: dict = field(default_factory=dict)        # sheet -> col -> sorted rows
    _cols: dict = field(default_factory=dict)            # sheet -> sorted cols
    deps: dict = field(default_factory=lambda: defaultdict(set))   # node -> nodes it reads
    _range_nodes: dict = field(default_factory=dict)

    def add_formula_cell(self, anchor, block: Area | None = None) -> None:
        self.anchors.append(anchor)
        s, r, c = anchor
        cells = [(r, c)]
        if block is not None:
            cells = [(rr, cc) for rr in range(block.r1, block.r2 + 1)
                     for cc in range(block.c1, block.c2 + 1)]
        for rr, cc in cells:
            key = (s, rr, cc)
            if key in self.owner and self.owner[key] != anchor:
                continue  # overlapping array blocks: the first keeps the cell
            self.owner[key] = anchor
            self._col_rows.setdefault(s, {}).setdefault(cc, []).append(rr)

    def freeze(self) -> None:
        for s, cols in self._col_rows.items():
            for rows in cols.values():
                rows.sort()
            self._cols[s] = sorted(cols)

    def producers(self, sheet_index: int, area: Area) -> set:
        """Anchors of formula cells inside an area."""
        if area.is_cell:
            a = self.owner.get((sheet_index, area.r1, area.c1))
            return {a} if a is not None else set()
        found = set()
        cols = self._cols.get(sheet_index)
        if not cols:
            return found
        col_rows = self._col_rows[sheet_index]
        for ci in range(bisect.bisect_left(cols, area.c1), bisect.bisect_right(cols, area.c2)):
            rows = col_rows[cols[ci]]
            lo, hi = bisect.bisect_left(rows, area.r1), bisect.bisect_right(rows, area.r2)
            for ri in range(lo, hi):
                found.add(self.owner[(sheet_index, rows[ri], cols[ci])])
        return found

    def add_read(self, reader, sheet_index: int, area: Area) -> None:
        """``reader`` reads ``area``: depend on the formula cells inside it."""
        if area.is_cell:
            a = self.owner.get((sheet_index, area.r1, area.c1))
            if a is not None:
                self.deps[reader].add(a)
            return
        key = ("range", sheet_index, area.r1, area.c1, area.r2, area.c2)
        node = self._range_nodes.get(key)
        if node is None:
            inside = self.producers(sheet_index, area)
            if not inside:
                self._range_nodes[key] = False
                return
            node = key
            self._range_nodes[key] = node
            self.deps[node] = inside
        if node:
            self.deps[reader].add(node)

    def order(self) -> list:
        """Formula anchors in an order where every cell follows what it reads."""
        users = defaultdict(list)
        indegree = {}
        nodes = set(self.anchors) | set(self.deps)
        for node in nodes:
            ds = self.deps.get(node, ())
            indegree[node] = len(ds)
            for d in ds:
                users[d].append(node)
        queue = deque(n for n in self.anchors if indegree.get(n, 0) == 0)
        queue.extend(n for n in nodes if n[0] == "range" and indegree[n] == 0)
        out = []
        seen = 0
        while queue:
            node = queue.popleft()
            seen += 1
            if node[0] != "range":
                out.append(node)
            for u in users.get(node, ()):
                indegree[u] -= 1
                if indegree[u] == 0:
                    queue.append(u)
        if seen < len(nodes):
            left = {n for n, d in indegree.items() if d > 0}
            raise WorkbookError(self._cycle_message(left))
        return out

    def _cycle_message(self, left: set) -> str:
        start = next((n for n in self.anchors if n in left), next(iter(left)))
        path, index = [], {}
        node = start
        while node not in index:
            index[node] = len(path)
            path.append(node)
            node = next(d for d in self.deps[node] if d in left)
        cycle = path[index[node]:] + [node]
        cells = [self.name(n) for n in cycle if n[0] != "range"]
        if len(cells) == 1 or cells[0] != cells[-1]:
            cells.append(cells[0])
        shown = cells if len(cells) <= 8 else cells[:4] + ["..."] + cells[-3:]
        return (f"circular reference: {' -> '.join(shown)} (the headless engine does not "
                f"iterate circular references; Excel's iterative calculation is not supported)")

    def name(self, key) -> str:
        return cell_text(self.sheet_names[key[0]], key[1], key[2])
