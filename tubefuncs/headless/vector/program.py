"""Compiling a formula shape into a vector program.

The syntax tree is the general engine's (:class:`tubefuncs.headless.formula._Parser`
on the shape's tokens); each node becomes a function of a :class:`Context`
that returns a :class:`~.vec.Vec` with one element per cell of the group.

Vectorised with numpy (clean elements), everything else element by element
with the general engine's own callables (see :mod:`.vec`):

- operators ``+ - * / ^``, unary ``-``/``+``, ``%``, comparisons; ``&`` element
  by element;
- ``ABS ACOS ACOSH ASIN ASINH ATAN ATANH COS COSH DEGREES EXP LN LOG10
  RADIANS SIGN SIN SINH SQRT TAN TANH``, ``LOG``, ``POWER``, ``MOD``, ``INT``,
  ``ROUND``/``ROUNDUP``/``ROUNDDOWN``, ``MIN``/``MAX`` of single values,
  ``SUM`` of up to seven single values, ``IF``, ``IFERROR``, ``AND``, ``OR``,
  ``NOT``, ``ISERROR``, ``ISNUMBER``, ``PI``, ``ROW()``/``COLUMN()``;
- catalogue functions: one :func:`tubefuncs.worksheet.evaluate` call with a
  column per argument that varies from cell to cell (element errors kept);
- any other Excel function of the library: called element by element.

A shape with a reference operator (``:`` between expressions, intersection,
union), a reference function other than ``ROW``/``COLUMN`` of one cell, or a
parse problem raises :class:`NotVectorisable`: its cells are evaluated by the
general engine.
"""

from __future__ import annotations

import functools
import math

import formulas
import numpy as np
from formulas.functions.operators import OPERATORS

from .. import values as V
from ..catalogue_bridge import CatalogueFunction, _to_worksheet
from ..functions import _isnumber, excel_library, resolve
from .vec import CRASH, Vec, either, elementwise, finish, general, guarded, is_simple


class NotVectorisable(Exception):
    """The shape needs the general engine."""


class Context:
    """What a vector program sees: the group's size, rows and operand vectors."""

    __slots__ = ("n", "rows", "col", "slot")

    def __init__(self, n: int, rows, col: int, slot):
        self.n = n
        self.rows = rows          # int array of the cells' rows
        self.col = col
        self.slot = slot          # slot(i) -> Vec of operand i


# ----------------------------------------------------------------------------- library

def _formulas_fn(name: str):
    entry = formulas.get_functions().get(name)
    if isinstance(entry, dict):
        entry = entry.get("function")
    return entry


@functools.lru_cache(maxsize=1)
def _trusted() -> dict:
    """Library entries whose vector twins below were written against: a
    function changed in :mod:`tubefuncs.headless.functions` loses its twin."""
    lib = excel_library()
    out = {}
    for name in list(_UFUNCS) + ["LOG", "POWER", "MOD", "INT", "ROUND", "ROUNDUP", "ROUNDDOWN",
                                 "IF", "IFERROR", "AND", "OR", "NOT", "ISERROR", "PI"]:
        fn = lib.get(name)
        if fn is not None and fn is _formulas_fn(name):
            out[name] = fn
    for name in ("MIN", "MAX", "SUM"):
        fn = lib.get(name)
        if fn is not None and getattr(fn, "__wrapped__", None) is _formulas_fn(name):
            out[name] = fn
    if lib.get("ISNUMBER") is _isnumber:
        out["ISNUMBER"] = _isnumber
    return out


_UFUNCS = {
    "ABS": np.abs, "ACOS": np.arccos, "ACOSH": np.arccosh, "ASIN": np.arcsin,
    "ASINH": np.arcsinh, "ATAN": np.arctan, "ATANH": np.arctanh, "COS": np.cos,
    "COSH": np.cosh, "DEGREES": np.degrees, "EXP": np.exp, "LN": np.log, "LOG10": np.log10,
    "RADIANS": np.radians, "SIGN": np.sign, "SIN": np.sin, "SINH": np.sinh, "SQRT": np.sqrt,
    "TAN": np.tan, "TANH": np.tanh,
}

#: Functions whose value differs from call to call: never folded into one value.
_VOLATILE = frozenset({"RAND", "RANDBETWEEN", "RANDARRAY", "NOW", "TODAY"})

_ARITH = {"+": np.add, "-": np.subtract, "*": np.multiply, "/": np.divide, "^": np.power}
_COMPARE = {"=": np.equal, "<>": np.not_equal, "<": np.less, ">": np.greater,
            "<=": np.less_equal, ">=": np.greater_equal}
_BIG = 2.0 ** 52


def _numeric(v: Vec) -> bool:
    return v.kind in ("n", "b")


# ----------------------------------------------------------------------------- compiler

class Compiler:
    """Compiles one syntax tree; ``slot_kinds[i]`` says what operand ``i`` is
    (``"cell"``, ``"range"``, ``"uniform"``)."""

    def __init__(self, slot_kinds):
        self.slot_kinds = slot_kinds

    def compile(self, node):
        kind = node[0]
        if kind == "const":
            return self.const(node[1])
        if kind == "missing":
            return self.const(V.EMPTY)
        if kind == "ref":
            i = node[1]
            return lambda ctx: ctx.slot(i)
        if kind == "isect":        # implicit intersection (see ..intersection)
            inner = node[1]
            if inner[0] != "ref":
                raise NotVectorisable("intersection of a reference expression")
            i = inner[1]
            if self.slot_kinds[i] in ("cell", "uniform-cell"):
                return lambda ctx: ctx.slot(i)
            return lambda ctx: ctx.slot.intersected(i)
        if kind == "un":
            return self.unary(node[1], self.compile(node[2]))
        if kind == "post":
            return self.percent(self.compile(node[2]))
        if kind == "bin":
            op = node[1]
            if op in (":", " ", ","):
                raise NotVectorisable(f"reference operator {op!r}")
            a, b = self.compile(node[2]), self.compile(node[3])
            if op in _ARITH:
                return self.arith(op, a, b)
            if op in _COMPARE:
                return self.compare(op, a, b)
            fn = OPERATORS[op]
            return lambda ctx: self.fold(fn, [a(ctx), b(ctx)], ctx.n, general)
        if kind == "call":
            return self.call(node[1], node[2])
        raise NotVectorisable(f"node {kind}")  # pragma: no cover

    # ------------------------------------------------------------ leaves
    @staticmethod
    def const(value):
        if isinstance(value, np.ndarray):
            value.flags.writeable = False
        return lambda ctx: Vec.full(value, ctx.n)

    @staticmethod
    def fold(fn, args, n, call, kind="n"):
        """``fn`` element by element; once when every argument is one value."""
        if all(a.uniform is not None for a in args):
            value = call(fn, [a.uniform[0] for a in args])
            if value is not CRASH:
                return Vec.full(value, n)
        return elementwise(fn, args, n, call, kind)

    # ------------------------------------------------------------ operators
    def unary(self, op, x):
        fn = OPERATORS["U" + op]
        if op == "+":
            def plus(ctx):
                a = x(ctx)
                if a.bad is None:
                    return a
                return finish(a.x, a.kind, a.bad, lambda i: general(fn, [a.element(i)]))
            return plus

        def minus(ctx):
            a = x(ctx)
            if not _numeric(a):  # pragma: no cover - every Vec is numeric or boolean
                return elementwise(fn, [a], ctx.n)
            return finish(-a.x, "n", a.bad, lambda i: general(fn, [a.element(i)]))
        return minus

    def percent(self, x):
        fn = OPERATORS["%"]

        def run(ctx):
            a = x(ctx)
            return finish(a.x / 100.0, "n", a.bad, lambda i: general(fn, [a.element(i)]))
        return run

    def arith(self, op, x, y):
        fn = OPERATORS[op]
        ufunc = _ARITH[op]

        def run(ctx):
            a, b = x(ctx), y(ctx)
            if a.uniform is not None and b.uniform is not None:
                return self.fold(fn, [a, b], ctx.n, general)
            with np.errstate(all="ignore"):
                r = ufunc(a.x, b.x)
                suspect = ~np.isfinite(r)
                if op == "^":
                    suspect |= a.x <= 0.0   # Python's float power differs from numpy here
            slow = either(a.bad, b.bad, suspect)
            return finish(r, "n", slow, lambda i: general(fn, [a.element(i), b.element(i)]))
        return run

    def compare(self, op, x, y):
        fn = OPERATORS[op]
        ufunc = _COMPARE[op]

        def run(ctx):
            a, b = x(ctx), y(ctx)
            if a.uniform is not None and b.uniform is not None:
                return self.fold(fn, [a, b], ctx.n, general, "b")
            if a.kind != b.kind:   # a boolean against a number: Excel's type order
                return elementwise(fn, [a, b], ctx.n, general, "b")
            r = ufunc(a.x, b.x).astype(float)
            slow = either(a.bad, b.bad)
            return finish(r, "b", slow, lambda i: general(fn, [a.element(i), b.element(i)]))
        return run

    # ------------------------------------------------------------ calls
    def call(self, written, arg_nodes):
        from ..formula import _is_index_of_reference

        if _is_index_of_reference(("call", written, arg_nodes)):
            raise NotVectorisable("INDEX of a reference (a reference result)")
        res = resolve(written)
        if res.kind == "unknown":
            return lambda ctx: Vec.full(V.NAME, ctx.n)
        if res.kind == "reference":
            return self.reference_call(res.target, arg_nodes)
        args = [self.compile(a) for a in arg_nodes]
        if res.kind == "catalogue":
            return self.catalogue(res.target, args)
        name, fn = res.name, res.target
        trusted = _trusted().get(name) is fn
        if trusted:
            special = self.special(name, fn, args)
            if special is not None:
                return special
        if name in _VOLATILE:
            return lambda ctx: elementwise(fn, [a(ctx) for a in args], ctx.n, guarded)
        return lambda ctx: self.fold(fn, [a(ctx) for a in args], ctx.n, guarded)

    def reference_call(self, name, arg_nodes):
        if name not in ("ROW", "COLUMN") or len(arg_nodes) > 1:
            raise NotVectorisable(f"reference function {name}")
        if not arg_nodes:
            if name == "ROW":
                return lambda ctx: Vec(ctx.rows.astype(float))
            return lambda ctx: Vec.full(float(ctx.col), ctx.n)
        node = arg_nodes[0]
        if node[0] != "ref" or self.slot_kinds[node[1]] not in ("cell", "uniform-cell"):
            raise NotVectorisable(f"{name} of a range")
        i = node[1]
        attr = "rows_of" if name == "ROW" else "cols_of"
        return lambda ctx: Vec(getattr(ctx.slot, attr)(i).astype(float))

    def special(self, name, fn, args):
        if name in _UFUNCS and len(args) == 1:
            return self.ufunc(_UFUNCS[name], fn, args[0])
        if name == "PI" and not args:
            return lambda ctx: Vec.full(math.pi, ctx.n)
        if name == "LOG" and len(args) in (1, 2):
            return self.log(fn, args)
        if name in ("POWER", "MOD") and len(args) == 2:
            return self.power_mod(name, fn, *args)
        if name == "INT" and len(args) == 1:   # (beyond 2^52 the library's int is not a float)
            return self.ufunc(lambda x: np.where(np.abs(x) < _BIG, np.floor(x) + 0.0, np.nan),
                              fn, args[0])
        if name in ("ROUND", "ROUNDUP", "ROUNDDOWN") and len(args) == 2:
            return self.round(name, fn, *args)
        if name in ("MIN", "MAX") and args:
            return self.extreme(np.minimum if name == "MIN" else np.maximum, fn, args)
        if name == "SUM" and 0 < len(args) <= 7:
            return self.total(fn, args)
        if name == "IF" and len(args) in (2, 3):
            return self.if_(fn, args)
        if name == "IFERROR" and len(args) == 2:
            return self.iferror(fn, *args)
        if name in ("AND", "OR") and args:
            return self.logical(np.logical_and if name == "AND" else np.logical_or, fn, args)
        if name == "NOT" and len(args) == 1:
            return self.not_(fn, args[0])
        if name in ("ISERROR", "ISNUMBER") and len(args) == 1:
            return self.test(name, fn, args[0])
        return None

    def ufunc(self, ufunc, fn, x):
        def run(ctx):
            a = x(ctx)
            if a.uniform is not None:
                return self.fold(fn, [a], ctx.n, guarded)
            with np.errstate(all="ignore"):
                r = ufunc(a.x)
                slow = either(a.bad, ~np.isfinite(r))
            return finish(r, "n", slow, lambda i: guarded(fn, [a.element(i)]))
        return run

    def log(self, fn, args):
        def run(ctx):
            vs = [a(ctx) for a in args]
            if all(v.uniform is not None for v in vs):
                return self.fold(fn, vs, ctx.n, guarded)
            with np.errstate(all="ignore"):
                if len(vs) == 1:
                    r = np.log(vs[0].x) / np.log(10)
                    slow = either(vs[0].bad, ~np.isfinite(r))
                else:
                    r = np.log(vs[0].x) / np.log(vs[1].x)
                    slow = either(vs[0].bad, vs[1].bad, ~np.isfinite(r), vs[1].x == 0.0)
            return finish(r, "n", slow, lambda i: guarded(fn, [v.element(i) for v in vs]))
        return run

    def power_mod(self, name, fn, x, y):
        def run(ctx):
            a, b = x(ctx), y(ctx)
            if a.uniform is not None and b.uniform is not None:
                return self.fold(fn, [a, b], ctx.n, guarded)
            with np.errstate(all="ignore"):
                if name == "POWER":
                    r = np.power(a.x, b.x)
                    edge = a.x == 0.0
                else:
                    r = np.mod(a.x, b.x)
                    edge = b.x == 0.0
                slow = either(a.bad, b.bad, ~np.isfinite(r), edge)
            return finish(r, "n", slow, lambda i: guarded(fn, [a.element(i), b.element(i)]))
        return run

    def round(self, name, fn, x, digits):
        def run(ctx):
            a, d = x(ctx), digits(ctx)
            if a.uniform is not None and d.uniform is not None:
                return self.fold(fn, [a, d], ctx.n, guarded)
            with np.errstate(all="ignore"):
                k = np.trunc(d.x)
                slow = either(a.bad, d.bad, np.abs(k) > 15, ~np.isfinite(a.x))
                k = np.where(np.abs(k) > 15, 0, k).astype(int)
                # 10 ** int(digits) as Python computes it (an int, or a float for < 0)
                scale = np.array([float(10 ** int(j)) for j in range(-15, 16)])[k + 15]
                y = np.abs(a.x * scale)
                slow = either(slow, ~(y < _BIG))
                if name == "ROUND":
                    f = np.floor(y)
                    v = f + (y - f >= 0.5)
                elif name == "ROUNDUP":
                    v = np.ceil(y)
                else:
                    v = np.floor(y)
                v = v / scale
                r = np.where(a.x < 0, -v, v)
            return finish(r, "n", slow, lambda i: guarded(fn, [a.element(i), d.element(i)]))
        return run

    def extreme(self, ufunc, fn, args):
        def run(ctx):
            vs = [a(ctx) for a in args]
            if all(v.uniform is not None for v in vs):
                return self.fold(fn, vs, ctx.n, guarded)
            if any(v.kind != "n" for v in vs):
                return elementwise(fn, vs, ctx.n, guarded)
            r = vs[0].x.copy()
            for v in vs[1:]:
                r = ufunc(r, v.x)
            slow = either(*[v.bad for v in vs])
            return finish(r, "n", slow, lambda i: guarded(fn, [v.element(i) for v in vs]))
        return run

    def total(self, fn, args):
        def run(ctx):
            vs = [a(ctx) for a in args]
            if all(v.uniform is not None for v in vs):
                return self.fold(fn, vs, ctx.n, guarded)
            if any(v.kind != "n" for v in vs):
                return elementwise(fn, vs, ctx.n, guarded)
            with np.errstate(all="ignore"):
                r = vs[0].x + 0.0
                for v in vs[1:]:
                    r = r + v.x
                slow = either(*[v.bad for v in vs], ~np.isfinite(r))
            return finish(r, "n", slow, lambda i: guarded(fn, [v.element(i) for v in vs]))
        return run

    def if_(self, fn, args):
        def run(ctx):
            given = [a(ctx) for a in args]
            if all(v.uniform is not None for v in given):
                return self.fold(fn, given, ctx.n, guarded)
            cond, yes = given[0], given[1]
            no = given[2] if len(given) == 3 else Vec.full(False, ctx.n)
            if yes.kind != no.kind:
                yes, no = yes.as_numbers(), no.as_numbers()
            out = _choose(cond.x != 0.0, yes, no)
            slow = either(cond.bad, _not_simple(out), _crashed(given))
            return _patch(out, slow, lambda i: guarded(fn, [v.element(i) for v in given]))
        return run

    def iferror(self, fn, x, alt):
        def run(ctx):
            v, w = x(ctx), alt(ctx)
            if v.uniform is not None and w.uniform is not None:
                return self.fold(fn, [v, w], ctx.n, guarded)
            crashed = _crashed([w])
            if v.bad is None and crashed is None:
                return v
            errors = np.zeros(ctx.n, dtype=bool)
            if v.bad is not None:
                for i in np.flatnonzero(v.bad).tolist():
                    errors[i] = isinstance(v.o[i], _XL_ERROR)
            a, b = (v, w) if v.kind == w.kind else (v.as_numbers(), w.as_numbers())
            out = _choose(~errors, a, b)
            slow = either(_not_simple(out), crashed)
            return _patch(out, slow, lambda i: guarded(fn, [v.element(i), w.element(i)]))
        return run

    def logical(self, ufunc, fn, args):
        def run(ctx):
            vs = [a(ctx) for a in args]
            if all(v.uniform is not None for v in vs):
                return self.fold(fn, vs, ctx.n, guarded, "b")
            r = vs[0].x != 0.0
            for v in vs[1:]:
                r = ufunc(r, v.x != 0.0)
            slow = either(*[v.bad for v in vs])
            return finish(r.astype(float), "b", slow,
                          lambda i: guarded(fn, [v.element(i) for v in vs]))
        return run

    def not_(self, fn, x):
        def run(ctx):
            a = x(ctx)
            if a.uniform is not None:
                return self.fold(fn, [a], ctx.n, guarded, "b")
            return finish((a.x == 0.0).astype(float), "b", a.bad,
                          lambda i: guarded(fn, [a.element(i)]))
        return run

    def test(self, name, fn, x):
        def run(ctx):
            a = x(ctx)
            if a.uniform is not None:
                return self.fold(fn, [a], ctx.n, guarded, "b")
            clean = 0.0 if name == "ISERROR" or a.kind == "b" else 1.0
            return finish(np.full(ctx.n, clean), "b", a.bad,
                          lambda i: guarded(fn, [a.element(i)]))
        return run

    # ------------------------------------------------------------ catalogue
    def catalogue(self, name, args):
        from ...catalogue import lookup

        spec = lookup(name)
        params = spec.worksheet_params if spec is not None else ()
        vectorable = (spec is not None and not spec.returns_text
                      and spec.result_kind == "broadcast" and len(args) <= len(params))
        kinds = [p.kind for p in params[:len(args)]]

        def run(ctx):
            vs = [a(ctx) for a in args]
            one = CatalogueFunction(name, _no_note)
            if all(v.uniform is not None for v in vs):
                return self.fold(one, vs, ctx.n, general)
            if not vectorable:
                return elementwise(one, vs, ctx.n, general)
            return catalogue_vector(name, one, vs, kinds, ctx.n)
        return run


_XL_ERROR = type(V.NUM)


def _crashed(vecs):
    """Mask of elements that crashed in any of ``vecs`` (the general engine evaluates
    every argument, so a crash anywhere ends the cell)."""
    out = None
    for v in vecs:
        if v.bad is None:
            continue
        for i in np.flatnonzero(v.bad).tolist():
            if v.o[i] is CRASH:
                if out is None:
                    out = np.zeros(v.n, dtype=bool)
                out[i] = True
    return out


def _no_note(*_args, **_kwargs) -> None:
    """Messages of error values come from the general engine (the plan redoes those cells)."""


def _choose(take, yes: Vec, no: Vec) -> Vec:
    """Elements of ``yes`` where ``take``, else of ``no`` (same kind)."""
    x = np.where(take, yes.x, no.x)
    if yes.bad is None and no.bad is None:
        return Vec(x, yes.kind)
    n = x.shape[0]
    ybad = yes.bad if yes.bad is not None else np.zeros(n, dtype=bool)
    nbad = no.bad if no.bad is not None else np.zeros(n, dtype=bool)
    bad = np.where(take, ybad, nbad)
    o = np.empty(n, dtype=object)
    if yes.o is not None:
        sel = take & ybad
        o[sel] = yes.o[sel]
    if no.o is not None:
        sel = ~take & nbad
        o[sel] = no.o[sel]
    return Vec(x, yes.kind, bad, o).tidy()


def _not_simple(v: Vec):
    """Mask of object elements the general engine would transform (blank, array, crash)."""
    if v.bad is None:
        return None
    out = np.zeros(v.n, dtype=bool)
    o = v.o
    for i in np.flatnonzero(v.bad).tolist():
        out[i] = not is_simple(o[i])
    return out


def _patch(out: Vec, slow, compute) -> Vec:
    if slow is None or not slow.any():
        return out
    out = out.writable()
    for i in np.flatnonzero(slow).tolist():
        out.put(i, compute(i))
    return out.tidy()


# ----------------------------------------------------------------------------- catalogue

#: Replaces ``worksheet.evaluate`` for the catalogue call of a group when set
#: (``tubefuncs recalc --dask``: :func:`tubefuncs.sweeps.recalc.dask_groups`).
group_evaluator = None


def catalogue_vector(name: str, one, vs, kinds, n: int) -> Vec:
    """One worksheet call for the group; element by element where it cannot be one call.

    Arguments that are one value for every cell go as that value; the others
    as a column.  If the call as a whole fails (an argument that is one value
    is invalid, a text argument that varies, ...), every cell is called on
    its own, as the general engine calls it.
    """
    from ... import worksheet
    from ...errors import CellError, TubeInputError

    args = []
    single = np.zeros(n, dtype=bool)     # elements that need a call of their own
    for v, kind in zip(vs, kinds):
        if v.uniform is not None:
            args.append(_to_worksheet(v.uniform[0], CellError))
            continue
        if kind != "number":
            return elementwise(one, vs, n, general)
        if v.bad is None and v.kind == "n":
            args.append(v.x.reshape(n, 1))
            continue
        col = np.empty((n, 1), dtype=object)
        xs = v.x.tolist()
        bad = v.bad
        for i in range(n):
            if bad is not None and bad[i]:
                item = v.o[i]
                if item is CRASH or isinstance(item, np.ndarray):
                    single[i] = True
                    col[i, 0] = None
                else:
                    col[i, 0] = _to_worksheet(item, CellError)
            elif v.kind == "b":
                col[i, 0] = bool(xs[i])
            else:
                col[i, 0] = xs[i]
        args.append(col)
    try:
        result = (group_evaluator or worksheet.evaluate)(name, args)
    except TubeInputError:
        return elementwise(one, vs, n, general)
    except Exception:  # a physics module failing on the column: cell by cell
        return elementwise(one, vs, n, general)
    value = result.value
    if not isinstance(value, np.ndarray) or value.shape != (n, 1):
        return elementwise(one, vs, n, general)
    x = np.asarray(value[:, 0], dtype=float)
    bad = ~np.isfinite(x)
    if not bad.any() and not single.any():
        return Vec(x)
    out = Vec(x.copy(), "n", np.zeros(n, dtype=bool), np.empty(n, dtype=object))
    errors = result.errors or {}
    for i in np.flatnonzero(bad).tolist():
        err = errors.get((i, 0))
        if err is not None:
            code = err.error_value if err.error_value in V.ERRORS else "#VALUE!"
            out.put(i, V.error(code))
        else:
            out.put(i, V.NUM)
    for i in np.flatnonzero(single).tolist():
        out.put(i, general(one, [v.element(i) for v in vs]))
    return out.tidy()
