"""Which code answers a function name in a formula.

Resolution order for a name as written in a formula:

1. the catalogue (``TUBE_...``), after removing the prefixes saved files put
   before user-defined functions (``_xludf.``, ``_xll.``, an add-in path...);
2. the few reference functions the engine answers itself (``ROW``,
   ``COLUMN``, ``ROWS``, ``COLUMNS``: they need the address, not the values);
3. the Excel function library of the `formulas` package (EUPL 1.1+);
4. anything else is ``#NAME?``, with a message that says whether the function
   is unknown or known to Excel but not supported headless.
"""

from __future__ import annotations

import functools
import math

import formulas
import numpy as np

from . import values as V
from .catalogue_bridge import catalogue_names, strip_udf_prefix

#: Excel functions the engine deliberately refuses (need a live spreadsheet
#: application, or references computed at run time, which the dependency
#: graph cannot see in advance).
UNSUPPORTED = {
    "INDIRECT": "builds references from text at run time",
    "OFFSET": "builds references at run time",
    "CELL": "needs the spreadsheet application's state",
    "INFO": "needs the spreadsheet application's state",
    "ISFORMULA": "needs the formula text of a cell",
    "FORMULATEXT": "needs the formula text of a cell",
    "ANCHORARRAY": "spill references (A1#) are not supported",
    "GETPIVOTDATA": "pivot tables are not evaluated",
    "RTD": "needs a live data server",
    "WEBSERVICE": "needs the network",
    "CUBEVALUE": "needs an OLAP connection",
    "LAMBDA": "LAMBDA/LET are not supported headless",
    "LET": "LAMBDA/LET are not supported headless",
    "_TUBEFUNCS_DATA_TABLE": "what-if data tables are not evaluated",
}

#: Functions whose arguments are references, answered by the engine itself.
REFERENCE_FUNCTIONS = frozenset({"ROW", "COLUMN", "ROWS", "COLUMNS", "SUBTOTAL", "SINGLE",
                                 "COUNTBLANK"})


def _is_text(v) -> bool:
    return isinstance(v, str) and not V.is_error(v) and v is not V.EMPTY


def _drop_text(arg):
    """Text inside an array/range -> blank: Excel's aggregates skip it."""
    if isinstance(arg, np.ndarray) and arg.ndim > 0:
        if not any(_is_text(v) for v in arg.flat):
            return arg
        out = np.array(arg, dtype=object, copy=True)
        for idx, v in np.ndenumerate(out):
            if _is_text(v):
                out[idx] = V.EMPTY
        return out
    return arg


def _numbers_only(fn):
    """Excel aggregates ignore text held in ranges and arrays (the `formulas`
    library would coerce a numeric text such as "4"); text typed as an
    argument is still coerced."""
    def wrapper(*args):
        return fn(*[_drop_text(a) for a in args])
    return functools.update_wrapper(wrapper, fn)


def _isnumber(value):
    """ISNUMBER: True for numbers only (not for numeric text)."""
    def one(v):
        return isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(
            v, (bool, np.bool_))
    if isinstance(value, np.ndarray) and value.ndim > 0:
        out = np.empty(value.shape, dtype=object)
        for idx, v in np.ndenumerate(value):
            out[idx] = one(v)
        return out
    return one(V.scalar(value))


#: Aggregates that skip text in ranges (Excel's documented behaviour).
_NUMERIC_AGGREGATES = (
    "SUM", "COUNT", "AVERAGE", "MAX", "MIN", "PRODUCT", "MEDIAN", "STDEV", "STDEV.S",
    "STDEV.P", "STDEVP", "VAR", "VAR.S", "VAR.P", "VARP", "SUMSQ", "GEOMEAN", "HARMEAN",
    "LARGE", "SMALL", "AVEDEV", "DEVSQ", "MODE", "MODE.SNGL",
)


@functools.lru_cache(maxsize=1)
def excel_library() -> dict:
    """The `formulas` function library, as ``NAME -> callable(*values)``.

    Corrected here where `formulas` 1.3 departs from Excel (found with the
    battery in ``tests/benchmarks/excel_battery.py``): aggregates skip text held in
    ranges; ISNUMBER is false for numeric text.
    """
    out = _formulas_library()
    for name in _NUMERIC_AGGREGATES:
        for key in (name, "_XLFN." + name):
            if key in out:
                out[key] = _numbers_only(out[key])
    out["ISNUMBER"] = _isnumber
    for name, fn in _EXTRAS.items():
        out.setdefault(name, fn)
        out.setdefault("_XLFN." + name, fn)
    return out


# ----------------------------------------------------------------------------- extras
# Excel functions `formulas` 1.3 lacks, written here from Excel's documented
# definitions.

def _number(x):
    """Excel's coercion of one argument to a number, or an error value."""
    x = V.scalar(x)
    if isinstance(x, np.ndarray):
        return V.VALUE
    if V.is_error(x):
        return x
    if x is V.EMPTY:
        return 0.0
    if isinstance(x, bool):
        return float(x)
    if isinstance(x, float):
        return x
    try:
        return float(str(x).strip())
    except ValueError:
        return V.VALUE


def _numbers(*args):
    vals = [_number(a) for a in args]
    for v in vals:
        if V.is_error(v):
            return v, None
    return None, vals


def _quotient(numerator, denominator):
    err, (n, d) = _numbers(numerator, denominator)
    if err is not None:
        return err
    if d == 0:
        return V.DIV0
    return float(math.trunc(n / d))


def _combin(number, chosen):
    err, (n, k) = _numbers(number, chosen)
    if err is not None:
        return err
    n, k = math.trunc(n), math.trunc(k)
    if n < 0 or k < 0 or k > n:
        return V.NUM
    return float(math.comb(n, k))


def _combina(number, chosen):
    err, (n, k) = _numbers(number, chosen)
    if err is not None:
        return err
    n, k = math.trunc(n), math.trunc(k)
    if n < 0 or k < 0 or (n == 0 and k > 0):
        return V.NUM
    return float(math.comb(n + k - 1, k)) if n + k > 0 else 1.0


def _sequence(rows, columns=V.EMPTY, start=V.EMPTY, step=V.EMPTY):
    err, (r, c, s, d) = _numbers(rows, 1.0 if columns is V.EMPTY else columns,
                                 1.0 if start is V.EMPTY else start,
                                 1.0 if step is V.EMPTY else step)
    if err is not None:
        return err
    r, c = math.trunc(r), math.trunc(c)
    if r < 1 or c < 1:
        return V.ERRORS["#CALC!"]
    if r * c > 5_000_000:
        return V.NUM
    out = np.empty((r, c), dtype=object)
    for i in range(r):
        for j in range(c):
            out[i, j] = s + d * (i * c + j)
    return out


_EXTRAS = {"QUOTIENT": _quotient, "COMBIN": _combin, "COMBINA": _combina,
           "SEQUENCE": _sequence}

#: SUBTOTAL function numbers -> aggregate (1-11; 101-111 also skip hidden rows).
_SUBTOTAL = {1: "AVERAGE", 2: "COUNT", 3: "COUNTA", 4: "MAX", 5: "MIN", 6: "PRODUCT",
             7: "STDEV", 8: "STDEVP", 9: "SUM", 10: "VAR", 11: "VARP"}


def subtotal(args: list, env) -> object:
    """SUBTOTAL(function_num, ref1, ...): skips SUBTOTAL cells inside the
    references and, for 101-111, hidden rows (Excel's documented behaviour)."""
    from .references import Area

    if len(args) < 2:
        return V.VALUE
    code = _number(env.read_reference(args[0]) if isinstance(args[0], (Area, list))
                   else args[0])
    if V.is_error(code):
        return code
    code = int(code)
    skip_hidden = code > 100
    name = _SUBTOTAL.get(code - 100 if skip_hidden else code)
    if name is None:
        return V.VALUE
    values = []
    for arg in args[1:]:
        areas = arg if isinstance(arg, list) else [arg]
        for area in areas:
            if not isinstance(area, Area):
                return V.VALUE if not V.is_error(area) else area
            values.append(env.subtotal_values(env.clip(area), skip_hidden))
    return V.scalar(excel_library()[name](*values))

def _formulas_library() -> dict:
    from .deferred import import_formulas_statistics

    import_formulas_statistics()   # before formulas imports it with all of scipy.stats
    out = {}
    for name, entry in formulas.get_functions().items():
        if isinstance(entry, dict):
            func = entry.get("function")
            extra = entry.get("extra_inputs") or {}
            if not callable(func):
                continue
            if not extra:
                out[name] = func
                continue
            # Functions that want formulas' own compile-time inputs: the "Run"
            # flag (False when evaluating) is the only one we can supply.
            if all(str(k) == "Run" for k in extra):
                out[name] = functools.partial(func, *([False] * len(extra)))
        elif callable(entry):
            out[name] = entry
    return out


class Resolution:
    """What a function name resolved to: ``kind`` and ``target``."""

    __slots__ = ("kind", "target", "name", "message")

    def __init__(self, kind: str, target, name: str, message: str = ""):
        self.kind = kind          # "catalogue" | "reference" | "excel" | "unknown"
        self.target = target
        self.name = name
        self.message = message


@functools.lru_cache(maxsize=4096)
def resolve(written: str) -> Resolution:
    """Resolve a function name as written (``LOG10``, ``_xludf.TUBE_GAMMA``...)."""
    upper = written.upper()
    bare = strip_udf_prefix(upper)
    if bare in catalogue_names() or (bare.startswith("TUBE_") and _in_catalogue(bare)):
        return Resolution("catalogue", bare, bare)
    if bare in REFERENCE_FUNCTIONS:
        return Resolution("reference", bare, bare)
    if bare in UNSUPPORTED or upper in UNSUPPORTED:
        key = bare if bare in UNSUPPORTED else upper
        return Resolution("unknown", None, key,
                          f"{key} is an Excel function the headless engine does not "
                          f"support ({UNSUPPORTED[key]})")
    lib = excel_library()
    for candidate in (upper, bare, "_XLFN." + bare):
        if candidate in lib:
            return Resolution("excel", lib[candidate], bare)
    if "!" in upper:
        return Resolution("unknown", None, written,
                          f"{written}: unknown function from another workbook or add-in")
    if bare.startswith("TUBE_"):
        return Resolution("unknown", None, bare,
                          f"{bare} is not a tubefuncs function{_nearest(bare)} "
                          f"(see TUBE_HELP or the docs)")
    return Resolution("unknown", None, bare, f"unknown function {bare}")


def _in_catalogue(name: str) -> bool:
    """A name the catalogue's name index does not hold, confirmed against the whole
    catalogue (an index is only ever a shortcut)."""
    from ..catalogue import CATALOGUE

    return name in CATALOGUE


def _nearest(name: str) -> str:
    """``"; did you mean TUBE_PERVEANCE?"`` for a misspelt catalogue name ('' if none is near)."""
    import difflib

    close = difflib.get_close_matches(name, sorted(catalogue_names()), n=1, cutoff=0.75)
    return f"; did you mean {close[0]}?" if close else ""


def reference_function(name: str, args: list, host, env=None) -> object:
    """ROW/COLUMN/ROWS/COLUMNS/SUBTOTAL: ``args`` hold areas (or values)."""
    from .references import Area

    if name == "SUBTOTAL":
        return subtotal(args, env)
    if name == "SINGLE":
        return implicit_intersection(args, host, env)
    if name == "COUNTBLANK":
        return countblank(args, env)
    if len(args) > 1:
        return V.VALUE
    if not args:
        if name in ("ROW", "COLUMN") and host is not None:
            return float(host[1] if name == "ROW" else host[2])
        return V.VALUE
    arg = args[0]
    if isinstance(arg, Area):
        if name == "ROW":
            return _column_vector(range(arg.r1, arg.r2 + 1)) if arg.r1 != arg.r2 else float(arg.r1)
        if name == "COLUMN":
            return (np.array([[float(c) for c in range(arg.c1, arg.c2 + 1)]], dtype=object)
                    if arg.c1 != arg.c2 else float(arg.c1))
        rows, cols = arg.shape
        return float(rows if name == "ROWS" else cols)
    if V.is_error(arg):
        return arg
    if name in ("ROW", "COLUMN"):
        return V.VALUE
    shape = V.as_array(arg).shape
    return float(shape[0] if name == "ROWS" else shape[1])


def countblank(args: list, env):
    """COUNTBLANK(range): blank cells, and cells holding an empty text.  A whole
    column or row counts the cells beyond the used part of the sheet too (the
    engine reads only the used part)."""
    from .references import Area

    if len(args) != 1:
        return V.VALUE
    arg = args[0]
    if not isinstance(arg, Area):
        return arg if V.is_error(arg) else V.VALUE
    clipped = env.clip(arg)
    values = V.as_array(env.read(clipped))
    inside = sum(1 for v in values.flat if v is V.EMPTY or v == "")
    return float(inside + arg.size - clipped.size)


def implicit_intersection(args: list, host, env):
    """``@ref`` (saved as ``_xlfn.SINGLE``): the cell of ``ref`` in the formula's
    row or column; a single value for an array (Excel's implicit intersection)."""
    from .intersection import intersect
    from .references import Area

    if len(args) != 1:
        return V.VALUE
    arg = args[0]
    if isinstance(arg, (Area, list)):
        return intersect(arg, env, host)
    if isinstance(arg, np.ndarray) and arg.ndim > 0:
        return V.as_array(arg)[0, 0]
    return arg


def _column_vector(rows) -> np.ndarray:
    return np.array([[float(r)] for r in rows], dtype=object)
